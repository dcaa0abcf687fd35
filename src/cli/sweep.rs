//! `coilwright sweep SPEC --vary KEY=VALUES ... [--require EXPR ...]
//! (--maximize|--minimize METRIC) [--shard K/N] [-o DIR]`: try many variants
//! of a design; `coilwright sweep merge DIR... -o OUT`: join shard folders.
//!
//! Candidates stream to `candidates.csv` and `candidates.jsonl` in the
//! output folder (still hidden until the sweep ends) as they are evaluated;
//! memory holds only the tally (`explore::Tally`). Ctrl-C stops after the
//! chunk being evaluated: what was evaluated is written, `sweep.json` says
//! `"complete": false`, and the exit status is 130.

use super::out_dir::Staging;
use super::pipeline::{self, Loaded};
use super::{Exit, Failure, print_out};
use anyhow::Context;
use coilwright::explore::{
    self, Candidate, Evaluation, Objective, Requirement, Row, Shard, Status, Summary, Sweep, Tally,
};
use coilwright::export::OutFile;
use coilwright::rules::Severity;
use serde::{Deserialize, Serialize};
use std::fmt::Write as _;
use std::io::{BufRead, IsTerminal, Write as _};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};

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
    /// `--shard K/N`.
    pub shard: Option<&'a str>,
    /// `--refine`.
    pub refine: bool,
    /// Output folder.
    pub out: Option<&'a Path>,
    /// Replace the output folder.
    pub force: bool,
}

/// Set by Ctrl-C: stop after the chunk being evaluated.
static STOP: AtomicBool = AtomicBool::new(false);

/// `sweep.json`: how the folder's candidates were made (everything `sweep
/// merge` needs to rebuild the sweep) and what was found.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
struct Record {
    /// The design file as given.
    spec: String,
    /// Its text.
    base_text: String,
    /// Absolute path of a rule-profile file it names, if any.
    profile: Option<String>,
    /// `--vary` arguments.
    vary: Vec<String>,
    /// `--require` arguments.
    require: Vec<String>,
    /// Objective metric.
    objective: String,
    /// Maximize (true) or minimize.
    maximize: bool,
    /// `--versus` as given.
    versus: Option<String>,
    /// Metric columns of the candidate tables.
    metrics: Vec<String>,
    /// Candidates in the whole sweep.
    total: usize,
    /// This folder's shard.
    shard: Shard,
    /// First candidate index of the shard.
    first: usize,
    /// One past its last.
    end: usize,
    /// Candidates evaluated.
    evaluated: usize,
    /// Whether every candidate of the shard was evaluated (false after
    /// Ctrl-C).
    complete: bool,
    /// Counts, best index, the plot's axis and thinning.
    #[serde(default)]
    results: serde_json::Value,
    /// What `--refine` found (null without it).
    #[serde(default)]
    refine: serde_json::Value,
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
    let m = explore::metrics_of(&loaded.design, &layout, &violations, &analysis);
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

/// The metrics a base design's report has (sorted): the names that
/// requirements, objective and `versus` may use; the base must be
/// analysable.
fn base_metrics(base: &Loaded) -> Result<Vec<String>, Failure> {
    let mut known: Vec<String> = match evaluate(base, &base.text) {
        Evaluation::Metrics(m) | Evaluation::RuleViolation(m, _) => m.into_keys().collect(),
        Evaluation::Invalid(r) => {
            return Err(anyhow::anyhow!("the base design cannot be analysed: {r}").into());
        }
    };
    known.sort();
    Ok(known)
}

/// The sweep of `base` that the arguments describe (shared by `sweep` and
/// the workbench).
pub(super) fn prepare(
    base: &Loaded,
    vary: &[String],
    require: &[String],
    objective: (String, bool),
    versus: Option<&str>,
) -> Result<Sweep, Failure> {
    let known = base_metrics(base)?;
    make_sweep(
        &base.text,
        vary,
        require,
        (&objective.0, objective.1),
        versus,
        &known,
    )
}

/// The sweep of a base design and the arguments (`known`: the metrics).
fn make_sweep(
    base_text: &str,
    vary: &[String],
    require: &[String],
    objective: (&str, bool),
    versus: Option<&str>,
    known: &[String],
) -> Result<Sweep, Failure> {
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
        .map(|r| Requirement::parse(r, known))
        .collect::<Result<Vec<_>, _>>()
        .map_err(bad)?;
    let versus = versus.map(|v| match v.rsplit_once(':') {
        Some((m, "max")) => (m.to_string(), true),
        Some((m, "min")) => (m.to_string(), false),
        _ => (v.to_string(), false),
    });
    Sweep::new(
        base_text,
        vary,
        require,
        Objective {
            metric: objective.0.to_string(),
            maximize: objective.1,
        },
        versus,
        known,
    )
    .map_err(bad)
}

/// The two candidate tables of an output folder, written as candidates
/// arrive.
struct Tables {
    csv: std::io::BufWriter<std::fs::File>,
    jsonl: std::io::BufWriter<std::fs::File>,
    /// The CSV row being written (one buffer for every row).
    row: String,
}

impl Tables {
    fn create(dir: &Path, header: &str) -> Result<Tables, Failure> {
        let open = |name: &str| -> Result<_, Failure> {
            let path = dir.join(name);
            let f = std::fs::File::create(&path)
                .with_context(|| format!("cannot write {}", path.display()))?;
            Ok(std::io::BufWriter::new(f))
        };
        let mut t = Tables {
            csv: open("candidates.csv")?,
            jsonl: open("candidates.jsonl")?,
            row: String::new(),
        };
        t.csv
            .write_all(header.as_bytes())
            .context("cannot write candidates.csv")?;
        Ok(t)
    }

    fn finish(mut self) -> Result<(), Failure> {
        self.csv.flush().context("cannot write candidates.csv")?;
        self.jsonl
            .flush()
            .context("cannot write candidates.jsonl")?;
        self.csv
            .get_ref()
            .sync_all()
            .context("cannot write candidates.csv")?;
        self.jsonl
            .get_ref()
            .sync_all()
            .context("cannot write candidates.jsonl")?;
        Ok(())
    }
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
    let known = base_metrics(&base)?;
    let sweep = make_sweep(
        &base.text,
        a.vary,
        a.require,
        (&a.objective.0, a.objective.1),
        a.versus,
        &known,
    )?;
    let shard = match a.shard {
        Some(s) => Shard::parse(s).map_err(|e| Failure::Other(anyhow::Error::new(e)))?,
        None => Shard::ALL,
    };
    let range = shard.range(sweep.len());
    let params: Vec<String> = sweep.vary.iter().map(|v| v.key.clone()).collect();
    let staging = a.out.map(|dir| Staging::new(dir, a.force)).transpose()?;
    let mut tables = match &staging {
        Some(st) => Some(Tables::create(
            st.path(),
            &explore::csv_header(&params, &known, false),
        )?),
        None => None,
    };
    // A second Ctrl-C while the folder is written is not caught again.
    let _ = ctrlc::set_handler(|| STOP.store(true, Ordering::SeqCst));

    let bar = if std::io::stderr().is_terminal() {
        indicatif::ProgressBar::new(range.len() as u64).with_style(
            indicatif::ProgressStyle::with_template(
                "{bar:30} {pos}/{len} candidates, {per_sec}, eta {eta}  {msg}",
            )
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        )
    } else {
        indicatif::ProgressBar::hidden()
    };
    let started = std::time::Instant::now();
    let mut tally = Tally::new(&sweep);
    let mut failed: Option<Failure> = None;
    let mut best: Option<f64> = None;
    let obj = sweep.objective.clone();
    let evaluated = sweep.stream(
        range.clone(),
        |text| evaluate(&base, text),
        &STOP,
        |i, c| {
            if let Some(t) = tables.as_mut()
                && failed.is_none()
                && let Err(e) = write_row(t, i, &c, &known)
            {
                failed = Some(e);
                STOP.store(true, Ordering::SeqCst);
            }
            tally.add(i, &c);
            if c.status == Status::Ok
                && let Some(&v) = c.metrics.get(&obj.metric)
                && v.is_finite()
                && best.is_none_or(|b| if obj.maximize { v > b } else { v < b })
            {
                best = Some(v);
                bar.set_message(format!("best {} {v:.6}", obj.metric));
            }
            bar.inc(1);
        },
    );
    bar.finish_and_clear();
    if let Some(e) = failed {
        return Err(e);
    }
    let complete = evaluated == range.len();
    let elapsed = started.elapsed().as_secs_f64();
    let summary = tally.finish();
    let flex = base.design.stackup.kind == coilwright::design::BoardKind::Flex;
    let mut text = summary_text(&summary, elapsed, flex);
    if !complete {
        let _ = writeln!(
            text,
            "\ninterrupted: {evaluated} of {} candidates evaluated; the results cover only those",
            range.len()
        );
    }
    let refined = if a.refine && complete && summary.best.is_some() {
        let starts = &summary.top[..explore::REFINE_STARTS.min(summary.top.len())];
        let r = sweep.refine(starts, |t| evaluate(&base, t), explore::REFINE_EVALUATIONS);
        text.push_str(&refine_text(r.as_ref(), &summary.objective));
        r
    } else {
        None
    };
    print_out(&text)?;
    if let (Some(staging), Some(tables), Some(dir)) = (staging, tables, a.out) {
        tables.finish()?;
        let record = Record {
            spec: a.spec.display().to_string(),
            base_text: base.text.clone(),
            profile: pipeline::profile_path(&base)
                .and_then(|path| std::fs::canonicalize(path).ok())
                .map(|abs| abs.display().to_string()),
            vary: a.vary.to_vec(),
            require: a.require.to_vec(),
            objective: a.objective.0.clone(),
            maximize: a.objective.1,
            versus: a.versus.map(String::from),
            metrics: known.clone(),
            total: sweep.len(),
            shard,
            first: range.start,
            end: range.end,
            evaluated,
            complete,
            results: serde_json::Value::Null,
            refine: serde_json::Value::Null,
        };
        finish_folder(staging, dir, &sweep, &summary, refined.as_ref(), record)?;
    }
    Ok(if !complete {
        Exit::Interrupted
    } else if summary.nothing_passes() {
        Exit::NothingPasses
    } else {
        Exit::Ok
    })
}

/// Writes one candidate to both tables.
fn write_row(t: &mut Tables, i: usize, c: &Candidate, metrics: &[String]) -> Result<(), Failure> {
    t.row.clear();
    explore::push_csv_row(&mut t.row, i, c, metrics, false);
    t.csv
        .write_all(t.row.as_bytes())
        .context("cannot write candidates.csv")?;
    explore::write_jsonl_row(&mut t.jsonl, i, c).context("cannot write candidates.jsonl")?;
    Ok(())
}

/// Adds the ranking, the front, the plot, the best design and
/// `sweep.json` to a folder whose candidate tables are written, and puts
/// it in place.
fn finish_folder(
    staging: Staging,
    dir: &Path,
    sweep: &Sweep,
    summary: &Summary,
    refined: Option<&explore::Refinement>,
    mut record: Record,
) -> Result<(), Failure> {
    let params: Vec<String> = sweep.vary.iter().map(|v| v.key.clone()).collect();
    let table = |rows: &[(usize, Candidate)]| {
        let mut s = explore::csv_header(&params, &record.metrics, true);
        for (i, c) in rows {
            s.push_str(&explore::csv_row(*i, c, &record.metrics, true));
        }
        s.into_bytes()
    };
    record.results = serde_json::to_value(summary).context("cannot write sweep.json")?;
    if let Some(r) = refined {
        record.refine = serde_json::json!({
            "method": "Nelder-Mead (Nelder and Mead 1965)",
            "keys": r.keys,
            "from_index": r.from,
            "grid_value": r.grid_value,
            "value": r.value,
            "evaluations": r.evaluations,
            "params": r.candidate.params,
        });
    }
    let mut files = vec![
        OutFile {
            path: "ranking.csv".into(),
            role: format!(
                "the best {} candidates meeting every requirement, best first",
                explore::TOP
            ),
            bytes: table(&summary.top),
        },
        OutFile {
            path: "front.csv".into(),
            role: "the Pareto front of the objective and the plot's second metric".into(),
            bytes: table(&summary.front),
        },
        OutFile {
            path: "tradeoff.svg".into(),
            role: "objective against the second metric, Pareto front highlighted".into(),
            bytes: summary.plot().into_bytes(),
        },
    ];
    if let (Some(b), Some(c)) = (summary.best, summary.best_candidate()) {
        // The refined design when refinement found one, else the best grid
        // point.
        let (c, table, how) = match refined {
            Some(r) if r.value != r.grid_value => (
                &r.candidate,
                r.table.clone(),
                format!(
                    ", refined by Nelder-Mead from candidate {} in {} evaluations",
                    r.from, r.evaluations
                ),
            ),
            _ => (c, sweep.candidate_table(b), String::new()),
        };
        let mut text = format!(
            "# Best candidate of `coilwright sweep {}`{how}: {} {} = {}\n# Parameters: {}\n# Build it with: coilwright build best.toml -o best\n\n",
            record.spec,
            if summary.objective.maximize {
                "maximum"
            } else {
                "minimum"
            },
            summary.objective.metric,
            c.metrics
                .get(&summary.objective.metric)
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
                .table_text(&record.base_text, &table, record.profile.as_deref())
                .map_err(|e| Failure::Other(anyhow::Error::new(e)))?,
        );
        files.push(OutFile {
            path: "best.toml".into(),
            role: "the best candidate as a design file ready for build".into(),
            bytes: text.into_bytes(),
        });
    }
    files.push(OutFile {
        path: "sweep.json".into(),
        role: "how the candidates were made (for sweep merge) and the counts".into(),
        bytes: serde_json::to_vec_pretty(&record).context("cannot write sweep.json")?,
    });
    staging.add(&files)?;
    staging.commit()?;
    print_out(&format!(
        "wrote {} files to {}\n",
        files.len() + 2,
        dir.display()
    ))?;
    Ok(())
}

/// Runs `sweep merge DIR... -o OUT`: the shard folders of one sweep joined
/// into the folder one unsharded run would have written.
pub fn merge(dirs: &[PathBuf], out: &Path, force: bool) -> Result<Exit, Failure> {
    if out.exists() && !force {
        return Err(anyhow::anyhow!("{} exists; pass --force to replace it", out.display()).into());
    }
    let mut records = Vec::new();
    for d in dirs {
        let path = d.join("sweep.json");
        let text = std::fs::read_to_string(&path).with_context(|| {
            format!(
                "{} is not a sweep folder (cannot read {})",
                d.display(),
                path.display()
            )
        })?;
        let r: Record = serde_json::from_str(&text)
            .with_context(|| format!("{} is not a sweep record", path.display()))?;
        if !r.complete {
            return Err(anyhow::anyhow!(
                "{} is incomplete ({} of {} candidates evaluated); run that shard again",
                d.display(),
                r.evaluated,
                r.end - r.first
            )
            .into());
        }
        records.push((r, d.clone()));
    }
    let Some((first, _)) = records.first() else {
        return Err(anyhow::anyhow!("give at least one sweep folder to merge").into());
    };
    let first = first.clone();
    for (r, d) in &records {
        let same = r.base_text == first.base_text
            && r.vary == first.vary
            && r.require == first.require
            && r.objective == first.objective
            && r.maximize == first.maximize
            && r.versus == first.versus
            && r.metrics == first.metrics
            && r.total == first.total
            && r.shard.n == first.shard.n;
        if !same {
            return Err(anyhow::anyhow!(
                "{} is a shard of a different sweep than {} (design, --vary, --require, objective or shard count differ)",
                d.display(),
                records[0].1.display()
            )
            .into());
        }
    }
    records.sort_by_key(|(r, _)| r.shard.k);
    let n = first.shard.n;
    let have: Vec<usize> = records.iter().map(|(r, _)| r.shard.k).collect();
    if have != (1..=n).collect::<Vec<_>>() {
        let missing: Vec<String> = (1..=n)
            .filter(|k| !have.contains(k))
            .map(|k| format!("{k}/{n}"))
            .collect();
        return Err(anyhow::anyhow!(
            "the folders hold shards {} of {n}; {}",
            have.iter()
                .map(|k| k.to_string())
                .collect::<Vec<_>>()
                .join(", "),
            if missing.is_empty() {
                "a shard is given twice".to_string()
            } else {
                format!("missing: {}", missing.join(", "))
            }
        )
        .into());
    }
    let sweep = make_sweep(
        &first.base_text,
        &first.vary,
        &first.require,
        (&first.objective, first.maximize),
        first.versus.as_deref(),
        &first.metrics,
    )?;
    let staging = Staging::new(out, force)?;
    let params: Vec<String> = sweep.vary.iter().map(|v| v.key.clone()).collect();
    let header = explore::csv_header(&params, &first.metrics, false);
    let mut tables = Tables::create(staging.path(), &header)?;
    let mut tally = Tally::new(&sweep);
    let mut evaluated = 0;
    for (r, d) in &records {
        let open = |name: &str| -> Result<std::io::BufReader<std::fs::File>, Failure> {
            let path = d.join(name);
            Ok(std::io::BufReader::new(
                std::fs::File::open(&path)
                    .with_context(|| format!("cannot read {}", path.display()))?,
            ))
        };
        let mut csv = open("candidates.csv")?.lines();
        let got = csv
            .next()
            .transpose()
            .context("cannot read candidates.csv")?;
        if got.as_deref() != Some(header.trim_end()) {
            return Err(anyhow::anyhow!(
                "{}: candidates.csv has other columns than the first shard's",
                d.display()
            )
            .into());
        }
        for line in csv {
            let line = line.context("cannot read candidates.csv")?;
            writeln!(tables.csv, "{line}").context("cannot write candidates.csv")?;
        }
        let mut next = r.first;
        for line in open("candidates.jsonl")?.lines() {
            let line = line.context("cannot read candidates.jsonl")?;
            let row: Row = serde_json::from_str(&line).with_context(|| {
                format!(
                    "{}: a line of candidates.jsonl is not a candidate",
                    d.display()
                )
            })?;
            if row.index != next {
                return Err(anyhow::anyhow!(
                    "{}: candidate {} where {next} was expected",
                    d.display(),
                    row.index
                )
                .into());
            }
            next += 1;
            tally.add(row.index, &row.candidate());
            writeln!(tables.jsonl, "{line}").context("cannot write candidates.jsonl")?;
            evaluated += 1;
        }
        if next != r.end {
            return Err(anyhow::anyhow!(
                "{}: candidates.jsonl ends at {next}, the shard at {}",
                d.display(),
                r.end
            )
            .into());
        }
    }
    tables.finish()?;
    let summary = tally.finish();
    print_out(&summary_text(&summary, f64::NAN, false))?;
    let record = Record {
        shard: Shard::ALL,
        first: 0,
        end: first.total,
        evaluated,
        complete: true,
        ..first
    };
    let nothing = summary.nothing_passes();
    finish_folder(staging, out, &sweep, &summary, None, record)?;
    Ok(if nothing {
        Exit::NothingPasses
    } else {
        Exit::Ok
    })
}

/// What refinement found, for the summary.
fn refine_text(r: Option<&explore::Refinement>, obj: &Objective) -> String {
    let Some(r) = r else {
        return "\nrefine: no continuous --vary key (whole-number keys such as layers stay on the grid) or no refined design met every requirement\n".into();
    };
    if r.value == r.grid_value {
        return format!(
            "\nrefine: nothing better than the best grid point within the swept ranges ({} evaluations, Nelder-Mead over {})\n",
            r.evaluations,
            r.keys.join(", ")
        );
    }
    let gain = (r.value - r.grid_value) / r.grid_value.abs().max(1e-300) * 100.0;
    format!(
        "\nrefined (Nelder-Mead over {}, from candidate {}, {} evaluations): {} {:.6} -> {:.6} ({gain:+.2} %)\n  {}\n",
        r.keys.join(", "),
        r.from,
        r.evaluations,
        obj.metric,
        r.grid_value,
        r.value,
        params_text(&r.candidate)
    )
}

/// A candidate's parameters as `key=value` words.
fn params_text(c: &Candidate) -> String {
    c.params
        .iter()
        .map(|(k, v)| format!("{k}={v}"))
        .collect::<Vec<_>>()
        .join(" ")
}

/// A short text summary: counts, best, and the top ten (`seconds` NaN:
/// no timing, as after a merge).
pub(super) fn summary_text(o: &Summary, seconds: f64, flex: bool) -> String {
    let n = o.evaluated;
    let mut s = String::new();
    let timing = if seconds.is_finite() {
        format!(" in {seconds:.2} s ({:.0}/s)", n as f64 / seconds.max(1e-9))
    } else {
        String::new()
    };
    let _ = writeln!(
        s,
        "{n} candidates{timing}: {} meet the requirements, {} miss a requirement, {} break a fab rule, {} invalid",
        o.ok, o.fails_requirement, o.rule_violation, o.invalid
    );
    let obj = &o.objective.metric;
    if o.top.is_empty() {
        let _ = writeln!(s, "no candidate meets every requirement");
        if o.misses.is_empty() {
            let _ = writeln!(
                s,
                "no candidate could be analysed against the requirements; first reasons:"
            );
            for (_, c) in &o.firsts {
                let _ = writeln!(s, "  {}: {}", params_text(c), c.reason);
            }
        } else {
            let _ = writeln!(s, "nearest misses (smallest relative shortfall first):");
            for (_, c) in &o.misses {
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
    for (_, c) in o.top.iter().take(10) {
        let _ = writeln!(
            s,
            "{:>4}  {:>14.6}  {:>14.6}  {}",
            c.rank.unwrap_or(0),
            c.metrics.get(obj).copied().unwrap_or(f64::NAN),
            c.metrics.get(&o.versus).copied().unwrap_or(f64::NAN),
            params_text(c)
        );
    }
    if let Some(best) = o.best_candidate()
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
