//! Inductance from filaments along the real conductor (Grover, Inductance
//! Calculations, 1946): the coil's inductance is the sum of the self terms
//! and all mutual terms of its pieces, each weighted by its share of the
//! current.
//!
//! * Coaxial rings (circular coils): Maxwell's elliptic-integral formula
//!   for the mutual terms, exact for coaxial circular filaments.
//! * Straight pieces (polygon and rectangle coils): Neumann's double line
//!   integral, in closed form for parallel pieces (Grover's formula for
//!   parallel filaments) and with the inner integral in closed form and the
//!   outer one by adaptive Gauss-Legendre quadrature otherwise.
//! * Self terms and pieces close to each other (neighbouring turns, layers
//!   closer than the trace width, consecutive pieces of one track): the
//!   filament distance is replaced by the geometric mean distance (GMD)
//!   between the two rectangular cross-sections (Grover; Maxwell's GMD
//!   method), so coupling between layers never exceeds 1.
//!
//! [`analyse`] is the analysis phase: the coil's inductance, the top
//! layer's alone and the published single-layer estimates beside them
//! ([`InductanceReport`]). The sums live in [`rings`] (Maxwell) and
//! [`filaments`] (Neumann).

pub mod filaments;
pub mod rings;

pub use filaments::filaments_inductance;
pub(super) use rings::maxwell_8;
pub use rings::{maxwell_mutual, maxwell_mutual_8, rings_inductance, rings_mutual};

use super::closed_forms::{self, MohanShape};
use super::conductor::{Conductor, m};
use crate::design::{Design, Shape};
use crate::geometry::Board;
use serde::Serialize;

/// Distance (in multiples of the largest section size) below which the
/// GMD replaces the filament distance. Beyond it the filament distance
/// differs from the GMD by less than about 0.3 %.
const NEAR: f64 = 6.0;

/// How the inductance was computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum InductanceMethod {
    /// Coaxial ring elements with Maxwell's formula.
    MaxwellRings,
    /// Straight filaments with Neumann's formula.
    NeumannFilaments,
}

/// Relative chord sagitta for flattening arcs in the Neumann method.
pub const NEUMANN_SAGITTA: f64 = 5e-3;

/// Inductance of the whole conductor, henry: coaxial rings for circular
/// coils, Neumann filaments otherwise.
pub fn inductance(c: &Conductor, circular: bool) -> (f64, InductanceMethod) {
    if circular {
        (rings_inductance(&c.rings()), InductanceMethod::MaxwellRings)
    } else {
        (
            filaments_inductance(&c.filaments(NEUMANN_SAGITTA)),
            InductanceMethod::NeumannFilaments,
        )
    }
}

/// Inductance and the published single-layer estimates beside it.
///
/// Serialised as report.json's `inductance` object (method and
/// estimates); `inductance_h` is written at the top level (see
/// [`super::Analysis`]).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InductanceReport {
    /// Inductance of the whole coil, terminal to terminal, H.
    #[serde(skip)]
    pub inductance_h: f64,
    /// How the inductance was computed.
    pub method: InductanceMethod,
    /// Computed inductance of the top layer alone (same method), H.
    pub single_layer_h: f64,
    /// Mohan et al. 1999 modified Wheeler, single layer, H.
    pub mohan_modified_wheeler_h: Option<f64>,
    /// Mohan et al. 1999 current sheet, single layer, H.
    pub mohan_current_sheet_h: Option<f64>,
    /// Wheeler 1928 flat spiral, single layer, H.
    pub wheeler_1928_h: Option<f64>,
    /// Outer and inner copper size used by the estimates (across flats for
    /// polygons), mm.
    pub d_out_mm: f64,
    /// Inner copper size, mm.
    pub d_in_mm: f64,
}

impl InductanceReport {
    /// The analysis note that says how the inductance was computed.
    pub fn method_note(&self) -> String {
        format!(
            "inductance by {}; self terms and close pieces by the geometric mean distance of the rectangular sections (Grover)",
            match self.method {
                InductanceMethod::MaxwellRings =>
                    "coaxial rings with Maxwell's formula (each turn as one loop at its mean radius, partial turns as fractions)",
                InductanceMethod::NeumannFilaments =>
                    "Neumann's formula on straight filaments along the conductor",
            }
        )
    }
}

/// The inductance phase of the analysis: the whole coil, the top layer
/// alone (same method) and the published estimates that apply to the
/// design's shape.
pub fn analyse(design: &Design, layout: &Board, cond: &Conductor) -> InductanceReport {
    let circular = matches!(design.coil.shape, Shape::Circle);
    let (l, method) = inductance(cond, circular);
    let (l1, _) = inductance(&cond.only_layer(1), circular);
    published_estimates(design, layout, l, method, l1)
}

/// The report with the published single-layer estimates that apply to the
/// design's shape.
fn published_estimates(
    design: &Design,
    layout: &Board,
    l: f64,
    method: InductanceMethod,
    l1: f64,
) -> InductanceReport {
    let n = layout.turns;
    let (shape, flats) = match design.coil.shape {
        Shape::Circle => (Some(MohanShape::Circle), 1.0),
        Shape::Polygon { sides } => {
            let s = match sides {
                4 => Some(MohanShape::Square),
                6 => Some(MohanShape::Hexagon),
                8 => Some(MohanShape::Octagon),
                _ => None,
            };
            (s, (std::f64::consts::PI / sides as f64).cos())
        }
        Shape::Rectangle { width, height } if (width - height).abs() < 1e-9 => {
            (Some(MohanShape::Square), std::f64::consts::FRAC_1_SQRT_2)
        }
        Shape::Rectangle { .. } => (None, 1.0),
    };
    // Outer size across flats from the circumscribed diameter; the inner
    // one is the free circle's diameter (already across flats). A spiral of
    // n turns reaches half a pitch further in and out than n concentric
    // turns (which the formulas assume) of the same mean size: use those.
    let p = layout.pitch;
    let d_out = match design.coil.shape {
        Shape::Circle => 2.0 * layout.outer_radius,
        _ => 2.0 * layout.outer_radius * flats,
    } - p;
    let d_in = 2.0 * layout.inner_radius + p;
    let (mw, cs, wh) = match shape {
        Some(s) if d_out > d_in && d_in > 0.0 => (
            closed_forms::mohan_modified_wheeler(s, n, m(d_out), m(d_in)),
            Some(closed_forms::mohan_current_sheet(s, n, m(d_out), m(d_in))),
            if s == MohanShape::Circle {
                Some(closed_forms::wheeler_1928(n, m(d_in / 2.0), m(d_out / 2.0)))
            } else {
                None
            },
        ),
        _ => (None, None, None),
    };
    InductanceReport {
        inductance_h: l,
        method,
        single_layer_h: l1,
        mohan_modified_wheeler_h: mw,
        mohan_current_sheet_h: cs,
        wheeler_1928_h: wh,
        d_out_mm: d_out,
        d_in_mm: d_in,
    }
}

#[cfg(test)]
mod tests {
    use super::rings::test_ring as ring;
    use super::*;
    use crate::physics::conductor::Filament;
    use std::f64::consts::PI;

    #[test]
    fn neumann_agrees_with_rings_for_a_flattened_circle() {
        // The same five coaxial loops, once as Maxwell rings and once as
        // Neumann filaments of 720 chords each: the two methods must agree.
        let (w, t) = (0.2e-3, 35e-6);
        let mut rings = vec![];
        let mut fil = vec![];
        for k in 0..5 {
            let r = 0.004 + k as f64 * 0.4e-3;
            rings.push(ring(r, 0.0, w, t));
            let n = 720;
            for i in 0..n {
                let a0 = 2.0 * PI * i as f64 / n as f64;
                let a1 = 2.0 * PI * (i + 1) as f64 / n as f64;
                fil.push(Filament {
                    a: [r * a0.cos(), r * a0.sin(), 0.0],
                    b: [r * a1.cos(), r * a1.sin(), 0.0],
                    weight: 1.0,
                    layer: 1,
                    width: w,
                    thickness: t,
                });
            }
        }
        let lr = rings_inductance(&rings);
        let ln = filaments_inductance(&fil);
        assert!((ln / lr - 1.0).abs() < 0.01, "{ln} {lr}");
    }
}
