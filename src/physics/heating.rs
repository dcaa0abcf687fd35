//! Heating over time from switch-on, and the temperature ripple of slow
//! waveforms.
//!
//! * The curve: the board's energy balance `C dT/dt = P(T) - P_out(T)` (the
//!   same coefficients as the steady balance in [`super::thermal`], the
//!   drive's average power at the winding's temperature) integrated from
//!   ambient by the classical fourth-order Runge-Kutta method; the hottest
//!   copper follows the board average through the lateral spread (its
//!   profile settles far faster than the board heats). The rise time is
//!   that of this curve: when the hottest copper reaches 63.2 % of its
//!   final rise (the `1 - 1/e` point of a first-order rise), computed
//!   exactly by separating the variables (`t = int C dT / (P_in - P_out)`).
//!   Slow waveforms (period above 1/100 of the rise) are integrated with
//!   the power within each period instead of its average.
//! * The ripple: within one period of the drive the power `i(t)^2 R`
//!   swings; the board answers as the first-order system
//!   `C dθ/dt = p(t) - G θ` linearised at the steady temperature
//!   (`G = dP_out/dT`), solved for its periodic state exactly on 400 steps
//!   of piecewise-constant power. Slow waveforms (period long against
//!   `C/G`) ripple by nearly the full on/off swing; fast ones by nothing.
//!
//! [`analyse`] is the analysis phase ([`HeatingReport`]).

use super::caution::{Caution, Findings};
use super::drive::Wave;
use super::resistance::at_temperature;
use super::thermal::ThermalReport;
use crate::design::{Design, Waveform};
use crate::numeric::quadrature::adaptive_simpson;
use serde::Serialize;

/// One point of the heating curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct HeatPoint {
    /// Time from switch-on, s.
    pub t_s: f64,
    /// Hottest copper, C.
    pub hottest_c: f64,
    /// Board average, C.
    pub board_c: f64,
}

/// Heating over time (report.json's `heating` object; the peak and the
/// time to the limit also at the top level).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HeatingReport {
    /// Time from switch-on to 63.2 % of the final rise of the hottest
    /// copper, s (`None` without a steady state).
    pub rise_time_s: Option<f64>,
    /// Time from switch-on until the hottest copper reaches
    /// max_temperature, s (`None`: never).
    pub time_to_max_temperature_s: Option<f64>,
    /// Swing of the hottest copper above its mean within one period of the
    /// drive, K.
    pub ripple_k: f64,
    /// Steady hottest copper plus the ripple, C (`None` without a steady
    /// state).
    pub temperature_peak_c: Option<f64>,
    /// The curve from switch-on (full detail only).
    pub curve: Vec<HeatPoint>,
}

/// The heating-over-time phase: the curve from switch-on, its rise time,
/// the time to max_temperature and the ripple, with a caution when the
/// ripple's peak passes max_temperature.
pub fn analyse(
    design: &Design,
    th: &ThermalReport,
    full: bool,
    findings: &mut Findings,
) -> HeatingReport {
    let b = th.board;
    let wave = Wave::of(&design.drive);
    let ta = b.ambient;
    let steady_avg = th.temperature_board_c;
    let rate = |t: f64| (b.power_in(wave, t) - b.losses(t).power_w) / b.heat_capacity;
    // Rise time: the time to reach 63.2 % of the final rise, by
    // separation of variables t = int C / (P_in - P_out) dT (adaptive
    // Simpson to thermal::PULSE_TOL, as the pulse length), exact for the
    // same balance the curve integrates.
    let rise_time = steady_avg.and_then(|ts| {
        if ts - ta <= 1e-9 {
            return None;
        }
        let target = ta + (1.0 - (-1f64).exp()) * (ts - ta);
        Some(adaptive_simpson(
            |t| 1.0 / rate(t).max(1e-300),
            ta,
            target,
            super::thermal::PULSE_TOL,
            40,
        ))
    });
    // The curve (full detail): RK4 to the limit or well past the rise.
    let tau = rise_time.unwrap_or(th.time_constant_s).max(1e-6);
    let t_end = match th.pulse_s {
        Some(p) => (1.5 * p).max(3.0 * tau.min(p * 10.0)),
        None => 6.0 * tau,
    };
    // Slow waveforms (a period longer than 1/100 of the rise): the curve
    // follows the power within each period, `i(t)^2 / I_rms^2` times the
    // average power at the temperature (the current's shape taken at the
    // operating resistance), in steps of at most 1/40 of a period.
    let shape = (design.drive.waveform != Waveform::Dc && wave.frequency > 0.0)
        .then(|| wave.solve(th.resistance_ohm_hot, b.inductance))
        .filter(|p| p.period * 100.0 > tau && p.rms() > 0.0);
    let steps = match (&shape, full) {
        (_, false) => 0,
        (Some(p), true) => ((t_end / (p.period / 40.0)).ceil() as usize).clamp(2000, 40_000),
        (None, true) => 2000,
    };
    let dt = t_end / steps.max(1) as f64;
    let inst = |temp: f64, time: f64| match &shape {
        Some(p) => {
            let w = (p.at(time) / p.rms()).powi(2);
            (w * b.power_in(wave, temp) - b.losses(temp).power_w) / b.heat_capacity
        }
        None => rate(temp),
    };
    let mut curve = Vec::with_capacity(steps + 1);
    let mut t = ta;
    curve.push((0.0, t));
    for k in 0..steps {
        let s0 = k as f64 * dt;
        let k1 = inst(t, s0);
        let k2 = inst(t + dt / 2.0 * k1, s0 + dt / 2.0);
        let k3 = inst(t + dt / 2.0 * k2, s0 + dt / 2.0);
        let k4 = inst(t + dt * k3, s0 + dt);
        t = (t + dt / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4)).min(super::thermal::Board::cap());
        curve.push(((k + 1) as f64 * dt, t));
    }
    let ripple = match (steady_avg, design.drive.waveform) {
        (Some(ts), w) if w != Waveform::Dc => b.spread.peak * ripple_of(&b, wave, ts),
        _ => 0.0,
    };
    let peak = th.temperature_c.map(|t| t + ripple);
    if let (Some(t), Some(p)) = (th.temperature_c, peak)
        && t <= design.drive.max_temperature
        && p > design.drive.max_temperature
    {
        findings.caution(Caution::TemperatureAboveLimit {
            predicted_c: p,
            limit_c: design.drive.max_temperature,
        });
    }
    let curve = if full {
        let every = (curve.len() / 400).max(1);
        curve
            .iter()
            .step_by(every)
            .map(|&(t_s, avg)| HeatPoint {
                t_s,
                hottest_c: b.hottest_at(avg),
                board_c: avg,
            })
            .collect()
    } else {
        Vec::new()
    };
    HeatingReport {
        rise_time_s: rise_time,
        time_to_max_temperature_s: th.pulse_s,
        ripple_k: ripple,
        temperature_peak_c: peak,
        curve,
    }
}

/// The board average's swing above its mean within one period (K), at
/// steady board temperature `ts` (C).
fn ripple_of(b: &super::thermal::Board, wave: Wave, ts: f64) -> f64 {
    if wave.frequency <= 0.0 {
        return 0.0;
    }
    let dt_k = 0.01;
    let g = (b.losses(ts + dt_k).power_w - b.losses((ts - dt_k).max(b.ambient)).power_w)
        / (ts + dt_k - (ts - dt_k).max(b.ambient));
    if g <= 0.0 {
        return 0.0;
    }
    let r = at_temperature(b.r20, b.winding_at(ts));
    let p = wave.solve(r, b.inductance);
    let n = 400;
    let h = p.period / n as f64;
    let e = (-h * g / b.heat_capacity).exp();
    let pw: Vec<f64> = (0..n)
        .map(|k| {
            // Mean power over the step (Simpson on the current squared).
            let t0 = k as f64 * h;
            // Every phase, each a 1 / phases period later.
            let phases = b.phases.round().max(1.0) as usize;
            let i = |t: f64| {
                (0..phases)
                    .map(|k| p.at(t + k as f64 * p.period / phases as f64).powi(2))
                    .sum::<f64>()
                    * r
            };
            (i(t0 + 1e-12 * h) + 4.0 * i(t0 + h / 2.0) + i(t0 + h * (1.0 - 1e-12))) / 6.0
        })
        .collect();
    // theta_{k+1} = e theta_k + (1 - e) p_k / G; periodic start.
    let (mut a, mut c) = (1.0, 0.0);
    for &q in &pw {
        a *= e;
        c = c * e + (1.0 - e) * q / g;
    }
    let mut th = c / (1.0 - a);
    let mut hi = th;
    let mut sum = 0.0;
    for &q in &pw {
        // Mean over the step of the exponential approach, for the mean.
        let next = e * th + (1.0 - e) * q / g;
        sum += (th + next) / 2.0;
        th = next;
        hi = hi.max(th);
    }
    (hi - sum / n as f64).max(0.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::Source;
    use crate::physics::spread::Spread;
    use crate::physics::thermal::Board;

    #[test]
    fn slow_square_ripples_by_the_first_order_closed_form() {
        // Linear board (fixed h, no radiation, copper coefficient
        // negligible at this scale) under a slow unipolar square current
        // of duty D: the periodic first-order response (textbook, e.g.
        // Incropera ch. 5 lumped capacitance) has
        // theta_max = (P/G) (1 - e^-DT/tau) / (1 - e^-T/tau) and mean D P/G.
        let b = Board {
            area: 4e-4,
            perimeter: 0.08,
            heat_capacity: 0.02,
            r20: 2.0,
            phases: 1.0,
            inductance: 1e-9,
            ambient: 20.0,
            emissivity: 0.0,
            convection: Some(10.0),
            medium: crate::design::Surroundings::StillAir,
            spread: Spread::UNIFORM,
        };
        let wave = Wave {
            source: Source::Current(0.2),
            waveform: Waveform::Square,
            frequency: 0.2,
            duty: 0.3,
            bipolar: false,
        };
        let ts = 20.0 + 1e-9;
        let g = 2.0 * b.area * 10.0;
        let tau = b.heat_capacity / g;
        let r = at_temperature(b.r20, b.winding_at(ts));
        let p_on = 0.04 * r;
        let (period, d) = (5.0, 0.3);
        let th_max = p_on / g * (1.0 - (-d * period / tau).exp()) / (1.0 - (-period / tau).exp());
        let exact = th_max - d * p_on / g;
        let got = ripple_of(&b, wave, ts);
        assert!((got / exact - 1.0).abs() < 2e-3, "{got} {exact}");
    }
}
