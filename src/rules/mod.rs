//! Fab rule check on the generated copper (what will be made, not the
//! parameters). Violations are data; the command line renders them.
//!
//! [`check`] measures a [`Board`] against a [`Profile`] and returns every
//! [`Violation`], sorted. One file per rule; each has a stable id:
//!
//! | id | checks | severity |
//! |---|---|---|
//! | `trace-width` | narrowest track per layer | error |
//! | `clearance` | copper to copper on a layer, not neighbours along the conductor (turn to turn) | error |
//! | `via-clearance` | via or pad to copper of layers it does not join | error |
//! | `pad-lead-clearance` | via or pad to copper of layers it joins, away from its own lead | error |
//! | `via-via-clearance` | pad copper of two holes | error |
//! | `drill` | smallest finished hole | error |
//! | `annular-ring` | (pad diameter - drill) / 2 | error |
//! | `hole-spacing` | hole edge to hole edge | error |
//! | `edge-clearance` | copper to board edge | error |
//! | `centre-room` | free centre against what the centre holes need | error |
//! | `bend-radius` | requested flex bend against the finished thickness | warning |
//!
//! Distances are exact on the true primitives (lines and arcs, see
//! `distance.rs`); a value fails when it is more than [`TOLERANCE`] (1 nm)
//! below the requirement. Candidate pairs come from a sorted index per layer in
//! polar coordinates about the coil axis (`context.rs`); [`check_with`]
//! with [`Broadphase::AllPairs`] is the brute-force oracle it is tested
//! against.
//!
//! # Adding a rule
//! Add `src/rules/<name>.rs` with a module doc in three parts (what it
//! checks, why it matters on a real board, an example), `pub const ID`,
//! `fn check(ctx: &Context, out: &mut Vec<Violation>)` and a
//! `pub(super) const RULE: Rule` naming them; if the rule has a limit, a
//! `LIMIT: LimitKey` in the rule (read it with `ctx.profile.min(&LIMIT)`).
//! Then add one line to [`RULES`]. Everything else derives from that list:
//! [`check_with`] runs the rules in its order, rule profile files must set
//! every limit, a design may override each under `[rules]`, and a sweep may
//! vary it as `rules.<limit>`. Add a fixture that breaks it exactly once
//! and one at the limit to `tests/suite/rules.rs`, and the limit to the
//! built-in profiles (`templates/rules/*.toml`) and README's key table.
//!
//! # Units
//! Millimetres.

mod annular_ring;
mod bend_radius;
mod centre_room;
mod clearance;
mod context;
mod distance;
mod drill;
mod edge_clearance;
mod group;
mod hole_spacing;
mod pad_lead_clearance;
mod profile;
mod trace_width;
mod via_clearance;
mod via_via_clearance;

pub use context::{ADJACENT_PITCHES, Broadphase, TOLERANCE};
pub use group::{ViolationGroup, group};
pub use profile::{Profile, ProfileError};

use crate::design::{Design, LimitKey};
use crate::geometry::{Board, Point};
use context::Context;
use serde::Serialize;
use std::fmt;

/// Error or warning.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Severity {
    /// Blocks export.
    Error,
    /// Reported, does not block.
    Warning,
}

/// A piece of the layout involved in a violation (indices into the layout).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(tag = "kind", content = "index", rename_all = "snake_case")]
pub enum Item {
    /// `Board::tracks[i]`.
    Track(usize),
    /// `Board::vias[i]`.
    Via(usize),
    /// `Board::pads[i]`.
    Pad(usize),
    /// The board outline.
    Outline,
}

/// One broken rule at one place.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Violation {
    /// Stable rule id, e.g. "clearance".
    pub rule: &'static str,
    /// Error or warning.
    pub severity: Severity,
    /// What was measured, mm.
    pub measured: f64,
    /// What the rule requires, mm (a minimum).
    pub required: f64,
    /// Copper layer (1 = top), if the violation is on one layer; `None`
    /// for holes (which pass every layer) and whole-board rules.
    pub layer: Option<u8>,
    /// Where, mm: midway between the closest points for distances, the
    /// item's centre otherwise. Serialised as top-level `x` and `y`.
    #[serde(flatten)]
    pub at: Point,
    /// The items involved.
    pub items: Vec<Item>,
    /// One-line explanation.
    pub message: String,
}

impl Violation {
    /// How far short of the requirement the measurement is, mm (positive).
    pub fn shortfall(&self) -> f64 {
        self.required - self.measured
    }
}

impl fmt::Display for Violation {
    /// `rule severity layer at (x, y): measured < required mm [items]: message`,
    /// lengths to 1 nm.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let sev = match self.severity {
            Severity::Error => "error",
            Severity::Warning => "warning",
        };
        let layer = match self.layer {
            Some(l) => format!("L{l}"),
            None => "all".into(),
        };
        let items: Vec<String> = self
            .items
            .iter()
            .map(|i| match i {
                Item::Track(k) => format!("track {k}"),
                Item::Via(k) => format!("via {k}"),
                Item::Pad(k) => format!("pad {k}"),
                Item::Outline => "outline".into(),
            })
            .collect();
        write!(
            f,
            "{} {} {} at ({:.6}, {:.6}): {:.6} < {:.6} mm [{}]: {}",
            self.rule,
            sev,
            layer,
            self.at.x + 0.0,
            self.at.y + 0.0,
            self.measured,
            self.required,
            items.join(", "),
            self.message
        )
    }
}

/// One rule: its stable id, severity, summary, the limit it checks against
/// (if a profile sets one for it) and its check.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct Rule {
    /// Stable id.
    pub id: &'static str,
    /// Severity of its violations.
    pub severity: Severity,
    /// What it checks.
    pub summary: &'static str,
    /// The limit this rule owns: a key every rule profile sets and a design
    /// may override under `[rules]`. Other rules may read it too.
    pub limit: Option<LimitKey>,
    /// Measures the layout and appends what breaks the rule.
    #[serde(skip)]
    check: fn(&Context, &mut Vec<Violation>),
}

/// The rule registry: every rule, in check order (also the order of
/// violations of equal severity).
pub const RULES: &[Rule] = &[
    trace_width::RULE,
    clearance::RULE,
    via_clearance::RULE,
    pad_lead_clearance::RULE,
    via_via_clearance::RULE,
    drill::RULE,
    annular_ring::RULE,
    hole_spacing::RULE,
    edge_clearance::RULE,
    centre_room::RULE,
    bend_radius::RULE,
];

/// The limits of [`RULES`], in rule order: the length keys of a rule
/// profile, and the `[rules]` keys a design may override.
pub const LIMITS: &[LimitKey] = &limits::<{ limit_count() }>();

const fn limit_count() -> usize {
    let mut n = 0;
    let mut i = 0;
    while i < RULES.len() {
        if RULES[i].limit.is_some() {
            n += 1;
        }
        i += 1;
    }
    n
}

const fn limits<const N: usize>() -> [LimitKey; N] {
    let mut out = [LimitKey {
        name: "",
        zero_allowed: false,
        doc: "",
    }; N];
    let (mut i, mut j) = (0, 0);
    while i < RULES.len() {
        if let Some(l) = RULES[i].limit {
            out[j] = l;
            j += 1;
        }
        i += 1;
    }
    out
}

/// Checks a layout against a profile (use the design's own profile with
/// [`Profile::with_overrides`] of `design.rules.overrides`). Returns every
/// violation, sorted: errors first, then by rule, layer, items and place.
pub fn check(design: &Design, layout: &Board, profile: &Profile) -> Vec<Violation> {
    check_with(design, layout, profile, Broadphase::Index)
}

/// [`check`] with a chosen way of finding candidate pairs.
/// [`Broadphase::AllPairs`] is the brute-force oracle (quadratic; for tests).
pub fn check_with(
    design: &Design,
    layout: &Board,
    profile: &Profile,
    broadphase: Broadphase,
) -> Vec<Violation> {
    let ctx = Context::new(design, layout, profile, broadphase);
    let mut out = Vec::new();
    for rule in RULES {
        (rule.check)(&ctx, &mut out);
    }
    sort(&mut out);
    out
}

/// Sorts violations deterministically: severity, rule (check order), layer
/// (board-wide last), items, then x and y.
pub fn sort(v: &mut [Violation]) {
    let rank = |id: &str| RULES.iter().position(|r| r.id == id).unwrap_or(RULES.len());
    v.sort_by(|a, b| {
        a.severity
            .cmp(&b.severity)
            .then(rank(a.rule).cmp(&rank(b.rule)))
            .then(a.layer.unwrap_or(u8::MAX).cmp(&b.layer.unwrap_or(u8::MAX)))
            .then(a.items.cmp(&b.items))
            .then(a.at.x.total_cmp(&b.at.x))
            .then(a.at.y.total_cmp(&b.at.y))
    });
}

/// Whether there is no violation at all (not even a warning).
pub fn is_clean(v: &[Violation]) -> bool {
    v.is_empty()
}

/// Whether any violation blocks export.
pub fn has_errors(v: &[Violation]) -> bool {
    v.iter().any(|x| x.severity == Severity::Error)
}

/// The violations that block export.
pub fn errors(v: &[Violation]) -> impl Iterator<Item = &Violation> {
    v.iter().filter(|x| x.severity == Severity::Error)
}

/// The violations that are reported but do not block.
pub fn warnings(v: &[Violation]) -> impl Iterator<Item = &Violation> {
    v.iter().filter(|x| x.severity == Severity::Warning)
}

/// Whether `measured` falls short of the minimum `required` by more than
/// [`TOLERANCE`].
pub(crate) fn fails(measured: f64, required: f64) -> bool {
    measured < required - TOLERANCE
}
