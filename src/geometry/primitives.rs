//! Points, displacements and the two track primitives: straight lines and
//! true circular arcs.
//!
//! # Units
//! Millimetres, in a right-handed frame seen from the top of the board:
//! x to the right, y up (the Gerber convention). Exporters whose consumer has
//! y down (KiCad, SVG) flip y themselves. Angles are radians, counter-clockwise
//! positive.

use std::ops::{Add, Mul, Neg, Sub};

/// A position in the board plane, millimetres.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct Point {
    /// x, mm.
    pub x: f64,
    /// y, mm (up).
    pub y: f64,
}

/// A displacement in the board plane, millimetres.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct Vec2 {
    /// x component, mm.
    pub x: f64,
    /// y component, mm.
    pub y: f64,
}

impl Point {
    /// The origin, which is the coil axis.
    pub const ORIGIN: Point = Point { x: 0.0, y: 0.0 };

    /// A point from its coordinates, mm.
    pub const fn new(x: f64, y: f64) -> Self {
        Point { x, y }
    }

    /// A point at `radius` mm from the origin in direction `angle` (radians).
    pub fn polar(radius: f64, angle: f64) -> Self {
        Point::new(radius * angle.cos(), radius * angle.sin())
    }

    /// Displacement from the origin to this point.
    pub fn to_vec2(self) -> Vec2 {
        Vec2::new(self.x, self.y)
    }

    /// Distance to another point, mm.
    pub fn distance(self, other: Point) -> f64 {
        (self - other).length()
    }

    /// Distance from the origin (the coil axis), mm.
    pub fn radius(self) -> f64 {
        self.to_vec2().length()
    }

    /// Polar angle about the origin, radians in (-pi, pi].
    pub fn angle(self) -> f64 {
        self.y.atan2(self.x)
    }

    /// This point rotated about the origin by `angle` radians (counter-clockwise).
    pub fn rotated(self, angle: f64) -> Point {
        let (s, c) = angle.sin_cos();
        Point::new(c * self.x - s * self.y, s * self.x + c * self.y)
    }

    /// This point rotated about `center` by `angle` radians.
    pub fn rotated_about(self, center: Point, angle: f64) -> Point {
        center + (self - center).rotated(angle)
    }

    /// Mirror image across the x axis (y -> -y).
    pub fn mirrored(self) -> Point {
        Point::new(self.x, -self.y)
    }

    /// Linear interpolation: `t = 0` gives `self`, `t = 1` gives `other`.
    pub fn lerp(self, other: Point, t: f64) -> Point {
        self + (other - self) * t
    }

    /// Midpoint between two points.
    pub fn midpoint(self, other: Point) -> Point {
        self.lerp(other, 0.5)
    }
}

impl Vec2 {
    /// A displacement from its components, mm.
    pub const fn new(x: f64, y: f64) -> Self {
        Vec2 { x, y }
    }

    /// Unit vector in direction `angle` radians.
    pub fn from_angle(angle: f64) -> Self {
        Vec2::new(angle.cos(), angle.sin())
    }

    /// Euclidean length, mm (`sqrt(x^2 + y^2)`: several times faster than
    /// `hypot`, and neither overflows nor loses precision at board scale).
    pub fn length(self) -> f64 {
        (self.x * self.x + self.y * self.y).sqrt()
    }

    /// Dot product, mm^2.
    pub fn dot(self, o: Vec2) -> f64 {
        self.x * o.x + self.y * o.y
    }

    /// z component of the cross product, mm^2 (positive when `o` is
    /// counter-clockwise from `self`).
    pub fn cross(self, o: Vec2) -> f64 {
        self.x * o.y - self.y * o.x
    }

    /// Direction angle, radians.
    pub fn angle(self) -> f64 {
        self.y.atan2(self.x)
    }

    /// Rotated counter-clockwise by `angle` radians.
    pub fn rotated(self, angle: f64) -> Vec2 {
        let (s, c) = angle.sin_cos();
        Vec2::new(c * self.x - s * self.y, s * self.x + c * self.y)
    }

    /// The unit vector in this direction, or `None` for a zero vector.
    pub fn normalized(self) -> Option<Vec2> {
        let l = self.length();
        (l > 0.0 && l.is_finite()).then(|| Vec2::new(self.x / l, self.y / l))
    }

    /// Rotated +90 degrees.
    pub fn perp(self) -> Vec2 {
        Vec2::new(-self.y, self.x)
    }
}

impl Sub for Point {
    type Output = Vec2;
    fn sub(self, o: Point) -> Vec2 {
        Vec2::new(self.x - o.x, self.y - o.y)
    }
}
impl Add<Vec2> for Point {
    type Output = Point;
    fn add(self, v: Vec2) -> Point {
        Point::new(self.x + v.x, self.y + v.y)
    }
}
impl Sub<Vec2> for Point {
    type Output = Point;
    fn sub(self, v: Vec2) -> Point {
        Point::new(self.x - v.x, self.y - v.y)
    }
}
impl Add for Vec2 {
    type Output = Vec2;
    fn add(self, v: Vec2) -> Vec2 {
        Vec2::new(self.x + v.x, self.y + v.y)
    }
}
impl Sub for Vec2 {
    type Output = Vec2;
    fn sub(self, v: Vec2) -> Vec2 {
        Vec2::new(self.x - v.x, self.y - v.y)
    }
}
impl Mul<f64> for Vec2 {
    type Output = Vec2;
    fn mul(self, k: f64) -> Vec2 {
        Vec2::new(self.x * k, self.y * k)
    }
}
impl Neg for Vec2 {
    type Output = Vec2;
    fn neg(self) -> Vec2 {
        Vec2::new(-self.x, -self.y)
    }
}

/// A straight track centre line from `start` to `end`.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Line {
    /// Start point, mm.
    pub start: Point,
    /// End point, mm.
    pub end: Point,
}

/// A true circular arc from `start` to `end` about `center`.
///
/// The end point is computed once from the start point by rotation, so the
/// radius is the same at both ends to floating-point precision; `sweep` is
/// signed (positive counter-clockwise, y up) and its magnitude is below 2 pi.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Arc {
    /// Centre, mm.
    pub center: Point,
    /// Start point, mm.
    pub start: Point,
    /// End point, mm.
    pub end: Point,
    /// Signed sweep angle from start to end, radians (positive = counter-clockwise).
    pub sweep: f64,
}

impl Arc {
    /// The arc about `center` that begins at `start` and sweeps `sweep` radians.
    pub fn from_start(center: Point, start: Point, sweep: f64) -> Arc {
        Arc {
            center,
            start,
            end: start.rotated_about(center, sweep),
            sweep,
        }
    }

    /// Radius, mm (measured at the start point).
    pub fn radius(&self) -> f64 {
        self.start.distance(self.center)
    }

    /// Polar angle of the start point about the centre, radians.
    pub fn start_angle(&self) -> f64 {
        (self.start - self.center).angle()
    }

    /// The point at fraction `t` (0..1) of the sweep.
    pub fn point_at(&self, t: f64) -> Point {
        self.start.rotated_about(self.center, self.sweep * t)
    }

    /// Midpoint along the arc.
    pub fn mid(&self) -> Point {
        self.point_at(0.5)
    }

    /// Whether the direction `v` (from the centre) lies within the swept
    /// span, ends included: [`Arc::contains_angle`] by cross products, no
    /// trigonometry.
    pub fn contains_direction(&self, v: Vec2) -> bool {
        let s = self.start - self.center;
        let e = self.end - self.center;
        let sign = if self.sweep >= 0.0 { 1.0 } else { -1.0 };
        if self.sweep.abs() <= std::f64::consts::PI {
            let (c1, c2) = (sign * s.cross(v), sign * v.cross(e));
            if c1 < 0.0 || c2 < 0.0 {
                return false;
            }
            // Opposite to the start: inside only for a half turn.
            if c1 == 0.0 && s.dot(v) < 0.0 {
                return self.sweep.abs() >= std::f64::consts::PI - 1e-12;
            }
            true
        } else {
            // Outside only when strictly inside the complementary arc
            // (below pi).
            !(sign * e.cross(v) > 0.0 && sign * v.cross(s) > 0.0)
        }
    }

    /// Whether the direction `angle` (about the centre) lies within the swept span.
    pub fn contains_angle(&self, angle: f64) -> bool {
        let a0 = self.start_angle();
        let mut d = angle - a0;
        let tau = std::f64::consts::TAU;
        if self.sweep >= 0.0 {
            d = d.rem_euclid(tau);
            d <= self.sweep
        } else {
            d = (-d).rem_euclid(tau);
            d <= -self.sweep
        }
    }
}

/// One piece of track centre line.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Segment {
    /// A straight line.
    Line(Line),
    /// A circular arc.
    Arc(Arc),
}

impl Segment {
    /// A straight segment.
    pub fn line(start: Point, end: Point) -> Segment {
        Segment::Line(Line { start, end })
    }

    /// Start point.
    pub fn start(&self) -> Point {
        match self {
            Segment::Line(l) => l.start,
            Segment::Arc(a) => a.start,
        }
    }

    /// End point.
    pub fn end(&self) -> Point {
        match self {
            Segment::Line(l) => l.end,
            Segment::Arc(a) => a.end,
        }
    }

    /// Unit direction of travel at the start, or `None` for a point.
    pub fn start_direction(&self) -> Option<Vec2> {
        match self {
            Segment::Line(l) => (l.end - l.start).normalized(),
            Segment::Arc(a) => ((a.start - a.center).perp() * a.sweep.signum()).normalized(),
        }
    }

    /// Unit direction of travel at the end, or `None` for a point.
    pub fn end_direction(&self) -> Option<Vec2> {
        match self {
            Segment::Line(l) => (l.end - l.start).normalized(),
            Segment::Arc(a) => ((a.end - a.center).perp() * a.sweep.signum()).normalized(),
        }
    }

    /// Smallest radius of curvature, mm (infinite for a line).
    pub fn bend_radius(&self) -> f64 {
        match self {
            Segment::Line(_) => f64::INFINITY,
            Segment::Arc(a) => a.radius(),
        }
    }

    /// Centre-line length, mm.
    pub fn length(&self) -> f64 {
        match self {
            Segment::Line(l) => l.start.distance(l.end),
            Segment::Arc(a) => a.radius() * a.sweep.abs(),
        }
    }

    /// The point at fraction `t` (0..1) along the segment.
    pub fn point_at(&self, t: f64) -> Point {
        match self {
            Segment::Line(l) => l.start.lerp(l.end, t),
            Segment::Arc(a) => a.point_at(t),
        }
    }

    /// The same centre line traversed the other way.
    pub fn reversed(&self) -> Segment {
        match *self {
            Segment::Line(l) => Segment::line(l.end, l.start),
            Segment::Arc(a) => Segment::Arc(Arc {
                center: a.center,
                start: a.end,
                end: a.start,
                sweep: -a.sweep,
            }),
        }
    }

    /// Rotated about the origin by `angle` radians.
    pub fn rotated(&self, angle: f64) -> Segment {
        match *self {
            Segment::Line(l) => Segment::line(l.start.rotated(angle), l.end.rotated(angle)),
            Segment::Arc(a) => Segment::Arc(Arc {
                center: a.center.rotated(angle),
                start: a.start.rotated(angle),
                end: a.end.rotated(angle),
                sweep: a.sweep,
            }),
        }
    }

    /// Mirror image across the x axis; an arc's sense reverses.
    pub fn mirrored(&self) -> Segment {
        match *self {
            Segment::Line(l) => Segment::line(l.start.mirrored(), l.end.mirrored()),
            Segment::Arc(a) => Segment::Arc(Arc {
                center: a.center.mirrored(),
                start: a.start.mirrored(),
                end: a.end.mirrored(),
                sweep: -a.sweep,
            }),
        }
    }

    /// Signed angle swept about the origin (the coil axis) from start to end,
    /// radians; positive when the segment runs counter-clockwise about the axis.
    pub fn swept_about_origin(&self) -> f64 {
        match self {
            Segment::Line(l) => angle_between(l.start.to_vec2(), l.end.to_vec2()),
            Segment::Arc(a) => {
                let c = a.center.to_vec2();
                let (p0, p1) = (a.start.to_vec2(), a.end.to_vec2());
                if c.length() < a.radius() {
                    // The axis is inside the circle: the polar angle about it
                    // grows with the arc's own angle, and at every point the
                    // two differ by the angle from (p - centre) to p, which
                    // stays within (-pi/2, pi/2) (in the triangle axis,
                    // centre, p the angle at p faces the shorter side).
                    a.sweep + angle_between(p1 - c, p1) - angle_between(p0 - c, p0)
                } else {
                    // The axis is outside (or on) the circle: the whole circle
                    // is seen within less than half a turn, so the principal
                    // angle between the ends is the swept angle.
                    angle_between(p0, p1)
                }
            }
        }
    }

    /// Points along the centre line such that the chords deviate from the
    /// true arc by at most `tolerance` mm. Includes both end points.
    pub fn flatten(&self, tolerance: f64) -> Vec<Point> {
        match self {
            Segment::Line(l) => vec![l.start, l.end],
            Segment::Arc(a) => {
                let n = arc_steps(a.radius(), a.sweep.abs(), tolerance);
                let mut pts = Vec::with_capacity(n + 1);
                pts.push(a.start);
                for i in 1..n {
                    pts.push(a.point_at(i as f64 / n as f64));
                }
                pts.push(a.end);
                pts
            }
        }
    }

    /// Axis-aligned bounding box of the centre line: (min, max).
    pub fn bounds(&self) -> (Point, Point) {
        match self {
            Segment::Line(l) => (
                Point::new(l.start.x.min(l.end.x), l.start.y.min(l.end.y)),
                Point::new(l.start.x.max(l.end.x), l.start.y.max(l.end.y)),
            ),
            Segment::Arc(a) => {
                let r = a.radius();
                let mut lo = Point::new(a.start.x.min(a.end.x), a.start.y.min(a.end.y));
                let mut hi = Point::new(a.start.x.max(a.end.x), a.start.y.max(a.end.y));
                for k in 0..4 {
                    let ang = k as f64 * std::f64::consts::FRAC_PI_2;
                    if a.contains_angle(ang) {
                        let p = a.center + Vec2::from_angle(ang) * r;
                        lo = Point::new(lo.x.min(p.x), lo.y.min(p.y));
                        hi = Point::new(hi.x.max(p.x), hi.y.max(p.y));
                    }
                }
                (lo, hi)
            }
        }
    }

    /// Largest distance of the centre line from the origin, mm.
    pub fn max_radius(&self) -> f64 {
        match self {
            Segment::Line(l) => l.start.radius().max(l.end.radius()),
            Segment::Arc(a) => {
                let r = a.radius();
                let c = a.center.to_vec2();
                let mut m = a.start.radius().max(a.end.radius());
                if let Some(dir) = c.normalized()
                    && a.contains_direction(dir)
                {
                    m = m.max(c.length() + r);
                }
                if c.length() == 0.0 {
                    m = m.max(r);
                }
                m
            }
        }
    }

    /// Support function: the largest `n . p` over points `p` of the centre
    /// line, mm (for a unit `n`, how far the segment reaches in direction `n`).
    pub fn support(&self, n: Vec2) -> f64 {
        let ends = n
            .dot(self.start().to_vec2())
            .max(n.dot(self.end().to_vec2()));
        match self {
            Segment::Line(_) => ends,
            Segment::Arc(a) => {
                if a.contains_direction(n) {
                    ends.max(n.dot(a.center.to_vec2()) + a.radius() * n.length())
                } else {
                    ends
                }
            }
        }
    }

    /// Smallest distance of the centre line from the origin, mm.
    pub fn min_radius(&self) -> f64 {
        distance_point_segment(Point::ORIGIN, self)
    }
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

/// Shortest distance from a point to a segment's centre line, mm.
pub fn distance_point_segment(p: Point, s: &Segment) -> f64 {
    match s {
        Segment::Line(l) => distance_point_line(p, l.start, l.end),
        Segment::Arc(a) => {
            let v = p - a.center;
            let r = a.radius();
            if v.length() > 0.0 && a.contains_direction(v) {
                (v.length() - r).abs()
            } else if v.length() == 0.0 {
                r
            } else {
                p.distance(a.start).min(p.distance(a.end))
            }
        }
    }
}

/// The point of a segment's centre line nearest to `p`, and its fraction
/// along the segment (0 at the start, 1 at the end).
pub fn closest_point(p: Point, s: &Segment) -> (Point, f64) {
    match s {
        Segment::Line(l) => {
            let ab = l.end - l.start;
            let l2 = ab.dot(ab);
            if l2 == 0.0 {
                return (l.start, 0.0);
            }
            let t = ((p - l.start).dot(ab) / l2).clamp(0.0, 1.0);
            (l.start + ab * t, t)
        }
        Segment::Arc(a) => {
            let v = p - a.center;
            if v.length() > 0.0 && a.contains_direction(v) {
                let t = angle_between(a.start - a.center, v) / a.sweep;
                let t = if t < 0.0 {
                    t + std::f64::consts::TAU / a.sweep.abs()
                } else {
                    t
                };
                let t = t.clamp(0.0, 1.0);
                (a.point_at(t), t)
            } else if p.distance(a.start) <= p.distance(a.end) {
                (a.start, 0.0)
            } else {
                (a.end, 1.0)
            }
        }
    }
}

/// Shortest distance from `p` to the straight segment `a`-`b`, mm.
pub fn distance_point_line(p: Point, a: Point, b: Point) -> f64 {
    let ab = b - a;
    let l2 = ab.dot(ab);
    if l2 == 0.0 {
        return p.distance(a);
    }
    let t = ((p - a).dot(ab) / l2).clamp(0.0, 1.0);
    p.distance(a + ab * t)
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
        let mut seed = 7u64;
        let mut rnd = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
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
        near(distance_point_segment(Point::new(0.0, 3.0), &a), 1.0, 1e-12);
        near(
            distance_point_segment(Point::new(0.0, -3.0), &a),
            13f64.sqrt(),
            1e-12,
        );
    }
}
