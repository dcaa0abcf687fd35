//! How one conductor cross-section responds to frequency: the skin effect
//! of its own current and the eddy (proximity) loss in a uniform field
//! from outside, from the 2-D current-diffusion equation solved by
//! partial-element subdivision (the section cut into rectangular cells,
//! each a uniform current; resistance `rho / area` and per-length partial
//! inductance `-(mu0 / 2 pi) ln g` with `g` the exact geometric mean
//! distance between the cells ([`super::gmd::gmd_rects`]); the method of
//! Weeks et al., "Resistive and inductive skin effect in rectangular
//! conductors", IBM J. Res. Dev. 23, 1979).
//!
//! In units of the thickness the answer depends only on the aspect ratio
//! `w / t` and on `x = t / delta` (`delta = sqrt(2 rho / (omega mu0))` the
//! skin depth), so a [`SectionTable`] is computed once per aspect ratio on
//! a grid of `x` (cached for the process) and interpolated:
//!
//! * `skin(x)`: `R_ac / R_dc` of the section carrying its own current;
//! * `across(x)`, `along(x)`: eddy loss per length in a uniform field
//!   `H` (A/m, RMS) across the thickness (perpendicular to the wide face)
//!   and along the width, as `P' = rho H^2 phi(x)` (W/m; `phi` has no
//!   unit).
//!
//! The three problems have different symmetry (even/even, odd across the
//! width, odd across the thickness), so each is solved on one quarter of
//! the section with its images: 8 x 12 cells per quarter, graded towards
//! the surfaces (smallest cell 1/100 of the thickness). Tolerance: within
//! 2 % of a finite-element solution for `x` up to 10 and aspect 1 to 10
//! (tests/suite/ac.rs with scikit-fem), the low-frequency limits within
//! 1 % (each cell carries a uniform current); beyond `x = 24` extrapolated with the square-root-of-frequency law
//! (`R` and `phi` proportional to `x`), below `x = 0.2` with the `x^4` law
//! of the first correction.

use super::gmd::gmd_rects;
use std::collections::HashMap;
use std::sync::{Arc, Mutex, OnceLock};

/// A complex number (re, im): just what the elimination needs.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub(crate) struct C64 {
    pub re: f64,
    pub im: f64,
}

impl C64 {
    pub(crate) const fn new(re: f64, im: f64) -> C64 {
        C64 { re, im }
    }
    fn mul(self, o: C64) -> C64 {
        C64::new(
            self.re * o.re - self.im * o.im,
            self.re * o.im + self.im * o.re,
        )
    }
    fn div(self, o: C64) -> C64 {
        let d = o.re * o.re + o.im * o.im;
        C64::new(
            (self.re * o.re + self.im * o.im) / d,
            (self.im * o.re - self.re * o.im) / d,
        )
    }
    fn sub(self, o: C64) -> C64 {
        C64::new(self.re - o.re, self.im - o.im)
    }
    fn norm2(self) -> f64 {
        self.re * self.re + self.im * self.im
    }
}

/// Solves `a x = b` in place by Gaussian elimination with partial
/// pivoting (`a` is `n x n`, row-major); `None` when singular.
pub(crate) fn solve_complex(
    mut a: Vec<C64>,
    mut b: Vec<Vec<C64>>,
    n: usize,
) -> Option<Vec<Vec<C64>>> {
    for k in 0..n {
        let p = (k..n).max_by(|&i, &j| a[i * n + k].norm2().total_cmp(&a[j * n + k].norm2()))?;
        if a[p * n + k].norm2() == 0.0 {
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
            let f = a[i * n + k].div(piv);
            if f.norm2() == 0.0 {
                continue;
            }
            for j in k + 1..n {
                let t = f.mul(a[k * n + j]);
                a[i * n + j] = a[i * n + j].sub(t);
            }
            for v in b.iter_mut() {
                let t = f.mul(v[k]);
                v[i] = v[i].sub(t);
            }
        }
    }
    for v in b.iter_mut() {
        for k in (0..n).rev() {
            let mut s = v[k];
            for j in k + 1..n {
                s = s.sub(a[k * n + j].mul(v[j]));
            }
            v[k] = s.div(a[k * n + k]);
        }
    }
    Some(b)
}

/// One rectangular cell of a section: centre and size (units of the
/// thickness).
#[derive(Debug, Clone, Copy)]
struct Cell {
    x: f64,
    y: f64,
    w: f64,
    t: f64,
}

/// Cell edges from the centre (0) to the surface (`half`), `n` cells,
/// graded towards the surface: `half sin(pi/2 i/n)`.
fn edges(half: f64, n: usize) -> Vec<f64> {
    (0..=n)
        .map(|i| half * (std::f64::consts::FRAC_PI_2 * i as f64 / n as f64).sin())
        .collect()
}

/// Cells across half the width and half the thickness.
const CELLS_W: usize = 12;
const CELLS_T: usize = 8;

/// The grid of `x = t / delta` of a table: log-spaced.
const X_LO: f64 = 0.2;
const X_HI: f64 = 24.0;
const X_POINTS: usize = 22;

/// Where the section counts as at DC for its inductance (the drop goes
/// with `x^4`: 1e-12 of the internal inductance here).
const X_DC: f64 = 1e-3;

/// The frequency response of one section shape (aspect ratio `w / t`).
#[derive(Debug, Clone, PartialEq)]
pub struct SectionTable {
    /// Width over thickness.
    pub aspect: f64,
    /// `ln x` at the grid points.
    ln_x: Vec<f64>,
    /// `ln(R_ac / R_dc - 1)` (skin), at the grid points.
    ln_skin: Vec<f64>,
    /// `ln phi` for a field across the thickness.
    ln_across: Vec<f64>,
    /// `ln phi` for a field along the width.
    ln_along: Vec<f64>,
    /// `ln` of the internal inductance's drop from DC, per length over
    /// `mu0` ([`SectionTable::inductance_drop`]).
    ln_drop: Vec<f64>,
}

/// Interpolates `ln y` against `ln x` linearly; below the grid with slope
/// 4 (the first correction goes with `omega^2`), above it with slope 1 on
/// `y + extra` where `extra` is 1 for the skin ratio and 0 for the eddy
/// loss (the square-root law `R proportional to x`).
fn interp(ln_x: &[f64], ln_y: &[f64], x: f64, extra: f64) -> f64 {
    let n = ln_x.len();
    let lx = x.max(1e-300).ln();
    if lx <= ln_x[0] {
        return (ln_y[0] + 4.0 * (lx - ln_x[0])).exp();
    }
    if lx >= ln_x[n - 1] {
        let top = ln_y[n - 1].exp() + extra;
        return top * (lx - ln_x[n - 1]).exp() - extra;
    }
    let h = (ln_x[n - 1] - ln_x[0]) / (n - 1) as f64;
    let i = (((lx - ln_x[0]) / h).floor() as usize).min(n - 2);
    let u = (lx - ln_x[i]) / h;
    // Cubic (Catmull-Rom) on the log-log values, one-sided at the ends.
    let p1 = ln_y[i];
    let p2 = ln_y[i + 1];
    let p0 = if i > 0 { ln_y[i - 1] } else { 2.0 * p1 - p2 };
    let p3 = if i + 2 < n {
        ln_y[i + 2]
    } else {
        2.0 * p2 - p1
    };
    let v = p1
        + 0.5
            * u
            * (p2 - p0
                + u * (2.0 * p0 - 5.0 * p1 + 4.0 * p2 - p3 + u * (3.0 * (p1 - p2) + p3 - p0)));
    v.exp()
}

impl SectionTable {
    /// `R_ac / R_dc` of the section carrying its own current at
    /// `x = t / delta`.
    pub fn skin(&self, x: f64) -> f64 {
        1.0 + interp(&self.ln_x, &self.ln_skin, x, 1.0)
    }

    /// Eddy loss per length over `rho H^2` in a uniform field across the
    /// thickness (perpendicular to the wide face).
    pub fn across(&self, x: f64) -> f64 {
        interp(&self.ln_x, &self.ln_across, x, 0.0)
    }

    /// Eddy loss per length over `rho H^2` in a uniform field along the
    /// width (parallel to the wide face).
    pub fn along(&self, x: f64) -> f64 {
        interp(&self.ln_x, &self.ln_along, x, 0.0)
    }

    /// How much the section's inductance per length has fallen from its DC
    /// value at `x = t / delta`, over `mu0` (no unit): the current leaves
    /// the middle of the section, so the flux inside the copper shrinks;
    /// at high frequency it tends to the whole internal inductance at DC.
    /// Above the table's grid `A - B / x` through its last two points
    /// (the internal inductance of the skin layer goes with `delta`),
    /// below it the `x^4` law.
    pub fn inductance_drop(&self, x: f64) -> f64 {
        let n = self.ln_x.len();
        let x_hi = self.ln_x[n - 1].exp();
        if x <= x_hi {
            return interp(&self.ln_x, &self.ln_drop, x, 0.0);
        }
        let (x_p, d_p, d_hi) = (
            self.ln_x[n - 2].exp(),
            self.ln_drop[n - 2].exp(),
            self.ln_drop[n - 1].exp(),
        );
        let b = (d_hi - d_p) / (1.0 / x_p - 1.0 / x_hi);
        d_hi + b * (1.0 / x_hi - 1.0 / x)
    }

    /// The table of a section `aspect = w / t`, computed once per aspect
    /// ratio in the process (a thread that asks for a table another one
    /// is computing waits for it instead of computing it again).
    pub fn cached(aspect: f64) -> Arc<SectionTable> {
        type Slot = Arc<OnceLock<Arc<SectionTable>>>;
        static CACHE: OnceLock<Mutex<HashMap<u64, Slot>>> = OnceLock::new();
        let key = aspect.to_bits();
        let cache = CACHE.get_or_init(|| Mutex::new(HashMap::new()));
        let slot: Slot = match cache.lock() {
            Ok(mut c) => c.entry(key).or_default().clone(),
            Err(_) => Slot::default(),
        };
        slot.get_or_init(|| Arc::new(SectionTable::new(aspect)))
            .clone()
    }

    /// Computes the table of a section `aspect = w / t` (about 30 ms).
    pub fn new(aspect: f64) -> SectionTable {
        let ln_x: Vec<f64> = (0..X_POINTS)
            .map(|i| X_LO.ln() + (X_HI / X_LO).ln() * i as f64 / (X_POINTS - 1) as f64)
            .collect();
        let q = Quarter::new(aspect);
        let mut ln_skin = Vec::with_capacity(X_POINTS);
        let mut ln_across = Vec::with_capacity(X_POINTS);
        let mut ln_along = Vec::with_capacity(X_POINTS);
        let mut ln_drop = Vec::with_capacity(X_POINTS);
        let l_dc = q.impedance(X_DC).1;
        for &lx in &ln_x {
            let x = lx.exp();
            let (s, l) = q.impedance(x);
            ln_skin.push((s - 1.0).max(1e-300).ln());
            ln_drop.push((l_dc - l).max(1e-300).ln());
            ln_across.push(q.eddy(x, Field::Across).max(1e-300).ln());
            ln_along.push(q.eddy(x, Field::Along).max(1e-300).ln());
        }
        SectionTable {
            aspect,
            ln_x,
            ln_skin,
            ln_across,
            ln_along,
            ln_drop,
        }
    }

    /// The solved values at one `x` without the table (for tests and the
    /// cross-checks): `(R_ac / R_dc, phi across, phi along)`.
    pub fn solve_at(aspect: f64, x: f64) -> (f64, f64, f64) {
        let q = Quarter::new(aspect);
        (q.skin(x), q.eddy(x, Field::Across), q.eddy(x, Field::Along))
    }

    /// The solved inductance per length over `mu0` at `x` (partial, to a
    /// distance of one thickness), and at DC (for tests).
    pub fn inductance_at(aspect: f64, x: f64) -> (f64, f64) {
        let q = Quarter::new(aspect);
        (q.impedance(x).1, q.impedance(X_DC).1)
    }
}

/// Direction of a uniform outside field.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Field {
    /// Across the thickness (perpendicular to the wide face).
    Across,
    /// Along the width.
    Along,
}

/// One quarter of a section (thickness 1, width `aspect`) with the partial
/// inductances of its cells to each image of every cell.
struct Quarter {
    cells: Vec<Cell>,
    /// `-ln g` to cell j, to its mirror in x, in y, in both: `[n*n; 4]`.
    ln: [Vec<f64>; 4],
    aspect: f64,
}

impl Quarter {
    fn new(aspect: f64) -> Quarter {
        let ex = edges(aspect / 2.0, CELLS_W);
        let ey = edges(0.5, CELLS_T);
        let mut cells = Vec::with_capacity(CELLS_W * CELLS_T);
        for i in 0..CELLS_W {
            for j in 0..CELLS_T {
                cells.push(Cell {
                    x: (ex[i] + ex[i + 1]) / 2.0,
                    y: (ey[j] + ey[j + 1]) / 2.0,
                    w: ex[i + 1] - ex[i],
                    t: ey[j + 1] - ey[j],
                });
            }
        }
        let n = cells.len();
        let mut ln: [Vec<f64>; 4] = std::array::from_fn(|_| vec![0.0; n * n]);
        for (a, ca) in cells.iter().enumerate() {
            for (b, cb) in cells.iter().enumerate() {
                for (k, (sx, sy)) in [(1.0, 1.0), (-1.0, 1.0), (1.0, -1.0), (-1.0, -1.0)]
                    .iter()
                    .enumerate()
                {
                    let g = gmd_rects(cb.x * sx - ca.x, cb.y * sy - ca.y, ca.w, ca.t, cb.w, cb.t);
                    ln[k][a * n + b] = -g.ln();
                }
            }
        }
        Quarter { cells, ln, aspect }
    }

    /// The impedance matrix of the quarter for image signs `(sx, sy)` at
    /// `x = t / delta` with `rho = 1`, `t = 1`: `omega mu0 = 2 x^2`.
    fn matrix(&self, x: f64, sx: f64, sy: f64) -> Vec<C64> {
        let n = self.cells.len();
        let wm = 2.0 * x * x / std::f64::consts::TAU;
        let mut a = vec![C64::default(); n * n];
        for i in 0..n {
            for j in 0..n {
                let l = self.ln[0][i * n + j]
                    + sx * self.ln[1][i * n + j]
                    + sy * self.ln[2][i * n + j]
                    + sx * sy * self.ln[3][i * n + j];
                a[i * n + j] = C64::new(0.0, wm * l);
            }
            let c = self.cells[i];
            a[i * n + i].re += 1.0 / (c.w * c.t);
        }
        a
    }

    /// Loss of the whole section from the quarter's cell currents.
    fn loss(&self, cur: &[C64]) -> f64 {
        4.0 * self
            .cells
            .iter()
            .zip(cur)
            .map(|(c, i)| i.norm2() / (c.w * c.t))
            .sum::<f64>()
    }

    /// `R_ac / R_dc`.
    fn skin(&self, x: f64) -> f64 {
        self.impedance(x).0
    }

    /// `R_ac / R_dc` and the inductance per length over `mu0` (partial, to
    /// a distance of one thickness, so only its change with `x` means
    /// something): the quarter carries a quarter of the current, every
    /// cell sees the same voltage per length (`Z y = 1`, scaled).
    fn impedance(&self, x: f64) -> (f64, f64) {
        let n = self.cells.len();
        let a = self.matrix(x, 1.0, 1.0);
        let Some(y) = solve_complex(a, vec![vec![C64::new(1.0, 0.0); n]], n) else {
            return (1.0, 0.0);
        };
        let y = &y[0];
        let total = y
            .iter()
            .fold(C64::default(), |s, v| C64::new(s.re + v.re, s.im + v.im));
        // Scale so that the quarter carries 1/4: currents y * (1/4) / total.
        let k = C64::new(0.25, 0.0).div(total);
        let cur: Vec<C64> = y.iter().map(|v| v.mul(k)).collect();
        let r_ac = self.loss(&cur);
        let r_dc = 1.0 / self.aspect;
        // The section's impedance per length is the voltage per length
        // for a unit current, `k`; omega mu0 = 2 x^2.
        (r_ac / r_dc, k.im / (2.0 * x * x))
    }

    /// Eddy loss per length over `rho H^2` in a unit field: the field's
    /// vector potential drives every cell, the net current is zero by
    /// symmetry.
    fn eddy(&self, x: f64, field: Field) -> f64 {
        let n = self.cells.len();
        let wmu = 2.0 * x * x;
        // A_z of a uniform field: B_y = mu0 H -> A = -mu0 H x; B_x -> A = mu0 H y.
        let (sx, sy, rhs): (f64, f64, Vec<C64>) = match field {
            Field::Across => (
                -1.0,
                1.0,
                self.cells
                    .iter()
                    .map(|c| C64::new(0.0, wmu * c.x))
                    .collect(),
            ),
            Field::Along => (
                1.0,
                -1.0,
                self.cells
                    .iter()
                    .map(|c| C64::new(0.0, -wmu * c.y))
                    .collect(),
            ),
        };
        let a = self.matrix(x, sx, sy);
        match solve_complex(a, vec![rhs], n) {
            Some(c) => self.loss(&c[0]),
            None => 0.0,
        }
    }
}

/// `R_ac / R_dc` of a plated via barrel (a tube of wall `t`): the wall as
/// a plate with the field on one side (Dowell's one-layer factor,
/// `x (sinh 2x + sin 2x) / (cosh 2x - cos 2x)`, `x = t / delta`; Dowell,
/// "Effects of eddy currents in transformer windings", Proc. IEE 113, 1966).
/// Exact for a thin wall; tends to 1 at low frequency.
pub fn tube_skin(x: f64) -> f64 {
    if x < 1e-3 {
        return 1.0;
    }
    if x > 20.0 {
        return x;
    }
    let y = 2.0 * x;
    x * (y.sinh() + y.sin()) / (y.cosh() - y.cos())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Low-frequency limits, from the eddy-current loss of a bar in a
    /// uniform field with the current free to close (Lammeraner & Stafl,
    /// Eddy Currents, 1966; the classic `P' = omega^2 B^2 w^3 t / (24 rho)`
    /// for the field across the thickness, recalled from memory): with
    /// `omega mu0 = 2 / x^2 * rho / t^2` this is `phi = x^4 a^3 / 6`, and
    /// along the width `x^4 a / 6` (`a = w / t`). The skin ratio tends to 1.
    #[test]
    fn low_frequency_limits() {
        let a = 3.0;
        let x = 0.05;
        let (skin, across, along) = SectionTable::solve_at(a, x);
        assert!((skin - 1.0).abs() < 1e-5, "{skin}");
        let want_across = x.powi(4) * a.powi(3) / 3.0;
        let want_along = x.powi(4) * a / 3.0;
        assert!(
            (across / want_across - 1.0).abs() < 5e-3,
            "{across} {want_across}"
        );
        assert!(
            (along / want_along - 1.0).abs() < 1e-2,
            "{along} {want_along}"
        );
    }

    /// High-frequency limit: the current flows within a skin depth of the
    /// surface, so `R_ac / R_dc` tends to `area / (perimeter delta)` =
    /// `x a / (2 (a + 1))` plus the corners' share (Wheeler's incremental
    /// inductance rule, Proc. IRE 30, 1942, for the surface resistance;
    /// corners and edges crowd the current, so the ratio sits above it).
    #[test]
    fn high_frequency_limit() {
        let a = 3.0;
        let x = 20.0;
        let (skin, _, _) = SectionTable::solve_at(a, x);
        let surface = x * a / (2.0 * (a + 1.0));
        assert!(skin > surface && skin < 1.35 * surface, "{skin} {surface}");
    }

    /// The table interpolates the solved values to 1 %.
    #[test]
    fn table_matches_solution() {
        let t = SectionTable::new(2.5);
        for x in [0.3, 1.3, 3.7, 9.0] {
            let (s, a, b) = SectionTable::solve_at(2.5, x);
            let got = (t.skin(x), t.across(x), t.along(x));
            let ok = (got.0 / s - 1.0).abs() < 1e-2
                && (got.1 / a - 1.0).abs() < 1e-2
                && (got.2 / b - 1.0).abs() < 1e-2;
            assert!(ok, "{x}: {got:?} {:?}", (s, a, b));
        }
    }

    /// Round wire against the exact Bessel-function solution
    /// (`R/R_dc = (q/2) (ber q bei' q - bei q ber' q) / (ber'^2 + bei'^2)`,
    /// `q = sqrt(2) a / delta`; e.g. Ramo, Whinnery & Van Duzer, Fields and
    /// Waves in Communication Electronics, internal impedance of a round
    /// wire, recalled from memory; ber/bei by their power series, Abramowitz
    /// & Stegun 9.9.10). The wire as concentric tubes (exact radial
    /// partial inductance `-(mu0/2pi) ln max(r_i, r_j)`) solved with the
    /// same elimination as the sections.
    #[test]
    fn round_wire_matches_bessel() {
        fn ber_bei(q: f64) -> (f64, f64, f64, f64) {
            // ber + j bei = sum (j q^2/4)^k / (k!)^2 ; derivatives termwise.
            let (mut br, mut bi, mut dr, mut di) = (0.0, 0.0, 0.0, 0.0);
            let mut term = 1.0f64; // (q^2/4)^k / (k!)^2
            for k in 0..80usize {
                if k > 0 {
                    term *= q * q / 4.0 / (k * k) as f64;
                }
                let d = if q > 0.0 {
                    term * 2.0 * k as f64 / q
                } else {
                    0.0
                };
                match k % 4 {
                    0 => {
                        br += term;
                        dr += d
                    }
                    1 => {
                        bi += term;
                        di += d
                    }
                    2 => {
                        br -= term;
                        dr -= d
                    }
                    _ => {
                        bi -= term;
                        di -= d
                    }
                }
            }
            (br, bi, dr, di)
        }
        let exact = |q: f64| {
            let (br, bi, dr, di) = ber_bei(q);
            q / 2.0 * (br * di - bi * dr) / (dr * dr + di * di)
        };
        // Radius 1, rho 1; tubes graded towards the surface.
        let n = 160;
        let r: Vec<f64> = (0..=n)
            .map(|i| (std::f64::consts::FRAC_PI_2 * i as f64 / n as f64).sin())
            .collect();
        for a_over_delta in [1.0, 2.0, 4.0, 8.0] {
            let wmu = 2.0 * a_over_delta * a_over_delta;
            let mut m = vec![C64::default(); n * n];
            for i in 0..n {
                for j in 0..n {
                    let ri = (r[i] + r[i + 1]) / 2.0;
                    let rj = (r[j] + r[j + 1]) / 2.0;
                    m[i * n + j] = C64::new(0.0, -wmu / std::f64::consts::TAU * ri.max(rj).ln());
                }
                let area = std::f64::consts::PI * (r[i + 1].powi(2) - r[i].powi(2));
                m[i * n + i].re += 1.0 / area;
            }
            let y = solve_complex(m, vec![vec![C64::new(1.0, 0.0); n]], n).expect("solves");
            let y = &y[0];
            let tot = y
                .iter()
                .fold(C64::default(), |s, v| C64::new(s.re + v.re, s.im + v.im));
            let k = C64::new(1.0, 0.0).div(tot);
            let loss: f64 = (0..n)
                .map(|i| {
                    let area = std::f64::consts::PI * (r[i + 1].powi(2) - r[i].powi(2));
                    y[i].mul(k).norm2() / area
                })
                .sum();
            let ours = loss * std::f64::consts::PI;
            let want = exact(std::f64::consts::SQRT_2 * a_over_delta);
            assert!(
                (ours / want - 1.0).abs() < 5e-3,
                "a/delta {a_over_delta}: {ours} {want}"
            );
            // The internal reactance over R_dc: (q/2) (ber ber' + bei
            // bei') / (ber'^2 + bei'^2) (same source); the tubes' mutual
            // `-ln max(r_i, r_j)` counts the flux inside the wire only, so
            // Im Z is the internal reactance. R_dc = 1 / pi.
            let (q, x_want) = {
                let q = std::f64::consts::SQRT_2 * a_over_delta;
                let (br, bi, dr, di) = ber_bei(q);
                (q, q / 2.0 * (br * dr + bi * di) / (dr * dr + di * di))
            };
            let x_ours = k.im * std::f64::consts::PI;
            assert!(
                (x_ours / x_want - 1.0).abs() < 5e-3,
                "a/delta {a_over_delta} (q {q}): {x_ours} {x_want}"
            );
            // DC limit: mu0 / (8 pi) per length (omega mu0 = 2 (a/delta)^2
            // here); at a/delta = 1 the internal inductance has hardly
            // started to fall (within 2 %), at 8 it is down to about
            // delta / a of it.
            let l_int = k.im / wmu;
            let dc = 1.0 / (8.0 * std::f64::consts::PI);
            if a_over_delta == 1.0 {
                assert!((l_int / dc - 1.0).abs() < 0.03, "{l_int} {dc}");
            }
            if a_over_delta == 8.0 {
                assert!(l_int < dc * 2.5 / a_over_delta, "{l_int} {dc}");
            }
        }
    }

    /// The via barrel's factor: 1 at low frequency, `x` at high.
    #[test]
    fn tube_limits() {
        assert!((tube_skin(0.05) - 1.0).abs() < 1e-4);
        assert!((tube_skin(15.0) / 15.0 - 1.0).abs() < 1e-6);
    }
}
