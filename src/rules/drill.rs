//! `drill`: the smallest finished hole.
//!
//! **What it checks.** Every via and terminal pad has a finished hole of at
//! least the profile's `min_drill`.
//!
//! **Why it matters.** Small drills break and wander, and a small hole in a
//! thick stack cannot be plated reliably (aspect ratio); a poorly plated via
//! is an open or intermittent joint between layers of the coil.
//!
//! **Example.** Vias drilled 0.15 mm under the "standard" profile (0.2 mm):
//! `drill error all at (0.275000, 0.000000): 0.150000 < 0.200000 mm [via 0]`.

use super::context::Context;
use super::{Rule, Severity, Violation, fails};
use crate::design::LimitKey;

/// Stable id.
pub const ID: &str = "drill";

/// The limit: smallest finished hole, mm.
pub(super) const LIMIT: LimitKey = LimitKey {
    name: "min_drill",
    zero_allowed: false,
    doc: "smallest finished hole",
};

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "smallest finished hole of vias and pads",
    limit: Some(LIMIT),
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let req = ctx.profile.min(&LIMIT);
    // Surface pads have no hole.
    for h in ctx.holes.iter().filter(|h| h.rect.is_none()) {
        if fails(h.drill, req) {
            out.push(Violation {
                rule: ID,
                severity: RULE.severity,
                measured: h.drill,
                required: req,
                layer: None,
                at: h.at,
                items: vec![h.item],
                message: format!("hole {} mm is below the smallest drill {req} mm", h.drill),
            });
        }
    }
}
