//! Inductance from filaments along the real conductor (Grover, Inductance
//! Calculations, 1946): the coil's inductance is the sum of the self terms
//! and all mutual terms of its pieces, each weighted by its share of the
//! current.
//!
//! * Coaxial rings (circular coils): Maxwell's elliptic-integral formula
//!   for the mutual terms, exact for coaxial circular filaments.
//! * Straight pieces (polygon and rectangle coils): Neumann's double line
//!   integral, in closed form for parallel pieces (Grover's formula for
//!   parallel filaments) and for close pieces at an angle (Grover's
//!   filaments inclined in parallel planes), and with the inner integral in
//!   closed form and the outer one by Gauss-Legendre quadrature otherwise;
//!   each distinct pair of layer copies is summed once.
//! * Self terms and pieces close to each other (neighbouring turns, layers
//!   closer than the trace width, consecutive pieces of one track): the
//!   filament distance is replaced by the geometric mean distance (GMD)
//!   between the two rectangular cross-sections (Grover; Maxwell's GMD
//!   method), so coupling between layers never exceeds 1.
//!
//! [`analyse`] is the analysis phase: the coil's inductance, the top
//! layer's alone, the winding's without its leads, and the published
//! single-layer estimates beside the top layer's winding, like for like
//! ([`InductanceReport`], [`estimate_sizes`]). The sums live in [`rings`] (Maxwell) and
//! [`filaments`] (Neumann).

pub mod filaments;
pub mod rings;

pub use filaments::{
    FilamentInductances, filaments_inductance, filaments_inductances, filaments_mutual,
};
pub(super) use rings::maxwell_8;
pub use rings::{maxwell_mutual, maxwell_mutual_8, rings_inductance, rings_mutual};

use super::Detail;
use super::closed_forms::{self, MohanShape};
use super::conductor::{Conductor, m};
use crate::design::{Design, Shape};
use crate::geometry::{Board, Segment, TrackRole};
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
    /// Not computed: [`Detail::Limits`] for a drive whose heating does not
    /// depend on the inductance.
    NotComputed,
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

/// Inductance, the winding's alone and the published single-layer
/// estimates beside it.
///
/// Serialised as report.json's `inductance` object (method and
/// estimates); `inductance_h` is written at the top level (see
/// [`super::Analysis`]).
///
/// What each number includes: `inductance_h` and `single_layer_h` count
/// the leads and the lead rings (the tracks from the winding's ends to the
/// vias and pads); `winding_h` and `single_layer_winding_h` count the
/// spiral turns only. Via barrels are short and vertical and enter none of
/// them. The published formulas describe one layer's turns without leads,
/// so they stand beside `single_layer_winding_h`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InductanceReport {
    /// Inductance of the whole coil, terminal to terminal, leads included, H.
    #[serde(skip)]
    pub inductance_h: f64,
    /// How the inductance was computed.
    pub method: InductanceMethod,
    /// Computed inductance of the top layer alone with its leads (same
    /// method), H.
    pub single_layer_h: f64,
    /// Computed inductance of the winding alone, H: the spiral turns of
    /// every layer, wired as built (in series, or pairs in parallel),
    /// without the leads and lead rings; same method as `inductance_h`.
    /// `None` in a sweep's analysis ([`Detail::Metrics`]), where it would
    /// cost about as much again as the full inductance.
    pub winding_h: Option<f64>,
    /// Computed inductance of the top layer's winding alone (its spiral
    /// turns, no leads), H: the like-for-like value for the published
    /// single-layer estimates. `None` in a sweep's analysis.
    pub single_layer_winding_h: Option<f64>,
    /// Mohan et al. 1999 modified Wheeler, one layer's winding, no leads, H.
    pub mohan_modified_wheeler_h: Option<f64>,
    /// Mohan et al. 1999 current sheet, one layer's winding, no leads, H.
    pub mohan_current_sheet_h: Option<f64>,
    /// Wheeler 1928 flat spiral, one layer's winding, no leads, H.
    pub wheeler_1928_h: Option<f64>,
    /// Outer size fed to the estimates, mm: across the outer edge of the
    /// outermost of `n` concentric turns that stand for the spiral (each at
    /// the mean size of the spiral turn it replaces); across flats for
    /// polygons, measured on the sides themselves (see
    /// [`estimate_sizes`]). Not the design's `outer_diameter`.
    pub d_out_mm: f64,
    /// Inner size fed to the estimates, mm: across the inner edge of the
    /// innermost of those concentric turns (across flats for polygons).
    pub d_in_mm: f64,
    /// The published estimates that apply to the shape, each with its
    /// source, what it includes and its difference from
    /// `single_layer_winding_h`. Empty in a sweep's analysis.
    pub estimates: Vec<PublishedEstimate>,
}

/// One published inductance estimate, compared like for like.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PublishedEstimate {
    /// Stable name: `mohan_modified_wheeler`, `mohan_current_sheet` or
    /// `wheeler_1928`.
    pub name: &'static str,
    /// Where the formula is published.
    pub source: &'static str,
    /// What the formula describes (and so what it is compared with).
    pub includes: &'static str,
    /// The accuracy its source states.
    pub stated_accuracy: &'static str,
    /// The estimate, H.
    pub inductance_h: f64,
    /// `inductance_h / single_layer_winding_h - 1`.
    pub relative_difference: f64,
}

/// What every published estimate here includes.
pub const ESTIMATE_INCLUDES: &str =
    "one layer's winding only (n concentric turns, no leads, no vias)";

impl InductanceReport {
    /// The report of an inductance left out ([`Detail::Limits`]): every
    /// value zero, no estimates.
    pub fn not_computed() -> InductanceReport {
        InductanceReport {
            inductance_h: 0.0,
            method: InductanceMethod::NotComputed,
            single_layer_h: 0.0,
            winding_h: None,
            single_layer_winding_h: None,
            mohan_modified_wheeler_h: None,
            mohan_current_sheet_h: None,
            wheeler_1928_h: None,
            d_out_mm: 0.0,
            d_in_mm: 0.0,
            estimates: vec![],
        }
    }

    /// The analysis note that says how the inductance was computed.
    pub fn method_note(&self) -> String {
        format!(
            "inductance by {}; self terms and close pieces by the geometric mean distance of the rectangular sections (Grover)",
            match self.method {
                InductanceMethod::MaxwellRings =>
                    "coaxial rings with Maxwell's formula (each turn as one loop at its mean radius, partial turns as fractions)",
                InductanceMethod::NeumannFilaments =>
                    "Neumann's formula on straight filaments along the conductor",
                InductanceMethod::NotComputed => "nothing (not needed for this drive's limits)",
            }
        )
    }
}

/// The inductance phase of the analysis: the whole coil, the top layer
/// alone (same method), and with [`Detail::Full`] the winding without its
/// leads (all layers and the top layer) with the published estimates that
/// apply to the design's shape beside the top layer's.
pub fn analyse(
    design: &Design,
    layout: &Board,
    cond: &Conductor,
    detail: Detail,
) -> InductanceReport {
    // Coaxial rings hold for one circular coil about the origin; the coils
    // of an array's phase sit about their own axes: filaments.
    let circular = matches!(design.coil.shape, Shape::Circle) && design.array.is_none();
    let full = detail == Detail::Full;
    let (l, method, l1, lw, lw1) = if circular {
        let (l, method) = inductance(cond, circular);
        // A one-layer coil is its own top layer: no second sum.
        let one_layer = cond.pieces.iter().all(|p| p.layer == 1 && p.weight == 1.0);
        let top = |c: &Conductor, whole: f64| {
            if one_layer {
                whole
            } else {
                inductance(&c.only_layer(1), circular).0
            }
        };
        let l1 = top(cond, l);
        let (lw, lw1) = if full {
            let bare = cond.without_leads();
            let lw = inductance(&bare, circular).0;
            (Some(lw), Some(top(&bare, lw)))
        } else {
            (None, None)
        };
        (l, method, l1, lw, lw1)
    } else {
        // One pass over the filament pairs gives all four sums.
        let s = filaments_inductances(&cond.filaments(NEUMANN_SAGITTA), full);
        let (lw, lw1) = if full {
            (Some(s.bare), Some(s.bare_top))
        } else {
            (None, None)
        };
        (s.whole, InductanceMethod::NeumannFilaments, s.top, lw, lw1)
    };
    let (d_out, d_in) = estimate_sizes(design, layout, cond);
    let n = layout.turns;
    let shape = match design.coil.shape {
        Shape::Circle => Some(MohanShape::Circle),
        Shape::Polygon { sides: 4 } => Some(MohanShape::Square),
        Shape::Polygon { sides: 6 } => Some(MohanShape::Hexagon),
        Shape::Polygon { sides: 8 } => Some(MohanShape::Octagon),
        Shape::Rectangle { width, height } if (width - height).abs() < 1e-9 => {
            Some(MohanShape::Square)
        }
        _ => None,
    };
    let (mw, cs, wh) = match shape {
        Some(s) if d_out > d_in && d_in > 0.0 => (
            closed_forms::mohan_modified_wheeler(s, n, m(d_out), m(d_in)),
            Some(closed_forms::mohan_current_sheet(s, n, m(d_out), m(d_in))),
            (s == MohanShape::Circle)
                .then(|| closed_forms::wheeler_1928(n, m(d_in / 2.0), m(d_out / 2.0))),
        ),
        _ => (None, None, None),
    };
    let estimates = match lw1 {
        None => vec![],
        Some(ours) => [
            (
                "mohan_modified_wheeler",
                closed_forms::MOHAN_SOURCE,
                "typically 2-3 %",
                mw,
            ),
            (
                "mohan_current_sheet",
                closed_forms::MOHAN_SOURCE,
                "typically 2-3 %",
                cs,
            ),
            (
                "wheeler_1928",
                closed_forms::WHEELER_1928_SOURCE,
                "within 5 % for a radial depth above 0.2 mean radius",
                wh,
            ),
        ]
        .into_iter()
        .filter_map(|(name, source, stated_accuracy, v)| {
            v.map(|v| PublishedEstimate {
                name,
                source,
                includes: ESTIMATE_INCLUDES,
                stated_accuracy,
                inductance_h: v,
                relative_difference: v / ours - 1.0,
            })
        })
        .collect(),
    };
    InductanceReport {
        inductance_h: l,
        method,
        single_layer_h: l1,
        winding_h: lw,
        single_layer_winding_h: lw1,
        mohan_modified_wheeler_h: mw,
        mohan_current_sheet_h: cs,
        wheeler_1928_h: wh,
        d_out_mm: d_out,
        d_in_mm: d_in,
        estimates,
    }
}

/// The outer and inner sizes the published formulas take, mm, as their
/// sources define them: `d_out` across the outer edge of the outermost
/// turn and `d_in` across the inner edge of the innermost turn of `n`
/// concentric turns (so `d_out - d_in = 2 n w + 2 (n - 1) s` for whole
/// `n`, Mohan et al. 1999), across flats for polygons (Mohan et al. 1999
/// draw both diameters from side to side, Fig. 1; recalled, REFERENCES.md
/// tag M).
///
/// A spiral's turns are not concentric: each concentric turn stands for
/// one turn of the spiral at that turn's mean size (averaged over the
/// angle it sweeps). The spiral grows one pitch per turn from its inner end
/// to its outer end, so the first turn's mean size lies half a pitch
/// outside the innermost centre line and the last turn's half a pitch
/// inside the outermost. For a circle the centre line's smallest and
/// largest radius give these. A shape with `N` straight sides grows by
/// steps: each side lies at its own distance from the axis, `p / N` beyond
/// the previous one, and the spiral starts and ends at the middle of a
/// side, so the angle-weighted mean of a turn is again half a pitch from
/// its first side: the sizes come from the nearest and farthest sides of
/// the top layer's winding, across flats, never converted from a corner
/// radius (which would include the round end of the trace, and with round
/// corners the corner arcs).
///
/// # Units
/// Millimetres.
pub fn estimate_sizes(design: &Design, layout: &Board, cond: &Conductor) -> (f64, f64) {
    let (w, p) = (layout.trace_width, layout.pitch);
    let circle = (2.0 * layout.outer_radius - p, 2.0 * layout.inner_radius + p);
    let Some(sides) = design.coil.shape.sides() else {
        return circle;
    };
    let apothems: Vec<f64> = cond
        .pieces
        .iter()
        .filter(|x| x.layer == 1 && x.role == TrackRole::Winding)
        .filter_map(|x| match x.segment {
            Segment::Line(l) => {
                let d = l.end - l.start;
                let len = d.length();
                (len > 1e-9).then(|| (l.start.to_vec2().cross(d) / len).abs())
            }
            Segment::Arc(_) => None,
        })
        .collect();
    let nearest = apothems.iter().copied().fold(f64::INFINITY, f64::min);
    let farthest = apothems.iter().copied().fold(0.0, f64::max);
    if apothems.len() < sides || farthest <= nearest {
        return circle;
    }
    (
        2.0 * (farthest - p / 2.0) + w,
        2.0 * (nearest + p / 2.0) - w,
    )
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
                    lead: false,
                });
            }
        }
        let lr = rings_inductance(&rings);
        let ln = filaments_inductance(&fil);
        assert!((ln / lr - 1.0).abs() < 0.01, "{ln} {lr}");
    }
}
