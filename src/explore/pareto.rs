//! The Pareto front of two metrics and its SVG plot.

use crate::export::svg::escape as esc;
use std::fmt::Write;

/// A metric rounded to 12 significant digits: values that differ only by
/// floating-point noise (an outer diameter of 20 mm computed as
/// 19.999999999999996 mm) count as equal for dominance and sit on one
/// spot in the plot.
pub(crate) fn settle(v: f64) -> f64 {
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

/// cividis colour map samples (perceptually uniform; matplotlib's data).
const DOT: &str = "#7c7b78";
const FRONT: &str = "#00224e";
const BEST: &str = "#fee838";
const FAIL: &str = "#c9c5bd";
const PAPER: &str = "#fbfaf7";
const INK: &str = "#22222a";

/// A plotted point.
pub struct PlotPoint {
    /// x value.
    pub x: f64,
    /// y value.
    pub y: f64,
    /// Meets all requirements.
    pub feasible: bool,
}

/// Ticks at 1-2-5 steps covering `lo..hi`.
fn ticks(lo: f64, hi: f64) -> Vec<f64> {
    let span = (hi - lo).abs().max(1e-300);
    let raw = span / 5.0;
    let e = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * e)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * e);
    let first = (lo / step).ceil() * step;
    (0..20)
        .map(|i| first + step * i as f64)
        .take_while(|v| *v <= hi + step * 1e-9)
        .collect()
}

fn label(v: f64) -> String {
    if v == 0.0 {
        "0".into()
    } else if v.abs() >= 1e4 || v.abs() < 1e-3 {
        format!("{v:.2e}")
    } else {
        let s = format!("{v:.4}");
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    }
}

/// Scatter plot of all candidates with the front drawn as a line and the
/// best candidate ringed.
pub fn plot(
    points: &[PlotPoint],
    front_idx: &[usize],
    best: Option<usize>,
    x_name: &str,
    y_name: &str,
    title: &str,
) -> String {
    let (w, h) = (720.0, 480.0);
    let (l, r, t, b) = (90.0, 30.0, 50.0, 60.0);
    let points: Vec<PlotPoint> = points
        .iter()
        .map(|p| PlotPoint {
            x: settle(p.x),
            y: settle(p.y),
            feasible: p.feasible,
        })
        .collect();
    let finite: Vec<&PlotPoint> = points
        .iter()
        .filter(|p| p.x.is_finite() && p.y.is_finite())
        .collect();
    let (mut x0, mut x1, mut y0, mut y1) = finite.iter().fold(
        (
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::INFINITY,
            f64::NEG_INFINITY,
        ),
        |(a, b, c, d), p| (a.min(p.x), b.max(p.x), c.min(p.y), d.max(p.y)),
    );
    if !x0.is_finite() {
        (x0, x1, y0, y1) = (0.0, 1.0, 0.0, 1.0);
    }
    let pad = |a: f64, b: f64| {
        let s = if b > a {
            (b - a) * 0.06
        } else {
            a.abs().max(1e-12) * 0.1
        };
        (a - s, b + s)
    };
    let (x0, x1) = pad(x0, x1);
    let (y0, y1) = pad(y0, y1);
    let px = |x: f64| l + (x - x0) / (x1 - x0) * (w - l - r);
    let py = |y: f64| h - b - (y - y0) / (y1 - y0) * (h - t - b);
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {w} {h}" width="{w}" height="{h}" font-family="DejaVu Sans, Helvetica, Arial, sans-serif" font-size="12">"#
    );
    let _ = writeln!(s, r#"<rect width="{w}" height="{h}" fill="{PAPER}"/>"#);
    // Long titles: the part in parentheses goes on a second, smaller line.
    let (head, tail) = match title.split_once(" (") {
        Some((h, t)) => (h.to_string(), format!("({t}")),
        None => (title.to_string(), String::new()),
    };
    let _ = writeln!(
        s,
        r#"<text x="{l}" y="22" font-size="15" font-weight="bold" fill="{INK}">{}</text><text x="{l}" y="40" font-size="12" fill="{INK}">{}</text>"#,
        esc(&head),
        esc(&tail)
    );
    // Axes and grid.
    for tx in ticks(x0, x1) {
        let x = px(tx);
        let _ = writeln!(
            s,
            r##"<line x1="{x:.1}" y1="{t}" x2="{x:.1}" y2="{:.1}" stroke="#e4e0d8"/><text x="{x:.1}" y="{:.1}" text-anchor="middle" fill="{INK}">{}</text>"##,
            h - b,
            h - b + 18.0,
            label(tx)
        );
    }
    for ty in ticks(y0, y1) {
        let y = py(ty);
        let _ = writeln!(
            s,
            r##"<line x1="{l}" y1="{y:.1}" x2="{:.1}" y2="{y:.1}" stroke="#e4e0d8"/><text x="{:.1}" y="{:.1}" text-anchor="end" fill="{INK}">{}</text>"##,
            w - r,
            l - 6.0,
            y + 4.0,
            label(ty)
        );
    }
    let _ = writeln!(
        s,
        r#"<rect x="{l}" y="{t}" width="{:.1}" height="{:.1}" fill="none" stroke="{INK}"/>"#,
        w - l - r,
        h - t - b
    );
    let _ = writeln!(
        s,
        r#"<text x="{:.1}" y="{:.1}" text-anchor="middle" fill="{INK}">{}</text>"#,
        (l + w - r) / 2.0,
        h - 16.0,
        esc(x_name)
    );
    let _ = writeln!(
        s,
        r#"<text transform="translate(22 {:.1}) rotate(-90)" text-anchor="middle" fill="{INK}">{}</text>"#,
        (t + h - b) / 2.0,
        esc(y_name)
    );
    for p in points.iter().filter(|p| p.x.is_finite() && p.y.is_finite()) {
        if p.feasible {
            let _ = writeln!(
                s,
                r#"<circle cx="{:.1}" cy="{:.1}" r="3" fill="{DOT}" fill-opacity="0.8"/>"#,
                px(p.x),
                py(p.y)
            );
        } else {
            let _ = writeln!(
                s,
                r#"<circle cx="{:.1}" cy="{:.1}" r="2.5" fill="none" stroke="{FAIL}"/>"#,
                px(p.x),
                py(p.y)
            );
        }
    }
    if front_idx.len() > 1 {
        let d: Vec<String> = front_idx
            .iter()
            .map(|&i| format!("{:.1},{:.1}", px(points[i].x), py(points[i].y)))
            .collect();
        let _ = writeln!(
            s,
            r#"<polyline points="{}" fill="none" stroke="{FRONT}" stroke-width="1.5"/>"#,
            d.join(" ")
        );
    }
    for &i in front_idx {
        let _ = writeln!(
            s,
            r#"<circle cx="{:.1}" cy="{:.1}" r="4.5" fill="{FRONT}"/>"#,
            px(points[i].x),
            py(points[i].y)
        );
    }
    if let Some(i) = best {
        let _ = writeln!(
            s,
            r#"<circle cx="{:.1}" cy="{:.1}" r="8" fill="none" stroke="{BEST}" stroke-width="3"/><circle cx="{:.1}" cy="{:.1}" r="9.5" fill="none" stroke="{INK}" stroke-width="0.8"/>"#,
            px(points[i].x),
            py(points[i].y),
            px(points[i].x),
            py(points[i].y)
        );
    }
    // Legend: in the corner of the plot area that hides the fewest points
    // (top right first on ties).
    let hidden = |lx: f64, ly: f64| {
        finite
            .iter()
            .filter(|p| {
                let (x, y) = (px(p.x), py(p.y));
                x > lx - 16.0 && x < lx + 188.0 && y > ly - 22.0 && y < ly + 64.0
            })
            .count()
    };
    let (lx, ly) = [
        (w - r - 190.0, t + 14.0),
        (l + 12.0, t + 14.0),
        (w - r - 190.0, h - b - 62.0),
        (l + 12.0, h - b - 62.0),
    ]
    .into_iter()
    .min_by_key(|&(x, y)| hidden(x, y))
    .unwrap_or((w - r - 190.0, t + 14.0));
    let _ = writeln!(
        s,
        r#"<rect x="{:.1}" y="{:.1}" width="184" height="66" fill="{PAPER}" stroke="{INK}" stroke-width="0.5"/>
<circle cx="{:.1}" cy="{:.1}" r="3" fill="{DOT}"/><text x="{:.1}" y="{:.1}" fill="{INK}">meets requirements</text>
<circle cx="{:.1}" cy="{:.1}" r="2.5" fill="none" stroke="{FAIL}"/><text x="{:.1}" y="{:.1}" fill="{INK}">fails a requirement</text>
<circle cx="{:.1}" cy="{:.1}" r="4.5" fill="{FRONT}"/><text x="{:.1}" y="{:.1}" fill="{INK}">Pareto front; ringed: best</text>"#,
        lx - 6.0,
        ly - 12.0,
        lx + 6.0,
        ly,
        lx + 16.0,
        ly + 4.0,
        lx + 6.0,
        ly + 20.0,
        lx + 16.0,
        ly + 24.0,
        lx + 6.0,
        ly + 40.0,
        lx + 16.0,
        ly + 44.0
    );
    s.push_str("</svg>\n");
    s
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

    #[test]
    fn ticks_cover_range() {
        assert_eq!(
            ticks(0.0, 1.0),
            vec![0.0, 0.2, 0.4, 0.6000000000000001, 0.8, 1.0]
        );
    }
}
