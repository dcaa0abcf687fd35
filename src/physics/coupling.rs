//! Two coils across a gap: their mutual inductance from the real copper of
//! both, the coupling coefficient `k = M / sqrt(L1 L2)`, coupling against
//! gap and lateral offset, and at a frequency the best efficiency of a
//! two-coil resonant link with the load that achieves it.
//!
//! * Placement: coil A as built (its top copper surface at `z = 0`); coil
//!   B above it, `gap` between the facing copper surfaces, its centre moved
//!   by `offset` along +x. [`Facing::TopToTop`] turns B over (a half turn
//!   about the x axis: `(x, y, z) -> (x, -y, -z)`), so its top layer faces
//!   A's top layer; [`Facing::SameWay`] keeps B the right way up, its
//!   bottom layer facing A's top layer.
//! * Mutual inductance: Neumann's double line integral over every pair of
//!   straight filaments of the two coils (`inductance::filaments_mutual`,
//!   the same pair integral as the self-inductance, with the geometric
//!   mean distance of the sections for close, nearly parallel pieces, so a
//!   small gap stays finite and sensible), on balanced chords of sagitta
//!   [`COUPLING_SAGITTA`]; for two circular coils on one axis Maxwell's
//!   formula over coaxial rings (`inductance::rings_mutual`).
//! * Link efficiency: [`link_efficiency_max`] and [`optimal_load`].

use super::Analysis;
use super::caution::{Caution, RESONANCE_MARGIN};
use super::conductor::{Conductor, Filament, Ring, to_mm};
use super::inductance::{InductanceMethod, filaments_mutual, rings_mutual};
use crate::design::{Design, Shape};
use serde::Serialize;

/// Relative chord sagitta of the balanced filaments (see
/// `Conductor::balanced_filaments`: each sub-arc keeps its current element
/// and its dipole moment) on which the mutual inductance of two coils is
/// summed. Coarser than the self-inductance's chords because the two coils
/// are a gap apart: against Maxwell rings for coaxial circular coils the
/// Neumann sum on these chords agrees within 2e-4 at gaps down to a tenth of
/// the pitch (tested in this module).
pub const COUPLING_SAGITTA: f64 = 2e-2;

/// How coil B faces coil A.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Facing {
    /// B turned over: its top layer faces A's top layer.
    TopToTop,
    /// B the right way up like A: its bottom layer faces A's top layer.
    SameWay,
}

/// Where coil B sits relative to coil A.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Placement {
    /// Distance between the facing copper surfaces, m.
    pub gap_m: f64,
    /// Lateral offset of B's centre from A's, along +x, m.
    pub offset_m: f64,
    /// Which face of B looks at A.
    pub facing: Facing,
}

/// Why two coils cannot be placed as asked.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
pub enum PlacementError {
    /// The gap is zero or negative: the facing copper touches or overlaps.
    #[error("{}", touching_text(*.gap_mm))]
    Touching {
        /// The gap asked for, mm.
        gap_mm: f64,
    },
    /// The gap is smaller than the insulation on the two facing surfaces.
    #[error(
        "{gap_mm} mm is less than the cover on the two facing surfaces ({cover_a_mm} mm on A, {cover_b_mm} mm on B; coverlay or solder mask, `stackup.cover`): the copper cannot come closer than {:.4} mm",
        cover_a_mm + cover_b_mm
    )]
    InsideCovers {
        /// The gap asked for, mm.
        gap_mm: f64,
        /// Cover on A's facing surface, mm.
        cover_a_mm: f64,
        /// Cover on B's facing surface, mm.
        cover_b_mm: f64,
    },
    /// A value is not a finite number.
    #[error("the gap and the offset must be finite numbers")]
    NotFinite,
}

fn touching_text(gap_mm: f64) -> String {
    if gap_mm == 0.0 {
        "a gap of 0 puts the facing copper surfaces in contact".into()
    } else {
        format!(
            "a gap of {gap_mm} mm makes the two coils' copper overlap by {} mm",
            -gap_mm
        )
    }
}

impl Placement {
    /// Checks that the copper of the two coils stays apart: the gap above
    /// zero and at least the two facing covers (`cover_a`, `cover_b`, mm,
    /// the boards' own coverlay or solder mask, which the facing copper
    /// cannot pass). A lateral offset alone never makes the copper meet.
    ///
    /// # Errors
    /// [`PlacementError`] naming the shortfall.
    pub fn check(&self, cover_a: f64, cover_b: f64) -> Result<(), PlacementError> {
        let gap_mm = to_mm(self.gap_m);
        if !self.gap_m.is_finite() || !self.offset_m.is_finite() {
            return Err(PlacementError::NotFinite);
        }
        if self.gap_m <= 0.0 {
            return Err(PlacementError::Touching { gap_mm });
        }
        if gap_mm < cover_a + cover_b - 1e-9 {
            return Err(PlacementError::InsideCovers {
                gap_mm,
                cover_a_mm: cover_a,
                cover_b_mm: cover_b,
            });
        }
        Ok(())
    }
}

/// One coil's copper as the coupling sees it, in its own frame (top copper
/// surface at `z = 0`, the board below).
#[derive(Debug, Clone)]
pub struct CoilCopper {
    /// Balanced filaments of every track, m.
    pub filaments: Vec<Filament>,
    /// Coaxial rings, for a circular coil.
    pub rings: Option<Vec<Ring>>,
    /// From the top copper surface down to the bottom copper surface, m.
    pub depth_m: f64,
    /// Farthest copper from the coil's axis, m.
    pub reach_m: f64,
}

impl CoilCopper {
    /// The copper of a coil from its design and conductor.
    pub fn new(design: &Design, cond: &Conductor) -> CoilCopper {
        let filaments = cond.balanced_filaments(COUPLING_SAGITTA);
        let rings = matches!(design.coil.shape, Shape::Circle).then(|| cond.rings());
        let depth_m = cond
            .layer_z
            .iter()
            .zip(&cond.layer_t)
            .map(|(z, t)| -(z - t / 2.0))
            .fold(0.0, f64::max);
        let reach_m = filaments
            .iter()
            .flat_map(|f| [f.a, f.b])
            .map(|p| p[0].hypot(p[1]))
            .fold(0.0, f64::max);
        CoilCopper {
            filaments,
            rings,
            depth_m,
            reach_m,
        }
    }

    /// The filaments moved to coil B's place.
    fn placed_filaments(&self, at: Placement) -> Vec<Filament> {
        let mv = |p: [f64; 3]| match at.facing {
            Facing::TopToTop => [p[0] + at.offset_m, -p[1], at.gap_m - p[2]],
            Facing::SameWay => [p[0] + at.offset_m, p[1], p[2] + at.gap_m + self.depth_m],
        };
        self.filaments
            .iter()
            .map(|f| Filament {
                a: mv(f.a),
                b: mv(f.b),
                ..*f
            })
            .collect()
    }

    /// The rings moved to coil B's place (on A's axis: no offset).
    fn placed_rings(rings: &[Ring], depth_m: f64, at: Placement) -> Vec<Ring> {
        rings
            .iter()
            .map(|r| match at.facing {
                Facing::TopToTop => Ring {
                    z: at.gap_m - r.z,
                    frac: -r.frac,
                    ..*r
                },
                Facing::SameWay => Ring {
                    z: r.z + at.gap_m + depth_m,
                    ..*r
                },
            })
            .collect()
    }
}

/// How a mutual inductance is computed for a placement: Maxwell's rings
/// for two circular coils on one axis, Neumann's filaments otherwise.
pub fn method(a: &CoilCopper, b: &CoilCopper, at: Placement) -> InductanceMethod {
    if a.rings.is_some() && b.rings.is_some() && at.offset_m == 0.0 {
        InductanceMethod::MaxwellRings
    } else {
        InductanceMethod::NeumannFilaments
    }
}

/// Mutual inductance of coil A and coil B placed at `at`, henry, signed:
/// positive when currents entering both coils' first terminal make fluxes
/// that add.
pub fn mutual(a: &CoilCopper, b: &CoilCopper, at: Placement) -> f64 {
    match (&a.rings, &b.rings, method(a, b, at)) {
        (Some(ra), Some(rb), InductanceMethod::MaxwellRings) => {
            rings_mutual(ra, &CoilCopper::placed_rings(rb, b.depth_m, at))
        }
        _ => filaments_mutual(&a.filaments, &b.placed_filaments(at)),
    }
}

/// Mutual inductances at many placements, henry, signed, in order: the
/// placements are shared among the processor's threads.
pub fn mutual_map(a: &CoilCopper, b: &CoilCopper, at: &[Placement]) -> Vec<f64> {
    super::map_indices(at.len(), |i| mutual(a, b, at[i]))
}

/// The best efficiency of a two-coil resonant link (both coils tuned to
/// resonance, the load chosen for the most power delivered per power
/// drawn), from the coupling `k` and the two quality factors:
/// `eta = x / (1 + sqrt(1 + x))^2` with `x = k^2 Q1 Q2`.
///
/// Source: M. Zargham and P. G. Gulak, "Maximum achievable efficiency in
/// near-field coupled power-transfer systems", IEEE Trans. Biomedical
/// Circuits and Systems 6(3), 2012 (the same result as W. H. Ko, S. P.
/// Liang, C. D. F. Fung, 1977); recalled from memory (REFERENCES.md tag M).
pub fn link_efficiency_max(k: f64, q1: f64, q2: f64) -> f64 {
    let x = k * k * q1 * q2;
    x / (1.0 + (1.0 + x).sqrt()).powi(2)
}

/// The load resistance that achieves [`link_efficiency_max`] across the
/// receive coil tuned to resonance, ohm: `R_L = R2 sqrt(1 + k^2 Q1 Q2)`
/// with `R2` the receive coil's loss resistance at the frequency (same
/// source, recalled from memory).
pub fn optimal_load(r2: f64, k: f64, q1: f64, q2: f64) -> f64 {
    r2 * (1.0 + k * k * q1 * q2).sqrt()
}

/// A coil's quality factor at the frequency its analysis was made for:
/// the one place the coupling reads Q (`None` without a frequency):
/// `omega L / R_ac` with the AC resistance (skin and proximity effect) at
/// the operating temperature (`physics::impedance`).
pub fn coil_q(analysis: &Analysis) -> Option<f64> {
    analysis.impedance.as_ref().map(|z| z.q)
}

/// One coil of a coupled pair as the report gives it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CoilSide {
    /// Design name.
    pub name: String,
    /// Self-inductance from the coil's own analysis, H.
    pub inductance_h: f64,
    /// Quality factor at the frequency (see [`coil_q`]); `None` without one.
    pub q: Option<f64>,
    /// Loss resistance at the frequency, `2 pi f L / Q`, ohm; `None`
    /// without a frequency.
    pub resistance_ohm: Option<f64>,
    /// Farthest copper from the coil's axis, mm.
    pub reach_mm: f64,
    /// The coil's self-resonant frequency from its analysis, Hz.
    pub self_resonance_hz: f64,
}

/// One point of a coupling curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CurvePoint {
    /// Gap or offset, mm.
    pub at_mm: f64,
    /// Coupling coefficient, signed like at the asked placement (so a
    /// curve that changes sign shows where the flux through B reverses).
    pub coupling: f64,
}

/// Points on each coupling curve.
pub const CURVE_POINTS: usize = 50;

/// The coupling of two coils (written as `couple --json` and couple.json).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CouplingReport {
    /// Mutual inductance, magnitude, H.
    pub mutual_inductance_h: f64,
    /// Coupling coefficient `|M| / sqrt(L1 L2)`.
    pub coupling: f64,
    /// Best efficiency of the resonant link at the frequency (0 to 1);
    /// `None` without a frequency.
    pub link_efficiency_max: Option<f64>,
    /// Gap between the facing copper surfaces, mm.
    pub gap_mm: f64,
    /// Lateral offset of B's centre from A's, mm.
    pub offset_mm: f64,
    /// Which face of B looks at A.
    pub facing: Facing,
    /// Whether currents entering both coils' terminal 1 make fluxes that
    /// add (the sign of M).
    pub terminals_aiding: bool,
    /// Frequency of the link, Hz.
    pub frequency_hz: Option<f64>,
    /// Load across B (tuned) for the best efficiency, ohm.
    pub optimal_load_ohm: Option<f64>,
    /// How M was computed.
    pub method: InductanceMethod,
    /// Where the efficiency formula is published.
    pub efficiency_source: &'static str,
    /// Coil A (below).
    pub coil_a: CoilSide,
    /// Coil B (above).
    pub coil_b: CoilSide,
    /// Coupling against gap at the offset.
    pub against_gap: Vec<CurvePoint>,
    /// Coupling against offset at the gap.
    pub against_offset: Vec<CurvePoint>,
    /// A link frequency at or above [`RESONANCE_MARGIN`] of either coil's
    /// self-resonance, as text naming the coil.
    pub warnings: Vec<String>,
}

/// Where [`link_efficiency_max`] is published.
pub const EFFICIENCY_SOURCE: &str = "M. Zargham and P. G. Gulak, \"Maximum achievable efficiency in near-field coupled power-transfer systems\", IEEE Trans. Biomedical Circuits and Systems 6(3), 2012 (recalled from memory)";

/// One coil for [`couple`]: its name, copper, and analysis (made with the
/// drive frequency set to the link's frequency, if any).
pub struct Coil<'a> {
    /// Design name.
    pub name: &'a str,
    /// Its copper.
    pub copper: &'a CoilCopper,
    /// Its analysis.
    pub analysis: &'a Analysis,
}

/// The coupling report of coil A and coil B at `at`, at `frequency_hz`
/// (the analyses must be made at that frequency), with both curves.
pub fn couple(
    a: &Coil,
    b: &Coil,
    at: Placement,
    frequency_hz: Option<f64>,
    min_gap_m: f64,
) -> CouplingReport {
    let (la, lb) = (
        a.analysis.inductance.inductance_h,
        b.analysis.inductance.inductance_h,
    );
    let norm = (la * lb).sqrt();
    let reach = a.copper.reach_m.max(b.copper.reach_m);
    // Gap curve: from the smallest allowed gap (or a tenth of the gap) to
    // the larger of three gaps and one coil diameter; the asked gap is one
    // of the points. Offset curve: from 0 to one coil diameter.
    let lo = min_gap_m.max(at.gap_m / 10.0).min(at.gap_m);
    let hi = (3.0 * at.gap_m).max(2.0 * reach);
    let n = CURVE_POINTS;
    let mut gaps: Vec<f64> = (0..n)
        .map(|i| lo + (hi - lo) * i as f64 / (n - 1) as f64)
        .collect();
    gaps.push(at.gap_m);
    let offsets: Vec<f64> = (0..n)
        .map(|i| 2.0 * reach * i as f64 / (n - 1) as f64)
        .collect();
    let places: Vec<Placement> = gaps
        .iter()
        .map(|&g| Placement { gap_m: g, ..at })
        .chain(offsets.iter().map(|&o| Placement { offset_m: o, ..at }))
        .collect();
    let ms = mutual_map(a.copper, b.copper, &places);
    let m_at = ms[n];
    let sign = if m_at < 0.0 { -1.0 } else { 1.0 };
    let curve = |xs: &[f64], vals: &[f64]| {
        let mut pts: Vec<CurvePoint> = xs
            .iter()
            .zip(vals)
            .map(|(&x, &v)| CurvePoint {
                at_mm: to_mm(x),
                coupling: sign * v / norm,
            })
            .collect();
        pts.sort_by(|p, q| p.at_mm.total_cmp(&q.at_mm));
        pts
    };
    let k = m_at.abs() / norm;
    let side = |c: &Coil, l: f64| {
        let q = coil_q(c.analysis);
        CoilSide {
            name: c.name.to_string(),
            inductance_h: l,
            q,
            resistance_ohm: frequency_hz
                .zip(q)
                .map(|(f, q)| 2.0 * std::f64::consts::PI * f * l / q),
            reach_mm: to_mm(c.copper.reach_m),
            self_resonance_hz: c.analysis.self_resonance_hz(),
        }
    };
    let (sa, sb) = (side(a, la), side(b, lb));
    let (eta, load) = match (frequency_hz, sa.q, sb.q, sb.resistance_ohm) {
        (Some(_), Some(q1), Some(q2), Some(r2)) => (
            Some(link_efficiency_max(k, q1, q2)),
            Some(optimal_load(r2, k, q1, q2)),
        ),
        _ => (None, None),
    };
    let warnings = [("A", &sa), ("B", &sb)]
        .iter()
        .filter_map(|(which, c)| {
            let (f, srf) = (frequency_hz?, c.self_resonance_hz);
            (f >= RESONANCE_MARGIN * srf).then(|| {
                let caution = Caution::NearSelfResonance {
                    frequency_hz: f,
                    self_resonance_hz: srf,
                };
                format!("coil {which} ({}): {caution}", c.name)
            })
        })
        .collect();
    CouplingReport {
        mutual_inductance_h: m_at.abs(),
        coupling: k,
        link_efficiency_max: eta,
        gap_mm: to_mm(at.gap_m),
        offset_mm: to_mm(at.offset_m),
        facing: at.facing,
        terminals_aiding: m_at >= 0.0,
        frequency_hz,
        optimal_load_ohm: load,
        method: method(a.copper, b.copper, at),
        efficiency_source: EFFICIENCY_SOURCE,
        coil_a: sa,
        coil_b: sb,
        against_gap: curve(&gaps, &ms[..=n]),
        against_offset: curve(&offsets, &ms[n + 1..]),
        warnings,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::MU0;
    use crate::physics::conductor::m;
    use crate::physics::inductance::maxwell_mutual;
    use std::f64::consts::PI;

    fn polygon_loop(r: f64, z: f64, n: usize, offset: f64) -> Vec<Filament> {
        (0..n)
            .map(|i| {
                let (a0, a1) = (
                    2.0 * PI * i as f64 / n as f64,
                    2.0 * PI * (i + 1) as f64 / n as f64,
                );
                Filament {
                    a: [offset + r * a0.cos(), r * a0.sin(), z],
                    b: [offset + r * a1.cos(), r * a1.sin(), z],
                    weight: 1.0,
                    layer: 1,
                    width: 1e-6,
                    thickness: 1e-6,
                    lead: false,
                }
            })
            .collect()
    }

    /// Two coaxial circular loops as fine polygons, Neumann against
    /// Maxwell's elliptic-integral formula (Maxwell 1873; Grover 1946):
    /// within 1e-6 once the polygons' area is matched to the circles'
    /// (an inscribed n-gon encloses `sin(2 pi / n) n / (2 pi)` of the
    /// area; its radius is raised to match, which leaves an error of
    /// order (2 pi / n)^4).
    #[test]
    fn coaxial_loops_match_maxwell() {
        let n = 2000;
        let grow = (2.0 * PI / n as f64 / (2.0 * PI / n as f64).sin()).sqrt();
        for (a, b, d) in [
            (0.01, 0.01, 0.001),
            (0.01, 0.005, 0.002),
            (0.02, 0.015, 0.01),
        ] {
            let pa = polygon_loop(a * grow, 0.0, n, 0.0);
            let pb = polygon_loop(b * grow, d, n, 0.0);
            let ours = filaments_mutual(&pa, &pb);
            let maxwell = maxwell_mutual(a, b, d);
            assert!((ours / maxwell - 1.0).abs() < 1e-6, "{ours} {maxwell}");
        }
    }

    /// Two parallel straight filaments of equal length `l` at distance
    /// `d`, side by side, and offset along their line: Grover 1946
    /// (Inductance Calculations, ch. 7; also Rosa 1908):
    /// `M = mu0/2pi [l asinh(l/d) - sqrt(l^2 + d^2) + d]`, and for
    /// filaments of lengths `l`, `m` with their near ends `s` apart along
    /// the line, `M = mu0/4pi [F(l+m+s) - F(l+s) - F(m+s) + F(s)]`,
    /// `F(x) = x asinh(x/d) - sqrt(x^2 + d^2)`.
    #[test]
    fn parallel_and_offset_filaments_match_grover() {
        let fil = |a: [f64; 3], b: [f64; 3]| Filament {
            a,
            b,
            weight: 1.0,
            layer: 1,
            width: 1e-6,
            thickness: 1e-6,
            lead: false,
        };
        let (l, d) = (0.02, 0.003);
        let p = [fil([0.0, 0.0, 0.0], [l, 0.0, 0.0])];
        let q = [fil([0.0, 0.0, d], [l, 0.0, d])];
        let grover = MU0 / (2.0 * PI) * (l * (l / d).asinh() - l.hypot(d) + d);
        let ours = filaments_mutual(&p, &q);
        assert!((ours / grover - 1.0).abs() < 1e-9, "{ours} {grover}");
        let f = |x: f64| x * (x / d).asinh() - x.hypot(d);
        for (mm, s) in [(0.01, 0.005), (0.03, 0.0), (0.005, 0.04)] {
            let q = [fil([l + s, d, 0.0], [l + s + mm, d, 0.0])];
            let grover = MU0 / (4.0 * PI) * (f(l + mm + s) - f(l + s) - f(mm + s) + f(s));
            let ours = filaments_mutual(&p, &q);
            assert!((ours / grover - 1.0).abs() < 1e-6, "{ours} {grover} at {s}");
        }
    }

    #[test]
    fn link_efficiency_limits() {
        // x = k^2 Q1 Q2 -> 0: eta ~ x/4; x -> infinity: eta -> 1; x = 8:
        // eta = 8 / (1 + 3)^2 = 0.5 (arithmetic).
        assert!((link_efficiency_max(0.01, 1.0, 1.0) / (1e-4 / 4.0) - 1.0).abs() < 1e-4);
        assert!(link_efficiency_max(0.5, 1e4, 1e4) > 0.999);
        assert!((link_efficiency_max(2.0, 2.0, 1.0) - 0.5).abs() < 1e-12);
        assert!((optimal_load(2.0, 2.0, 2.0, 1.0) - 6.0).abs() < 1e-12);
    }

    #[test]
    fn placements_that_make_copper_meet_are_refused() {
        let at = |g: f64| Placement {
            gap_m: m(g),
            offset_m: 0.0,
            facing: Facing::TopToTop,
        };
        assert!(matches!(
            at(0.0).check(0.0, 0.0),
            Err(PlacementError::Touching { .. })
        ));
        let e = at(-0.5).check(0.0, 0.0).unwrap_err().to_string();
        assert!(e.contains("overlap by 0.5 mm"), "{e}");
        assert!(matches!(
            at(0.05).check(0.0375, 0.0375),
            Err(PlacementError::InsideCovers { .. })
        ));
        assert!(at(0.075).check(0.0375, 0.0375).is_ok());
    }
}
