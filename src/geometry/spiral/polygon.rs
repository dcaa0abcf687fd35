//! The spiral of straight sides (polygons and rectangles): side `k` lies on
//! the line `n_k . x = d_k` with `n_k` at angle `k * 2 pi / N` and
//! `d_k = base_{k mod N} + p k / N`, so the same side one turn later is
//! exactly one pitch further out. Round corners are arcs of radius
//! `r0 + p k / N`, concentric with the same corner of the previous turn,
//! which keeps the pitch exact around the corner too.
//!
//! # Units
//! Millimetres and radians.

use super::{SpiralError, SpiralSpec};
use crate::design::Corner;
use crate::geometry::{Arc, Point, Segment, Vec2};
use std::f64::consts::TAU;

impl SpiralSpec {
    pub(in crate::geometry) fn polygon_whole(
        &self,
        bases: &[f64],
    ) -> Result<Vec<Segment>, SpiralError> {
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

    /// The lead ring of a spiral of sides `bases` whose segments are `segs`
    /// ([`SpiralSpec::lead_ring`]).
    pub(super) fn polygon_lead_ring(&self, bases: &[f64], segs: &[Segment]) -> Vec<Segment> {
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
            at = self.side_to_corner(bases, k, at, &mut out);
        }
        out.push(Segment::line(at, v0));
        out
    }
}

/// Intersection of the lines `n1 . x = d1` and `n2 . x = d2` (unit normals,
/// not parallel).
pub(in crate::geometry) fn intersect(n1: Vec2, d1: f64, n2: Vec2, d2: f64) -> Point {
    let det = n1.cross(n2);
    Point::new((d1 * n2.y - d2 * n1.y) / det, (n1.x * d2 - n2.x * d1) / det)
}
