//! Finished thickness and minimum bend radius of the board.
//!
//! Bend ratios: about 10 x the finished thickness for one- and two-layer
//! flex, 20 x for multilayer flex (bent once to install), 100 x for dynamic
//! (repeated) bending: ratios commonly quoted from IPC-2223, common
//! practice, no single source.
//!
//! [`analyse`] is the analysis phase ([`Mechanics`]).

use super::caution::{Caution, Findings};
use crate::design::{BendKind, BoardKind, Design};
use serde::Serialize;

/// Thickness and bending limits (serialised as report.json's `mechanics`
/// object; thickness and bend radii also at the top level).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Mechanics {
    /// Copper + dielectric + cover (coverlay or solder mask) on both faces, mm.
    pub thickness_mm: f64,
    /// Minimum radius for a bend made once at installation, mm.
    pub bend_radius_min_mm: f64,
    /// Minimum radius for repeated (dynamic) bending, mm.
    pub bend_radius_dynamic_mm: f64,
    /// Ratio used for the static bend (10 or 20).
    pub static_ratio: f64,
    /// Ratio used for the dynamic bend (100).
    pub dynamic_ratio: f64,
    /// Where the ratios come from.
    pub source: String,
}

/// Finished thickness and bend radii of a design.
pub fn mechanics(design: &Design) -> Mechanics {
    let s = &design.stackup;
    let thickness = s.finished_thickness();
    let static_ratio = BendKind::Static.ratio(s.copper.len());
    let dynamic_ratio = BendKind::Dynamic.ratio(s.copper.len());
    let source = match s.kind {
        BoardKind::Flex => {
            "ratios commonly quoted from IPC-2223 (common practice, no single source)"
        }
        BoardKind::Rigid => {
            "rigid board: not meant to bend; flex ratios from IPC-2223 shown for comparison only (common practice)"
        }
    };
    Mechanics {
        thickness_mm: thickness,
        bend_radius_min_mm: static_ratio * thickness,
        bend_radius_dynamic_mm: dynamic_ratio * thickness,
        static_ratio,
        dynamic_ratio,
        source: source.into(),
    }
}

/// The bending phase of the analysis: [`mechanics`], with a caution when
/// the design's own bend (`stackup.bend_radius`) is tighter than the
/// minimum for its kind.
pub fn analyse(design: &Design, findings: &mut Findings) -> Mechanics {
    let mech = mechanics(design);
    if let Some(b) = design.stackup.bend {
        let need = match b.kind {
            BendKind::Static => mech.bend_radius_min_mm,
            BendKind::Dynamic => mech.bend_radius_dynamic_mm,
        };
        if b.radius < need {
            findings.caution(Caution::BendTooTight {
                radius_mm: b.radius,
                minimum_mm: need,
                bend: b.kind,
                thickness_mm: mech.thickness_mm,
            });
        }
        let layers = design.stackup.copper.len();
        if b.kind == BendKind::Dynamic && layers > 2 && design.stackup.kind == BoardKind::Flex {
            findings.caution(Caution::DynamicBendManyLayers { layers });
        }
    }
    mech
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn two_layer_flex_is_ten_times_thickness() {
        // Common practice, no source (ratios quoted from IPC-2223):
        // 10 x for two-layer flex; REFERENCES.md 0.1 mm -> 1 mm.
        let mut d = Design::sample();
        d.coil.layers = 2;
        d.stackup.copper = vec![0.0125, 0.0125];
        d.stackup.dielectric = vec![0.025];
        d.stackup.cover = 0.025;
        let m = mechanics(&d);
        assert!((m.thickness_mm - 0.1).abs() < 1e-12);
        assert!((m.bend_radius_min_mm - 1.0).abs() < 1e-12);
        assert!((m.bend_radius_dynamic_mm - 10.0).abs() < 1e-12);
        // Multilayer: 20 x (sample is 4 layers).
        let m4 = mechanics(&Design::sample());
        assert!((m4.bend_radius_min_mm - 20.0 * m4.thickness_mm).abs() < 1e-12);
    }
}
