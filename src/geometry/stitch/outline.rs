//! Phase 7: the board outline: the ring of outer vias grown by a pad
//! radius and the margin; for shapes with sides, a polygon whose corners are
//! cut by the circle that keeps the margin to the farthest copper.

use super::outer::OuterSlots;
use super::ring::Ring;
use crate::design::Design;
use crate::geometry::board::{Board, Outline};
use crate::geometry::{Arc, Point, Segment};
use std::f64::consts::{PI, TAU};

/// The outline of a board whose copper is placed.
pub(super) fn draw(board: &Board, design: &Design, outer: &OuterSlots) -> Outline {
    let edge = outer.via_ring.grown(outer.dmax / 2.0 + design.board.margin);
    let mut outline = Outline {
        segments: match &edge {
            Ring::Circle(r) => {
                let start = Point::new(*r, 0.0);
                vec![
                    Segment::Arc(Arc::from_start(Point::ORIGIN, start, PI)),
                    Segment::Arc(Arc {
                        center: Point::ORIGIN,
                        start: Point::new(-r, 0.0),
                        end: start,
                        sweep: PI,
                    }),
                ]
            }
            Ring::Polygon { .. } => {
                let pts: Vec<Point> = edge
                    .vertex_angles()
                    .into_iter()
                    .map(|a| edge.at(a))
                    .collect();
                // Cut the corners by a circle that keeps the margin to the
                // farthest copper: rounded-corner coils get a rounded board.
                let reach = board
                    .tracks
                    .iter()
                    .map(|t| t.segment.max_radius() + t.width / 2.0)
                    .chain(board.vias.iter().map(|v| v.at.radius() + v.diameter / 2.0))
                    .chain(board.pads.iter().map(|p| p.at.radius() + p.diameter / 2.0))
                    .fold(0.0, f64::max);
                polygon_in_disc(&pts, reach + design.board.margin)
            }
        },
    };
    // Make the first outline arc end exactly where the second starts.
    if let [Segment::Arc(a), Segment::Arc(b)] = outline.segments.as_mut_slice() {
        a.end = b.start;
    }
    outline
}

/// The boundary of a convex polygon (vertices counter-clockwise about the
/// origin) intersected with the disc of radius `r` about the origin: the
/// polygon's sides where they are inside, arcs of the circle elsewhere.
fn polygon_in_disc(pts: &[Point], r: f64) -> Vec<Segment> {
    let n = pts.len();
    // Part of each side inside the disc, as (start, end) or None.
    let clipped: Vec<Option<(Point, Point)>> = (0..n)
        .map(|i| {
            let (a, b) = (pts[i], pts[(i + 1) % n]);
            let d = b - a;
            let (qa, qb, qc) = (
                d.dot(d),
                2.0 * a.to_vec2().dot(d),
                a.to_vec2().dot(a.to_vec2()) - r * r,
            );
            let disc = qb * qb - 4.0 * qa * qc;
            if disc <= 0.0 {
                return None;
            }
            let sq = disc.sqrt();
            let t0 = ((-qb - sq) / (2.0 * qa)).max(0.0);
            let t1 = ((-qb + sq) / (2.0 * qa)).min(1.0);
            (t1 - t0 > 1e-9).then(|| (a.lerp(b, t0), a.lerp(b, t1)))
        })
        .collect();
    let inside: Vec<(Point, Point)> = clipped.iter().flatten().copied().collect();
    if inside.is_empty() {
        let start = Point::new(r, 0.0);
        let half = Segment::Arc(Arc::from_start(Point::ORIGIN, start, PI));
        let rest = Segment::Arc(Arc {
            center: Point::ORIGIN,
            start: half.end(),
            end: start,
            sweep: PI,
        });
        return vec![half, rest];
    }
    let mut out = Vec::new();
    let m = inside.len();
    for k in 0..m {
        let (a, b) = inside[k];
        let start = out.last().map(|s: &Segment| s.end()).unwrap_or(a);
        out.push(Segment::line(start, b));
        let next = inside[(k + 1) % m].0;
        if b.distance(next) > 1e-9 {
            let sweep = (next.angle() - b.angle()).rem_euclid(TAU);
            let arc = Arc::from_start(Point::ORIGIN, b, sweep);
            out.push(Segment::Arc(arc));
        }
    }
    // Close exactly onto the first point.
    let first = out[0].start();
    if let Some(last) = out.last_mut() {
        match last {
            Segment::Line(l) => l.end = first,
            Segment::Arc(a) => a.end = first,
        }
    }
    out
}
