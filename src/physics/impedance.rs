//! The coil at frequency: AC resistance (skin and proximity effect),
//! current sharing of parallel layers, and the impedance of the lumped
//! model `(R_ac(f) + j omega L)` in parallel with the self-capacitance
//! `C` ([`super::capacitance`]), from DC to beyond self-resonance.
//!
//! # AC resistance
//! `R_ac(f) = sum over tracks R_dc F(x) + sum over chords rho l
//! (phi_across(x) H_across^2 + phi_along(x) H_along^2) + R_vias F_tube`,
//! `x = t / delta`, `delta = sqrt(rho / (pi f mu0))` at the operating
//! temperature:
//!
//! * skin effect of each track's own current: `F(x)` of its rectangular
//!   section ([`super::section`]);
//! * proximity effect: the field of all the other copper at the middle of
//!   each chord ([`super::chords`]), per ampere at the terminals, from the
//!   Biot-Savart sum over every chord as four filaments across its width
//!   (a strip at a distance of a quarter of its width is within 1 % of the
//!   exact strip; the chord's own filaments cancel at its middle).
//!   The field does not depend on the frequency, so it is computed once;
//!   each section's eddy response in a uniform field (across and along
//!   its width) does. The field is taken uniform over the section and
//!   without the eddy currents' own reaction on the neighbours (valid
//!   while the proximity loss is small beside the skin loss or the
//!   sections are below a few skin depths), the field along the track
//!   gives no loss (2-D);
//! * via barrels as plated walls (Dowell's one-layer factor); leads are
//!   tracks like the turns.
//!
//! Tolerance: the skin part as [`super::section`] (2 %); the proximity
//! part about 10 % on coils sampled with fine chords, 20 % where a large
//! coil is sampled with chords of several millimetres (one field point per
//! polygon side); Dowell's layered-winding formula is printed beside it
//! as a published cross-check for circular coils.
//!
//! # Current sharing
//! Windings in parallel share the current by their branch impedance
//! `R_k(f) + j omega (L_k - M)`: their own skin resistance and their
//! leakage inductance (self minus the mutual with the other winding of
//! the pair, from the same inductance method as the coil's). At DC this is
//! the conductance share of [`super::conductor`]; the proximity loss and
//! the field keep the DC shares (the shares move by a fraction of a
//! percent where the skin effect starts).
//!
//! # Impedance
//! `L(f) = L_dc - sum over tracks mu0 l d(t / delta)`: the skin effect
//! pushes the current to the section's surface and takes away flux
//! inside the copper; `d` is the drop of the section's inductance per
//! length from the same section solution as `R_ac`
//! ([`SectionTable::inductance_drop`]; for a round wire the same method
//! gives the exact Bessel-function internal inductance, `mu0 / (8 pi)`
//! at DC, tests in `super::section`), weighted by each parallel winding's
//! share squared. At DC `L(f)` is the GMD-based inductance, which counts
//! the DC internal inductance already. The eddy currents of the
//! proximity effect take some inductance too (their reactive part); it is
//! left out, bounded by [`AcModel::proximity_inductance_bound`] (the
//! perfect-conductor limit, 2.6 % of L on the tag reader:
//! tests/suite/ac.rs; the real part at 6.78 MHz is smaller). The
//! self-resonance uses `L_dc`. `Z = Z_s / (1 + j omega C Z_s)`, `Z_s =
//! R_ac + j omega L(f)`; `q` is `omega L(f) /
//! R_ac` (the coil's Q as link formulas use it) and `q_terminals` the ratio
//! `Im Z / Re Z` of the lumped model, which falls to zero at
//! self-resonance.
//!
//! [`AcModel::new`] does the frequency-independent work once; its methods
//! answer at any frequency in microseconds (each section shape's table is
//! computed the first time it is asked for, about 30 ms, and kept for the
//! process). [`analyse`] is the analysis
//! phase ([`Impedance`] at the drive frequency, the curve).

use super::MU0;
use super::caution::{Caution, Findings, RESONANCE_MARGIN};
use super::chords::Chord;
use super::conductor::{Conductor, m};
use super::field::Segments;
use super::resistance::{RHO_20, Resistance};
use super::section::{SectionTable, tube_skin};
use crate::design::{Design, Wiring};
use crate::geometry::Board;
use serde::Serialize;
use std::f64::consts::PI;

/// Impedance at the drive frequency (serialised as report.json's
/// `impedance` object).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Impedance {
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// Inductance at this frequency, `L(f)`, H.
    pub inductance_h: f64,
    /// Reactance 2 pi f L(f), ohm.
    pub reactance_ohm: f64,
    /// Magnitude of the lumped model's impedance (AC resistance, L and
    /// the self-capacitance), ohm.
    pub impedance_ohm: f64,
    /// Q of the coil, `omega L(f) / R_ac` (AC resistance at the operating
    /// temperature).
    pub q: f64,
    /// Skin depth in copper at the operating temperature, um.
    pub skin_depth_um: f64,
    /// AC resistance at the operating temperature, ohm.
    pub resistance_ac_ohm: f64,
    /// The part of it from the proximity effect, ohm.
    pub proximity_ohm: f64,
    /// Phase of the lumped model's impedance, degrees.
    pub phase_deg: f64,
    /// `Im Z / Re Z` of the lumped model (zero at self-resonance).
    pub q_terminals: f64,
    /// Drive frequency over the self-resonant frequency.
    pub resonance_fraction: f64,
    /// Dowell's layered-winding estimate of `R_ac` (published
    /// cross-check; circular coils only), ohm.
    pub dowell_ohm: Option<f64>,
    /// Parallel layers: each winding's share of the current at this
    /// frequency (empty in series).
    pub shares: Vec<Share>,
}

/// A winding's share of the terminal current at a frequency.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Share {
    /// Copper layer, 1 = top.
    pub layer: u8,
    /// Magnitude of the share.
    pub share: f64,
    /// Share at DC (conductance).
    pub share_dc: f64,
    /// Phase of the share, degrees.
    pub phase_deg: f64,
}

/// One point of the impedance curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ResponsePoint {
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// AC resistance, ohm.
    pub resistance_ohm: f64,
    /// Inductance `L(f)`, H.
    pub inductance_h: f64,
    /// `|Z|` of the lumped model, ohm.
    pub impedance_ohm: f64,
    /// Phase of `Z`, degrees.
    pub phase_deg: f64,
    /// `omega L(f) / R_ac`.
    pub q: f64,
}

/// Where each chord's filaments run across its width (fractions of the
/// width from the centre line): four equal filaments at the centres of
/// the quarters. None lies on the centre line, where the chord's own
/// field is taken (their fields cancel there); a strip a quarter of its
/// width above gets its field within 1 % of the exact strip's
/// `(I / (pi w)) atan(w / 2h)`.
const FILAMENTS: [f64; 4] = [-0.375, -0.125, 0.125, 0.375];

/// Most points where the proximity field is taken: beyond it every k-th
/// chord's middle stands for the k chords from it (on a polygon coil, one
/// side for the next few; part of the 20 % tolerance of large coils).
const MAX_FIELD_POINTS: usize = 800;

/// One winding's skin terms.
#[derive(Debug, Clone, PartialEq)]
struct Branch {
    layer: u8,
    group: usize,
    share_dc: f64,
    /// (section aspect, thickness m, DC resistance at 20 C of its tracks).
    terms: Vec<(f64, f64, f64)>,
    /// Self minus mutual with the other winding of its group, H.
    leakage_h: f64,
}

/// The frequency-independent part of the AC model of a coil.
#[derive(Debug, Clone, PartialEq)]
pub struct AcModel {
    /// Resistivity at the operating temperature over the one at 20 C.
    heat: f64,
    branches: Vec<Branch>,
    /// (section aspect, thickness m, sum l H_across^2, sum l H_along^2)
    /// per section, 1/m per A^2 at the terminals.
    proximity: Vec<(f64, f64, f64, f64)>,
    /// Via barrels at 20 C, ohm, and the plating, m.
    vias: (f64, f64),
    /// Inductance, H.
    pub inductance_h: f64,
    /// Self-capacitance, F.
    pub capacitance_f: f64,
}

/// `(R_ac, proximity part)` and the complex shares at a frequency.
struct AcAt {
    r: f64,
    prox: f64,
    /// Internal inductance lost to the skin effect, H.
    drop: f64,
    shares: Vec<(u8, f64, f64, f64)>,
}

/// Whether the proximity loss at `f` (Hz) can reach `1e-6` of the DC
/// resistance of a coil with `turns` turns in all (per layer times
/// layers), traces of width `w` and thickness `t` (m): a conservative
/// bound for a sweep, which then leaves the proximity field out.
///
/// At low frequency a trace in a field `B` across it loses
/// `sigma omega^2 B^2 w^3 t / 24` per metre (the classical eddy loss of a
/// thin bar, recalled from memory), against `I^2 / (sigma w t)` for its DC
/// loss. Bounding the field at the winding by a current sheet of every turn
/// on one pitch (`B <= mu0 N I / w`, far above a planar coil's own field,
/// which is at most about `mu0 I` per layer over a pitch) and with
/// `delta^2 = 2 / (sigma omega mu0)`, the ratio is at most
/// `N^2 w^2 t^2 / (6 delta^4)`.
pub fn proximity_matters(f: f64, turns: f64, w: f64, t: f64) -> bool {
    let delta = (RHO_20 / (PI * f * MU0)).sqrt();
    turns * turns * w * w * t * t / (6.0 * delta.powi(4)) >= 1e-6
}

impl AcModel {
    /// The model of a coil: its conductor, chords, DC resistance,
    /// inductance `l` (H), self-capacitance `c` (F) and `heat`, the
    /// winding's resistance at its operating temperature over the one at
    /// 20 C (so that `R_ac` tends to the report's hot resistance at DC).
    /// Without `proximity` the field is not computed and the model counts
    /// the skin effect only (a sweep's analysis of a design without a
    /// frequency, which reports no AC value).
    #[allow(clippy::too_many_arguments)]
    pub fn new(
        design: &Design,
        layout: &Board,
        cond: &Conductor,
        chords: &[Chord],
        res: &Resistance,
        l: f64,
        c: f64,
        heat: f64,
        proximity: bool,
    ) -> AcModel {
        // Skin terms per winding, by section.
        let mut branches = Vec::new();
        let mut piece = 0;
        for w in &layout.windings {
            let mut terms: Vec<(f64, f64, f64)> = Vec::new();
            let mut share = 1.0;
            for tr in layout.winding_tracks(w) {
                let p = &cond.pieces[piece.min(cond.pieces.len() - 1)];
                piece += 1;
                share = p.weight;
                let (wd, t) = (m(tr.width), p.thickness);
                let r = RHO_20 * m(tr.segment.length()) / (wd * t);
                let aspect = wd / t;
                match terms.iter_mut().find(|x| x.0 == aspect && x.1 == t) {
                    Some(x) => x.2 += r,
                    None => terms.push((aspect, t, r)),
                }
            }
            branches.push(Branch {
                layer: w.layer,
                group: w.group,
                share_dc: share,
                terms,
                leakage_h: 0.0,
            });
        }
        if layout.wiring == Wiring::ParallelPairs {
            leakages(design, cond, &mut branches);
        }
        // The proximity field, per ampere at the terminals.
        let chords = if proximity { chords } else { &[] };
        let mut src = Segments::with_capacity(FILAMENTS.len() * chords.len());
        for ch in chords {
            let v = ch.dir().perp();
            for k in FILAMENTS {
                let off = v * (k * ch.width * 1e3);
                let (a, b) = (ch.a + off, ch.b + off);
                src.push(
                    [m(a.x), m(a.y), ch.z],
                    [m(b.x), m(b.y), ch.z],
                    ch.weight / FILAMENTS.len() as f64,
                );
            }
        }
        // Field points: every chord's middle, or on a large coil every
        // k-th chord's, standing for the length of the k chords from it.
        let k = chords.len().div_ceil(MAX_FIELD_POINTS).max(1);
        let picked: Vec<(usize, f64)> = (0..chords.len())
            .step_by(k)
            .map(|i| {
                let len: f64 = chords[i..(i + k).min(chords.len())]
                    .iter()
                    .map(Chord::length)
                    .sum();
                (i, len)
            })
            .collect();
        let points: Vec<[f64; 3]> = picked
            .iter()
            .map(|&(i, _)| {
                let p = chords[i].mid();
                [m(p.x), m(p.y), chords[i].z]
            })
            .collect();
        let fields = src.field(&points);
        let mut proximity: Vec<(f64, f64, f64, f64)> = Vec::new();
        for (&(i, len), b) in picked.iter().zip(&fields) {
            let ch = &chords[i];
            let v = ch.dir().perp();
            let h_along = (b[0] * v.x + b[1] * v.y) / MU0;
            let h_across = b[2] / MU0;
            let aspect = ch.width / ch.thickness;
            let (ac, al) = (len * h_across * h_across, len * h_along * h_along);
            match proximity
                .iter_mut()
                .find(|x| x.0 == aspect && x.1 == ch.thickness)
            {
                Some(x) => {
                    x.2 += ac;
                    x.3 += al;
                }
                None => proximity.push((aspect, ch.thickness, ac, al)),
            }
        }
        AcModel {
            heat,
            branches,
            proximity,
            vias: (res.vias_ohm_20c, m(design.stackup.plating)),
            inductance_h: l,
            capacitance_f: c,
        }
    }

    /// Skin depth in copper at the operating temperature, m.
    pub fn skin_depth(&self, f: f64) -> f64 {
        (RHO_20 * self.heat / (PI * f.max(1e-300) * MU0)).sqrt()
    }

    fn at(&self, f: f64) -> AcAt {
        let rho = RHO_20 * self.heat;
        let delta = self.skin_depth(f);
        let w = 2.0 * PI * f;
        let branch_r = |b: &Branch| -> f64 {
            b.terms
                .iter()
                .map(|(a, t, r)| r * self.heat * SectionTable::cached(*a).skin(t / delta))
                .sum()
        };
        // The tracks' length from their DC resistance: r = rho l / (a t^2).
        let branch_drop = |b: &Branch| -> f64 {
            b.terms
                .iter()
                .map(|(a, t, r)| {
                    let len = r * a * t * t / RHO_20;
                    MU0 * len * SectionTable::cached(*a).inductance_drop(t / delta)
                })
                .sum()
        };
        let mut drop = 0.0;
        let groups = self.branches.iter().map(|b| b.group + 1).max().unwrap_or(0);
        let mut r = 0.0;
        let mut shares = Vec::new();
        for g in 0..groups {
            let members: Vec<&Branch> = self.branches.iter().filter(|b| b.group == g).collect();
            if members.len() == 1 {
                r += branch_r(members[0]);
                drop += branch_drop(members[0]);
                continue;
            }
            // Admittances of the branches, then each one's share.
            let z: Vec<(f64, f64, f64)> = members
                .iter()
                .map(|b| {
                    let rb = branch_r(b);
                    (rb, rb, w * b.leakage_h)
                })
                .collect();
            let y: Vec<(f64, f64)> = z
                .iter()
                .map(|&(_, re, im)| {
                    let d = re * re + im * im;
                    (re / d, -im / d)
                })
                .collect();
            let (ys_re, ys_im) = y.iter().fold((0.0, 0.0), |s, v| (s.0 + v.0, s.1 + v.1));
            let ys2 = ys_re * ys_re + ys_im * ys_im;
            for ((b, (rb, _, _)), (yr, yi)) in members.iter().zip(&z).zip(&y) {
                let sr = (yr * ys_re + yi * ys_im) / ys2;
                let si = (yi * ys_re - yr * ys_im) / ys2;
                let mag2 = sr * sr + si * si;
                r += mag2 * rb;
                drop += mag2 * branch_drop(b);
                shares.push((b.layer, mag2.sqrt(), b.share_dc, si.atan2(sr).to_degrees()));
            }
        }
        let prox: f64 = self
            .proximity
            .iter()
            .map(|(a, t, ac, al)| {
                let tab = SectionTable::cached(*a);
                rho * (tab.across(t / delta) * ac + tab.along(t / delta) * al)
            })
            .sum();
        let vias = self.vias.0 * self.heat * tube_skin(self.vias.1 / delta);
        AcAt {
            r: r + prox + vias,
            prox,
            drop,
            shares,
        }
    }

    /// AC resistance at `f` (Hz) at the operating temperature, ohm.
    pub fn resistance(&self, f: f64) -> f64 {
        self.at(f).r
    }

    /// Inductance at `f` (Hz): the DC inductance less the internal
    /// inductance the skin effect takes from the tracks, H.
    pub fn inductance(&self, f: f64) -> f64 {
        self.inductance_h - self.at(f).drop
    }

    /// The lumped model's impedance at `f` (Hz): `(Re, Im)`, ohm.
    pub fn impedance(&self, f: f64) -> (f64, f64) {
        self.impedance_of(f, &self.at(f))
    }

    /// [`AcModel::impedance`] from the model's state at `f`.
    fn impedance_of(&self, f: f64, at: &AcAt) -> (f64, f64) {
        lumped(at.r, self.inductance_h - at.drop, self.capacitance_f, f)
    }

    /// Q of the coil at `f`: `omega L(f) / R_ac`.
    pub fn q(&self, f: f64) -> f64 {
        let at = self.at(f);
        2.0 * PI * f * (self.inductance_h - at.drop) / at.r
    }

    /// A bound on the inductance the eddy currents of the proximity effect
    /// take (their reactive part, left out of `L(f)`), H: at most the
    /// field each section would expel as a perfect conductor, an elliptic
    /// cylinder of its width and thickness, `mu0 pi (w + t) / 4 (w
    /// H_across^2 + t H_along^2)` per length per A^2 (the 2-D magnetic
    /// polarisability of an ellipse, recalled from memory).
    pub fn proximity_inductance_bound(&self) -> f64 {
        self.proximity
            .iter()
            .map(|(a, t, ac, al)| {
                let w = a * t;
                MU0 * PI * (w + t) / 4.0 * (w * ac + t * al)
            })
            .sum()
    }

    /// Self-resonant frequency, Hz.
    pub fn self_resonance_hz(&self) -> f64 {
        super::capacitance::resonance(self.inductance_h, self.capacitance_f)
    }

    /// One point of the curve at `f`.
    pub fn point(&self, f: f64) -> ResponsePoint {
        self.point_of(f, &self.at(f))
    }

    /// [`AcModel::point`] from the model's state at `f`.
    fn point_of(&self, f: f64, at: &AcAt) -> ResponsePoint {
        let (r, l) = (at.r, self.inductance_h - at.drop);
        let (re, im) = lumped(r, l, self.capacitance_f, f);
        ResponsePoint {
            frequency_hz: f,
            resistance_ohm: r,
            inductance_h: l,
            impedance_ohm: re.hypot(im),
            phase_deg: im.atan2(re).to_degrees(),
            q: 2.0 * PI * f * l / r,
        }
    }

    /// The curve at `n` log-spaced frequencies from `lo` to `hi` (Hz).
    pub fn curve(&self, lo: f64, hi: f64, n: usize) -> Vec<ResponsePoint> {
        let n = n.max(2);
        (0..n)
            .map(|i| self.point(lo * (hi / lo).powf(i as f64 / (n - 1) as f64)))
            .collect()
    }

    /// The range the report's curve spans: from where the thickest copper
    /// is a tenth of a skin depth (or a thousandth of the self-resonance,
    /// if lower) to three times the self-resonance, widened to include
    /// `f` (Hz).
    pub fn span(&self, t_max: f64, f: Option<f64>) -> (f64, f64) {
        let srf = self.self_resonance_hz();
        // delta = 10 t  <=>  f = rho / (pi mu0 (10 t)^2).
        let dc_like = RHO_20 * self.heat / (PI * MU0 * (10.0 * t_max).powi(2));
        let hi = if srf.is_finite() {
            3.0 * srf
        } else {
            1e3 * dc_like
        };
        let lo = dc_like.min(hi / 1e4);
        let lo = decade_floor(f.map_or(lo, |f| lo.min(f / 3.0)));
        let hi = decade_ceil(f.map_or(hi, |f| hi.max(3.0 * f)));
        (lo, hi)
    }
}

fn decade_floor(x: f64) -> f64 {
    10f64.powf(x.log10().floor())
}
fn decade_ceil(x: f64) -> f64 {
    10f64.powf(x.log10().ceil())
}

/// `Z_s / (1 + j omega C Z_s)` with `Z_s = r + j omega l`: `(Re, Im)`.
pub fn lumped(r: f64, l: f64, c: f64, f: f64) -> (f64, f64) {
    let w = 2.0 * PI * f;
    let (zr, zi) = (r, w * l);
    // 1 + j w C (zr + j zi) = (1 - w C zi) + j w C zr
    let (dr, di) = (1.0 - w * c * zi, w * c * zr);
    let d = dr * dr + di * di;
    ((zr * dr + zi * di) / d, (zi * dr - zr * di) / d)
}

/// Leakage inductance of each winding of a parallel group: `L_k - M`,
/// with `M = (L_ab - L_a - L_b) / 2` from the windings alone and both in
/// series (same inductance method as the coil's).
fn leakages(design: &Design, cond: &Conductor, branches: &mut [Branch]) {
    let circular = matches!(design.coil.shape, crate::design::Shape::Circle);
    let only = |layers: &[u8]| Conductor {
        pieces: cond
            .pieces
            .iter()
            .filter(|p| layers.contains(&p.layer))
            .map(|p| super::conductor::Piece { weight: 1.0, ..*p })
            .collect(),
        layer_z: cond.layer_z.clone(),
        layer_t: cond.layer_t.clone(),
    };
    let groups = branches.iter().map(|b| b.group + 1).max().unwrap_or(0);
    for g in 0..groups {
        let idx: Vec<usize> = (0..branches.len())
            .filter(|&i| branches[i].group == g)
            .collect();
        if idx.len() != 2 {
            continue;
        }
        let (la, lb) = (branches[idx[0]].layer, branches[idx[1]].layer);
        let l_a = super::inductance::inductance(&only(&[la]), circular).0;
        let l_b = super::inductance::inductance(&only(&[lb]), circular).0;
        let l_ab = super::inductance::inductance(&only(&[la, lb]), circular).0;
        let mutual = (l_ab - l_a - l_b) / 2.0;
        branches[idx[0]].leakage_h = (l_a - mutual).max(0.0);
        branches[idx[1]].leakage_h = (l_b - mutual).max(0.0);
    }
}

/// Dowell's AC resistance of the winding as a stack of `p` layers of foil
/// (Dowell, Proc. IEE 113, 1966; as in Kazimierczuk, "High-Frequency
/// Magnetic Components", 2009): each layer's resistance times
/// `F = x [ (sinh 2x + sin 2x)/(cosh 2x - cos 2x) + 2 (p^2 - 1)/3
/// (sinh x - sin x)/(cosh x + cos x) ]`, `x = (t / delta) sqrt(eta)` with
/// the porosity `eta = w / pitch`; here `p` = the layers in series (a
/// planar spiral is not a foil winding, so this is a cross-check only).
pub fn dowell(r_dc_hot: f64, layers: usize, t: f64, porosity: f64, delta: f64) -> f64 {
    let x = t / delta * porosity.sqrt();
    if x < 1e-4 {
        return r_dc_hot;
    }
    let p = layers as f64;
    let (y, s) = (2.0 * x, x.min(30.0));
    let first = if y > 40.0 {
        1.0
    } else {
        (y.sinh() + y.sin()) / (y.cosh() - y.cos())
    };
    let second = if s > 20.0 {
        1.0
    } else {
        (s.sinh() - s.sin()) / (s.cosh() + s.cos())
    };
    r_dc_hot * x * (first + 2.0 * (p * p - 1.0) / 3.0 * second)
}

/// The impedance phase: the values at the drive frequency (when the
/// design gives one above zero), with [`Caution::NearSelfResonance`] at
/// or above a third of the self-resonance.
pub fn analyse(
    design: &Design,
    model: &AcModel,
    r_hot: f64,
    t_max: f64,
    findings: &mut Findings,
) -> Option<Impedance> {
    let f = design.drive.frequency.filter(|f| *f > 0.0)?;
    // The model's state at f once, for every number below.
    let at = model.at(f);
    let p = model.point_of(f, &at);
    let (re, im) = model.impedance_of(f, &at);
    let srf = model.self_resonance_hz();
    let delta = model.skin_depth(f);
    if f >= RESONANCE_MARGIN * srf {
        findings.caution(Caution::NearSelfResonance {
            frequency_hz: f,
            self_resonance_hz: srf,
        });
    }
    if delta < t_max / 2.0 {
        findings.note(format!(
            "skin depth {:.1} um at the drive frequency is below half the copper thickness: the AC resistance counts the skin and proximity effect",
            delta * 1e6
        ));
    }
    let dowell = matches!(design.coil.shape, crate::design::Shape::Circle).then(|| {
        let pitch = design.coil.trace_width + design.coil.clearance;
        let series = match design.coil.wiring {
            Wiring::Series => design.coil.layers as usize,
            Wiring::ParallelPairs => (design.coil.layers as usize / 2).max(1),
        };
        dowell(r_hot, series, t_max, design.coil.trace_width / pitch, delta)
    });
    Some(Impedance {
        frequency_hz: f,
        inductance_h: p.inductance_h,
        reactance_ohm: 2.0 * PI * f * p.inductance_h,
        impedance_ohm: p.impedance_ohm,
        q: p.q,
        skin_depth_um: delta * 1e6,
        resistance_ac_ohm: at.r,
        proximity_ohm: at.prox,
        phase_deg: p.phase_deg,
        q_terminals: im / re,
        resonance_fraction: f / srf,
        dowell_ohm: dowell,
        shares: at
            .shares
            .iter()
            .map(|&(layer, share, share_dc, phase_deg)| Share {
                layer,
                share,
                share_dc,
                phase_deg,
            })
            .collect(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The lumped model resonates where `2 pi f sqrt(L C) = 1` (for small
    /// R the phase crosses zero there) and is `R + j omega L` far below.
    #[test]
    fn lumped_model() {
        let (l, c, r) = (2e-6, 5e-12, 0.5);
        let f0 = super::super::capacitance::resonance(l, c);
        assert!((2.0 * PI * f0 * (l * c).sqrt() - 1.0).abs() < 1e-14);
        // The zero-phase frequency of the parallel model:
        // f = f0 sqrt(1 - R^2 C / L).
        let fz = f0 * (1.0 - r * r * c / l).sqrt();
        let (_, im) = lumped(r, l, c, fz);
        assert!(im.abs() < 1e-6 * lumped(r, l, c, fz).0, "{im}");
        let (re, im) = lumped(r, l, c, 1.0);
        assert!((re / r - 1.0).abs() < 1e-9 && (im / (2.0 * PI * l) - 1.0).abs() < 1e-5);
    }

    /// Dowell's factor: 1 at low frequency, and for one layer the
    /// one-sided plate `x (sinh 2x + sin 2x)/(cosh 2x - cos 2x)`.
    #[test]
    fn dowell_limits() {
        assert!((dowell(1.0, 3, 1e-6, 1.0, 1.0) - 1.0).abs() < 1e-9);
        let one = dowell(1.0, 1, 3.0, 1.0, 1.0);
        assert!((one - tube_skin(3.0)).abs() < 1e-12);
    }
}
