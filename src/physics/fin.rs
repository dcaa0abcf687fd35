//! The flexible fin: a strip of the board clamped at one end, carrying the
//! coil (or the magnet) at `load_at`, pushed by the force between coil and
//! magnet.
//!
//! * Bending stiffness `EI(x)` of the laminate by the transformed-section
//!   method (Gere & Goodno, Mechanics of Materials, composite beams): every
//!   layer with its modulus, width and thickness about the section's
//!   modulus-weighted neutral axis. Each copper layer counts with its real
//!   copper width: in the coil region the winding's fill `w / (w + s)`
//!   times the chord of the winding's annulus at that section; between the
//!   clamp and the coil two leads of the trace width on the outer layers;
//!   the rest of a copper layer is filled with adhesive (flex) or resin
//!   (rigid).
//! * Stiffness at the load point, first resonance and the static
//!   deflection: Euler-Bernoulli beam by finite elements (cubic Hermite,
//!   about 48 elements, `EI` and mass per length averaged per element),
//!   with the tip mass (added mass, and the magnet's when it rides on the
//!   fin) at the load point; the first mode by inverse iteration.
//! * The static deflection under the mean force follows the gap: the force
//!   per ampere against the gap (coaxial-ring model scaled to the real
//!   conductor's value at the design gap) balances the fin's stiffness;
//!   an attracting force that grows faster than the stiffness pulls the fin
//!   in (no stable position).
//! * The swing at the drive frequency and its harmonics: one mode,
//!   `X = (F / k) / sqrt((1 - r^2)^2 + (2 zeta r)^2)`, `r = f / f1`.
//!
//! Moduli and densities recalled from memory \[M\]: copper 117 GPa, 8960
//! kg/m^3; polyimide 2.5 GPa, 1420; coverlay with its adhesive 2.0 GPa,
//! 1400; flex adhesive 1.5 GPa, 1200; FR-4 22 GPa, 1850; solder mask
//! 3 GPa, 1400; resin 3.5 GPa, 1200; sintered NdFeB 7500 kg/m^3.
//!
//! [`analyse`] is the analysis phase ([`FinReport`]).

use super::caution::Caution;
use super::conductor::m;
use super::drive::DriveReport;
use super::magnet::{Cylinder, MagnetReport, force_rings};
use crate::design::{BoardKind, Design, Fin, Magnet, Moving};
use crate::geometry::Board as Layout;
use serde::Serialize;

/// (Young's modulus Pa, density kg/m^3) of a material \[M\].
type Material = (f64, f64);
const COPPER: Material = (117e9, 8960.0);
/// Density of sintered NdFeB, kg/m^3 \[M\].
pub const NDFEB_DENSITY: f64 = 7500.0;

/// Dielectric, cover and the filler between copper tracks of a board kind.
fn materials(kind: BoardKind) -> (Material, Material, Material) {
    match kind {
        BoardKind::Flex => ((2.5e9, 1420.0), (2.0e9, 1400.0), (1.5e9, 1200.0)),
        BoardKind::Rigid => ((22e9, 1850.0), (3e9, 1400.0), (3.5e9, 1200.0)),
    }
}

/// The fin's laminate along its length (SI units).
#[derive(Debug, Clone, PartialEq)]
pub struct Laminate {
    /// Layers top to bottom: (thickness m, material, whether copper).
    layers: Vec<(f64, Material, bool)>,
    /// Filler of the copper layers between tracks.
    filler: Material,
    /// Fin width, m.
    width: f64,
    /// Fin free length, m.
    length: f64,
    /// Load point from the clamp, m.
    load_at: f64,
    /// Winding inner and outer radius, m.
    r_in: f64,
    r_out: f64,
    /// Winding fill (copper width over pitch).
    fill: f64,
    /// Trace width, m.
    trace: f64,
}

impl Laminate {
    /// The laminate of a design's fin.
    pub fn of(design: &Design, layout: &Layout, fin: &Fin) -> Laminate {
        let s = &design.stackup;
        let (diel, cover, filler) = materials(s.kind);
        let mut layers = vec![(m(s.cover), cover, false)];
        for (i, c) in s.copper.iter().enumerate() {
            layers.push((m(*c), COPPER, true));
            if let Some(d) = s.dielectric.get(i) {
                layers.push((m(*d), diel, false));
            }
        }
        layers.push((m(s.cover), cover, false));
        layers.retain(|l| l.0 > 0.0);
        Laminate {
            layers,
            filler,
            width: m(fin.width),
            length: m(fin.free_length),
            load_at: m(fin.load_at),
            r_in: m(layout.inner_radius),
            r_out: m(layout.outer_radius),
            fill: (layout.trace_width / layout.pitch).clamp(0.0, 1.0),
            trace: m(layout.trace_width),
        }
    }

    /// Copper width of copper layer `k` of `n` at `x` (m from the clamp), m.
    fn copper_width(&self, x: f64, k: usize, n: usize) -> f64 {
        let dx = x - self.load_at;
        let chord = |r: f64| {
            if dx.abs() < r {
                2.0 * (r * r - dx * dx).sqrt()
            } else {
                0.0
            }
        };
        let winding = self.fill * (chord(self.r_out) - chord(self.r_in));
        let leads = if x < self.load_at - self.r_out && (k == 0 || k + 1 == n) {
            2.0 * self.trace
        } else {
            0.0
        };
        (winding + leads).min(self.width)
    }

    /// Bending stiffness EI (N m^2) and mass per length (kg/m) of the
    /// section at `x` (m from the clamp), by the transformed section.
    pub fn section(&self, x: f64) -> (f64, f64) {
        let n = self.layers.iter().filter(|l| l.2).count();
        // Every part (E, width, thickness, centre height, density) in turn.
        let parts = |f: &mut dyn FnMut(f64, f64, f64, f64, f64)| {
            let mut z = 0.0;
            let mut k = 0;
            for &(t, (e, rho), copper) in &self.layers {
                let zc = z - t / 2.0;
                if copper {
                    let bc = self.copper_width(x, k, n);
                    f(e, bc, t, zc, rho);
                    f(self.filler.0, self.width - bc, t, zc, self.filler.1);
                    k += 1;
                } else {
                    f(e, self.width, t, zc, rho);
                }
                z -= t;
            }
        };
        let (mut ea, mut eaz, mut mu) = (0.0, 0.0, 0.0);
        parts(&mut |e, b, t, z, rho| {
            ea += e * b * t;
            eaz += e * b * t * z;
            mu += rho * b * t;
        });
        let zn = eaz / ea;
        let mut ei = 0.0;
        parts(&mut |e, b, t, z, _| {
            ei += e * (b * t.powi(3) / 12.0 + b * t * (z - zn).powi(2));
        });
        (ei, mu)
    }
}

/// A cantilever beam of `EI(x)` and mass per length `mu(x)` by cubic
/// Hermite finite elements, clamped at `x = 0`, with a point mass at a
/// node.
#[derive(Debug, Clone)]
pub struct Beam {
    /// Stiffness matrix (free degrees of freedom: w, theta per node 1..).
    k: Banded,
    /// Mass matrix.
    mass: Banded,
    /// Index of the load node's deflection.
    load_dof: usize,
    /// Cholesky factor of the stiffness matrix.
    chol: Banded,
}

impl Beam {
    /// Meshes `[0, length]` with a node at `load_at` (m); `section(x)`
    /// gives `(EI, mu)`; `tip` (kg) sits at the load node.
    pub fn new(length: f64, load_at: f64, tip: f64, section: impl Fn(f64) -> (f64, f64)) -> Beam {
        let total = 48usize;
        let n1 = ((total as f64 * load_at / length).round() as usize).max(6);
        let rest = length - load_at;
        let n2 = if rest > 1e-9 * length {
            ((total as f64 * rest / length).round() as usize).max(4)
        } else {
            0
        };
        let mut nodes: Vec<f64> = (0..=n1).map(|i| load_at * i as f64 / n1 as f64).collect();
        nodes.extend((1..=n2).map(|i| load_at + rest * i as f64 / n2 as f64));
        let dofs = 2 * (nodes.len() - 1);
        let mut k = Banded::zeros(dofs);
        let mut mass = Banded::zeros(dofs);
        // 4-point Gauss-Legendre on each element.
        let (gx, gw) = crate::numeric::quadrature::rule(4);
        for e in 0..nodes.len() - 1 {
            let (a, b) = (nodes[e], nodes[e + 1]);
            let h = b - a;
            let (mut flex, mut mu) = (0.0, 0.0);
            for (xi, wi) in gx.iter().zip(gw) {
                let (ei, m) = section(a + h * (xi + 1.0) / 2.0);
                flex += wi / 2.0 / ei;
                mu += wi / 2.0 * m;
            }
            let ei = 1.0 / flex;
            let ke = [
                [12.0, 6.0 * h, -12.0, 6.0 * h],
                [6.0 * h, 4.0 * h * h, -6.0 * h, 2.0 * h * h],
                [-12.0, -6.0 * h, 12.0, -6.0 * h],
                [6.0 * h, 2.0 * h * h, -6.0 * h, 4.0 * h * h],
            ];
            let me = [
                [156.0, 22.0 * h, 54.0, -13.0 * h],
                [22.0 * h, 4.0 * h * h, 13.0 * h, -3.0 * h * h],
                [54.0, 13.0 * h, 156.0, -22.0 * h],
                [-13.0 * h, -3.0 * h * h, -22.0 * h, 4.0 * h * h],
            ];
            let (cs, cm) = (ei / h.powi(3), mu * h / 420.0);
            // Global dof of local i: node e -> 2(e-1), 2(e-1)+1; node 0 is clamped.
            let g = |i: usize| -> Option<usize> {
                let node = e + i / 2;
                (node > 0).then(|| 2 * (node - 1) + i % 2)
            };
            for i in 0..4 {
                for j in 0..4 {
                    if let (Some(gi), Some(gj)) = (g(i), g(j)) {
                        k[(gi, gj)] += cs * ke[i][j];
                        mass[(gi, gj)] += cm * me[i][j];
                    }
                }
            }
        }
        let load_dof = 2 * (n1 - 1);
        mass[(load_dof, load_dof)] += tip;
        let chol = cholesky(&k);
        Beam {
            k,
            mass,
            load_dof,
            chol,
        }
    }

    /// Deflection at the load point per newton there, m/N.
    pub fn compliance(&self) -> f64 {
        let mut f = vec![0.0; self.k.n];
        f[self.load_dof] = 1.0;
        solve(&self.chol, &f)[self.load_dof]
    }

    /// First natural frequency, Hz (inverse iteration with the Rayleigh
    /// quotient, until two quotients agree within [`RAYLEIGH_TOL`]).
    pub fn first_frequency(&self) -> f64 {
        let n = self.k.n;
        let mut x = vec![1.0; n];
        let mut lambda = 0.0;
        for _ in 0..100 {
            let y = mul(&self.mass, &x);
            let xn = solve(&self.chol, &y);
            let kx = mul(&self.k, &xn);
            let mx = mul(&self.mass, &xn);
            let num: f64 = xn.iter().zip(&kx).map(|(a, b)| a * b).sum();
            let den: f64 = xn.iter().zip(&mx).map(|(a, b)| a * b).sum();
            let l = num / den;
            let norm = den.sqrt();
            x = xn.iter().map(|v| v / norm).collect();
            if (l - lambda).abs() <= RAYLEIGH_TOL * l {
                lambda = l;
                break;
            }
            lambda = l;
        }
        lambda.sqrt() / (2.0 * std::f64::consts::PI)
    }
}

/// Relative change of the Rayleigh quotient that ends the inverse
/// iteration of [`Beam::first_frequency`]. The quotient settles in three
/// or four iterations and then wanders by a few parts in 1e10 (the
/// rounding of the stiffness solve: its condition number grows as the
/// elements' `EI / h^3` against the clamp's), so a tighter test would go
/// on iterating in that noise, up to the limit of 100 iterations. The
/// frequency is then good to about 1e-9 of itself, far inside the beam
/// model's own error (the unit tests' 1e-4 against Euler-Bernoulli).
pub const RAYLEIGH_TOL: f64 = 2e-9;

/// Half bandwidth of the beam's matrices: a node's two degrees of
/// freedom couple only with its neighbours'.
const BAND: usize = 3;

/// A square matrix of half bandwidth [`BAND`], stored by rows of the
/// band (entries outside it are zero and never addressed).
#[derive(Debug, Clone)]
struct Banded {
    n: usize,
    /// Row `i`, columns `i - BAND ..= i + BAND`.
    band: Vec<f64>,
}

impl Banded {
    fn zeros(n: usize) -> Banded {
        Banded {
            n,
            band: vec![0.0; n * (2 * BAND + 1)],
        }
    }
}

impl std::ops::Index<(usize, usize)> for Banded {
    type Output = f64;
    fn index(&self, (i, j): (usize, usize)) -> &f64 {
        &self.band[i * (2 * BAND + 1) + (j + BAND - i)]
    }
}

impl std::ops::IndexMut<(usize, usize)> for Banded {
    fn index_mut(&mut self, (i, j): (usize, usize)) -> &mut f64 {
        &mut self.band[i * (2 * BAND + 1) + (j + BAND - i)]
    }
}

impl Banded {
    /// Row `i`, columns `lo..hi` (all within the band).
    fn row(&self, i: usize, lo: usize, hi: usize) -> &[f64] {
        let at = i * (2 * BAND + 1) + BAND - i;
        &self.band[at + lo..at + hi]
    }
}

/// `a x` for a matrix of half bandwidth [`BAND`].
fn mul(a: &Banded, x: &[f64]) -> Vec<f64> {
    let n = a.n;
    (0..n)
        .map(|i| {
            let lo = i.saturating_sub(BAND);
            let hi = (i + BAND + 1).min(n);
            a.row(i, lo, hi)
                .iter()
                .zip(&x[lo..hi])
                .map(|(a, x)| a * x)
                .sum()
        })
        .collect()
}

/// The Cholesky factor `L` of a symmetric positive definite `a` of half
/// bandwidth [`BAND`] (the factor keeps the band).
fn cholesky(a: &Banded) -> Banded {
    let n = a.n;
    let mut l = Banded::zeros(n);
    for i in 0..n {
        for j in i.saturating_sub(BAND)..=i {
            let s: f64 = (i.saturating_sub(BAND)..j)
                .map(|k| l[(i, k)] * l[(j, k)])
                .sum();
            if i == j {
                l[(i, i)] = (a[(i, i)] - s).max(1e-300).sqrt();
            } else {
                l[(i, j)] = (a[(i, j)] - s) / l[(j, j)];
            }
        }
    }
    l
}

/// Solves `L L^T x = b` with the factor `l` of [`cholesky`].
fn solve(l: &Banded, b: &[f64]) -> Vec<f64> {
    let n = l.n;
    let mut y = vec![0.0; n];
    for i in 0..n {
        let lo = i.saturating_sub(BAND);
        let s: f64 = l
            .row(i, lo, i)
            .iter()
            .zip(&y[lo..i])
            .map(|(l, y)| l * y)
            .sum();
        y[i] = (b[i] - s) / l[(i, i)];
    }
    let mut x = vec![0.0; n];
    for i in (0..n).rev() {
        let s: f64 = (i + 1..(i + BAND + 1).min(n))
            .map(|k| l[(k, i)] * x[k])
            .sum();
        x[i] = (y[i] - s) / l[(i, i)];
    }
    x
}

/// One harmonic of the swing.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SwingHarmonic {
    /// Order.
    pub n: usize,
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// Force amplitude, N.
    pub force_n: f64,
    /// Swing amplitude at the load point, mm.
    pub amplitude_mm: f64,
}

/// One point of the fin's section along its length.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SectionPoint {
    /// From the clamp, mm.
    pub x_mm: f64,
    /// Bending stiffness, N m^2.
    pub ei_n_m2: f64,
    /// Mass per length, kg/m.
    pub mass_kg_per_m: f64,
}

/// One point of the amplitude against frequency.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ResponsePoint {
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// Amplitude at the load point under the fundamental's force, mm.
    pub amplitude_mm: f64,
}

/// The fin's motion (report.json's `fin` object; the headline numbers
/// also at the top level).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FinReport {
    /// Bending stiffness of the strip between the clamp and the coil, N m^2.
    pub bending_stiffness_n_m2: f64,
    /// Bending stiffness through the coil's centre, N m^2.
    pub bending_stiffness_coil_n_m2: f64,
    /// Stiffness at the load point, N/m.
    pub stiffness_n_per_m: f64,
    /// First resonance, Hz.
    pub resonance_hz: f64,
    /// Static deflection at the load point under the drive's mean force
    /// (positive: the gap opens), mm; `None` when pulled in.
    pub deflection_mm: Option<f64>,
    /// Swing amplitude at the drive frequency (fundamental), mm.
    pub amplitude_mm: f64,
    /// Sum of the harmonics' amplitudes (an upper bound of the swing), mm.
    pub swing_peak_mm: f64,
    /// Whether the fin has a stable position under the mean force.
    pub stable: bool,
    /// Mass at the load point, kg.
    pub tip_mass_kg: f64,
    /// Mass of the free part of the fin, kg.
    pub fin_mass_kg: f64,
    /// Damping ratio used.
    pub damping_ratio: f64,
    /// Which part rides on the fin.
    pub moving: Moving,
    /// The swing per harmonic of the drive.
    pub harmonics: Vec<SwingHarmonic>,
    /// EI and mass per length along the fin (full detail only).
    pub section: Vec<SectionPoint>,
    /// Amplitude against frequency (full detail only).
    pub response: Vec<ResponsePoint>,
    /// Where the moduli come from.
    pub materials_source: String,
}

/// Force per ampere on the magnet against the gap (N/A), from the
/// coaxial rings, scaled to the real conductor's value at the design gap.
struct ForceCurve<'a> {
    rings: &'a [super::conductor::Ring],
    cyl: Cylinder,
    scale: f64,
    _m: &'a Magnet,
}

impl ForceCurve<'_> {
    fn at(&self, gap_m: f64) -> f64 {
        let c = Cylinder {
            gap: gap_m.max(0.0),
            ..self.cyl
        };
        self.scale * force_rings(self.rings, 1.0, &c)
    }
}

/// The fin phase of the analysis, for a design with a `[fin]` and a
/// magnet (`mr`: the force phase's report); `None` without a fin.
pub fn analyse(
    design: &Design,
    layout: &Layout,
    rings: &[super::conductor::Ring],
    mr: &MagnetReport,
    drive: &DriveReport,
    full: bool,
    found: &mut super::Findings,
) -> Option<FinReport> {
    let (fin, mg) = (design.fin.as_ref()?, design.magnet.as_ref()?);
    let lam = Laminate::of(design, layout, fin);
    let magnet_mass =
        NDFEB_DENSITY * std::f64::consts::PI * m(mg.diameter).powi(2) / 4.0 * m(mg.thickness);
    let tip = fin.added_mass * 1e-3
        + match fin.moving {
            Moving::Magnet => magnet_mass,
            Moving::Coil => 0.0,
        };
    let beam = Beam::new(lam.length, lam.load_at, tip, |x| lam.section(x));
    let k = 1.0 / beam.compliance();
    let f1 = beam.first_frequency();
    let cyl = Cylinder {
        radius: m(mg.diameter / 2.0),
        length: m(mg.thickness),
        remanence: mg.remanence,
        gap: m(mg.gap),
    };
    let at_design = force_rings(rings, 1.0, &cyl);
    let curve = ForceCurve {
        scale: if at_design != 0.0 {
            mr.lorentz_n_per_a / at_design
        } else {
            1.0
        },
        rings,
        cyl,
        _m: mg,
    };
    let g0 = m(mg.gap);
    let deflection = equilibrium(|g| curve.at(g), g0, k, drive.current_mean_a);
    let stable = deflection.is_some();
    if !stable {
        found.caution(Caution::FinPulledIn { gap_mm: mg.gap });
    } else if full {
        let (lo, hi) = (
            drive.harmonics.iter().map(|h| h.current_a).sum::<f64>(),
            drive.current_peak_a,
        );
        let worst = -(lo.max(hi)) * curve.at(g0).signum();
        if worst != 0.0 && equilibrium(|g| curve.at(g), g0, k, worst).is_none() {
            found.note("the fin: at the peak attracting current the force would pull the fin in if held that long (quasi-static check)");
        }
    }
    let g_op = g0 + deflection.unwrap_or(0.0);
    let f_per_a = curve.at(g_op);
    let zeta = fin.damping_ratio;
    let swing = |f: f64, force: f64| {
        let r = f / f1;
        force.abs() / k / ((1.0 - r * r).powi(2) + (2.0 * zeta * r).powi(2)).sqrt()
    };
    let harmonics: Vec<SwingHarmonic> = drive
        .harmonics
        .iter()
        .map(|h| {
            let force = f_per_a * h.current_a;
            SwingHarmonic {
                n: h.n,
                frequency_hz: h.frequency_hz,
                force_n: force,
                amplitude_mm: swing(h.frequency_hz, force) * 1e3,
            }
        })
        .collect();
    let amplitude = harmonics
        .iter()
        .find(|h| h.n == 1)
        .map_or(0.0, |h| h.amplitude_mm);
    let (section, response) = if full {
        let section = (0..=200)
            .map(|i| {
                let x = lam.length * i as f64 / 200.0;
                let (ei, mu) = lam.section(x);
                SectionPoint {
                    x_mm: x * 1e3,
                    ei_n_m2: ei,
                    mass_kg_per_m: mu,
                }
            })
            .collect();
        let force = harmonics
            .first()
            .map_or(f_per_a * drive.current_mean_a, |h| h.force_n);
        let f_top = (3.0 * f1).max(1.5 * drive.frequency_hz.unwrap_or(0.0));
        let response = (1..=300)
            .map(|i| {
                let f = f_top * i as f64 / 300.0;
                ResponsePoint {
                    frequency_hz: f,
                    amplitude_mm: swing(f, force) * 1e3,
                }
            })
            .collect();
        (section, response)
    } else {
        (Vec::new(), Vec::new())
    };
    let swing_peak = harmonics.iter().map(|h| h.amplitude_mm).sum::<f64>()
        + deflection.map_or(0.0, |d| d.abs() * 1e3);
    if stable && swing_peak >= mg.gap {
        found.caution(Caution::SwingReachesGap {
            swing_mm: swing_peak,
            gap_mm: mg.gap,
        });
    }
    let materials_source = match design.stackup.kind {
        BoardKind::Flex => "flex laminate: copper 117 GPa, polyimide 2.5 GPa, coverlay with adhesive 2.0 GPa, adhesive between tracks 1.5 GPa (moduli recalled from memory); damping ratio default 0.03 (common practice, no source)",
        BoardKind::Rigid => "rigid laminate modelled as a beam: copper 117 GPa, FR-4 22 GPa, solder mask 3 GPa, resin between tracks 3.5 GPa (moduli recalled from memory): a rigid board barely flaps",
    }
    .to_string();
    Some(FinReport {
        bending_stiffness_n_m2: lam.section(0.0).0,
        bending_stiffness_coil_n_m2: lam.section(lam.load_at).0,
        stiffness_n_per_m: k,
        resonance_hz: f1,
        deflection_mm: deflection.map(|d| d * 1e3),
        amplitude_mm: amplitude,
        swing_peak_mm: swing_peak,
        stable,
        tip_mass_kg: tip,
        fin_mass_kg: (0..100)
            .map(|i| lam.section(lam.length * (i as f64 + 0.5) / 100.0).1 * lam.length / 100.0)
            .sum(),
        damping_ratio: zeta,
        moving: fin.moving,
        harmonics,
        section,
        response,
        materials_source,
    })
}

/// The stable static separation change (m, positive: the gap opens) under
/// a current `i` (A) with force per ampere `f(gap)` (N/A, positive: apart)
/// against stiffness `k` (N/m) from gap `g0` (m); `None` when the gap
/// closes to contact with no balance (pull-in). An attracting force is
/// followed in steps of 1/32 of the gap: a balance that exists only within
/// a narrower window just short of pull-in counts as pulled in.
pub fn equilibrium(f: impl Fn(f64) -> f64, g0: f64, k: f64, i: f64) -> Option<f64> {
    let h = |d: f64| k * d - f(g0 + d) * i;
    let f0 = f(g0) * i;
    if f0 == 0.0 {
        return Some(0.0);
    }
    let bis = |mut a: f64, mut b: f64| {
        // h(a) < 0 < h(b) or the reverse; 40 halvings.
        let ha = h(a);
        for _ in 0..40 {
            let c = (a + b) / 2.0;
            if (h(c) < 0.0) == (ha < 0.0) {
                a = c;
            } else {
                b = c;
            }
        }
        (a + b) / 2.0
    };
    if f0 > 0.0 {
        let mut hi = f0 / k;
        for _ in 0..60 {
            if h(hi) >= 0.0 {
                return Some(bis(0.0, hi));
            }
            hi *= 2.0;
        }
        return None;
    }
    let steps = 32;
    let mut prev = 0.0;
    for s in 1..=steps {
        let d = -g0 * s as f64 / steps as f64;
        if h(d) <= 0.0 {
            return Some(bis(prev, d));
        }
        prev = d;
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    #[test]
    fn uniform_cantilever_frequency_and_deflection() {
        // Euler-Bernoulli cantilever, first mode: f = (1.8751^2 / 2 pi)
        // sqrt(EI / (mu L^4)) (Blevins, Formulas for Natural Frequency and
        // Mode Shape, table 8-1); tip deflection under P at a: P a^3 / (3 EI)
        // (Roark's Formulas for Stress and Strain, table 8.1 case 1a).
        let (ei, mu, l) = (2e-5, 3e-3, 0.025);
        let b = Beam::new(l, l, 0.0, |_| (ei, mu));
        let exact = 1.8751f64.powi(2) / (2.0 * PI) * (ei / (mu * l.powi(4))).sqrt();
        assert!((b.first_frequency() / exact - 1.0).abs() < 1e-4);
        assert!((b.compliance() / (l.powi(3) / (3.0 * ei)) - 1.0).abs() < 1e-9);
        // Load at a < L: deflection there P a^3 / (3 EI) as well.
        let a = 0.6 * l;
        let b = Beam::new(l, a, 0.0, |_| (ei, mu));
        assert!((b.compliance() / (a.powi(3) / (3.0 * ei)) - 1.0).abs() < 1e-9);
    }

    #[test]
    fn tip_mass_frequency() {
        // Cantilever with a tip mass M much heavier than the beam:
        // f = (1/2 pi) sqrt(3 EI / (L^3 (M + 0.24 mu L))) (Blevins, table
        // 8-8, Rayleigh's approximation, within about 1 % for M > mu L).
        let (ei, mu, l) = (2e-5, 3e-3, 0.025);
        for tip in [mu * l, 5.0 * mu * l] {
            let b = Beam::new(l, l, tip, |_| (ei, mu));
            let exact = (3.0 * ei / (l.powi(3) * (tip + 0.2357 * mu * l))).sqrt() / (2.0 * PI);
            assert!((b.first_frequency() / exact - 1.0).abs() < 0.01, "{tip}");
        }
    }

    #[test]
    fn transformed_section_of_a_bimaterial_strip() {
        // Two bonded strips (Gere & Goodno, Mechanics of Materials,
        // composite beams): copper 35 um on polyimide 50 um, 10 mm wide,
        // against the parallel-axis sum written out by hand.
        let lam = Laminate {
            layers: vec![(35e-6, COPPER, false), (50e-6, (2.5e9, 1420.0), false)],
            filler: (1.5e9, 1200.0),
            width: 0.01,
            length: 0.02,
            load_at: 0.02,
            r_in: 0.0,
            r_out: 0.0,
            fill: 0.0,
            trace: 0.0,
        };
        let (e1, t1, e2, t2, b): (f64, f64, f64, f64, f64) = (117e9, 35e-6, 2.5e9, 50e-6, 0.01);
        let (z1, z2) = (-t1 / 2.0, -t1 - t2 / 2.0);
        let zn = (e1 * t1 * z1 + e2 * t2 * z2) / (e1 * t1 + e2 * t2);
        let ei = e1 * b * (t1.powi(3) / 12.0 + t1 * (z1 - zn).powi(2))
            + e2 * b * (t2.powi(3) / 12.0 + t2 * (z2 - zn).powi(2));
        let (got, mu) = lam.section(0.0);
        assert!((got / ei - 1.0).abs() < 1e-12);
        assert!((mu - b * (8960.0 * t1 + 1420.0 * t2)).abs() < 1e-12);
    }

    #[test]
    fn pull_in_when_attraction_outgrows_stiffness() {
        // Force ~ -c / gap^2 (attraction) against k: a balance exists
        // only while k > 2 c i / g^3 somewhere before contact; textbook
        // electrostatic-style pull-in at one third of the gap for 1/g^2.
        let (g0, c): (f64, f64) = (1e-3, 1e-9);
        let f = |g: f64| -c / (g * g).max(1e-12);
        // Pull-in stiffness for 1/g^2: k_crit = 27 c i / (4 g0^3).
        let kc = 27.0 * c / (4.0 * g0.powi(3));
        assert!(equilibrium(f, g0, 1.1 * kc, 1.0).is_some());
        assert!(equilibrium(f, g0, 0.95 * kc, 1.0).is_none());
        let d = equilibrium(f, g0, 1.1 * kc, 1.0).unwrap();
        assert!(d < 0.0 && d > -g0 / 3.0, "{d}");
    }
}
