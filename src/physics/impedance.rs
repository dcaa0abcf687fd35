//! Impedance at the drive frequency: reactance, magnitude and Q from the
//! inductance and the resistance at the operating temperature, and the
//! skin depth in copper (`delta = sqrt(rho / (pi f mu0))`, textbook), which
//! says when the DC resistance used here is too low.
//!
//! [`analyse`] is the analysis phase ([`Impedance`]).

use super::MU0;
use super::caution::Findings;
use super::conductor::Conductor;
use super::resistance::{ALPHA_20, RHO_20};
use super::thermal::ThermalReport;
use crate::design::Design;
use serde::Serialize;

/// Impedance at the drive frequency (serialised as report.json's
/// `impedance` object).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Impedance {
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// Reactance 2 pi f L, ohm.
    pub reactance_ohm: f64,
    /// Magnitude of R + jX with R the DC resistance at the operating
    /// temperature, ohm.
    pub impedance_ohm: f64,
    /// Quality factor X / R.
    pub q: f64,
    /// Skin depth in copper, um; where it is below half the copper
    /// thickness the AC resistance is higher than the DC value used here.
    pub skin_depth_um: f64,
}

/// The impedance phase of the analysis, when the design gives a drive
/// frequency above zero: from the inductance `l` (H) and the operating
/// point of `thermal`, with a note when the skin depth is below half the
/// copper thickness.
pub fn analyse(
    design: &Design,
    cond: &Conductor,
    l: f64,
    thermal: &ThermalReport,
    findings: &mut Findings,
) -> Option<Impedance> {
    let (t_op, r_hot) = (thermal.operating_c, thermal.resistance_ohm_hot);
    let impedance = design.drive.frequency.filter(|f| *f > 0.0).map(|f| {
        let x = 2.0 * std::f64::consts::PI * f * l;
        let rho = RHO_20 * (1.0 + ALPHA_20 * (t_op - 20.0));
        let delta = (rho / (std::f64::consts::PI * f * MU0)).sqrt();
        Impedance {
            frequency_hz: f,
            reactance_ohm: x,
            impedance_ohm: r_hot.hypot(x),
            q: x / r_hot,
            skin_depth_um: delta * 1e6,
        }
    });
    if let Some(z) = &impedance {
        let tmax = cond.layer_t.iter().cloned().fold(0.0, f64::max) * 1e6;
        if z.skin_depth_um < tmax / 2.0 {
            findings.note(format!(
                "skin depth {:.1} um is below half the copper thickness: AC resistance is higher and Q lower than shown",
                z.skin_depth_um
            ));
        }
    }
    impedance
}
