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
//!
//! [`analyse`] is the analysis phase: the operating point at the drive,
//! the drive limits and the pulse length ([`ThermalReport`]).

use super::caution::{Caution, Findings};
use super::conductor::{Conductor, m};
use super::resistance::at_temperature;
use crate::design::{BoardKind, Design, Source};
use crate::geometry::{Board as Layout, Segment};
use crate::numeric::quadrature::adaptive_simpson;
use crate::numeric::roots::bisect;
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
    /// `power_in(T) = losses(T)` by bisection to 1e-10 K; `None` when none
    /// exists below 1000 C (thermal runaway under current drive).
    pub fn steady(&self, source: Source) -> Option<f64> {
        let f = |t: f64| self.power_in(source, t) - self.losses(t).power_w;
        let (lo, hi) = (self.ambient, T_CAP);
        if f(lo) <= 0.0 {
            return Some(lo);
        }
        if f(hi) > 0.0 {
            return None;
        }
        Some(bisect(f, (lo, hi), 1e-10))
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
        Some(adaptive_simpson(f, self.ambient, t_max, 1e-9, 40))
    }
}

/// Heating at the drive: the operating point, the drive limits that hold
/// the board at max_temperature and how long the drive may last.
///
/// Serialised as report.json's `thermal` object; the fields marked
/// `serde(skip)` (the operating point and the limits) are written at the
/// top level instead (see [`super::Analysis`]).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ThermalReport {
    /// Steady copper temperature at the drive, C (`None`: no steady state
    /// below 1000 C).
    #[serde(skip)]
    pub temperature_c: Option<f64>,
    /// Temperature the operating point is taken at: the steady one, or
    /// 1000 C when there is none, C.
    #[serde(skip)]
    pub operating_c: f64,
    /// Resistance at the operating temperature, ohm.
    #[serde(skip)]
    pub resistance_ohm_hot: f64,
    /// Current at the drive and operating temperature, A.
    #[serde(skip)]
    pub current_a: f64,
    /// Voltage at the drive and operating temperature, V.
    #[serde(skip)]
    pub voltage_v: f64,
    /// Power at the drive and operating temperature, W.
    #[serde(skip)]
    pub power_w: f64,
    /// Largest voltage that keeps the coil at max_temperature, V.
    #[serde(skip)]
    pub max_voltage_v: f64,
    /// Largest current that keeps the coil at max_temperature, A.
    #[serde(skip)]
    pub max_current_a: f64,
    /// Area of one face of the board, mm^2.
    pub area_mm2: f64,
    /// Characteristic length area/perimeter, mm.
    pub char_length_mm: f64,
    /// Heat capacity of copper and dielectric, J/K.
    pub heat_capacity_j_per_k: f64,
    /// Loss coefficients at the operating temperature.
    pub losses: Losses,
    /// Thermal time constant C/G, s, with G the heat loss per kelvin
    /// between ambient and the operating temperature (at most
    /// max_temperature).
    pub time_constant_s: f64,
    /// How long the drive may last from ambient before reaching
    /// max_temperature, s (`None`: indefinitely).
    pub pulse_s: Option<f64>,
    /// Where the convection coefficients come from.
    pub convection_source: String,
}

/// The analysis note on the lumped model.
pub const LUMPED_NOTE: &str =
    "one temperature for the whole board (lumped); real hot spots are hotter";

/// Operating temperature above which [`Caution::HotToTouch`] is raised, C
/// (common practice).
pub const HOT_TO_TOUCH_C: f64 = 80.0;

/// The heating phase of the analysis: the board's heat balance at the
/// drive (`r20`: the coil's resistance at 20 C, ohm), with the cautions
/// when the design's max_temperature is exceeded or the board runs hot.
pub fn analyse(
    design: &Design,
    layout: &Layout,
    cond: &Conductor,
    r20: f64,
    findings: &mut Findings,
) -> ThermalReport {
    let drive = &design.drive;
    let (area_mm2, per_mm) = outline_area(&layout.outline.segments);
    let ((cu_rho, cu_c), (di_rho, di_c)) = heat_capacities(design.stackup.kind);
    let cu_vol: f64 = cond
        .pieces
        .iter()
        .map(|p| m(p.segment.length()) * p.width * p.thickness)
        .sum();
    let di_thick = m(design.stackup.dielectric.iter().sum::<f64>() + 2.0 * design.stackup.cover);
    let area = area_mm2 * 1e-6;
    let board = Board {
        area,
        perimeter: m(per_mm),
        heat_capacity: cu_vol * cu_rho * cu_c + area * di_thick * di_rho * di_c,
        r20,
        ambient: drive.ambient,
        emissivity: drive.emissivity,
        convection: drive.convection,
    };
    let steady = board.steady(drive.source);
    let t_op = steady.unwrap_or(Board::cap());
    let r_hot = at_temperature(r20, t_op);
    let (current, voltage) = match drive.source {
        Source::Voltage(v) => (v / r_hot, v),
        Source::Current(i) => (i, i * r_hot),
    };
    let (max_i, max_v) = board.limits(drive.max_temperature);
    let losses = board.losses(t_op);
    let pulse = board.pulse(drive.source, drive.max_temperature);
    let tau = board.time_constant(t_op.min(drive.max_temperature.max(drive.ambient + 1.0)));
    let convection_source = match drive.convection {
        Some(hc) => format!("drive.convection = {hc} W/(m^2 K) on both faces (user value)"),
        None => "natural convection, horizontal plate, hot face up 0.54 Ra^(1/4) and down 0.27 Ra^(1/4) (Incropera, Fundamentals of Heat and Mass Transfer, eqs 9.30-9.32; coefficients and air properties recalled from memory)".into(),
    };
    if drive.convection.is_none() && losses.rayleigh < 1e4 {
        findings.note(format!(
            "Rayleigh number {:.0} is below the range of the plate correlations (1e4..1e7): extrapolated; small boards may lose heat faster than predicted",
            losses.rayleigh
        ));
    }
    match steady {
        None => findings.caution(Caution::NoSteadyState {
            ceiling_c: Board::cap(),
        }),
        Some(t) if t > drive.max_temperature => findings.caution(Caution::TemperatureAboveLimit {
            predicted_c: t,
            limit_c: drive.max_temperature,
        }),
        _ => {}
    }
    if t_op > HOT_TO_TOUCH_C {
        findings.caution(Caution::HotToTouch {
            temperature_c: t_op,
        });
    }
    if let Some(p) = pulse {
        findings.note(format!(
            "at the drive the board reaches max_temperature after {p:.3} s from ambient"
        ));
    }
    ThermalReport {
        temperature_c: steady,
        operating_c: t_op,
        resistance_ohm_hot: r_hot,
        current_a: current,
        voltage_v: voltage,
        power_w: current * voltage,
        max_voltage_v: max_v,
        max_current_a: max_i,
        area_mm2,
        char_length_mm: area_mm2 / per_mm,
        heat_capacity_j_per_k: board.heat_capacity,
        losses,
        time_constant_s: tau,
        pulse_s: pulse,
        convection_source,
    }
}

/// Area (mm^2) and perimeter (mm) of the board outline (a closed loop).
fn outline_area(outline: &[Segment]) -> (f64, f64) {
    // Exact for lines and arcs: A = 1/2 closed integral of (x dy - y dx);
    // along an arc about (cx, cy) of radius r sweeping phi that integral is
    // r^2 phi + cx (y1 - y0) - cy (x1 - x0).
    let mut twice = 0.0;
    let mut per = 0.0;
    for s in outline {
        per += s.length();
        let (p, q) = (s.start(), s.end());
        twice += match s {
            Segment::Line(_) => p.x * q.y - q.x * p.y,
            Segment::Arc(a) => {
                let r = a.radius();
                r * r * a.sweep + a.center.x * (q.y - p.y) - a.center.y * (q.x - p.x)
            }
        };
    }
    ((twice / 2.0).abs(), per)
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
    use crate::geometry::{Arc, Point};

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

    #[test]
    fn outline_area_is_exact_for_lines_and_arcs() {
        // A 10 x 6 rectangle with 1 mm round corners: 60 - (4 - pi) mm^2,
        // perimeter 2 (8 + 4) + 2 pi (plane geometry).
        let (w, h, r) = (5.0, 3.0, 1.0);
        let corner = |cx: f64, cy: f64, a0: f64| {
            let c = Point::new(cx, cy);
            Segment::Arc(Arc::from_start(
                c,
                c + crate::geometry::Vec2::from_angle(a0) * r,
                std::f64::consts::FRAC_PI_2,
            ))
        };
        let s = vec![
            Segment::line(Point::new(-w + r, -h), Point::new(w - r, -h)),
            corner(w - r, -h + r, -std::f64::consts::FRAC_PI_2),
            Segment::line(Point::new(w, -h + r), Point::new(w, h - r)),
            corner(w - r, h - r, 0.0),
            Segment::line(Point::new(w - r, h), Point::new(-w + r, h)),
            corner(-w + r, h - r, std::f64::consts::FRAC_PI_2),
            Segment::line(Point::new(-w, h - r), Point::new(-w, -h + r)),
            corner(-w + r, -h + r, std::f64::consts::PI),
        ];
        let (a, p) = outline_area(&s);
        assert!(
            (a - (60.0 - (4.0 - std::f64::consts::PI))).abs() < 1e-12,
            "{a}"
        );
        assert!((p - (24.0 + std::f64::consts::TAU)).abs() < 1e-12, "{p}");
    }
}
