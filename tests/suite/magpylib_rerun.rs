//! Reruns the magpylib reference script (tests/reference/make_magpylib_fixtures.py)
//! with `--check`: the stored fixture must still match what magpylib 6.3
//! (PyPI) computes from our current conductor geometry. Needs the interop
//! venv from tests/interop/setup.sh; fails (never skips) without it.
use std::path::Path;
use std::process::Command;

#[test]
fn magpylib_fixture_is_current() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let python = root.join(".venv-interop/bin/python");
    assert!(
        python.exists(),
        "{} is missing: run tests/interop/setup.sh first (it installs magpylib and scipy)",
        python.display()
    );
    let out = Command::new(&python)
        .arg(root.join("tests/reference/make_magpylib_fixtures.py"))
        .arg("--check")
        .current_dir(root)
        .output()
        .expect("run the magpylib reference script");
    assert!(
        out.status.success(),
        "magpylib reference check failed:\n{}\n{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
}
