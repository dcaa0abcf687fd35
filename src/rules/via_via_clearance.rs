//! `via-via-clearance`: the copper pads of two holes.
//!
//! **What it checks.** For every pair of plated holes (vias and terminal
//! pads), the gap between their pads, `|c1 - c2| - (D1 + D2) / 2`, is at
//! least the profile's `min_clearance`. Pads are taken to be on every layer
//! (through holes).
//!
//! **Why it matters.** The coil is one net, but two junctions that touch
//! short out every turn between them along the conductor (for two centre
//! vias, whole layers), so the coil quietly loses turns and field.
//!
//! **Example.** Two 0.45 mm via pads with centres 0.5 mm apart leave 0.05 mm;
//! under "standard" (0.1 mm):
//! `via-via-clearance error all ...: 0.050000 < 0.100000 mm [via 0, via 1]`.

use super::context::Context;
use super::{Rule, Severity, Violation};

/// Stable id.
pub const ID: &str = "via-via-clearance";

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "pad copper of two vias or terminal pads",
    limit: None,
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let req = ctx.profile.min(&super::clearance::LIMIT);
    for (a, b, gap, at) in ctx.close_hole_pairs(|h| h.diameter, req) {
        out.push(Violation {
            rule: ID,
            severity: RULE.severity,
            measured: gap,
            required: req,
            layer: None,
            at,
            items: vec![a.item, b.item],
            message: format!("pads {gap:.4} mm apart"),
        });
    }
}
