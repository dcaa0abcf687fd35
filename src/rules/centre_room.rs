//! `centre-room`: room in the free centre for the centre vias and pad.
//!
//! **What it checks.** The free centre of the coil, measured on the layout
//! as the diameter of the largest circle about the axis that no winding
//! track (role `Winding`, any layer) enters, is at least what the holes in
//! the centre need: `2 x (largest |centre| + D/2 over centre vias and
//! pads + min_clearance)`. One violation at most, in the direction of the
//! hole that reaches farthest out.
//!
//! **Why it matters.** Every layer's winding passes around the centre vias
//! and those vias pass through every layer; if the centre is too small the
//! innermost turns of some layer run into a via (a short that removes turns)
//! or the generator has no room for the centre leads. The fix is a larger
//! inner diameter or fewer layers in series, which this rule states as a
//! single number, where the clearance rules list every touching pair.
//!
//! **Example.** A one-layer coil ends on a 0.8 mm terminal pad on the axis,
//! which needs 2 x (0.4 + 0.1) = 1.0 mm; with a 0.98 mm free centre:
//! `centre-room error all at (0.490000, 0.000000): 0.980000 < 1.000000 mm
//! [track 22, pad 1]`.

use super::context::Context;
use super::{Item, Rule, Severity, Violation, fails};
use crate::geometry::{Place, Point, TrackRole, Vec2};

/// Stable id.
pub const ID: &str = "centre-room";

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "free centre against what the centre vias and pad need",
    limit: None,
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    // Each placed coil about its own axis (a design alone: one coil at the
    // origin).
    for c in &ctx.layout.coils {
        check_coil(ctx, c, out);
    }
}

fn check_coil(ctx: &Context, c: &crate::geometry::PlacedCoil, out: &mut Vec<Violation>) {
    let l = ctx.layout;
    let axis = c.position.to_vec2();
    let local = |p: Point| p - axis;
    let centre = l.vias[c.vias.clone()]
        .iter()
        .zip(c.vias.clone())
        .filter(|(v, _)| v.place == Place::Centre)
        .map(|(v, i)| (Item::Via(i), v.at, v.diameter))
        .chain(
            l.pads[c.pads.clone()]
                .iter()
                .zip(c.pads.clone())
                .filter(|(p, _)| p.place == Place::Centre)
                .map(|(p, i)| (Item::Pad(i), p.at, p.diameter)),
        )
        .map(|(item, at, d)| (item, local(at), local(at).radius() + d / 2.0))
        .max_by(|a, b| a.2.total_cmp(&b.2).then(b.0.cmp(&a.0)));
    let Some((hole, at, reach)) = centre else {
        return;
    };
    let free = l.tracks[c.tracks.clone()]
        .iter()
        .zip(c.tracks.clone())
        .filter(|(t, _)| t.role == TrackRole::Winding)
        .map(|(t, i)| (i, t.segment.distance(c.position) - t.width / 2.0))
        .min_by(|a, b| a.1.total_cmp(&b.1).then(a.0.cmp(&b.0)));
    let Some((track, free)) = free else {
        return;
    };
    let measured = 2.0 * free.max(0.0);
    let required = 2.0 * (reach + ctx.profile.min(&super::clearance::LIMIT));
    if fails(measured, required) {
        let dir = at.to_vec2().normalized().unwrap_or(Vec2::new(1.0, 0.0));
        out.push(Violation {
            rule: ID,
            severity: RULE.severity,
            measured,
            required,
            layer: None,
            at: c.position + dir * free.max(0.0),
            items: vec![Item::Track(track), hole],
            message: format!(
                "free centre {measured:.4} mm across; the centre holes need {required:.4} mm"
            ),
        });
    }
}
