//! `coilwright serve [DESIGN] [-o DIR] [--port N]`: a local workbench page.
//!
//! A small HTTP server (tiny_http) bound to 127.0.0.1 serves one page built
//! into the binary (`serve/page.*`) and a few JSON calls:
//!
//! - `POST /api/view {gen, text, set?}`: the design's previews and rule
//!   problems (or its errors at line and column); `set: {key, value}`
//!   first edits one key of the text (the form). Then
//!   `POST /api/predictions {gen, text}`: its key numbers, cautions and
//!   plots (the analysis, the slow half). One worker computes; a newer
//!   edit supersedes a queued or running one, which answers `superseded`.
//! - `POST /api/sweep`, `GET /api/sweep`: a sweep of the design (at most
//!   [`work::MAX_SWEEP`] candidates and [`work::SWEEP_TIME`]) on one
//!   thread fewer than the machine has, so the page stays responsive.
//! - `POST /api/write {text, replace, allow_over_limits}`: `build`'s files
//!   into the folder given with `-o` (never another), atomically,
//!   refusing an existing folder unless `replace`.
//! - `POST /api/save {text}`: the text into the design file given on the
//!   command line (never another).
//!
//! Every request passes [`guard::check`] (Host, Origin, JSON, size) first.

mod guard;
mod work;

use super::pipeline;
use super::{Exit, Failure};
use anyhow::{Context, anyhow};
use serde::Deserialize;
use serde_json::{Value, json};
use std::io::Read;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, AtomicU64, AtomicUsize, Ordering};
use std::sync::mpsc;
use std::sync::{Arc, Condvar, Mutex};
use std::time::Instant;

const PAGE_HTML: &str = include_str!("serve/page.html");
const PAGE_CSS: &str = include_str!("serve/page.css");
const PAGE_JS: &str = include_str!("serve/page.js");

/// Most requests handled at once; more are answered 503.
const MAX_IN_FLIGHT: usize = 32;

/// The arguments of `serve`, after clap.
pub struct Args<'a> {
    /// The design file: loaded at start, the only place "Save design" writes.
    pub design: Option<&'a Path>,
    /// The only folder "Write files" writes.
    pub out: Option<&'a Path>,
    /// Port on 127.0.0.1 (0: any free port).
    pub port: u16,
}

/// The workbench's state, shared by the request threads.
struct State {
    port: u16,
    /// Design file from the command line (Save writes only here).
    design: Option<PathBuf>,
    /// Where the design text is taken to live (profile paths resolve
    /// against it).
    design_at: PathBuf,
    /// The profile path the command line's design file names, the only
    /// one read.
    profile_file: Option<String>,
    /// Output folder from the command line (Write writes only here).
    out: Option<PathBuf>,
    /// The text the page starts with.
    initial: String,
    /// Whether `initial` came from the design file.
    from_file: bool,
    updates: Updates,
    sweep: Mutex<Option<work::SweepRun>>,
    sweep_ids: AtomicU64,
    writing: Mutex<()>,
    in_flight: AtomicUsize,
}

/// The latest edit waiting for the worker; a newer one replaces it.
struct Updates {
    latest: AtomicU64,
    slot: Mutex<Option<Job>>,
    ready: Condvar,
}

struct Job {
    seq: u64,
    phase: Phase,
    text: String,
    reply: mpsc::Sender<Value>,
}

/// Which half of a view a job computes: the copper and rule check come
/// back first, the predictions (the slow analysis) in a second request.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Phase {
    Copper,
    Predictions,
}

/// A view request from the page.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct ViewAsk {
    /// The page's own edit counter, echoed back.
    #[serde(rename = "gen")]
    edit: u64,
    text: String,
    set: Option<SetKey>,
}

/// A predictions request from the page.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct PredictAsk {
    /// The page's own edit counter, echoed back.
    #[serde(rename = "gen")]
    edit: u64,
    text: String,
}

/// One form field changed.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct SetKey {
    key: String,
    value: String,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct WriteAsk {
    text: String,
    #[serde(default)]
    replace: bool,
    #[serde(default)]
    allow_over_limits: bool,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct SaveAsk {
    text: String,
}

/// Runs `serve` until the process is stopped.
pub fn run(a: Args<'_>) -> Result<Exit, Failure> {
    let (initial, from_file) = match a.design {
        Some(p) if p.exists() => (
            std::fs::read_to_string(p)
                .with_context(|| format!("cannot read design file {}", p.display()))?,
            true,
        ),
        _ => (
            // The same starter as `coilwright init`'s default.
            coilwright::design::templates()
                .iter()
                .find(|t| t.name == "fin-actuator")
                .map(|t| t.text.to_string())
                .unwrap_or_default(),
            false,
        ),
    };
    let design_at = match a.design {
        Some(p) => p.to_path_buf(),
        None => PathBuf::from("untitled.toml"),
    };
    // The profile path of the design file given on the command line is
    // the only one the page's text may name.
    // (Read as written, so that it holds even while the file has problems.)
    let profile_file = if from_file {
        initial
            .parse::<toml_edit::DocumentMut>()
            .ok()
            .and_then(|doc| coilwright::design::edit::written_value(&doc, "rules.profile"))
    } else {
        None
    };
    let server = tiny_http::Server::http(("127.0.0.1", a.port)).map_err(|e| {
        anyhow!(
            "cannot listen on 127.0.0.1:{}: {e}; pass --port 0 for any free port",
            a.port
        )
    })?;
    let port = server
        .server_addr()
        .to_ip()
        .map(|s| s.port())
        .ok_or_else(|| anyhow!("the server has no IP address"))?;
    let state = Arc::new(State {
        port,
        design: a.design.map(Path::to_path_buf),
        design_at,
        profile_file,
        out: a.out.map(Path::to_path_buf),
        initial,
        from_file,
        updates: Updates {
            latest: AtomicU64::new(0),
            slot: Mutex::new(None),
            ready: Condvar::new(),
        },
        sweep: Mutex::new(None),
        sweep_ids: AtomicU64::new(0),
        writing: Mutex::new(()),
        in_flight: AtomicUsize::new(0),
    });
    let mut s = format!("coilwright workbench: http://127.0.0.1:{port}/\n");
    match &state.design {
        Some(p) if state.from_file => s.push_str(&format!(
            "  design {} (Save design writes here)\n",
            p.display()
        )),
        Some(p) => s.push_str(&format!(
            "  design {} does not exist yet: starting from a template (Save design creates it)\n",
            p.display()
        )),
        None => {
            s.push_str("  no design file given: starting from a template (Save design is off)\n")
        }
    }
    match &state.out {
        Some(o) => s.push_str(&format!(
            "  output folder {} (Write files writes here)\n",
            o.display()
        )),
        None => s.push_str("  no output folder: give -o DIR to write files\n"),
    }
    s.push_str("  stop with Ctrl-C\n");
    super::print_out(&s)?;

    let worker = Arc::clone(&state);
    std::thread::spawn(move || update_worker(&worker));
    for request in server.incoming_requests() {
        if state.in_flight.fetch_add(1, Ordering::SeqCst) >= MAX_IN_FLIGHT {
            state.in_flight.fetch_sub(1, Ordering::SeqCst);
            respond(
                request,
                503,
                &json!({"status": "busy", "message": "too many requests at once"}),
            );
            continue;
        }
        let st = Arc::clone(&state);
        std::thread::spawn(move || {
            let _count = InFlight(&st.in_flight);
            handle(&st, request);
        });
    }
    Ok(Exit::Ok)
}

/// One request being handled; counted down when dropped (also when its
/// thread panics).
struct InFlight<'a>(&'a AtomicUsize);

impl Drop for InFlight<'_> {
    fn drop(&mut self) {
        self.0.fetch_sub(1, Ordering::SeqCst);
    }
}

/// The worker: computes the newest edit, one at a time.
fn update_worker(st: &State) {
    // The design text last checked, kept for its predictions.
    let mut last: Option<(String, pipeline::Checked)> = None;
    loop {
        let job = {
            let mut slot = st.updates.slot.lock().unwrap_or_else(|e| e.into_inner());
            loop {
                if let Some(j) = slot.take() {
                    break j;
                }
                slot = st
                    .updates
                    .ready
                    .wait(slot)
                    .unwrap_or_else(|e| e.into_inner());
            }
        };
        let current = || st.updates.latest.load(Ordering::SeqCst) == job.seq;
        let v = if current() {
            // A bug deep in a computation must not stop the worker: the
            // page is told and the next edit is computed as usual.
            std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
                compute(st, &mut last, &job)
            }))
            .unwrap_or_else(|_| {
                last = None;
                json!({"status": "failed",
                       "message": "internal error while computing this design (please report it with the design text)"})
            })
        } else {
            json!({"status": "superseded"})
        };
        let _ = job.reply.send(v);
    }
}

/// One job: the copper phase checks the text and keeps the result; the
/// predictions phase analyses the kept design when the text is the same
/// (else checks it again).
fn compute(st: &State, last: &mut Option<(String, pipeline::Checked)>, job: &Job) -> Value {
    let fresh = |text: &str| work::copper(&st.design_at, st.profile_file.as_deref(), text);
    match job.phase {
        Phase::Copper => {
            let (v, checked) = fresh(&job.text);
            *last = checked.map(|c| (job.text.clone(), c));
            v
        }
        Phase::Predictions => {
            if last.as_ref().is_none_or(|(t, _)| *t != job.text) {
                let (v, checked) = fresh(&job.text);
                *last = checked.map(|c| (job.text.clone(), c));
                if last.is_none() {
                    return v;
                }
            }
            match last {
                Some((_, checked)) => work::predictions(checked),
                None => json!({"status": "failed", "message": "nothing to analyse"}),
            }
        }
    }
}

/// Hands `text` to the worker and waits for its view (or `superseded`).
fn submit(st: &State, phase: Phase, text: String) -> Value {
    let seq = st.updates.latest.fetch_add(1, Ordering::SeqCst) + 1;
    let (reply, rx) = mpsc::channel();
    {
        let mut slot = st.updates.slot.lock().unwrap_or_else(|e| e.into_inner());
        if let Some(old) = slot.replace(Job {
            seq,
            phase,
            text,
            reply,
        }) {
            let _ = old.reply.send(json!({"status": "superseded"}));
        }
    }
    st.updates.ready.notify_one();
    rx.recv()
        .unwrap_or_else(|_| json!({"status": "failed", "message": "the worker stopped"}))
}

fn header<'r>(r: &'r tiny_http::Request, name: &'static str) -> Option<&'r str> {
    r.headers()
        .iter()
        .find(|h| h.field.equiv(name))
        .map(|h| h.value.as_str())
}

fn respond_bytes(request: tiny_http::Request, status: u16, kind: &str, body: Vec<u8>) {
    let mut resp = tiny_http::Response::from_data(body)
        .with_status_code(status)
        .with_chunked_threshold(usize::MAX);
    let headers = [
        ("Content-Type", kind),
        ("Cache-Control", "no-store"),
        ("X-Content-Type-Options", "nosniff"),
        ("Referrer-Policy", "no-referrer"),
        (
            "Content-Security-Policy",
            "default-src 'self'; img-src 'self' data:; style-src 'self'; frame-ancestors 'none'; form-action 'none'",
        ),
    ];
    for (k, v) in headers {
        if let Ok(h) = tiny_http::Header::from_bytes(k.as_bytes(), v.as_bytes()) {
            resp.add_header(h);
        }
    }
    let _ = request.respond(resp);
}

fn respond(request: tiny_http::Request, status: u16, v: &Value) {
    respond_bytes(
        request,
        status,
        "application/json; charset=utf-8",
        serde_json::to_vec(v).unwrap_or_default(),
    );
}

/// Reads the body (at most [`guard::MAX_BODY`] bytes) as `T`.
fn body<T: serde::de::DeserializeOwned>(
    request: &mut tiny_http::Request,
) -> Result<T, (u16, Value)> {
    let mut bytes = Vec::new();
    let limit = guard::MAX_BODY as u64 + 1;
    if request
        .as_reader()
        .take(limit)
        .read_to_end(&mut bytes)
        .is_err()
    {
        return Err((
            400,
            json!({"status": "refused", "message": "cannot read the body"}),
        ));
    }
    if bytes.len() > guard::MAX_BODY {
        return Err((
            413,
            json!({"status": "refused", "message": guard::Refused::TooLarge.to_string()}),
        ));
    }
    serde_json::from_slice(&bytes).map_err(|e| {
        (
            400,
            json!({"status": "refused", "message": format!("refused: bad request body: {e}")}),
        )
    })
}

fn handle(st: &Arc<State>, mut request: tiny_http::Request) {
    let method = request.method().as_str().to_string();
    let seen = guard::Seen {
        method: &method,
        host: header(&request, "Host"),
        origin: header(&request, "Origin"),
        fetch_site: header(&request, "Sec-Fetch-Site"),
        content_type: header(&request, "Content-Type"),
        length: request.body_length(),
    };
    if let Err(refused) = guard::check(st.port, &seen) {
        let status = refused.status();
        respond(
            request,
            status,
            &json!({"status": "refused", "message": refused.to_string()}),
        );
        return;
    }
    let url = request.url().split('?').next().unwrap_or("").to_string();
    let (status, v) = match (method.as_str(), url.as_str()) {
        ("GET", "/") => {
            return respond_bytes(request, 200, "text/html; charset=utf-8", PAGE_HTML.into());
        }
        ("GET", "/page.css") => {
            return respond_bytes(request, 200, "text/css; charset=utf-8", PAGE_CSS.into());
        }
        ("GET", "/page.js") => {
            return respond_bytes(
                request,
                200,
                "text/javascript; charset=utf-8",
                PAGE_JS.into(),
            );
        }
        ("GET", "/api/session") => (200, session(st)),
        ("POST", "/api/view") => match body::<ViewAsk>(&mut request) {
            Ok(ask) => (200, view(st, ask)),
            Err(e) => e,
        },
        ("POST", "/api/predictions") => match body::<PredictAsk>(&mut request) {
            Ok(ask) => (200, predictions(st, ask)),
            Err(e) => e,
        },
        ("POST", "/api/sweep") => match body::<work::SweepAsk>(&mut request) {
            Ok(ask) => start_sweep(st, ask),
            Err(e) => e,
        },
        ("GET", "/api/sweep") => (200, sweep_status(st)),
        ("POST", "/api/write") => match body::<WriteAsk>(&mut request) {
            Ok(ask) => write_files(st, ask),
            Err(e) => e,
        },
        ("POST", "/api/save") => match body::<SaveAsk>(&mut request) {
            Ok(ask) => save(st, ask),
            Err(e) => e,
        },
        _ => (404, json!({"status": "refused", "message": "not found"})),
    };
    respond(request, status, &v);
}

fn session(st: &State) -> Value {
    json!({
        "text": st.initial,
        "design": st.design.as_ref().map(|p| p.display().to_string()),
        "design_exists": st.from_file,
        "out": st.out.as_ref().map(|p| p.display().to_string()),
        "form": work::form_fields(),
        "max_sweep": work::MAX_SWEEP,
        "sweep_seconds": work::SWEEP_TIME.as_secs(),
        "version": env!("CARGO_PKG_VERSION"),
    })
}

fn view(st: &State, ask: ViewAsk) -> Value {
    let started = Instant::now();
    let mut text = ask.text;
    if let Some(set) = ask.set {
        match coilwright::design::edit::set_key(&text, &set.key, Some(&set.value)) {
            Ok(t) => text = t,
            Err(e) => {
                return json!({"gen": ask.edit, "status": "edit_refused", "key": set.key,
                              "message": e.to_string()});
            }
        }
    }
    let mut v = submit(st, Phase::Copper, text.clone());
    v["gen"] = json!(ask.edit);
    v["text"] = json!(text);
    v["server_ms"] = json!(started.elapsed().as_secs_f64() * 1e3);
    v
}

/// The second half of a view: the predictions for the text the page
/// shows (normally the one whose copper was just computed).
fn predictions(st: &State, ask: PredictAsk) -> Value {
    let started = Instant::now();
    let mut v = submit(st, Phase::Predictions, ask.text);
    v["gen"] = json!(ask.edit);
    v["server_ms"] = json!(started.elapsed().as_secs_f64() * 1e3);
    v
}

fn start_sweep(st: &Arc<State>, ask: work::SweepAsk) -> (u16, Value) {
    let (base, sweep) = match work::prepare_sweep(&st.design_at, st.profile_file.as_deref(), &ask) {
        Ok(p) => p,
        Err(v) => return (200, v),
    };
    let id = st.sweep_ids.fetch_add(1, Ordering::SeqCst) + 1;
    let done = Arc::new(AtomicUsize::new(0));
    let cancel = Arc::new(AtomicBool::new(false));
    {
        let mut slot = st.sweep.lock().unwrap_or_else(|e| e.into_inner());
        if let Some(old) = slot.as_ref() {
            old.cancel.store(true, Ordering::SeqCst);
        }
        *slot = Some(work::SweepRun {
            id,
            total: sweep.len(),
            done: Arc::clone(&done),
            cancel: Arc::clone(&cancel),
            started: Instant::now(),
            result: None,
        });
    }
    // One thread fewer than the machine has (at least one): the page's
    // updates keep a core.
    let threads = std::thread::available_parallelism()
        .map(|n| n.get().saturating_sub(1).max(1))
        .unwrap_or(1);
    let total = sweep.len();
    let st = Arc::clone(st);
    std::thread::spawn(move || {
        let v = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            work::run_sweep(&base, &sweep, threads, &done, &cancel)
        }))
        .unwrap_or_else(|_| json!({"failed": "internal error during the sweep"}));
        let mut slot = st.sweep.lock().unwrap_or_else(|e| e.into_inner());
        if let Some(run) = slot.as_mut().filter(|r| r.id == id) {
            run.result = Some(v);
        }
    });
    (200, json!({"status": "started", "id": id, "total": total}))
}

fn sweep_status(st: &State) -> Value {
    let slot = st.sweep.lock().unwrap_or_else(|e| e.into_inner());
    match slot.as_ref() {
        Some(run) => run.status(),
        None => json!({"state": "idle"}),
    }
}

/// "Write files": `build`'s files into the `-o` folder, with `build`'s
/// rules (nothing on rule errors or limits exceeded unless allowed; an
/// existing folder only with `replace`; all files or none).
fn write_files(st: &State, ask: WriteAsk) -> (u16, Value) {
    let Some(out) = &st.out else {
        return (
            409,
            json!({"status": "refused",
            "message": "no output folder: restart the workbench with -o DIR to write files"}),
        );
    };
    let _one_at_a_time = st.writing.lock().unwrap_or_else(|e| e.into_inner());
    if out.exists() && !ask.replace {
        return (
            200,
            json!({"status": "exists",
            "message": format!("{} exists; replace it? (the old folder is removed only after the new one is complete)", out.display())}),
        );
    }
    let checked = match pipeline::check_text(&st.design_at, ask.text, st.profile_file.as_deref()) {
        Ok(c) => c,
        Err(f) => return (200, work::errors_view(&f)),
    };
    let verdict = match super::build::produce(&checked, ask.allow_over_limits) {
        Ok(v) => v,
        Err(f) => return (200, work::errors_view(&f)),
    };
    let super::build::Verdict::Files(files, _) = &verdict else {
        let status = if matches!(verdict, super::build::Verdict::OverLimits(_)) {
            "over_limits"
        } else {
            "rule_violations"
        };
        return (
            200,
            json!({"status": status,
            "message": super::build::refusal_text(&verdict, &checked, out)}),
        );
    };
    match super::out_dir::write(out, files, ask.replace) {
        Ok(()) => (
            200,
            json!({"status": "written",
            "message": super::build::built_text(&checked, files.len(), out)}),
        ),
        Err(e) => (200, json!({"status": "failed", "message": e.to_string()})),
    }
}

/// "Save design": the text into the design file of the command line.
fn save(st: &State, ask: SaveAsk) -> (u16, Value) {
    let Some(path) = &st.design else {
        return (
            409,
            json!({"status": "refused",
            "message": "no design file: restart the workbench with a design file path to save"}),
        );
    };
    let _one_at_a_time = st.writing.lock().unwrap_or_else(|e| e.into_inner());
    match super::report::write_file(path, ask.text.as_bytes(), true) {
        Ok(()) => (
            200,
            json!({"status": "saved", "message": format!("saved {}", path.display())}),
        ),
        Err(e) => (
            200,
            json!({"status": "failed", "message": format!("{e:#}")}),
        ),
    }
}
