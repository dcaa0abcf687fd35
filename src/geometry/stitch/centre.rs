//! Phase 3: the centre slots, where the vias (and, for an odd number of
//! groups, terminal 2) sit in the free centre, as far out as the innermost
//! turn allows.

use super::GeometryError;
use super::plan::Plan;
use crate::design::{Design, Shape, Wiring};
use crate::geometry::Point;
use std::f64::consts::{PI, TAU};

/// The smallest free centre (inner diameter, mm) that holds the centre vias
/// and the centre terminal with `clearance` between them and to the
/// innermost turn.
pub fn min_inner_diameter(
    shape: &Shape,
    layers: u8,
    wiring: Wiring,
    clearance: f64,
    trace_width: f64,
    via_diameter: f64,
    terminal_diameter: f64,
) -> f64 {
    let Ok(plan) = Plan::new(layers, wiring) else {
        return f64::NAN;
    };
    let dmax = if plan.ends_in_centre() {
        via_diameter.max(terminal_diameter)
    } else {
        via_diameter
    };
    let ring = centre_ring_radius(plan.centre_slots(), dmax, clearance, trace_width);
    let lead_ring = if centre_leads_need_ring(shape, plan.centre_slots()) {
        trace_width + clearance
    } else {
        0.0
    };
    2.0 * (ring + dmax / 2.0 + clearance + lead_ring)
}

/// Whether the design's free centre holds its centre vias
/// ([`min_inner_diameter`]).
pub(super) fn check_room(design: &Design) -> Result<(), GeometryError> {
    let coil = &design.coil;
    let min_id = min_inner_diameter(
        &coil.shape,
        coil.layers,
        coil.wiring,
        coil.clearance,
        coil.trace_width,
        design.via.diameter,
        design.terminal.diameter,
    );
    if coil.inner_diameter < min_id - 1e-9 {
        return Err(GeometryError::InnerTooSmall {
            given: coil.inner_diameter,
            min: min_id,
        });
    }
    Ok(())
}

/// The nodes in the free centre: on a circle of radius `radius` about the
/// axis at `angles`.
pub(super) struct CentreSlots {
    /// Radius of the circle of slots, mm.
    pub radius: f64,
    /// Polar angle of each slot, radians.
    pub angles: Vec<f64>,
    /// Whether the leads reach the slots along a lead ring inside the
    /// innermost turn ([`centre_leads_need_ring`]).
    pub ring: bool,
    /// Radius of that lead ring, mm.
    pub lead_radius: f64,
}

impl CentreSlots {
    /// Places the centre slots of a design.
    pub fn place(design: &Design, plan: &Plan) -> CentreSlots {
        let coil = &design.coil;
        let (w, s) = (coil.trace_width, coil.clearance);
        let (via_d, term_d) = (design.via.diameter, design.terminal.diameter);
        let nc = plan.centre_slots();
        let centre_dmax = if plan.ends_in_centre() {
            via_d.max(term_d)
        } else {
            via_d
        };
        let centre_ring = centre_leads_need_ring(&coil.shape, nc);
        // Put the centre slots as far out as the innermost turn allows, which
        // keeps the leads short and the middle of the coil free (for a magnet
        // or a sensor); never closer together than the minimum.
        let ring_allowance = if centre_ring { w + s } else { 0.0 };
        let rc = centre_ring_radius(nc, centre_dmax, s, w)
            .max(coil.inner_diameter / 2.0 - s - centre_dmax / 2.0 - ring_allowance);
        let inner_lead_radius = rc + centre_dmax / 2.0 + s + w / 2.0;
        // Circles turn each layer to face its slot, so slots spread evenly;
        // other shapes keep every inner end at angle 0, so their slots cluster
        // there, as close as the clearances allow, to keep the leads short.
        let centre_angles: Vec<f64> = if centre_ring {
            cluster(nc, 0.0, chord_angle(rc, centre_dmax, s, w))
        } else {
            (0..nc).map(|j| TAU * j as f64 / nc as f64).collect()
        };
        CentreSlots {
            radius: rc,
            angles: centre_angles,
            ring: centre_ring,
            lead_radius: inner_lead_radius,
        }
    }

    /// Polar angle of slot `j`, radians.
    pub fn angle(&self, j: usize) -> f64 {
        self.angles[j]
    }

    /// Centre of slot `j`.
    pub fn point(&self, j: usize) -> Point {
        Point::polar(self.radius, self.angle(j))
    }
}

/// Circles rotate each layer so its inner end points at its centre slot;
/// polygons and rectangles keep their orientation and reach the slot along
/// a lead ring inside the innermost turn (unless there is a single slot on
/// the axis, straight inward from the inner end).
fn centre_leads_need_ring(shape: &Shape, slots: usize) -> bool {
    !shape.turns_to_face_vias() && slots > 1
}

/// Polar angle between neighbouring slots on a circle of radius `r` so
/// that pads of diameter `dmax` keep `clearance` and a lead passing a
/// neighbour keeps it too (with a little slack for polygon rings).
fn chord_angle(r: f64, dmax: f64, clearance: f64, trace_width: f64) -> f64 {
    let chord = 1.05 * (dmax + clearance).max(dmax / 2.0 + trace_width / 2.0 + clearance);
    if r <= 0.0 {
        return TAU;
    }
    2.0 * (chord / (2.0 * r)).min(1.0).asin()
}

/// `n` angles `step` apart centred on `at`; evenly around the circle when
/// they do not fit.
fn cluster(n: usize, at: f64, step: f64) -> Vec<f64> {
    if step * n as f64 >= TAU {
        return (0..n).map(|j| at + TAU * j as f64 / n as f64).collect();
    }
    (0..n)
        .map(|j| at + (j as f64 - (n as f64 - 1.0) / 2.0) * step)
        .collect()
}

/// Radius of the circle of centre slots: zero for one slot, otherwise large
/// enough that neighbouring pads are `clearance` apart and a lead passing a
/// neighbour keeps `clearance` too.
fn centre_ring_radius(n: usize, dmax: f64, clearance: f64, trace_width: f64) -> f64 {
    if n <= 1 {
        return 0.0;
    }
    let chord = (dmax + clearance).max(dmax / 2.0 + trace_width / 2.0 + clearance);
    chord / (2.0 * (PI / n as f64).sin())
}
