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
use super::{RuleInfo, Severity, Violation, fails};

/// Stable id.
pub const ID: &str = "drill";

pub(super) const INFO: RuleInfo = RuleInfo {
    id: ID,
    severity: Severity::Error,
    summary: "smallest finished hole of vias and pads",
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let req = ctx.profile.min_drill;
    for h in &ctx.holes {
        if fails(h.drill, req) {
            out.push(Violation {
                rule: ID,
                severity: INFO.severity,
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
