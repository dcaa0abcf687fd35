//! `clearance`: copper to copper on one layer, turn to turn.
//!
//! **What it checks.** On every layer, the gap between the edges of two
//! tracks (centre-line distance minus both half widths; tracks have round
//! ends) is at least the profile's `min_clearance`, for every pair of
//! points that are not neighbours along the conductor. Two points of the
//! same winding are neighbours when they are less than
//! [`ADJACENT_PITCHES`](super::ADJACENT_PITCHES) `x (width + clearance)`
//! apart along it (measured in quarter cells of that length from the
//! winding's start, see `context.rs`); tracks of different windings, and
//! tracks in no winding, are never neighbours. One violation per pair of
//! tracks, at the closest points.
//!
//! Tracks of one bus of an array (one electrical node between coils) may
//! touch each other.
//!
//! **Why it matters.** The coil is a single net, so an ordinary design rule
//! check sees nothing wrong when neighbouring turns touch; but a short
//! between turns bypasses every turn between the two points: the coil
//! loses turns, inductance and force, and the bypassed loop carries
//! induced current.
//!
//! **Example.** A 0.1/0.099 mm coil (0.099 mm between turns) checked
//! against "standard" (0.1 mm): `clearance error L1 at (9.840500, 0.000000):
//! 0.099000 < 0.100000 mm [track 2, track 4]`, and so on for each pair of
//! neighbouring turns.

use super::context::{ADJACENT_CELLS, Context, Piece};
use super::distance::{Closest, segment_segment};
use super::{Item, Rule, Severity, Violation, fails};
use crate::design::LimitKey;
use crate::geometry::Segment;
use std::collections::BTreeMap;

/// Stable id.
pub const ID: &str = "clearance";

/// The limit: smallest copper-to-copper gap, mm.
pub(super) const LIMIT: LimitKey = LimitKey {
    name: "min_clearance",
    zero_allowed: false,
    doc: "smallest copper-to-copper gap",
};

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "copper to copper on a layer, turn to turn",
    limit: Some(LIMIT),
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let req = ctx.profile.min(&LIMIT);
    // (track a, track b) -> closest failing approach.
    let mut worst: BTreeMap<(usize, usize), Closest> = BTreeMap::new();
    for layer in 1..=ctx.layers {
        let reach = req + ctx.max_hw_on(layer) + 1e-9;
        let mut near = Vec::new();
        for &i in ctx.on_layer(layer) {
            let a = &ctx.pieces[i];
            ctx.near_into(layer, &a.polar, reach + a.hw, &mut near);
            for &j in &near {
                if j < i {
                    continue;
                }
                let b = &ctx.pieces[j];
                // Two arcs are at least |r1 - r2| - |c1 - c2| apart (each
                // point of one is r1 from its centre, each of the other
                // within |c1 - c2| of r2 from it): neighbouring turns about
                // one centre are settled without the exact distance.
                if let (Segment::Arc(x), Segment::Arc(y)) = (&a.seg, &b.seg) {
                    let bound = (x.radius() - y.radius()).abs() - x.center.distance(y.center);
                    if !fails(bound - a.hw - b.hw, req) {
                        continue;
                    }
                }
                // Copper of one bus net may touch itself: it is one node,
                // with no turns to bypass.
                if a.path != b.path && same_bus(ctx, a.track, b.track) {
                    continue;
                }
                let thr = req + a.hw + b.hw;
                let Some(c) = non_adjacent(ctx, a, b, thr) else {
                    continue;
                };
                if !fails(c.d - a.hw - b.hw, req) {
                    continue;
                }
                let (key, c) = if a.track <= b.track {
                    ((a.track, b.track), c)
                } else {
                    (
                        (b.track, a.track),
                        Closest {
                            d: c.d,
                            a: c.b,
                            b: c.a,
                        },
                    )
                };
                worst.entry(key).and_modify(|w| *w = w.min(c)).or_insert(c);
            }
        }
    }
    // Where tracks meet (a junction of two arcs), several pairs share one
    // closest place: report it once, for the first pair.
    let mut seen = std::collections::BTreeSet::new();
    for ((ta, tb), c) in worst {
        let (a, b) = (&ctx.layout.tracks[ta], &ctx.layout.tracks[tb]);
        let gap = c.d - a.width / 2.0 - b.width / 2.0;
        let mid = c.a.midpoint(c.b);
        let place = (
            a.layer,
            (mid.x * 1e6).round() as i64,
            (mid.y * 1e6).round() as i64,
        );
        if !seen.insert(place) {
            continue;
        }
        out.push(Violation {
            rule: ID,
            severity: RULE.severity,
            measured: gap,
            required: req,
            layer: Some(a.layer),
            at: mid,
            items: if ta == tb {
                vec![Item::Track(ta)]
            } else {
                vec![Item::Track(ta), Item::Track(tb)]
            },
            message: format!("tracks {gap:.4} mm apart edge to edge; a short here bypasses turns"),
        });
    }
}

/// Whether tracks `a` and `b` both belong to one bus of an array.
fn same_bus(ctx: &Context, a: usize, b: usize) -> bool {
    let l = ctx.layout;
    if l.buses.is_empty() {
        return false;
    }
    matches!((l.bus_of_track(a), l.bus_of_track(b)), (Some(x), Some(y)) if x == y)
}

/// The closest approach of two pieces over the pairs of points that are
/// not neighbours along the conductor, or `None` if there is none closer
/// than `thr` (centre-line distance) or every pair is a neighbour pair.
pub(super) fn non_adjacent(ctx: &Context, a: &Piece, b: &Piece, thr: f64) -> Option<Closest> {
    if a.path != b.path {
        return Some(segment_segment(&a.seg, &b.seg));
    }
    let (a, b) = if a.s0 <= b.s0 { (a, b) } else { (b, a) };
    let p = ctx.paths[a.path];
    let g = p.cell;
    let cell = |s: f64| (s / g).floor() as i64;
    let (ka0, ka1, kb0, kb1) = (cell(a.s0), cell(a.s1), cell(b.s0), cell(b.s1));
    const K: i64 = ADJACENT_CELLS;
    if kb0 - ka1 > K {
        return Some(segment_segment(&a.seg, &b.seg));
    }
    if kb1 - ka0 <= K {
        return None;
    }
    // Schur's comparison theorem (A. Schur 1921; do Carmo, Differential
    // Geometry of Curves and Surfaces, 1976, sec. 5-7): on a path without
    // corners whose radius of curvature is at least R everywhere, two
    // points s apart along it (s <= 2 pi R) are at least the chord
    // 2 R sin(s / 2R) of a circle of radius R apart. Points that are not
    // neighbours are between the adjacency length and the two pieces'
    // span apart along the path, and the chord, concave in s, is smallest
    // at one of those two ends: if both clear `thr`, no pair can fail.
    if let Some(r) = ctx.smooth_radius(a.track, b.track) {
        let span = b.s1 - a.s0;
        let chord = |s: f64| {
            if r.is_finite() {
                2.0 * r * (s / (2.0 * r)).sin()
            } else {
                s
            }
        };
        if span <= std::f64::consts::TAU * r
            && chord(p.adjacent.min(span)) >= thr
            && chord(span) >= thr
        {
            return None;
        }
    }
    let mut best: Option<Closest> = None;
    let mut take = |c: Closest| best = Some(best.map_or(c, |x| x.min(c)));
    // Cells of `a` that are far from every point of `b`, as one piece.
    let far_end = ((kb0 - K) as f64 * g).min(a.s1);
    let mut k = ka0;
    if far_end > a.s0 && kb0 - K > ka0 {
        take(segment_segment(&a.between(a.s0, far_end), &b.seg));
        k = kb0 - K;
    }
    while k <= ka1 {
        let kb_min = k + K + 1;
        if kb_min > kb1 {
            break;
        }
        let sa0 = a.s0.max(k as f64 * g);
        let sa1 = a.s1.min((k + 1) as f64 * g);
        let sb0 = b.s0.max(kb_min as f64 * g);
        if sa0 <= sa1 && sb0 <= b.s1 {
            take(segment_segment(&a.between(sa0, sa1), &b.between(sb0, b.s1)));
        }
        k += 1;
    }
    best
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::geometry::{Arc, Node, Point, Track, TrackRole, Vec2, Winding};
    use crate::rules::{Broadphase, Profile};
    use proptest::prelude::*;

    /// A smooth chain of arcs (each starts where the last ends, in the same
    /// direction), as `(radius, signed sweep)`, from the origin heading +x.
    fn chain(arcs: &[(f64, f64)]) -> Vec<Segment> {
        let (mut at, mut dir) = (Point::new(0.0, 0.0), Vec2::new(1.0, 0.0));
        arcs.iter()
            .map(|&(r, sweep)| {
                // The centre is on the left of the heading for a
                // counter-clockwise arc, on the right otherwise.
                let centre = at + dir.perp() * (r * sweep.signum());
                let arc = Arc::from_start(centre, at, sweep);
                let seg = Segment::Arc(arc);
                at = arc.end;
                dir = seg.end_direction().expect("an arc has a direction");
                seg
            })
            .collect()
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

        /// On smooth paths that bend back on themselves (tight arcs, both
        /// senses, up to almost a full turn each) the rule finds a short
        /// exactly where dense sampling of the centre line does: points
        /// more than `ADJACENT_CELLS` cells apart along the path closer
        /// than the clearance plus the width. This covers the shortcut
        /// by Schur's theorem and the cell-by-cell search.
        #[test]
        fn smooth_paths_match_dense_sampling(
            arcs in proptest::collection::vec((0.12..1.0f64, 0.3..6.0f64, any::<bool>()), 1..4)
        ) {
            let arcs: Vec<(f64, f64)> =
                arcs.iter().map(|&(r, s, ccw)| (r, if ccw { s } else { -s })).collect();
            let segs = chain(&arcs);
            let (d, mut l) = crate::pipeline::parse_and_build(
                "name = \"t\"\n[coil]\nouter_diameter = \"10mm\"\nturns = 2\n\
                 trace_width = \"0.15mm\"\nclearance = \"0.1mm\"\nlayers = 1\n",
            )
            .expect("base design");
            let width = 0.15;
            l.tracks = segs
                .iter()
                .map(|&segment| Track { layer: 1, segment, width, role: TrackRole::Winding })
                .collect();
            l.vias.clear();
            l.pads.clear();
            l.windings = vec![Winding {
                tracks: (0, segs.len()),
                from: Node::Pad(0),
                to: Node::Pad(1),
                ..l.windings[0].clone()
            }];
            let p = Profile::builtin("standard").expect("built-in");
            let ctx = Context::new(&d, &l, &p, Broadphase::Index);
            let mut out = Vec::new();
            check(&ctx, &mut out);
            let found = out.iter().map(|v| v.measured).fold(f64::INFINITY, f64::min);

            // Dense sampling, 2 um along the path.
            let g = ctx.paths[0].cell;
            let mut pts = Vec::new();
            let mut s0 = 0.0;
            for seg in &segs {
                let len = seg.length();
                let n = (len / 2e-3).ceil() as usize;
                for i in 0..=n {
                    let t = i as f64 / n as f64;
                    pts.push((s0 + len * t, seg.point_at(t)));
                }
                s0 += len;
            }
            let mut best = f64::INFINITY;
            for (i, &(si, pi)) in pts.iter().enumerate() {
                for &(sj, pj) in &pts[i + 1..] {
                    if (sj / g).floor() as i64 - (si / g).floor() as i64 > ADJACENT_CELLS {
                        best = best.min(pi.distance(pj));
                    }
                }
            }
            let gap = best - width;
            let req = p.min(&LIMIT);
            if gap < req - 2e-3 {
                prop_assert!(found <= gap + 1e-3, "{arcs:?}: sampled {gap}, rule {found}");
            } else if gap > req + 2e-3 {
                prop_assert!(out.is_empty(), "{arcs:?}: sampled {gap}, rule {found}");
            }
        }
    }
}
