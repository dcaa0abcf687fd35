//! Fab rule check on the generated copper (what will be made, not the
//! parameters). Violations are data; the command line renders them.
//!
//! (Skeleton: the rules themselves land with the rule-check issue.)

use crate::geometry::{Layout, Point};
use crate::spec::Design;
use serde::Serialize;

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
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", content = "index", rename_all = "snake_case")]
pub enum Item {
    /// `Layout::tracks[i]`.
    Track(usize),
    /// `Layout::vias[i]`.
    Via(usize),
    /// `Layout::pads[i]`.
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
    /// What the rule requires, mm.
    pub required: f64,
    /// Copper layer (1 = top), if the violation is on one layer.
    pub layer: Option<u8>,
    /// Where, mm.
    pub at: Point,
    /// The items involved.
    pub items: Vec<Item>,
    /// One-line explanation.
    pub message: String,
}

/// Checks a layout against the design's fab rules.
pub fn check(_design: &Design, _layout: &Layout) -> Vec<Violation> {
    Vec::new()
}
