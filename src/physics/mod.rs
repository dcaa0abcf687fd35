//! Engineering analysis of a layout: resistance, inductance, field, force on
//! a magnet, heating and bending, computed on the real conductor (every
//! track of every layer, in current order) and cross-checked against
//! published closed forms.
//!
//! [`analyse_with`] reads as the pipeline: each phase is one call into
//! the module of its quantity, which owns the code and the report struct:
//! [`resistance`], [`inductance`] (with the published estimates),
//! [`thermal`] (operating point under the drive's average power, hottest
//! copper by the lateral [`spread`], drive limits, pulse), [`capacitance`]
//! (self-capacitance and self-resonance), [`impedance`] (AC resistance by
//! [`section`] responses on the [`chords`], current sharing, impedance
//! against frequency),
//! [`field`] (Biot-Savart), [`magnet`] (force), [`mechanics`] (thickness,
//! bending), [`drive`] (the waveform's current over a period, harmonics),
//! [`heating`] (temperature from switch-on, ripple) and [`fin`] (the
//! flexible fin's stiffness, resonance and swing).
//! [`Analysis`] is made of their reports; the phases add [`Caution`]s and
//! notes to one [`Findings`]. Beside them: [`conductor`] (the layout as
//! current paths in SI units), [`gmd`] (geometric mean distances),
//! [`closed_forms`] (published formulas used as cross-checks), [`coupling`]
//! (two coils across a gap, for `coilwright couple`) and the one
//! SIMD module (vector paths, CPU detection once). Root finding,
//! quadrature and elliptic integrals are in [`crate::numeric`].
//!
//! All results are estimates: see the cautions in the report.
//!
//! # Accuracy against outside references (tests name the sources)
//! * Biot-Savart: loop and flat-spiral closed forms to 1e-6; magpylib on the
//!   same polylines to 1e-7 of the largest value (tests/suite/physics_magpylib.rs).
//! * Mutual inductance: Maxwell's formula to the scipy values of
//!   REFERENCES.md (30.0288 nH, 5.02280 nH); Grover's ring 66.96 nH.
//! * One-layer 20 mm, 10-turn circular coil: within 0.3 % of a Grover sum of
//!   concentric rings, 1.1 % of Mohan's current sheet, 2.2 % of Wheeler 1928;
//!   square coil within 0.6 % / 1.7 % of Mohan's current sheet / modified
//!   Wheeler; Neumann filaments and Maxwell rings agree within 0.5 %.
//! * Two coils: Neumann on loops within 1e-6 of Maxwell's formula, on
//!   straight filaments of Grover's closed forms; spirals on real copper
//!   within 0.3 % of a Maxwell sum over turns, and 0.2 % of magpylib's
//!   flux (tests/suite/coupling.rs).
//! * Force on a magnet: real conductor within 0.1 % of magpylib's cylinder
//!   field; the coaxial-ring cross-check within 0.1 % for circles and 2 %
//!   for hexagons (rectangles are far from circles: tens of percent).

mod analysis;
pub mod array;
pub mod capacitance;
pub mod caution;
pub mod chords;
pub mod closed_forms;
pub mod conductor;
pub mod coupling;
pub mod drive;
pub mod field;
pub mod fin;
pub mod gmd;
pub mod heating;
pub mod impedance;
pub mod inductance;
pub mod magnet;
pub mod mechanics;
pub mod resistance;
pub mod rotor;
pub mod section;
#[allow(unsafe_code)]
mod simd;
pub mod spread;
pub mod thermal;

pub use analysis::{Analysis, Inputs};
pub use capacitance::CapacitanceReport;
pub use caution::{Caution, CautionKind, Findings};
pub use drive::DriveReport;
pub use field::{FIELD_SAGITTA, FIELD_SAGITTA_METRICS, FieldReport, ProfilePoint};
pub use fin::FinReport;
pub use heating::HeatingReport;
pub use impedance::{AcModel, Impedance, ResponsePoint};
pub use inductance::{InductanceReport, PublishedEstimate};
pub use magnet::{GapPoint, MagnetReport};
pub use mechanics::Mechanics;
pub use resistance::Resistance;
pub use simd::use_plain_arithmetic;
pub use thermal::ThermalReport;

use crate::design::Design;
use crate::geometry::Board;
use conductor::Conductor;

/// Magnetic constant, H/m: the conventional value 4 pi 1e-7 (CODATA 2022
/// differs by about 1e-10 relative).
pub const MU0: f64 = 4e-7 * std::f64::consts::PI;

/// Why a layout cannot be analysed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum AnalysisError {
    /// The layout has no winding copper.
    #[error("the layout has no windings to analyse")]
    Empty,
    /// The stack-up does not give a copper thickness for a layer.
    #[error("stackup.copper has {given} values for {layers} layers")]
    Stackup {
        /// Values given.
        given: usize,
        /// Layers in the layout.
        layers: u8,
    },
}

/// `f` over `0..n`, collected in order: in parallel, unless this thread is
/// already one of rayon's workers (a sweep evaluates its candidates in
/// parallel, and splitting each candidate's sums again only adds
/// overhead). The same inputs give the same results either way.
pub(crate) fn map_indices<R: Send>(n: usize, f: impl Fn(usize) -> R + Sync + Send) -> Vec<R> {
    use rayon::prelude::*;
    if rayon::current_thread_index().is_some() {
        (0..n).map(f).collect()
    } else {
        (0..n).into_par_iter().map(f).collect()
    }
}

/// Frequencies on the report's impedance curve.
pub const CURVE_POINTS: usize = 200;

/// How much of the analysis to compute.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Detail {
    /// Everything, with profiles and curves fine enough for plots.
    #[default]
    Full,
    /// Every scalar metric with the same methods, but profiles and curves
    /// on few points (axis: the surface and one height; across the coil:
    /// 13 points before the fall radii are refined; force against gap:
    /// none) and the field on coarser balanced filaments
    /// ([`FIELD_SAGITTA_METRICS`]). For sweeps.
    Metrics,
    /// What `check` needs: every caution and limit, computed as for
    /// [`Detail::Metrics`], but the inductance only when the drive's
    /// power depends on it ([`drive::Wave::power_needs_inductance`]; a
    /// steady drive's heating does not, nor, without a frequency, its
    /// impedance), and no impedance curve. The inductance
    /// is the slowest sum of a large polygon coil (Neumann's formula over
    /// all filament pairs), and the rule check is fast at any size.
    Limits,
}

/// Analyses a layout of a design.
///
/// # Errors
/// [`AnalysisError`] when the layout has no windings or the stack-up does
/// not match it.
pub fn analyse(design: &Design, layout: &Board) -> Result<Analysis, AnalysisError> {
    analyse_with(design, layout, Detail::Full)
}

/// Analyses a layout of a design at the given level of detail.
///
/// # Errors
/// As [`analyse`].
pub fn analyse_with(
    design: &Design,
    layout: &Board,
    detail: Detail,
) -> Result<Analysis, AnalysisError> {
    // An array is analysed as its first phase alone (its coils and own
    // buses, in current order): the phase resistance and inductance.
    let board = layout;
    let whole = (
        layout.coils.len().max(1),
        layout.phases.len().max(1),
        layout.winding_factor,
    );
    let view;
    let layout = if layout.phases.is_empty() {
        layout
    } else {
        view = layout.phase_view(0);
        &view
    };
    check_inputs(design, layout)?;
    let cond = Conductor::new(design, layout);
    let mut found = Findings::default();
    let resistance = resistance::resistance(design, layout, &cond);
    // With a frequency the limits include how near self-resonance it is.
    let inductance = if detail == Detail::Limits
        && !drive::Wave::of(&design.drive).power_needs_inductance()
        && design.drive.frequency.is_none()
    {
        InductanceReport::not_computed()
    } else {
        inductance::analyse(design, layout, &cond, detail)
    };
    // The phases' inductances with the full analysis (phase A's is the
    // report's, on the same copper).
    let full_l = (detail == Detail::Full).then_some(inductance.inductance_h);
    let array = array::analyse(design, board, full_l);
    let circuit = (resistance.total_ohm_20c, inductance.inductance_h);
    // Every phase's loss heats the board.
    let thermal = thermal::analyse(design, layout, &cond, circuit, whole.1, &mut found);
    let field = field::analyse(design, layout, &cond, detail, thermal.current_a);
    // The coaxial rings of the copper, with a magnet: the force's
    // cross-check and the fin's force against the gap.
    let rings = if design.magnet.is_some() {
        cond.rings()
    } else {
        Vec::new()
    };
    let magnet = design.magnet.map(|mg| {
        let drive = (thermal.current_a, thermal.power_w);
        magnet::analyse(design, &mg, &cond, &rings, detail, drive, &mut found)
    });
    let full = detail == Detail::Full;
    let frequency = design.drive.frequency.filter(|f| *f > 0.0);
    let t_max = cond.layer_t.iter().cloned().fold(0.0, f64::max);
    // A sweep leaves the proximity field out where it cannot matter (a
    // slow waveform's repetition rate) and then finds neighbours on fewer
    // chords; `check` (Limits) takes the report's chords, so that its
    // cautions are the report's.
    let proximity = frequency.is_some_and(|f| {
        let turns = layout.turns * layout.layers as f64;
        impedance::proximity_matters(f, turns, conductor::m(layout.trace_width), t_max)
    });
    let most = if detail == Detail::Metrics && !proximity {
        chords::MAX_CHORDS_METRICS
    } else {
        chords::MAX_CHORDS
    };
    let chords = chords::chords(design, layout, &cond, most);
    let capacitance = capacitance::analyse(
        design,
        &chords,
        layout.layers as usize,
        inductance.inductance_h,
    );
    let ac = impedance::AcModel::new(
        design,
        layout,
        &cond,
        &chords,
        &resistance,
        inductance.inductance_h,
        capacitance.capacitance_f,
        thermal.resistance_ohm_hot / resistance.total_ohm_20c,
        full || proximity,
    );
    let r_hot = thermal.resistance_ohm_hot;
    let impedance = impedance::analyse(design, &ac, r_hot, t_max, &mut found);
    let response = if full {
        let (lo, hi) = ac.span(t_max, frequency);
        ac.curve(lo, hi, CURVE_POINTS)
    } else {
        Vec::new()
    };
    let mechanics = mechanics::analyse(design, &mut found);
    let drive = drive::analyse(
        &design.drive,
        thermal.resistance_ohm_hot,
        inductance.inductance_h,
        magnet.as_ref().map(|m| m.force_per_a_n),
        full,
    );
    let heating = heating::analyse(design, &thermal, full, &mut found);
    let fin = magnet
        .as_ref()
        .and_then(|mr| fin::analyse(design, layout, &rings, mr, &drive, full, &mut found));
    let rotor = match (design.rotor, detail) {
        (_, Detail::Limits) => None,
        (Some(r), _) if !board.phases.is_empty() => r.magnets.map(|m| {
            let mut report = rotor::analyse(&r, &m, &rotor::phase_copper(design, board), full);
            found.note(report.method_note());
            // The board's heat limit: what it sheds with its hottest copper
            // at max_temperature, and the phase resistance there.
            let b = &thermal.board;
            let t_avg = b.average_for_hottest(design.drive.max_temperature);
            let r20 = resistance.total_ohm_20c;
            let limit = (
                b.losses(t_avg).power_w,
                resistance::at_temperature(r20, b.winding_at(t_avg)),
            );
            let load = rotor::MotorLoad::of(&report.constants, whole.1, r20, limit, r.torque);
            if let Some(t) = r.torque
                && t > load.torque_max_n_m
            {
                found.caution(Caution::TorqueAboveLimit {
                    torque_n_m: t,
                    limit_n_m: load.torque_max_n_m,
                    max_temperature_c: design.drive.max_temperature,
                });
            }
            report.load = Some(load);
            report
        }),
        _ => None,
    };
    if inductance.method != inductance::InductanceMethod::NotComputed {
        found.note(inductance.method_note());
    }
    found.note(resistance::VIAS_NOTE);
    found.note(thermal::LUMPED_NOTE);
    Ok(Analysis {
        resistance,
        thermal,
        inductance,
        impedance,
        capacitance,
        response,
        ac,
        field,
        magnet,
        mechanics,
        drive,
        heating,
        fin,
        rotor,
        whole,
        array,
        cautions: found.cautions,
        notes: found.notes,
        inputs: Inputs::of(design),
    })
}

/// Whether the layout can be analysed with the design's stack-up.
fn check_inputs(design: &Design, layout: &Board) -> Result<(), AnalysisError> {
    if layout.windings.is_empty() || layout.tracks.is_empty() {
        return Err(AnalysisError::Empty);
    }
    if design.stackup.copper.len() < layout.layers as usize {
        return Err(AnalysisError::Stackup {
            given: design.stackup.copper.len(),
            layers: layout.layers,
        });
    }
    Ok(())
}
