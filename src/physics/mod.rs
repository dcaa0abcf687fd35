//! Engineering analysis of a layout: resistance, inductance, field, force on
//! a magnet, heating and bending, computed on the real conductor (every
//! track of every layer, in current order) and cross-checked against
//! published closed forms.
//!
//! One file per topic: [`resistance`], [`inductance`], [`field`]
//! (Biot-Savart), [`magnet`], [`thermal`], [`mechanics`], [`closed_forms`]
//! (published formulas used as cross-checks), [`elliptic`] (complete
//! elliptic integrals by the AGM), [`conductor`] (the layout as current
//! paths in SI units).
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
//! * Force on a magnet: real conductor within 0.1 % of magpylib's cylinder
//!   field; the coaxial-ring cross-check within 0.1 % for circles and 2 %
//!   for hexagons (rectangles are far from circles: tens of percent).

pub mod closed_forms;
pub mod conductor;
pub mod elliptic;
pub mod field;
pub mod gmd;
pub mod inductance;
pub mod magnet;
pub mod mechanics;
pub mod resistance;
pub mod thermal;

use crate::design::{Design, Magnet, Shape, Source};
use crate::geometry::Board;
use closed_forms::MohanShape;
use conductor::{Conductor, m, to_mm};
use inductance::InductanceMethod;
use serde::Serialize;

/// Magnetic constant, H/m: the conventional value 4 pi 1e-7 (CODATA 2022
/// differs by about 1e-10 relative).
pub const MU0: f64 = 4e-7 * std::f64::consts::PI;

/// Relative chord sagitta of the balanced filaments the field is computed
/// on ([`conductor::Conductor::balanced_filaments`]; on a 4-layer,
/// 20-turn circular coil the centre field is within 1e-7 and the profile
/// 0.5 mm above the copper within 2e-4 of the field's centre value, against
/// chords 1e5 times finer: tested in `conductor.rs`).
pub const FIELD_SAGITTA: f64 = 1e-3;

/// The same for [`Detail::Metrics`] (sweeps): centre field within 3e-6,
/// profile within 6e-3 of the centre value, on that coil; the fall radii
/// within 0.02 mm of the report's (tested in `tests/suite/physics_reference.rs`).
pub const FIELD_SAGITTA_METRICS: f64 = 8e-3;

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

/// One point of a field profile.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ProfilePoint {
    /// Position along the profile (height above the top copper surface
    /// for the axial profile, distance from the axis for the radial one), mm.
    pub at_mm: f64,
    /// Flux density along the coil's own field direction per ampere at the
    /// terminals, T/A (positive where it points the same way as at the centre).
    pub b_t_per_a: f64,
}

/// Field results.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FieldReport {
    /// On-axis field per ampere at the centre of the top copper surface,
    /// T/A (magnitude; it points into the board for current entering
    /// terminal 1).
    pub center_t_per_a: f64,
    /// Same at the drive current, T.
    pub center_at_drive_t: f64,
    /// B along the axis from the top surface upwards.
    pub axial: Vec<ProfilePoint>,
    /// Height of the radial profile above the top copper surface, mm.
    pub radial_height_mm: f64,
    /// Bz against the distance from the axis at that height (for polygons and rectangles the mean of two directions 45 degrees apart).
    pub radial: Vec<ProfilePoint>,
    /// Radius where Bz at that height first falls to 90 % of its value on
    /// the axis, mm.
    pub radius_90_mm: Option<f64>,
    /// Radius where it falls to 50 %, mm.
    pub radius_50_mm: Option<f64>,
    /// Arcs are flattened into balanced filament pairs over sub-arcs whose
    /// chord has a sagitta of at most this fraction of their radius.
    pub chord_sagitta_relative: f64,
    /// Straight filaments used.
    pub filaments: usize,
}

/// Published single-layer estimates beside the computed inductance.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InductanceReport {
    /// How the inductance was computed.
    pub method: InductanceMethod,
    /// Computed inductance of the top layer alone (same method), H.
    pub single_layer_h: f64,
    /// Mohan et al. 1999 modified Wheeler, single layer, H.
    pub mohan_modified_wheeler_h: Option<f64>,
    /// Mohan et al. 1999 current sheet, single layer, H.
    pub mohan_current_sheet_h: Option<f64>,
    /// Wheeler 1928 flat spiral, single layer, H.
    pub wheeler_1928_h: Option<f64>,
    /// Outer and inner copper size used by the estimates (across flats for
    /// polygons), mm.
    pub d_out_mm: f64,
    /// Inner copper size, mm.
    pub d_in_mm: f64,
}

/// Impedance at the drive frequency.
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

/// Force on the magnet.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MagnetReport {
    /// Axial force at the drive, N (positive: pushes the magnet away).
    pub force_n: f64,
    /// Per ampere, N/A.
    pub force_per_a_n: f64,
    /// Per square-root watt at the operating temperature, N/sqrt(W).
    pub force_per_sqrt_w_n: f64,
    /// Method A (Lorentz force on the real conductor), N per ampere.
    pub lorentz_n_per_a: f64,
    /// Method B (coaxial rings, Maxwell), N per ampere.
    pub rings_n_per_a: f64,
    /// |A - B| / |A|.
    pub methods_difference: f64,
    /// Force per ampere against the gap, N/A (method B for circular coils,
    /// method A otherwise).
    pub force_vs_gap: Vec<GapPoint>,
    /// Magnet's own field on its axis at the top copper surface, T
    /// (Derby & Olbert closed form).
    pub magnet_field_at_coil_t: f64,
}

/// One point of the force-against-gap curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct GapPoint {
    /// Gap from the top copper surface to the magnet face, mm.
    pub gap_mm: f64,
    /// Force per ampere, N/A.
    pub force_n_per_a: f64,
}

/// Heating results.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ThermalReport {
    /// Area of one face of the board, mm^2.
    pub area_mm2: f64,
    /// Characteristic length area/perimeter, mm.
    pub char_length_mm: f64,
    /// Heat capacity of copper and dielectric, J/K.
    pub heat_capacity_j_per_k: f64,
    /// Loss coefficients at the operating temperature.
    pub losses: thermal::Losses,
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
    /// Frequency for impedance, Hz.
    pub frequency_hz: Option<f64>,
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

/// Results of the analysis (SI units in the field names).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Analysis {
    /// Total centre-line length of copper tracks, mm (vias excluded).
    pub trace_length_mm: f64,
    /// Terminal-to-terminal resistance at 20 C, ohm.
    pub resistance_ohm_20c: f64,
    /// Resistance at the operating temperature, ohm.
    pub resistance_ohm_hot: f64,
    /// Inductance, H.
    pub inductance_h: f64,
    /// Bz per ampere at the centre of the top copper surface, T/A.
    pub field_center_t_per_a: f64,
    /// Axial force on the magnet at the drive, N (`None`: no magnet).
    pub force_n: Option<f64>,
    /// Force per ampere, N/A.
    pub force_per_a_n: Option<f64>,
    /// Force per square-root watt, N/sqrt(W).
    pub force_per_sqrt_w_n: Option<f64>,
    /// Steady copper temperature at the drive, C (`None`: no steady state
    /// below 1000 C).
    pub temperature_c: Option<f64>,
    /// Largest voltage that keeps the coil at max_temperature, V.
    pub max_voltage_v: f64,
    /// Largest current that keeps the coil at max_temperature, A.
    pub max_current_a: f64,
    /// Finished board thickness, mm.
    pub thickness_mm: f64,
    /// Minimum static (install) bend radius, mm.
    pub bend_radius_min_mm: f64,
    /// Minimum dynamic bend radius, mm.
    pub bend_radius_dynamic_mm: f64,
    /// Current at the drive and operating temperature, A.
    pub current_a: f64,
    /// Voltage at the drive and operating temperature, V.
    pub voltage_v: f64,
    /// Power at the drive and operating temperature, W.
    pub power_w: f64,
    /// Per-layer length and resistance.
    pub layers: Vec<resistance::LayerResistance>,
    /// Via barrels' share of the resistance at 20 C, ohm.
    pub vias_ohm_20c: f64,
    /// Inductance method and published estimates.
    pub inductance: InductanceReport,
    /// Impedance at the drive frequency, if one is given.
    pub impedance: Option<Impedance>,
    /// Field profiles.
    pub field: FieldReport,
    /// Force on the magnet, if there is one.
    pub magnet: Option<MagnetReport>,
    /// Heating.
    pub thermal: ThermalReport,
    /// Thickness and bending.
    pub mechanics: mechanics::Mechanics,
    /// Limits exceeded or results to distrust (most serious first).
    pub warnings: Vec<String>,
    /// Assumptions and approximations.
    pub notes: Vec<String>,
    /// The inputs used.
    pub inputs: Inputs,
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

/// Area (mm^2) and perimeter (mm) of the board outline (a closed loop).
fn outline_area(outline: &[crate::geometry::Segment]) -> (f64, f64) {
    // Exact for lines and arcs: A = 1/2 closed integral of (x dy - y dx);
    // along an arc about (cx, cy) of radius r sweeping phi that integral is
    // r^2 phi + cx (y1 - y0) - cy (x1 - x0).
    let mut twice = 0.0;
    let mut per = 0.0;
    for s in outline {
        per += s.length();
        let (p, q) = (s.start(), s.end());
        twice += match s {
            crate::geometry::Segment::Line(_) => p.x * q.y - q.x * p.y,
            crate::geometry::Segment::Arc(a) => {
                let r = a.radius();
                r * r * a.sweep + a.center.x * (q.y - p.y) - a.center.y * (q.x - p.x)
            }
        };
    }
    ((twice / 2.0).abs(), per)
}

/// Radius (mm) where a profile first falls to `frac` of its first value:
/// the first interval of the sampled profile that crosses it, then the
/// crossing of the profile function `at` (mm -> value) itself within that
/// interval, to 1 um (Illinois steps, see `geometry::fit`). Sweeps sample
/// the profile more coarsely than reports but find the same crossing
/// unless a dip narrower than their spacing comes first.
fn fall_radius(profile: &[ProfilePoint], frac: f64, at: impl Fn(f64) -> f64) -> Option<f64> {
    let b0 = profile.first()?.b_t_per_a;
    let target = frac * b0;
    let w = profile
        .windows(2)
        .find(|w| w[1].b_t_per_a <= target && w[0].b_t_per_a > target)?;
    if w[1].b_t_per_a == target {
        return Some(w[1].at_mm);
    }
    let g = |r: f64| Ok::<f64, std::convert::Infallible>(target - at(r));
    let lo = (w[0].at_mm, target - w[0].b_t_per_a);
    let hi = (w[1].at_mm, target - w[1].b_t_per_a);
    crate::geometry::fit::largest_feasible(g, lo, hi, 1e-3).ok()
}

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
    let full = detail == Detail::Full;
    if layout.windings.is_empty() || layout.tracks.is_empty() {
        return Err(AnalysisError::Empty);
    }
    if design.stackup.copper.len() < layout.layers as usize {
        return Err(AnalysisError::Stackup {
            given: design.stackup.copper.len(),
            layers: layout.layers,
        });
    }
    let mut warnings = Vec::new();
    let mut notes = Vec::new();
    let drive = &design.drive;
    let cond = Conductor::new(design, layout);

    // Resistance.
    let res = resistance::resistance(design, layout, &cond);
    let r20 = res.total_ohm_20c;

    // Inductance.
    let circular = matches!(design.coil.shape, Shape::Circle);
    let (l, method) = inductance::inductance(&cond, circular);
    let (l1, _) = inductance::inductance(&cond.only_layer(1), circular);
    let inductance = published_estimates(design, layout, method, l1);

    // Field.
    let sagitta = if full {
        FIELD_SAGITTA
    } else {
        FIELD_SAGITTA_METRICS
    };
    let segs = cond.field_segments(sagitta, 1.0);
    let r_out = m(layout.outer_radius);
    let b0 = segs.field_at([0.0, 0.0, 0.0])[2];
    let sign = if b0 < 0.0 { -1.0 } else { 1.0 };
    let n_ax = if full { 41 } else { 2 };
    let z_max = 2.0 * r_out;
    // (The first point is the centre, already known.)
    let ax_pts: Vec<[f64; 3]> = (1..n_ax)
        .map(|i| [0.0, 0.0, z_max * i as f64 / (n_ax - 1) as f64])
        .collect();
    let axial: Vec<ProfilePoint> = std::iter::once(([0.0; 3], b0))
        .chain(
            segs.field(&ax_pts)
                .iter()
                .zip(&ax_pts)
                .map(|(b, p)| (*p, b[2])),
        )
        .map(|(p, bz)| ProfilePoint {
            at_mm: to_mm(p[2]),
            b_t_per_a: sign * bz,
        })
        .collect();
    let h = design.magnet.map_or(0.5, |mg| mg.gap);
    let crate::geometry::Rect { min: lo, max: hi } = layout.outline_bounds();
    let r_edge = m(lo.x.abs().max(lo.y.abs()).max(hi.x).max(hi.y)).max(1.2 * r_out);
    let n_r = if full { 101 } else { 13 };
    // Circles are round: one direction; other shapes: the mean of two.
    let dirs = if circular { 1 } else { 2 };
    // Bz at distance `r` (m) from the axis at the radial height, signed to
    // the centre's direction: on the grid below and, for the fall radii,
    // anywhere.
    let radial_at = |r: f64| {
        sign * (0..dirs)
            .map(|d| {
                let a = std::f64::consts::FRAC_PI_4 * d as f64;
                segs.field_at([r * a.cos(), r * a.sin(), m(h)])[2]
            })
            .sum::<f64>()
            / dirs as f64
    };
    let radial: Vec<ProfilePoint> = map_indices(n_r, |i| {
        let r = r_edge * i as f64 / (n_r - 1) as f64;
        ProfilePoint {
            at_mm: to_mm(r),
            b_t_per_a: radial_at(r),
        }
    });

    // Heating.
    let (area_mm2, per_mm) = outline_area(&layout.outline.segments);
    let ((cu_rho, cu_c), (di_rho, di_c)) = thermal::heat_capacities(design.stackup.kind);
    let cu_vol: f64 = cond
        .pieces
        .iter()
        .map(|p| m(p.segment.length()) * p.width * p.thickness)
        .sum();
    let di_thick = m(design.stackup.dielectric.iter().sum::<f64>() + 2.0 * design.stackup.cover);
    let area = area_mm2 * 1e-6;
    let board = thermal::Board {
        area,
        perimeter: m(per_mm),
        heat_capacity: cu_vol * cu_rho * cu_c + area * di_thick * di_rho * di_c,
        r20,
        ambient: drive.ambient,
        emissivity: drive.emissivity,
        convection: drive.convection,
    };
    let steady = board.steady(drive.source);
    let t_op = steady.unwrap_or(thermal::Board::cap());
    let r_hot = resistance::at_temperature(r20, t_op);
    let (current, voltage) = match drive.source {
        Source::Voltage(v) => (v / r_hot, v),
        Source::Current(i) => (i, i * r_hot),
    };
    let power = current * voltage;
    let (max_i, max_v) = board.limits(drive.max_temperature);
    let losses = board.losses(t_op);
    let pulse = board.pulse(drive.source, drive.max_temperature);
    let tau = board.time_constant(t_op.min(drive.max_temperature.max(drive.ambient + 1.0)));
    let convection_source = match drive.convection {
        Some(hc) => format!("drive.convection = {hc} W/(m^2 K) on both faces (user value)"),
        None => "natural convection, horizontal plate, hot face up 0.54 Ra^(1/4) and down 0.27 Ra^(1/4) (Incropera, Fundamentals of Heat and Mass Transfer, eqs 9.30-9.32; coefficients and air properties recalled from memory)".into(),
    };
    if drive.convection.is_none() && losses.rayleigh < 1e4 {
        notes.push(format!(
            "Rayleigh number {:.0} is below the range of the plate correlations (1e4..1e7): extrapolated; small boards may lose heat faster than predicted",
            losses.rayleigh
        ));
    }

    match steady {
        None => warnings.push(format!(
            "no steady temperature below {:.0} C at the drive: the coil would overheat and burn out",
            thermal::Board::cap()
        )),
        Some(t) if t > drive.max_temperature => warnings.push(format!(
            "temperature {t:.0} C exceeds max_temperature {:.0} C at the drive",
            drive.max_temperature
        )),
        _ => {}
    }
    if t_op > 80.0 {
        warnings.push(format!(
            "{t_op:.0} C is above about 80 C: burns to the touch and ageing of the dielectric and adhesive (common practice)"
        ));
    }
    if let Some(p) = pulse {
        notes.push(format!(
            "at the drive the board reaches max_temperature after {p:.3} s from ambient"
        ));
    }

    // Force on the magnet.
    let magnet = design.magnet.map(|mg| {
        let cyl = magnet::Cylinder {
            radius: m(mg.diameter / 2.0),
            length: m(mg.thickness),
            remanence: mg.remanence,
            gap: m(mg.gap),
        };
        let fa = magnet::force_lorentz_pieces(&cond.pieces, 1.0, &cyl);
        let rings = cond.rings();
        let fb = magnet::force_rings(&rings, 1.0, &cyl);
        let diff = if fa != 0.0 {
            ((fa - fb) / fa).abs()
        } else {
            0.0
        };
        let gap_max = (3.0 * mg.gap).max(mg.diameter).max(1.0);
        // Circles: the ring model (agrees with the real conductor to a
        // fraction of a percent, and is fast); other shapes: the real
        // conductor on fewer points.
        let (n_gap, by_rings) = match (full, circular) {
            (false, _) => (0, true),
            (true, true) => (40, true),
            (true, false) => (20, false),
        };
        let curve = if n_gap == 0 {
            Vec::new()
        } else {
            (0..=n_gap)
                .map(|i| {
                    let g = gap_max * i as f64 / n_gap as f64;
                    let c = magnet::Cylinder { gap: m(g), ..cyl };
                    let f = if by_rings {
                        magnet::force_rings(&rings, 1.0, &c)
                    } else {
                        magnet::force_lorentz_pieces(&cond.pieces, 1.0, &c)
                    };
                    GapPoint {
                        gap_mm: g,
                        force_n_per_a: f,
                    }
                })
                .collect()
        };
        MagnetReport {
            force_n: fa * current,
            force_per_a_n: fa,
            force_per_sqrt_w_n: if power > 0.0 {
                fa * current / power.sqrt()
            } else {
                0.0
            },
            lorentz_n_per_a: fa,
            rings_n_per_a: fb,
            methods_difference: diff,
            force_vs_gap: curve,
            magnet_field_at_coil_t: closed_forms::magnet_on_axis(
                mg.remanence,
                cyl.radius,
                cyl.length,
                cyl.gap,
            ),
        }
    });
    if let Some(mr) = &magnet
        && mr.methods_difference > 0.05
    {
        let msg = format!(
            "the two force methods differ by {:.1} % (coaxial-ring model vs real conductor)",
            100.0 * mr.methods_difference
        );
        if matches!(design.coil.shape, Shape::Rectangle { .. }) {
            notes.push(format!("{msg}: expected for a rectangle, whose sides are far from circles; the real-conductor value is used"));
        } else {
            warnings.push(format!("{msg}: treat the force as rough"));
        }
    }

    // Impedance.
    let impedance = drive.frequency.filter(|f| *f > 0.0).map(|f| {
        let x = 2.0 * std::f64::consts::PI * f * l;
        let rho = resistance::RHO_20 * (1.0 + resistance::ALPHA_20 * (t_op - 20.0));
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
            notes.push(format!(
                "skin depth {:.1} um is below half the copper thickness: AC resistance is higher and Q lower than shown",
                z.skin_depth_um
            ));
        }
    }

    // Mechanics.
    let mech = mechanics::mechanics(design);
    if let Some(b) = design.stackup.bend {
        let need = match b.kind {
            crate::design::BendKind::Static => mech.bend_radius_min_mm,
            crate::design::BendKind::Dynamic => mech.bend_radius_dynamic_mm,
        };
        if b.radius < need {
            warnings.push(format!(
                "bend radius {:.2} mm is below the {:.2} mm minimum for {} bending of a {:.3} mm board (ratios quoted from IPC-2223, common practice)",
                b.radius,
                need,
                match b.kind {
                    crate::design::BendKind::Static => "static",
                    crate::design::BendKind::Dynamic => "dynamic",
                },
                mech.thickness_mm
            ));
        }
    }

    notes.push(format!(
        "inductance by {}; self terms and close pieces by the geometric mean distance of the rectangular sections (Grover)",
        match method {
            InductanceMethod::MaxwellRings => "coaxial rings with Maxwell's formula (each turn as one loop at its mean radius, partial turns as fractions)",
            InductanceMethod::NeumannFilaments => "Neumann's formula on straight filaments along the conductor",
        }
    ));
    notes.push("via barrels counted as plated tubes between the copper centres of the layers they join; terminal pads' barrels not counted".into());
    notes.push("one temperature for the whole board (lumped); real hot spots are hotter".into());

    let field_center = b0.abs();
    Ok(Analysis {
        trace_length_mm: layout.track_length(),
        resistance_ohm_20c: r20,
        resistance_ohm_hot: r_hot,
        inductance_h: l,
        field_center_t_per_a: field_center,
        force_n: magnet.as_ref().map(|x| x.force_n),
        force_per_a_n: magnet.as_ref().map(|x| x.force_per_a_n),
        force_per_sqrt_w_n: magnet.as_ref().map(|x| x.force_per_sqrt_w_n),
        temperature_c: steady,
        max_voltage_v: max_v,
        max_current_a: max_i,
        thickness_mm: mech.thickness_mm,
        bend_radius_min_mm: mech.bend_radius_min_mm,
        bend_radius_dynamic_mm: mech.bend_radius_dynamic_mm,
        current_a: current,
        voltage_v: voltage,
        power_w: power,
        layers: res.layers,
        vias_ohm_20c: res.vias_ohm_20c,
        inductance,
        impedance,
        field: FieldReport {
            center_t_per_a: field_center,
            center_at_drive_t: field_center * current,
            radius_90_mm: fall_radius(&radial, 0.9, |r_mm| radial_at(m(r_mm))),
            radius_50_mm: fall_radius(&radial, 0.5, |r_mm| radial_at(m(r_mm))),
            axial,
            radial_height_mm: h,
            radial,
            chord_sagitta_relative: sagitta,
            filaments: segs.len(),
        },
        magnet,
        thermal: ThermalReport {
            area_mm2,
            char_length_mm: area_mm2 / per_mm,
            heat_capacity_j_per_k: board.heat_capacity,
            losses,
            time_constant_s: tau,
            pulse_s: pulse,
            convection_source,
        },
        mechanics: mech,
        warnings,
        notes,
        inputs: Inputs {
            drive: drive.source,
            ambient_c: drive.ambient,
            max_temperature_c: drive.max_temperature,
            convection_w_per_m2k: drive.convection,
            emissivity: drive.emissivity,
            frequency_hz: drive.frequency,
            copper_um: design.stackup.copper.iter().map(|c| c * 1e3).collect(),
            dielectric_um: design.stackup.dielectric.iter().map(|c| c * 1e3).collect(),
            plating_um: design.stackup.plating * 1e3,
            cover_um: design.stackup.cover * 1e3,
            magnet: design.magnet,
            resistivity_ohm_m: resistance::RHO_20,
            temperature_coefficient_per_k: resistance::ALPHA_20,
        },
    })
}

/// The published single-layer estimates that apply to the design's shape.
fn published_estimates(
    design: &Design,
    layout: &Board,
    method: InductanceMethod,
    l1: f64,
) -> InductanceReport {
    let n = layout.turns;
    let (shape, flats) = match design.coil.shape {
        Shape::Circle => (Some(MohanShape::Circle), 1.0),
        Shape::Polygon { sides } => {
            let s = match sides {
                4 => Some(MohanShape::Square),
                6 => Some(MohanShape::Hexagon),
                8 => Some(MohanShape::Octagon),
                _ => None,
            };
            (s, (std::f64::consts::PI / sides as f64).cos())
        }
        Shape::Rectangle { width, height } if (width - height).abs() < 1e-9 => {
            (Some(MohanShape::Square), std::f64::consts::FRAC_1_SQRT_2)
        }
        Shape::Rectangle { .. } => (None, 1.0),
    };
    // Outer size across flats from the circumscribed diameter; the inner
    // one is the free circle's diameter (already across flats). A spiral of
    // n turns reaches half a pitch further in and out than n concentric
    // turns (which the formulas assume) of the same mean size: use those.
    let p = layout.pitch;
    let d_out = match design.coil.shape {
        Shape::Circle => 2.0 * layout.outer_radius,
        _ => 2.0 * layout.outer_radius * flats,
    } - p;
    let d_in = 2.0 * layout.inner_radius + p;
    let (mw, cs, wh) = match shape {
        Some(s) if d_out > d_in && d_in > 0.0 => (
            closed_forms::mohan_modified_wheeler(s, n, m(d_out), m(d_in)),
            Some(closed_forms::mohan_current_sheet(s, n, m(d_out), m(d_in))),
            if s == MohanShape::Circle {
                Some(closed_forms::wheeler_1928(n, m(d_in / 2.0), m(d_out / 2.0)))
            } else {
                None
            },
        ),
        _ => (None, None, None),
    };
    InductanceReport {
        method,
        single_layer_h: l1,
        mohan_modified_wheeler_h: mw,
        mohan_current_sheet_h: cs,
        wheeler_1928_h: wh,
        d_out_mm: d_out,
        d_in_mm: d_in,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::geometry::{Arc, Point, Segment};

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
