//! `coilwright sweep SPEC --vary KEY=VALUES ... [--require EXPR ...]
//! (--maximize|--minimize METRIC) [-o DIR]`: try many variants of a design.

use super::out_dir;
use super::pipeline::{self, Loaded};
use super::{Exit, Failure, print_out};
use anyhow::Context;
use coilwright::explore::{self, Evaluation, Objective, Outcome, Requirement, Status, Sweep};
use coilwright::export::OutFile;
use coilwright::rules::Severity;
use std::fmt::Write as _;
use std::io::IsTerminal;
use std::path::Path;

/// The arguments of `sweep`, after clap.
pub struct Args<'a> {
    /// Base design file.
    pub spec: &'a Path,
    /// `--vary` arguments.
    pub vary: &'a [String],
    /// `--require` arguments.
    pub require: &'a [String],
    /// Objective metric and sense.
    pub objective: (String, bool),
    /// `--versus METRIC[:max|:min]`.
    pub versus: Option<&'a str>,
    /// Output folder.
    pub out: Option<&'a Path>,
    /// Replace the output folder.
    pub force: bool,
}

/// Evaluates one candidate design file through the whole pipeline.
pub(super) fn evaluate(base: &Loaded, text: &str) -> Evaluation {
    let (design, layout) = match coilwright::pipeline::parse_and_build(text) {
        Ok(built) => built,
        Err(errors) => {
            let e = errors.first();
            return Evaluation::Invalid(format!("{}: {}", e.key, e.message));
        }
    };
    let loaded = Loaded {
        path: base.path.clone(),
        text: text.to_string(),
        design,
    };
    let violations = match pipeline::violations(&loaded, &layout) {
        Ok(v) => v,
        Err(_) => return Evaluation::Invalid("rule profile could not be loaded".into()),
    };
    let analysis = match coilwright::physics::analyse_with(
        &loaded.design,
        &layout,
        coilwright::physics::Detail::Metrics,
    ) {
        Ok(a) => a,
        Err(e) => return Evaluation::Invalid(format!("analysis: {e}")),
    };
    let json = serde_json::to_value(&analysis).unwrap_or_default();
    let m = explore::metrics(&loaded.design, &layout, &violations, &json);
    let errors: Vec<String> = violations
        .iter()
        .filter(|v| v.severity == Severity::Error)
        .map(|v| {
            format!(
                "{} ({:.4} mm, needs {:.4} mm)",
                v.rule, v.measured, v.required
            )
        })
        .collect();
    if errors.is_empty() {
        Evaluation::Metrics(m)
    } else {
        let n = errors.len();
        let mut first: Vec<String> = errors.into_iter().take(3).collect();
        if n > 3 {
            first.push(format!("and {} more", n - 3));
        }
        Evaluation::RuleViolation(m, format!("rule violation: {}", first.join(", ")))
    }
}

/// The sweep of `base` that the arguments describe (shared by `sweep` and
/// the workbench): the base design must be analysable, its report names
/// the metrics that requirements, objective and `versus` may use.
pub(super) fn prepare(
    base: &Loaded,
    vary: &[String],
    require: &[String],
    objective: (String, bool),
    versus: Option<&str>,
) -> Result<Sweep, Failure> {
    // The base design must itself be valid: its report names the metrics.
    let known: Vec<String> = match evaluate(base, &base.text) {
        Evaluation::Metrics(m) | Evaluation::RuleViolation(m, _) => m.into_keys().collect(),
        Evaluation::Invalid(r) => {
            return Err(anyhow::anyhow!("the base design cannot be analysed: {r}").into());
        }
    };
    let bad = |e: explore::SweepError| Failure::Other(anyhow::Error::new(e));
    let vary = vary
        .iter()
        .map(|v| explore::parse_vary(v))
        .collect::<Result<Vec<_>, _>>()
        .map_err(bad)?;
    if vary.is_empty() {
        return Err(anyhow::anyhow!("give at least one --vary KEY=VALUES").into());
    }
    let require = require
        .iter()
        .map(|r| Requirement::parse(r, &known))
        .collect::<Result<Vec<_>, _>>()
        .map_err(bad)?;
    let versus = versus.map(|v| match v.rsplit_once(':') {
        Some((m, "max")) => (m.to_string(), true),
        Some((m, "min")) => (m.to_string(), false),
        _ => (v.to_string(), false),
    });
    Sweep::new(
        &base.text,
        vary,
        require,
        Objective {
            metric: objective.0,
            maximize: objective.1,
        },
        versus,
        &known,
    )
    .map_err(bad)
}

/// Runs `sweep`.
pub fn run(a: Args<'_>) -> Result<Exit, Failure> {
    if let Some(dir) = a.out
        && dir.exists()
        && !a.force
    {
        return Err(anyhow::anyhow!("{} exists; pass --force to replace it", dir.display()).into());
    }
    let base = pipeline::load(a.spec)?;
    let sweep = prepare(&base, a.vary, a.require, a.objective.clone(), a.versus)?;
    let bad = |e: explore::SweepError| Failure::Other(anyhow::Error::new(e));

    let bar = if std::io::stderr().is_terminal() {
        indicatif::ProgressBar::new(sweep.len() as u64).with_style(
            indicatif::ProgressStyle::with_template(
                "{bar:40} {pos}/{len} candidates, {per_sec}, eta {eta}",
            )
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        )
    } else {
        indicatif::ProgressBar::hidden()
    };
    let started = std::time::Instant::now();
    let outcome = sweep.run(|text| evaluate(&base, text), || bar.inc(1));
    bar.finish_and_clear();
    let elapsed = started.elapsed().as_secs_f64();

    let flex = base.design.stackup.kind == coilwright::design::BoardKind::Flex;
    print_out(&summary(&outcome, elapsed, flex))?;
    if let Some(dir) = a.out {
        let mut files = vec![
            OutFile {
                path: "candidates.csv".into(),
                role: "every candidate: parameters, metrics, status and reason".into(),
                bytes: outcome.csv().into_bytes(),
            },
            OutFile {
                path: "candidates.json".into(),
                role: "every candidate as JSON".into(),
                bytes: serde_json::to_vec_pretty(&outcome).context("cannot write JSON")?,
            },
            OutFile {
                path: "tradeoff.svg".into(),
                role: "objective against the second metric, Pareto front highlighted".into(),
                bytes: outcome.plot().into_bytes(),
            },
        ];
        if let Some(b) = outcome.best {
            // A profile file named relative to the design file would be
            // looked for next to best.toml: name it by its absolute path.
            let profile = pipeline::profile_path(&base)
                .and_then(|path| std::fs::canonicalize(path).ok())
                .map(|abs| abs.display().to_string());
            let c = &outcome.candidates[b];
            let mut text = format!(
                "# Best candidate of `coilwright sweep {}`: {} {} = {}\n# Parameters: {}\n# Build it with: coilwright build best.toml -o best\n\n",
                a.spec.display(),
                if outcome.objective.maximize {
                    "maximum"
                } else {
                    "minimum"
                },
                outcome.objective.metric,
                c.metrics
                    .get(&outcome.objective.metric)
                    .copied()
                    .unwrap_or(f64::NAN),
                c.params
                    .iter()
                    .map(|(k, v)| format!("{k} = {v}"))
                    .collect::<Vec<_>>()
                    .join(", "),
            );
            text.push_str(
                &sweep
                    .candidate_text(&base.text, b, profile.as_deref())
                    .map_err(bad)?,
            );
            files.push(OutFile {
                path: "best.toml".into(),
                role: "the best candidate as a design file ready for build".into(),
                bytes: text.into_bytes(),
            });
        }
        out_dir::write(dir, &files, a.force)?;
        print_out(&format!(
            "wrote {} files to {}\n",
            files.len(),
            dir.display()
        ))?;
    }
    if outcome.nothing_passes() {
        return Ok(Exit::NothingPasses);
    }
    Ok(Exit::Ok)
}

/// A candidate's parameters as `key=value` words.
fn params_text(c: &explore::Candidate) -> String {
    c.params
        .iter()
        .map(|(k, v)| format!("{k}={v}"))
        .collect::<Vec<_>>()
        .join(" ")
}

/// A short text summary: counts, best, and the top ten.
pub(super) fn summary(o: &Outcome, seconds: f64, flex: bool) -> String {
    let n = o.candidates.len();
    let count = |s: Status| o.candidates.iter().filter(|c| c.status == s).count();
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{n} candidates in {seconds:.2} s ({:.0}/s): {} meet the requirements, {} miss a requirement, {} break a fab rule, {} invalid",
        n as f64 / seconds.max(1e-9),
        count(Status::Ok),
        count(Status::FailsRequirement),
        count(Status::RuleViolation),
        count(Status::Invalid)
    );
    let obj = &o.objective.metric;
    let mut ranked: Vec<&explore::Candidate> =
        o.candidates.iter().filter(|c| c.rank.is_some()).collect();
    ranked.sort_by_key(|c| c.rank);
    if ranked.is_empty() {
        let _ = writeln!(s, "no candidate meets every requirement");
        let misses = o.nearest_misses(5);
        if misses.is_empty() {
            let _ = writeln!(
                s,
                "no candidate could be analysed against the requirements; first reasons:"
            );
            for c in o.candidates.iter().take(5) {
                let _ = writeln!(s, "  {}: {}", params_text(c), c.reason);
            }
        } else {
            let _ = writeln!(s, "nearest misses (smallest relative shortfall first):");
            for c in misses {
                let _ = writeln!(
                    s,
                    "  {:>6.1} % short  {}: {}",
                    c.shortfall.unwrap_or(f64::INFINITY) * 100.0,
                    params_text(c),
                    c.reason
                );
            }
        }
        return s;
    }
    let _ = writeln!(s, "\nrank  {obj:>14}  {:>14}  parameters", o.versus);
    for c in ranked.iter().take(10) {
        let _ = writeln!(
            s,
            "{:>4}  {:>14.6}  {:>14.6}  {}",
            c.rank.unwrap_or(0),
            c.metrics.get(obj).copied().unwrap_or(f64::NAN),
            c.metrics.get(&o.versus).copied().unwrap_or(f64::NAN),
            c.params
                .iter()
                .map(|(k, v)| format!("{k}={v}"))
                .collect::<Vec<_>>()
                .join(" ")
        );
    }
    if let Some(best) = ranked.first()
        && flex
        && let Some(&layers) = best.metrics.get("layers")
        && layers > 2.0
    {
        let _ = writeln!(
            s,
            "\nnote: the best candidate has {layers} copper layers on a flex board: each flex layer adds cost and stiffness, \
             and most fabs advise one or two copper layers where a flex board bends (common practice, no source)"
        );
    }
    s
}
