//! One layer's spiral in canonical position: it starts at its inner end on
//! the positive x axis and runs outward counter-clockwise with constant
//! pitch. Stitching rotates and mirrors copies of it for each layer.
//!
//! Each shape's builder makes whole turns (`circle.rs`: two-centre
//! semicircles; `polygon.rs`: offset sides with concentric corners, for
//! polygons and rectangles; `sector.rs`: annular sectors with arcs about
//! the ring's centre), chosen by [`Shape`]'s `whole_spiral`
//! (`geometry/shape.rs`); [`SpiralSpec::segments`] then cuts them at the
//! requested turns.
//!
//! # Units
//! Millimetres and radians.

mod circle;
mod polygon;
mod sector;

pub(super) use polygon::intersect;
pub(in crate::geometry) use sector::{SectorOutline, shifted};

use super::{Segment, angle_between};
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
    /// for a rectangle the innermost half width; for a sector the smallest
    /// distance of the innermost turn's centre line from the axis.
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
    /// The centre-line segments from the inner end to the outer end.
    pub fn segments(&self) -> Result<Vec<Segment>, SpiralError> {
        if !(self.turns > 0.0 && self.turns.is_finite()) {
            return Err(SpiralError::NoTurns);
        }
        let full = self.shape.whole_spiral(self)?;
        Ok(cut_at_polar_angle(&full, TAU * self.turns))
    }

    /// A closed path one pitch outside a polygon, rectangle or sector
    /// spiral built by [`SpiralSpec::segments`] (`None` for a circle): the sides of the
    /// turn after the last, with the same corners (concentric with the
    /// winding's, so the gap is exactly one pitch), closed by one sharp
    /// corner away from the spiral's outer end. Starts at that sharp corner
    /// and runs counter-clockwise.
    pub fn lead_ring(&self, segs: &[Segment]) -> Option<Vec<Segment>> {
        if let Some(g) = SectorOutline::of(&self.shape) {
            return Some(self.sector_lead_ring(&g, segs));
        }
        let bases = self.shape.side_bases(self.inner)?;
        Some(self.polygon_lead_ring(&bases, segs))
    }
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
