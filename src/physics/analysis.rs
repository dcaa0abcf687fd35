//! The result of the analysis: one report per quantity, the cautions and
//! notes, and the inputs used; and its JSON form (`report.json`,
//! `report --json`), whose keys are a fixed contract.

use super::capacitance::CapacitanceReport;
use super::caution::Caution;
use super::drive::DriveReport;
use super::field::FieldReport;
use super::fin::FinReport;
use super::heating::HeatingReport;
use super::impedance::{AcModel, Impedance, ResponsePoint};
use super::inductance::InductanceReport;
use super::magnet::MagnetReport;
use super::mechanics::Mechanics;
use super::resistance::{self, Resistance};
use super::thermal::ThermalReport;
use crate::design::{Design, Magnet, Source};
use serde::Serialize;
use serde::ser::{SerializeStruct, Serializer};

/// Results of the analysis: one report per quantity (SI units in the field
/// names), in the order the pipeline computes them.
#[derive(Debug, Clone, PartialEq)]
pub struct Analysis {
    /// Trace length and resistance at 20 C, per layer and of the vias.
    pub resistance: Resistance,
    /// Heating at the drive: operating point, drive limits, pulse length.
    pub thermal: ThermalReport,
    /// Inductance and the published estimates beside it.
    pub inductance: InductanceReport,
    /// Impedance at the drive frequency, if one is given.
    pub impedance: Option<Impedance>,
    /// Self-capacitance and self-resonance.
    pub capacitance: CapacitanceReport,
    /// Impedance against frequency (log-spaced, DC-like to three times
    /// the self-resonance; empty in a sweep's analysis).
    pub response: Vec<ResponsePoint>,
    /// The AC model: answers at any frequency ([`Analysis::q_at`],
    /// [`Analysis::impedance_at`]).
    pub ac: AcModel,
    /// Field profiles.
    pub field: FieldReport,
    /// Force on the magnet, if there is one.
    pub magnet: Option<MagnetReport>,
    /// Thickness and bending.
    pub mechanics: Mechanics,
    /// The drive over time: current, power, harmonics.
    pub drive: DriveReport,
    /// Heating over time from switch-on.
    pub heating: HeatingReport,
    /// The flexible fin's motion, if the design has a `[fin]`.
    pub fin: Option<FinReport>,
    /// The rotor's flux linkage, back-EMF and torque, for an array with a
    /// `[rotor]` whose magnets are sized.
    pub rotor: Option<super::rotor::RotorReport>,
    /// Coils on the board, phases, winding factor (1, 1, `None` for a coil
    /// alone).
    pub whole: (usize, usize, Option<f64>),
    /// The array's phases, `None` for a coil alone.
    pub array: Option<super::array::ArrayReport>,
    /// Limits of the design exceeded, and results to distrust, in the
    /// order found (limits first).
    pub cautions: Vec<Caution>,
    /// Assumptions and approximations.
    pub notes: Vec<String>,
    /// The inputs used.
    pub inputs: Inputs,
}

impl Analysis {
    /// Q of the coil at `f` (Hz): `omega L / R_ac(f)` with the AC
    /// resistance (skin and proximity effect) at the operating temperature.
    pub fn q_at(&self, f: f64) -> f64 {
        self.ac.q(f)
    }

    /// AC resistance at `f` (Hz), ohm.
    pub fn resistance_ac_at(&self, f: f64) -> f64 {
        self.ac.resistance(f)
    }

    /// The lumped model (`R_ac + j omega L` in parallel with the
    /// self-capacitance) at `f` (Hz).
    pub fn impedance_at(&self, f: f64) -> ResponsePoint {
        self.ac.point(f)
    }

    /// Self-resonant frequency, Hz (infinite when there is no
    /// capacitance).
    pub fn self_resonance_hz(&self) -> f64 {
        self.capacitance.self_resonance_hz
    }
}

/// The inputs the analysis used.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Inputs {
    /// Drive (voltage or current).
    pub drive: Source,
    /// Ambient, C.
    pub ambient_c: f64,
    /// Highest allowed temperature, C.
    pub max_temperature_c: f64,
    /// Convection override, W/(m^2 K).
    pub convection_w_per_m2k: Option<f64>,
    /// Emissivity.
    pub emissivity: f64,
    /// Frequency of the waveform and for impedance, Hz.
    pub frequency_hz: Option<f64>,
    /// Waveform.
    pub waveform: crate::design::Waveform,
    /// Fraction of the period on.
    pub duty: f64,
    /// Square: reverses instead of off.
    pub bipolar: bool,
    /// What the board gives its heat to.
    pub surroundings: crate::design::Surroundings,
    /// The fin.
    pub fin: Option<crate::design::Fin>,
    /// Copper thickness per layer, um.
    pub copper_um: Vec<f64>,
    /// Dielectric thickness per gap, um.
    pub dielectric_um: Vec<f64>,
    /// Via plating, um.
    pub plating_um: f64,
    /// Cover thickness on each face, um.
    pub cover_um: f64,
    /// Magnet.
    pub magnet: Option<Magnet>,
    /// Resistivity at 20 C, ohm m.
    pub resistivity_ohm_m: f64,
    /// Temperature coefficient, 1/K.
    pub temperature_coefficient_per_k: f64,
}

impl Inputs {
    /// The inputs of a design's analysis.
    pub fn of(design: &Design) -> Inputs {
        let drive = &design.drive;
        Inputs {
            drive: drive.source,
            ambient_c: drive.ambient,
            max_temperature_c: drive.max_temperature,
            convection_w_per_m2k: drive.convection,
            emissivity: drive.emissivity,
            frequency_hz: drive.frequency,
            waveform: drive.waveform,
            duty: drive.duty,
            bipolar: drive.bipolar,
            surroundings: drive.surroundings,
            fin: design.fin,
            copper_um: design.stackup.copper.iter().map(|c| c * 1e3).collect(),
            dielectric_um: design.stackup.dielectric.iter().map(|c| c * 1e3).collect(),
            plating_um: design.stackup.plating * 1e3,
            cover_um: design.stackup.cover * 1e3,
            magnet: design.magnet,
            resistivity_ohm_m: resistance::RHO_20,
            temperature_coefficient_per_k: resistance::ALPHA_20,
        }
    }
}

/// The JSON report: the headline numbers at the top level (taken from the
/// quantities' reports), then one object per quantity, the cautions as
/// text (`warnings`), the notes and the inputs. Scripts rely on these keys
/// and their order; the quantities' reports leave out (`serde(skip)`) what
/// is written here at the top level.
impl Serialize for Analysis {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let (r, t, m) = (&self.resistance, &self.thermal, &self.mechanics);
        let magnet = self.magnet.as_ref();
        let fin = self.fin.as_ref();
        let (d, h) = (&self.drive, &self.heating);
        let mut s = serializer.serialize_struct("Analysis", 63)?;
        s.serialize_field("trace_length_mm", &r.trace_length_mm)?;
        s.serialize_field("resistance_ohm_20c", &r.total_ohm_20c)?;
        s.serialize_field("resistance_ohm_hot", &t.resistance_ohm_hot)?;
        s.serialize_field("inductance_h", &self.inductance.inductance_h)?;
        s.serialize_field("field_center_t_per_a", &self.field.center_t_per_a)?;
        s.serialize_field("force_n", &magnet.map(|x| x.force_n))?;
        s.serialize_field("force_per_a_n", &magnet.map(|x| x.force_per_a_n))?;
        s.serialize_field("force_per_sqrt_w_n", &magnet.map(|x| x.force_per_sqrt_w_n))?;
        s.serialize_field("temperature_c", &t.temperature_c)?;
        s.serialize_field("max_voltage_v", &t.max_voltage_v)?;
        s.serialize_field("max_current_a", &t.max_current_a)?;
        s.serialize_field("thickness_mm", &m.thickness_mm)?;
        s.serialize_field("bend_radius_min_mm", &m.bend_radius_min_mm)?;
        s.serialize_field("bend_radius_dynamic_mm", &m.bend_radius_dynamic_mm)?;
        s.serialize_field("current_a", &t.current_a)?;
        s.serialize_field("voltage_v", &t.voltage_v)?;
        s.serialize_field("power_w", &t.power_w)?;
        s.serialize_field("layers", &r.layers)?;
        s.serialize_field("vias_ohm_20c", &r.vias_ohm_20c)?;
        s.serialize_field("inductance", &self.inductance)?;
        s.serialize_field("impedance", &self.impedance)?;
        s.serialize_field("field", &self.field)?;
        s.serialize_field("magnet", &self.magnet)?;
        s.serialize_field("thermal", &self.thermal)?;
        s.serialize_field("mechanics", &self.mechanics)?;
        s.serialize_field("current_rms_a", &d.current_rms_a)?;
        s.serialize_field("current_peak_a", &d.current_peak_a)?;
        s.serialize_field("power_avg_w", &d.power_avg_w)?;
        s.serialize_field("temperature_peak_c", &h.temperature_peak_c)?;
        s.serialize_field("temperature_board_c", &t.temperature_board_c)?;
        s.serialize_field("time_to_max_temperature_s", &h.time_to_max_temperature_s)?;
        s.serialize_field("rise_time_s", &h.rise_time_s)?;
        s.serialize_field(
            "fin_bending_stiffness_n_m2",
            &fin.map(|f| f.bending_stiffness_n_m2),
        )?;
        s.serialize_field("fin_stiffness_n_per_m", &fin.map(|f| f.stiffness_n_per_m))?;
        s.serialize_field("fin_resonance_hz", &fin.map(|f| f.resonance_hz))?;
        s.serialize_field("fin_deflection_mm", &fin.and_then(|f| f.deflection_mm))?;
        s.serialize_field("fin_amplitude_mm", &fin.map(|f| f.amplitude_mm))?;
        s.serialize_field("fin_stable", &fin.map(|f| f.stable))?;
        let motor = self.rotor.as_ref().map(|r| &r.constants);
        s.serialize_field(
            "back_emf_v_per_rad_s",
            &motor.map(|c| c.back_emf_v_per_rad_s),
        )?;
        s.serialize_field(
            "torque_constant_n_m_per_a",
            &motor.map(|c| c.torque_constant_n_m_per_a),
        )?;
        s.serialize_field(
            "torque_ripple_percent",
            &motor.map(|c| c.torque_ripple_percent),
        )?;
        let load = self.rotor.as_ref().and_then(|r| r.load);
        s.serialize_field(
            "motor_constant_n_m_per_sqrt_w",
            &load.map(|l| l.motor_constant_n_m_per_sqrt_w),
        )?;
        s.serialize_field("torque_max_n_m", &load.map(|l| l.torque_max_n_m))?;
        s.serialize_field("copper_loss_w", &load.and_then(|l| l.copper_loss_w))?;
        s.serialize_field("drive", &self.drive)?;
        s.serialize_field("heating", &self.heating)?;
        s.serialize_field("fin", &self.fin)?;
        s.serialize_field("rotor", &self.rotor)?;
        s.serialize_field("warnings", &Texts(&self.cautions))?;
        s.serialize_field("notes", &self.notes)?;
        s.serialize_field("inputs", &self.inputs)?;
        let z = self.impedance.as_ref();
        s.serialize_field("resistance_ohm_ac", &z.map(|z| z.resistance_ac_ohm))?;
        s.serialize_field("inductance_h_ac", &z.map(|z| z.inductance_h))?;
        s.serialize_field("capacitance_f", &self.capacitance.capacitance_f)?;
        s.serialize_field(
            "self_resonance_hz",
            &finite(self.capacitance.self_resonance_hz),
        )?;
        s.serialize_field("q_factor", &z.map(|z| z.q))?;
        s.serialize_field("capacitance", &self.capacitance)?;
        s.serialize_field("impedance_curve", &self.response)?;
        // Many coils on one board (for a coil alone: 1 coil, 1 phase, no
        // winding factor, and the coil's own resistance and inductance).
        s.serialize_field("coils", &self.whole.0)?;
        s.serialize_field("phases", &self.whole.1)?;
        s.serialize_field("winding_factor", &self.whole.2)?;
        s.serialize_field("phase_resistance_ohm_20c", &r.total_ohm_20c)?;
        s.serialize_field("phase_inductance_h", &self.inductance.inductance_h)?;
        s.serialize_field("array", &self.array)?;
        s.end()
    }
}

/// A number, or null where it is infinite.
fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

/// Cautions serialised as their text.
struct Texts<'a>(&'a [Caution]);

impl Serialize for Texts<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.collect_seq(self.0.iter().map(ToString::to_string))
    }
}
