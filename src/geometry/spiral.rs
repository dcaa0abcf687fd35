//! One layer's spiral in canonical position: it starts at its inner end on
//! the positive x axis and runs outward counter-clockwise with constant
//! pitch. Stitching rotates and mirrors copies of it for each layer.
//!
//! * Circle: semicircles about two centres `(-p/4, 0)` and `(p/4, 0)` whose
//!   radius grows by `p/2` every half turn. Neighbouring turns at any angle
//!   are then exactly one pitch apart, every piece is a true arc, and the
//!   pieces meet with a common tangent.
//! * Polygon and rectangle: side `k` lies on the line `n_k . x = d_k` with
//!   `n_k` at angle `k * 2 pi / N` and `d_k = base_{k mod N} + p k / N`, so the
//!   same side one turn later is exactly one pitch further out. Round corners
//!   are arcs of radius `r0 + p k / N`, concentric with the same corner of
//!   the previous turn, which keeps the pitch exact around the corner too.
//!
//! # Units
//! Millimetres and radians.

use super::{Arc, Point, Segment, Vec2, angle_between};
use crate::design::{Corner, Shape};
use std::f64::consts::{PI, TAU};

/// The parameters of a canonical spiral.
#[derive(Debug, Clone, PartialEq)]
pub struct SpiralSpec {
    /// Shape.
    pub shape: Shape,
    /// Corner style (ignored for circles).
    pub corner: Corner,
    /// Centre-to-centre distance of neighbouring turns, mm.
    pub pitch: f64,
    /// Distance of the inner end (on the +x axis) from the axis, mm: for a
    /// circle the inner end's radius, for a polygon the innermost apothem,
    /// for a rectangle the innermost half width.
    pub inner: f64,
    /// Turns (may be fractional), > 0.
    pub turns: f64,
}

/// Why a spiral cannot be built.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SpiralError {
    /// The inner size is zero or negative.
    #[error("the free centre is too small: the innermost turn would reach the axis")]
    NoCentre,
    /// A rounded corner would be larger than the side it joins.
    #[error(
        "corner radius {radius} mm is too large for the innermost side (must be below {max} mm)"
    )]
    CornerTooLarge {
        /// Requested radius, mm.
        radius: f64,
        /// Largest radius that fits, mm.
        max: f64,
    },
    /// Turns not positive or not finite.
    #[error("turns must be positive")]
    NoTurns,
}

impl SpiralSpec {
    /// Distances (apothems) of the innermost sides for polygon shapes, and
    /// the number of sides; `None` for a circle.
    fn sides(&self) -> Option<Vec<f64>> {
        match self.shape {
            Shape::Circle => None,
            Shape::Polygon { sides } => Some(vec![self.inner; sides as usize]),
            Shape::Rectangle { width, height } => {
                let a = self.inner;
                let b = self.inner + (height - width) / 2.0;
                Some(vec![a, b, a, b])
            }
        }
    }

    /// The centre-line segments from the inner end to the outer end.
    pub fn segments(&self) -> Result<Vec<Segment>, SpiralError> {
        if !(self.turns > 0.0 && self.turns.is_finite()) {
            return Err(SpiralError::NoTurns);
        }
        let full = match self.sides() {
            None => self.circle_full()?,
            Some(bases) => self.polygon_full(&bases)?,
        };
        Ok(cut_at_polar_angle(&full, TAU * self.turns))
    }

    /// Whole half-turns of a circular spiral, enough to cover `turns`.
    fn circle_full(&self) -> Result<Vec<Segment>, SpiralError> {
        let p = self.pitch;
        if self.inner <= 0.0 {
            return Err(SpiralError::NoCentre);
        }
        let halves = (2.0 * self.turns).ceil() as usize + 1;
        let a = Point::new(-p / 4.0, 0.0);
        let b = Point::new(p / 4.0, 0.0);
        let mut out = Vec::with_capacity(halves);
        let mut at = Point::new(self.inner, 0.0);
        for k in 0..halves {
            let c = if k % 2 == 0 { a } else { b };
            let arc = Arc::from_start(c, at, PI);
            // Snap the end back onto the x axis: it is there in exact arithmetic.
            let arc = Arc {
                end: Point::new(arc.end.x, 0.0),
                ..arc
            };
            at = arc.end;
            out.push(Segment::Arc(arc));
        }
        Ok(out)
    }

    /// Whole sides of a polygon spiral, enough to cover `turns`.
    fn polygon_full(&self, bases: &[f64]) -> Result<Vec<Segment>, SpiralError> {
        let n = bases.len();
        let p = self.pitch;
        let alpha = TAU / n as f64;
        let min_base = bases.iter().cloned().fold(f64::INFINITY, f64::min);
        if min_base <= 0.0 {
            return Err(SpiralError::NoCentre);
        }
        let d = |k: usize| bases[k % n] + p * k as f64 / n as f64;
        let normal = |k: usize| Vec2::from_angle(k as f64 * alpha);
        let lines = (self.turns * n as f64).ceil() as usize + 2;
        let mut out = Vec::with_capacity(2 * lines);
        let mut at = Point::new(bases[0], 0.0);
        if let Corner::Round { radius } = self.corner {
            // The first turn's last corner is concentric with a corner that
            // would come before the start; if that corner's tangent point lies
            // past the foot of side 0, start there so that the pitch holds.
            let r = radius - p / n as f64;
            let (nm, dm) = (Vec2::from_angle(-alpha), bases[n - 1] - p / n as f64);
            if r > 0.0 && dm > r {
                let c = intersect(nm, dm - r, normal(0), d(0) - r);
                let t = c + normal(0) * r;
                if t.y > 0.0 {
                    at = Point::new(bases[0], t.y);
                }
            }
        }
        if let Corner::Round { radius } = self.corner {
            // Tangent length on the shortest side must fit in half of it.
            let max = min_base * 0.999;
            if radius >= max || radius < 0.0 {
                return Err(SpiralError::CornerTooLarge { radius, max });
            }
        }
        for k in 0..lines {
            at = self.side_to_corner(bases, k, at, &mut out);
        }
        Ok(out)
    }
}

impl SpiralSpec {
    /// Pushes side `k` of a polygon spiral from `at` up to its corner with
    /// side `k + 1`, and that corner (a point, or an arc of radius
    /// `r0 + p k / N` concentric with the same corner one turn in);
    /// returns where the corner ends.
    fn side_to_corner(&self, bases: &[f64], k: usize, at: Point, out: &mut Vec<Segment>) -> Point {
        let n = bases.len();
        let p = self.pitch;
        let alpha = TAU / n as f64;
        let d = |k: usize| bases[k % n] + p * k as f64 / n as f64;
        let normal = |k: usize| Vec2::from_angle(k as f64 * alpha);
        match self.corner {
            Corner::Sharp => {
                let v = intersect(normal(k), d(k), normal(k + 1), d(k + 1));
                out.push(Segment::line(at, v));
                v
            }
            Corner::Round { radius } => {
                let rc = radius + p * k as f64 / n as f64;
                let (n1, n2) = (normal(k), normal(k + 1));
                let c = intersect(n1, d(k) - rc, n2, d(k + 1) - rc);
                let t1 = c + n1 * rc;
                out.push(Segment::line(at, t1));
                let arc = Arc::from_start(c, t1, alpha);
                out.push(Segment::Arc(arc));
                arc.end
            }
        }
    }

    /// A closed path one pitch outside a polygon or rectangle spiral built
    /// by [`SpiralSpec::segments`] (`None` for a circle): the sides of the
    /// turn after the last, with the same corners (concentric with the
    /// winding's, so the gap is exactly one pitch), closed by one sharp
    /// corner away from the spiral's outer end. Starts at that sharp corner
    /// and runs counter-clockwise.
    pub fn lead_ring(&self, segs: &[Segment]) -> Option<Vec<Segment>> {
        let bases = self.sides()?;
        let n = bases.len();
        let p = self.pitch;
        let alpha = TAU / n as f64;
        let d = |k: usize| bases[k % n] + p * k as f64 / n as f64;
        let normal = |k: usize| Vec2::from_angle(k as f64 * alpha);
        let last = segs.len().max(1) - 1;
        // The spiral ends on side `k` (or on the corner after it); the ring
        // side facing it is `k + n`. Start the ring at side `k + 2` so that
        // both corners next to the facing side are regular (concentric) and
        // the one sharp closing corner lies a full side away from the end.
        let k = match self.corner {
            Corner::Sharp => last,
            Corner::Round { .. } => last / 2,
        };
        let first = k + 2;
        let close = first + n - 1;
        let v0 = intersect(normal(close), d(close), normal(first), d(first));
        let mut out = Vec::with_capacity(2 * n);
        let mut at = v0;
        for k in first..close {
            at = self.side_to_corner(&bases, k, at, &mut out);
        }
        out.push(Segment::line(at, v0));
        Some(out)
    }
}

/// Intersection of the lines `n1 . x = d1` and `n2 . x = d2` (unit normals,
/// not parallel).
fn intersect(n1: Vec2, d1: f64, n2: Vec2, d2: f64) -> Point {
    let det = n1.cross(n2);
    Point::new((d1 * n2.y - d2 * n1.y) / det, (n1.x * d2 - n2.x * d1) / det)
}

/// The leading part of a path that winds counter-clockwise about the origin,
/// up to the point where it has swept `target` radians. The cut segment ends
/// exactly on the ray at the target angle (found by bisection along the
/// segment, whose polar angle is monotonic).
pub fn cut_at_polar_angle(path: &[Segment], target: f64) -> Vec<Segment> {
    let mut out = Vec::new();
    let mut swept = 0.0;
    for s in path {
        let ds = s.swept_about_origin();
        if swept + ds < target - 1e-12 {
            out.push(*s);
            swept += ds;
            continue;
        }
        let want = target - swept;
        let start = s.start().to_vec2();
        let (mut lo, mut hi) = (0.0f64, 1.0f64);
        for _ in 0..80 {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                break; // adjacent doubles: converged
            }
            let a = angle_between(start, s.point_at(mid).to_vec2());
            let a = if a < 0.0 && want > PI / 2.0 {
                a + TAU
            } else {
                a
            };
            if a < want {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        let t = 0.5 * (lo + hi);
        if t > 1e-12 {
            // The first fraction `t`, begun exactly where the segment begins.
            out.push(s.subsegment(0.0..t).with_start(s.start()));
        }
        return out;
    }
    out
}

/// Smallest and largest distance of a path's centre line from the axis, mm.
pub fn radial_extent(path: &[Segment]) -> (f64, f64) {
    let lo = path
        .iter()
        .map(|s| s.min_radius())
        .fold(f64::INFINITY, f64::min);
    let hi = path.iter().map(|s| s.max_radius()).fold(0.0, f64::max);
    (lo, hi)
}

/// Largest |x| and |y| of a path's centre line, mm.
pub fn box_extent(path: &[Segment]) -> (f64, f64) {
    path.iter().fold((0.0f64, 0.0f64), |(x, y), s| {
        let b = s.bounding_box();
        (
            x.max(b.min.x.abs()).max(b.max.x.abs()),
            y.max(b.min.y.abs()).max(b.max.y.abs()),
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spec(shape: Shape, corner: Corner, turns: f64) -> SpiralSpec {
        SpiralSpec {
            shape,
            corner,
            pitch: 0.2,
            inner: if matches!(shape, Shape::Rectangle { .. }) {
                3.0
            } else {
                2.0
            },
            turns,
        }
    }

    #[test]
    fn circle_pitch_is_exact() {
        let s = spec(Shape::Circle, Corner::Sharp, 5.0).segments().unwrap();
        assert_eq!(s.len(), 10);
        // At angle 0 the spiral crosses the +x axis once per turn, one pitch apart.
        for k in 0..5 {
            let x = s[2 * k].start().x;
            assert!((x - (2.0 + 0.2 * k as f64)).abs() < 1e-12, "{x}");
        }
        let (lo, hi) = radial_extent(&s);
        assert!((lo - 2.0).abs() < 1e-12);
        assert!((hi - 3.0).abs() < 1e-12);
    }

    #[test]
    fn fractional_turns_end_on_the_ray() {
        let s = spec(Shape::Polygon { sides: 6 }, Corner::Sharp, 3.3)
            .segments()
            .unwrap();
        let swept: f64 = s.iter().map(|x| x.swept_about_origin()).sum();
        assert!((swept / TAU - 3.3).abs() < 1e-9);
        let c = spec(Shape::Circle, Corner::Sharp, 2.25).segments().unwrap();
        let end = c.last().unwrap().end();
        assert!((end.angle() - PI / 2.0).abs() < 1e-9);
    }

    #[test]
    fn round_corners_keep_pitch() {
        let s = spec(
            Shape::Rectangle {
                width: 10.0,
                height: 6.0,
            },
            Corner::Round { radius: 0.3 },
            3.0,
        )
        .segments()
        .unwrap();
        // Corner arcs of the same corner one turn apart are concentric, radius + pitch.
        let arcs: Vec<_> = s
            .iter()
            .filter_map(|x| match x {
                Segment::Arc(a) => Some(*a),
                _ => None,
            })
            .collect();
        for k in 0..arcs.len() - 4 {
            let (a, b) = (arcs[k], arcs[k + 4]);
            assert!(a.center.distance(b.center) < 1e-9);
            assert!((b.radius() - a.radius() - 0.2).abs() < 1e-9);
        }
        for w in s.windows(2) {
            assert!(w[0].end().distance(w[1].start()) < 1e-12);
        }
    }
}
