//! Quadrature: Gauss-Legendre rules ([`gauss_legendre`], cached in
//! [`rule`]) and adaptive Simpson ([`adaptive_simpson`]).

use std::sync::OnceLock;

/// Gauss-Legendre nodes and weights on [-1, 1] for `n` points: exact for
/// polynomials of degree up to `2n - 1`.
///
/// Method: Newton iteration on the Legendre polynomial from the usual
/// cosine start (Golub-Welsch not needed for small orders), stopped when a
/// step moves a node by less than 1e-16 (at most 100 steps), so nodes and
/// weights are good to a few units in the last place for the orders used
/// here (up to 24).
pub fn gauss_legendre(n: usize) -> (Vec<f64>, Vec<f64>) {
    let mut x = vec![0.0; n];
    let mut w = vec![0.0; n];
    let m = n.div_ceil(2);
    for i in 0..m {
        let mut z = (std::f64::consts::PI * (i as f64 + 0.75) / (n as f64 + 0.5)).cos();
        let mut dp = 1.0;
        for _ in 0..100 {
            let (mut p0, mut p1) = (1.0, z);
            for j in 2..=n {
                let p2 = ((2 * j - 1) as f64 * z * p1 - (j - 1) as f64 * p0) / j as f64;
                p0 = p1;
                p1 = p2;
            }
            if n == 1 {
                p1 = z;
                p0 = 1.0;
            }
            dp = n as f64 * (z * p1 - p0) / (z * z - 1.0);
            let dz = p1 / dp;
            z -= dz;
            if dz.abs() < 1e-16 {
                break;
            }
        }
        x[i] = -z;
        x[n - 1 - i] = z;
        let wi = 2.0 / ((1.0 - z * z) * dp * dp);
        w[i] = wi;
        w[n - 1 - i] = wi;
    }
    if n % 2 == 1 {
        // The middle node is exactly zero.
        x[n / 2] = 0.0;
    }
    (x, w)
}

/// Cached Gauss-Legendre rules of a few fixed orders: the smallest of 2,
/// 4, 8, 16 and 24 points that has at least `n` (24 for anything larger).
pub fn rule(n: usize) -> &'static (Vec<f64>, Vec<f64>) {
    static R2: OnceLock<(Vec<f64>, Vec<f64>)> = OnceLock::new();
    static R4: OnceLock<(Vec<f64>, Vec<f64>)> = OnceLock::new();
    static R8: OnceLock<(Vec<f64>, Vec<f64>)> = OnceLock::new();
    static R16: OnceLock<(Vec<f64>, Vec<f64>)> = OnceLock::new();
    static R24: OnceLock<(Vec<f64>, Vec<f64>)> = OnceLock::new();
    match n {
        0..=2 => R2.get_or_init(|| gauss_legendre(2)),
        3..=4 => R4.get_or_init(|| gauss_legendre(4)),
        5..=8 => R8.get_or_init(|| gauss_legendre(8)),
        9..=16 => R16.get_or_init(|| gauss_legendre(16)),
        _ => R24.get_or_init(|| gauss_legendre(24)),
    }
}

/// `int_a^b f(x) dx` by adaptive Simpson quadrature.
///
/// Method: Simpson's rule on `[a, b]`, then on each half, recursively;
/// a part is accepted when its two halves agree with the whole within
/// `15 tol` and the Richardson term `delta / 15` is added (Lyness 1969),
/// with the tolerance halved at each level and at most `depth` levels.
/// `tol` is `rel_tol` times the magnitude of the first whole-interval
/// estimate, so the result is good to about `rel_tol` relative for smooth
/// integrands (each accepted part contributes at most its share).
pub fn adaptive_simpson(f: impl Fn(f64) -> f64, a: f64, b: f64, rel_tol: f64, depth: u32) -> f64 {
    let (fa, fm, fb) = (f(a), f((a + b) / 2.0), f(b));
    let whole = (b - a) / 6.0 * (fa + 4.0 * fm + fb);
    simpson(
        &f,
        (a, fa),
        (b, fb),
        fm,
        whole,
        rel_tol * whole.abs(),
        depth,
    )
}

/// Adaptive Simpson on `[a, b]` with the end and middle values known and
/// the whole-interval estimate `whole`; refines halves until the two
/// halves agree with the whole within `15 tol` (Richardson), at most
/// `depth` levels.
fn simpson(
    f: &impl Fn(f64) -> f64,
    (a, fa): (f64, f64),
    (b, fb): (f64, f64),
    fm: f64,
    whole: f64,
    tol: f64,
    depth: u32,
) -> f64 {
    let m = (a + b) / 2.0;
    let (lm, rm) = ((a + m) / 2.0, (m + b) / 2.0);
    let (flm, frm) = (f(lm), f(rm));
    let left = (m - a) / 6.0 * (fa + 4.0 * flm + fm);
    let right = (b - m) / 6.0 * (fm + 4.0 * frm + fb);
    let delta = left + right - whole;
    if depth == 0 || delta.abs() <= 15.0 * tol {
        return left + right + delta / 15.0;
    }
    simpson(f, (a, fa), (m, fm), flm, left, tol / 2.0, depth - 1)
        + simpson(f, (m, fm), (b, fb), frm, right, tol / 2.0, depth - 1)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gauss_integrates_polynomials() {
        // An n-point rule is exact for degree 2n-1 (Gauss): int_-1^1 x^14 = 2/15.
        let (x, w) = gauss_legendre(8);
        let s: f64 = x.iter().zip(&w).map(|(x, w)| w * x.powi(14)).sum();
        assert!((s - 2.0 / 15.0).abs() < 1e-14);
        let (x, w) = gauss_legendre(5);
        let s: f64 = x.iter().zip(&w).map(|(x, w)| w * x.powi(8)).sum();
        assert!((s - 2.0 / 9.0).abs() < 1e-14);
    }

    #[test]
    fn simpson_integrates_to_its_tolerance() {
        // int_0^1 e^x dx = e - 1 and int_1^2 1/x dx = ln 2 (calculus).
        let v = adaptive_simpson(f64::exp, 0.0, 1.0, 1e-12, 40);
        assert!((v - (std::f64::consts::E - 1.0)).abs() < 1e-12, "{v}");
        let v = adaptive_simpson(|x| 1.0 / x, 1.0, 2.0, 1e-12, 40);
        assert!((v - std::f64::consts::LN_2).abs() < 1e-12, "{v}");
        // Simpson is exact for cubics: one level is enough.
        let v = adaptive_simpson(|x| x * x * x - x, -1.0, 3.0, 1e-9, 0);
        assert!((v - 16.0).abs() < 1e-12, "{v}");
    }
}
