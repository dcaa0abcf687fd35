//! Coaxial ring elements (circular coils): Maxwell's elliptic-integral
//! formula for the mutual terms, with the geometric mean distance of the
//! sections for close rings.

use super::NEAR;
use crate::numeric::elliptic::{ke, ke_lanes};
use crate::physics::MU0;
use crate::physics::conductor::Ring;
use crate::physics::gmd::{GmdSeries, cached_gmd};
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
/// where the processor has them, see `physics/simd.rs`).
pub fn maxwell_mutual_8(a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
    crate::physics::simd::maxwell_8(a, b, d)
}

/// The plain eight-lane body of [`maxwell_mutual_8`] (also compiled for
/// AVX-512 and AVX2 in `physics/simd.rs`).
#[inline(always)]
pub(in crate::physics) fn maxwell_8(a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
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
/// (`series`: the GMD series of the two rings' sections, asked for only
/// for close pairs): either a value, or the radii and distance for
/// Maxwell's formula.
fn ring_pair<'a>(p: &Ring, q: &Ring, series: impl FnOnce() -> &'a GmdSeries) -> PairTerm {
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
        let s = match series().ln_ratio(dr, dz) {
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
            match ring_pair(p, q, || series(8 * c + l)) {
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
    crate::physics::map_indices(rings.len(), |i| {
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
    crate::physics::map_indices(a.len(), |i| {
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

/// A full ring of radius `r` at height `z` (m) with a `w` x `t` section
/// and the whole current (for tests).
#[cfg(test)]
pub(super) fn test_ring(r: f64, z: f64, w: f64, t: f64) -> Ring {
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::closed_forms::ring_self;
    use test_ring as ring;

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
}
