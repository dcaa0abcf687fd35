//! `via-clearance`: a via or pad against copper of layers it does not join.
//!
//! **What it checks.** Vias and terminal pads are plated through holes:
//! they pass every layer, and their pad is taken to be on every layer. On
//! each layer a hole does not join, the gap from its pad edge to every
//! track edge (`distance from the centre to the track centre line - D/2 -
//! width/2`) is at least the profile's `min_clearance`. One violation per
//! hole and track, at the closest point. A surface pad (`[terminal]`
//! `kind = "smd"`) has copper on its own layer only and is left out here;
//! on its own layer `pad-lead-clearance` checks it (as the circle about its
//! corners, conservatively) and `via-via-clearance` measures its rectangle
//! against the via beside it.
//!
//! **Why it matters.** A track of another layer that touches the barrel or
//! pad of a via is connected to it: in a coil that shorts a junction
//! between two layers to the middle of a third layer's winding, skipping
//! turns (or whole layers).
//!
//! **Example.** Terminal 2 of the four-layer sample (it joins layer 4)
//! moved 0.02 mm towards the axis, over layer 3's outer lead:
//! `via-clearance error L3 at (-8.868100, -5.120000): 0.080000 < 0.100000
//! mm [track 49, pad 1]`.

use super::context::{Context, Hole};
use super::distance::{Closest, point_segment};
use super::{Item, Rule, Severity, Violation, fails};
use std::collections::BTreeMap;

/// Stable id.
pub const ID: &str = "via-clearance";

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "via or pad to copper of layers it does not join",
    limit: None,
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    // A surface pad has copper on its own layer only: nothing to meet on
    // the others.
    for h in ctx.holes.iter().filter(|h| h.rect.is_none()) {
        for layer in 1..=ctx.layers {
            if !h.joins.contains(&layer) {
                report(ctx, h, layer, &[], ID, RULE.severity, out);
            }
        }
    }
}

/// Checks one hole against the tracks of one layer, leaving out the parts
/// of paths given in `exclude` as (path, from, to) positions along the path,
/// and pushes one violation per failing track.
pub(super) fn report(
    ctx: &Context,
    h: &Hole,
    layer: u8,
    exclude: &[(usize, f64, f64)],
    rule: &'static str,
    severity: Severity,
    out: &mut Vec<Violation>,
) {
    let req = ctx.profile.min(&super::clearance::LIMIT);
    let r = h.diameter / 2.0;
    let reach = r + req + ctx.max_hw_on(layer) + 1e-9;
    let mut worst: BTreeMap<usize, Closest> = BTreeMap::new();
    for j in ctx.near(layer, &ctx.point_box(layer, h.at), reach) {
        let p = &ctx.pieces[j];
        // The parts of the piece outside every excluded interval.
        let mut parts = vec![(p.s0, p.s1)];
        for &(path, x0, x1) in exclude {
            if path != p.path {
                continue;
            }
            parts = parts
                .into_iter()
                .flat_map(|(a, b)| {
                    let mut keep = Vec::with_capacity(2);
                    if a < x0 {
                        keep.push((a, b.min(x0)));
                    }
                    if b > x1 {
                        keep.push((a.max(x1), b));
                    }
                    keep
                })
                .collect();
        }
        for (a, b) in parts {
            let seg = if (a, b) == (p.s0, p.s1) {
                p.seg
            } else {
                p.between(a, b)
            };
            let c = point_segment(h.at, &seg);
            if fails(c.d - r - p.hw, req) {
                worst
                    .entry(p.track)
                    .and_modify(|w| *w = w.min(c))
                    .or_insert(c);
            }
        }
    }
    for (t, c) in worst {
        let track = &ctx.layout.tracks[t];
        let gap = c.d - r - track.width / 2.0;
        let at = match (c.b - c.a).normalized() {
            Some(u) => c.a + u * (r + gap / 2.0),
            None => c.a,
        };
        let what = match h.item {
            Item::Pad(_) => "pad",
            _ => "via",
        };
        out.push(Violation {
            rule,
            severity,
            measured: gap,
            required: req,
            layer: Some(layer),
            at,
            items: vec![Item::Track(t), h.item],
            message: if rule == ID {
                format!("{what} is {gap:.4} mm from copper of a layer it does not join")
            } else {
                format!("{what} is {gap:.4} mm from its own layer's copper away from its lead")
            },
        });
    }
}
