//! `hole-spacing`: drilled holes, edge to edge.
//!
//! **What it checks.** For every pair of holes (vias and terminal pads), the
//! distance between the hole walls, `|c1 - c2| - (drill1 + drill2) / 2`, is
//! at least the profile's `min_hole_spacing`.
//!
//! **Why it matters.** A thin web of laminate between two holes cracks
//! while drilling or plating, and the plating of the two barrels can bridge
//! through it; in a coil that shorts the two layer junctions and removes
//! turns.
//!
//! **Example.** Two centre vias of 0.2 mm drill whose centres are 0.4 mm
//! apart are 0.2 mm apart edge to edge; under "standard" (0.25 mm):
//! `hole-spacing error all ...: 0.200000 < 0.250000 mm [via 0, via 1]`.

use super::context::Context;
use super::{Rule, Severity, Violation};
use crate::design::LimitKey;

/// Stable id.
pub const ID: &str = "hole-spacing";

/// The limit: smallest hole-to-hole spacing, edge to edge, mm.
pub(super) const LIMIT: LimitKey = LimitKey {
    name: "min_hole_spacing",
    zero_allowed: true,
    doc: "smallest hole-to-hole spacing, edge to edge",
};

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "hole edge to hole edge",
    limit: Some(LIMIT),
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let req = ctx.profile.min(&LIMIT);
    for (a, b, gap, at) in ctx.close_hole_pairs(|h| h.drill, req) {
        out.push(Violation {
            rule: ID,
            severity: RULE.severity,
            measured: gap,
            required: req,
            layer: None,
            at,
            items: vec![a.item, b.item],
            message: format!("holes {gap:.4} mm apart wall to wall"),
        });
    }
}
