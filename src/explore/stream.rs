//! Sweeps of any size in bounded memory, and sweeps split into shards.
//!
//! [`Sweep::stream`] evaluates candidates in chunks of [`CHUNK`] (in
//! parallel within a chunk) and hands them to the caller one by one in
//! index order, so the command line writes each straight to
//! `candidates.csv` and `candidates.jsonl`. Only a [`Tally`] is kept:
//! counts, the [`TOP`] best candidates, the five nearest misses, the Pareto
//! fronts and the trade-off plot's points, thinned to at most
//! [`PLOT_POINTS`] (plus the front and the best): every candidate whose
//! index is a multiple of the step, the step doubling (1, 2, 4, ...) each
//! time more points than that would be kept. Memory is therefore
//! independent of the candidate count: about `TOP + PLOT_POINTS` small
//! records and one chunk of candidates.
//!
//! Everything the tally keeps depends only on the candidates in index
//! order, so a sweep split into [`Shard`]s (contiguous slices of the index
//! range) and merged by feeding the shards' rows back in order gives the
//! same ranking, front, plot and best design as one run.

use super::pareto::{PlotPoint, front, settle};
use super::{Candidate, DEFAULT_VERSUS, Evaluation, Objective, Status, Sweep, SweepError};
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::ops::Range;
use std::sync::atomic::{AtomicBool, Ordering};

/// Candidates evaluated together (in parallel) before they are handed on.
pub const CHUNK: usize = 256;

/// Best candidates kept with their full record (ranking.csv).
pub const TOP: usize = 100;

/// Most thinned points of the trade-off plot (the front and the best are
/// added to them).
pub const PLOT_POINTS: usize = 20_000;

/// Nearest misses kept.
const MISSES: usize = 5;

/// Shard `k` of `n` (1-based): the `k`-th of `n` contiguous, nearly equal
/// slices of the candidate index range.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct Shard {
    /// Which slice, 1..=n.
    pub k: usize,
    /// How many slices.
    pub n: usize,
}

impl Shard {
    /// The whole sweep.
    pub const ALL: Shard = Shard { k: 1, n: 1 };

    /// Parses `K/N` with `1 <= K <= N`.
    pub fn parse(text: &str) -> Result<Shard, SweepError> {
        let bad = |message: &str| SweepError::BadShard {
            text: text.to_string(),
            message: message.to_string(),
        };
        let (k, n) = text
            .split_once('/')
            .ok_or_else(|| bad("write K/N, e.g. 2/8"))?;
        let parse = |s: &str| s.trim().parse::<usize>().ok();
        match (parse(k), parse(n)) {
            (Some(k), Some(n)) if n >= 1 && (1..=n).contains(&k) => Ok(Shard { k, n }),
            (Some(_), Some(_)) => Err(bad("K must be between 1 and N")),
            _ => Err(bad("K and N must be whole numbers, e.g. 2/8")),
        }
    }

    /// The candidate indices of this shard out of `len`.
    pub fn range(&self, len: usize) -> Range<usize> {
        let at = |k: usize| ((len as u128 * k as u128) / self.n as u128) as usize;
        at(self.k - 1)..at(self.k)
    }
}

/// One candidate as a line of `candidates.jsonl` (metrics that are not
/// finite are `null`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Row {
    /// Candidate index.
    pub index: usize,
    /// Key path and value text, in the order of the `--vary` arguments.
    pub params: Vec<(String, String)>,
    /// Outcome.
    pub status: Status,
    /// Why it is not ok.
    pub reason: String,
    /// Largest relative shortfall of a missed requirement.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shortfall: Option<f64>,
    /// Report metrics.
    pub metrics: BTreeMap<String, Option<f64>>,
}

impl Row {
    /// The row of candidate `index`.
    pub fn of(index: usize, c: &Candidate) -> Row {
        Row {
            index,
            params: c.params.clone(),
            status: c.status,
            reason: c.reason.clone(),
            shortfall: c.shortfall.filter(|v| v.is_finite()),
            metrics: c
                .metrics
                .iter()
                .map(|(k, &v)| (k.clone(), v.is_finite().then_some(v)))
                .collect(),
        }
    }

    /// The candidate again (a `null` metric becomes NaN; a missing
    /// shortfall of a failing candidate, infinite).
    pub fn candidate(&self) -> Candidate {
        Candidate {
            params: self.params.clone(),
            status: self.status,
            reason: self.reason.clone(),
            metrics: self
                .metrics
                .iter()
                .map(|(k, v)| (k.clone(), v.unwrap_or(f64::NAN)))
                .collect(),
            rank: None,
            pareto: false,
            shortfall: match self.status {
                Status::FailsRequirement => Some(self.shortfall.unwrap_or(f64::INFINITY)),
                _ => None,
            },
        }
    }
}

/// The header of a candidate table: index, status, the varied keys, the
/// metrics (in the order given) and the reason; with `ranked`, rank and
/// pareto first.
pub fn csv_header(params: &[String], metrics: &[String], ranked: bool) -> String {
    let mut h: Vec<&str> = Vec::new();
    if ranked {
        h.extend(["rank", "pareto"]);
    }
    h.extend(["index", "status"]);
    h.extend(params.iter().map(String::as_str));
    h.extend(metrics.iter().map(String::as_str));
    h.push("reason");
    line(h.into_iter().map(String::from))
}

/// One row of a candidate table (see [`csv_header`]).
pub fn csv_row(index: usize, c: &Candidate, metrics: &[String], ranked: bool) -> String {
    let mut out = String::new();
    push_csv_row(&mut out, index, c, metrics, ranked);
    out
}

/// Appends [`csv_row`] to `out` (a sweep reuses one buffer for every
/// row). The metrics are looked up in step with the candidate's sorted
/// map when `metrics` is sorted too (a sweep's columns are), by name
/// otherwise; numbers are written as `{}` writes them ([`push_f64`]).
pub fn push_csv_row(
    out: &mut String,
    index: usize,
    c: &Candidate,
    metrics: &[String],
    ranked: bool,
) {
    use std::fmt::Write as _;
    if ranked {
        if let Some(r) = c.rank {
            let _ = write!(out, "{r}");
        }
        out.push(',');
        out.push_str(if c.pareto { "true" } else { "false" });
        out.push(',');
    }
    let _ = write!(out, "{index}");
    out.push(',');
    out.push_str(status_word(c.status));
    for (_, v) in &c.params {
        out.push(',');
        push_field(out, v);
    }
    let mut have = c.metrics.iter().peekable();
    for m in metrics {
        out.push(',');
        let v = match have.peek() {
            Some((k, v)) if *k == m => {
                let v = **v;
                have.next();
                Some(v)
            }
            _ => c.metrics.get(m).copied(),
        };
        if let Some(v) = v {
            push_f64(out, v);
        }
    }
    out.push(',');
    push_field(out, &c.reason);
    out.push('\n');
}

/// Appends one text field, quoted when it holds a comma, a quote or a
/// line break (quotes doubled).
fn push_field(out: &mut String, f: &str) {
    if f.contains([',', '"', '\n']) {
        out.push('"');
        out.push_str(&f.replace('"', "\"\""));
        out.push('"');
    } else {
        out.push_str(f);
    }
}

/// Appends `v` exactly as `format!("{v}")` writes it (the shortest digits
/// that read back as `v`, never an exponent, no fraction for a whole
/// number, `-0` for minus zero), from serde_json's shortest digits
/// (which may come with an exponent) laid out again: the same digits, as
/// both give the shortest that reads back, and of those the nearest. Where
/// two are equally near, the two may choose differently; `{}` itself
/// writes those numbers (and those that are not finite).
pub fn push_f64(out: &mut String, v: f64) {
    use serde_json::ser::Formatter as _;
    use std::fmt::Write as _;
    if !v.is_finite() {
        let _ = write!(out, "{v}");
        return;
    }
    let mut buf = [0u8; 40];
    let len = {
        let mut w = &mut buf[..];
        if serde_json::ser::CompactFormatter
            .write_f64(&mut w, v)
            .is_err()
        {
            let _ = write!(out, "{v}");
            return;
        }
        40 - w.len()
    };
    let text = &buf[..len];
    let (neg, text) = match text.split_first() {
        Some((b'-', rest)) => (true, rest),
        _ => (false, text),
    };
    let (mantissa, exp) = match text.iter().position(|&b| b == b'e' || b == b'E') {
        Some(at) => {
            let e = std::str::from_utf8(&text[at + 1..])
                .ok()
                .and_then(|e| e.trim_start_matches('+').parse::<i32>().ok());
            let Some(e) = e else {
                let _ = write!(out, "{v}");
                return;
            };
            (&text[..at], e)
        }
        None => (text, 0),
    };
    // The digits without the point, and where the point goes among them.
    let mut digits = [0u8; 40];
    let mut n = 0;
    let mut point = None;
    for &b in mantissa {
        if b == b'.' {
            point = Some(n);
        } else {
            digits[n] = b;
            n += 1;
        }
    }
    let mut dp = point.unwrap_or(n) as i32 + exp;
    let mut digits = &digits[..n];
    while let Some((b'0', rest)) = digits.split_first() {
        digits = rest;
        dp -= 1;
    }
    while let Some((b'0', rest)) = digits.split_last() {
        digits = rest;
    }
    if digits.len() >= 16 && maybe_tie(v) {
        let _ = write!(out, "{v}");
        return;
    }
    if neg {
        out.push('-');
    }
    if digits.is_empty() {
        out.push('0');
    } else if dp <= 0 {
        out.push_str("0.");
        out.extend(std::iter::repeat_n('0', (-dp) as usize));
        out.extend(digits.iter().map(|&b| char::from(b)));
    } else if dp as usize >= digits.len() {
        out.extend(digits.iter().map(|&b| char::from(b)));
        out.extend(std::iter::repeat_n('0', dp as usize - digits.len()));
    } else {
        let (int, frac) = digits.split_at(dp as usize);
        out.extend(int.iter().map(|&b| char::from(b)));
        out.push('.');
        out.extend(frac.iter().map(|&b| char::from(b)));
    }
}

/// Whether two shortest digit strings of `v`, of 16 digits or more, may
/// be equally near it (then serde_json and `{}` may choose differently:
/// 2122363682541629.25 is written ...629.2 by one, ...629.3 by the
/// other). Shorter strings cannot tie: two of `k` digits both within the
/// doubles' spacing around `v` need `10^-k < 2^-52`, so `k >= 16`. A tie
/// needs `v` to be exactly the decimal halfway between the two, one digit
/// longer: at most 18 significant digits. With `v = m 2^e`, `m` odd, the
/// exact decimal of `v` is `m 5^-e / 10^-e` for `e < 0`, with as many
/// significant digits as `m 5^-e`; for `e >= 0` its last digit 5 would
/// sit at or left of the doubles' spacing, so there is no tie.
fn maybe_tie(v: f64) -> bool {
    let bits = v.to_bits();
    let biased = ((bits >> 52) & 0x7ff) as i32;
    let fraction = bits & ((1 << 52) - 1);
    let (m, e) = if biased == 0 {
        (fraction, -1074)
    } else {
        (fraction | (1 << 52), biased - 1075)
    };
    if m == 0 {
        return false;
    }
    let e = e + m.trailing_zeros() as i32;
    let m = m >> m.trailing_zeros();
    // 5^26 alone has 19 digits.
    if !(-25..0).contains(&e) {
        return false;
    }
    u128::from(m) * 5u128.pow(e.unsigned_abs()) < 10u128.pow(18)
}

/// Writes candidate `index` as one line of `candidates.jsonl` (the bytes
/// of `serde_json::to_string(&Row::of(index, c))` and a line break),
/// without copying the candidate into a [`Row`].
///
/// # Errors
/// Those of the writer.
pub fn write_jsonl_row<W: std::io::Write>(
    mut w: W,
    index: usize,
    c: &Candidate,
) -> serde_json::Result<()> {
    serde_json::to_writer(
        &mut w,
        &RowRef {
            index,
            params: &c.params,
            status: c.status,
            reason: &c.reason,
            shortfall: c.shortfall.filter(|v| v.is_finite()),
            metrics: FiniteOrNull(&c.metrics),
        },
    )?;
    w.write_all(b"\n").map_err(serde_json::Error::io)
}

/// A [`Row`] that borrows the candidate (the same fields and attributes).
#[derive(Serialize)]
struct RowRef<'a> {
    index: usize,
    params: &'a [(String, String)],
    status: Status,
    reason: &'a str,
    #[serde(skip_serializing_if = "Option::is_none")]
    shortfall: Option<f64>,
    metrics: FiniteOrNull<'a>,
}

/// Metrics serialised as [`Row::metrics`] is: a number that is not finite
/// as `null`.
struct FiniteOrNull<'a>(&'a BTreeMap<String, f64>);

impl Serialize for FiniteOrNull<'_> {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_map(self.0.iter().map(|(k, &v)| (k, v.is_finite().then_some(v))))
    }
}

/// The status as the tables write it.
pub fn status_word(s: Status) -> &'static str {
    match s {
        Status::Ok => "ok",
        Status::FailsRequirement => "fails_requirement",
        Status::RuleViolation => "rule_violation",
        Status::Invalid => "invalid",
    }
}

fn line(fields: impl Iterator<Item = String>) -> String {
    let mut out = fields
        .map(|f| {
            if f.contains([',', '"', '\n']) {
                format!("\"{}\"", f.replace('"', "\"\""))
            } else {
                f
            }
        })
        .collect::<Vec<_>>()
        .join(",");
    out.push('\n');
    out
}

impl Sweep {
    /// Evaluates the candidates in `range` in chunks of [`CHUNK`] and calls
    /// `visit` with each in index order. Checks `stop` between chunks and
    /// returns early when it is set (after visiting the chunks already
    /// evaluated). Returns how many were evaluated.
    ///
    /// The next chunk is evaluated while the one before is visited (both
    /// on the current rayon pool), so writing the tables does not hold the
    /// evaluation up.
    pub fn stream(
        &self,
        range: Range<usize>,
        eval: impl Fn(&str) -> Evaluation + Sync,
        stop: &AtomicBool,
        mut visit: impl FnMut(usize, Candidate) + Send,
    ) -> usize {
        let mut done = 0;
        let mut at = range.start;
        let mut pending: Option<(usize, Vec<Candidate>)> = None;
        loop {
            let go = at < range.end && !stop.load(Ordering::Relaxed);
            let (fresh, ()) = rayon::join(
                || {
                    go.then(|| {
                        let end = (at + CHUNK).min(range.end);
                        (at..end)
                            .into_par_iter()
                            .map(|i| self.candidate(i, &eval))
                            .collect::<Vec<Candidate>>()
                    })
                },
                || {
                    if let Some((from, chunk)) = pending.take() {
                        for (i, c) in (from..).zip(chunk) {
                            visit(i, c);
                        }
                    }
                },
            );
            let Some(chunk) = fresh else { break };
            done += chunk.len();
            pending = Some((at, chunk));
            at += pending.as_ref().map_or(0, |p| p.1.len());
        }
        done
    }
}

/// A Pareto front being built: the points seen so far that no earlier
/// point matches or beats in both metrics (kept as (x, y, index), both
/// turned into "smaller is better" and settled). [`front`] over them at the
/// end gives exactly the front of every point seen.
#[derive(Debug, Clone, Default)]
struct Front {
    points: Vec<(f64, f64, usize)>,
}

impl Front {
    fn add(&mut self, x: f64, y: f64, index: usize) {
        if !x.is_finite() || !y.is_finite() {
            return;
        }
        if self.points.iter().any(|&(px, py, _)| px <= x && py <= y) {
            return;
        }
        self.points
            .retain(|&(px, py, _)| !(x <= px && y <= py && (x < px || y < py)));
        self.points.push((x, y, index));
    }
}

/// One candidate as the plot sees it: its index, whether it meets every
/// requirement, the objective and every metric the x axis may show.
#[derive(Debug, Clone)]
struct Dot {
    index: usize,
    feasible: bool,
    y: f64,
    xs: Vec<f64>,
}

/// What a streamed sweep keeps (module notes).
#[derive(Debug, Clone)]
pub struct Tally {
    objective: Objective,
    requirements: Vec<String>,
    /// Candidate x-axis metrics with their sense: the chosen `versus`
    /// first, then (when it was a default) [`DEFAULT_VERSUS`].
    axes: Vec<(String, bool)>,
    versus_default: bool,
    counts: [usize; 4],
    evaluated: usize,
    /// (objective settled and turned "smaller is better", index, candidate).
    top: Vec<(f64, usize, Candidate)>,
    misses: Vec<(f64, usize, Candidate)>,
    /// Per axis: the front of the ok candidates.
    fronts: Vec<Front>,
    /// Per axis: the first settled value among analysed candidates, and
    /// whether another differed.
    varies: Vec<(Option<f64>, bool)>,
    /// Front members (by index): their plot dot and row, for the front
    /// table and the plot.
    members: BTreeMap<usize, (Dot, Candidate)>,
    dots: Vec<Dot>,
    step: usize,
    analysed: usize,
    firsts: Vec<(usize, Candidate)>,
}

/// The result of a streamed sweep (or of merged shards).
#[derive(Debug, Clone, Serialize)]
pub struct Summary {
    /// The objective.
    pub objective: Objective,
    /// The requirements as typed.
    pub requirements: Vec<String>,
    /// The plot's x metric.
    pub versus: String,
    /// Candidates evaluated.
    pub evaluated: usize,
    /// Candidates meeting every requirement.
    pub ok: usize,
    /// Analysed but missing a requirement.
    pub fails_requirement: usize,
    /// Breaking a fab rule.
    pub rule_violation: usize,
    /// Not valid designs.
    pub invalid: usize,
    /// Index of the best candidate.
    pub best: Option<usize>,
    /// The best [`TOP`] candidates, best first (rank set), with their
    /// indices.
    #[serde(skip)]
    pub top: Vec<(usize, Candidate)>,
    /// The Pareto front of (versus, objective), by x (pareto set).
    #[serde(skip)]
    pub front: Vec<(usize, Candidate)>,
    /// The nearest misses, smallest shortfall first.
    #[serde(skip)]
    pub misses: Vec<(usize, Candidate)>,
    /// The first few candidates (for a summary when none could be
    /// analysed).
    #[serde(skip)]
    pub firsts: Vec<(usize, Candidate)>,
    /// Step of the plot's thinning (1: every analysed candidate plotted).
    pub plot_step: usize,
    #[serde(skip)]
    plot_points: Vec<PlotPoint>,
    #[serde(skip)]
    plot_front: Vec<usize>,
    #[serde(skip)]
    plot_best: Option<usize>,
}

impl Tally {
    /// An empty tally for a sweep.
    pub fn new(sweep: &Sweep) -> Tally {
        let mut axes = vec![sweep.versus.clone()];
        if sweep.versus_default {
            for m in DEFAULT_VERSUS {
                if *m != sweep.objective.metric && !axes.iter().any(|a| a.0 == *m) {
                    axes.push((m.to_string(), false));
                }
            }
        }
        Tally {
            objective: sweep.objective.clone(),
            requirements: sweep.require.iter().map(|r| r.text.clone()).collect(),
            fronts: vec![Front::default(); axes.len()],
            varies: vec![(None, false); axes.len()],
            axes,
            versus_default: sweep.versus_default,
            counts: [0; 4],
            evaluated: 0,
            top: Vec::new(),
            misses: Vec::new(),
            members: BTreeMap::new(),
            dots: Vec::new(),
            step: 1,
            analysed: 0,
            firsts: Vec::new(),
        }
    }

    /// The objective as "smaller is better", settled.
    fn key(&self, c: &Candidate) -> f64 {
        let v = settle(
            c.metrics
                .get(&self.objective.metric)
                .copied()
                .unwrap_or(f64::NAN),
        );
        if self.objective.maximize { -v } else { v }
    }

    /// Adds candidate `index`; indices must come in increasing order.
    pub fn add(&mut self, index: usize, c: &Candidate) {
        self.evaluated += 1;
        self.counts[c.status as usize] += 1;
        if self.firsts.len() < MISSES {
            self.firsts.push((index, c.clone()));
        }
        let analysed = matches!(c.status, Status::Ok | Status::FailsRequirement);
        if c.status == Status::FailsRequirement {
            let s = c.shortfall.unwrap_or(f64::INFINITY);
            let at = self.misses.partition_point(|m| m.0 <= s);
            if at < MISSES {
                self.misses.insert(at, (s, index, c.clone()));
                self.misses.truncate(MISSES);
            }
        }
        if !analysed {
            return;
        }
        let y = self.key(c);
        let xs: Vec<f64> = self
            .axes
            .iter()
            .map(|(m, max)| {
                let x = settle(c.metrics.get(m).copied().unwrap_or(f64::NAN));
                if *max { -x } else { x }
            })
            .collect();
        for (v, &x) in self.varies.iter_mut().zip(&xs) {
            match v.0 {
                None => v.0 = Some(x),
                Some(first) if first != x && !(first.is_nan() && x.is_nan()) => v.1 = true,
                _ => {}
            }
        }
        let dot = Dot {
            index,
            feasible: c.status == Status::Ok,
            y,
            xs,
        };
        if c.status == Status::Ok && y.is_finite() {
            let at = self.top.partition_point(|t| t.0 <= y);
            if at < TOP {
                self.top.insert(at, (y, index, c.clone()));
                self.top.truncate(TOP);
            }
            let mut member = false;
            for (f, &x) in self.fronts.iter_mut().zip(&dot.xs) {
                f.add(x, y, index);
                member |= f.points.iter().any(|p| p.2 == index);
            }
            if member {
                self.members.insert(index, (dot.clone(), c.clone()));
            }
            // Forget members no front holds any more.
            if self.members.len() > 4 * self.fronts.len() + 64 {
                let held: std::collections::BTreeSet<usize> = self
                    .fronts
                    .iter()
                    .flat_map(|f| f.points.iter().map(|p| p.2))
                    .collect();
                self.members.retain(|i, _| held.contains(i));
            }
        }
        self.analysed += 1;
        if index.is_multiple_of(self.step) {
            self.dots.push(dot);
            while self.dots.len() > PLOT_POINTS {
                self.step *= 2;
                let step = self.step;
                self.dots.retain(|d| d.index.is_multiple_of(step));
            }
        }
    }

    /// The summary: ranking, the front on the chosen axis, the plot.
    pub fn finish(self) -> Summary {
        // The default x axis gives way when it is the same for every
        // analysed candidate: the first of DEFAULT_VERSUS that differs.
        let axis = if self.versus_default && self.analysed > 1 && !self.varies[0].1 {
            (1..self.axes.len())
                .find(|&k| self.varies[k].1)
                .unwrap_or(0)
        } else {
            0
        };
        let (versus, x_max) = self.axes[axis].clone();
        let unturn = |v: f64, max: bool| if max { -v } else { v };
        let y_max = self.objective.maximize;
        // The exact front of the kept points on the chosen axis.
        let mut pts = self.fronts[axis].points.clone();
        pts.sort_by_key(|p| p.2);
        let xy: Vec<(f64, f64)> = pts.iter().map(|p| (p.0, p.1)).collect();
        let on_front: Vec<usize> = front(&xy, false, false)
            .into_iter()
            .map(|k| pts[k].2)
            .collect();
        let front_rows: Vec<(usize, Candidate)> = on_front
            .iter()
            .filter_map(|i| {
                let mut c = self.members.get(i)?.1.clone();
                c.pareto = true;
                Some((*i, c))
            })
            .collect();
        let top: Vec<(usize, Candidate)> = self
            .top
            .into_iter()
            .enumerate()
            .map(|(r, (_, i, mut c))| {
                c.rank = Some(r + 1);
                c.pareto = on_front.contains(&i);
                (i, c)
            })
            .collect();
        let best = top.first().map(|t| t.0);
        // Plot: thinned dots, plus the front and the best, by index.
        let mut dots: BTreeMap<usize, Dot> = self.dots.into_iter().map(|d| (d.index, d)).collect();
        for i in on_front.iter().chain(best.iter()) {
            if let Some((d, _)) = self.members.get(i) {
                dots.insert(*i, d.clone());
            }
        }
        let order: Vec<usize> = dots.keys().copied().collect();
        let plot_points: Vec<PlotPoint> = dots
            .values()
            .map(|d| PlotPoint {
                x: unturn(d.xs[axis], x_max),
                y: unturn(d.y, y_max),
                feasible: d.feasible,
            })
            .collect();
        let plot_front: Vec<usize> = on_front
            .iter()
            .filter_map(|i| order.iter().position(|o| o == i))
            .collect();
        let plot_best = best.and_then(|b| order.iter().position(|o| *o == b));
        Summary {
            objective: self.objective,
            requirements: self.requirements,
            versus,
            evaluated: self.evaluated,
            ok: self.counts[Status::Ok as usize],
            fails_requirement: self.counts[Status::FailsRequirement as usize],
            rule_violation: self.counts[Status::RuleViolation as usize],
            invalid: self.counts[Status::Invalid as usize],
            best,
            top,
            front: front_rows,
            misses: self.misses.into_iter().map(|(_, i, c)| (i, c)).collect(),
            firsts: self.firsts,
            plot_step: self.step,
            plot_points,
            plot_front,
            plot_best,
        }
    }
}

impl Summary {
    /// Whether no candidate meets every requirement.
    pub fn nothing_passes(&self) -> bool {
        self.best.is_none()
    }

    /// The best candidate.
    pub fn best_candidate(&self) -> Option<&Candidate> {
        self.top.first().map(|t| &t.1)
    }

    /// The trade-off plot (SVG): the thinned candidates, the front and the
    /// best.
    pub fn plot(&self) -> String {
        let obj = &self.objective.metric;
        let thinned = if self.plot_step > 1 {
            format!(", every {}th shown", self.plot_step)
        } else {
            String::new()
        };
        let title = format!(
            "{} {} vs {} ({} of {} candidates meet the requirements{thinned})",
            if self.objective.maximize {
                "maximize"
            } else {
                "minimize"
            },
            obj,
            self.versus,
            self.ok,
            self.evaluated
        );
        crate::export::plot::tradeoff(
            &self.plot_points,
            &self.plot_front,
            self.plot_best,
            &self.versus,
            obj,
            &title,
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A candidate with awkward text and numbers.
    fn awkward() -> Candidate {
        Candidate {
            params: vec![
                ("coil.turns".into(), "12.5".into()),
                ("name".into(), "a,\"b\"".into()),
            ],
            status: Status::FailsRequirement,
            reason: "x, y\nz".into(),
            metrics: [
                ("a", 1.0),
                ("b", -0.0),
                ("c", f64::NAN),
                ("d", f64::INFINITY),
                ("e", 1e-7),
                ("f", 1.5e300),
                ("g", 0.1 + 0.2),
                ("h", -123.456),
            ]
            .iter()
            .map(|(k, v)| (k.to_string(), *v))
            .collect(),
            rank: Some(3),
            pareto: true,
            shortfall: Some(0.25),
        }
    }

    /// The row as it was written before rows had a reused buffer.
    fn csv_row_by_format(index: usize, c: &Candidate, metrics: &[String], ranked: bool) -> String {
        let mut row: Vec<String> = Vec::new();
        if ranked {
            row.push(c.rank.map(|r| r.to_string()).unwrap_or_default());
            row.push(c.pareto.to_string());
        }
        row.push(index.to_string());
        row.push(status_word(c.status).to_string());
        row.extend(c.params.iter().map(|(_, v)| v.clone()));
        row.extend(
            metrics
                .iter()
                .map(|m| c.metrics.get(m).map(|v| format!("{v}")).unwrap_or_default()),
        );
        row.push(c.reason.clone());
        line(row.into_iter())
    }

    #[test]
    fn rows_are_written_as_before() {
        let c = awkward();
        let sorted: Vec<String> = ["a", "b", "bb", "c", "d", "e", "f", "g", "h", "z"]
            .iter()
            .map(|s| s.to_string())
            .collect();
        let unsorted: Vec<String> = sorted.iter().rev().cloned().collect();
        for metrics in [&sorted, &unsorted] {
            for ranked in [false, true] {
                assert_eq!(
                    csv_row(7, &c, metrics, ranked),
                    csv_row_by_format(7, &c, metrics, ranked)
                );
            }
        }
        let mut line = Vec::new();
        write_jsonl_row(&mut line, 7, &c).unwrap();
        let mut want = serde_json::to_string(&Row::of(7, &c)).unwrap();
        want.push('\n');
        assert_eq!(String::from_utf8(line).unwrap(), want);
    }

    #[test]
    fn numbers_are_written_as_format_writes_them() {
        let mut rnd = crate::numeric::test_uniform(2026);
        let check = |v: f64| {
            let mut s = String::new();
            push_f64(&mut s, v);
            assert_eq!(s, format!("{v}"), "{:e}", v);
        };
        for v in [
            0.0,
            -0.0,
            1.0,
            0.1,
            1e-7,
            1e21,
            1e22,
            5e-324,
            f64::MAX,
            f64::MIN_POSITIVE,
            123456789.0,
            0.3,
            2.5e-5,
        ] {
            check(v);
            check(-v);
        }
        for _ in 0..2_000_000 {
            // Any bit pattern of a finite number.
            let bits = (rnd() * 2f64.powi(32)) as u64 ^ (((rnd() * 2f64.powi(32)) as u64) << 32);
            let v = f64::from_bits(bits);
            if v.is_finite() {
                check(v);
            }
            // Decimals with few digits, as designs and results often are.
            let d = (rnd() * 1e6).round() / 10f64.powi((rnd() * 12.0) as i32);
            check(d);
            check(d * 10f64.powi((rnd() * 40.0) as i32 - 20));
            // Short binary fractions, where two shortest strings can be
            // equally near.
            let m = (rnd() * 2f64.powi(53)).floor();
            check(m * 2f64.powi(-((rnd() * 40.0) as i32)));
        }
    }

    #[test]
    fn shards_cover_the_range_once() {
        for len in [0, 1, 7, 100, 1001] {
            for n in [1, 3, 7] {
                let mut next = 0;
                for k in 1..=n {
                    let r = Shard { k, n }.range(len);
                    assert_eq!(r.start, next);
                    next = r.end;
                }
                assert_eq!(next, len);
            }
        }
        assert_eq!(Shard::parse("2/8").unwrap(), Shard { k: 2, n: 8 });
        for bad in ["0/3", "4/3", "x/3", "3", "1/0"] {
            assert!(Shard::parse(bad).is_err(), "{bad}");
        }
    }

    #[test]
    fn the_streamed_front_is_the_front_of_all_points() {
        // Pseudo-random points with many ties; the incremental front then
        // `front` equals `front` over every point.
        let mut rnd = crate::numeric::test_uniform(12345);
        let mut next = || (rnd() * 20.0).floor();
        for _ in 0..50 {
            let pts: Vec<(f64, f64)> = (0..200).map(|_| (next(), next())).collect();
            let mut f = Front::default();
            for (i, p) in pts.iter().enumerate() {
                f.add(p.0, p.1, i);
            }
            let mut kept = f.points.clone();
            kept.sort_by_key(|p| p.2);
            let xy: Vec<(f64, f64)> = kept.iter().map(|p| (p.0, p.1)).collect();
            let streamed: Vec<usize> = front(&xy, false, false)
                .iter()
                .map(|&k| kept[k].2)
                .collect();
            assert_eq!(streamed, front(&pts, false, false));
        }
    }
}
