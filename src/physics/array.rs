//! Many coils on one board: the phases as the physics sees them. An array
//! is analysed as its phase A alone ([`crate::geometry::Board::phase_view`]:
//! its coils in the sense the phase passes them, and its own buses), so the
//! resistance and inductance of the report are the phase's; this module
//! adds what the whole board tells: coils, phases, the winding factor and
//! each phase's resistance on its own copper.

use super::conductor::{Conductor, Filament, m};
use super::inductance::{NEUMANN_SAGITTA, filaments_inductance, filaments_mutual};
use super::resistance::RHO_20;
use crate::design::Design;
use crate::geometry::Board;
use serde::Serialize;

/// One phase of an array (report.json's `array.phases`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PhaseReport {
    /// "A", "B" or "C".
    pub name: String,
    /// Its coils, numbered from 1 in ring order, with the sense the phase
    /// current passes them (+1 as built, -1 entering at the coil's pad 2).
    pub coils: Vec<(usize, f64)>,
    /// Track resistance of the phase at 20 C (its coils and own buses, via
    /// barrels left out), ohm.
    pub tracks_ohm_20c: f64,
    /// Self-inductance of the phase (Neumann's formula on its filaments),
    /// H; `None` below the full analysis.
    pub inductance_h: Option<f64>,
}

/// The mutual inductance of two phases (report.json's
/// `array.mutual_inductance`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PhaseMutual {
    /// The two phases, e.g. `["A", "B"]`.
    pub phases: [String; 2],
    /// Mutual inductance by Neumann's formula on both phases' filaments,
    /// each phase's current entering at its start, H.
    pub mutual_inductance_h: f64,
    /// Coupling coefficient `M / sqrt(L1 L2)`.
    pub coupling: f64,
}

/// The array (report.json's `array`; `null` for a coil alone).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ArrayReport {
    /// How the phases meet their pads: "star", "delta" or "separate".
    pub connection: crate::design::Connection,
    /// Rotor poles, if a rotor is given.
    pub poles: Option<u32>,
    /// Each phase.
    pub phases: Vec<PhaseReport>,
    /// Names of the terminal pads.
    pub terminals: Vec<String>,
    /// Mutual inductance of every pair of phases (full analysis only;
    /// empty for one phase).
    pub mutual_inductance: Vec<PhaseMutual>,
}

/// The array report of `design` on `board` (the whole board, not a phase's
/// view), `None` for a coil alone.
/// With `phase_a_inductance` (phase A's self-inductance, H, as the report
/// computed it on the same copper), the other phases' self-inductances and
/// every pair's mutual inductance are computed (Neumann's formula on the
/// phases' filaments, [`filaments_inductance`], [`filaments_mutual`]: the
/// same pair integral as the report's inductance).
pub fn analyse(
    design: &Design,
    board: &Board,
    phase_a_inductance: Option<f64>,
) -> Option<ArrayReport> {
    let array = design.array?;
    if board.phases.is_empty() {
        return None;
    }
    let conductors: Vec<Conductor> = (0..board.phases.len())
        .map(|ph| Conductor::of_phase(design, board, ph))
        .collect();
    let filaments: Vec<Vec<Filament>> = if phase_a_inductance.is_some() {
        conductors
            .iter()
            .map(|c| c.filaments(NEUMANN_SAGITTA))
            .collect()
    } else {
        Vec::new()
    };
    let selfs: Vec<f64> = filaments
        .iter()
        .enumerate()
        .map(|(ph, f)| match (ph, phase_a_inductance) {
            (0, Some(l)) => l,
            _ => filaments_inductance(f),
        })
        .collect();
    let mut mutual = Vec::new();
    for a in 0..filaments.len() {
        for b in a + 1..filaments.len() {
            let m = filaments_mutual(&filaments[a], &filaments[b]);
            mutual.push(PhaseMutual {
                phases: [board.phases[a].name.clone(), board.phases[b].name.clone()],
                mutual_inductance_h: m,
                coupling: m / (selfs[a] * selfs[b]).sqrt(),
            });
        }
    }
    let phases = (0..board.phases.len())
        .map(|ph| PhaseReport {
            name: board.phases[ph].name.clone(),
            coils: board.phases[ph]
                .coils
                .iter()
                .map(|&(k, s)| (k + 1, s))
                .collect(),
            tracks_ohm_20c: tracks_resistance(&conductors[ph]),
            inductance_h: selfs.get(ph).copied(),
        })
        .collect();
    Some(ArrayReport {
        connection: array.connection,
        poles: design.rotor.map(|r| r.poles),
        phases,
        terminals: board
            .buses
            .iter()
            .filter_map(|b| b.terminal.clone())
            .collect(),
        mutual_inductance: mutual,
    })
}

/// DC resistance of a conductor's tracks at 20 C, ohm: each piece's
/// `rho L / (w t)` times its share of the current squared (which is the
/// series sum in series and the parallel combination for windings in
/// parallel that share the current by conductance).
pub fn tracks_resistance(c: &Conductor) -> f64 {
    c.pieces
        .iter()
        .map(|p| RHO_20 * m(p.segment.length()) / (p.width * p.thickness) * p.weight * p.weight)
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A 9-coil three-phase ring: every phase has three coils, its
    /// resistance is three coils' plus its buses' (the copper is the same
    /// copy, so the coil part is exact), and the phases differ only by
    /// their bus lengths.
    #[test]
    fn each_phase_is_three_coils_and_its_buses() {
        let text = include_str!("../../examples/fan-stator.toml");
        let (d, board) = crate::pipeline::parse_and_build(text).unwrap();
        let single = crate::geometry::build(&d).unwrap();
        let one = tracks_resistance(&Conductor::new(&d, &single));
        let r = analyse(&d, &board, None).unwrap();
        assert_eq!(r.phases.len(), 3);
        let rho_per_mm = RHO_20 * 1e-3 / (m(d.coil.trace_width) * m(d.stackup.copper[0]));
        for (ph, p) in r.phases.iter().enumerate() {
            assert_eq!(p.coils.len(), 3);
            let bus_mm: f64 = board.phases[ph]
                .buses
                .iter()
                .flat_map(|&b| board.tracks[board.buses[b].tracks.clone()].iter())
                .map(|t| t.segment.length())
                .sum();
            let want = 3.0 * one + bus_mm * rho_per_mm;
            assert!(
                (p.tracks_ohm_20c / want - 1.0).abs() < 1e-6,
                "{} vs {want}",
                p.tracks_ohm_20c
            );
        }
        assert_eq!(r.terminals, ["A", "B", "C", "N"]);
    }
}
