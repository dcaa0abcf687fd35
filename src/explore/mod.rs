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
mod require;
mod stream;
mod vary;

pub use metrics::metrics;
pub use pareto::{PlotPoint, front, settle};
pub use require::{Op, Requirement, check_metric};
pub use stream::{CHUNK, PLOT_POINTS, Row, Shard, Summary, TOP, Tally, csv_header, csv_row};
pub use vary::{Kind, Value, Vary, kind_of, numeric_keys, parse as parse_vary, resolve_key};

use rayon::prelude::*;
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

/// The result of a sweep.
#[derive(Debug, Clone, Serialize)]
pub struct Outcome {
    /// The objective.
    pub objective: Objective,
    /// Requirements as typed.
    pub requirements: Vec<String>,
    /// The trade-off plot's x metric.
    pub versus: String,
    /// All candidates in generation order.
    pub candidates: Vec<Candidate>,
    /// Index of the best candidate.
    pub best: Option<usize>,
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
        Ok(Sweep {
            base,
            vary,
            require,
            objective,
            versus,
            versus_default,
        })
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
        let mut t = self.base.clone();
        let choice = self.choice(i);
        let sizes = ["coil.inner_diameter", "coil.turns", "coil.outer_diameter"];
        let varied: Vec<&str> = self.vary.iter().map(|v| v.key.as_str()).collect();
        for (v, &c) in self.vary.iter().zip(&choice) {
            set(&mut t, &v.key, v.values[c].toml.clone());
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
        let text = toml::to_string(&self.candidate_table(i)).unwrap_or_default();
        let params = self.params(i);
        match eval(&text) {
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

    /// Evaluates every candidate (in parallel) with `eval`, which receives
    /// the candidate's design-file text; `tick` is called once per candidate.
    /// Keeps every candidate in memory: for small sweeps (the command line
    /// streams with [`Sweep::stream`] and a [`Tally`]).
    pub fn run(&self, eval: impl Fn(&str) -> Evaluation + Sync, tick: impl Fn() + Sync) -> Outcome {
        let mut candidates: Vec<Candidate> = (0..self.len())
            .into_par_iter()
            .map(|i| {
                let c = self.candidate(i, &eval);
                tick();
                c
            })
            .collect();
        // Rank the ok candidates.
        let obj = &self.objective;
        let value = |c: &Candidate| c.metrics.get(&obj.metric).copied().unwrap_or(f64::NAN);
        let mut ok: Vec<usize> = (0..candidates.len())
            .filter(|&i| candidates[i].status == Status::Ok && value(&candidates[i]).is_finite())
            .collect();
        ok.sort_by(|&a, &b| {
            let (x, y) = (value(&candidates[a]), value(&candidates[b]));
            let o = if obj.maximize {
                y.total_cmp(&x)
            } else {
                x.total_cmp(&y)
            };
            o.then(a.cmp(&b))
        });
        for (r, &i) in ok.iter().enumerate() {
            candidates[i].rank = Some(r + 1);
        }
        let best = ok.first().copied();
        // The default second metric (the outer size) says nothing when the
        // sweep keeps it fixed: plot against the resistance instead. Judged
        // on every plotted candidate (those that meet the requirements and
        // those that miss one), so the plot never becomes one column.
        let metric =
            |name: &str, i: usize| candidates[i].metrics.get(name).copied().unwrap_or(f64::NAN);
        let plotted: Vec<usize> = (0..candidates.len())
            .filter(|&i| matches!(candidates[i].status, Status::Ok | Status::FailsRequirement))
            .collect();
        let varies = |name: &str| {
            let x = |i: usize| pareto::settle(metric(name, i));
            plotted.len() > 1 && plotted.iter().any(|&i| x(i) != x(plotted[0]))
        };
        let versus = if self.versus_default && plotted.len() > 1 && !varies(&self.versus.0) {
            DEFAULT_VERSUS
                .iter()
                .find(|m| **m != obj.metric && varies(m))
                .map(|m| (m.to_string(), false))
                .unwrap_or_else(|| self.versus.clone())
        } else {
            self.versus.clone()
        };
        // Pareto front among ok candidates.
        let pts: Vec<(f64, f64)> = ok
            .iter()
            .map(|&i| (metric(&versus.0, i), value(&candidates[i])))
            .collect();
        for k in front(&pts, versus.1, obj.maximize) {
            candidates[ok[k]].pareto = true;
        }
        Outcome {
            objective: obj.clone(),
            requirements: self.require.iter().map(|r| r.text.clone()).collect(),
            versus: versus.0,
            candidates,
            best,
        }
    }
}

/// The design's own temperature limit, a requirement of every sweep:
/// `Some((reason, relative shortfall))` when the candidate's steady
/// temperature is above its `max_temperature` (or it has none: no steady
/// state below the copper's limit).
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
        let mut doc: toml_edit::DocumentMut = base_text
            .parse()
            .map_err(|e: toml_edit::TomlError| SweepError::Base(e.to_string()))?;
        let wanted = self.candidate_table(i);
        for v in &self.vary {
            let (table, key) = v.key.split_once('.').unwrap_or(("", &v.key));
            let Some(value) = lookup(&wanted, table, key) else {
                continue;
            };
            set_edit(&mut doc, table, key, edit_value(value));
        }
        // Size keys the candidate dropped.
        if let Some(coil) = doc.get_mut("coil").and_then(|c| c.as_table_like_mut()) {
            for k in ["inner_diameter", "turns", "outer_diameter"] {
                if coil.contains_key(k) && lookup(&wanted, "coil", k).is_none() {
                    coil.remove(k);
                }
            }
        }
        if let Some(p) = profile {
            set_edit(&mut doc, "rules", "profile", toml_edit::Value::from(p));
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

/// Sets `table.key` in an edited document, keeping the old value's
/// surrounding whitespace and comment; creates the table if needed.
fn set_edit(doc: &mut toml_edit::DocumentMut, table: &str, key: &str, mut value: toml_edit::Value) {
    let t: &mut dyn toml_edit::TableLike = if table.is_empty() {
        doc.as_table_mut()
    } else {
        if doc.get(table).is_none() {
            doc.insert(table, toml_edit::Item::Table(toml_edit::Table::new()));
        }
        match doc.get_mut(table).and_then(|t| t.as_table_like_mut()) {
            Some(t) => t,
            None => return,
        }
    };
    if let Some(old) = t.get(key).and_then(|i| i.as_value()) {
        *value.decor_mut() = old.decor().clone();
    }
    t.insert(key, toml_edit::Item::Value(value));
}

/// Sets a dotted key in a TOML table, creating tables as needed.
fn set(t: &mut toml::Table, key: &str, value: toml::Value) {
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

impl Outcome {
    /// Whether no candidate meets every requirement.
    pub fn nothing_passes(&self) -> bool {
        self.best.is_none()
    }

    /// Up to `n` candidates that miss a requirement, nearest first (smallest
    /// relative shortfall; ties in generation order).
    pub fn nearest_misses(&self, n: usize) -> Vec<&Candidate> {
        let mut misses: Vec<&Candidate> = self
            .candidates
            .iter()
            .filter(|c| c.status == Status::FailsRequirement)
            .collect();
        misses.sort_by(|a, b| {
            a.shortfall
                .unwrap_or(f64::INFINITY)
                .total_cmp(&b.shortfall.unwrap_or(f64::INFINITY))
        });
        misses.truncate(n);
        misses
    }

    /// All candidates as CSV: rank, status, reason, parameters, metrics.
    pub fn csv(&self) -> String {
        let params: Vec<String> = self
            .candidates
            .first()
            .map(|c| c.params.iter().map(|(k, _)| k.clone()).collect())
            .unwrap_or_default();
        let mut metrics: Vec<String> = self
            .candidates
            .iter()
            .flat_map(|c| c.metrics.keys().cloned())
            .collect();
        metrics.sort();
        metrics.dedup();
        let mut out = String::new();
        let mut header = vec![
            "index".to_string(),
            "rank".into(),
            "status".into(),
            "pareto".into(),
        ];
        header.extend(params.iter().cloned());
        header.extend(metrics.iter().cloned());
        header.push("reason".into());
        out.push_str(
            &header
                .iter()
                .map(|h| csv_field(h))
                .collect::<Vec<_>>()
                .join(","),
        );
        out.push('\n');
        for (i, c) in self.candidates.iter().enumerate() {
            let mut row = vec![
                i.to_string(),
                c.rank.map(|r| r.to_string()).unwrap_or_default(),
                serde_json::to_value(&c.status)
                    .ok()
                    .and_then(|v| v.as_str().map(String::from))
                    .unwrap_or_default(),
                c.pareto.to_string(),
            ];
            row.extend(c.params.iter().map(|(_, v)| v.clone()));
            row.extend(
                metrics
                    .iter()
                    .map(|m| c.metrics.get(m).map(|v| format!("{v}")).unwrap_or_default()),
            );
            row.push(c.reason.clone());
            out.push_str(
                &row.iter()
                    .map(|h| csv_field(h))
                    .collect::<Vec<_>>()
                    .join(","),
            );
            out.push('\n');
        }
        out
    }

    /// The trade-off plot (SVG).
    pub fn plot(&self) -> String {
        let obj = &self.objective.metric;
        let analysed: Vec<usize> = (0..self.candidates.len())
            .filter(|&i| {
                matches!(
                    self.candidates[i].status,
                    Status::Ok | Status::FailsRequirement
                )
            })
            .collect();
        let points: Vec<PlotPoint> = analysed
            .iter()
            .map(|&i| {
                let c = &self.candidates[i];
                PlotPoint {
                    x: c.metrics.get(&self.versus).copied().unwrap_or(f64::NAN),
                    y: c.metrics.get(obj).copied().unwrap_or(f64::NAN),
                    feasible: c.status == Status::Ok,
                }
            })
            .collect();
        let mut front_idx: Vec<usize> = analysed
            .iter()
            .enumerate()
            .filter(|(_, i)| self.candidates[**i].pareto)
            .map(|(k, _)| k)
            .collect();
        front_idx.sort_by(|a, b| points[*a].x.total_cmp(&points[*b].x));
        let best = self
            .best
            .and_then(|b| analysed.iter().position(|&i| i == b));
        let title = format!(
            "{} {} vs {} ({} of {} candidates meet the requirements)",
            if self.objective.maximize {
                "maximize"
            } else {
                "minimize"
            },
            obj,
            self.versus,
            self.candidates
                .iter()
                .filter(|c| c.status == Status::Ok)
                .count(),
            self.candidates.len()
        );
        crate::export::plot::tradeoff(&points, &front_idx, best, &self.versus, obj, &title)
    }
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
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
        let out = s.run(fake, || {});
        // turns*layers <= 20: (2,4),(2,6),(2,8),(4,4) pass; best is 16 (2x8 or 4x4, first wins by order).
        let ok = out
            .candidates
            .iter()
            .filter(|c| c.status == Status::Ok)
            .count();
        assert_eq!(ok, 4);
        let best = &out.candidates[out.best.unwrap()];
        assert_eq!(best.metrics["force_n"], 16.0);
        assert!(
            out.candidates
                .iter()
                .any(|c| c.status == Status::FailsRequirement
                    && c.reason.contains("temperature_c <= 40"))
        );
        let csv = out.csv();
        assert_eq!(csv.lines().count(), 7);
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
            .run(fake, || {})
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
