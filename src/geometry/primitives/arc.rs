//! The true circular arc primitive.

use super::{Nearest, Point, Rect, Vec2, angle_between};
use std::f64::consts::{FRAC_PI_2, TAU};
use std::ops::Range;

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

/// Where the point of an arc nearest to a given point lies.
enum Foot {
    /// Within the swept span: on the ray from the centre through the point,
    /// `v` (mm) from the centre, `lv = |v|` > 0.
    Span { v: Vec2, lv: f64 },
    /// At the start (the point lies outside the span, or on the centre, and
    /// is not farther from the start than from the end).
    Start,
    /// At the end.
    End,
}

impl Arc {
    fn foot(&self, p: Point) -> Foot {
        let v = p - self.center;
        let lv = v.length();
        if lv > 0.0 && self.contains_direction(v) {
            Foot::Span { v, lv }
        } else if p.distance(self.start) <= p.distance(self.end) {
            Foot::Start
        } else {
            Foot::End
        }
    }

    /// The point of the arc nearest to `p`: within the span the radial
    /// projection of `p` onto the circle, otherwise the nearer end. Cheaper
    /// than [`Arc::nearest`] (no parameter, no trigonometry).
    pub fn nearest_point(&self, p: Point) -> Point {
        match self.foot(p) {
            Foot::Span { v, lv } => self.center + v * (self.radius() / lv),
            Foot::Start => self.start,
            Foot::End => self.end,
        }
    }

    /// The point of the arc nearest to `p` ([`Arc::nearest_point`]) with its
    /// parameter (fraction of the sweep).
    pub fn nearest(&self, p: Point) -> Nearest {
        match self.foot(p) {
            Foot::Span { v, lv } => {
                let t = angle_between(self.start - self.center, v) / self.sweep;
                let t = if t < 0.0 {
                    t + TAU / self.sweep.abs()
                } else {
                    t
                };
                Nearest {
                    point: self.center + v * (self.radius() / lv),
                    t: t.clamp(0.0, 1.0),
                    interior: true,
                }
            }
            Foot::Start => Nearest {
                point: self.start,
                t: 0.0,
                interior: false,
            },
            Foot::End => Nearest {
                point: self.end,
                t: 1.0,
                interior: false,
            },
        }
    }

    /// Shortest distance from `p` to the arc, mm: within the span the gap
    /// between `|p - centre|` and the radius (no projected point needed), at
    /// the centre the radius, otherwise the distance to the nearer end.
    pub fn distance(&self, p: Point) -> f64 {
        match self.foot(p) {
            Foot::Span { lv, .. } => (lv - self.radius()).abs(),
            _ if (p - self.center).length() == 0.0 => self.radius(),
            Foot::Start => p.distance(self.start),
            Foot::End => p.distance(self.end),
        }
    }

    /// The part between fractions `range.start` and `range.end` of the sweep:
    /// it begins at [`Arc::point_at`]`(range.start)` and sweeps
    /// `sweep * (range.end - range.start)`.
    pub fn subsegment(&self, range: Range<f64>) -> Arc {
        Arc::from_start(
            self.center,
            self.point_at(range.start),
            self.sweep * (range.end - range.start),
        )
    }

    /// Axis-aligned bounding box: the ends and every axis extreme of the
    /// circle that lies within the span.
    pub fn bounding_box(&self) -> Rect {
        let r = self.radius();
        let mut b = Rect::from_points(self.start, self.end);
        for k in 0..4 {
            let ang = k as f64 * FRAC_PI_2;
            if self.contains_angle(ang) {
                b = b.union_point(self.center + Vec2::from_angle(ang) * r);
            }
        }
        b
    }
}
