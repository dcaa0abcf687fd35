//! Steady temperature, drive limits and pulse length from an energy
//! balance of the board's two faces, lumped (one temperature for the whole
//! board).
//!
//! Heat leaves by natural convection from a horizontal plate, hot face up
//! (top) and hot face down (bottom), with the correlations of Incropera et
//! al., Fundamentals of Heat and Mass Transfer, eqs 9.30-9.32 (characteristic
//! length `L = area / perimeter`): up `Nu = 0.54 Ra^(1/4)` (1e4..1e7) and
//! `0.15 Ra^(1/3)` (1e7..1e11), down `Nu = 0.27 Ra^(1/4)`; the coefficients
//! and the air properties (Incropera Table A.4) are recalled from memory
//! (tag M in REFERENCES.md). Small coils sit below `Ra = 1e4`: the
//! correlations are then extrapolated and the report says so. A
//! `drive.convection` value replaces both faces' coefficient. Radiation:
//! `eps sigma (T^4 - Ta^4)` from each face. Copper resistance rises by
//! 0.00393 /K (IACS), so the power depends on the temperature; the balance
//! is solved for that temperature by bisection.

use super::resistance::at_temperature;
use crate::design::{BoardKind, Source};
use serde::Serialize;

/// Stefan-Boltzmann constant, W/(m^2 K^4) (CODATA).
pub const SIGMA: f64 = 5.670374419e-8;
/// Standard gravity, m/s^2.
const G: f64 = 9.80665;
/// Hottest temperature searched, C; above it the coil is taken to burn out.
const T_CAP: f64 = 1000.0;

/// Air at 1 atm: (T K, kinematic viscosity m^2/s, conductivity W/(m K),
/// diffusivity m^2/s). Incropera Table A.4, recalled from memory [M].
const AIR: [(f64, f64, f64, f64); 6] = [
    (250.0, 11.44e-6, 22.3e-3, 15.9e-6),
    (300.0, 15.89e-6, 26.3e-3, 22.5e-6),
    (350.0, 20.92e-6, 30.0e-3, 29.9e-6),
    (400.0, 26.41e-6, 33.8e-3, 38.3e-6),
    (450.0, 32.39e-6, 37.3e-3, 47.2e-6),
    (500.0, 38.79e-6, 40.7e-3, 56.7e-6),
];

fn air(t_k: f64) -> (f64, f64, f64) {
    let t = t_k.clamp(AIR[0].0, AIR[AIR.len() - 1].0);
    for w in AIR.windows(2) {
        if t <= w[1].0 {
            let f = (t - w[0].0) / (w[1].0 - w[0].0);
            let l = |a: f64, b: f64| a + f * (b - a);
            return (l(w[0].1, w[1].1), l(w[0].2, w[1].2), l(w[0].3, w[1].3));
        }
    }
    (AIR[5].1, AIR[5].2, AIR[5].3)
}

/// The thermal description of the board.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Board {
    /// Area of one face, m^2.
    pub area: f64,
    /// Perimeter, m.
    pub perimeter: f64,
    /// Heat capacity, J/K.
    pub heat_capacity: f64,
    /// Coil resistance at 20 C, ohm.
    pub r20: f64,
    /// Ambient, C.
    pub ambient: f64,
    /// Emissivity of both faces.
    pub emissivity: f64,
    /// Convection coefficient override for both faces, W/(m^2 K).
    pub convection: Option<f64>,
}

/// Heat loss coefficients at a board temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Losses {
    /// Rayleigh number of the plate.
    pub rayleigh: f64,
    /// Convection, top face (hot face up), W/(m^2 K).
    pub h_top_w_per_m2k: f64,
    /// Convection, bottom face (hot face down), W/(m^2 K).
    pub h_bottom_w_per_m2k: f64,
    /// Linearised radiation, each face, W/(m^2 K).
    pub h_radiation_w_per_m2k: f64,
    /// Heat leaving both faces, W.
    pub power_w: f64,
}

impl Board {
    /// Hottest temperature the solver searches, C.
    pub fn cap() -> f64 {
        T_CAP
    }

    /// Characteristic length `area / perimeter`, m.
    pub fn length(&self) -> f64 {
        self.area / self.perimeter
    }

    /// Heat leaving both faces at board temperature `t` (C).
    pub fn losses(&self, t: f64) -> Losses {
        let dt = (t - self.ambient).max(0.0);
        let tk = t + 273.15;
        let tak = self.ambient + 273.15;
        let (nu, k, alpha) = air((tk + tak) / 2.0);
        let l = self.length();
        let beta = 2.0 / (tk + tak);
        let ra = G * beta * dt * l.powi(3) / (nu * alpha);
        let (h_up, h_down) = match self.convection {
            Some(h) => (h, h),
            None => {
                let up = if ra <= 1e7 {
                    0.54 * ra.powf(0.25)
                } else {
                    0.15 * ra.powf(1.0 / 3.0)
                };
                let down = 0.27 * ra.powf(0.25);
                (up * k / l, down * k / l)
            }
        };
        let rad = self.emissivity * SIGMA * (tk.powi(4) - tak.powi(4));
        let h_rad = if dt > 0.0 {
            rad / dt
        } else {
            4.0 * self.emissivity * SIGMA * tak.powi(3)
        };
        Losses {
            rayleigh: ra,
            h_top_w_per_m2k: h_up,
            h_bottom_w_per_m2k: h_down,
            h_radiation_w_per_m2k: h_rad,
            power_w: self.area * ((h_up + h_down) * dt + 2.0 * rad),
        }
    }

    /// Electrical power at copper temperature `t` (C) for a drive, W.
    pub fn power_in(&self, source: Source, t: f64) -> f64 {
        let r = at_temperature(self.r20, t);
        match source {
            Source::Voltage(v) => v * v / r,
            Source::Current(i) => i * i * r,
        }
    }

    /// Steady temperature (C) for a drive: the root of
    /// `power_in(T) = losses(T)`; `None` when none exists below 1000 C
    /// (thermal runaway under current drive).
    pub fn steady(&self, source: Source) -> Option<f64> {
        let f = |t: f64| self.power_in(source, t) - self.losses(t).power_w;
        let (mut lo, mut hi) = (self.ambient, T_CAP);
        if f(lo) <= 0.0 {
            return Some(lo);
        }
        if f(hi) > 0.0 {
            return None;
        }
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if f(mid) > 0.0 {
                lo = mid;
            } else {
                hi = mid;
            }
            if hi - lo < 1e-10 {
                break;
            }
        }
        Some(0.5 * (lo + hi))
    }

    /// Largest current (A) and voltage (V) that hold the board at `t_max` (C).
    pub fn limits(&self, t_max: f64) -> (f64, f64) {
        let p = self.losses(t_max).power_w;
        let r = at_temperature(self.r20, t_max);
        let i = (p / r).sqrt();
        (i, i * r)
    }

    /// Thermal time constant `C / G` with `G` the secant conductance
    /// between ambient and `t` (C), s.
    pub fn time_constant(&self, t: f64) -> f64 {
        let t = if t - self.ambient < 0.5 {
            self.ambient + 0.5
        } else {
            t
        };
        let g = self.losses(t).power_w / (t - self.ambient);
        self.heat_capacity / g
    }

    /// How long the drive may run from ambient before the board reaches
    /// `t_max` (C), s: `C dT/dt = P_in(T) - P_out(T)` solved for the time,
    /// `t = int_{T_ambient}^{t_max} C / (P_in(T) - P_out(T)) dT` (the
    /// board only warms while the steady temperature lies above `t_max`),
    /// by adaptive Simpson quadrature to 1e-9 relative; `None` when the
    /// steady temperature stays at or below `t_max`.
    pub fn pulse(&self, source: Source, t_max: f64) -> Option<f64> {
        if let Some(ts) = self.steady(source)
            && ts <= t_max
        {
            return None;
        }
        if t_max <= self.ambient {
            return Some(0.0);
        }
        let f = |t: f64| {
            self.heat_capacity / (self.power_in(source, t) - self.losses(t).power_w).max(1e-300)
        };
        let (a, b) = (self.ambient, t_max);
        let (fa, fm, fb) = (f(a), f((a + b) / 2.0), f(b));
        let whole = (b - a) / 6.0 * (fa + 4.0 * fm + fb);
        Some(simpson(
            &f,
            (a, fa),
            (b, fb),
            fm,
            whole,
            1e-9 * whole.abs(),
            40,
        ))
    }
}

/// Adaptive Simpson on `[a, b]` with the end and middle values known and
/// the whole-interval estimate `whole`; refines halves until the two
/// halves agree with the whole within `15 tol` (Richardson), at most
/// `depth` levels.
fn simpson(
    f: &impl Fn(f64) -> f64,
    (a, fa): (f64, f64),
    (b, fb): (f64, f64),
    fm: f64,
    whole: f64,
    tol: f64,
    depth: u32,
) -> f64 {
    let m = (a + b) / 2.0;
    let (lm, rm) = ((a + m) / 2.0, (m + b) / 2.0);
    let (flm, frm) = (f(lm), f(rm));
    let left = (m - a) / 6.0 * (fa + 4.0 * flm + fm);
    let right = (b - m) / 6.0 * (fm + 4.0 * frm + fb);
    let delta = left + right - whole;
    if depth == 0 || delta.abs() <= 15.0 * tol {
        return left + right + delta / 15.0;
    }
    simpson(f, (a, fa), (m, fm), flm, left, tol / 2.0, depth - 1)
        + simpson(f, (m, fm), (b, fb), frm, right, tol / 2.0, depth - 1)
}

/// Density (kg/m^3) and specific heat (J/(kg K)) of copper and of the
/// dielectric (polyimide for flex, FR-4 for rigid), recalled from memory
/// (tag M): copper 8960 / 385 (Incropera Table A.1), polyimide 1420 / 1090,
/// FR-4 1850 / 1100.
pub fn heat_capacities(kind: BoardKind) -> ((f64, f64), (f64, f64)) {
    let copper = (8960.0, 385.0);
    let diel = match kind {
        BoardKind::Flex => (1420.0, 1090.0),
        BoardKind::Rigid => (1850.0, 1100.0),
    };
    (copper, diel)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn board(conv: Option<f64>) -> Board {
        Board {
            area: 0.025 * 0.025,
            perimeter: 0.1,
            heat_capacity: 0.05,
            r20: 3.0,
            ambient: 25.0,
            emissivity: 0.9,
            convection: conv,
        }
    }

    #[test]
    fn steady_state_satisfies_its_energy_balance() {
        for conv in [None, Some(10.0)] {
            let b = board(conv);
            for src in [Source::Voltage(3.3), Source::Current(0.8)] {
                let t = b.steady(src).unwrap();
                let pin = b.power_in(src, t);
                let pout = b.losses(t).power_w;
                assert!(((pin - pout) / pin).abs() < 1e-9, "{src:?}: {pin} {pout}");
                assert!(t > b.ambient);
            }
        }
    }

    #[test]
    fn limits_hold_the_board_at_max_temperature() {
        let b = board(None);
        let (i, v) = b.limits(80.0);
        let t = b.steady(Source::Current(i)).unwrap();
        assert!((t - 80.0).abs() < 1e-6, "{t}");
        let t = b.steady(Source::Voltage(v)).unwrap();
        assert!((t - 80.0).abs() < 1e-6, "{t}");
    }

    #[test]
    fn pulse_is_exact_for_linear_heating() {
        // Fixed h, no radiation, current drive: P_in = I^2 R20 (1 + a (T -
        // 20)) and P_out = G (T - Ta) are both linear in T, so
        // C dT/dt = A - B (T - Ta) with A = P_in(Ta), B = G - I^2 R20 a,
        // and t = C/B ln(A / (A - B (Tmax - Ta))) (separation of variables).
        let mut b = board(Some(10.0));
        b.emissivity = 0.0;
        for (i, tmax) in [(1.2, 60.0), (0.9, 40.0), (2.0, 150.0)] {
            let src = Source::Current(i);
            let g = 2.0 * b.area * 10.0;
            let a = b.power_in(src, b.ambient);
            let bb = g - i * i * b.r20 * crate::physics::resistance::ALPHA_20;
            let exact = b.heat_capacity / bb * (a / (a - bb * (tmax - b.ambient))).ln();
            let t = b.pulse(src, tmax).unwrap();
            assert!(
                (t / exact - 1.0).abs() < 1e-8,
                "{i} A to {tmax} C: {t} vs {exact}"
            );
        }
    }

    #[test]
    fn pulse_agrees_with_time_stepping() {
        // Natural convection and radiation (nonlinear), against RK4 on
        // C dT/dt = P_in - P_out with 200,000 steps.
        let b = board(None);
        for (src, tmax) in [
            (Source::Voltage(6.0), 80.0),
            (Source::Current(1.5), 100.0),
            (Source::Voltage(3.3), 35.0),
        ] {
            let rate = |t: f64| (b.power_in(src, t) - b.losses(t).power_w) / b.heat_capacity;
            let t_quad = b.pulse(src, tmax).unwrap();
            let dt = t_quad / 200_000.0;
            let (mut t, mut time) = (b.ambient, 0.0);
            let stepped = loop {
                let k1 = rate(t);
                let k2 = rate(t + dt / 2.0 * k1);
                let k3 = rate(t + dt / 2.0 * k2);
                let k4 = rate(t + dt * k3);
                let tn = t + dt / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4);
                if tn >= tmax {
                    break time + dt * (tmax - t) / (tn - t);
                }
                t = tn;
                time += dt;
            };
            assert!(
                (t_quad / stepped - 1.0).abs() < 1e-6,
                "{src:?}: {t_quad} vs {stepped}"
            );
        }
    }

    #[test]
    fn pulse_matches_lumped_exponential_for_constant_coefficients() {
        // Lumped capacitance (Incropera ch. 5) with a fixed h and no
        // radiation: at constant power P, T(t) = Ta + (P/G)(1 - exp(-t/tau)).
        // The power rises with the copper temperature, so the pulse lies
        // between the predictions at the cold and at the hot power.
        let mut b = board(Some(10.0));
        b.emissivity = 0.0;
        let src = Source::Current(1.2);
        let tmax = 60.0;
        let t = b.pulse(src, tmax).unwrap();
        let g = 2.0 * b.area * 10.0;
        let tau = b.heat_capacity / g;
        // Power between cold and hot: the pulse lies between the two
        // exponential predictions.
        let p_cold = b.power_in(src, b.ambient);
        let p_hot = b.power_in(src, tmax);
        let dt = tmax - b.ambient;
        let t_cold = -tau * (1.0 - g * dt / p_cold).ln();
        let t_hot = -tau * (1.0 - g * dt / p_hot).ln();
        assert!(
            t <= t_cold * 1.0001 && t >= t_hot * 0.9999,
            "{t_hot} {t} {t_cold}"
        );
    }
}
