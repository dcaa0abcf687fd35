//! Complete elliptic integrals of the first and second kind by the
//! arithmetic-geometric mean (Abramowitz & Stegun, Handbook of Mathematical
//! Functions, 17.6), one at a time ([`ke`]) and for a fixed number of
//! moduli at once ([`ke_lanes`], the same bits), and Bulirsch's generalized
//! complete elliptic integral [`cel`].
//!
//! The argument is the **modulus** `k` (not the parameter `m = k^2`).

use std::f64::consts::FRAC_PI_2;

/// Complete elliptic integrals `(K(k), E(k))` for modulus `0 <= k < 1`.
///
/// Uses the AGM iteration `a' = (a+b)/2, b' = sqrt(ab), c' = (a-b)/2` from
/// `a = 1, b = sqrt(1-k^2), c = k`; then `K = pi / (2 a_inf)` and
/// `E = K (1 - sum 2^(n-1) c_n^2)` (A&S 17.6.3-17.6.4). Relative accuracy
/// about 1e-15. Returns infinity for `K` at `k = 1`.
pub fn ke(k: f64) -> (f64, f64) {
    let k = k.abs();
    if k >= 1.0 {
        return (f64::INFINITY, 1.0);
    }
    let mut a = 1.0;
    let mut b = (1.0 - k * k).sqrt();
    let mut c = k;
    let mut sum = 0.5 * c * c;
    let mut pow = 0.5;
    for _ in 0..40 {
        if c.abs() <= 1e-15 * a {
            break;
        }
        let an = 0.5 * (a + b);
        let bn = (a * b).sqrt();
        c = 0.5 * (a - b);
        a = an;
        b = bn;
        pow *= 2.0;
        sum += pow * c * c;
    }
    let kk = FRAC_PI_2 / a;
    (kk, kk * (1.0 - sum))
}

/// [`ke`] for `N` moduli at once, lane by lane the same operations in the
/// same order (so the same bits), written so that the compiler keeps the
/// lanes in vector registers: a lane that has converged keeps its values
/// while the others go on.
#[inline(always)]
pub fn ke_lanes<const N: usize>(k: [f64; N]) -> ([f64; N], [f64; N]) {
    let k = k.map(f64::abs);
    let mut a = [1.0; N];
    let mut b = k.map(|k| (1.0 - k * k).sqrt());
    let mut c = k;
    let mut sum = k.map(|c| 0.5 * c * c);
    let mut pow = [0.5; N];
    for _ in 0..40 {
        // The scalar loop's test, negated: go on while not converged.
        let mut go = [false; N];
        for l in 0..N {
            go[l] = c[l].abs() > 1e-15 * a[l] || c[l].is_nan() || a[l].is_nan();
        }
        if !go.contains(&true) {
            break;
        }
        for l in 0..N {
            let an = 0.5 * (a[l] + b[l]);
            let bn = (a[l] * b[l]).sqrt();
            let cn = 0.5 * (a[l] - b[l]);
            let pn = pow[l] * 2.0;
            let sn = sum[l] + pn * cn * cn;
            // Computed for every lane, kept where the lane goes on.
            a[l] = pick(go[l], an, a[l]);
            b[l] = pick(go[l], bn, b[l]);
            c[l] = pick(go[l], cn, c[l]);
            pow[l] = pick(go[l], pn, pow[l]);
            sum[l] = pick(go[l], sn, sum[l]);
        }
    }
    let mut kk = [0.0; N];
    let mut ee = [0.0; N];
    for l in 0..N {
        let kl = FRAC_PI_2 / a[l];
        kk[l] = pick(k[l] >= 1.0, f64::INFINITY, kl);
        ee[l] = pick(k[l] >= 1.0, 1.0, kl * (1.0 - sum[l]));
    }
    (kk, ee)
}

/// `new` where `cond`, else `old`, by bit masks: no branch, so that the
/// compiler keeps lanes in vector registers instead of branching per lane.
#[inline(always)]
fn pick(cond: bool, new: f64, old: f64) -> f64 {
    let keep = u64::from(cond).wrapping_neg();
    f64::from_bits((new.to_bits() & keep) | (old.to_bits() & !keep))
}

/// Bulirsch's generalized complete elliptic integral
/// `cel(kc, p, c, s) = int_0^{pi/2} (c cos^2 t + s sin^2 t) /
/// ((cos^2 t + p sin^2 t) sqrt(cos^2 t + kc^2 sin^2 t)) dt`
/// (R. Bulirsch, Numer. Math. 13, 1969; the iteration as printed by
/// Derby & Olbert, Am. J. Phys. 78(3), 2010, appendix). Special cases:
/// `K(k) = cel(kc, 1, 1, 1)`, `E(k) = cel(kc, 1, 1, kc^2)` with
/// `kc = sqrt(1 - k^2)`. Needs `kc != 0`; the iteration converges
/// quadratically and stops when the means agree to 1e-9 relative, after
/// which the result is good to about 1e-16 relative.
pub fn cel(kc: f64, p: f64, c: f64, s: f64) -> f64 {
    if kc == 0.0 {
        return f64::NAN;
    }
    const ERRTOL: f64 = 1e-9;
    let mut k = kc.abs();
    let mut pp = p;
    let mut cc = c;
    let mut ss = s;
    let mut em = 1.0;
    if p > 0.0 {
        pp = p.sqrt();
        ss = s / pp;
    } else {
        let mut f = kc * kc;
        let mut q = 1.0 - f;
        let g = 1.0 - pp;
        f -= pp;
        q *= ss - c * pp;
        pp = (f / g).sqrt();
        cc = (c - ss) / g;
        ss = -q / (g * g * pp) + cc * pp;
    }
    let mut f = cc;
    cc += ss / pp;
    let mut g = k / pp;
    ss = 2.0 * (ss + f * g);
    pp += g;
    g = em;
    em += k;
    let mut kk = k;
    for _ in 0..60 {
        if (g - k).abs() <= g * ERRTOL {
            break;
        }
        k = 2.0 * kk.sqrt();
        kk = k * em;
        f = cc;
        cc += ss / pp;
        g = kk / pp;
        ss = 2.0 * (ss + f * g);
        pp += g;
        g = em;
        em += k;
    }
    FRAC_PI_2 * (ss + cc * em) / (em * (em + pp))
}

/// [`cel`] for `N` arguments at once with `p > 0` in every lane, lane by
/// lane the same operations in the same order (so the same bits), written
/// like [`ke_lanes`] so that the lanes stay in vector registers: a lane
/// that has converged keeps its values while the others go on. A lane
/// with `p <= 0` gives NaN (that branch of [`cel`] is not taken here).
#[inline(always)]
pub fn cel_lanes<const N: usize>(kc: [f64; N], p: [f64; N], c: [f64; N], s: [f64; N]) -> [f64; N] {
    const ERRTOL: f64 = 1e-9;
    let mut k = kc.map(f64::abs);
    let mut pp = p.map(f64::sqrt);
    let mut cc = c;
    let mut ss = [0.0; N];
    let mut em = [1.0; N];
    let mut f = [0.0; N];
    let mut g = [0.0; N];
    let mut kk = [0.0; N];
    for l in 0..N {
        ss[l] = s[l] / pp[l];
        f[l] = cc[l];
        cc[l] += ss[l] / pp[l];
        g[l] = k[l] / pp[l];
        ss[l] = 2.0 * (ss[l] + f[l] * g[l]);
        pp[l] += g[l];
        g[l] = em[l];
        em[l] += k[l];
        kk[l] = k[l];
    }
    for _ in 0..60 {
        // The scalar loop's test, negated: go on while not converged.
        let mut go = [false; N];
        for l in 0..N {
            go[l] = (g[l] - k[l]).abs() > g[l] * ERRTOL || (g[l] - k[l]).is_nan() || g[l].is_nan();
        }
        if !go.contains(&true) {
            break;
        }
        for l in 0..N {
            let kn = 2.0 * kk[l].sqrt();
            let kkn = kn * em[l];
            let fnew = cc[l];
            let ccn = cc[l] + ss[l] / pp[l];
            let gn = kkn / pp[l];
            let ssn = 2.0 * (ss[l] + fnew * gn);
            let ppn = pp[l] + gn;
            let gn2 = em[l];
            let emn = em[l] + kn;
            k[l] = pick(go[l], kn, k[l]);
            kk[l] = pick(go[l], kkn, kk[l]);
            f[l] = pick(go[l], fnew, f[l]);
            cc[l] = pick(go[l], ccn, cc[l]);
            ss[l] = pick(go[l], ssn, ss[l]);
            pp[l] = pick(go[l], ppn, pp[l]);
            g[l] = pick(go[l], gn2, g[l]);
            em[l] = pick(go[l], emn, em[l]);
        }
    }
    let mut out = [0.0; N];
    for l in 0..N {
        let v = FRAC_PI_2 * (ss[l] + cc[l] * em[l]) / (em[l] * (em[l] + pp[l]));
        out[l] = pick(kc[l] == 0.0 || p[l] <= 0.0 || p[l].is_nan(), f64::NAN, v);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn known_values() {
        // A&S Table 17.1 (modulus k = sin 30 deg): K = 1.685750355, E = 1.467462209.
        let (k, e) = ke(0.5);
        assert!((k - 1.685_750_354_812_596).abs() < 1e-13);
        assert!((e - 1.467_462_209_339_427).abs() < 1e-13);
        // k = 0: K = E = pi/2 (definition).
        let (k0, e0) = ke(0.0);
        assert!((k0 - FRAC_PI_2).abs() < 1e-15 && (e0 - FRAC_PI_2).abs() < 1e-15);
        // Legendre's relation E K' + E' K - K K' = pi/2 (A&S 17.3.13), k = 0.6, k' = 0.8.
        let (k1, e1) = ke(0.6);
        let (k2, e2) = ke(0.8);
        assert!((e1 * k2 + e2 * k1 - k1 * k2 - FRAC_PI_2).abs() < 1e-13);
    }

    /// The lanes give the scalar [`cel`]'s bits, lane by lane, for the
    /// magnet's arguments and others with `p > 0` (lanes converging after
    /// different numbers of steps in one call).
    #[test]
    fn cel_lanes_give_the_scalar_bits() {
        for t in 0..50 {
            let kc: [f64; 8] = std::array::from_fn(|l| {
                let x = ((t * 8 + l) as f64 * 0.618_033_988_7).fract();
                if l == 0 {
                    1e-15 + x * 1e-6
                } else {
                    x.powi(3) + 1e-12
                }
            });
            let p: [f64; 8] = std::array::from_fn(|l| {
                if l % 2 == 0 {
                    1.0
                } else {
                    0.01 + (l * t) as f64 * 0.1
                }
            });
            let c: [f64; 8] = std::array::from_fn(|l| 1.0 - l as f64 * 0.1);
            let s: [f64; 8] =
                std::array::from_fn(|l| if l % 3 == 0 { -1.0 } else { 0.3 * l as f64 });
            let v = cel_lanes(kc, p, c, s);
            for l in 0..8 {
                assert_eq!(
                    v[l].to_bits(),
                    cel(kc[l], p[l], c[l], s[l]).to_bits(),
                    "{t} {l}"
                );
            }
        }
        assert!(cel_lanes([0.5], [0.0], [1.0], [1.0])[0].is_nan());
    }

    #[test]
    fn cel_matches_its_definition() {
        // K and E as special cases (Bulirsch 1969), then the defining
        // integral by 8-point Gauss-Legendre panels (64, or 20,000 where
        // the integrand peaks sharply for a small kc).
        for k in [0.0, 0.3, 0.7, 0.95, 0.999_999] {
            let kc = (1.0f64 - k * k).sqrt();
            let (kk, ee) = ke(k);
            assert!((cel(kc, 1.0, 1.0, 1.0) / kk - 1.0).abs() < 1e-14, "K {k}");
            assert!(
                (cel(kc, 1.0, 1.0, kc * kc) / ee - 1.0).abs() < 1e-14,
                "E {k}"
            );
        }
        let (x, w) = crate::numeric::quadrature::gauss_legendre(8);
        for (kc, p, c, s) in [
            (0.4, 1.0, 1.0, -1.0),
            (0.05, 0.3, 1.0, 0.55),
            (0.9, 0.01, 1.0, 0.1),
            (0.001, 1.0, 1.0, -1.0),
            (0.2, 0.0, 1.0, 0.0),
        ] {
            let panels = if kc < 0.01 { 20_000 } else { 64 };
            let h = FRAC_PI_2 / panels as f64;
            let mut q = 0.0;
            for i in 0..panels {
                for (xi, wi) in x.iter().zip(&w) {
                    let t = h * (i as f64 + 0.5 + 0.5 * xi);
                    let (co, si) = (t.cos().powi(2), t.sin().powi(2));
                    q += 0.5 * h * wi * (c * co + s * si)
                        / ((co + p * si) * (co + kc * kc * si).sqrt());
                }
            }
            let v = cel(kc, p, c, s);
            assert!(
                (v - q).abs() < 1e-10 * q.abs().max(1.0),
                "{kc} {p} {c} {s}: {v} {q}"
            );
        }
    }

    #[test]
    fn lanes_give_the_same_bits_as_one_at_a_time() {
        let ks: Vec<f64> = (0..203)
            .map(|i| (i as f64 * 0.6180339887).fract())
            .chain([0.0, 1e-9, 0.3, 0.999999999, 1.0])
            .collect();
        for chunk in ks.chunks(8) {
            let mut k = [0.5; 8];
            k[..chunk.len()].copy_from_slice(chunk);
            let (kk, ee) = ke_lanes(k);
            for l in 0..8 {
                let (k1, e1) = ke(k[l]);
                assert_eq!(
                    (kk[l].to_bits(), ee[l].to_bits()),
                    (k1.to_bits(), e1.to_bits()),
                    "{}",
                    k[l]
                );
            }
        }
    }
}
