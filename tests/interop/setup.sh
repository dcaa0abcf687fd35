#!/usr/bin/env bash
# Installs everything the interop tests (tests/suite/interop.rs) need:
#   - Debian packages: kicad (6.0, its Python module `pcbnew` for Debian's
#     /usr/bin/python3), gerbv, python3-venv, chromium and chromium-driver
#     (the workbench's browser test, tests/interop/serve_browser.py);
#   - a virtual environment .venv-interop at the repository root with the
#     Gerber/Excellon readers and geometry/physics reference libraries
#     (scikit-fem: the 2-D finite-element checks of tests/interop/section_fem.py).
# Idempotent: a second run changes nothing and finishes quickly.
# Run as root on Debian 12 (bookworm).
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
cd "$root"

need_apt=0
[ -x /usr/bin/gerbv ] || need_apt=1
[ -x /usr/bin/chromium ] || need_apt=1
[ -x /usr/bin/chromedriver ] || need_apt=1
/usr/bin/python3 -c 'import pcbnew' >/dev/null 2>&1 || need_apt=1
/usr/bin/python3 -c 'import ensurepip, venv' >/dev/null 2>&1 || need_apt=1
if [ "$need_apt" = 1 ]; then
    SUDO=""
    [ "$(id -u)" = 0 ] || SUDO="sudo"
    $SUDO apt-get update
    DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y --no-install-recommends \
        kicad gerbv python3-venv python3-wxgtk4.0 chromium chromium-driver
fi

venv="$root/.venv-interop"
if [ ! -x "$venv/bin/python" ]; then
    /usr/bin/python3 -m venv "$venv"
fi
pins=(gerbonara==1.5.0 pygerber==2.4.3 shapely==2.2.0 numpy==2.4.6 magpylib==6.3.0 scipy==1.17.1 pillow==13.0.0 kiutils==1.4.8 selenium==4.50.0 ezdxf==1.4.4 scikit-fem==12.0.2)
if ! "$venv/bin/python" -c 'import gerbonara, pygerber, shapely, magpylib, scipy, PIL, kiutils, selenium, ezdxf, skfem' >/dev/null 2>&1; then
    "$venv/bin/pip" install --disable-pip-version-check -q "${pins[@]}"
fi
"$venv/bin/python" -c 'import gerbonara, pygerber, shapely, magpylib, scipy, kiutils, ezdxf, skfem; print("interop venv ready")'
/usr/bin/python3 -c 'import pcbnew; print("KiCad pcbnew", pcbnew.Version())'
dpkg-query -W -f="gerbv \${Version}\n" gerbv
dpkg-query -W -f="\${Package} \${Version}\n" chromium chromium-driver
