//! Phase 7: the board outline: the ring of outer vias grown by a pad
//! radius and the margin; for shapes with sides, a polygon whose corners are
//! cut by the circle that keeps the margin to the farthest copper.

use super::GeometryError;
use super::outer::OuterSlots;
use super::ring::Ring;
use crate::design::Design;
use crate::geometry::board::{Board, Outline};
use crate::geometry::{Arc, Point, Segment, Vec2};
use std::f64::consts::{PI, TAU};

/// The outline of a board whose copper is placed.
pub(super) fn draw(
    board: &Board,
    design: &Design,
    outer: &OuterSlots,
    tail: Option<&super::tail::TailPlan>,
) -> Result<Outline, GeometryError> {
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
    // A tail is a tab of its own width and length (it holds the
    // terminals' leads); otherwise terminals brought out (by lead_length,
    // or a surface pad beside its via) get a tab.
    if let Some(tp) = tail {
        let t = &tp.layout;
        let mut segs = outline.segments.clone();
        // Leads wider apart at the root than the strip: a wider neck
        // holds them (with the margin) up to where they run along the
        // tail, so no lead cuts the corner where the strip meets the
        // coil's board.
        if tp.neck_half > t.width / 2.0 {
            segs =
                with_tab(&segs, tp.u, tp.neck_half, tp.neck_reach).ok_or(GeometryError::LeadTab)?;
        }
        outline.segments =
            with_tab(&segs, tp.u, t.width / 2.0, t.end).ok_or(GeometryError::LeadTab)?;
    } else if design.terminal_place.lead_length > 0.0 || design.terminal_place.is_smd() {
        outline.segments = lead_tab(board, design, &outline).ok_or(GeometryError::LeadTab)?;
    }
    Ok(outline)
}

/// Grows a tab on `outline` around the terminals brought out by
/// `lead_length`: one strip about the bisector of the outside terminals'
/// directions, the board margin beyond their pads on three sides; when
/// that strip is wider than the board there, one strip per terminal.
/// `None` when neither fits the outline.
fn lead_tab(board: &Board, design: &Design, outline: &Outline) -> Option<Vec<Segment>> {
    let outside: Vec<_> = board
        .pads
        .iter()
        .filter(|p| p.place == crate::geometry::board::Place::Outside)
        .collect();
    let m = design.board.margin;
    // The strip along `u` holding `pads` with the margin.
    let strip = |segs: &[Segment], u: Vec2, pads: &[&crate::geometry::board::Pad]| {
        let v = u.perp();
        let half = pads
            .iter()
            .map(|p| p.at.to_vec2().dot(v).abs() + p.diameter / 2.0 + m)
            .fold(0.0, f64::max);
        let reach = pads
            .iter()
            .map(|p| p.at.to_vec2().dot(u) + p.diameter / 2.0 + m)
            .fold(0.0, f64::max);
        with_tab(segs, u, half, reach)
    };
    let sum = outside
        .iter()
        .filter_map(|p| p.at.to_vec2().normalized())
        .fold(Vec2::new(0.0, 0.0), |acc, u| acc + u);
    if let Some(segs) = sum
        .normalized()
        .and_then(|u| strip(&outline.segments, u, &outside))
    {
        return Some(segs);
    }
    let mut segs = outline.segments.clone();
    for p in &outside {
        segs = strip(&segs, p.at.to_vec2().normalized()?, &[*p])?;
    }
    Some(segs)
}

/// A closed counter-clockwise outline about the origin joined with the
/// strip `|x . v| <= half`, `0 <= x . u <= reach` (`v` = `u` turned a
/// quarter counter-clockwise): the outline from where it leaves the strip
/// round to where it enters it, then out along the strip's side, across
/// its end and back; the end moves further out where the outline between
/// the sides reaches beyond `reach`. `None` when the outline does not
/// cross the strip's sides ahead of the origin.
pub(super) fn with_tab(segs: &[Segment], u: Vec2, half: f64, reach: f64) -> Option<Vec<Segment>> {
    let v = u.perp();
    // Where the outline crosses the line x.v = c ahead of the axis (x.u > 0):
    // segment index and fraction, by sampling and bisection.
    let cross = |c: f64| -> Option<(usize, f64)> {
        const N: usize = 512;
        for (i, s) in segs.iter().enumerate() {
            let g = |t: f64| s.point_at(t).to_vec2().dot(v) - c;
            for k in 0..N {
                let (t0, t1) = (k as f64 / N as f64, (k + 1) as f64 / N as f64);
                if g(t0) < 0.0 && g(t1) >= 0.0 && s.point_at(t1).to_vec2().dot(u) > 0.0 {
                    let (mut lo, mut hi) = (t0, t1);
                    for _ in 0..60 {
                        let mid = 0.5 * (lo + hi);
                        if g(mid) < 0.0 { lo = mid } else { hi = mid }
                    }
                    return Some((i, hi));
                }
            }
        }
        None
    };
    let (i1, t1) = cross(-half)?;
    let (i2, t2) = cross(half)?;
    let (p1, p2) = (segs[i1].point_at(t1), segs[i2].point_at(t2));
    let n = segs.len();
    // The part replaced (from p1 to p2) must not reach beyond the strip's
    // end: the end moves out to the farthest point of it, so the tab only
    // ever adds board.
    let mut replaced = vec![segs[i1].subsegment(t1..1.0)];
    if i1 == i2 && t1 <= t2 {
        replaced = vec![segs[i1].subsegment(t1..t2)];
    } else {
        let mut i = (i1 + 1) % n;
        while i != i2 {
            replaced.push(segs[i]);
            i = (i + 1) % n;
        }
        replaced.push(segs[i2].subsegment(0.0..t2));
    }
    let reach = replaced
        .iter()
        .flat_map(|s| s.flatten(1e-4))
        .map(|p| p.to_vec2().dot(u))
        .fold(reach, f64::max);
    let mut out = Vec::new();
    let mut push = |s: Segment| {
        if s.length() > 1e-9 {
            out.push(s);
        }
    };
    // Kept part: from p2 counter-clockwise round to p1.
    if i1 == i2 && t1 > t2 {
        return None; // the strip's sides cross in the wrong order
    }
    push(segs[i2].subsegment(t2..1.0));
    let mut i = (i2 + 1) % n;
    while i != i1 {
        push(segs[i]);
        i = (i + 1) % n;
    }
    push(segs[i1].subsegment(0.0..t1));
    let c1 = p1 + u * (reach - p1.to_vec2().dot(u));
    let c2 = p2 + u * (reach - p2.to_vec2().dot(u));
    push(Segment::line(p1, c1));
    push(Segment::line(c1, c2));
    push(Segment::line(c2, p2));
    // Exact closure: each piece starts where the previous ends.
    for k in 1..out.len() {
        let prev = out[k - 1].end();
        out[k] = out[k].with_start(prev);
    }
    Some(out)
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
