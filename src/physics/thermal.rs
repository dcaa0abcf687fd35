//! Steady temperature, drive limits and pulse length from an energy
//! balance of the board's two faces, with the winding's losses spread
//! laterally through the board to find the hottest copper.
//!
//! Heat leaves by convection and radiation. Still air and water: natural
//! convection from a horizontal plate (characteristic length
//! `L = area / perimeter`) with the correlations of Raithby & Hollands
//! (Handbook of Heat Transfer, Rohsenow, Hartnett & Cho eds., 3rd ed. 1998,
//! ch. 4), which add a thin-layer (conduction) limit so that they hold for
//! small plates: hot face up `Nu_T = 0.835 Cl Ra^(1/4)`,
//! `Nu = 1.4 / ln(1 + 1.4 / Nu_T)`, with
//! `Cl = 0.671 / (1 + (0.492/Pr)^(9/16))^(4/9)` (Churchill & Usagi's
//! laminar coefficient) and turbulent `0.14 Ra^(1/3)` blended by
//! `(Nu_l^10 + Nu_t^10)^(1/10)`; hot face down
//! `Nu_T = 0.527 / (1 + (1.9/Pr)^(9/10))^(2/9) Ra^(1/5)`,
//! `Nu = 2.5 / ln(1 + 2.5 / Nu_T)`. The coefficients and the stated range
//! (Ra from about 1 to 1e10) are recalled from memory (tag M in
//! REFERENCES.md); outside it the report says the correlation is
//! extrapolated. Moving air: the laminar flat-plate average
//! `Nu = 0.664 Re^(1/2) Pr^(1/3)` (Incropera et al., Fundamentals of Heat
//! and Mass Transfer, eq. 7.30; flow length the square root of the face
//! area), combined with natural convection as
//! `h = (h_forced^3 + h_natural^3)^(1/3)` (Churchill's mixed-convection
//! sum, Incropera section 9.9). Air properties from Incropera Table A.4 and
//! water properties from Table A.6, recalled from memory. A
//! `drive.convection` value replaces both faces' coefficient. Radiation:
//! `eps sigma (T^4 - Ta^4)` from each face (none in water, which absorbs
//! it within a fraction of a millimetre).
//!
//! Copper resistance rises by 0.00393 /K (IACS), so the power depends on
//! the temperature; the balance is solved by bisection. The board average
//! follows from the balance; the winding's hottest copper from a radial
//! conduction model of the board (see [`super::spread`]).
//!
//! [`analyse`] is the analysis phase: the operating point at the drive,
//! the drive limits and the pulse length ([`ThermalReport`]).

use super::caution::{Caution, Findings};
use super::conductor::{Conductor, m};
use super::drive::Wave;
use super::resistance::at_temperature;
use super::spread::{Disc, Spread};
use crate::design::{BoardKind, Design, Source, Surroundings};
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
/// diffusivity m^2/s). Incropera Table A.4, recalled from memory \[M\].
const AIR: [(f64, [f64; 3]); 6] = [
    (250.0, [11.44e-6, 22.3e-3, 15.9e-6]),
    (300.0, [15.89e-6, 26.3e-3, 22.5e-6]),
    (350.0, [20.92e-6, 30.0e-3, 29.9e-6]),
    (400.0, [26.41e-6, 33.8e-3, 38.3e-6]),
    (450.0, [32.39e-6, 37.3e-3, 47.2e-6]),
    (500.0, [38.79e-6, 40.7e-3, 56.7e-6]),
];

/// Saturated liquid water: (T K, kinematic viscosity m^2/s, conductivity
/// W/(m K), Prandtl number, expansion coefficient 1/K). Incropera Table
/// A.6, recalled from memory \[M\].
const WATER: [(f64, [f64; 4]); 5] = [
    (280.0, [1.422e-6, 0.582, 10.26, 46.0e-6]),
    (300.0, [0.858e-6, 0.613, 5.83, 276.1e-6]),
    (320.0, [0.583e-6, 0.640, 3.77, 436.7e-6]),
    (340.0, [0.429e-6, 0.660, 2.66, 566.0e-6]),
    (360.0, [0.335e-6, 0.674, 2.02, 697.9e-6]),
];

/// Linear interpolation in a table whose rows start with the temperature.
fn interpolate<const N: usize>(table: &[(f64, [f64; N])], t: f64) -> [f64; N] {
    let t = t.clamp(table[0].0, table[table.len() - 1].0);
    for w in table.windows(2) {
        if t <= w[1].0 {
            let f = (t - w[0].0) / (w[1].0 - w[0].0);
            return std::array::from_fn(|i| w[0].1[i] + f * (w[1].1[i] - w[0].1[i]));
        }
    }
    table[table.len() - 1].1
}

/// Properties of the fluid at film temperature `t_k` (K): kinematic
/// viscosity m^2/s, conductivity W/(m K), Prandtl number, expansion
/// coefficient 1/K (air: ideal gas, 1/T).
fn fluid(medium: Surroundings, t_k: f64) -> (f64, f64, f64, f64) {
    if medium == Surroundings::Water {
        let [nu, k, pr, beta] = interpolate(&WATER, t_k);
        (nu, k, pr, beta)
    } else {
        let [nu, k, alpha] = interpolate(&AIR, t_k);
        (nu, k, nu / alpha, 1.0 / t_k)
    }
}

/// Stated range of the natural-convection correlations (Raithby &
/// Hollands), recalled from memory.
pub const RAYLEIGH_RANGE: (f64, f64) = (1.0, 1e10);
/// Largest Reynolds number of the laminar flat-plate correlation
/// (Incropera, transition at about 5e5).
pub const REYNOLDS_LAMINAR: f64 = 5e5;

/// Natural convection Nusselt numbers (hot face up, hot face down) of a
/// horizontal plate at Rayleigh number `ra` and Prandtl number `pr`
/// (Raithby & Hollands, see the module documentation).
pub fn plate_nusselt(ra: f64, pr: f64) -> (f64, f64) {
    if ra <= 0.0 {
        return (0.0, 0.0);
    }
    let cl = 0.671 / (1.0 + (0.492 / pr).powf(9.0 / 16.0)).powf(4.0 / 9.0);
    let nu_t = 0.835 * cl * ra.powf(0.25);
    let laminar = 1.4 / (1.0 + 1.4 / nu_t).ln();
    let turbulent = 0.14 * ra.powf(1.0 / 3.0);
    let up = (laminar.powi(10) + turbulent.powi(10)).powf(0.1);
    let nu_d = 0.527 / (1.0 + (1.9 / pr).powf(0.9)).powf(2.0 / 9.0) * ra.powf(0.2);
    let down = 2.5 / (1.0 + 2.5 / nu_d).ln();
    (up, down)
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
    /// Coil resistance at 20 C, ohm (an array's: one phase's).
    pub r20: f64,
    /// How many equal coils or phases heat the board, each carrying the
    /// drive shifted by `1 / phases` of its period (a balanced drive): 1
    /// for a coil; an array's phases, whose losses all heat its board.
    pub phases: f64,
    /// Coil inductance, H.
    pub inductance: f64,
    /// Ambient, C.
    pub ambient: f64,
    /// Emissivity of both faces.
    pub emissivity: f64,
    /// Convection coefficient override for both faces, W/(m^2 K).
    pub convection: Option<f64>,
    /// What the board gives its heat to.
    pub medium: Surroundings,
    /// Rise of the hottest copper and of the winding's mean over the
    /// board's average rise (1 and 1: one temperature).
    pub spread: Spread,
}

/// Heat loss coefficients at a board temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Losses {
    /// Rayleigh number of the plate.
    pub rayleigh: f64,
    /// Reynolds number of the flow along the board (moving air).
    pub reynolds: Option<f64>,
    /// Convection, top face (hot face up), W/(m^2 K).
    pub h_top_w_per_m2k: f64,
    /// Convection, bottom face (hot face down), W/(m^2 K).
    pub h_bottom_w_per_m2k: f64,
    /// Linearised radiation, each face, W/(m^2 K).
    pub h_radiation_w_per_m2k: f64,
    /// Heat leaving both faces, W.
    pub power_w: f64,
}

impl Losses {
    /// Heat loss per kelvin and square metre of board, both faces,
    /// W/(m^2 K).
    pub fn both_faces(&self) -> f64 {
        self.h_top_w_per_m2k + self.h_bottom_w_per_m2k + 2.0 * self.h_radiation_w_per_m2k
    }

    /// Which correlation is used outside its stated range, if any.
    pub fn extrapolated(&self) -> Option<String> {
        let mut out = Vec::new();
        let (lo, hi) = RAYLEIGH_RANGE;
        if self.rayleigh < lo || self.rayleigh > hi {
            out.push(format!(
                "natural convection at Rayleigh number {:.3} lies outside the plate correlations' stated range ({lo:.0} to {hi:.0e}): extrapolated",
                self.rayleigh
            ));
        }
        if let Some(re) = self.reynolds
            && !(1.0..=REYNOLDS_LAMINAR).contains(&re)
        {
            out.push(format!(
                "forced convection at Reynolds number {re:.3} lies outside the laminar flat-plate correlation's range (1 to 5e5): extrapolated"
            ));
        }
        (!out.is_empty()).then(|| out.join("; "))
    }
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

    /// Heat leaving both faces at board (average) temperature `t` (C).
    pub fn losses(&self, t: f64) -> Losses {
        let dt = (t - self.ambient).max(0.0);
        let tk = t + 273.15;
        let tak = self.ambient + 273.15;
        let (nu, k, pr, beta) = fluid(self.medium, (tk + tak) / 2.0);
        let l = self.length();
        let alpha = nu / pr;
        let ra = G * beta * dt * l.powi(3) / (nu * alpha);
        let mut reynolds = None;
        let (h_up, h_down) = match self.convection {
            Some(h) => (h, h),
            None => {
                let (up, down) = plate_nusselt(ra, pr);
                let (up, down) = (up * k / l, down * k / l);
                match self.medium {
                    Surroundings::MovingAir { air_speed_m_s } => {
                        let lf = self.area.sqrt();
                        let re = air_speed_m_s * lf / nu;
                        reynolds = Some(re);
                        let hf = 0.664 * re.sqrt() * pr.powf(1.0 / 3.0) * k / lf;
                        let mix = |hn: f64| (hf.powi(3) + hn.powi(3)).cbrt();
                        (mix(up), mix(down))
                    }
                    _ => (up, down),
                }
            }
        };
        let eps = if self.medium == Surroundings::Water {
            0.0
        } else {
            self.emissivity
        };
        let rad = eps * SIGMA * (tk.powi(4) - tak.powi(4));
        let h_rad = if dt > 0.0 {
            rad / dt
        } else {
            4.0 * eps * SIGMA * tak.powi(3)
        };
        Losses {
            rayleigh: ra,
            reynolds,
            h_top_w_per_m2k: h_up,
            h_bottom_w_per_m2k: h_down,
            h_radiation_w_per_m2k: h_rad,
            power_w: self.area * ((h_up + h_down) * dt + 2.0 * rad),
        }
    }

    /// Mean winding temperature at board average `t` (C).
    pub fn winding_at(&self, t: f64) -> f64 {
        self.ambient + self.spread.winding * (t - self.ambient)
    }

    /// Hottest copper temperature at board average `t` (C).
    pub fn hottest_at(&self, t: f64) -> f64 {
        self.ambient + self.spread.peak * (t - self.ambient)
    }

    /// Board average (C) at which the hottest copper is at `t` (C).
    pub fn average_for_hottest(&self, t: f64) -> f64 {
        self.ambient + (t - self.ambient) / self.spread.peak
    }

    /// Average electrical power at board average temperature `t` (C) for
    /// a drive, W (the coil's resistance at the winding's mean
    /// temperature).
    pub fn power_in(&self, wave: impl Into<Wave>, t: f64) -> f64 {
        let r = at_temperature(self.r20, self.winding_at(t));
        self.phases * wave.into().power(r, self.inductance)
    }

    /// Steady board average temperature (C) for a drive: the root of
    /// `power_in(T) = losses(T)` by bisection to 1e-10 K; `None` when none
    /// exists below 1000 C (thermal runaway under current drive).
    pub fn steady(&self, wave: impl Into<Wave>) -> Option<f64> {
        self.steady_within(wave, 1e-10)
    }

    /// [`Board::steady`] to a tolerance `tol` (K).
    pub fn steady_within(&self, wave: impl Into<Wave>, tol: f64) -> Option<f64> {
        let wave = wave.into();
        let f = |t: f64| self.power_in(wave, t) - self.losses(t).power_w;
        let (lo, hi) = (self.ambient, T_CAP);
        if f(lo) <= 0.0 {
            return Some(lo);
        }
        if f(hi) > 0.0 {
            return None;
        }
        Some(bisect(f, (lo, hi), tol))
    }

    /// Largest amplitude of the drive's waveform as a current (A) and as a
    /// voltage (V) that holds the hottest copper at `t_max` (C); for dc
    /// the largest current and voltage.
    pub fn limits(&self, wave: impl Into<Wave>, t_max: f64) -> (f64, f64) {
        let wave = wave.into();
        let t_avg = self.average_for_hottest(t_max);
        let p = self.losses(t_avg).power_w;
        let r = at_temperature(self.r20, self.winding_at(t_avg));
        let unit = |s: Source| self.phases * Wave { source: s, ..wave }.power(r, self.inductance);
        let i = (p / unit(Source::Current(1.0))).sqrt();
        let v = (p / unit(Source::Voltage(1.0))).sqrt();
        (i, v)
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

    /// How long the drive may run from ambient before the hottest copper
    /// reaches `t_max` (C), s: `C dT/dt = P_in(T) - P_out(T)` for the board
    /// average solved for the time,
    /// `t = int_{T_ambient}^{T_1} C / (P_in(T) - P_out(T)) dT` with `T_1`
    /// the average at which the hottest copper is at `t_max` (the
    /// lateral profile taken as settled, its own time constant being far
    /// shorter), by adaptive Simpson quadrature with the tolerance
    /// [`PULSE_TOL`]; `None` when the steady temperature stays at or below
    /// `t_max`.
    pub fn pulse(&self, wave: impl Into<Wave>, t_max: f64) -> Option<f64> {
        let wave = wave.into();
        let t1 = self.average_for_hottest(t_max);
        if let Some(ts) = self.steady(wave)
            && ts <= t1
        {
            return None;
        }
        if t1 <= self.ambient {
            return Some(0.0);
        }
        let f = |t: f64| {
            self.heat_capacity / (self.power_in(wave, t) - self.losses(t).power_w).max(1e-300)
        };
        Some(adaptive_simpson(f, self.ambient, t1, PULSE_TOL, 40))
    }
}

/// Relative tolerance of the quadratures over temperature
/// ([`Board::pulse`], the heating's rise time). The integrand is not
/// smooth at ambient (natural convection grows as the rise to the 5/4),
/// so the result is good to about 1e-6 relative rather than the
/// tolerance itself: against 1e-9 the rise times of the README's large
/// sweep (16,361 designs) moved by at most 9.3e-7, far inside the
/// thermal model's own uncertainty (tens of percent), at a third of the
/// loss evaluations.
pub const PULSE_TOL: f64 = 1e-7;

/// Heating at the drive: the operating point, the drive limits that hold
/// the hottest copper at max_temperature and how long the drive may last.
///
/// Serialised as report.json's `thermal` object; the fields marked
/// `serde(skip)` (the operating point and the limits) are written at the
/// top level instead (see [`super::Analysis`]).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ThermalReport {
    /// Steady temperature of the hottest copper under the drive's average
    /// power, C (`None`: no steady state below 1000 C).
    #[serde(skip)]
    pub temperature_c: Option<f64>,
    /// Steady board average temperature, C (`None` as above).
    #[serde(skip)]
    pub temperature_board_c: Option<f64>,
    /// Temperature the operating point is taken at: the hottest copper's
    /// steady one, or 1000 C when there is none, C.
    #[serde(skip)]
    pub operating_c: f64,
    /// Resistance at the winding's mean temperature, ohm.
    #[serde(skip)]
    pub resistance_ohm_hot: f64,
    /// Current when the drive is on (the amplitude of a current source, or
    /// the voltage over the hot resistance), A.
    #[serde(skip)]
    pub current_a: f64,
    /// Voltage when the drive is on, V.
    #[serde(skip)]
    pub voltage_v: f64,
    /// Power when the drive is on, W (dc: the power).
    #[serde(skip)]
    pub power_w: f64,
    /// Largest amplitude of the waveform as a voltage that keeps the
    /// hottest copper at max_temperature, V.
    #[serde(skip)]
    pub max_voltage_v: f64,
    /// Largest amplitude as a current, A.
    #[serde(skip)]
    pub max_current_a: f64,
    /// The board as the heating model sees it.
    #[serde(skip)]
    pub board: Board,
    /// Area of one face of the board, mm^2.
    pub area_mm2: f64,
    /// Characteristic length area/perimeter, mm.
    pub char_length_mm: f64,
    /// Heat capacity of copper and dielectric, J/K.
    pub heat_capacity_j_per_k: f64,
    /// Loss coefficients at the operating board average temperature.
    pub losses: Losses,
    /// Hottest copper and winding mean rise over the board average rise.
    pub spread: Spread,
    /// Thermal time constant C/G, s, with G the heat loss per kelvin
    /// between ambient and the operating temperature (at most
    /// max_temperature). The rise of the actual curve is in `heating`.
    pub time_constant_s: f64,
    /// How long the drive may last from ambient before the hottest copper
    /// reaches max_temperature, s (`None`: indefinitely).
    pub pulse_s: Option<f64>,
    /// `still_air`, `moving_air` (with its speed) or `water`.
    pub surroundings: Surroundings,
    /// Where the convection coefficients come from.
    pub convection_source: String,
}

/// The analysis note on the heating model.
pub const LUMPED_NOTE: &str = "heating: one energy balance for the board, with the winding's losses spread radially through the board's layers on a disc of the board's area (the hottest copper and the board average are both reported); the convection correlations hold for an isothermal plate at the board average";

/// Operating temperature above which [`Caution::HotToTouch`] is raised, C
/// (common practice).
pub const HOT_TO_TOUCH_C: f64 = 80.0;

/// The heating phase of the analysis: the board's heat balance under the
/// drive's average power (`r20`: the coil's resistance at 20 C, ohm; `l`
/// its inductance, H), the lateral spread to the hottest copper, with the
/// cautions when the design's max_temperature is exceeded or the board
/// runs hot.
pub fn analyse(
    design: &Design,
    layout: &Layout,
    cond: &Conductor,
    (r20, l): (f64, f64),
    phases: usize,
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
    let mut board = Board {
        area,
        perimeter: m(per_mm),
        heat_capacity: phases as f64 * cu_vol * cu_rho * cu_c + area * di_thick * di_rho * di_c,
        r20,
        phases: phases as f64,
        inductance: l,
        ambient: drive.ambient,
        emissivity: drive.emissivity,
        convection: drive.convection,
        medium: drive.surroundings,
        spread: Spread::UNIFORM,
    };
    let wave = Wave::of(drive);
    let disc = Disc::of(design, layout, area);
    // The spread depends on the loss coefficient, which depends on the
    // temperature (by about the fourth root of the rise): taken at the
    // uniform balance's temperature, then once more at the spread's own,
    // which moves it by well under 0.1 %.
    for _ in 0..2 {
        let t = board
            .steady_within(wave, 1e-3)
            .unwrap_or(T_CAP)
            .max(drive.ambient + 1.0);
        board.spread = disc.spread(board.losses(t).both_faces());
    }
    let steady = board.steady(wave);
    let hottest = steady.map(|t| board.hottest_at(t));
    let t_op = hottest.unwrap_or(Board::cap());
    let t_avg_op = steady.unwrap_or(Board::cap());
    let r_hot = at_temperature(r20, board.winding_at(t_avg_op).min(Board::cap()));
    let (current, voltage) = match drive.source {
        Source::Voltage(v) => (v / r_hot, v),
        Source::Current(i) => (i, i * r_hot),
    };
    let (max_i, max_v) = board.limits(wave, drive.max_temperature);
    let losses = board.losses(t_avg_op);
    let pulse = board.pulse(wave, drive.max_temperature);
    let tau = board.time_constant(t_avg_op.min(drive.max_temperature.max(drive.ambient + 1.0)));
    let convection_source = match (drive.convection, drive.surroundings) {
        (Some(hc), _) => format!("drive.convection = {hc} W/(m^2 K) on both faces (user value)"),
        (None, Surroundings::StillAir) => "still air: natural convection from a horizontal plate, hot face up and down (Raithby & Hollands, Handbook of Heat Transfer 1998, ch. 4, with their thin-layer limit for small plates; coefficients and air properties recalled from memory)".into(),
        (None, Surroundings::MovingAir { air_speed_m_s }) => format!("moving air at {air_speed_m_s} m/s: laminar flat plate 0.664 Re^(1/2) Pr^(1/3) (Incropera eq. 7.30) combined with natural convection (Raithby & Hollands) as (hF^3 + hN^3)^(1/3) (Incropera section 9.9); recalled from memory"),
        (None, Surroundings::Water) => "still water: natural convection from a horizontal plate (Raithby & Hollands, Handbook of Heat Transfer 1998, ch. 4) with water properties (Incropera Table A.6), no radiation; recalled from memory".into(),
    };
    if drive.convection.is_none()
        && let Some(x) = losses.extrapolated()
    {
        findings.note(x);
    }
    match hottest {
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
            "at the drive the hottest copper reaches max_temperature after {p:.3} s from ambient"
        ));
    }
    ThermalReport {
        temperature_c: hottest,
        temperature_board_c: steady,
        operating_c: t_op,
        resistance_ohm_hot: r_hot,
        current_a: current,
        voltage_v: voltage,
        power_w: phases as f64 * current * voltage,
        max_voltage_v: max_v,
        max_current_a: max_i,
        board,
        area_mm2,
        char_length_mm: area_mm2 / per_mm,
        heat_capacity_j_per_k: board.heat_capacity,
        losses,
        spread: board.spread,
        time_constant_s: tau,
        pulse_s: pulse,
        surroundings: drive.surroundings,
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
            phases: 1.0,
            inductance: 1e-6,
            ambient: 25.0,
            emissivity: 0.9,
            convection: conv,
            medium: Surroundings::StillAir,
            spread: Spread::UNIFORM,
        }
    }

    #[test]
    fn plate_correlations_agree_with_the_classical_ones_in_their_range() {
        // Raithby & Hollands' upward plate against Incropera eq. 9.30
        // (0.54 Ra^(1/4), 1e4..1e7) and downward against eq. 9.32 of the
        // 7th edition (0.52 Ra^(1/5), 1e4..1e9), air Pr = 0.71: independent
        // fits of the same experiments, expected to agree within about
        // 20 % (recalled coefficients, tag M). At small Ra the thin-layer form stays above
        // the extrapolated power law (conduction does not vanish).
        for ra in [1e5, 1e6, 1e7] {
            let (up, down) = plate_nusselt(ra, 0.71);
            let up_i = 0.54 * ra.powf(0.25);
            let down_i = 0.52 * ra.powf(0.2);
            assert!((up / up_i - 1.0).abs() < 0.2, "{ra}: {up} {up_i}");
            assert!((down / down_i - 1.0).abs() < 0.2, "{ra}: {down} {down_i}");
        }
        let (up, down) = plate_nusselt(100.0, 0.71);
        assert!(up > 0.54 * 100f64.powf(0.25) && down > 0.52 * 100f64.powf(0.2));
        // Laminar flat plate, Incropera eq. 7.30: Re = 1e4, Pr = 0.71 gives
        // Nu = 0.664 * 100 * 0.71^(1/3) = 59.2.
        let mut b = board(None);
        b.medium = Surroundings::MovingAir { air_speed_m_s: 3.0 };
        let l = b.losses(40.0);
        let re = l.reynolds.unwrap();
        assert!(re > 1e3 && re < 1e4, "{re}");
        let still = board(None).losses(40.0);
        assert!(l.h_top_w_per_m2k > still.h_top_w_per_m2k);
        // Water cools far better than air, and radiates nothing.
        let mut w = board(None);
        w.medium = Surroundings::Water;
        let lw = w.losses(40.0);
        assert!(lw.h_top_w_per_m2k > 10.0 * still.h_top_w_per_m2k);
        assert_eq!(lw.h_radiation_w_per_m2k, 0.0);
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
        let (i, v) = b.limits(Source::Current(1.0), 80.0);
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
