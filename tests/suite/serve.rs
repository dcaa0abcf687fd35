//! `coilwright serve`: the workbench's security (plain HTTP over a
//! TcpStream against the built binary) and the browser test
//! (tests/interop/serve_browser.py: Debian's chromium and chromium-driver
//! driven by Selenium, see tests/interop/setup.sh), whose written files
//! are then compared with `coilwright build` and read by the interop
//! checkers (gerbonara, pygerber, shapely, kiutils: tests/interop/checks.py).

use super::common::entries;
use std::io::{BufRead, BufReader, Read, Write};
use std::net::TcpStream;
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Stdio};

/// A running workbench, stopped when dropped.
struct Bench {
    child: Child,
    port: u16,
}

impl Drop for Bench {
    fn drop(&mut self) {
        let _ = self.child.kill();
        let _ = self.child.wait();
    }
}

fn start(design: &Path, out: &Path) -> Bench {
    let mut child = Command::new(env!("CARGO_BIN_EXE_coilwright"))
        .args([
            "serve",
            design.to_str().unwrap(),
            "-o",
            out.to_str().unwrap(),
        ])
        .args(["--port", "0"])
        .stdout(Stdio::piped())
        .spawn()
        .expect("start coilwright serve");
    let mut line = String::new();
    BufReader::new(child.stdout.take().unwrap())
        .read_line(&mut line)
        .unwrap();
    let port = line
        .trim()
        .trim_end_matches('/')
        .rsplit(':')
        .next()
        .and_then(|p| p.parse().ok())
        .unwrap_or_else(|| panic!("no address in {line:?}"));
    Bench { child, port }
}

/// Sends a raw request (Connection: close) and returns (status, body).
fn raw(port: u16, head: &str, body: &[u8]) -> (u16, String) {
    let mut s = TcpStream::connect(("127.0.0.1", port)).unwrap();
    s.set_read_timeout(Some(std::time::Duration::from_secs(60)))
        .unwrap();
    let _ = s.write_all(format!("{head}Connection: close\r\n\r\n").as_bytes());
    let _ = s.write_all(body);
    let mut got = Vec::new();
    let _ = s.read_to_end(&mut got);
    let text = String::from_utf8_lossy(&got).to_string();
    let status = text
        .split_whitespace()
        .nth(1)
        .and_then(|c| c.parse().ok())
        .unwrap_or(0);
    let body = text.split_once("\r\n\r\n").map(|x| x.1).unwrap_or("");
    (status, body.to_string())
}

fn fin_text() -> String {
    std::fs::read_to_string(repo().join("examples/fin-actuator.toml")).unwrap()
}

fn repo() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

#[test]
fn foreign_host_cross_origin_oversized_and_path_like_requests_are_refused() {
    let root = tempfile::tempdir().unwrap();
    let design = root.path().join("fin.toml");
    let out = root.path().join("out");
    std::fs::write(&design, fin_text()).unwrap();
    let b = start(&design, &out);
    let p = b.port;

    // The page itself, then the same with a foreign Host (DNS rebinding).
    let (s, page) = raw(
        p,
        &format!("GET / HTTP/1.1\r\nHost: 127.0.0.1:{p}\r\n"),
        b"",
    );
    assert_eq!(s, 200);
    assert!(page.contains("coilwright workbench"));
    let (s, _) = raw(
        p,
        &format!("GET / HTTP/1.1\r\nHost: localhost:{p}\r\n"),
        b"",
    );
    assert_eq!(s, 200);
    let (s, body) = raw(
        p,
        &format!("GET /api/session HTTP/1.1\r\nHost: attacker.example:{p}\r\n"),
        b"",
    );
    assert_eq!(s, 403, "{body}");
    assert!(
        !body.contains("fin-actuator"),
        "no design text to a foreign host"
    );
    let (s, _) = raw(p, "GET /api/session HTTP/1.1\r\n", b"");
    assert!(s == 403 || s == 400, "no Host: {s}");

    let text = fin_text();
    let write = serde_json::json!({"text": text, "replace": true});
    // Cross-origin POSTs: another site's Origin, or the browser saying so.
    let b2 = serde_json::to_vec(&write).unwrap();
    let cross = |origin_line: &str, kind: &str| {
        raw(
            p,
            &format!(
                "POST /api/write HTTP/1.1\r\nHost: 127.0.0.1:{p}\r\n{origin_line}Content-Type: {kind}\r\nContent-Length: {}\r\n",
                b2.len()
            ),
            &b2,
        )
        .0
    };
    assert_eq!(
        cross("Origin: http://attacker.example\r\n", "application/json"),
        403
    );
    assert_eq!(cross("Origin: null\r\n", "application/json"), 403);
    assert_eq!(
        cross("Sec-Fetch-Site: cross-site\r\n", "application/json"),
        403
    );
    // A plain HTML form can only send these types.
    assert_eq!(cross("", "text/plain"), 415);
    assert_eq!(cross("", "application/x-www-form-urlencoded"), 415);
    assert!(!out.exists(), "nothing written by refused requests");

    // Oversized bodies, declared and chunked.
    let big = vec![b'x'; 300 * 1024];
    let (s, _) = raw(
        p,
        &format!(
            "POST /api/save HTTP/1.1\r\nHost: 127.0.0.1:{p}\r\nContent-Type: application/json\r\nContent-Length: {}\r\n",
            big.len()
        ),
        &big,
    );
    assert_eq!(s, 413);
    let mut chunked = format!("{:x}\r\n", big.len()).into_bytes();
    chunked.extend_from_slice(&big);
    chunked.extend_from_slice(b"\r\n0\r\n\r\n");
    let (s, _) = raw(
        p,
        &format!(
            "POST /api/save HTTP/1.1\r\nHost: 127.0.0.1:{p}\r\nContent-Type: application/json\r\nTransfer-Encoding: chunked\r\n"
        ),
        &chunked,
    );
    assert_eq!(s, 413);

    // Path-like values: no request field names a path, and the design
    // text's own fields cannot lead outside.
    let evil = root.path().join("evil.toml");
    let (s, v) = post_own(
        p,
        "/api/save",
        &serde_json::json!({"text": "x", "path": evil.to_str()}),
    );
    assert_eq!(s, 400, "{v}");
    let (s, v) = post_own(
        p,
        "/api/write",
        &serde_json::json!({"text": text, "out": root.path().join("elsewhere")}),
    );
    assert_eq!(s, 400, "{v}");
    let named = text.replace("name = \"fin-actuator\"", "name = \"../../escape\"");
    let (_, v) = post_own(p, "/api/write", &serde_json::json!({"text": named}));
    assert_eq!(v["status"], "errors", "{v}");
    assert_eq!(v["errors"][0]["key"], "name");
    let profiled = text.replace("profile = \"standard\"", "profile = \"/etc/passwd\"");
    let (_, v) = post_own(
        p,
        "/api/view",
        &serde_json::json!({"gen": 1, "text": profiled}),
    );
    assert_eq!(v["status"], "errors", "{v}");
    assert_eq!(v["errors"][0]["key"], "rules.profile");
    assert!(
        v["errors"][0]["message"]
            .as_str()
            .unwrap()
            .contains("reads no file"),
        "{v}"
    );
    let (_, v) = post_own(
        p,
        "/api/view",
        &serde_json::json!({"gen": 2, "text": text, "set": {"key": "../../x", "value": "/etc"}}),
    );
    assert_eq!(v["status"], "edit_refused", "{v}");
    let (_, v) = post_own(
        p,
        "/api/sweep",
        &serde_json::json!({"text": profiled, "vary": ["coil.turns=10..12"], "objective": "force_n", "maximize": true}),
    );
    assert_eq!(v["status"], "errors", "{v}");
    // Sweeps are bounded in size.
    let (_, v) = post_own(
        p,
        "/api/sweep",
        &serde_json::json!({"text": text, "vary": ["coil.turns=4..40", "coil.layers=1..4", "coil.trace_width=0.1mm..0.3mm:0.05mm"],
                            "objective": "force_n", "maximize": true}),
    );
    assert_eq!(v["status"], "refused", "{v}");
    assert!(
        v["message"].as_str().unwrap().contains("at most 400"),
        "{v}"
    );

    assert!(!out.exists(), "nothing written");
    assert_eq!(
        std::fs::read_to_string(&design).unwrap(),
        text,
        "design untouched"
    );
    assert_eq!(
        entries(root.path()),
        vec!["fin.toml"],
        "no other file appeared"
    );
}

/// A POST from the page (own Host and Origin).
fn post_own(port: u16, path: &str, body: &serde_json::Value) -> (u16, serde_json::Value) {
    let b = serde_json::to_vec(body).unwrap();
    let head = format!(
        "POST {path} HTTP/1.1\r\nHost: 127.0.0.1:{port}\r\nOrigin: http://127.0.0.1:{port}\r\n\
         Sec-Fetch-Site: same-origin\r\nContent-Type: application/json\r\nContent-Length: {}\r\n",
        b.len()
    );
    let (status, text) = raw(port, &head, &b);
    (
        status,
        serde_json::from_str(&text).unwrap_or(serde_json::Value::Null),
    )
}

#[test]
fn edits_supersede_and_the_page_answers_while_a_sweep_runs() {
    let root = tempfile::tempdir().unwrap();
    let design = root.path().join("fin.toml");
    std::fs::write(&design, fin_text()).unwrap();
    let b = start(&design, &root.path().join("out"));
    let p = b.port;
    let text = fin_text();
    let (_, v) = post_own(
        p,
        "/api/sweep",
        &serde_json::json!({"text": text, "vary": ["coil.turns=4..40", "coil.layers=1..8"],
                            "require": ["temperature_c <= 60"], "objective": "force_per_sqrt_w_n", "maximize": true}),
    );
    assert_eq!(v["status"], "started", "{v}");
    // Several edits at once: each answers, the newest with its view; the
    // others with their own view or "superseded", never another's.
    let handles: Vec<_> = (0..4)
        .map(|i| {
            let t = text.replace("turns = 20", &format!("turns = {}", 10 + i));
            std::thread::spawn(move || {
                post_own(p, "/api/view", &serde_json::json!({"gen": i, "text": t})).1
            })
        })
        .collect();
    for (i, h) in handles.into_iter().enumerate() {
        let v = h.join().unwrap();
        assert_eq!(v["gen"], i, "{v}");
        match v["status"].as_str() {
            Some("superseded") => {}
            Some("ok") => assert_eq!(v["form"]["coil.turns"], format!("{}", 10 + i)),
            other => panic!("{other:?}: {v}"),
        }
    }
    let (_, v) = post_own(p, "/api/view", &serde_json::json!({"gen": 9, "text": text}));
    assert_eq!(v["status"], "ok", "{v}");
    let (s, status) = raw(
        p,
        &format!("GET /api/sweep HTTP/1.1\r\nHost: 127.0.0.1:{p}\r\n"),
        b"",
    );
    assert_eq!(s, 200);
    let status: serde_json::Value = serde_json::from_str(&status).unwrap();
    assert_eq!(status["total"], 37 * 8, "{status}");
}

#[test]
fn browser_edits_sweeps_writes_and_saves() {
    let py = repo().join(".venv-interop/bin/python");
    let hint = "run tests/interop/setup.sh (as root on Debian) to install chromium, chromium-driver \
                and selenium in .venv-interop";
    assert!(
        Path::new("/usr/bin/chromium").exists(),
        "chromium is missing: {hint}"
    );
    assert!(
        Path::new("/usr/bin/chromedriver").exists(),
        "chromium-driver is missing: {hint}"
    );
    let ok = Command::new(&py)
        .args(["-c", "import selenium, PIL"])
        .status()
        .is_ok_and(|s| s.success());
    assert!(ok, "the interop venv lacks selenium: {hint}");

    let root = tempfile::tempdir().unwrap();
    let design = root.path().join("design/fin-actuator.toml");
    std::fs::create_dir_all(design.parent().unwrap()).unwrap();
    std::fs::write(&design, fin_text()).unwrap();
    let out = root.path().join("out");
    let work = root.path().join("work");
    let run = Command::new(&py)
        .arg(repo().join("tests/interop/serve_browser.py"))
        .args([env!("CARGO_BIN_EXE_coilwright"), design.to_str().unwrap()])
        .args([out.to_str().unwrap(), work.to_str().unwrap()])
        .output()
        .expect("run serve_browser.py");
    let log = format!(
        "{}{}",
        String::from_utf8_lossy(&run.stdout),
        String::from_utf8_lossy(&run.stderr)
    );
    println!("{log}");
    assert!(run.status.success(), "browser test failed:\n{log}");

    // The written folder is exactly what `build` writes for the saved design.
    let reference = root.path().join("reference");
    let (code, stdout, stderr) = super::common::coilwright(&[
        "build",
        design.to_str().unwrap(),
        "-o",
        reference.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{stdout}{stderr}");
    let files = |d: &Path| -> Vec<(String, Vec<u8>)> {
        let mut v = Vec::new();
        let mut stack = vec![d.to_path_buf()];
        while let Some(dir) = stack.pop() {
            for e in std::fs::read_dir(&dir).unwrap() {
                let p = e.unwrap().path();
                if p.is_dir() {
                    stack.push(p);
                } else {
                    let rel = p.strip_prefix(d).unwrap().to_string_lossy().into_owned();
                    v.push((rel, std::fs::read(&p).unwrap()));
                }
            }
        }
        v.sort();
        v
    };
    let written = files(&out);
    assert!(written.len() > 10);
    assert_eq!(written, files(&reference), "Write files differs from build");

    // Read back by the interop checkers (sources in tests/interop/checks.py).
    let text = std::fs::read_to_string(&design).unwrap();
    let (d, layout) = coilwright::pipeline::parse_and_build(&text).expect("saved design is valid");
    let coilwright::geometry::Rect { min: lo, max: hi } = layout.outline_bounds();
    let expect = serde_json::json!({"design": d, "layout": layout,
                                    "outline_bounds": [[lo.x, lo.y], [hi.x, hi.y]]});
    let check_dir = root.path().join("checked");
    std::fs::create_dir_all(&check_dir).unwrap();
    for (rel, bytes) in &written {
        let p = check_dir.join(rel);
        std::fs::create_dir_all(p.parent().unwrap()).unwrap();
        std::fs::write(p, bytes).unwrap();
    }
    std::fs::write(
        check_dir.join("expect.json"),
        serde_json::to_vec(&expect).unwrap(),
    )
    .unwrap();
    for what in ["readers", "geometry", "symbol"] {
        let r = Command::new(&py)
            .arg(repo().join("tests/interop/checks.py"))
            .args([what, check_dir.to_str().unwrap()])
            .output()
            .unwrap();
        assert!(
            r.status.success(),
            "checks.py {what}:\n{}{}",
            String::from_utf8_lossy(&r.stdout),
            String::from_utf8_lossy(&r.stderr)
        );
    }
}

#[test]
fn bad_start_exits_2_and_says_why() {
    let root = tempfile::tempdir().unwrap();
    // A port already taken.
    let taken = std::net::TcpListener::bind("127.0.0.1:0").unwrap();
    let port = taken.local_addr().unwrap().port().to_string();
    let (code, out, err) = super::common::coilwright(&["serve", "--port", &port]);
    assert_eq!(code, 2, "{out}{err}");
    assert!(
        err.contains(&format!("127.0.0.1:{port}")) && err.contains("--port 0"),
        "{err}"
    );
    // A design path that is a folder.
    let dir = root.path().to_str().unwrap();
    let (code, out, err) = super::common::coilwright(&["serve", dir, "--port", "0"]);
    assert_eq!(code, 2, "{out}{err}");
    assert!(err.contains("cannot read design file"), "{err}");
    assert!(entries(root.path()).is_empty(), "nothing written");
}

#[test]
fn the_command_lines_profile_file_is_read_and_no_other() {
    let root = tempfile::tempdir().unwrap();
    let rules = std::fs::read_to_string(repo().join("templates/rules/standard.toml")).unwrap();
    std::fs::write(root.path().join("house.toml"), &rules).unwrap();
    std::fs::write(root.path().join("other.toml"), &rules).unwrap();
    let text = fin_text().replace("profile = \"standard\"", "profile = \"house.toml\"");
    let design = root.path().join("fin.toml");
    std::fs::write(&design, &text).unwrap();
    let b = start(&design, &root.path().join("out"));
    let (_, v) = post_own(
        b.port,
        "/api/view",
        &serde_json::json!({"gen": 1, "text": text}),
    );
    assert_eq!(v["status"], "ok", "{v}");
    let other = text.replace("house.toml", "other.toml");
    let (_, v) = post_own(
        b.port,
        "/api/view",
        &serde_json::json!({"gen": 2, "text": other}),
    );
    assert_eq!(v["status"], "errors", "{v}");
    assert_eq!(v["errors"][0]["key"], "rules.profile", "{v}");
}
