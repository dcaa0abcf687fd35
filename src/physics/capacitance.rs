//! Self-capacitance of the coil from its copper and stack-up, and its
//! self-resonant frequency.
//!
//! * Turn to turn within a layer: neighbouring tracks as coplanar strips
//!   of width `w` a clearance `s` apart, per length
//!   `C' = eps0 eps_eff K(k') / K(k)`, `k = s / (s + 2w)` (conformal
//!   mapping; Wen, IEEE Trans. MTT 17, 1969; Gupta, Garg & Bahl,
//!   "Microstrip Lines and Slotlines", coplanar strips), plus the copper's
//!   side walls as a parallel plate `eps0 eps_eff t / s` (common practice,
//!   no source). `eps_eff` is the mean of the permittivities on the two
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
//! Tolerance: the per-length formulas within 6 % (pairs) and 2 % (facing
//! strips) of a 2-D electrostatic finite-element solution of the same
//! traces on the stack-up (tests/suite/ac.rs, scikit-fem). The in-layer
//! part counts next neighbours only: for four traces at a linear voltage
//! the solution stores about 1.8 times the neighbour pairs' energy (the
//! coupling past the next trace), so the turn-to-turn part is low by
//! about that factor; on coils of two or more layers the layer-to-layer
//! part, which is counted fully, dominates. The whole coil's value is an estimate
//! (pads, vias, leads crossing other layers and turns further than the
//! next neighbour are left out; the linear voltage is exact only below
//! resonance), typically within 30 % of a measured one (our estimate, no
//! source).
//!
//! [`analyse`] is the analysis phase ([`CapacitanceReport`]).

use super::chords::{CellIndex, Chord};
use crate::design::Design;
use crate::geometry::{Point, Vec2};
use crate::numeric::elliptic::ke;
use serde::Serialize;
use std::f64::consts::PI;

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
/// air or cover beyond the copper: our approximation, within 2 % of the
/// finite-element solution for `w / h = 3`, tests/suite/ac.rs).
pub fn facing_strips(w: f64, h: f64, eps_r: f64) -> f64 {
    EPS0 * w / h * (eps_r + (eps_r + 1.0) / 2.0 * (palmer(w, h) - 1.0))
}

/// Palmer's fringing factor for one dimension `w` at spacing `h`.
fn palmer(w: f64, h: f64) -> f64 {
    1.0 + h / (PI * w) * (1.0 + (2.0 * PI * w / h).ln())
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
            Some((k, v)) if k == key => v,
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
    let (mut strips, mut facing) = (Memo::<4>(None), Memo::<3>(None));
    // Candidates from the cells (each once, in chord order) and which
    // chord's search last listed each chord.
    let mut near: Vec<usize> = Vec::new();
    let mut listed = vec![usize::MAX; chords.len()];
    let (mut e_turns, mut e_layers) = (0.0, 0.0);
    for (i, (c, fc)) in chords.iter().zip(&frames).enumerate() {
        let (u, mid) = (fc.dir, fc.mid);
        let v = u.perp();
        let layer = c.layer;
        let here = grid.cell_of(mid);
        let vi = (c.volt.0 + c.volt.1) / 2.0;
        let len = c.length();
        let li = (layer as usize).saturating_sub(1);
        // Best neighbour on each side (smallest offset along).
        let mut side: [Option<(f64, f64)>; 2] = [None, None];
        for same in [true, false] {
            let lk = if same { layer } else { layer + 1 };
            if !same && (lk as usize) > layers {
                continue;
            }
            near.clear();
            grid.around(lk, here, &mut near);
            let tag = 2 * i + usize::from(same);
            near.retain(|&j| std::mem::replace(&mut listed[j], tag) != tag);
            near.sort_unstable();
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
                    let dv = volt_at(o, fo, mid) - vi;
                    let k = usize::from(lat > 0.0);
                    let lon = d.dot(u).abs();
                    if side[k].is_none_or(|(best, _)| lon < best) {
                        side[k] = Some((lon, dv));
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
                    let cp = facing.get([w, h, er], || facing_strips(w, h, er)) * overlap / w;
                    e_layers += 0.5 * cp * len * dv * dv;
                }
            }
        }
        let e = eps[li.min(eps.len() - 1)];
        let cp = strips.get([c.width, gap, c.thickness, e], || {
            coplanar_strips(c.width, gap, c.thickness, e)
        });
        for (_, dv) in side.iter().flatten() {
            // Each gap is seen from both of its chords: half each.
            e_turns += 0.5 * 0.5 * cp * len * dv * dv;
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
        let plate = facing_strips(1.0, 1e-4, 3.0);
        assert!((plate / (EPS0 * 3.0 / 1e-4) - 1.0).abs() < 4e-4, "{plate}");
        // Equal gap and width: K(k')/K(k) at k = 1/3 is 1.5634019
        // (scipy.special.ellipk(8/9) / ellipk(1/9), parameter m = k^2).
        let c = coplanar_strips(1.0, 1.0, 0.0, 1.0) / EPS0;
        assert!((c - 1.563_401_9).abs() < 1e-6, "{c}");
    }

    /// Resonance: `2 pi f sqrt(L C) = 1`.
    #[test]
    fn resonance_identity() {
        let (l, c) = (3.3e-6, 12e-12);
        let f = resonance(l, c);
        assert!((2.0 * PI * f * (l * c).sqrt() - 1.0).abs() < 1e-14);
    }
}
