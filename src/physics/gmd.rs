//! Geometric mean distance (GMD) between two rectangular conductor
//! sections (Maxwell's GMD method; Grover, Inductance Calculations, 1946):
//! the mean of `ln r` over both areas, which replaces the filament
//! distance in the mutual inductance of close conductors.
//!
//! * [`gmd_rects`]: the closed form (the bar antiderivative), exact.
//! * [`gmd_rects_numeric`]: Gauss-Legendre integration, for extreme aspect
//!   ratios where the closed form's signed sum loses its digits.
//! * [`GmdSeries`]: the moment (multipole) expansion for sections apart,
//!   about thirty times cheaper than the closed form there.
//! * `cached_gmd`: the closed form with a per-thread cache.

use super::closed_forms::gmd_rect_self;
use crate::numeric::quadrature::rule;
use std::collections::HashMap;
use std::f64::consts::FRAC_PI_2;

/// Geometric mean distance between two axis-aligned rectangles of sizes
/// `w1` x `t1` and `w2` x `t2` whose centres are `dx`, `dy` apart, metres.
///
/// `ln g` is the mean of `ln r` over both areas. In closed form it is the
/// signed sum over the 16 corner differences of `F(x, y)` with
/// `d^4 F / dx^2 dy^2 = ln sqrt(x^2 + y^2)`:
/// `F = (6x^2y^2 - x^4 - y^4) ln(x^2 + y^2) / 48 + x^3 y atan(y/x) / 6
/// + x y^3 atan(x/y) / 6 - 25 x^2 y^2 / 48` (the rectangle antiderivative
/// used for the partial inductance of bars, e.g. Hoer & Love, J. Res. NBS
/// 69C, 1965; checked here by differentiation and against the numerical
/// integral). The signed sum loses about `log10(L^4 / (w1 w2 t1 t2))`
/// digits (`L` the overall extent); beyond 1e8 the numerical integral
/// [`gmd_rects_numeric`] is used instead.
pub fn gmd_rects(dx: f64, dy: f64, w1: f64, t1: f64, w2: f64, t2: f64) -> f64 {
    let lx = dx.abs() + (w1 + w2) / 2.0;
    let ly = dy.abs() + (t1 + t2) / 2.0;
    let l = lx.max(ly);
    if l.powi(4) > 1e8 * w1 * w2 * t1 * t2 || w1 * w2 * t1 * t2 <= 0.0 {
        return gmd_rects_numeric(dx, dy, w1, t1, w2, t2);
    }
    // In units of `l` (exact: the scale only adds ln l).
    let (dx, dy, w1, t1, w2, t2) = (dx / l, dy / l, w1 / l, t1 / l, w2 / l, t2 / l);
    // One logarithm and one arctangent per corner: for x, y != 0,
    // atan(x/y) = sgn(xy) pi/2 - atan(y/x).
    let f = |x: f64, y: f64| {
        let (x2, y2) = (x * x, y * y);
        let r2 = x2 + y2;
        let mut v = -25.0 / 48.0 * x2 * y2;
        if r2 > 0.0 {
            v += (6.0 * x2 * y2 - x2 * x2 - y2 * y2) * r2.ln() / 48.0;
        }
        if x != 0.0 && y != 0.0 {
            v += ((x2 - y2) * x * y * (y / x).atan() + (x * y).abs() * y2 * FRAC_PI_2) / 6.0;
        }
        v
    };
    // Corner differences along one axis and their signs: for intervals
    // [a1, a2] and [b1, b2], int int g(u - v) = G(a2 - b1) + G(a1 - b2)
    // - G(a2 - b2) - G(a1 - b1) with G'' = g; equal differences (equal
    // sizes) merged, so two equal sections need 9 corners, not 16.
    let corners = |d: f64, a: f64, b: f64| {
        let (a1, a2, b1, b2) = (-a / 2.0, a / 2.0, d - b / 2.0, d + b / 2.0);
        let mut c = [(0.0, 0.0); 4];
        let mut n = 0;
        for (v, w) in [
            (a2 - b1, 1.0),
            (a1 - b2, 1.0),
            (a2 - b2, -1.0),
            (a1 - b1, -1.0),
        ] {
            match c[..n].iter_mut().find(|(u, _)| *u == v) {
                Some(e) => e.1 += w,
                None => {
                    c[n] = (v, w);
                    n += 1;
                }
            }
        }
        (c, n)
    };
    let ((cx, nx), (cy, ny)) = (corners(dx, w1, w2), corners(dy, t1, t2));
    let mut sum = 0.0;
    for &(x, sx) in &cx[..nx] {
        for &(y, sy) in &cy[..ny] {
            sum += sx * sy * f(x, y);
        }
    }
    (sum / (w1 * w2 * t1 * t2)).exp() * l
}

/// [`gmd_rects`] by numerical integration: the four-fold integral is
/// reduced to two dimensions with the (trapezoidal) distributions of the
/// coordinate differences and integrated by 16-point Gauss-Legendre on
/// panels split at every kink and at zero, so it also holds for
/// overlapping rectangles (for one rectangle with itself it gives the
/// exact GMD, which Grover approximates by 0.2235 (b + c)).
pub fn gmd_rects_numeric(dx: f64, dy: f64, w1: f64, t1: f64, w2: f64, t2: f64) -> f64 {
    let px = Trapezoid::new(dx, w1, w2);
    let py = Trapezoid::new(dy, t1, t2);
    let (gx, gw) = rule(16);
    let mut acc = 0.0;
    // Extra breakpoints graded geometrically towards zero resolve the
    // logarithmic singularity when one dimension is much smaller than the
    // other (thin strips).
    let bx = graded(px.breaks(), (t1 + t2) / 2.0);
    let by = graded(py.breaks(), (w1 + w2) / 2.0);
    for xs in bx.windows(2) {
        let (hx, cx) = ((xs[1] - xs[0]) / 2.0, (xs[1] + xs[0]) / 2.0);
        if hx <= 0.0 {
            continue;
        }
        for ys in by.windows(2) {
            let (hy, cy) = ((ys[1] - ys[0]) / 2.0, (ys[1] + ys[0]) / 2.0);
            if hy <= 0.0 {
                continue;
            }
            for (xi, wi) in gx.iter().zip(gw) {
                let x = cx + hx * xi;
                let fx = px.density(x) * wi * hx;
                if fx == 0.0 {
                    continue;
                }
                for (yj, wj) in gx.iter().zip(gw) {
                    let y = cy + hy * yj;
                    let r2 = x * x + y * y;
                    if r2 > 0.0 {
                        acc += fx * py.density(y) * wj * hy * 0.5 * r2.ln();
                    }
                }
            }
        }
    }
    acc.exp()
}

/// Adds breakpoints at +-s, +-2s, +-4s, ... (inside the range) when zero
/// lies within the range.
fn graded(mut b: Vec<f64>, s: f64) -> Vec<f64> {
    let (lo, hi) = (b[0], b[b.len() - 1]);
    if lo < 0.0 && hi > 0.0 && s > 0.0 {
        let mut h = s;
        while h < hi.max(-lo) {
            for x in [-h, h] {
                if x > lo && x < hi {
                    b.push(x);
                }
            }
            h *= 2.0;
        }
        b.sort_by(f64::total_cmp);
    }
    b
}

/// Density of the difference of two uniform variables on intervals of
/// widths `a` and `b` whose centres are `c` apart.
struct Trapezoid {
    c: f64,
    a: f64,
    b: f64,
}

impl Trapezoid {
    fn new(c: f64, a: f64, b: f64) -> Self {
        Trapezoid { c, a, b }
    }

    fn breaks(&self) -> Vec<f64> {
        let h = (self.a + self.b) / 2.0;
        let k = (self.a - self.b).abs() / 2.0;
        let mut v = vec![self.c - h, self.c - k, self.c + k, self.c + h];
        if v[0] < 0.0 && v[3] > 0.0 {
            v.push(0.0);
        }
        v.sort_by(f64::total_cmp);
        v.dedup_by(|x, y| (*x - *y).abs() < 1e-18);
        v
    }

    fn density(&self, x: f64) -> f64 {
        let u = (x - self.c).abs();
        let h = (self.a + self.b) / 2.0;
        let k = (self.a - self.b).abs() / 2.0;
        let top = self.a.min(self.b) / (self.a * self.b);
        if u >= h {
            0.0
        } else if u <= k {
            top
        } else {
            top * (h - u) / (h - k)
        }
    }
}

thread_local! {
    /// Cache of [`cached_gmd`], one per thread (no lock shared between a
    /// sweep's workers).
    static GMD: std::cell::RefCell<GmdMap> = std::cell::RefCell::new(GmdMap::default());
}

/// The cache's map: keys are six integers made by the program itself, so a
/// plain multiply-rotate hash (as in rustc's "FxHash") with a finaliser is
/// enough and much cheaper than the default DoS-resistant SipHash.
type GmdMap = HashMap<[i64; 6], f64, std::hash::BuildHasherDefault<KeyHasher>>;

/// Multiply-rotate hasher for [`GmdMap`].
#[derive(Default)]
struct KeyHasher(u64);

impl std::hash::Hasher for KeyHasher {
    fn finish(&self) -> u64 {
        // MurmurHash3's 64-bit finaliser: the keys are multiples of round
        // picometre values, so their low bits repeat and the multiply alone
        // leaves the table's bucket bits clustered.
        let mut h = self.0;
        h ^= h >> 33;
        h = h.wrapping_mul(0xff51_afd7_ed55_8ccd);
        h ^= h >> 33;
        h = h.wrapping_mul(0xc4ce_b9fe_1a85_ec53);
        h ^ (h >> 33)
    }
    fn write(&mut self, bytes: &[u8]) {
        for chunk in bytes.chunks(8) {
            let mut b = [0u8; 8];
            b[..chunk.len()].copy_from_slice(chunk);
            self.write_u64(u64::from_le_bytes(b));
        }
    }
    fn write_u64(&mut self, v: u64) {
        self.0 = (self.0.rotate_left(5) ^ v).wrapping_mul(0x51_7c_c1_b7_27_22_0a_95);
    }
    fn write_i64(&mut self, v: i64) {
        self.write_u64(v as u64);
    }
}

/// Most entries kept before the cache starts over: small enough to stay
/// in the processor's cache (a sweep keeps adding the offsets of its
/// candidates' partial turns, and a table of 200,000 entries cost more in
/// memory traffic than the closed form it saved), large enough for every
/// close pair of one coil.
const GMD_CACHE_MAX: usize = 8192;

/// [`gmd_rects`] (or Grover's self value for one section with itself) with
/// offsets and sizes rounded to picometres, cached: one cache per thread
/// serves every analysis that thread runs (a sweep meets the same sections
/// and offsets in many candidates); values are computed from the rounded
/// key alone, so results do not depend on what was cached before or on
/// the thread.
pub(crate) fn cached_gmd(dx: f64, dy: f64, w1: f64, t1: f64, w2: f64, t2: f64) -> f64 {
    let q = |v: f64| (v * 1e12).round() as i64;
    // Symmetric in the sign of the offsets.
    let key = [q(dx.abs()), q(dy.abs()), q(w1), q(t1), q(w2), q(t2)];
    if let Some(v) = GMD.with(|m| m.borrow().get(&key).copied()) {
        return v;
    }
    // Computed from the key itself, so the value never depends on which
    // of several nearly equal pairs (or threads) got here first.
    let k = |i: usize| key[i] as f64 * 1e-12;
    let v = if key[0] == 0 && key[1] == 0 && key[2] == key[4] && key[3] == key[5] {
        gmd_rect_self(k(2), k(3))
    } else {
        gmd_rects(k(0), k(1), k(2), k(3), k(4), k(5))
    };
    GMD.with(|m| {
        let mut m = m.borrow_mut();
        if m.len() >= GMD_CACHE_MAX {
            m.clear();
        }
        m.insert(key, v);
    });
    v
}

/// Largest ratio of the sections' reach to the centre distance at which
/// [`GmdSeries`] is used; the terms then fall at least as fast as
/// `0.6^n / n`.
const SERIES_RHO_MAX: f64 = 0.6;

/// Highest power kept in [`GmdSeries`] (enough for 1e-15 at
/// [`SERIES_RHO_MAX`] even with the bound's worst case).
const SERIES_N_MAX: usize = 80;

/// The GMD of two rectangular sections whose centres are apart, as a
/// moment (multipole) expansion, for one pair of section sizes.
///
/// With `d = dx + i dy` the offset of the centres and `u` the difference of
/// a point of one section and a point of the other, `ln |d + u| = ln |d| +
/// Re sum_n (-1)^(n+1) (u/d)^n / n` whenever `|u| < |d|`. Averaged over
/// both areas the odd terms vanish (both sections are symmetric), so
/// `ln g = ln |d| - sum_(n even) mu_n Re(d^-n) / n` with the moments
/// `mu_n = E[u^n]` of the difference, which are real and depend on the
/// sizes only: they are computed once, from the moments of the uniform
/// distributions of the two widths and the two thicknesses. The terms are
/// summed until a bound on the rest (from the absolute moments
/// `E[|u|^n]`, which grow by at most `reach^2` per step) is below 1e-16.
/// Checked against the numerical integral to 2e-13.
pub struct GmdSeries {
    /// Half-diagonal of the sum of the two sections: the largest `|u|`, m.
    reach: f64,
    /// `mu_n / reach^n` for `n = 2, 4, ...` (index `n / 2 - 1`).
    moments: Vec<f64>,
    /// `E[|u|^n] / reach^n`, the same way.
    absolute: Vec<f64>,
}

impl GmdSeries {
    /// The series for sections `w1` x `t1` and `w2` x `t2`, metres.
    pub fn new(w1: f64, t1: f64, w2: f64, t2: f64) -> Self {
        let reach = ((w1 + w2) / 2.0).hypot((t1 + t2) / 2.0);
        // Even moments E[v^j] of a uniform variable on [-a/2, a/2], in
        // units of `reach`: (a / 2)^j / (j + 1).
        let uniform = |a: f64| -> Vec<f64> {
            let h = a / 2.0 / reach;
            (0..=SERIES_N_MAX)
                .map(|j| {
                    if j % 2 == 0 {
                        h.powi(j as i32) / (j + 1) as f64
                    } else {
                        0.0
                    }
                })
                .collect()
        };
        let binomial = binomials();
        // Moments of the difference of two independent uniform variables.
        let difference = |a: &[f64], b: &[f64]| -> Vec<f64> {
            (0..=SERIES_N_MAX)
                .map(|k| {
                    (0..=k)
                        .step_by(2)
                        .map(|j| binomial[k][j] * a[j] * b[k - j])
                        .sum()
                })
                .collect()
        };
        let x = difference(&uniform(w1), &uniform(w2));
        let y = difference(&uniform(t1), &uniform(t2));
        let (mut moments, mut absolute) = (Vec::new(), Vec::new());
        for n in (2..=SERIES_N_MAX).step_by(2) {
            // E[(x + i y)^n]: only even powers of both survive, and
            // i^(n - k) = (-1)^((n - k) / 2).
            let (mut m, mut a) = (0.0, 0.0);
            for k in (0..=n).step_by(2) {
                let term = x[k] * y[n - k];
                m += binomial[n][k] * term * if (n - k) % 4 == 0 { 1.0 } else { -1.0 };
                // E[(x^2 + y^2)^(n/2)].
                a += binomial[n / 2][k / 2] * term;
            }
            moments.push(m);
            absolute.push(a);
        }
        GmdSeries {
            reach,
            moments,
            absolute,
        }
    }

    /// [`GmdSeries::new`] from a small per-thread cache (a coil has one or
    /// two sections, and a sweep's candidates share them; making the
    /// tables costs as much as a few hundred pairs).
    pub fn cached(w1: f64, t1: f64, w2: f64, t2: f64) -> std::sync::Arc<GmdSeries> {
        thread_local! {
            static SERIES: std::cell::RefCell<Vec<([u64; 4], std::sync::Arc<GmdSeries>)>> =
                const { std::cell::RefCell::new(Vec::new()) };
        }
        let key = [w1.to_bits(), t1.to_bits(), w2.to_bits(), t2.to_bits()];
        SERIES.with(|c| {
            let mut c = c.borrow_mut();
            if let Some((_, s)) = c.iter().find(|(k, _)| *k == key) {
                return s.clone();
            }
            let s = std::sync::Arc::new(GmdSeries::new(w1, t1, w2, t2));
            // A handful of entries: the most recent first.
            c.insert(0, (key, s.clone()));
            c.truncate(16);
            s
        })
    }

    /// `ln(g / D)` for centres `dx`, `dy` apart (`D` their distance), or
    /// `None` when the sections are too close for the series (the reach is
    /// more than 0.6 `D`).
    pub fn ln_ratio(&self, dx: f64, dy: f64) -> Option<f64> {
        let d2 = dx * dx + dy * dy;
        let rho2 = self.reach * self.reach / d2;
        // (Also declines coincident centres, where rho2 is infinite or NaN.)
        if rho2.is_nan() || rho2 > SERIES_RHO_MAX * SERIES_RHO_MAX {
            return None;
        }
        // z = reach / d, z^2 and its powers.
        let (zr, zi) = (self.reach * dx / d2, -self.reach * dy / d2);
        let (sr, si) = (zr * zr - zi * zi, 2.0 * zr * zi);
        let (mut pr, mut pi) = (sr, si);
        let mut rho_n = rho2; // |z|^n
        let mut sum = 0.0;
        for (i, (m, a)) in self.moments.iter().zip(&self.absolute).enumerate() {
            let n = (2 * i + 2) as f64;
            sum -= m * pr / n;
            // The rest: sum over later n of E|u|^n / (n D^n) <= the next
            // absolute term / (1 - rho^2).
            let next = self.absolute.get(i + 1).copied().unwrap_or(*a);
            if next * rho_n * rho2 / ((n + 2.0) * (1.0 - rho2)) < 1e-16 {
                return Some(sum);
            }
            (pr, pi) = (pr * sr - pi * si, pr * si + pi * sr);
            rho_n *= rho2;
        }
        None
    }
}

/// Binomial coefficients `C(n, k)` for `n <= SERIES_N_MAX` (Pascal's
/// triangle), made once.
fn binomials() -> &'static [Vec<f64>] {
    static ROWS: std::sync::OnceLock<Vec<Vec<f64>>> = std::sync::OnceLock::new();
    ROWS.get_or_init(|| {
        let mut rows: Vec<Vec<f64>> = vec![vec![1.0]];
        for n in 1..=SERIES_N_MAX {
            let prev = &rows[n - 1];
            let row = (0..=n)
                .map(|k| {
                    let left = if k > 0 { prev[k - 1] } else { 0.0 };
                    left + prev.get(k).copied().unwrap_or(0.0)
                })
                .collect();
            rows.push(row);
        }
        rows
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Sections of real coils (35 um copper, 0.1-1 mm tracks) and a
    /// square, metres: (w1, t1, w2, t2).
    const SECTIONS: [(f64, f64, f64, f64); 4] = [
        (0.15e-3, 35e-6, 0.15e-3, 35e-6),
        (0.1e-3, 18e-6, 0.25e-3, 35e-6),
        (1e-3, 70e-6, 0.2e-3, 12e-6),
        (1.0, 1.0, 1.0, 1.0),
    ];

    #[test]
    fn gmd_closed_form_matches_the_integral() {
        // Sections and offsets of real coils (35 um copper, 0.1-1 mm
        // tracks, overlapping, touching, side by side, stacked, diagonal)
        // and a square: closed form against the numerical integral.
        let mut n = 0;
        for (w1, t1, w2, t2) in SECTIONS {
            let s = w1.max(t1).max(w2).max(t2);
            for (fx, fy) in [
                (0.0, 0.0),
                (0.3, 0.0),
                (1.0, 0.0),
                (1.7, 0.1),
                (0.0, 0.8),
                (2.5, 1.5),
                (5.5, 0.4),
            ] {
                let (dx, dy) = (fx * s, fy * s);
                let a = gmd_rects(dx, dy, w1, t1, w2, t2);
                let b = gmd_rects_numeric(dx, dy, w1, t1, w2, t2);
                // (The numerical integral is good to about 1e-4 where the
                // sections overlap; the closed form matches scipy, below.)
                assert!(
                    (a / b - 1.0).abs() < 1e-4,
                    "{w1} {t1} {w2} {t2} at {dx} {dy}: {a} vs {b}"
                );
                n += 1;
            }
        }
        assert_eq!(n, 28);
        // scipy.integrate.dblquad (PyPI, epsrel 1e-13) on the same mean of
        // ln r over the difference distributions: a 0.15 mm x 35 um track
        // from itself, and the unit square (Maxwell's 0.44705).
        let g = gmd_rects(0.0, 0.0, 0.15e-3, 35e-6, 0.15e-3, 35e-6);
        assert!((g / 4.138238517378898e-05 - 1.0).abs() < 1e-12, "{g}");
        let g = gmd_rects(0.0, 0.0, 1.0, 1.0, 1.0, 1.0);
        assert!((g / 0.4470491559036626 - 1.0).abs() < 1e-12, "{g}");
    }

    #[test]
    fn gmd_known_values() {
        // GMD of a square of side a from itself: 0.44705 a (Maxwell; Grover 1946, Table).
        let g = gmd_rects(0.0, 0.0, 1.0, 1.0, 1.0, 1.0);
        assert!((g - 0.44705).abs() < 2e-4, "{g}");
        // Thin strip of width w from itself: w exp(-3/2) (Maxwell; Grover 1946).
        let g = gmd_rects(0.0, 0.0, 1.0, 1e-6, 1.0, 1e-6);
        assert!((g - (-1.5f64).exp()).abs() < 5e-4, "{g}");
        // Far apart the GMD tends to the centre distance.
        let g = gmd_rects(10.0, 3.0, 1.0, 0.2, 0.5, 0.3);
        assert!((g / 109f64.sqrt() - 1.0).abs() < 1e-3, "{g}");
        // Grover's 0.2235 (b + c) for 0.2 mm x 35 um (flat): within 0.5 %.
        let g = gmd_rects(0.0, 0.0, 0.2, 0.035, 0.2, 0.035);
        assert!((g / gmd_rect_self(0.2, 0.035) - 1.0).abs() < 5e-3, "{g}");
    }

    #[test]
    fn series_matches_the_closed_form() {
        // The moment expansion against both other forms (the closed form
        // is checked against scipy above) for the sections of real coils,
        // from the series' limit (reach = 0.6 D) outwards, in every
        // direction.
        let mut used = 0;
        // (And a square track beside a flat one.)
        for (w1, t1, w2, t2) in SECTIONS
            .into_iter()
            .chain([(0.3e-3, 0.3e-3, 0.1e-3, 35e-6)])
        {
            let s = GmdSeries::new(w1, t1, w2, t2);
            for (f, a) in [1.0 / 0.599, 1.7, 1.9, 2.3, 3.0, 4.5, 8.0, 30.0]
                .into_iter()
                .flat_map(|f| (0..50).map(move |a| (f, a)))
            {
                let dist = s.reach * f;
                let angle = f64::from(a) * 0.1257;
                let (dx, dy) = (dist * angle.cos(), dist * angle.sin());
                let ln = s.ln_ratio(dx, dy).expect("inside the series' range");
                let exact = gmd_rects(dx, dy, w1, t1, w2, t2) / dist;
                let num = gmd_rects_numeric(dx, dy, w1, t1, w2, t2) / dist;
                // The Gauss-Legendre integral is accurate to about 1e-14
                // for sections apart (a smooth integrand); the closed
                // form's signed sum loses up to 1e-9 there, and more
                // farther out.
                let g = ln.exp();
                assert!(
                    (g / num - 1.0).abs() < 2e-13,
                    "{w1} {t1} {w2} {t2} at {dx} {dy}: {g} vs {num}"
                );
                if f <= 8.0 {
                    assert!((g / exact - 1.0).abs() < 1e-9, "{g} vs {exact}");
                }
                used += 1;
            }
            // Closer than its range it declines.
            assert!(s.ln_ratio(s.reach * 1.5, 0.0).is_none());
        }
        assert_eq!(used, 2000);
    }
}
