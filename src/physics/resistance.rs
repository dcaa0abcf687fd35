//! DC resistance of the conductor: annealed copper (IACS, IEC 60028):
//! resistivity 1.7241e-8 ohm m at 20 C, temperature coefficient
//! 0.00393 /K. Track resistance from the centre-line length of every track
//! and its rectangular section; via barrels as plated tubes.
//!
//! [`resistance`] is the analysis phase ([`Resistance`]).

use super::conductor::{Conductor, m};
use crate::design::Design;
use crate::design::Wiring;
use crate::geometry::Board;
use serde::Serialize;
use std::f64::consts::PI;

/// Resistivity of annealed copper at 20 C, ohm m (IACS, IEC 60028).
pub const RHO_20: f64 = 1.7241e-8;
/// Temperature coefficient of resistance of annealed copper at 20 C, 1/K (IACS).
pub const ALPHA_20: f64 = 0.00393;

/// Resistance at `temp_c` of a resistance `r20` measured at 20 C, ohm.
pub fn at_temperature(r20: f64, temp_c: f64) -> f64 {
    r20 * (1.0 + ALPHA_20 * (temp_c - 20.0))
}

/// Resistance at 20 C of a straight bar, ohm.
///
/// # Units
/// `length`, `width`, `thickness` in metres.
pub fn bar(length: f64, width: f64, thickness: f64) -> f64 {
    RHO_20 * length / (width * thickness)
}

/// Length and resistance of one layer's winding.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LayerResistance {
    /// Copper layer, 1 = top.
    pub layer: u8,
    /// Position in the series chain (windings with the same group are in parallel).
    pub group: usize,
    /// Centre-line length of the layer's tracks (spiral and leads), mm.
    pub length_mm: f64,
    /// Copper thickness, um.
    pub copper_um: f64,
    /// Resistance at 20 C, ohm.
    pub resistance_ohm_20c: f64,
    /// Turns of the spiral part.
    pub turns: f64,
}

/// Resistance breakdown of the coil at 20 C (all of it written at the top
/// level of report.json, see [`super::Analysis`]).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Resistance {
    /// Total centre-line length of copper tracks, mm (vias excluded).
    pub trace_length_mm: f64,
    /// Per layer.
    pub layers: Vec<LayerResistance>,
    /// All via barrels together, as connected, ohm.
    pub vias_ohm_20c: f64,
    /// Terminal to terminal, ohm.
    pub total_ohm_20c: f64,
}

/// The analysis note on what the via resistance counts.
pub const VIAS_NOTE: &str = "via barrels counted as plated tubes between the copper centres of the layers they join; terminal pads' barrels not counted";

/// The resistance phase of the analysis: resistance of the coil from its
/// layout at 20 C (terminal pads' barrels are not counted: the connection
/// to the outside is the user's).
pub fn resistance(design: &Design, layout: &Board, cond: &Conductor) -> Resistance {
    let mut layers = Vec::new();
    for w in &layout.windings {
        let li = (w.layer as usize - 1).min(cond.layer_t.len() - 1);
        let t = cond.layer_t[li];
        let len: f64 = layout
            .winding_tracks(w)
            .iter()
            .map(|t| t.segment.length())
            .sum();
        let r: f64 = layout
            .winding_tracks(w)
            .iter()
            .map(|tr| bar(m(tr.segment.length()), m(tr.width), t))
            .sum();
        layers.push(LayerResistance {
            layer: w.layer,
            group: w.group,
            length_mm: len,
            copper_um: t * 1e6,
            resistance_ohm_20c: r,
            turns: w.turns,
        });
    }
    // Groups in series; windings of one group in parallel.
    let groups = layers.iter().map(|l| l.group).max().map_or(0, |g| g + 1);
    let mut total = 0.0;
    for g in 0..groups {
        let g_sum: f64 = layers
            .iter()
            .filter(|l| l.group == g)
            .map(|l| 1.0 / l.resistance_ohm_20c)
            .sum();
        if g_sum > 0.0 {
            total += 1.0 / g_sum;
        }
    }
    // Via barrels: a plated tube (finished hole = inner diameter), the
    // current crossing between the copper centres of the layers it joins.
    let plating = m(design.stackup.plating);
    let mut vias = 0.0;
    for v in &layout.vias {
        let zs: Vec<f64> = v
            .joins
            .iter()
            .map(|&l| cond.layer_z[(l as usize - 1).min(cond.layer_z.len() - 1)])
            .collect();
        let span = zs.iter().cloned().fold(f64::NEG_INFINITY, f64::max)
            - zs.iter().cloned().fold(f64::INFINITY, f64::min);
        let ri = m(v.drill) / 2.0;
        let area = PI * ((ri + plating).powi(2) - ri * ri);
        let r = if area > 0.0 {
            RHO_20 * span / area
        } else {
            0.0
        };
        // In parallel-pairs wiring the current meets the via from two
        // layers and leaves to two: about half the span in series.
        vias += match layout.wiring {
            Wiring::Series => r,
            Wiring::ParallelPairs => r / 2.0,
        };
    }
    Resistance {
        trace_length_mm: layout.track_length(),
        layers,
        vias_ohm_20c: vias,
        total_ohm_20c: total + vias,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn iacs_hand_calculation() {
        // REFERENCES.md [C] from IACS (IEC 60028): 1 m x 0.25 mm x 35 um is
        // 1.9704 ohm at 20 C and 2.4350 ohm at 80 C.
        let r = bar(1.0, 0.25e-3, 35e-6);
        assert!((r - 1.9704).abs() < 5e-5, "{r}");
        assert!((at_temperature(r, 80.0) - 2.4350).abs() < 5e-5);
    }
}
