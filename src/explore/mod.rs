//! Design exploration: sweep design keys, keep the candidates that meet the
//! requirements, rank them by an objective and show the trade-off.
//!
//! Every candidate is the base design file with some keys replaced; it goes
//! through the same pipeline as `build` (validation, geometry, rule check,
//! analysis) via the evaluator the caller passes in, so this module stays
//! free of I/O. Invalid or rule-breaking candidates stay in the table with
//! their reason.
//!
//! Size keys: a coil takes exactly two of outer_diameter, inner_diameter and
//! turns. When a sweep varies one of them and the base file gives the other
//! two, the one not varied is dropped in this order: inner_diameter, turns,
//! outer_diameter (so "turns within this outer diameter" works from a base
//! that gives outer and inner diameter).

mod metrics;
mod pareto;
mod refine;
mod require;
mod stream;
mod vary;

pub use metrics::{metrics, metrics_of};
pub use pareto::{PlotPoint, front, settle};
pub use refine::{
    EVALUATIONS as REFINE_EVALUATIONS, Minimum, Refinement, STARTS as REFINE_STARTS, nelder_mead,
};
pub use require::{Op, Requirement, check_metric};
pub use stream::{
    CHUNK, PLOT_POINTS, Row, Shard, Summary, TOP, Tally, csv_header, csv_row, push_csv_row,
    push_f64, write_jsonl_row,
};
pub use vary::{Kind, Value, Vary, kind_of, numeric_keys, parse as parse_vary, resolve_key};

use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// Bad sweep arguments.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SweepError {
    /// The key is not a design key.
    #[error("unknown design key '{key}'{}", hint(suggestion))]
    UnknownKey {
        /// As typed.
        key: String,
        /// Nearest known key.
        suggestion: Option<String>,
    },
    /// The short key names several keys.
    #[error("'{key}' is ambiguous: write one of {}", candidates.join(", "))]
    AmbiguousKey {
        /// As typed.
        key: String,
        /// Full paths it could mean.
        candidates: Vec<String>,
    },
    /// The key holds text, not a number.
    #[error(
        "'{key}' is not a numeric key and cannot be swept (numeric keys: turns, layers, trace_width, clearance, outer_diameter, copper, ...)"
    )]
    NotNumeric {
        /// As typed.
        key: String,
    },
    /// The values do not parse.
    #[error("--vary {arg}: {message}")]
    BadValues {
        /// The argument.
        arg: String,
        /// What is wrong.
        message: String,
    },
    /// A range or list with no values.
    #[error("--vary {arg}: the range is empty (give A..B with A <= B, or a list)")]
    EmptyRange {
        /// The argument.
        arg: String,
    },
    /// Step zero or negative.
    #[error("--vary {arg}: the step must be positive")]
    ZeroStep {
        /// The argument.
        arg: String,
    },
    /// The same key varied twice.
    #[error("--vary {key} is given twice")]
    Duplicate {
        /// Key path.
        key: String,
    },
    /// Too many combinations.
    #[error("{count} candidates; at most {max} per sweep")]
    TooMany {
        /// Product of all value counts.
        count: usize,
        /// Limit.
        max: usize,
    },
    /// A requirement that does not parse.
    #[error("--require '{text}': {message}")]
    BadRequirement {
        /// As typed.
        text: String,
        /// What is wrong.
        message: String,
    },
    /// A metric name that the report does not have.
    #[error("unknown metric '{metric}'{}", hint(suggestion))]
    UnknownMetric {
        /// As typed.
        metric: String,
        /// Nearest known metric.
        suggestion: Option<String>,
    },
    /// A `--shard` that does not parse.
    #[error("--shard {text}: {message}")]
    BadShard {
        /// As typed.
        text: String,
        /// What is wrong.
        message: String,
    },
    /// The base design file is not a TOML table.
    #[error("the base design is not valid TOML: {0}")]
    Base(String),
}

fn hint(s: &Option<String>) -> String {
    s.as_ref()
        .map(|s| format!("; did you mean '{s}'?"))
        .unwrap_or_default()
}

/// Maximize or minimize.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Objective {
    /// Metric name.
    pub metric: String,
    /// `true` to maximize.
    pub maximize: bool,
}

/// The trade-off plot's x axis when `--versus` is not given: the first of
/// these (other than the objective) that differs between the plotted
/// candidates (smaller is better for each).
pub const DEFAULT_VERSUS: &[&str] = &[
    "outer_diameter_mm",
    "resistance_ohm_20c",
    "power_w",
    "current_a",
    "trace_length_mm",
    "thickness_mm",
];

/// Most candidates a sweep may have.
pub const MAX_CANDIDATES: usize = 200_000;

/// A sweep, ready to run.
#[derive(Debug, Clone)]
pub struct Sweep {
    /// The base design file as a TOML table.
    pub base: toml::Table,
    /// Keys and values, in the order given.
    pub vary: Vec<Vary>,
    /// Requirements.
    pub require: Vec<Requirement>,
    /// Objective.
    pub objective: Objective,
    /// Second metric for the trade-off plot and its sense (true = maximize).
    pub versus: (String, bool),
    /// Whether `versus` was chosen by default (then a default that is the
    /// same for every candidate gives way to the resistance).
    pub versus_default: bool,
    /// The candidates' design texts in pieces (made by [`Sweep::new`];
    /// `None` where they cannot be).
    template: Option<Template>,
}

/// Every candidate's design text is the text of its table
/// (`toml::to_string`), and the tables differ only in the varied values:
/// the text of one table cut at those values, and each value as that text
/// writes it, give any candidate's text by joining the pieces, without
/// copying the base table and writing it out again.
#[derive(Debug, Clone)]
struct Template {
    /// The base and the keys this was made for (a sweep whose public
    /// fields were changed since falls back to writing the table).
    base: toml::Table,
    vary: Vec<Vary>,
    /// The text around the values: one piece more than values.
    pieces: Vec<String>,
    /// Which `--vary` each cut is, in text order.
    slots: Vec<usize>,
    /// Per `--vary`, per value: the value as the text writes it.
    values: Vec<Vec<String>>,
}

impl Template {
    /// The template of a sweep's candidates, checked against the tables'
    /// own text for the first, a middle and the last candidate; `None`
    /// when a value is not a plain number, text or truth value, or the
    /// text does not cut cleanly.
    fn of(sweep: &Sweep) -> Option<Template> {
        let marker = |k: usize| format!("coilwright-sweep-slot-{k}-of-{}", sweep.vary.len());
        let scalar = |v: &toml::Value| {
            matches!(
                v,
                toml::Value::String(_)
                    | toml::Value::Integer(_)
                    | toml::Value::Float(_)
                    | toml::Value::Boolean(_)
            )
        };
        if sweep.vary.is_empty()
            || sweep
                .vary
                .iter()
                .any(|v| !v.values.iter().all(|x| scalar(&x.toml)))
        {
            return None;
        }
        let marked = sweep.table_with(|k| toml::Value::String(marker(k)));
        let text = toml::to_string(&marked).ok()?;
        // Each marker once, as a quoted string, cut out in text order.
        let mut at: Vec<(usize, usize)> = Vec::new();
        for k in 0..sweep.vary.len() {
            let quoted = format!("\"{}\"", marker(k));
            let found: Vec<usize> = text.match_indices(&quoted).map(|m| m.0).collect();
            if found.len() != 1 || text.matches(&marker(k)).count() != 1 {
                return None;
            }
            at.push((found[0], k));
        }
        at.sort_unstable();
        let mut pieces = Vec::new();
        let mut from = 0;
        for &(start, k) in &at {
            pieces.push(text[from..start].to_string());
            from = start + marker(k).len() + 2;
        }
        pieces.push(text[from..].to_string());
        let values = sweep
            .vary
            .iter()
            .map(|v| {
                v.values
                    .iter()
                    .map(|x| {
                        let mut one = toml::Table::new();
                        one.insert("v".into(), x.toml.clone());
                        let line = toml::to_string(&one).ok()?;
                        Some(line.strip_prefix("v = ")?.strip_suffix('\n')?.to_string())
                    })
                    .collect::<Option<Vec<String>>>()
            })
            .collect::<Option<Vec<_>>>()?;
        let t = Template {
            base: sweep.base.clone(),
            vary: sweep.vary.clone(),
            pieces,
            slots: at.iter().map(|a| a.1).collect(),
            values,
        };
        let n = sweep.len();
        for i in [0, n / 2, n.saturating_sub(1)] {
            if toml::to_string(&sweep.candidate_table(i)).ok()? != t.text(&sweep.choice(i)) {
                return None;
            }
        }
        Some(t)
    }

    /// The text of the candidate with these value indices.
    fn text(&self, choice: &[usize]) -> String {
        let len = self.pieces.iter().map(String::len).sum::<usize>() + 16 * self.slots.len();
        let mut out = String::with_capacity(len);
        for (piece, &k) in self.pieces.iter().zip(&self.slots) {
            out.push_str(piece);
            out.push_str(&self.values[k][choice[k]]);
        }
        out.push_str(self.pieces.last().map_or("", String::as_str));
        out
    }
}

/// Why a candidate was set aside.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Status {
    /// Valid, passes the rule check and meets every requirement.
    Ok,
    /// Analysed but misses a requirement.
    FailsRequirement,
    /// Breaks a fab rule (error severity).
    RuleViolation,
    /// Not a valid design (validation or geometry).
    Invalid,
}

/// What the evaluator reports for one candidate design file.
#[derive(Debug, Clone, PartialEq)]
pub enum Evaluation {
    /// Metrics of a valid, rule-clean design.
    Metrics(BTreeMap<String, f64>),
    /// Metrics are known, but a fab rule is broken (reason given).
    RuleViolation(BTreeMap<String, f64>, String),
    /// Invalid design (reason given).
    Invalid(String),
}

/// One evaluated candidate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Candidate {
    /// Key path -> value text, in the order of the `--vary` arguments.
    pub params: Vec<(String, String)>,
    /// Outcome.
    pub status: Status,
    /// Why it is not `ok` (empty when ok).
    pub reason: String,
    /// Report metrics (empty when invalid).
    pub metrics: BTreeMap<String, f64>,
    /// Rank among the `ok` candidates by the objective (1 = best).
    pub rank: Option<usize>,
    /// On the Pareto front of (versus, objective) among `ok` candidates.
    pub pareto: bool,
    /// For a candidate that misses requirements: the largest relative
    /// shortfall among them ([`Requirement::shortfall`]); the nearest misses
    /// have the smallest.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub shortfall: Option<f64>,
}

impl Sweep {
    /// Checks the sweep against the metric names a report has.
    pub fn new(
        base_text: &str,
        vary: Vec<Vary>,
        require: Vec<Requirement>,
        objective: Objective,
        versus: Option<(String, bool)>,
        known_metrics: &[String],
    ) -> Result<Sweep, SweepError> {
        let base: toml::Table = base_text
            .parse()
            .map_err(|e: toml::de::Error| SweepError::Base(e.to_string()))?;
        for (i, v) in vary.iter().enumerate() {
            if vary[..i].iter().any(|u| u.key == v.key) {
                return Err(SweepError::Duplicate { key: v.key.clone() });
            }
        }
        let count = vary
            .iter()
            .try_fold(1usize, |acc, v| acc.checked_mul(v.values.len()))
            .unwrap_or(usize::MAX);
        if count > MAX_CANDIDATES {
            return Err(SweepError::TooMany {
                count,
                max: MAX_CANDIDATES,
            });
        }
        check_metric(&objective.metric, known_metrics)?;
        let versus_default = versus.is_none();
        let versus = match versus {
            Some(v) => {
                check_metric(&v.0, known_metrics)?;
                v
            }
            None => {
                let x = if objective.metric == "outer_diameter_mm" {
                    "resistance_ohm_20c"
                } else {
                    "outer_diameter_mm"
                };
                (x.to_string(), false)
            }
        };
        let mut sweep = Sweep {
            base,
            vary,
            require,
            objective,
            versus,
            versus_default,
            template: None,
        };
        sweep.template = Template::of(&sweep);
        Ok(sweep)
    }

    /// Number of candidates.
    pub fn len(&self) -> usize {
        self.vary.iter().map(|v| v.values.len()).product()
    }

    /// Whether the sweep has no candidates.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The value index of each `--vary` for candidate `i` (last key fastest).
    fn choice(&self, mut i: usize) -> Vec<usize> {
        let mut out = vec![0; self.vary.len()];
        for (k, v) in self.vary.iter().enumerate().rev() {
            out[k] = i % v.values.len();
            i /= v.values.len();
        }
        out
    }

    /// The design table of candidate `i`.
    pub fn candidate_table(&self, i: usize) -> toml::Table {
        let choice = self.choice(i);
        self.table_with(|k| self.vary[k].values[choice[k]].toml.clone())
    }

    /// The base table with `value(k)` at the `k`-th varied key, and
    /// exactly two of the size keys when one of them is swept.
    fn table_with(&self, value: impl Fn(usize) -> toml::Value) -> toml::Table {
        let mut t = self.base.clone();
        let sizes = ["coil.inner_diameter", "coil.turns", "coil.outer_diameter"];
        let varied: Vec<&str> = self.vary.iter().map(|v| v.key.as_str()).collect();
        for (k, v) in self.vary.iter().enumerate() {
            set(&mut t, &v.key, value(k));
        }
        // Keep exactly two of the size keys when one of them is swept.
        if varied.iter().any(|k| sizes.contains(k))
            && let Some(toml::Value::Table(coil)) = t.get_mut("coil")
        {
            let present = sizes
                .iter()
                .filter(|k| coil.contains_key(k.trim_start_matches("coil.")))
                .count();
            if present > 2
                && let Some(drop) = sizes.iter().find(|k| !varied.contains(k))
            {
                coil.remove(drop.trim_start_matches("coil."));
            }
        }
        t
    }

    /// The design text of candidate `i`: the text of its table, from the
    /// template when there is one.
    fn candidate_text_of(&self, i: usize) -> String {
        match &self.template {
            Some(t) if t.base == self.base && t.vary == self.vary => t.text(&self.choice(i)),
            _ => toml::to_string(&self.candidate_table(i)).unwrap_or_default(),
        }
    }

    /// The parameters of candidate `i` as (key, text).
    pub fn params(&self, i: usize) -> Vec<(String, String)> {
        self.vary
            .iter()
            .zip(self.choice(i))
            .map(|(v, c)| (v.key.clone(), v.values[c].text.clone()))
            .collect()
    }

    /// Evaluates candidate `i` (`eval` takes the candidate's design file
    /// text) and judges it against the requirements and the design's own
    /// temperature limit.
    pub fn candidate(&self, i: usize, eval: impl Fn(&str) -> Evaluation) -> Candidate {
        self.judge_text(&self.candidate_text_of(i), self.params(i), eval)
    }

    /// Evaluates a design table (a candidate's, or one with refined values)
    /// and judges it as [`Sweep::candidate`] does.
    pub fn judge(
        &self,
        table: &toml::Table,
        params: Vec<(String, String)>,
        eval: impl Fn(&str) -> Evaluation,
    ) -> Candidate {
        self.judge_text(&toml::to_string(table).unwrap_or_default(), params, eval)
    }

    /// [`Sweep::judge`] of a design table's text.
    fn judge_text(
        &self,
        text: &str,
        params: Vec<(String, String)>,
        eval: impl Fn(&str) -> Evaluation,
    ) -> Candidate {
        match eval(text) {
            Evaluation::Invalid(reason) => Candidate {
                params,
                status: Status::Invalid,
                reason,
                metrics: BTreeMap::new(),
                rank: None,
                pareto: false,
                shortfall: None,
            },
            Evaluation::RuleViolation(metrics, reason) => Candidate {
                params,
                status: Status::RuleViolation,
                reason,
                metrics,
                rank: None,
                pareto: false,
                shortfall: None,
            },
            Evaluation::Metrics(metrics) => {
                let limit = temperature_limit(&metrics);
                let failed: Vec<String> = limit
                    .iter()
                    .map(|(text, _)| text.clone())
                    .chain(
                        self.require
                            .iter()
                            .filter(|r| r.holds(&metrics) != Some(true))
                            .map(|r| {
                                let got = metrics
                                    .get(&r.metric)
                                    .map_or("missing".into(), |v| format!("{v:.4}"));
                                format!("{} (is {got})", r.text)
                            }),
                    )
                    .collect();
                let shortfall = self
                    .require
                    .iter()
                    .filter_map(|r| r.shortfall(&metrics))
                    .chain(limit.map(|(_, gap)| gap))
                    .reduce(f64::max);
                Candidate {
                    params,
                    status: if failed.is_empty() {
                        Status::Ok
                    } else {
                        Status::FailsRequirement
                    },
                    reason: failed.join("; "),
                    metrics,
                    rank: None,
                    pareto: false,
                    shortfall,
                }
            }
        }
    }

    /// Evaluates every candidate with `eval` (in parallel, in chunks) and
    /// returns the tally's summary: [`Sweep::stream`] with a [`Tally`],
    /// for callers that need no table of every candidate.
    pub fn summarise(&self, eval: impl Fn(&str) -> Evaluation + Sync) -> Summary {
        let mut tally = Tally::new(self);
        let never = std::sync::atomic::AtomicBool::new(false);
        self.stream(0..self.len(), eval, &never, |i, c| tally.add(i, &c));
        tally.finish()
    }
}

fn temperature_limit(metrics: &BTreeMap<String, f64>) -> Option<(String, f64)> {
    let max = *metrics.get("max_temperature_c")?;
    match metrics.get("temperature_c") {
        Some(&t) if t <= max => None,
        Some(&t) => Some((
            format!(
                "temperature_c <= max_temperature_c, the design's limit (is {t:.1} C, limit {max:.1} C)"
            ),
            (t - max) / max.abs().max(1.0),
        )),
        None => Some((
            format!("no steady temperature below the design's limit {max:.1} C (thermal runaway)"),
            f64::INFINITY,
        )),
    }
}

impl Sweep {
    /// The design file of candidate `i` written as an edit of the base
    /// design's text: its comments and layout stay, the varied keys take
    /// the candidate's values (whole numbers written as integers, the
    /// comment after a replaced value kept), a size key that gives way to a
    /// varied one is removed, and `rules.profile` is replaced by `profile`
    /// when given.
    ///
    /// # Errors
    /// [`SweepError::Base`] if the base text is not TOML.
    pub fn candidate_text(
        &self,
        base_text: &str,
        i: usize,
        profile: Option<&str>,
    ) -> Result<String, SweepError> {
        self.table_text(base_text, &self.candidate_table(i), profile)
    }

    /// [`Sweep::candidate_text`] of any design table made from the base
    /// (such as a refined candidate's).
    pub fn table_text(
        &self,
        base_text: &str,
        wanted: &toml::Table,
        profile: Option<&str>,
    ) -> Result<String, SweepError> {
        let mut doc: toml_edit::DocumentMut = base_text
            .parse()
            .map_err(|e: toml_edit::TomlError| SweepError::Base(e.to_string()))?;
        for v in &self.vary {
            let (table, key) = v.key.split_once('.').unwrap_or(("", &v.key));
            let Some(value) = lookup(wanted, table, key) else {
                continue;
            };
            crate::design::edit::set_value(&mut doc, table, key, edit_value(value));
        }
        // Size keys the candidate dropped.
        if let Some(coil) = doc.get_mut("coil").and_then(|c| c.as_table_like_mut()) {
            for k in ["inner_diameter", "turns", "outer_diameter"] {
                if coil.contains_key(k) && lookup(wanted, "coil", k).is_none() {
                    coil.remove(k);
                }
            }
        }
        if let Some(p) = profile {
            crate::design::edit::set_value(&mut doc, "rules", "profile", toml_edit::Value::from(p));
        }
        Ok(doc.to_string())
    }
}

/// `table.key` of a design table ("" = the root).
fn lookup<'t>(t: &'t toml::Table, table: &str, key: &str) -> Option<&'t toml::Value> {
    if table.is_empty() {
        t.get(key)
    } else {
        t.get(table)?.as_table()?.get(key)
    }
}

/// A sweep value as an edit value: whole floats become integers
/// (`turns = 26`, not `26.0`).
fn edit_value(v: &toml::Value) -> toml_edit::Value {
    match v {
        toml::Value::Float(f) if f.fract() == 0.0 && f.abs() < 1e15 => {
            toml_edit::Value::from(*f as i64)
        }
        toml::Value::Float(f) => toml_edit::Value::from(*f),
        toml::Value::Integer(n) => toml_edit::Value::from(*n),
        toml::Value::String(s) => toml_edit::Value::from(s.as_str()),
        toml::Value::Boolean(b) => toml_edit::Value::from(*b),
        other => toml_edit::Value::from(other.to_string()),
    }
}

/// Sets a dotted key in a TOML table, creating tables as needed.
pub(crate) fn set(t: &mut toml::Table, key: &str, value: toml::Value) {
    let mut parts: Vec<&str> = key.split('.').collect();
    let last = parts.pop().unwrap_or(key);
    let mut cur = t;
    for p in parts {
        let entry = cur
            .entry(p.to_string())
            .or_insert_with(|| toml::Value::Table(toml::Table::new()));
        if !entry.is_table() {
            *entry = toml::Value::Table(toml::Table::new());
        }
        cur = match entry {
            toml::Value::Table(x) => x,
            _ => unreachable!("just made a table"),
        };
    }
    cur.insert(last.to_string(), value);
}

#[cfg(test)]
mod tests {
    use super::*;

    const BASE: &str = r#"
name = "t"
[coil]
outer_diameter = "20mm"
inner_diameter = "4mm"
trace_width = "0.1mm"
clearance = "0.1mm"
layers = 2
"#;

    fn known() -> Vec<String> {
        [
            "force_n",
            "outer_diameter_mm",
            "resistance_ohm_20c",
            "temperature_c",
        ]
        .iter()
        .map(|s| s.to_string())
        .collect()
    }

    /// A fake evaluator: force grows with turns and layers, temperature too.
    fn fake(text: &str) -> Evaluation {
        let t: toml::Table = text.parse().unwrap();
        let coil = t["coil"].as_table().unwrap();
        let Some(turns) = coil
            .get("turns")
            .and_then(|v| v.as_float().or(v.as_integer().map(|i| i as f64)))
        else {
            return Evaluation::Invalid("no turns".into());
        };
        if coil.contains_key("inner_diameter") {
            return Evaluation::Invalid("three sizes".into());
        }
        let layers = coil["layers"].as_integer().unwrap() as f64;
        let mut m = BTreeMap::new();
        m.insert("force_n".into(), turns * layers);
        m.insert("temperature_c".into(), 20.0 + turns * layers);
        m.insert("outer_diameter_mm".into(), 20.0);
        m.insert("resistance_ohm_20c".into(), turns);
        Evaluation::Metrics(m)
    }

    #[test]
    fn sweeps_ranks_and_keeps_failures() {
        let vary = vec![
            parse_vary("layers=2,4").unwrap(),
            parse_vary("turns=4..8:2").unwrap(),
        ];
        let req = vec![Requirement::parse("temperature_c <= 40", &known()).unwrap()];
        let s = Sweep::new(
            BASE,
            vary,
            req,
            Objective {
                metric: "force_n".into(),
                maximize: true,
            },
            Some(("resistance_ohm_20c".into(), false)),
            &known(),
        )
        .unwrap();
        assert_eq!(s.len(), 6);
        let out = s.summarise(fake);
        // turns*layers <= 20: (2,4),(2,6),(2,8),(4,4) pass; best is 16 (2x8 or 4x4, first wins by order).
        assert_eq!(out.ok, 4);
        assert_eq!(out.fails_requirement, 2);
        assert_eq!(out.best, Some(2));
        let best = out.best_candidate().unwrap();
        assert_eq!(best.metrics["force_n"], 16.0);
        assert_eq!(best.rank, Some(1));
        let ranks: Vec<usize> = out.top.iter().map(|t| t.0).collect();
        assert_eq!(ranks, vec![2, 3, 1, 0]);
        assert!(
            out.misses
                .iter()
                .all(|(_, c)| c.status == Status::FailsRequirement
                    && c.reason.contains("temperature_c <= 40"))
        );
        assert!(out.plot().starts_with("<svg"));
    }

    #[test]
    fn fixed_outer_size_plots_against_resistance() {
        // The fake keeps the outer diameter at 20 mm: the default second
        // metric gives way to the resistance; a chosen one is kept.
        let run = |versus: Option<(String, bool)>| {
            Sweep::new(
                BASE,
                vec![parse_vary("turns=4..8:2").unwrap()],
                vec![],
                Objective {
                    metric: "force_n".into(),
                    maximize: true,
                },
                versus,
                &known(),
            )
            .unwrap()
            .summarise(fake)
        };
        assert_eq!(run(None).versus, "resistance_ohm_20c");
        let chosen = run(Some(("outer_diameter_mm".into(), false)));
        assert_eq!(chosen.versus, "outer_diameter_mm");
    }

    #[test]
    fn unknown_metric_is_rejected() {
        let e = Sweep::new(
            BASE,
            vec![parse_vary("turns=4..8").unwrap()],
            vec![],
            Objective {
                metric: "forse_n".into(),
                maximize: true,
            },
            None,
            &known(),
        )
        .unwrap_err();
        assert!(e.to_string().contains("did you mean 'force_n'"), "{e}");
    }

    #[test]
    fn candidate_texts_are_their_tables_text() {
        // Sizes swept from a base giving outer and inner diameter (the
        // inner one gives way), a key whose table the base lacks, and the
        // fin starter's own keys.
        let sweeps = [
            (
                BASE,
                vec![
                    "layers=2,4",
                    "turns=4..8:0.5",
                    "outer_diameter=18mm,20mm",
                    "magnet.gap=1mm,2mm",
                ],
            ),
            (
                include_str!("../../examples/fin-actuator.toml"),
                vec![
                    "layers=2,4,6,8",
                    "turns=6..9",
                    "trace_width=0.1mm..0.16mm:0.01mm",
                    "outer_diameter=12mm..13mm:0.5mm",
                ],
            ),
        ];
        for (base, vary) in sweeps {
            let mut s = Sweep::new(
                base,
                vary.iter().map(|v| parse_vary(v).unwrap()).collect(),
                vec![],
                Objective {
                    metric: "force_n".into(),
                    maximize: true,
                },
                None,
                &known(),
            )
            .unwrap();
            assert!(s.template.is_some());
            for i in 0..s.len() {
                let want = toml::to_string(&s.candidate_table(i)).unwrap();
                assert_eq!(s.candidate_text_of(i), want, "candidate {i}");
            }
            // A base changed after the sweep was made: the text follows it.
            set(
                &mut s.base,
                "coil.clearance",
                toml::Value::String("0.2mm".into()),
            );
            let want = toml::to_string(&s.candidate_table(1)).unwrap();
            assert!(want.contains("0.2mm"));
            assert_eq!(s.candidate_text_of(1), want);
        }
    }

    #[test]
    fn duplicate_keys_rejected() {
        let e = Sweep::new(
            BASE,
            vec![
                parse_vary("turns=4..8").unwrap(),
                parse_vary("coil.turns=1,2").unwrap(),
            ],
            vec![],
            Objective {
                metric: "force_n".into(),
                maximize: true,
            },
            None,
            &known(),
        );
        assert!(matches!(e, Err(SweepError::Duplicate { .. })));
    }
}
