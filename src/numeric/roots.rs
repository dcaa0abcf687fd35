//! Root finding for monotonic functions: [`largest_feasible`] (Illinois
//! steps, for expensive functions such as "does this spiral fit") and
//! [`bisect`] (plain halving, for cheap ones).

/// The largest `x` in `[lo, hi)` with `f(x) <= 0` for a function that grows
/// with `x`, given `f(lo) <= 0 < f(hi)` (the brackets come with their
/// values: `(lo, f(lo))`, `(hi, f(hi))`).
///
/// Method: Illinois steps (regula falsi that halves the value kept at an
/// end twice in a row; Dowell & Jarratt, BIT 11, 1971), with a bisection
/// whenever three steps have not halved the bracket.
///
/// Tolerance: with `tol = 0`, until the bracket is `4 eps max(|lo|, |hi|)`
/// wide (a few units in the last place), returning its feasible end; with
/// `tol > 0`, also as soon as a step moves less than `tol`, returning that
/// step's point (then within about `tol` of the root, on either side). At
/// most 400 steps. An error of `f` stops the search and is returned.
pub fn largest_feasible<E>(
    mut f: impl FnMut(f64) -> Result<f64, E>,
    (mut lo, mut f_lo): (f64, f64),
    (mut hi, mut f_hi): (f64, f64),
    tol: f64,
) -> Result<f64, E> {
    let mut kept = 0i8; // +1: lo kept last time, -1: hi kept
    let mut width_before = hi - lo;
    let mut steps = 0;
    let mut last = f64::NAN;
    while f_lo != 0.0 && hi - lo > tol.max(4.0 * f64::EPSILON * hi.abs().max(lo.abs())) {
        steps += 1;
        let mut x = lo - f_lo * (hi - lo) / (f_hi - f_lo);
        if steps % 4 == 0 {
            if hi - lo > 0.5 * width_before {
                x = 0.5 * (lo + hi);
            }
            width_before = hi - lo;
        }
        if !(x > lo && x < hi) {
            x = 0.5 * (lo + hi);
            if !(x > lo && x < hi) {
                break;
            }
        }
        let fx = f(x)?;
        let small_step = tol > 0.0 && (x - last).abs() < tol;
        last = x;
        if fx <= 0.0 {
            (lo, f_lo) = (x, fx);
            if kept == -1 {
                f_hi /= 2.0;
            }
            kept = -1;
        } else {
            (hi, f_hi) = (x, fx);
            if kept == 1 {
                f_lo /= 2.0;
            }
            kept = 1;
        }
        if small_step {
            return Ok(x);
        }
        if steps > 400 {
            break;
        }
    }
    Ok(lo)
}

/// The point where `f` turns from positive to not positive in
/// `[lo, hi]`, given `f(lo) > 0 >= f(hi)`.
///
/// Method: bisection, keeping the half whose ends still straddle the sign
/// change. Tolerance: stops once the bracket is narrower than `tol` (or
/// after 200 halvings) and returns its midpoint, so the result is within
/// `tol / 2` of the sign change.
pub fn bisect(f: impl Fn(f64) -> f64, (mut lo, mut hi): (f64, f64), tol: f64) -> f64 {
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < tol {
            break;
        }
    }
    0.5 * (lo + hi)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn root_finder_converges_and_stays_feasible() {
        type R = Result<f64, ()>;
        // Smooth: x^3 = 2.
        let f = |x: f64| -> R { Ok(x * x * x - 2.0) };
        let exact = 2f64.cbrt();
        let x = largest_feasible(f, (0.0, -2.0), (2.0, 6.0), 0.0).unwrap();
        assert!(x <= exact && exact - x < 1e-14, "{x}");
        let x = largest_feasible(f, (0.0, -2.0), (2.0, 6.0), 1e-6).unwrap();
        assert!((x - exact).abs() < 1e-6, "{x}");
        // A step: regula falsi stalls, the bisection safeguard finishes.
        let step = |x: f64| -> R { Ok(if x < 0.3 { -1.0 } else { 1.0 }) };
        let x = largest_feasible(step, (0.0, -1.0), (1.0, 1.0), 0.0).unwrap();
        assert!(x < 0.3 && 0.3 - x < 1e-15, "{x}");
    }

    #[test]
    fn bisection_finds_the_sign_change() {
        // cos x turns negative at pi/2 (calculus).
        let x = bisect(f64::cos, (0.0, 3.0), 1e-12);
        assert!((x - std::f64::consts::FRAC_PI_2).abs() < 1e-12, "{x}");
    }
}
