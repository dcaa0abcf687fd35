//! Points, displacements, rectangles and the two track primitives:
//! straight lines and true circular arcs, with what every stage asks of
//! them in one place: the point at a parameter, a sub-segment over a
//! parameter range, the nearest point to a given point (with its
//! parameter), distance to a point, bounding box, flattening.
//!
//! Everything is exact (closed forms, no iteration) except
//! [`Segment::flatten`], which takes its chord tolerance as an argument.
//!
//! # Units
//! Millimetres, in a right-handed frame seen from the top of the board:
//! x to the right, y up (the Gerber convention). Exporters whose consumer has
//! y down (KiCad, SVG) flip y themselves. Angles are radians, counter-clockwise
//! positive.

mod arc;
mod line;
mod point;
mod rect;
mod segment;

pub use arc::Arc;
pub use line::Line;
pub use point::{Point, Vec2};
pub use rect::Rect;
pub use segment::Segment;

/// The point of a centre line nearest to a given point: [`Segment::nearest`].
///
/// Exact (no iteration): the foot of the perpendicular on a line, the radial
/// projection onto an arc's circle, or an end point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Nearest {
    /// The nearest point, mm: an end point exactly when the nearest point is
    /// an end.
    pub point: Point,
    /// Its parameter: fraction along the segment, 0 at the start, 1 at the end.
    pub t: f64,
    /// Whether the given point lies within the segment's span (its
    /// perpendicular foot falls on a line; its direction from an arc's
    /// centre lies within the sweep), rather than beyond an end.
    pub interior: bool,
}

/// Number of chords for an arc of `radius` and `sweep` (radians, magnitude)
/// so that the sagitta stays within `tolerance` (mm).
pub fn arc_steps(radius: f64, sweep: f64, tolerance: f64) -> usize {
    if radius <= tolerance || sweep == 0.0 {
        return 1;
    }
    let max_step = 2.0 * (1.0 - tolerance / radius).clamp(-1.0, 1.0).acos();
    ((sweep / max_step).ceil() as usize).clamp(1, 100_000)
}

/// Signed angle from `a` to `b`, radians in (-pi, pi].
pub fn angle_between(a: Vec2, b: Vec2) -> f64 {
    a.cross(b).atan2(a.dot(b))
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::{PI, TAU};

    fn near(a: f64, b: f64, eps: f64) {
        assert!((a - b).abs() <= eps, "{a} vs {b}");
    }

    #[test]
    fn arc_end_is_rotation_of_start() {
        let a = Arc::from_start(Point::new(1.0, 0.0), Point::new(3.0, 0.0), PI / 2.0);
        near(a.end.x, 1.0, 1e-12);
        near(a.end.y, 2.0, 1e-12);
        near(Segment::Arc(a).length(), PI, 1e-12);
    }

    #[test]
    fn mirrored_arc_reverses_sense() {
        let a = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(1.0, 0.0), 1.0));
        let m = a.mirrored();
        near(m.end().y, -(1.0f64.sin()), 1e-12);
        near(a.swept_about_origin(), 1.0, 1e-12);
        near(m.swept_about_origin(), -1.0, 1e-12);
    }

    #[test]
    fn swept_angle_with_axis_near_the_circle() {
        // Found by the rule check's tests: the axis 0.0 mm from nothing but
        // close to the circle; the sweep about the origin must follow the
        // arc point by point.
        let c = Point::new(1.35836, 0.33827);
        let a = Arc::from_start(c, c + Vec2::new(1.472, 0.0), 5.207);
        let exact: f64 = {
            let n = 200_000;
            (0..n)
                .map(|i| {
                    let p = a.point_at(i as f64 / n as f64).to_vec2();
                    let q = a.point_at((i + 1) as f64 / n as f64).to_vec2();
                    angle_between(p, q)
                })
                .sum()
        };
        near(Segment::Arc(a).swept_about_origin(), exact, 1e-9);
    }

    #[test]
    fn swept_angle_closed_form_matches_stepping() {
        // Arcs with the axis inside, outside and near the circle, against
        // the sum of the angles of 20,000 small steps along the arc.
        let mut rnd = crate::numeric::test_uniform(7);
        for _ in 0..300 {
            let c = Point::new(4.0 * rnd() - 2.0, 4.0 * rnd() - 2.0);
            let r = 0.05 + 3.0 * rnd();
            let a0 = TAU * rnd();
            let sweep = (2.0 * rnd() - 1.0) * 6.2;
            let a = Arc::from_start(c, c + Vec2::from_angle(a0) * r, sweep);
            let gap = (c.to_vec2().length() - r).abs();
            if gap < 1e-2 {
                continue;
            }
            let n = 20_000;
            let stepped: f64 = (0..n)
                .map(|i| {
                    let p = a.point_at(i as f64 / n as f64).to_vec2();
                    let q = a.point_at((i + 1) as f64 / n as f64).to_vec2();
                    angle_between(p, q)
                })
                .sum();
            near(Segment::Arc(a).swept_about_origin(), stepped, 1e-9);
        }
    }

    #[test]
    fn flatten_respects_tolerance() {
        let a = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(10.0, 0.0), PI));
        let pts = a.flatten(0.001);
        for w in pts.windows(2) {
            let mid = w[0].midpoint(w[1]);
            assert!(10.0 - mid.radius() <= 0.001 + 1e-12);
        }
    }

    #[test]
    fn point_segment_distance() {
        let a = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(2.0, 0.0), PI));
        near(a.distance(Point::new(0.0, 3.0)), 1.0, 1e-12);
        near(a.distance(Point::new(0.0, -3.0)), 13f64.sqrt(), 1e-12);
        near(a.distance(Point::ORIGIN), 2.0, 1e-12);
        let l = Segment::line(Point::new(0.0, 0.0), Point::new(2.0, 0.0));
        near(l.distance(Point::new(1.0, 1.0)), 1.0, 1e-12);
        near(l.distance(Point::new(3.0, 0.0)), 1.0, 1e-12);
    }

    #[test]
    fn nearest_points_and_parameters() {
        let a = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(2.0, 0.0), PI));
        let n = a.nearest(Point::new(0.0, 3.0));
        assert!(n.interior);
        near(n.t, 0.5, 1e-12);
        near(n.point.x, 0.0, 1e-12);
        near(n.point.y, 2.0, 1e-12);
        assert_eq!(a.nearest_point(Point::new(0.0, 3.0)), n.point);
        // Beyond the span: the nearer end, exactly.
        let e = a.nearest(Point::new(-3.0, -1.0));
        assert!(!e.interior);
        assert_eq!((e.point, e.t), (a.end(), 1.0));
        // Clockwise arcs measure the parameter along their own sense.
        let c = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(2.0, 0.0), -PI));
        near(c.nearest(Point::new(0.0, -3.0)).t, 0.5, 1e-12);
        let l = Segment::line(Point::new(0.0, 0.0), Point::new(4.0, 0.0));
        let m = l.nearest(Point::new(1.0, 5.0));
        assert!(m.interior);
        near(m.t, 0.25, 1e-12);
        let past = l.nearest(Point::new(9.0, 1.0));
        assert!(!past.interior);
        assert_eq!(past.t, 1.0);
    }

    #[test]
    fn subsegments_and_moved_starts() {
        let a = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(1.0, 0.0), -2.0));
        let p = a.subsegment(0.25..0.5);
        assert!(p.start().distance(a.point_at(0.25)) < 1e-12);
        assert!(p.end().distance(a.point_at(0.5)) < 1e-12);
        near(p.length(), 0.5, 1e-12);
        let l = Segment::line(Point::new(0.0, 0.0), Point::new(4.0, 2.0));
        let q = l.subsegment(0.5..1.0);
        assert_eq!(q.start(), Point::new(2.0, 1.0));
        let moved = q.with_start(Point::new(2.0, 1.5));
        assert_eq!(
            (moved.start(), moved.end()),
            (Point::new(2.0, 1.5), l.end())
        );
        let b = a.with_start(Point::new(0.0, 1.0));
        near(
            b.end().distance(Point::new(0.0, 1.0).rotated(-2.0)),
            0.0,
            1e-12,
        );
    }

    #[test]
    fn arc_bounding_box_holds_the_axis_extremes() {
        let a = Segment::Arc(Arc::from_start(Point::ORIGIN, Point::new(1.0, -1.0), 2.0));
        let b = a.bounding_box();
        near(b.max.x, 2f64.sqrt(), 1e-12);
        for i in 0..=100 {
            let p = a.point_at(i as f64 / 100.0);
            assert!(b.inflate(1e-12).contains(p));
        }
    }
}
