//! Output digests: every file `build` writes for every example, every
//! starter template and the golden test design, and the README's example
//! sweep's `candidates.csv`, compared by SHA-256 with
//! `tests/fixtures/output-digests.txt`.
//!
//! Runs with `COILWRIGHT_SIMD=plain`, so the digests hold on any processor.
//!
//! This is the guard for refactoring ("behaviour unchanged" means these
//! bytes unchanged). When a change is meant to alter outputs, rerun with
//! `COILWRIGHT_BLESS=1 cargo test --release outputs` and commit the new
//! digest file together with the change that explains it.

/// Runs the binary with plain arithmetic (`COILWRIGHT_SIMD=plain`): the
/// vector paths agree with the plain one to 1e-13, not bit for bit, so
/// digests made on one processor hold on every other only this way.
fn coilwright(args: &[&str]) -> (i32, String, String) {
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_coilwright"))
        .args(args)
        .env("COILWRIGHT_SIMD", "plain")
        .output()
        .expect("run coilwright");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into(),
        String::from_utf8_lossy(&out.stderr).into(),
    )
}
use sha2::{Digest, Sha256};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

const DIGESTS: &str = "tests/fixtures/output-digests.txt";

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Every design the digests cover, as (label, path).
fn designs() -> Vec<(String, PathBuf)> {
    let mut out = Vec::new();
    for dir in ["examples"] {
        let mut paths: Vec<PathBuf> = std::fs::read_dir(root().join(dir))
            .unwrap()
            .map(|e| e.unwrap().path())
            .filter(|p| p.extension().is_some_and(|x| x == "toml"))
            .collect();
        paths.sort();
        for p in paths {
            let label = format!("{dir}/{}", p.file_name().unwrap().to_string_lossy());
            out.push((label, p));
        }
    }
    out
}

fn sha(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

fn walk(dir: &Path, base: &Path, out: &mut BTreeMap<String, String>) {
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            walk(&p, base, out);
        } else {
            let rel = p
                .strip_prefix(base)
                .unwrap()
                .to_string_lossy()
                .replace('\\', "/");
            out.insert(rel, sha(&std::fs::read(&p).unwrap()));
        }
    }
}

fn current_digests() -> String {
    let tmp = tempfile::tempdir().unwrap();
    let mut lines = Vec::new();
    for (label, path) in designs() {
        let out = tmp.path().join(label.replace('/', "_"));
        let (code, _, err) =
            coilwright(&["build", path.to_str().unwrap(), "-o", out.to_str().unwrap()]);
        assert_eq!(code, 0, "{label}: build failed: {err}");
        let mut files = BTreeMap::new();
        walk(&out, &out, &mut files);
        for (f, h) in files {
            lines.push(format!("{label} {f} {h}"));
        }
    }
    let sweep = tmp.path().join("sweep");
    let design = root().join("examples/fin-actuator.toml");
    let mut args = vec!["sweep", design.to_str().unwrap()];
    args.extend_from_slice(super::common::README_SWEEP);
    args.extend(["-o", sweep.to_str().unwrap()]);
    let (code, _, err) = coilwright(&args);
    assert_eq!(code, 0, "README sweep failed: {err}");
    let csv = std::fs::read(sweep.join("candidates.csv")).unwrap();
    lines.push(format!("readme-sweep candidates.csv {}", sha(&csv)));
    lines.join("\n") + "\n"
}

#[test]
fn build_outputs_match_their_committed_digests() {
    let now = current_digests();
    let path = root().join(DIGESTS);
    if std::env::var_os("COILWRIGHT_BLESS").is_some() {
        std::fs::write(&path, &now).unwrap();
        return;
    }
    let before = std::fs::read_to_string(&path).expect("committed digest file");
    let old: BTreeMap<&str, &str> = before.lines().filter_map(|l| l.rsplit_once(' ')).collect();
    let new: BTreeMap<&str, &str> = now.lines().filter_map(|l| l.rsplit_once(' ')).collect();
    let mut diffs = Vec::new();
    for (k, v) in &new {
        match old.get(k) {
            None => diffs.push(format!("new file: {k}")),
            Some(o) if o != v => diffs.push(format!("changed: {k}")),
            _ => {}
        }
    }
    for k in old.keys() {
        if !new.contains_key(k) {
            diffs.push(format!("missing: {k}"));
        }
    }
    assert!(
        diffs.is_empty(),
        "outputs differ from {DIGESTS} (bless with COILWRIGHT_BLESS=1 if intended):\n{}",
        diffs.join("\n")
    );
}
