//! Self-capacitance of the coil from its copper and stack-up, and its
//! self-resonant frequency.
//!
//! * Turn to turn within a layer: each chord with the run of turns beside
//!   it in its layer (found on the real copper from neighbour to
//!   neighbour, at most [`MAX_RUN`] strips), by the partial capacitances
//!   of that run from a 2-D method-of-moments solution of parallel strips
//!   ([`strip_partials`]) and the real voltage differences, so the
//!   coupling past the next trace counts; plus the copper's side walls
//!   between next neighbours as a parallel plate `eps0 eps_eff t / s`
//!   (common practice, no source). The pair alone is the conformal
//!   mapping's `C' = eps0 eps_eff K(k') / K(k)`, `k = s / (s + 2w)`
//!   ([`coplanar_strips`]; Wen, IEEE Trans. MTT 17, 1969; Gupta, Garg &
//!   Bahl, "Microstrip Lines and Slotlines", coplanar strips), which the
//!   moments reproduce. `eps_eff` is the mean of the permittivities on the two
//!   sides of the layer (the half-space result of the same mapping):
//!   inner layers `eps_r`; outer layers `(eps_r + eps_above) / 2` with
//!   `eps_above` 1 in air, rising linearly to `eps_r` as the cover
//!   thickness reaches the clearance (our approximation, no source).
//! * Layer to layer: copper over copper through the dielectric, the
//!   overlap as a parallel plate with Palmer's fringing factor for a strip
//!   of width `w` at spacing `h`, `1 + h / (pi w) (1 + ln(2 pi w / h))`
//!   (Palmer, "Capacitance of a parallel-plate capacitor by the
//!   Schwartz-Christoffel transformation", Trans. AIEE 56, 1937; recalled
//!   from memory), the fringe through the mean of the dielectric's and
//!   air's permittivity ([`facing_strips`]). Partly overlapping tracks
//!   count their overlap only.
//! * The terminal capacitance by the energy method: the voltage along the
//!   winding is linear along the current path (the usual assumption),
//!   each pair of neighbours stores `C' l dV^2 / 2`, and
//!   `C = 2 E / V^2`. Neighbours are found on the real copper
//!   ([`super::chords`]).
//!
//! Tolerance: against 2-D electrostatic finite-element solutions of the
//! same cross-sections on the stack-up (tests/suite/ac.rs, scikit-fem):
//! pairs within 6 %, facing strips within 2 %, runs of 4 and 8 traces at
//! a winding's linear voltage within 2 %, two layers of a series winding
//! on the faces of one dielectric (25 um to 1.5 mm) within 8 %. In 2-D the
//! coupling past the next trace grows with the run (a run of N turns at a
//! linear voltage stores more than N times a pair's energy): a layer
//! with more than [`MAX_RUN`] turns side by side leaves out the coupling
//! beyond them, and the 2-D picture holds while the winding's width is
//! small beside the coil's size. The whole coil's value is an estimate
//! (pads, vias, leads crossing other layers and turns on the far side of
//! the coil are left out; each run is taken as isolated with zero net
//! charge; the linear voltage is exact only below resonance), typically
//! within 30 % of a measured one (our estimate, no source).
//!
//! [`analyse`] is the analysis phase ([`CapacitanceReport`]).

use super::chords::{CellIndex, Chord};
use crate::design::Design;
use crate::geometry::{Point, Vec2};
use crate::numeric::elliptic::ke;
use serde::Serialize;
use std::collections::HashMap;
use std::f64::consts::PI;
use std::sync::{Arc, Mutex, OnceLock};

/// Permittivity of free space, F/m (CODATA 2022).
pub const EPS0: f64 = 8.854_187_818_8e-12;

/// Self-capacitance of the coil and its resonance (report.json's
/// `capacitance` object; `capacitance_f` and `self_resonance_hz` also at
/// the top level).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CapacitanceReport {
    /// Terminal capacitance, F.
    pub capacitance_f: f64,
    /// Part from neighbouring turns within the layers, F.
    pub turn_to_turn_f: f64,
    /// Part from copper over copper on neighbouring layers, F.
    pub layer_to_layer_f: f64,
    /// Self-resonant frequency `1 / (2 pi sqrt(L C))`, Hz.
    pub self_resonance_hz: f64,
    /// Effective permittivity between neighbouring turns, per layer (top
    /// first).
    pub eps_eff: Vec<f64>,
}

/// Per-length capacitance between two coplanar strips of width `w` a gap
/// `s` apart, thickness `t` (m), in a medium of `eps_eff`, F/m.
pub fn coplanar_strips(w: f64, s: f64, t: f64, eps_eff: f64) -> f64 {
    let k = s / (s + 2.0 * w);
    let kp = (1.0 - k * k).sqrt();
    EPS0 * eps_eff * (ke(kp).0 / ke(k).0 + t / s)
}

/// Per-length capacitance of two strips of width `w` facing each other
/// `h` apart through a dielectric layer of `eps_r`, F/m: the parallel
/// plate through `eps_r` plus Palmer's fringe through `(eps_r + 1) / 2`
/// (the fringing field runs half in the dielectric layer, half in the
/// air or cover beyond the copper: our approximation), half of the fringe
/// on each side. `room` is the gap (m) to a turn beside the strip on each
/// side (`None`: free): there the fringe reaches at most halfway across
/// the gap, where the next pair's field meets it (our approximation).
/// Within 2 % of the finite-element solution for a free pair at
/// `w / h = 3`, and with the in-layer runs within 10 % for two layers of
/// traces (tests/suite/ac.rs).
pub fn facing_strips(w: f64, h: f64, eps_r: f64, room: [Option<f64>; 2]) -> f64 {
    let half = (palmer(w, h) - 1.0) / 2.0;
    let fringe: f64 = room
        .iter()
        .map(|r| r.map_or(half, |r| half.min(r / (2.0 * w))))
        .sum();
    EPS0 * w / h * (eps_r + (eps_r + 1.0) / 2.0 * fringe)
}

/// Palmer's fringing factor for one dimension `w` at spacing `h`.
fn palmer(w: f64, h: f64) -> f64 {
    1.0 + h / (PI * w) * (1.0 + (2.0 * PI * w / h).ln())
}

/// Panels per strip in [`strip_partials`] (cosine-graded towards the
/// edges, where the charge density is singular): the pair's capacitance
/// within 0.6 % of the conformal-mapping value at equal width and gap,
/// 1.2 % at a gap of a quarter of the width (unit test).
const PANELS: usize = 10;

/// Most strips in one cross-section of a layer ([`strip_partials`]): a
/// chord farther than this many turns from both ends of its layer's run
/// counts the `MAX_RUN` strips around it (the coupling beyond is left out).
pub const MAX_RUN: usize = 40;

/// Partial capacitances between `n` parallel strips of width `ratio`
/// (times the pitch) at a constant pitch in one plane, per length and per
/// `eps0 eps_eff`, row-major `n x n` (zero on the diagonal). The strips
/// are isolated as a whole (their charges sum to zero, the state of a
/// coil's winding: no ground), so the energy at voltages `V` is
/// `sum over i < j of C_ij (V_i - V_j)^2 / 2`.
///
/// A 2-D method of moments: every strip cut into `PANELS` panels of
/// uniform charge, the potential matched at the panel middles with the
/// free-space line-charge kernel `-ln r / (2 pi)` integrated exactly over
/// each panel, plus a common unknown potential for the zero net charge
/// (Harrington, "Field Computation by Moment Methods", 1968, the strip
/// problems of chapter 2). Strips of zero thickness on the interface of
/// two half-spaces see `eps_eff = (eps1 + eps2) / 2` (the same half-space
/// result the conformal mapping uses). Computed once per `(ratio, n)` in
/// the process (about 10 ms at `n` = [`MAX_RUN`]).
pub fn strip_partials(ratio: f64, n: usize) -> Arc<Vec<f64>> {
    type Table = Mutex<HashMap<(u64, usize), Arc<Vec<f64>>>>;
    static CACHE: OnceLock<Table> = OnceLock::new();
    let key = (ratio.to_bits(), n);
    let cache = CACHE.get_or_init(Default::default);
    if let Some(t) = cache.lock().ok().and_then(|c| c.get(&key).cloned()) {
        return t;
    }
    let t = Arc::new(solve_strips(ratio, n));
    if let Ok(mut c) = cache.lock() {
        c.insert(key, t.clone());
    }
    t
}

fn solve_strips(ratio: f64, n: usize) -> Vec<f64> {
    let mut out = vec![0.0; n * n];
    if n < 2 {
        return out;
    }
    // Panels: (start, end) along x, pitch 1. The array is symmetric about
    // its middle and panel g's mirror is panel np - 1 - g, so the charges
    // split into an even and an odd part, each solved on the first half
    // of the panels (a quarter of the elimination's work).
    let mut panels = Vec::with_capacity(n * PANELS);
    for k in 0..n {
        let edge = |i: usize| k as f64 - ratio / 2.0 * (PI * i as f64 / PANELS as f64).cos();
        for i in 0..PANELS {
            panels.push((edge(i), edge(i + 1)));
        }
    }
    let np = panels.len();
    let half = np / 2;
    // int ln|u| du = u ln|u| - u.
    let f = |u: f64| if u == 0.0 { 0.0 } else { u * u.abs().ln() - u };
    let kernel = |i: usize, j: usize| {
        let (pi, pj) = (panels[i], panels[j]);
        let x = (pi.0 + pi.1) / 2.0;
        -(f(pj.1 - x) - f(pj.0 - x)) / (pj.1 - pj.0) / (2.0 * PI)
    };
    // Even part: with the common potential and zero net charge.
    let se = half + 1;
    let mut even = vec![0.0; se * se];
    let mut odd = vec![0.0; half * half];
    for i in 0..half {
        for j in 0..half {
            let (direct, mirror) = (kernel(i, j), kernel(i, np - 1 - j));
            even[i * se + j] = direct + mirror;
            odd[i * half + j] = direct - mirror;
        }
        even[i * se + half] = 1.0;
        even[half * se + i] = 1.0;
    }
    // One right-hand side per strip at 1 V: the charges on every strip
    // are a column of the (floating) capacitance matrix.
    let strip_volts = |k: usize, sign: f64| {
        let mut v = vec![0.0; half];
        for (g, x) in v.iter_mut().enumerate() {
            let own = f64::from(u8::from(g / PANELS == k));
            let mirrored = f64::from(u8::from((np - 1 - g) / PANELS == k));
            *x = (own + sign * mirrored) / 2.0;
        }
        v
    };
    let rhs_even: Vec<Vec<f64>> = (0..n)
        .map(|k| {
            let mut v = strip_volts(k, 1.0);
            v.push(0.0);
            v
        })
        .collect();
    let rhs_odd: Vec<Vec<f64>> = (0..n).map(|k| strip_volts(k, -1.0)).collect();
    let (Some(qe), Some(qo)) = (
        solve_real(even, rhs_even, se),
        solve_real(odd, rhs_odd, half),
    ) else {
        return out;
    };
    for k in 0..n {
        let charge_on = |j: usize| -> f64 {
            (j * PANELS..(j + 1) * PANELS)
                .map(|g| {
                    if g < half {
                        qe[k][g] + qo[k][g]
                    } else {
                        let m = np - 1 - g;
                        qe[k][m] - qo[k][m]
                    }
                })
                .sum()
        };
        for j in 0..n {
            if j != k {
                out[j * n + k] = -charge_on(j);
            }
        }
    }
    // Symmetric by reciprocity: average the two halves' rounding.
    for i in 0..n {
        for j in i + 1..n {
            let m = (out[i * n + j] + out[j * n + i]) / 2.0;
            out[i * n + j] = m;
            out[j * n + i] = m;
        }
    }
    out
}

/// Solves `a x = b` for every `b` by Gaussian elimination with partial
/// pivoting (`a` is `n x n`, row-major); `None` when singular.
fn solve_real(mut a: Vec<f64>, mut b: Vec<Vec<f64>>, n: usize) -> Option<Vec<Vec<f64>>> {
    for k in 0..n {
        let p = (k..n).max_by(|&i, &j| a[i * n + k].abs().total_cmp(&a[j * n + k].abs()))?;
        if a[p * n + k] == 0.0 {
            return None;
        }
        if p != k {
            for j in 0..n {
                a.swap(k * n + j, p * n + j);
            }
            for v in b.iter_mut() {
                v.swap(k, p);
            }
        }
        let piv = a[k * n + k];
        for i in k + 1..n {
            let f = a[i * n + k] / piv;
            if f == 0.0 {
                continue;
            }
            let (top, rest) = a.split_at_mut(i * n);
            let row_k = &top[k * n + k + 1..k * n + n];
            for (x, y) in rest[k + 1..n].iter_mut().zip(row_k) {
                *x -= f * y;
            }
            for v in b.iter_mut() {
                v[i] -= f * v[k];
            }
        }
    }
    for v in b.iter_mut() {
        for k in (0..n).rev() {
            let s: f64 = (k + 1..n).map(|j| a[k * n + j] * v[j]).sum();
            v[k] = (v[k] - s) / a[k * n + k];
        }
    }
    Some(b)
}

/// Per-length capacitance between strips `i` and `j` of a layer's run
/// ([`strip_partials`] of `partials` for `n` strips) with their side
/// walls (next neighbours only: `t / s`, as in [`coplanar_strips`]), F/m.
fn run_partial(partials: &[f64], n: usize, i: usize, j: usize, wall: f64, eps: f64) -> f64 {
    let side = if i.abs_diff(j) == 1 { wall } else { 0.0 };
    EPS0 * eps * (partials[i * n + j] + side)
}

/// Energy per length of `volts.len()` coplanar strips of width `w` a gap
/// `s` apart, thickness `t` (m), in `eps_eff`, at the given voltages
/// (V), J/m: the in-layer model of [`analyse`] for one cross-section.
pub fn run_energy(w: f64, s: f64, t: f64, eps_eff: f64, volts: &[f64]) -> f64 {
    let n = volts.len();
    let p = strip_partials(w / (w + s), n);
    let mut e = 0.0;
    for i in 0..n {
        for j in i + 1..n {
            let c = run_partial(&p, n, i, j, t / s, eps_eff);
            e += 0.5 * c * (volts[i] - volts[j]).powi(2);
        }
    }
    e
}

/// The effective permittivity between neighbouring turns of each layer.
pub fn layer_eps(design: &Design, layers: usize) -> Vec<f64> {
    let er = design.stackup.dielectric_constant;
    let s = design.coil.clearance.max(1e-9);
    let above = 1.0 + (er - 1.0) * (design.stackup.cover / s).min(1.0);
    (0..layers)
        .map(|k| {
            if k == 0 || k + 1 == layers {
                (er + above) / 2.0
            } else {
                er
            }
        })
        .collect()
}

/// A chord's geometry, computed once per chord (the same expressions as
/// [`Chord`]'s methods, so the same bits).
struct Frame {
    mid: Point,
    dir: Vec2,
    /// Length, mm.
    span: f64,
}

/// The last arguments of a per-length formula and its value: neighbouring
/// chords mostly share width, gap and height, so most calls repeat.
struct Memo<const N: usize>(Option<([u64; N], f64)>);

impl<const N: usize> Memo<N> {
    fn get(&mut self, args: [f64; N], f: impl FnOnce() -> f64) -> f64 {
        let key = args.map(f64::to_bits);
        match self.0 {
            // Compared element by element (the array comparison calls
            // `memcmp`).
            Some((k, v)) if k.iter().zip(&key).all(|(a, b)| a == b) => v,
            _ => {
                let v = f();
                self.0 = Some((key, v));
                v
            }
        }
    }
}

/// The capacitance phase: from the chords of the conductor and the
/// inductance `l` (H).
pub fn analyse(design: &Design, chords: &[Chord], layers: usize, l: f64) -> CapacitanceReport {
    let eps = layer_eps(design, layers);
    let er = design.stackup.dielectric_constant;
    let pitch = design.coil.trace_width + design.coil.clearance;
    let ratio = design.coil.trace_width / pitch;
    let gap = super::conductor::m(design.coil.clearance);
    // Each chord in every grid cell along it; cells of
    // two pitches (at least the dielectric's reach), so the 3 x 3 cells
    // around a chord's middle hold every neighbour it can see.
    let cell = (2.0 * pitch).max(
        4.0 * design
            .stackup
            .dielectric
            .iter()
            .cloned()
            .fold(0.0, f64::max),
    );
    let grid = CellIndex::new(chords, cell);
    let frames: Vec<Frame> = chords
        .iter()
        .map(|c| Frame {
            mid: c.mid(),
            dir: c.dir(),
            span: (c.b - c.a).length(),
        })
        .collect();
    // Voltage of chord j at the foot of point p on it.
    let volt_at = |c: &Chord, f: &Frame, p: Point| {
        let len = f.span.max(1e-12);
        let u = ((p - c.a).dot(f.dir) / len).clamp(0.0, 1.0);
        c.volt.0 + (c.volt.1 - c.volt.0) * u
    };
    let mut facing = Memo::<5>(None);
    // The next turn on each side of every chord (right of its direction
    // second), and the layer-to-layer energy. Candidates from the cells
    // (each once, in chord order) and which chord's search last listed
    // each chord.
    let mut next: Vec<[Option<usize>; 2]> = vec![[None, None]; chords.len()];
    let mut e_layers = 0.0;
    let mut near: Vec<usize> = Vec::new();
    let mut listed = vec![usize::MAX; chords.len()];
    for (i, (c, fc)) in chords.iter().zip(&frames).enumerate() {
        let (u, mid) = (fc.dir, fc.mid);
        let v = u.perp();
        let layer = c.layer;
        let here = grid.cell_of(mid);
        let vi = (c.volt.0 + c.volt.1) / 2.0;
        let len = c.length();
        // Best neighbour on each side (smallest offset along).
        let mut side: [Option<(f64, usize)>; 2] = [None, None];
        for same in [true, false] {
            let lk = if same { layer } else { layer + 1 };
            if !same && (lk as usize) > layers {
                continue;
            }
            // Each chord listed once, and only those that can pass the
            // tests below (the same tests, so the same chords in the same
            // order as testing every listed chord in turn).
            near.clear();
            let tag = 2 * i + usize::from(same);
            for &j in grid.rows_around(lk, here).iter().copied().flatten() {
                let j = j as usize;
                if std::mem::replace(&mut listed[j], tag) == tag || j == i {
                    continue;
                }
                let fo = &frames[j];
                let d = fo.mid - mid;
                let lat = d.dot(v).abs();
                let far = if same {
                    lat < 0.5 * pitch || lat > 1.5 * pitch
                } else {
                    (c.width + chords[j].width) / 2.0 - super::conductor::m(lat) <= 0.0
                };
                if !(far
                    || fo.dir.dot(u).abs() < 0.8
                    || (mid - fo.mid).dot(fo.dir).abs() > fo.span / 2.0)
                {
                    near.push(j);
                }
            }
            near.sort_unstable();
            // Room beside the copper for the fringe of a facing pair:
            // the gap where a turn runs next to it.
            let room = side.map(|s| s.map(|_| gap));
            for &j in &near {
                let (o, fo) = (&chords[j], &frames[j]);
                if j == i || fo.dir.dot(u).abs() < 0.8 {
                    continue;
                }
                let half = fo.span / 2.0;
                let d = fo.mid - mid;
                if (mid - fo.mid).dot(fo.dir).abs() > half {
                    continue;
                }
                let lat = d.dot(v);
                if same {
                    if lat.abs() < 0.5 * pitch || lat.abs() > 1.5 * pitch {
                        continue;
                    }
                    let k = usize::from(lat > 0.0);
                    let lon = d.dot(u).abs();
                    if side[k].is_none_or(|(best, _)| lon < best) {
                        side[k] = Some((lon, j));
                    }
                } else {
                    let (wi, wj) = (c.width, o.width);
                    let overlap =
                        ((wi + wj) / 2.0 - super::conductor::m(lat.abs())).clamp(0.0, wi.min(wj));
                    if overlap <= 0.0 {
                        continue;
                    }
                    let h = (c.z - o.z).abs() - (c.thickness + o.thickness) / 2.0;
                    if h <= 0.0 {
                        continue;
                    }
                    let w = wi.min(wj);
                    let dv = volt_at(o, fo, mid) - vi;
                    let key = [w, h, er, room[0].unwrap_or(-1.0), room[1].unwrap_or(-1.0)];
                    let cp = facing.get(key, || facing_strips(w, h, er, room)) * overlap / w;
                    e_layers += 0.5 * cp * len * dv * dv;
                }
            }
        }
        next[i] = side.map(|s| s.map(|(_, j)| j));
    }
    // Turn to turn: each chord with the run of turns beside it in its
    // layer (followed from neighbour to neighbour, at most MAX_RUN
    // strips), by the run's partial capacitances and the real voltages.
    let mut tables: Vec<Option<Arc<Vec<f64>>>> = vec![None; MAX_RUN + 1];
    let mut e_turns = 0.0;
    let mut run: [Vec<usize>; 2] = [Vec::new(), Vec::new()];
    for (i, c) in chords.iter().enumerate() {
        if next[i] == [None, None] {
            continue;
        }
        run[0].clear();
        run[1].clear();
        let mid = frames[i].mid;
        // Each side's run from neighbour to neighbour, only as far as the
        // cross-section keeps it (`kept_runs`: the same strips as walking
        // both sides to MAX_RUN - 1 and trimming the longer).
        let mut walk = [(i, i, 0), (i, i, 1)];
        let (a, b) = kept_runs(|k, limit| {
            let list = &mut run[k];
            let (prev, cur, k_cur) = &mut walk[k];
            while list.len() < limit {
                let Some(j) = next[*cur][*k_cur] else { break };
                if j == *prev || j == i {
                    break;
                }
                // The side of j away from cur.
                let same_way = frames[j].dir.dot(frames[*cur].dir) > 0.0;
                *k_cur = if same_way { *k_cur } else { 1 - *k_cur };
                list.push(j);
                (*prev, *cur) = (*cur, j);
            }
            list.len()
        });
        let n = a + b + 1;
        let table = tables[n].get_or_insert_with(|| strip_partials(ratio, n));
        let li = (c.layer as usize).saturating_sub(1).min(eps.len() - 1);
        let vi = (c.volt.0 + c.volt.1) / 2.0;
        let len = c.length();
        // Strip index: the left run (side 0) first, outermost at 0; the
        // voltages of the strips kept only.
        for (m, &j) in run[0][..a].iter().enumerate() {
            let vj = volt_at(&chords[j], &frames[j], mid);
            let cp = run_partial(table, n, a, a - 1 - m, c.thickness / gap, eps[li]);
            // Each pair is seen from both of its chords: half each.
            e_turns += 0.5 * 0.5 * cp * len * (vj - vi).powi(2);
        }
        for (m, &j) in run[1][..b].iter().enumerate() {
            let vj = volt_at(&chords[j], &frames[j], mid);
            let cp = run_partial(table, n, a, a + 1 + m, c.thickness / gap, eps[li]);
            e_turns += 0.5 * 0.5 * cp * len * (vj - vi).powi(2);
        }
    }
    let (ct, cl) = (2.0 * e_turns, 2.0 * e_layers);
    let c = ct + cl;
    CapacitanceReport {
        capacitance_f: c,
        turn_to_turn_f: ct,
        layer_to_layer_f: cl,
        self_resonance_hz: resonance(l, c),
        eps_eff: eps,
    }
}

/// How many strips of the run on each side of a chord its cross-section
/// keeps: at most [`MAX_RUN`] in all with the chord, the longer side
/// trimmed first (the right side on a tie). `extend(side, limit)` walks
/// that side's run on to at most `limit` strips and returns how many it
/// has (a walk that has ended stays where it is). Asks for no more than
/// it keeps: half the strips on the left first, the right up to what
/// that leaves, then the left again when the right ended early.
fn kept_runs(mut extend: impl FnMut(usize, usize) -> usize) -> (usize, usize) {
    let most = MAX_RUN - 1;
    let a = extend(0, MAX_RUN / 2);
    let b = extend(1, most - a);
    let a = if b < most - a { extend(0, most - b) } else { a };
    (a, b)
}

/// `1 / (2 pi sqrt(L C))`, Hz (infinite when either is zero).
pub fn resonance(l: f64, c: f64) -> f64 {
    if l > 0.0 && c > 0.0 {
        1.0 / (2.0 * PI * (l * c).sqrt())
    } else {
        f64::INFINITY
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Limit cases: strips far apart compared with their width have
    /// `K(k')/K(k) -> (1/pi) ln(4/k)` (the asymptote of the complete
    /// elliptic integral, Abramowitz & Stegun 17.3.26), and a wide gap of
    /// facing plates is the parallel-plate `eps A / d` within Palmer's
    /// correction (which tends to 1 as `h / w -> 0`).
    #[test]
    fn limit_cases() {
        let (w, s) = (1e-6, 1e-3);
        let c = coplanar_strips(w, s, 0.0, 1.0);
        let k = s / (s + 2.0 * w);
        let kp = (1.0 - k * k).sqrt();
        // k -> 1: K(k) ~ ln(4/k'), K(k') -> pi/2.
        let want_wide = EPS0 * PI / 2.0 / (4.0 / kp).ln();
        assert!((c / want_wide - 1.0).abs() < 1e-3, "{c} {want_wide}");
        let plate = facing_strips(1.0, 1e-4, 3.0, [None, None]);
        assert!((plate / (EPS0 * 3.0 / 1e-4) - 1.0).abs() < 4e-4, "{plate}");
        // Equal gap and width: K(k')/K(k) at k = 1/3 is 1.5634019
        // (scipy.special.ellipk(8/9) / ellipk(1/9), parameter m = k^2).
        let c = coplanar_strips(1.0, 1.0, 0.0, 1.0) / EPS0;
        assert!((c - 1.563_401_9).abs() < 1e-6, "{c}");
    }

    /// The method of moments against the exact conformal mapping for a
    /// pair of strips of zero thickness (`K(k') / K(k)`, `k = s / (s +
    /// 2w)`; Wen 1969, as in [`coplanar_strips`]), within 1.5 %, and its
    /// matrix symmetric with the next neighbours' coupling the largest.
    #[test]
    fn strips_match_conformal_mapping() {
        for ratio in [0.2, 0.5, 0.8] {
            let c = strip_partials(ratio, 2)[1];
            let want = coplanar_strips(ratio, 1.0 - ratio, 0.0, 1.0) / EPS0;
            assert!((c / want - 1.0).abs() < 1.5e-2, "{ratio}: {c} {want}");
        }
        let n = 6;
        let p = strip_partials(0.5, n);
        for i in 0..n {
            for j in 0..n {
                assert_eq!(p[i * n + j], p[j * n + i]);
            }
        }
        assert!(p[2 * n + 3] > p[2 * n + 4] && p[2 * n + 4] > 0.0);
    }

    /// The kept runs are those of walking both sides to `MAX_RUN - 1`
    /// strips and trimming the longer side (the right on a tie) until
    /// the chord and its runs are `MAX_RUN` strips, for every pair of run
    /// lengths.
    #[test]
    fn kept_runs_trim_as_the_full_walk() {
        for full_a in 0..=MAX_RUN + 3 {
            for full_b in 0..=MAX_RUN + 3 {
                let (mut a, mut b) = (full_a.min(MAX_RUN - 1), full_b.min(MAX_RUN - 1));
                while a + b + 1 > MAX_RUN {
                    if a > b {
                        a -= 1;
                    } else {
                        b -= 1;
                    }
                }
                let kept = kept_runs(|k, limit| [full_a, full_b][k].min(limit));
                assert_eq!(kept, (a, b), "{full_a} {full_b}");
            }
        }
    }

    /// Resonance: `2 pi f sqrt(L C) = 1`.
    #[test]
    fn resonance_identity() {
        let (l, c) = (3.3e-6, 12e-12);
        let f = resonance(l, c);
        assert!((2.0 * PI * f * (l * c).sqrt() - 1.0).abs() < 1e-14);
    }
}
