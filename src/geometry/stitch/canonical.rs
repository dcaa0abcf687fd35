//! Phase 2: the canonical spiral every layer is a copy of (inner end on +x,
//! running outward counter-clockwise) and, for shapes with sides, its lead
//! ring.

use super::GeometryError;
use super::lead_loop::Loop;
use crate::design::Coil;
use crate::geometry::spiral::{SpiralSpec, radial_extent};
use crate::geometry::{Point, Segment};

/// The canonical spiral of a coil.
pub(super) struct Canonical {
    /// Centre line from the inner end to the outer end.
    pub spiral: Vec<Segment>,
    /// Polygons and rectangles: a lead ring shaped like the next turn (one
    /// pitch out, same corners), so leads meet it square, never in a
    /// hairpin; `None` for a circle.
    pub lead_loop: Option<Loop>,
    /// Polar angle of the outer end, radians.
    pub outer_end_angle: f64,
}

impl Canonical {
    /// Builds the canonical spiral of `coil`.
    pub fn new(coil: &Coil) -> Result<Canonical, GeometryError> {
        let inner = coil
            .shape
            .spiral_inner(coil.inner_diameter, coil.trace_width);
        let spiral_spec = SpiralSpec {
            shape: coil.shape,
            corner: coil.corner,
            pitch: coil.pitch(),
            inner,
            turns: coil.turns,
        };
        let spiral = spiral_spec.segments()?;
        let lead_loop = spiral_spec.lead_ring(&spiral).map(|segs| Loop { segs });
        let spiral_end = spiral
            .last()
            .map(|x| x.end())
            .unwrap_or(Point::new(inner, 0.0));
        Ok(Canonical {
            spiral,
            lead_loop,
            outer_end_angle: spiral_end.angle(),
        })
    }

    /// Smallest and largest distance of winding copper (edges of tracks
    /// `trace_width` wide) from the axis, mm.
    pub fn copper_radii(&self, trace_width: f64) -> (f64, f64) {
        let (rmin, rmax) = radial_extent(&self.spiral);
        (rmin - trace_width / 2.0, rmax + trace_width / 2.0)
    }

    /// The lead loops of the layers: the canonical one, and its mirror
    /// image when there are mirrored (outward) layers; none for a circle.
    pub fn loops(&self, layers: u8) -> Vec<Loop> {
        match &self.lead_loop {
            Some(l) if layers > 1 => vec![l.clone(), l.mirrored()],
            Some(l) => vec![l.clone()],
            None => vec![],
        }
    }
}
