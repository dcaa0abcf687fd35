//! Refinement: the best design usually lies between grid points, so after
//! the grid the best few candidates are the starts of a local search over
//! the continuous `--vary` keys (lengths and other quantities, plain
//! numbers such as turns; whole-number keys such as layers and sides stay
//! on the grid).
//!
//! The search is the Nelder-Mead simplex method (J. A. Nelder and R. Mead,
//! "A simplex method for function minimization", The Computer Journal
//! 7(4):308-313, 1965) with the usual coefficients: reflection 1,
//! expansion 2, contraction 1/2, shrink 1/2 (as analysed by J. C. Lagarias
//! et al., SIAM J. Optim. 9(1):112-147, 1998). It needs no derivatives,
//! which the pipeline does not give. Each key is scaled to `[0, 1]` over
//! the range the grid swept, and points outside it are projected onto it,
//! so a refined value stays within the swept range. A point that is not a
//! valid, rule-clean design meeting every requirement and the design's own
//! limits counts as infinitely bad, so the result honours all of them: it
//! goes through exactly the judge every grid candidate goes through.
//! Refined values are rounded to a power of ten near 1e-4 of the swept
//! range (0.0001 mm for sizes swept over 8 mm), well below the search's
//! tolerance.

use super::vary::{Kind, resolve_key, split_unit, value};
use super::{Candidate, Evaluation, Status, Sweep, set};
use rayon::prelude::*;

/// Grid candidates the refinement starts from (the best ones).
pub const STARTS: usize = 3;

/// Evaluations per start: at most `STARTS * EVALUATIONS` = 480 in all.
pub const EVALUATIONS: usize = 160;

/// Simplex size (in the unit cube) below which a search stops.
pub const TOLERANCE: f64 = 1e-4;

/// The result of [`nelder_mead`].
#[derive(Debug, Clone, PartialEq)]
pub struct Minimum {
    /// Best point found (in the unit cube).
    pub x: Vec<f64>,
    /// Its value.
    pub value: f64,
    /// Evaluations of the function.
    pub evaluations: usize,
}

/// Minimises `f` over the unit cube `[0, 1]^n` from `x0` with the
/// Nelder-Mead method (module notes): an initial simplex of `x0` and `x0`
/// moved by `step` along each axis (inwards where that leaves the cube), at
/// most `max_evaluations` evaluations of `f`. The simplex may leave the
/// cube: a point outside is valued at its projection onto the cube plus
/// its distance from it times `1 + |value|`, so it is always worse than its
/// projection and the simplex does not collapse onto a face. A search ends
/// when every vertex is within `tolerance` of the best (max norm) and their
/// values agree to 1e-12 (relative); it then restarts from the best point
/// with a fresh simplex (the usual remedy for a simplex that has
/// degenerated) until a restart improves nothing. `f` may return infinity
/// for points to avoid; the point returned is in the cube.
pub fn nelder_mead(
    mut f: impl FnMut(&[f64]) -> f64,
    x0: &[f64],
    step: f64,
    max_evaluations: usize,
    tolerance: f64,
) -> Minimum {
    let n = x0.len();
    let clamp = |x: &[f64]| -> Vec<f64> { x.iter().map(|v| v.clamp(0.0, 1.0)).collect() };
    let mut evaluations = 0;
    let mut g = |x: &[f64], evaluations: &mut usize| {
        *evaluations += 1;
        let inside = clamp(x);
        let v = f(&inside);
        let v = if v.is_nan() { f64::INFINITY } else { v };
        let out = x
            .iter()
            .zip(&inside)
            .map(|(a, b)| (a - b) * (a - b))
            .sum::<f64>()
            .sqrt();
        v + out * (1.0 + v.abs())
    };
    let mut best: (Vec<f64>, f64) = (clamp(x0), f64::INFINITY);
    loop {
        let start = best.0.clone();
        let before = best.1;
        let mut simplex: Vec<(Vec<f64>, f64)> = Vec::with_capacity(n + 1);
        let f0 = g(&start, &mut evaluations);
        simplex.push((start.clone(), f0));
        for k in 0..n {
            let mut x = start.clone();
            x[k] = if x[k] + step <= 1.0 {
                x[k] + step
            } else {
                x[k] - step
            };
            let fx = g(&x, &mut evaluations);
            simplex.push((x, fx));
        }
        simplex_search(
            &mut simplex,
            &mut g,
            &mut evaluations,
            max_evaluations,
            tolerance,
        );
        simplex.sort_by(|a, b| a.1.total_cmp(&b.1));
        if simplex[0].1 < best.1 {
            best = (clamp(&simplex[0].0), simplex[0].1);
        }
        let improved = best.1 < before - 1e-12 * (1.0 + before.abs());
        if !improved || evaluations + n + 1 > max_evaluations || n == 0 {
            break;
        }
    }
    Minimum {
        x: best.0,
        value: best.1,
        evaluations,
    }
}

/// The Nelder-Mead iterations on a simplex of `n + 1` valued points, until
/// `max_evaluations` or the simplex is smaller than `tolerance` and flat.
fn simplex_search(
    simplex: &mut [(Vec<f64>, f64)],
    g: &mut impl FnMut(&[f64], &mut usize) -> f64,
    evaluations: &mut usize,
    max_evaluations: usize,
    tolerance: f64,
) {
    let n = simplex.len() - 1;
    let along = |from: &[f64], to: &[f64], t: f64| -> Vec<f64> {
        from.iter().zip(to).map(|(a, b)| a + t * (b - a)).collect()
    };
    while *evaluations < max_evaluations && n > 0 {
        simplex.sort_by(|a, b| a.1.total_cmp(&b.1));
        let best = simplex[0].clone();
        let size = simplex
            .iter()
            .flat_map(|(x, _)| x.iter().zip(&best.0).map(|(a, b)| (a - b).abs()))
            .fold(0.0, f64::max);
        let worst = simplex[n].1;
        let flat = best.1.is_finite()
            && worst.is_finite()
            && (worst - best.1).abs() <= 1e-12 * (1.0 + best.1.abs());
        if size < tolerance && (flat || !best.1.is_finite()) {
            break;
        }
        // Centroid of all but the worst.
        let centroid: Vec<f64> = (0..n)
            .map(|k| simplex[..n].iter().map(|(x, _)| x[k]).sum::<f64>() / n as f64)
            .collect();
        let (xw, fw) = simplex[n].clone();
        let xr = along(&centroid, &xw, -1.0);
        let fr = g(&xr, evaluations);
        if fr < simplex[0].1 {
            let xe = along(&centroid, &xw, -2.0);
            let fe = g(&xe, evaluations);
            simplex[n] = if fe < fr { (xe, fe) } else { (xr, fr) };
            continue;
        }
        if fr < simplex[n - 1].1 {
            simplex[n] = (xr, fr);
            continue;
        }
        // Contract: outside when the reflection beats the worst, else inside.
        let xc = if fr < fw {
            along(&centroid, &xr, 0.5)
        } else {
            along(&centroid, &xw, 0.5)
        };
        let fc = g(&xc, evaluations);
        if fc < fr.min(fw) {
            simplex[n] = (xc, fc);
            continue;
        }
        // Shrink towards the best.
        let x0 = simplex[0].0.clone();
        for v in simplex.iter_mut().skip(1) {
            let x = along(&x0, &v.0, 0.5);
            let fx = g(&x, evaluations);
            *v = (x, fx);
        }
    }
}

/// A continuous `--vary` key: its position among the `--vary` arguments,
/// the range the grid swept (in the values' unit) and how values are
/// written.
#[derive(Debug, Clone, PartialEq)]
struct Axis {
    vary: usize,
    key: String,
    kind: Kind,
    lo: f64,
    hi: f64,
    unit: String,
}

/// The best refined design.
#[derive(Debug, Clone, PartialEq)]
pub struct Refinement {
    /// The grid candidate the best search started from.
    pub from: usize,
    /// The refined design table (the base with every varied key set).
    pub table: toml::Table,
    /// The refined candidate as the sweep judges it (parameters show the
    /// refined values).
    pub candidate: Candidate,
    /// The objective at the best grid point.
    pub grid_value: f64,
    /// The objective of the refined design.
    pub value: f64,
    /// Evaluations over all starts.
    pub evaluations: usize,
    /// The keys refined.
    pub keys: Vec<String>,
}

impl Sweep {
    /// The continuous `--vary` keys (module notes): not whole-number keys,
    /// every value a number in one unit, more than one value.
    fn axes(&self) -> Vec<Axis> {
        self.vary
            .iter()
            .enumerate()
            .filter_map(|(k, v)| {
                let (_, kind) = resolve_key(&v.key).ok()?;
                if kind == Kind::Integer {
                    return None;
                }
                let parsed: Vec<(f64, String)> = v
                    .values
                    .iter()
                    .map(|x| split_unit(&x.text))
                    .collect::<Option<_>>()?;
                let unit = parsed.first()?.1.clone();
                if parsed.iter().any(|p| p.1 != unit) {
                    return None;
                }
                let lo = parsed.iter().map(|p| p.0).fold(f64::INFINITY, f64::min);
                let hi = parsed.iter().map(|p| p.0).fold(f64::NEG_INFINITY, f64::max);
                (hi > lo).then(|| Axis {
                    vary: k,
                    key: v.key.clone(),
                    kind,
                    lo,
                    hi,
                    unit,
                })
            })
            .collect()
    }

    /// Refines the grid candidates `starts` (index and candidate as the
    /// sweep judged it, best first; each must meet every requirement) over the continuous keys with [`nelder_mead`],
    /// at most `evaluations` evaluations each, in parallel. `None` when
    /// there is no continuous key or no start. The result is the best
    /// design found, which is the best start itself when no search improved
    /// on it.
    pub fn refine(
        &self,
        starts: &[(usize, Candidate)],
        eval: impl Fn(&str) -> Evaluation + Sync,
        evaluations: usize,
    ) -> Option<Refinement> {
        let axes = self.axes();
        if axes.is_empty() || starts.is_empty() {
            return None;
        }
        let obj = &self.objective;
        let score = |c: &Candidate| -> f64 {
            let v = c.metrics.get(&obj.metric).copied().unwrap_or(f64::NAN);
            if c.status != Status::Ok || !v.is_finite() {
                f64::INFINITY
            } else if obj.maximize {
                -v
            } else {
                v
            }
        };
        // The design table and parameters of start `i` moved to `u`.
        let place = |i: usize, u: &[f64]| -> Option<(toml::Table, Vec<(String, String)>)> {
            let mut table = self.candidate_table(i);
            let mut params = self.params(i);
            for (a, &t) in axes.iter().zip(u) {
                // Rounded to a power of ten near 1e-4 of the range, far
                // below the search's tolerance: values a designer can read.
                let q = 10f64.powf(((a.hi - a.lo) * 1e-4).log10().floor());
                let x = ((a.lo + t * (a.hi - a.lo)) / q).round() * q;
                let v = value(&a.key, a.kind, x, &a.unit, "--refine").ok()?;
                set(&mut table, &a.key, v.toml.clone());
                params[a.vary].1 = v.text;
            }
            Some((table, params))
        };
        let grid_value = score(&starts[0].1);
        let runs: Vec<(f64, usize, toml::Table, Candidate, usize)> = starts
            .par_iter()
            .filter_map(|&(i, _)| {
                let choice = self.choice(i);
                let x0: Vec<f64> = axes
                    .iter()
                    .map(|a| {
                        let v = &self.vary[a.vary].values[choice[a.vary]];
                        let x = split_unit(&v.text).map_or(a.lo, |p| p.0);
                        (x - a.lo) / (a.hi - a.lo)
                    })
                    .collect();
                let mut best: Option<(f64, toml::Table, Candidate)> = None;
                let m = nelder_mead(
                    |u| {
                        let Some((table, params)) = place(i, u) else {
                            return f64::INFINITY;
                        };
                        let c = self.judge(&table, params, &eval);
                        let s = score(&c);
                        if best.as_ref().is_none_or(|b| s < b.0) {
                            best = Some((s, table, c));
                        }
                        s
                    },
                    &x0,
                    0.1,
                    evaluations,
                    TOLERANCE,
                );
                let (s, table, c) = best?;
                Some((s, i, table, c, m.evaluations))
            })
            .collect();
        let total: usize = runs.iter().map(|r| r.4).sum();
        let best = runs
            .into_iter()
            .filter(|r| r.0.is_finite())
            .min_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)))?;
        let unturn = |v: f64| if obj.maximize { -v } else { v };
        Some(Refinement {
            from: best.1,
            table: best.2,
            candidate: best.3,
            grid_value: unturn(grid_value),
            value: unturn(best.0),
            evaluations: total,
            keys: axes.iter().map(|a| a.key.clone()).collect(),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::super::{Objective, parse_vary};
    use super::*;
    use std::collections::BTreeMap;

    /// Rosenbrock's valley, scaled into the unit cube with its minimum at
    /// (0.6, 0.36) (H. H. Rosenbrock, The Computer Journal 3(3), 1960).
    #[test]
    fn finds_the_bottom_of_rosenbrocks_valley() {
        let f = |u: &[f64]| {
            let (x, y) = (u[0], u[1]);
            100.0 * (y - x * x).powi(2) + (0.6 - x).powi(2)
        };
        let m = nelder_mead(f, &[0.2, 0.8], 0.1, 500, 1e-7);
        assert!(
            (m.x[0] - 0.6).abs() < 1e-3 && (m.x[1] - 0.36).abs() < 1e-3,
            "{m:?}"
        );
        assert!(m.evaluations <= 500);
    }

    /// A quadratic bowl whose minimum lies outside the cube ends on the
    /// nearest face.
    #[test]
    fn stays_in_the_cube() {
        let m = nelder_mead(
            |u: &[f64]| (u[0] - 1.5).powi(2) + (u[1] - 0.25).powi(2),
            &[0.5, 0.5],
            0.1,
            400,
            1e-8,
        );
        assert!(
            (m.x[0] - 1.0).abs() < 1e-6 && (m.x[1] - 0.25).abs() < 1e-3,
            "{m:?}"
        );
    }

    const BASE: &str = "name = \"t\"\n[coil]\nouter_diameter = \"20mm\"\nturns = 8\n\
                        trace_width = \"0.1mm\"\nclearance = \"0.1mm\"\nlayers = 2\n";

    /// The number of a quantity written into a candidate's file.
    fn number(t: &toml::Table, key: &str) -> f64 {
        let v = &t["coil"][key];
        v.as_float()
            .or(v.as_integer().map(|i| i as f64))
            .or(v.as_str().and_then(split_unit).map(|p| p.0))
            .unwrap()
    }

    /// A synthetic objective through the same path a real sweep takes
    /// (candidate table, file text, evaluator, judge): the "force" peaks at
    /// a trace width of 0.137 mm and 11.3 turns, both between grid points,
    /// and a "temperature" requirement rules out widths below 0.12 mm.
    #[test]
    fn lands_on_a_known_optimum_between_grid_points() {
        let fake = |text: &str| {
            let t: toml::Table = text.parse().unwrap();
            let (w, n) = (number(&t, "trace_width"), number(&t, "turns"));
            let mut m = BTreeMap::new();
            m.insert(
                "force_n".to_string(),
                1.0 - (w - 0.137).powi(2) * 100.0 - (n - 11.3).powi(2) * 0.01,
            );
            m.insert(
                "temperature_c".to_string(),
                if w < 0.12 { 90.0 } else { 40.0 },
            );
            Evaluation::Metrics(m)
        };
        let known = vec!["force_n".to_string(), "temperature_c".to_string()];
        let s = Sweep::new(
            BASE,
            vec![
                parse_vary("layers=2,4").unwrap(),
                parse_vary("trace_width=0.1mm..0.2mm:0.05mm").unwrap(),
                parse_vary("turns=4..16:4").unwrap(),
            ],
            vec![super::super::Requirement::parse("temperature_c <= 60", &known).unwrap()],
            Objective {
                metric: "force_n".into(),
                maximize: true,
            },
            None,
            &known,
        )
        .unwrap();
        let summary = s.summarise(fake);
        let starts = &summary.top[..STARTS.min(summary.top.len())];
        let r = s.refine(starts, fake, EVALUATIONS).unwrap();
        assert_eq!(r.keys, ["coil.trace_width", "coil.turns"]);
        let (w, n) = (number(&r.table, "trace_width"), number(&r.table, "turns"));
        assert!((w - 0.137).abs() < 1e-3, "width {w}");
        assert!((n - 11.3).abs() < 2e-2, "turns {n}");
        assert!(r.value >= r.grid_value && r.value > 0.9999, "{r:?}");
        assert!(r.evaluations <= STARTS * EVALUATIONS);
        assert_eq!(r.candidate.status, Status::Ok);
        // Layers stay on the grid.
        assert!(r.table["coil"]["layers"].as_integer().is_some());
    }
}
