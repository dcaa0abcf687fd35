#!/usr/bin/env python3
"""Reference values for the field and the magnet force, computed with magpylib.

Exports the conductors of the reference designs from coilwright
(`cargo run --release --example export_conductor`, polylines in metres) and
computes with magpylib (PyPI, SI units):

* B at fixed observation points from the coil's polylines (magpylib.current.Polyline),
  per ampere at the terminals;
* the axial force on the cylinder magnet: the Lorentz force I dl x B on the
  polylines in magpylib's own field of the cylinder (magpylib.magnet.Cylinder),
  integrated with 4-point Gauss-Legendre on pieces of at most 0.1 mm, negated
  (force on the magnet, positive away from the coil).

and, with scipy (PyPI), Maxwell's mutual inductance of coaxial circles
M = mu0 sqrt(ab) ((2/k - k) K(k) - (2/k) E(k)) for a few geometries
(scipy.special.ellipk/ellipe take the parameter m = k^2).

Writes tests/fixtures/magpylib_reference.json. Run from the repository root
with the interop venv:  .venv-interop/bin/python tests/reference/make_magpylib_fixtures.py
Pass --check to compare with the stored fixture instead of writing it.
"""
import json
import subprocess
import sys
from pathlib import Path

import magpylib as magpy
import numpy as np
import scipy
from scipy.special import ellipe, ellipk

ROOT = Path(__file__).resolve().parents[2]
FIXTURE = ROOT / "tests" / "fixtures" / "magpylib_reference.json"


def export():
    out = subprocess.run(
        ["cargo", "run", "--quiet", "--release", "--example", "export_conductor"],
        cwd=ROOT, check=True, capture_output=True, text=True,
    ).stdout
    return json.loads(out)


def field(case):
    lines = [magpy.current.Polyline(current=p["weight"], vertices=np.array(p["vertices"]))
             for p in case["polylines"]]
    pts = np.array(case["points_m"])
    b = magpy.getB(lines, pts, sumup=True)
    return np.asarray(b).reshape(len(pts), 3)


def force(case):
    m = case["magnet"]
    if m is None:
        return None
    cyl = magpy.magnet.Cylinder(
        polarization=(0, 0, m["remanence_t"]),
        dimension=(m["diameter_m"], m["thickness_m"]),
        position=(0, 0, m["gap_m"] + m["thickness_m"] / 2),
    )
    xg, wg = np.polynomial.legendre.leggauss(4)
    mids, dls = [], []
    for p in case["polylines"]:
        v = np.array(p["vertices"])
        for a, b in zip(v[:-1], v[1:]):
            n = max(1, int(np.ceil(np.linalg.norm(b - a) / 1e-4)))
            for i in range(n):
                for x, w in zip(xg, wg):
                    t = (i + (x + 1) / 2) / n
                    mids.append(a + (b - a) * t)
                    dls.append((b - a) * w / 2 / n * p["weight"])
    mids, dls = np.array(mids), np.array(dls)
    bfield = cyl.getB(mids)
    f_coil = np.cross(dls, bfield).sum(axis=0)
    return float(-f_coil[2])


def maxwell(a, b, d):
    m = 4 * a * b / ((a + b) ** 2 + d ** 2)
    k = np.sqrt(m)
    mu0 = 4e-7 * np.pi
    return float(mu0 * np.sqrt(a * b) * ((2 / k - k) * ellipk(m) - 2 / k * ellipe(m)))


MAXWELL_CASES = [(0.010, 0.010, 0.001), (0.010, 0.005, 0.002), (0.003, 0.0031, 0.0001),
                 (0.02, 0.001, 0.0), (0.0045, 0.0045, 8.5e-5), (0.005, 0.012, 0.03)]


def main():
    data = export()
    cases = []
    for c in data["cases"]:
        b = field(c)
        cases.append({
            "name": c["name"],
            "vertices": sum(len(p["vertices"]) for p in c["polylines"]),
            "points_m": c["points_m"],
            "b_t_per_a": b.tolist(),
            "force_n_per_a": force(c),
        })
    out = {
        "source": "magpylib (PyPI) via tests/reference/make_magpylib_fixtures.py",
        "magpylib_version": magpy.__version__,
        "numpy_version": np.__version__,
        "scipy_version": scipy.__version__,
        "cases": cases,
        "maxwell_h": [{"a_m": a, "b_m": b, "d_m": d, "m_h": maxwell(a, b, d)} for a, b, d in MAXWELL_CASES],
    }
    if "--check" in sys.argv:
        ref = json.loads(FIXTURE.read_text())
        worst = 0.0
        for new, old in zip(cases, ref["cases"]):
            scale = max(np.abs(np.array(old["b_t_per_a"])).max(), 1e-30)
            worst = max(worst, float(np.abs(np.array(new["b_t_per_a"]) - np.array(old["b_t_per_a"])).max() / scale))
            if old["force_n_per_a"] is not None:
                worst = max(worst, abs(new["force_n_per_a"] / old["force_n_per_a"] - 1))
        print(f"magpylib {magpy.__version__}: largest relative change from the fixture {worst:.2e}")
        sys.exit(0 if worst < 1e-6 else 1)
    FIXTURE.write_text(json.dumps(out, indent=1) + "\n")
    print(f"wrote {FIXTURE} (magpylib {magpy.__version__})")


if __name__ == "__main__":
    main()
