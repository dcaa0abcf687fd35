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
use super::{Rule, Severity, Violation, fails};
use crate::design::LimitKey;

/// Stable id.
pub const ID: &str = "annular-ring";

/// The limit: smallest annular ring, (pad diameter - drill) / 2, mm.
pub(super) const LIMIT: LimitKey = LimitKey {
    name: "min_annular_ring",
    zero_allowed: true,
    doc: "smallest annular ring, (pad diameter - drill) / 2",
};

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "(pad diameter - drill) / 2 of vias and pads",
    limit: Some(LIMIT),
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let req = ctx.profile.min(&LIMIT);
    // Surface pads have no hole.
    for h in ctx.holes.iter().filter(|h| h.rect.is_none()) {
        let ring = (h.diameter - h.drill) / 2.0;
        if fails(ring, req) {
            out.push(Violation {
                rule: ID,
                severity: RULE.severity,
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
