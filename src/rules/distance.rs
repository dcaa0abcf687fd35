//! Exact shortest distances between track centre lines (straight lines and
//! true circular arcs), with the closest points.
//!
//! No flattening: every distance is computed on the true primitives from the
//! finite set of candidate point pairs at which the minimum can occur (end
//! points against the other primitive, interior critical points on the line
//! through the centres or on the perpendicular from a centre, and crossings).
//!
//! # Units
//! Millimetres.

use crate::geometry::{Arc, Line, Point, Segment, Vec2};

/// The shortest distance between two primitives and where it is attained.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Closest {
    /// Distance between the centre lines, mm.
    pub d: f64,
    /// Closest point on the first primitive.
    pub a: Point,
    /// Closest point on the second primitive.
    pub b: Point,
}

impl Closest {
    fn new(a: Point, b: Point) -> Closest {
        Closest {
            d: a.distance(b),
            a,
            b,
        }
    }

    /// The same pair seen from the other primitive.
    fn swapped(self) -> Closest {
        Closest {
            d: self.d,
            a: self.b,
            b: self.a,
        }
    }

    /// The smaller of two candidates; ties broken by the coordinates so the
    /// result does not depend on the order candidates are tried in.
    pub fn min(self, o: Closest) -> Closest {
        let k = |c: &Closest| (c.d, c.a.x, c.a.y, c.b.x, c.b.y);
        let (x, y) = (k(&self), k(&o));
        let less =
            x.0.total_cmp(&y.0)
                .then(x.1.total_cmp(&y.1))
                .then(x.2.total_cmp(&y.2))
                .then(x.3.total_cmp(&y.3))
                .then(x.4.total_cmp(&y.4))
                .is_le();
        if less { self } else { o }
    }
}

/// `p` and the closest point of a segment's centre line to it
/// ([`Segment::nearest_point`]).
pub(crate) fn point_segment(p: Point, s: &Segment) -> Closest {
    Closest::new(p, s.nearest_point(p))
}

/// Shortest distance between two segments' centre lines.
pub(crate) fn segment_segment(a: &Segment, b: &Segment) -> Closest {
    match (a, b) {
        (Segment::Line(x), Segment::Line(y)) => line_line(x, y),
        (Segment::Line(x), Segment::Arc(y)) => line_arc(x, y),
        (Segment::Arc(x), Segment::Line(y)) => line_arc(y, x).swapped(),
        (Segment::Arc(x), Segment::Arc(y)) => arc_arc(x, y),
    }
}

fn ends_against(a: &Segment, b: &Segment) -> Closest {
    let c1 = point_segment(a.start(), b);
    let c2 = point_segment(a.end(), b);
    let c3 = point_segment(b.start(), a).swapped();
    let c4 = point_segment(b.end(), a).swapped();
    c1.min(c2).min(c3).min(c4)
}

fn line_line(x: &Line, y: &Line) -> Closest {
    let (p, r) = (x.start, x.end - x.start);
    let (q, s) = (y.start, y.end - y.start);
    // Proper crossing: each segment's ends strictly on both sides of the
    // other. Orientations within rounding noise of zero count as zero (the
    // end-point distances below then find the touch), so collinear and
    // nearly parallel pieces never produce a spurious crossing.
    let scale = 1e-12 * (r.length() + s.length()) * (r.length() + s.length() + (q - p).length());
    let side = |o: f64| {
        if o > scale {
            1
        } else if o < -scale {
            -1
        } else {
            0
        }
    };
    let (o1, o2) = (side(r.cross(q - p)), side(r.cross(y.end - p)));
    let (o3, o4) = (side(s.cross(p - q)), side(s.cross(x.end - q)));
    if o1 * o2 < 0 && o3 * o4 < 0 {
        let t = ((q - p).cross(s) / r.cross(s)).clamp(0.0, 1.0);
        let at = p + r * t;
        return Closest {
            d: 0.0,
            a: at,
            b: at,
        };
    }
    ends_against(&Segment::Line(*x), &Segment::Line(*y))
}

fn line_arc(l: &Line, a: &Arc) -> Closest {
    let sl = Segment::Line(*l);
    let sa = Segment::Arc(*a);
    let mut best = ends_against(&sl, &sa);
    let dir = l.end - l.start;
    let ll = dir.length();
    let r = a.radius();
    if ll.is_nan() || ll <= 0.0 {
        return best;
    }
    let u = dir * (1.0 / ll);
    // Foot of the perpendicular from the centre onto the infinite line.
    let t = (a.center - l.start).dot(u);
    let foot = l.start + u * t;
    let n = foot - a.center;
    let nl = n.length();
    if (0.0..=ll).contains(&t) {
        let nn = if nl > 0.0 { n * (1.0 / nl) } else { u.perp() };
        for sign in [1.0, -1.0] {
            let q = a.center + nn * (sign * r);
            if a.contains_direction(q - a.center) {
                best = best.min(Closest::new(foot, q));
            }
        }
    }
    // Crossings.
    if nl <= r {
        let h = (r * r - nl * nl).max(0.0).sqrt();
        for sign in [1.0, -1.0] {
            let tt = t + sign * h;
            if (0.0..=ll).contains(&tt) {
                let q = l.start + u * tt;
                if a.contains_direction(q - a.center) {
                    best = best.min(Closest { d: 0.0, a: q, b: q });
                }
            }
        }
    }
    best
}

fn arc_arc(x: &Arc, y: &Arc) -> Closest {
    let mut best = ends_against(&Segment::Arc(*x), &Segment::Arc(*y));
    let (r1, r2) = (x.radius(), y.radius());
    let cc: Vec2 = y.center - x.center;
    let dc = cc.length();
    if dc <= 1e-12 * (r1 + r2).max(1.0) {
        // Concentric: constant gap wherever the angular spans overlap.
        for u in [y.start - y.center, x.start - x.center] {
            let Some(u) = u.normalized() else { continue };
            if x.contains_direction(u) && y.contains_direction(u) {
                best = best.min(Closest::new(x.center + u * r1, y.center + u * r2));
            }
        }
        return best;
    }
    let u = cc * (1.0 / dc);
    for s1 in [1.0, -1.0] {
        let p = x.center + u * (s1 * r1);
        if !x.contains_direction(u * s1) {
            continue;
        }
        for s2 in [1.0, -1.0] {
            let q = y.center + u * (s2 * r2);
            if y.contains_direction(u * s2) {
                best = best.min(Closest::new(p, q));
            }
        }
    }
    // Crossings of the two circles.
    if dc <= r1 + r2 && dc >= (r1 - r2).abs() {
        let along = (dc * dc + r1 * r1 - r2 * r2) / (2.0 * dc);
        let h = (r1 * r1 - along * along).max(0.0).sqrt();
        let base = x.center + u * along;
        for sign in [1.0, -1.0] {
            let q = base + u.perp() * (sign * h);
            if x.contains_direction(q - x.center) && y.contains_direction(q - y.center) {
                best = best.min(Closest { d: 0.0, a: q, b: q });
            }
        }
    }
    best
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    fn near(a: f64, b: f64) {
        assert!((a - b).abs() < 1e-12, "{a} vs {b}");
    }

    /// Brute force, independent of this module: 1001 points of each centre
    /// line against the other (`Segment::distance`), and 0
    /// when chords of the two polylines cross. Chords deviate from the arcs
    /// by at most r (step)^2 / 8, about 2e-6 mm here.
    fn dense(a: &Segment, b: &Segment) -> f64 {
        let n = 1000;
        let pa: Vec<Point> = (0..=n).map(|i| a.point_at(i as f64 / n as f64)).collect();
        let pb: Vec<Point> = (0..=n).map(|i| b.point_at(i as f64 / n as f64)).collect();
        let mut best = f64::INFINITY;
        for p in &pa {
            best = best.min(b.distance(*p));
        }
        for p in &pb {
            best = best.min(a.distance(*p));
        }
        let side = |o: Point, d: Point, p: Point| (d - o).cross(p - o).signum();
        for u in pa.windows(2) {
            for v in pb.windows(2) {
                if side(u[0], u[1], v[0]) * side(u[0], u[1], v[1]) < 0.0
                    && side(v[0], v[1], u[0]) * side(v[0], v[1], u[1]) < 0.0
                {
                    return 0.0;
                }
            }
        }
        best
    }

    #[test]
    fn parallel_lines_and_crossing_lines() {
        let a = Segment::line(Point::new(0.0, 0.0), Point::new(2.0, 0.0));
        let b = Segment::line(Point::new(0.5, 0.3), Point::new(1.5, 0.3));
        near(segment_segment(&a, &b).d, 0.3);
        let c = Segment::line(Point::new(1.0, -1.0), Point::new(1.0, 1.0));
        let x = segment_segment(&a, &c);
        near(x.d, 0.0);
        near(x.a.x, 1.0);
    }

    #[test]
    fn collinear_pieces_do_not_cross() {
        // Two pieces of one long line (rounding noise in the direction).
        let a = Segment::line(
            Point::new(-1.868833333333333, 0.9812067824877696),
            Point::new(-0.9767499999999996, 1.496251335127348),
        );
        let b = Segment::line(
            Point::new(0.8074166666666671, 2.526340440406505),
            Point::new(1.6995, 3.041384993046083),
        );
        let c = segment_segment(&a, &b);
        assert!((c.d - a.end().distance(b.start())).abs() < 1e-12, "{c:?}");
    }

    #[test]
    fn concentric_arcs_keep_their_gap() {
        let a = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(2.0, 0.0), PI));
        let b = Segment::Arc(Arc::from_start(
            Point::ORIGIN,
            Point::new(0.0, 2.3),
            -PI / 4.0,
        ));
        near(segment_segment(&a, &b).d, 0.3);
        // No angular overlap: end to end.
        let c = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(0.0, -2.3), 0.5));
        let d = segment_segment(&a, &c).d;
        assert!((d - dense(&a, &c)).abs() < 1e-6, "{d}");
    }

    #[test]
    fn line_against_arc_interior_and_crossing() {
        let a = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(1.0, 0.0), PI));
        let l = Segment::line(Point::new(-3.0, 1.5), Point::new(3.0, 1.5));
        let c = segment_segment(&l, &a);
        near(c.d, 0.5);
        near(c.b.y, 1.0);
        let m = Segment::line(Point::new(-3.0, 0.5), Point::new(3.0, 0.5));
        near(segment_segment(&a, &m).d, 0.0);
        // Through the centre.
        let n = Segment::line(Point::new(0.0, -0.5), Point::new(0.0, 0.2));
        near(segment_segment(&n, &a).d, 0.8);
    }

    #[test]
    fn exact_distances_match_dense_sampling() {
        let segs = [
            Segment::Arc(Arc::from_start(
                Point::new(0.1, 0.2),
                Point::new(1.3, 0.2),
                2.0,
            )),
            Segment::Arc(Arc::from_start(
                Point::new(-0.4, 0.0),
                Point::new(-0.4, 1.1),
                -1.7,
            )),
            Segment::Arc(Arc::from_start(
                Point::new(0.6, -0.9),
                Point::new(0.6, 0.1),
                4.0,
            )),
            Segment::line(Point::new(-1.0, -1.0), Point::new(1.5, 0.4)),
            Segment::line(Point::new(0.2, 1.6), Point::new(0.9, 1.2)),
        ];
        for a in &segs {
            for b in &segs {
                let e = segment_segment(a, b).d;
                let d = dense(a, b);
                // Exact is never above the sampled value and within sampling error of it.
                assert!((e - d).abs() < 1e-5, "{a:?} {b:?}: {e} vs {d}");
            }
        }
    }

    #[test]
    fn containment_agrees_with_polar_angles() {
        for (sweep, start) in [
            (1.0, 0.3),
            (-2.5, 1.0),
            (PI, -2.0),
            (-PI, 0.5),
            (4.0, 2.0),
            (-5.5, -1.0),
        ] {
            let a = Arc::from_start(
                Point::new(0.2, -0.1),
                Point::new(0.2, -0.1) + Vec2::from_angle(start),
                sweep,
            );
            for k in 0..720 {
                let ang = k as f64 * PI / 360.0 + 1e-3;
                assert_eq!(
                    a.contains_direction(Vec2::from_angle(ang)),
                    a.contains_angle(ang),
                    "{sweep} {start} {ang}"
                );
            }
        }
    }
}
