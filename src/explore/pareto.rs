//! The Pareto front of two metrics (drawn by [`crate::export::plot::tradeoff`]).

/// A metric rounded to 12 significant digits: values that differ only by
/// floating-point noise (an outer diameter of 20 mm computed as
/// 19.999999999999996 mm) count as equal for dominance and sit on one
/// spot in the plot.
pub fn settle(v: f64) -> f64 {
    if v == 0.0 || !v.is_finite() {
        return v;
    }
    let e = 10f64.powi(11 - v.abs().log10().floor() as i32);
    if !e.is_finite() || e == 0.0 {
        return v;
    }
    (v * e).round() / e
}

/// Indices of the points not dominated by any other, for the senses given
/// (`true` = larger is better), values compared after [`settle`]. Sorted
/// by x.
pub fn front(points: &[(f64, f64)], x_max: bool, y_max: bool) -> Vec<usize> {
    // Turn both into "smaller is better".
    let key = |i: usize| {
        let (x, y) = (settle(points[i].0), settle(points[i].1));
        (if x_max { -x } else { x }, if y_max { -y } else { y })
    };
    let mut idx: Vec<usize> = (0..points.len())
        .filter(|&i| points[i].0.is_finite() && points[i].1.is_finite())
        .collect();
    idx.sort_by(|&a, &b| {
        let (ka, kb) = (key(a), key(b));
        ka.0.total_cmp(&kb.0).then(ka.1.total_cmp(&kb.1))
    });
    let mut best_y = f64::INFINITY;
    let mut out = Vec::new();
    for i in idx {
        let (_, y) = key(i);
        if y < best_y {
            best_y = y;
            out.push(i);
        }
    }
    out
}

/// A plotted point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlotPoint {
    /// x value.
    pub x: f64,
    /// y value.
    pub y: f64,
    /// Meets all requirements.
    pub feasible: bool,
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn noise_does_not_make_a_front() {
        // One outer diameter computed three ways: a single best point.
        let pts = [
            (19.999999999999996, 0.0080),
            (20.0, 0.0081),
            (20.000000000000004, 0.0079),
        ];
        assert_eq!(front(&pts, false, true), vec![1]);
        assert_eq!(settle(19.999999999999996), 20.0);
        assert_eq!(settle(0.0), 0.0);
        assert_eq!(settle(-1.23456789012345e-7), -1.23456789012e-7);
    }

    #[test]
    fn front_of_simple_set() {
        // maximize y, minimize x
        let pts = [(1.0, 1.0), (2.0, 3.0), (3.0, 2.0), (4.0, 5.0), (2.5, 3.0)];
        assert_eq!(front(&pts, false, true), vec![0, 1, 3]);
        // Brute force oracle: i on the front iff nothing dominates it.
        let dominated = |i: usize| {
            pts.iter().enumerate().any(|(j, q)| {
                j != i && q.0 <= pts[i].0 && q.1 >= pts[i].1 && (q.0 < pts[i].0 || q.1 > pts[i].1)
            })
        };
        let mut oracle: Vec<usize> = (0..pts.len()).filter(|&i| !dominated(i)).collect();
        oracle.sort_by(|a, b| pts[*a].0.total_cmp(&pts[*b].0));
        assert_eq!(front(&pts, false, true), oracle);
    }
}
