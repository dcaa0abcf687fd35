//! `edge-clearance`: copper to the board edge.
//!
//! **What it checks.** Every track, via pad and terminal pad keeps at least
//! the profile's `min_edge_clearance` from the board outline
//! (`Board::outline`): exact distance from the track centre line (or pad
//! centre) to the outline's lines and arcs, minus the half width (or pad
//! radius). Copper outside the outline is reported with a negative
//! distance. One violation per item, at the closest point.
//!
//! **Why it matters.** Routing or punching the outline has a tolerance of
//! about a tenth of a millimetre; copper closer to the edge is cut,
//! exposed, or (on flex) starts a tear, and a cut turn opens the coil.
//!
//! **Example.** A design with a 0.2 mm board margin checked against
//! "standard" (0.3 mm): `edge-clearance error all ...: 0.200000 < 0.300000 mm
//! [pad 0, outline]` for each outer via and terminal pad.

use super::context::Context;
use super::distance::{Closest, point_segment, segment_segment};
use super::{Item, Rule, Severity, Violation, fails};
use crate::design::LimitKey;
use crate::geometry::{Point, Segment};

/// Stable id.
pub const ID: &str = "edge-clearance";

/// The limit: smallest copper-to-board-edge distance, mm.
pub(super) const LIMIT: LimitKey = LimitKey {
    name: "min_edge_clearance",
    zero_allowed: true,
    doc: "smallest copper-to-board-edge distance",
};

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "copper to board edge",
    limit: Some(LIMIT),
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let edge = &ctx.layout.outline.segments;
    if edge.is_empty() {
        return;
    }
    let req = ctx.profile.min(&LIMIT);
    // Polygons of the outline for the inside test only; the distances
    // themselves are exact. The coarse one (10 um chords) decides for
    // copper farther than 20 um from the edge, the fine one (1 nm) nearer.
    let coarse: Vec<Point> = edge.iter().flat_map(|s| s.flatten(1e-2)).collect();
    // (Flattened only when some copper comes that near: it has thousands
    // of points.)
    let fine = std::cell::OnceCell::new();
    let inside_at = |p: Point, d: f64| {
        if d > 2e-2 {
            inside(&coarse, p)
        } else {
            let f = fine.get_or_init(|| -> Vec<Point> {
                edge.iter().flat_map(|s| s.flatten(1e-6)).collect()
            });
            inside(f, p)
        }
    };
    let mut push = |item: Item, layer: Option<u8>, c: Closest, r: f64, inside: bool| {
        let gap = if inside { c.d - r } else { -(c.d + r) };
        if !fails(gap, req) {
            return;
        }
        let at = match (c.b - c.a).normalized() {
            Some(u) => c.a + u * (r + gap.max(0.0) / 2.0),
            None => c.a,
        };
        out.push(Violation {
            rule: ID,
            severity: RULE.severity,
            measured: gap,
            required: req,
            layer,
            at,
            items: vec![item, Item::Outline],
            message: if inside {
                format!("copper {gap:.4} mm from the board edge")
            } else {
                "copper outside the board outline".to_string()
            },
        });
    };
    // Every outline point is at least `r_in` from the axis; when the axis
    // is inside the outline, copper within `r_in` of it is inside too, and
    // copper at most `r` from the axis is at least `r_in - r` from the
    // edge (triangle inequality): where that already clears the rule, no
    // exact distance is needed.
    let r_in = edge
        .iter()
        .map(Segment::min_radius)
        .fold(f64::INFINITY, f64::min);
    let axis_inside = inside(&coarse, Point::new(0.0, 0.0));
    let clear = |r: f64| axis_inside && !fails(r_in - r, req);
    for (i, t) in ctx.layout.tracks.iter().enumerate() {
        if clear(t.segment.max_radius() + t.width / 2.0) {
            continue;
        }
        let c = nearest(edge, |s| segment_segment(&t.segment, s));
        let inside = c.d > 0.0 && inside_at(t.segment.point_at(0.5), c.d);
        push(Item::Track(i), Some(t.layer), c, t.width / 2.0, inside);
    }
    for h in &ctx.holes {
        if clear(h.at.radius() + h.diameter / 2.0) {
            continue;
        }
        let c = nearest(edge, |s| point_segment(h.at, s));
        push(h.item, None, c, h.diameter / 2.0, inside_at(h.at, c.d));
    }
}

fn nearest(edge: &[Segment], f: impl Fn(&Segment) -> Closest) -> Closest {
    edge.iter()
        .map(f)
        .reduce(Closest::min)
        .expect("outline is not empty")
}

/// Even-odd point in polygon.
fn inside(poly: &[Point], p: Point) -> bool {
    let mut inside = false;
    let n = poly.len();
    for i in 0..n {
        let (a, b) = (poly[i], poly[(i + 1) % n]);
        if (a.y > p.y) != (b.y > p.y) {
            let x = a.x + (p.y - a.y) / (b.y - a.y) * (b.x - a.x);
            if p.x < x {
                inside = !inside;
            }
        }
    }
    inside
}
