//! The circular spiral: semicircles about two centres `(-p/4, 0)` and
//! `(p/4, 0)` whose radius grows by `p/2` every half turn. Neighbouring turns
//! at any angle are then exactly one pitch apart, every piece is a true arc,
//! and the pieces meet with a common tangent.
//!
//! # Units
//! Millimetres and radians.

use super::{SpiralError, SpiralSpec};
use crate::geometry::{Arc, Point, Segment};
use std::f64::consts::PI;

impl SpiralSpec {
    /// Whole half-turns of a circular spiral, enough to cover `turns`.
    pub(in crate::geometry) fn circle_whole(&self) -> Result<Vec<Segment>, SpiralError> {
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
}
