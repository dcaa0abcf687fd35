//! `annular-ring`: copper left around a hole.
//!
//! **What it checks.** For every via and terminal pad, the ring
//! `(pad diameter - drill) / 2` is at least the profile's `min_annular_ring`.
//!
//! **Why it matters.** Drills land off centre by some tens of micrometres;
//! with too thin a ring the hole breaks out of its pad and the track that
//! enters the pad may be cut off from the barrel, opening the coil.
//!
//! **Example.** A via of 0.3 mm drill in a 0.45 mm pad has a 0.075 mm ring;
//! under "standard" (0.1 mm): `annular-ring error all ...: 0.075000 < 0.100000 mm [via 0]`.

use super::context::Context;
use super::{RuleInfo, Severity, Violation, fails};

/// Stable id.
pub const ID: &str = "annular-ring";

pub(super) const INFO: RuleInfo = RuleInfo {
    id: ID,
    severity: Severity::Error,
    summary: "(pad diameter - drill) / 2 of vias and pads",
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let req = ctx.profile.min_annular_ring;
    for h in &ctx.holes {
        let ring = (h.diameter - h.drill) / 2.0;
        if fails(ring, req) {
            out.push(Violation {
                rule: ID,
                severity: INFO.severity,
                measured: ring,
                required: req,
                layer: None,
                at: h.at,
                items: vec![h.item],
                message: format!(
                    "pad {} mm around a {} mm hole leaves a {ring:.4} mm ring",
                    h.diameter, h.drill
                ),
            });
        }
    }
}
