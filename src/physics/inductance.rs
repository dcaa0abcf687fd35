//! Inductance from filaments along the real conductor (Grover, Inductance
//! Calculations, 1946): the coil's inductance is the sum of the self terms
//! and all mutual terms of its pieces, each weighted by its share of the
//! current.
//!
//! * Coaxial rings (circular coils): Maxwell's elliptic-integral formula
//!   for the mutual terms, exact for coaxial circular filaments.
//! * Straight pieces (polygon and rectangle coils): Neumann's double line
//!   integral, in closed form for parallel pieces (Grover's formula for
//!   parallel filaments) and with the inner integral in closed form and the
//!   outer one by adaptive Gauss-Legendre quadrature otherwise.
//! * Self terms and pieces close to each other (neighbouring turns, layers
//!   closer than the trace width, consecutive pieces of one track): the
//!   filament distance is replaced by the geometric mean distance (GMD)
//!   between the two rectangular cross-sections (Grover; Maxwell's GMD
//!   method), so coupling between layers never exceeds 1.

use super::MU0;
use super::conductor::{Conductor, Filament, Ring};
use super::elliptic::{ke, ke_lanes, rule};
use super::gmd::{GmdSeries, cached_gmd};
use std::f64::consts::PI;

/// Mutual inductance of two coaxial circular filaments of radii `a`, `b`
/// at axial distance `d` (Maxwell; Grover 1946), henry:
/// `M = mu0 sqrt(ab) ((2/k - k) K(k) - (2/k) E(k))`, `k^2 = 4ab/((a+b)^2+d^2)`.
/// For small `k` the bracket is summed as a power series to avoid
/// cancellation.
///
/// # Units
/// Metres in, henry out.
pub fn maxwell_mutual(a: f64, b: f64, d: f64) -> f64 {
    let k2 = 4.0 * a * b / ((a + b) * (a + b) + d * d);
    let k = k2.sqrt();
    let f = if k > 0.3 {
        let (kk, ee) = ke(k);
        maxwell_bracket(k, kk, ee)
    } else {
        maxwell_series(k, k2)
    };
    MU0 * (a * b).sqrt() * f
}

/// [`maxwell_mutual`] for eight pairs at once (radii `a`, `b`, distances
/// `d`): lane by lane the same operations, so the same bits, with the
/// elliptic integrals of all lanes in vector registers (AVX-512 or AVX2
/// where the processor has them).
pub fn maxwell_mutual_8(a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
    #[cfg(target_arch = "x86_64")]
    {
        if std::arch::is_x86_feature_detected!("avx512f") {
            // SAFETY: the CPU supports AVX-512F (checked just above).
            return unsafe { maxwell_8_avx512(a, b, d) };
        }
        if std::arch::is_x86_feature_detected!("avx2") {
            // SAFETY: the CPU supports AVX2 (checked just above).
            return unsafe { maxwell_8_avx2(a, b, d) };
        }
    }
    maxwell_8(a, b, d)
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f")]
unsafe fn maxwell_8_avx512(a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
    maxwell_8(a, b, d)
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn maxwell_8_avx2(a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
    maxwell_8(a, b, d)
}

#[inline(always)]
fn maxwell_8(a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
    let mut k2 = [0.0; 8];
    let mut k = [0.0; 8];
    for l in 0..8 {
        k2[l] = 4.0 * a[l] * b[l] / ((a[l] + b[l]) * (a[l] + b[l]) + d[l] * d[l]);
        k[l] = k2[l].sqrt();
    }
    let (kk, ee) = ke_lanes(k);
    let mut f = [0.0; 8];
    for l in 0..8 {
        f[l] = maxwell_bracket(k[l], kk[l], ee[l]);
    }
    // Far pairs (rare in a coil): the series, one at a time.
    for l in 0..8 {
        if k[l] <= 0.3 || k[l].is_nan() {
            f[l] = maxwell_series(k[l], k2[l]);
        }
    }
    let mut out = [0.0; 8];
    for l in 0..8 {
        out[l] = MU0 * (a[l] * b[l]).sqrt() * f[l];
    }
    out
}

/// Maxwell's bracket `(2/k - k) K - (2/k) E`.
#[inline(always)]
fn maxwell_bracket(k: f64, kk: f64, ee: f64) -> f64 {
    (2.0 / k - k) * kk - 2.0 / k * ee
}

/// Maxwell's bracket for small `k` as a power series:
/// `f = pi/2 sum_{m>=1} k^(2m+1) (c_{m+1} 4(m+1)/(2m+1) - c_m)`,
/// `c_n = ((2n)! / (2^(2n) n!^2))^2`, from the series of K and E
/// (A&S 17.3.11-12).
#[cold]
fn maxwell_series(k: f64, k2: f64) -> f64 {
    let mut cm = 0.25; // c_1
    let mut s = 0.0;
    let mut p = k2 * k;
    for mm in 1..60 {
        let r = (2 * mm + 1) as f64 / (2 * mm + 2) as f64;
        let cn = cm * r * r; // c_{m+1}
        s += p * (cn * 4.0 * (mm + 1) as f64 / (2 * mm + 1) as f64 - cm);
        cm = cn;
        p *= k2;
        if p < 1e-18 * s.abs() {
            break;
        }
    }
    PI / 2.0 * s
}

/// Distance (in multiples of the largest section size) below which the
/// GMD replaces the filament distance. Beyond it the filament distance
/// differs from the GMD by less than about 0.3 %.
const NEAR: f64 = 6.0;

/// The GMD series of every pair of ring sections in a coil (most coils
/// have one or two sections), made once per inductance.
struct RingSections {
    /// Distinct (width, thickness) sections.
    sections: Vec<(f64, f64)>,
    /// Series for sections `i` and `j` at `i * sections.len() + j`.
    series: Vec<std::sync::Arc<GmdSeries>>,
}

impl RingSections {
    fn new<'a>(rings: impl IntoIterator<Item = &'a Ring>) -> Self {
        let mut sections: Vec<(f64, f64)> = Vec::new();
        for r in rings {
            if !sections.contains(&(r.width, r.thickness)) {
                sections.push((r.width, r.thickness));
            }
        }
        let series = sections
            .iter()
            .flat_map(|&(w1, t1)| {
                sections
                    .iter()
                    .map(move |&(w2, t2)| GmdSeries::cached(w1, t1, w2, t2))
            })
            .collect();
        RingSections { sections, series }
    }

    /// Index of a ring's section.
    fn index(&self, r: &Ring) -> usize {
        self.sections
            .iter()
            .position(|&s| s == (r.width, r.thickness))
            .expect("every ring's section is listed")
    }

    fn indices(&self, rings: &[Ring]) -> Vec<usize> {
        rings.iter().map(|r| self.index(r)).collect()
    }

    fn series(&self, i: usize, j: usize) -> &GmdSeries {
        &self.series[i * self.sections.len() + j]
    }
}

/// Mutual inductance of two ring elements per unit fraction (full loops),
/// henry, with the GMD correction for close or overlapping sections
/// (`series`: the GMD series of the two rings' sections): either a value,
/// or the radii and distance for Maxwell's formula.
fn ring_pair(p: &Ring, q: &Ring, series: &GmdSeries) -> PairTerm {
    let dr = q.radius - p.radius;
    let dz = q.z - p.z;
    let dist = (dr * dr + dz * dz).sqrt();
    let size = p.width.max(p.thickness).max(q.width).max(q.thickness);
    let overlap =
        dr.abs() < (p.width + q.width) / 2.0 && dz.abs() < (p.thickness + q.thickness) / 2.0;
    let am = (p.radius + q.radius) / 2.0;
    if overlap {
        // Parts of one turn: a ring of the mean radius with the GMD of the
        // two (overlapping) sections (Grover's thin-ring formula).
        let g = cached_gmd(dr, dz, p.width, p.thickness, q.width, q.thickness);
        PairTerm::Value(MU0 * am * ((8.0 * am / g).ln() - 2.0))
    } else if dist < NEAR * size {
        // GMD / distance: by the series where it converges fast, else the
        // closed form.
        let s = match series.ln_ratio(dr, dz) {
            Some(ln) => ln.exp(),
            None => cached_gmd(dr, dz, p.width, p.thickness, q.width, q.thickness) / dist,
        };
        PairTerm::Maxwell(am - dr * s / 2.0, am + dr * s / 2.0, dz * s)
    } else {
        PairTerm::Maxwell(p.radius, q.radius, dz)
    }
}

/// One ring pair's mutual inductance, or what Maxwell's formula needs.
enum PairTerm {
    Value(f64),
    Maxwell(f64, f64, f64),
}

/// `sum_j coef(j) M(p, qs[j])` in the order of `qs`, Maxwell's formula
/// eight pairs at a time (`series(j)`: the GMD series for `qs[j]`).
fn pair_sum<'a>(
    p: &Ring,
    qs: &[Ring],
    coef: impl Fn(usize, &Ring) -> f64,
    series: impl Fn(usize) -> &'a GmdSeries,
) -> f64 {
    let mut s = 0.0;
    for (c, chunk) in qs.chunks(8).enumerate() {
        let mut vals = [0.0; 8];
        // Harmless arguments for lanes that need no formula.
        let (mut a, mut b, mut d) = ([1.0; 8], [1.0; 8], [1.0; 8]);
        let mut any = false;
        let mut maxwell = [false; 8];
        for (l, q) in chunk.iter().enumerate() {
            match ring_pair(p, q, series(8 * c + l)) {
                PairTerm::Value(v) => vals[l] = v,
                PairTerm::Maxwell(x, y, z) => {
                    (a[l], b[l], d[l]) = (x, y, z);
                    maxwell[l] = true;
                    any = true;
                }
            }
        }
        if any {
            let m = maxwell_mutual_8(a, b, d);
            for l in 0..chunk.len() {
                if maxwell[l] {
                    vals[l] = m[l];
                }
            }
        }
        for (l, q) in chunk.iter().enumerate() {
            s += coef(8 * c + l, q) * vals[l];
        }
    }
    s
}

/// Inductance of a set of coaxial ring elements, henry:
/// `sum_i sum_j w_i w_j f_i f_j M_ij`.
pub fn rings_inductance(rings: &[Ring]) -> f64 {
    let sections = RingSections::new(rings);
    let idx = sections.indices(rings);
    super::map_indices(rings.len(), |i| {
        let p = &rings[i];
        let cp = p.weight * p.frac;
        pair_sum(
            p,
            &rings[i..],
            |j, q| {
                if j == 0 {
                    cp * cp
                } else {
                    2.0 * cp * q.weight * q.frac
                }
            },
            |j| sections.series(idx[i], idx[i + j]),
        )
    })
    // Summed in a fixed order: the same inputs give the same bits.
    .iter()
    .sum()
}

/// Mutual inductance between two groups of rings (current shares
/// included), henry.
pub fn rings_mutual(a: &[Ring], b: &[Ring]) -> f64 {
    let sections = RingSections::new(a.iter().chain(b));
    let (ia, ib) = (sections.indices(a), sections.indices(b));
    super::map_indices(a.len(), |i| {
        let p = &a[i];
        pair_sum(
            p,
            b,
            |_, q| p.weight * p.frac * q.weight * q.frac,
            |j| sections.series(ia[i], ib[j]),
        )
    })
    .iter()
    .sum()
}

fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}
fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}
fn norm(a: [f64; 3]) -> f64 {
    dot(a, a).sqrt()
}

/// `int int dx dy / sqrt((x-y)^2 + d^2)` over `x in [a1,a2]`, `y in [b1,b2]`
/// (parallel filaments, Grover): with `F(x) = x asinh(x/d) - sqrt(x^2+d^2)`
/// it is `F(b2-a1) + F(b1-a2) - F(b2-a2) - F(b1-a1)`.
fn parallel_integral(a1: f64, a2: f64, b1: f64, b2: f64, d: f64) -> f64 {
    let f = |x: f64| x * (x / d).asinh() - (x * x + d * d).sqrt();
    f(b2 - a1) + f(b1 - a2) - f(b2 - a2) - f(b1 - a1)
}

/// `int dl / |P - Q(l)|` along a straight filament from `qa` with unit
/// direction `u` and length `len`, in closed form:
/// `asinh((len - s)/rho) + asinh(s/rho)`, written with logarithms of the
/// end distances in the form free of cancellation for each position of
/// the point along the line.
fn line_potential(p: [f64; 3], qa: [f64; 3], u: [f64; 3], len: f64) -> f64 {
    let r = sub(p, qa);
    let s = dot(r, u);
    let ra2 = dot(r, r);
    let ra = ra2.sqrt();
    let rb = (ra2 - 2.0 * s * len + len * len).max(0.0).sqrt();
    if s < 0.0 {
        ((len - s + rb) / (ra - s)).ln()
    } else if s > len {
        ((s + ra) / (s - len + rb)).ln()
    } else {
        let rho2 = (ra2 - s * s).max(1e-30);
        ((ra + s) * (rb + len - s) / rho2).ln()
    }
}

/// Distance from point `p` to the segment `a`-`b`, m.
fn point_seg(p: [f64; 3], a: [f64; 3], b: [f64; 3]) -> f64 {
    let ab = sub(b, a);
    let l2 = dot(ab, ab);
    let t = if l2 > 0.0 {
        (dot(sub(p, a), ab) / l2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    norm(sub(
        p,
        [a[0] + ab[0] * t, a[1] + ab[1] * t, a[2] + ab[2] * t],
    ))
}

/// Neumann integral `int int dl_p . dl_q / r` of two straight filaments
/// with the GMD correction for close pieces, metres (multiply by mu0/4pi
/// for henry).
fn straight_pair(p: &Filament, q: &Filament) -> f64 {
    let dp = sub(p.b, p.a);
    let dq = sub(q.b, q.a);
    let (lp, lq) = (norm(dp), norm(dq));
    if lp == 0.0 || lq == 0.0 {
        return 0.0;
    }
    let up = [dp[0] / lp, dp[1] / lp, dp[2] / lp];
    let uq = [dq[0] / lq, dq[1] / lq, dq[2] / lq];
    let c = dot(up, uq);
    if c.abs() < 1e-12 {
        return 0.0;
    }
    let cross = up[0] * uq[1] - up[1] * uq[0];
    // In-plane normal of p, lateral and vertical offset of q's middle.
    let n = [-up[1], up[0], 0.0];
    let qm = [
        (q.a[0] + q.b[0]) / 2.0,
        (q.a[1] + q.b[1]) / 2.0,
        (q.a[2] + q.b[2]) / 2.0,
    ];
    let rel = sub(qm, p.a);
    let lat = dot(rel, n);
    let dz = q.a[2] - p.a[2];
    let size = p.width.max(p.thickness).max(q.width).max(q.thickness);
    let sa = dot(sub(q.a, p.a), up);
    let sb = dot(sub(q.b, p.a), up);
    // Nearly parallel pieces close to p's line use the GMD of their
    // sections (for pieces far along the line this changes nothing).
    let near = cross.abs() < 0.2 && lat.hypot(dz) < NEAR * size;
    let g = if near {
        Some(cached_gmd(
            lat,
            dz,
            p.width,
            p.thickness,
            q.width,
            q.thickness,
        ))
    } else {
        None
    };
    if cross.abs() < 1e-9 {
        let (lo, hi) = (sa.min(sb), sa.max(sb));
        let d = g.unwrap_or_else(|| lat.hypot(dz));
        return c.signum() * parallel_integral(0.0, lp, lo, hi, d);
    }
    // Raise q so that its distance from p equals the GMD.
    let shift = match g {
        Some(g) if g > lat.hypot(dz) => {
            let s = if dz < 0.0 { -1.0 } else { 1.0 };
            s * (g * g - lat * lat).max(0.0).sqrt() - dz
        }
        _ => 0.0,
    };
    let qa = [q.a[0], q.a[1], q.a[2] + shift];
    let f = |t: f64| {
        let pt = [p.a[0] + up[0] * t, p.a[1] + up[1] * t, p.a[2] + up[2] * t];
        line_potential(pt, qa, uq, lq)
    };
    // Closest approach (the pieces do not cross: endpoint distances bound
    // it) decides the quadrature: fixed Gauss rules where the integrand is
    // smooth, adaptive near a shared corner.
    let qa3 = qa;
    let qb3 = [q.b[0], q.b[1], q.b[2] + shift];
    let dmin = point_seg(p.a, qa3, qb3)
        .min(point_seg(p.b, qa3, qb3))
        .min(point_seg(qa3, p.a, p.b))
        .min(point_seg(qb3, p.a, p.b));
    let lmax = lp.max(lq);
    let order = if dmin > 4.0 * lmax {
        2
    } else if dmin > lmax {
        4
    } else if dmin > 0.3 * lmax {
        8
    } else {
        0
    };
    let gauss = |n: usize| {
        let (x, w) = rule(n);
        x.iter()
            .zip(w)
            .map(|(x, w)| w * f(lp / 2.0 * (1.0 + x)))
            .sum::<f64>()
            * lp
            / 2.0
    };
    let val = if order > 0 {
        gauss(order)
    } else {
        // Panels graded geometrically (ratio 4) away from the point of p
        // nearest to q, 4-point Gauss-Legendre on each.
        let cands = [
            0.0,
            lp,
            dot(sub(qa3, p.a), up).clamp(0.0, lp),
            dot(sub(qb3, p.a), up).clamp(0.0, lp),
        ];
        let at = |t: f64| [p.a[0] + up[0] * t, p.a[1] + up[1] * t, p.a[2] + up[2] * t];
        let ts = cands
            .iter()
            .copied()
            .min_by(|x, y| point_seg(at(*x), qa3, qb3).total_cmp(&point_seg(at(*y), qa3, qb3)))
            .unwrap_or(0.0);
        let mut br = vec![0.0, lp, ts];
        let mut h = dmin.max(lp * 1e-9);
        while h < lp {
            for t in [ts - h, ts + h] {
                if t > 0.0 && t < lp {
                    br.push(t);
                }
            }
            h *= 4.0;
        }
        br.sort_by(f64::total_cmp);
        br.dedup();
        let (x, w) = rule(4);
        br.windows(2)
            .map(|b| {
                let (hh, cc) = ((b[1] - b[0]) / 2.0, (b[1] + b[0]) / 2.0);
                x.iter()
                    .zip(w)
                    .map(|(x, w)| w * f(cc + hh * x))
                    .sum::<f64>()
                    * hh
            })
            .sum()
    };
    c * val
}

/// Inductance of straight filaments by Neumann's formula, henry.
pub fn filaments_inductance(f: &[Filament]) -> f64 {
    let s: f64 = super::map_indices(f.len(), |i| {
        let p = &f[i];
        let mut s = p.weight * p.weight * straight_pair(p, p);
        for q in &f[i + 1..] {
            s += 2.0 * p.weight * q.weight * straight_pair(p, q);
        }
        s
    })
    // Summed in a fixed order: the same inputs give the same bits.
    .iter()
    .sum();
    MU0 / (4.0 * PI) * s
}

/// How the inductance was computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum InductanceMethod {
    /// Coaxial ring elements with Maxwell's formula.
    MaxwellRings,
    /// Straight filaments with Neumann's formula.
    NeumannFilaments,
}

/// Relative chord sagitta for flattening arcs in the Neumann method.
pub const NEUMANN_SAGITTA: f64 = 5e-3;

/// Inductance of the whole conductor, henry: coaxial rings for circular
/// coils, Neumann filaments otherwise.
pub fn inductance(c: &Conductor, circular: bool) -> (f64, InductanceMethod) {
    if circular {
        (rings_inductance(&c.rings()), InductanceMethod::MaxwellRings)
    } else {
        (
            filaments_inductance(&c.filaments(NEUMANN_SAGITTA)),
            InductanceMethod::NeumannFilaments,
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::closed_forms::ring_self;

    #[test]
    fn maxwell_reference_values() {
        // REFERENCES.md [C] (Maxwell's formula evaluated with scipy):
        // a = b = 10 mm, d = 1 mm -> 30.0288 nH; a = 10, b = 5, d = 2 mm -> 5.02280 nH.
        let m1 = maxwell_mutual(0.010, 0.010, 0.001) * 1e9;
        assert!((m1 - 30.0288).abs() < 5e-4, "{m1}");
        let m2 = maxwell_mutual(0.010, 0.005, 0.002) * 1e9;
        assert!((m2 - 5.02280).abs() < 5e-5, "{m2}");
        // Symmetry M(a,b) = M(b,a) (reciprocity).
        let m3 = maxwell_mutual(0.005, 0.010, 0.002) * 1e9;
        assert!((m2 - m3).abs() < 1e-12);
    }

    proptest::proptest! {
        #[test]
        fn maxwell_is_symmetric_and_below_the_geometric_mean(
            a in 1e-4f64..0.05, b in 1e-4f64..0.05, d in 1e-5f64..0.05
        ) {
            // Reciprocity M(a, b) = M(b, a) (Neumann's formula is symmetric),
            // and coupling below 1 against the Grover self inductance of
            // 0.1 mm x 35 um rings whenever the filaments are apart.
            let m1 = maxwell_mutual(a, b, d);
            let m2 = maxwell_mutual(b, a, d);
            proptest::prop_assert!((m1 - m2).abs() <= 1e-12 * m1.abs());
            proptest::prop_assert!(m1 > 0.0);
            let la = crate::physics::closed_forms::ring_self(a, 0.1e-3, 35e-6);
            let lb = crate::physics::closed_forms::ring_self(b, 0.1e-3, 35e-6);
            if (a - b).abs().hypot(d) > 0.2e-3 {
                proptest::prop_assert!(m1 < (la * lb).sqrt());
            }
        }
    }

    #[test]
    fn line_potential_matches_asinh_form() {
        // int dl / r along a segment = asinh((L-s)/rho) + asinh(s/rho) (textbook).
        let u = [0.6, 0.8, 0.0];
        for p in [
            [0.3, -0.2, 0.1],
            [-2.0, -2.0, 0.01],
            [5.0, 6.0, -0.2],
            [0.6, 0.8, 1e-3],
        ] {
            let r = sub(p, [0.0; 3]);
            let s = dot(r, u);
            let rho = (dot(r, r) - s * s).sqrt();
            let exact = ((2.0 - s) / rho).asinh() + (s / rho).asinh();
            let v = line_potential(p, [0.0; 3], u, 2.0);
            assert!((v / exact - 1.0).abs() < 1e-10, "{p:?}: {v} {exact}");
        }
    }

    #[test]
    fn maxwell_series_matches_elliptic_branch() {
        // Both branches meet at k = 0.3; far apart the dipole limit
        // mu0 pi a^2 b^2 / (2 D^3) holds (textbook).
        for d in [0.0195, 0.02, 0.0205] {
            let a: f64 = 0.003;
            let k = (4.0 * a * a / (4.0 * a * a + d * d)).sqrt();
            let (kk, ee) = ke(k);
            let direct = MU0 * a * ((2.0 / k - k) * kk - 2.0 / k * ee);
            let m = maxwell_mutual(a, a, d);
            assert!((m / direct - 1.0).abs() < 1e-9, "{k} {m} {direct}");
        }
        let (a, b, d) = (1e-3, 2e-3, 1.0);
        let dip = MU0 * PI * a * a * b * b / (2.0 * (a * a + b * b + d * d).powf(1.5));
        assert!((maxwell_mutual(a, b, d) / dip - 1.0).abs() < 1e-5);
    }

    fn ring(r: f64, z: f64, w: f64, t: f64) -> Ring {
        Ring {
            radius: r,
            z,
            frac: 1.0,
            width: w,
            thickness: t,
            weight: 1.0,
            layer: 1,
        }
    }

    #[test]
    fn single_ring_is_grover() {
        // Grover ring a = 10 mm, 0.2 mm x 35 um: 66.96 nH (REFERENCES.md [C]).
        let l = rings_inductance(&[ring(0.01, 0.0, 0.2e-3, 35e-6)]);
        assert!((l * 1e9 - 66.96).abs() < 0.01, "{}", l * 1e9);
        // Two halves of that ring give the same.
        let mut h = ring(0.01, 0.0, 0.2e-3, 35e-6);
        h.frac = 0.5;
        let l2 = rings_inductance(&[h, h]);
        assert!((l2 / ring_self(0.01, 0.2e-3, 35e-6) - 1.0).abs() < 1e-12);
    }

    #[test]
    fn coupling_of_close_layers_stays_below_one() {
        // Layers 10 um apart, trace 0.3 mm wide: centre filaments would give
        // k > 1 (REFERENCES.md pitfall); the GMD keeps it below 1.
        for gap in [0.0, 10e-6, 25e-6, 50e-6, 200e-6] {
            let t = 35e-6;
            let a = ring(0.005, 0.0, 0.3e-3, t);
            let b = ring(0.005, -(t + gap), 0.3e-3, t);
            let k = rings_mutual(&[a], &[b]) / rings_inductance(&[a]);
            assert!(k < 1.0 && k > 0.5, "gap {gap}: k = {k}");
        }
    }

    #[test]
    fn neumann_square_loop_matches_grover_closed_form() {
        // Square loop of side s from round wire (Grover 1946; also Rosa 1908):
        // L = (2 mu0 s / pi) (ln(s/r) - 0.774) for a thin wire of radius r.
        // Emulate with a square section of GMD r: side a = r / 0.44705.
        let s = 0.05;
        let r = 0.2e-3;
        let a = r / 0.44705;
        let pts = [[0.0, 0.0], [s, 0.0], [s, s], [0.0, s], [0.0, 0.0]];
        let f: Vec<Filament> = pts
            .windows(2)
            .map(|p| Filament {
                a: [p[0][0], p[0][1], 0.0],
                b: [p[1][0], p[1][1], 0.0],
                weight: 1.0,
                layer: 1,
                width: a,
                thickness: a,
            })
            .collect();
        let l = filaments_inductance(&f);
        let grover = 2.0 * MU0 * s / PI * ((s / r).ln() - 0.774);
        // The closed form assumes a round section (GMD = r, 0.44705 a is
        // within 0.1 %) and drops terms of order r/s.
        assert!((l / grover - 1.0).abs() < 0.01, "{l} {grover}");
    }

    #[test]
    fn neumann_agrees_with_rings_for_a_flattened_circle() {
        // The same five coaxial loops, once as Maxwell rings and once as
        // Neumann filaments of 720 chords each: the two methods must agree.
        let (w, t) = (0.2e-3, 35e-6);
        let mut rings = vec![];
        let mut fil = vec![];
        for k in 0..5 {
            let r = 0.004 + k as f64 * 0.4e-3;
            rings.push(ring(r, 0.0, w, t));
            let n = 720;
            for i in 0..n {
                let a0 = 2.0 * PI * i as f64 / n as f64;
                let a1 = 2.0 * PI * (i + 1) as f64 / n as f64;
                fil.push(Filament {
                    a: [r * a0.cos(), r * a0.sin(), 0.0],
                    b: [r * a1.cos(), r * a1.sin(), 0.0],
                    weight: 1.0,
                    layer: 1,
                    width: w,
                    thickness: t,
                });
            }
        }
        let lr = rings_inductance(&rings);
        let ln = filaments_inductance(&fil);
        assert!((ln / lr - 1.0).abs() < 0.01, "{ln} {lr}");
    }

    #[test]
    fn eight_at_a_time_gives_the_same_bits() {
        // Radii and distances of real coils and far pairs (the series
        // branch), lane by lane against the one-pair formula.
        let mut n = 0;
        for i in 0..40 {
            let t = i as f64;
            let a: [f64; 8] =
                std::array::from_fn(|l| 1e-3 + 1e-3 * ((t + l as f64) * 0.37).fract() * 9.0);
            let b: [f64; 8] = std::array::from_fn(|l| {
                if l == 7 {
                    3e-5
                } else {
                    1e-3 + 1e-2 * ((t * 1.3 + l as f64) * 0.61).fract()
                }
            });
            let d: [f64; 8] = std::array::from_fn(|l| 2e-4 * ((t + 2.0 * l as f64) * 0.23).fract());
            let m = maxwell_mutual_8(a, b, d);
            for l in 0..8 {
                assert_eq!(
                    m[l].to_bits(),
                    maxwell_mutual(a[l], b[l], d[l]).to_bits(),
                    "{} {} {}",
                    a[l],
                    b[l],
                    d[l]
                );
                n += 1;
            }
        }
        assert_eq!(n, 320);
    }
}
