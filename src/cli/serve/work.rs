//! What the workbench computes: the page's view of a design (previews,
//! problems, numbers, plots) and sweeps, each through the same functions
//! the other commands call. Pure of I/O except the sweep's thread.

use super::super::check::{cautions_json, plural, violations_json};
use super::super::diagnostics::render_spec_errors_plain;
use super::super::pipeline::{self, Checked};
use super::super::{Failure, sweep};
use coilwright::design::edit;
use coilwright::explore::{Evaluation, Summary, Tally};
use coilwright::export::{report, svg};
use coilwright::physics::Analysis;
use serde_json::{Value, json};
use std::path::Path;
use std::sync::Arc;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::time::{Duration, Instant};

/// The keys the page's form shows, in order (each a registered key; its
/// doc and words come from the key registry).
pub const FORM_KEYS: &[&str] = &[
    "name",
    "coil.shape",
    "coil.sides",
    "coil.outer_diameter",
    "coil.inner_diameter",
    "coil.turns",
    "coil.trace_width",
    "coil.clearance",
    "coil.layers",
    "coil.wiring",
    "stackup.kind",
    "stackup.copper",
    "drive.current",
    "drive.voltage",
    "drive.max_temperature",
    "rules.profile",
];

/// The form's fields: key, doc and the words a choice accepts.
pub fn form_fields() -> Value {
    use coilwright::design::keys::{KEYS, Kind};
    FORM_KEYS
        .iter()
        .filter_map(|path| KEYS.iter().find(|k| k.path() == *path))
        .map(|k| {
            let words: Vec<&str> = match k.kind {
                Kind::Choice(w) => w.to_vec(),
                _ if k.path() == "rules.profile" => {
                    coilwright::rules::Profile::builtin_names().collect()
                }
                _ => Vec::new(),
            };
            json!({"key": k.path(), "name": k.name, "doc": k.doc, "choices": words})
        })
        .collect()
}

/// The form's values as the text writes them (`null` for keys it leaves
/// out); `null` altogether when the text is not TOML.
fn form_values(text: &str) -> Value {
    let Ok(doc) = text.parse::<toml_edit::DocumentMut>() else {
        return Value::Null;
    };
    FORM_KEYS
        .iter()
        .map(|k| (k.to_string(), json!(edit::written_value(&doc, k))))
        .collect::<serde_json::Map<_, _>>()
        .into()
}

/// One of the report's key numbers as the page shows it: its report.json
/// key, label, unit and the factor from the SI value to that unit;
/// `optional` numbers (those of a drive frequency, a rotor, an array) are
/// left off the page when the report has none.
struct Number {
    key: &'static str,
    label: &'static str,
    unit: &'static str,
    factor: f64,
    optional: bool,
}

/// A number every report has.
const fn always(key: &'static str, label: &'static str, unit: &'static str, factor: f64) -> Number {
    Number {
        key,
        label,
        unit,
        factor,
        optional: false,
    }
}

/// A number only some designs have.
const fn when(key: &'static str, label: &'static str, unit: &'static str, factor: f64) -> Number {
    Number {
        key,
        label,
        unit,
        factor,
        optional: true,
    }
}

const NUMBERS: &[Number] = &[
    always("resistance_ohm_20c", "resistance at 20 °C", "Ω", 1.0),
    always(
        "resistance_ohm_hot",
        "resistance at the drive's temperature",
        "Ω",
        1.0,
    ),
    always("inductance_h", "inductance", "µH", 1e6),
    always("current_a", "current", "A", 1.0),
    always("voltage_v", "voltage", "V", 1.0),
    always("power_w", "power", "mW", 1e3),
    always("temperature_c", "temperature at the drive", "°C", 1.0),
    always(
        "max_current_a",
        "largest current within max_temperature",
        "A",
        1.0,
    ),
    always("field_center_t_per_a", "field at the centre", "mT/A", 1e3),
    always("force_n", "force on the magnet", "mN", 1e3),
    always("force_per_sqrt_w_n", "force per √W", "mN/√W", 1e3),
    always("trace_length_mm", "trace length", "mm", 1.0),
    always("thickness_mm", "board thickness", "mm", 1.0),
    always(
        "bend_radius_dynamic_mm",
        "smallest bend radius, flexing",
        "mm",
        1.0,
    ),
    when(
        "resistance_ohm_ac",
        "resistance at the drive frequency",
        "Ω",
        1.0,
    ),
    when("q_factor", "Q at the drive frequency", "", 1.0),
    always("capacitance_f", "self-capacitance", "pF", 1e12),
    always("self_resonance_hz", "self-resonance", "MHz", 1e-6),
    when("winding_factor", "winding factor", "", 1.0),
    when(
        "back_emf_v_per_rad_s",
        "back-EMF, phase peak",
        "mV/(rad/s)",
        1e3,
    ),
    when(
        "torque_constant_n_m_per_a",
        "torque constant (sine drive)",
        "mN·m/A",
        1e3,
    ),
    when("torque_ripple_percent", "torque ripple", "%", 1.0),
    when("torque_max_n_m", "largest continuous torque", "mN·m", 1e3),
    when(
        "copper_loss_w",
        "copper loss at the rotor's torque",
        "mW",
        1e3,
    ),
];

/// `v` with four significant digits (no exponent for everyday sizes).
pub fn sig4(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let digits = (3 - v.abs().log10().floor() as i32).clamp(0, 9) as usize;
    format!("{v:.digits$}")
}

/// The key numbers with units, each flagged when it exceeds the limit
/// the design sets for itself (the temperature above `max_temperature`,
/// the current above the largest that stays within it, the copper loss of
/// a rotor torque above the largest continuous one).
fn numbers(report: &Value) -> Value {
    let max_t = report["inputs"]["max_temperature_c"].as_f64();
    let max_i = report["max_current_a"].as_f64();
    NUMBERS
        .iter()
        .filter(|n| !(n.optional && report[n.key].as_f64().is_none()))
        .map(|n| {
            let si = report[n.key].as_f64();
            let over = match (n.key, si) {
                ("temperature_c", Some(t)) => max_t.is_some_and(|m| t > m),
                ("current_a", Some(i)) => max_i.is_some_and(|m| i > m),
                ("copper_loss_w", Some(_)) => {
                    let load = &report["rotor"]["load"];
                    load["torque_n_m"].as_f64() > load["torque_max_n_m"].as_f64()
                }
                _ => false,
            };
            json!({
                "key": n.key,
                "label": n.label,
                "unit": n.unit,
                "si": si,
                "shown": si.map(|v| sig4(v * n.factor)),
                "over": over,
            })
        })
        .collect()
}

/// The page's view of a design whose text has problems: each at its line
/// and column with `check`'s message, and the whole as `check` prints it.
pub fn errors_view(f: &Failure) -> Value {
    match f {
        Failure::Spec { path, text, errors } => {
            let list: Vec<Value> = errors
                .errors
                .iter()
                .map(|e| {
                    let (line, column) = e.line_col(text).unzip();
                    json!({"key": e.key, "line": line, "column": column,
                           "message": e.message, "help": e.help})
                })
                .collect();
            json!({"status": "errors", "errors": list,
                   "rendered": render_spec_errors_plain(path, text, errors)})
        }
        Failure::Other(e) => json!({"status": "failed", "message": format!("{e:#}")}),
        Failure::BrokenPipe => json!({"status": "failed", "message": "closed"}),
    }
}

/// The first phase of the page's view of `text` (as the design file
/// `path`): validation, copper and rule check, shown as soon as they are
/// known; the checked design is returned for the second phase. Errors in
/// the text end here.
pub fn copper(path: &Path, profile_file: Option<&str>, text: &str) -> (Value, Option<Checked>) {
    let form = form_values(text);
    let mut v = match pipeline::check_text(path, text.to_string(), profile_file) {
        Ok(checked) => {
            let v = copper_view(&checked);
            let mut v = v;
            v["form"] = form;
            return (v, Some(checked));
        }
        Err(f) => errors_view(&f),
    };
    v["form"] = form;
    (v, None)
}

/// Previews and rule problems of a checked design.
fn copper_view(checked: &Checked) -> Value {
    let l = &checked.layout;
    let design = &checked.loaded.design;
    let layers: Vec<Value> = (1..=l.layers)
        .map(|n| {
            json!({"layer": n, "colour": svg::layer_colour(n, l.layers),
                   "svg": svg::preview(l, svg::View::Layer(n), &checked.violations)})
        })
        .collect();
    json!({
        "status": "ok",
        "summary": format!(
            "{} ({}), {} turns per layer, outer {}, {}",
            plural(l.layers as usize, "layer"),
            design.coil.wiring.words(),
            design.coil.turns_text(),
            design.coil.outer_size_text(),
            plural(l.vias.len(), "via"),
        ),
        "stack": svg::preview(l, svg::View::Stack, &checked.violations),
        "layers": layers,
        "problems": violations_json(&checked.violations)["violations"],
    })
}

/// The second phase: the analysis of a checked design as the page shows
/// it (key numbers, limits exceeded, advice, plots, the whole report).
pub fn predictions(checked: &Checked) -> Value {
    let analysis = match pipeline::analysis(checked) {
        Ok(a) => a,
        Err(f) => return errors_view(&f),
    };
    predictions_view(checked, &analysis)
}

fn predictions_view(checked: &Checked, analysis: &Analysis) -> Value {
    let l = &checked.layout;
    let design = &checked.loaded.design;
    let report = serde_json::to_value(analysis).unwrap_or_default();
    let plots: Vec<Value> = report::plots(design, l, analysis)
        .into_iter()
        .map(|(name, role, doc)| json!({"name": name, "title": role, "svg": doc}))
        .collect();
    let cautions = &analysis.cautions;
    json!({
        "status": "ok",
        "numbers": numbers(&report),
        "limits": cautions_json(cautions.iter().filter(|c| c.is_limit())),
        "advice": cautions_json(cautions.iter().filter(|c| !c.is_limit())),
        "plots": plots,
        "report": report,
    })
}

/// Most candidates a sweep from the page may have.
pub const MAX_SWEEP: usize = 400;
/// Longest a sweep from the page may run; candidates not reached by then
/// stay in the table as not evaluated.
pub const SWEEP_TIME: Duration = Duration::from_secs(20);

/// A sweep asked for by the page.
#[derive(Debug, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SweepAsk {
    /// The design text to vary.
    pub text: String,
    /// `KEY=VALUES`, as `--vary`.
    pub vary: Vec<String>,
    /// Requirements, as `--require`.
    #[serde(default)]
    pub require: Vec<String>,
    /// Objective metric.
    pub objective: String,
    /// Maximize (else minimize).
    pub maximize: bool,
}

/// A running or finished sweep.
pub struct SweepRun {
    /// Its number (the page's handle).
    pub id: u64,
    /// Candidates.
    pub total: usize,
    /// Candidates evaluated so far.
    pub done: Arc<AtomicUsize>,
    /// Set to stop early.
    pub cancel: Arc<AtomicBool>,
    /// When it started.
    pub started: Instant,
    /// The result view, once finished.
    pub result: Option<Value>,
}

impl SweepRun {
    /// The page's view of the sweep's state.
    pub fn status(&self) -> Value {
        json!({
            "id": self.id,
            "state": if self.result.is_some() { "done" } else { "running" },
            "done": self.done.load(Ordering::Relaxed),
            "total": self.total,
            "elapsed_s": self.started.elapsed().as_secs_f64(),
            "result": self.result,
        })
    }
}

/// A prepared sweep: refused (with the reason) when it is not valid or
/// larger than [`MAX_SWEEP`].
pub fn prepare_sweep(
    path: &Path,
    profile_file: Option<&str>,
    ask: &SweepAsk,
) -> Result<(pipeline::Loaded, coilwright::explore::Sweep), Value> {
    if ask.vary.len() > 4 || ask.require.len() > 8 {
        return Err(json!({"status": "refused",
            "message": "the workbench sweeps at most 4 keys with at most 8 requirements"}));
    }
    let base =
        pipeline::load_text(path, ask.text.clone(), profile_file).map_err(|f| errors_view(&f))?;
    let refuse = |m: String| json!({"status": "refused", "message": m});
    let s = sweep::prepare(
        &base,
        &ask.vary,
        &ask.require,
        (ask.objective.clone(), ask.maximize),
        None,
    )
    .map_err(|f| match f {
        Failure::Other(e) => refuse(format!("{e:#}")),
        other => errors_view(&other),
    })?;
    if s.len() > MAX_SWEEP {
        return Err(refuse(format!(
            "{} candidates; the workbench runs at most {MAX_SWEEP}: narrow the ranges, or use `coilwright sweep` for larger sweeps",
            s.len()
        )));
    }
    Ok((base, s))
}

/// Runs a prepared sweep on `threads` threads (leaving the others to the
/// page's updates) and returns its result view.
pub fn run_sweep(
    base: &pipeline::Loaded,
    s: &coilwright::explore::Sweep,
    threads: usize,
    done: &AtomicUsize,
    cancel: &AtomicBool,
) -> Value {
    let started = Instant::now();
    let stopped = || cancel.load(Ordering::Relaxed) || started.elapsed() > SWEEP_TIME;
    let eval = |text: &str| {
        if stopped() {
            Evaluation::Invalid(format!(
                "not evaluated: the workbench stops a sweep after {} s",
                SWEEP_TIME.as_secs()
            ))
        } else {
            sweep::evaluate(base, text)
        }
    };
    let mut tally = Tally::new(s);
    let mut stream = || {
        s.stream(0..s.len(), eval, cancel, |i, c| {
            tally.add(i, &c);
            done.fetch_add(1, Ordering::Relaxed);
        })
    };
    match rayon::ThreadPoolBuilder::new().num_threads(threads).build() {
        Ok(pool) => pool.install(stream),
        Err(_) => stream(),
    };
    let summary = tally.finish();
    let seconds = started.elapsed().as_secs_f64();
    let flex = base.design.stackup.kind == coilwright::design::BoardKind::Flex;
    sweep_view(base, s, &summary, seconds, flex, stopped())
}

fn sweep_view(
    base: &pipeline::Loaded,
    s: &coilwright::explore::Sweep,
    o: &Summary,
    seconds: f64,
    flex: bool,
    cut_short: bool,
) -> Value {
    let rows: Vec<Value> = o
        .top
        .iter()
        .take(10)
        .map(|(_, c)| {
            json!({"rank": c.rank, "params": c.params,
                   "objective": c.metrics.get(&o.objective.metric),
                   "versus": c.metrics.get(&o.versus)})
        })
        .collect();
    let best = o.top.first().map(|(b, c)| {
        json!({"params": c.params,
               "text": s.candidate_text(&base.text, *b, None).ok()})
    });
    json!({
        "summary": sweep::summary_text(o, seconds, flex),
        "objective": o.objective.metric,
        "versus": o.versus,
        "counts": {"ok": o.ok, "fails_requirement": o.fails_requirement,
                   "rule_violation": o.rule_violation, "invalid": o.invalid},
        "rows": rows,
        "best": best,
        "plot": o.plot(),
        "cut_short": cut_short,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn four_significant_digits() {
        assert_eq!(sig4(10.016184), "10.02");
        assert_eq!(sig4(0.0070023), "0.007002");
        assert_eq!(sig4(1016.65), "1017");
        assert_eq!(sig4(48.4275), "48.43");
    }

    #[test]
    fn form_keys_are_registered() {
        let fields = form_fields();
        assert_eq!(fields.as_array().unwrap().len(), FORM_KEYS.len());
        assert_eq!(fields[1]["choices"][0], "circle");
    }

    /// The numbers of a drive frequency or a rotor appear only where the
    /// report has them; the copper loss is flagged past the torque limit.
    #[test]
    fn optional_numbers_follow_the_report() {
        let keys = |report: &Value| -> Vec<String> {
            numbers(report)
                .as_array()
                .unwrap()
                .iter()
                .map(|n| n["key"].as_str().unwrap().to_string())
                .collect()
        };
        let mut report = json!({"capacitance_f": 1e-12, "q_factor": null,
            "torque_max_n_m": null, "copper_loss_w": null});
        let plain = keys(&report);
        assert!(plain.contains(&"capacitance_f".to_string()));
        assert!(!plain.contains(&"q_factor".to_string()));
        assert!(!plain.contains(&"copper_loss_w".to_string()));
        report["q_factor"] = json!(40.0);
        report["copper_loss_w"] = json!(0.5);
        report["rotor"] = json!({"load": {"torque_n_m": 0.02, "torque_max_n_m": 0.01}});
        let n = numbers(&report);
        let loss = n
            .as_array()
            .unwrap()
            .iter()
            .find(|n| n["key"] == "copper_loss_w")
            .unwrap();
        assert_eq!(loss["over"], true);
        assert_eq!(loss["shown"], "500.0");
        assert!(keys(&report).contains(&"q_factor".to_string()));
    }
}
