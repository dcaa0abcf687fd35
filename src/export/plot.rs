//! SVG plots: one axis model (nice 1-2-5 ticks, tick labels) for every
//! plot coilwright draws — the report's line plots and the sweep's
//! trade-off scatter. Colours are sampled from perceptual colour maps
//! (viridis for lines, cividis for the trade-off), our own choice.

use super::svg::escape as esc;
use crate::explore::PlotPoint;
use crate::explore::settle;
use std::fmt::Write as _;

/// Line colours sampled from the viridis colour map (perceptually uniform,
/// readable in grey): dark blue, teal, green.
const COLOURS: [&str; 3] = ["#3b528b", "#21918c", "#5ec962"];

/// One plot axis: a range widened to whole ticks and the tick step (1, 2
/// or 5 times a power of ten).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Axis {
    /// First tick, at or below the data's low end.
    pub lo: f64,
    /// Last tick, at or above the data's high end.
    pub hi: f64,
    /// Distance between ticks.
    pub step: f64,
}

impl Axis {
    /// "Nice" ticks covering `lo..hi` with about `n` intervals.
    pub fn nice(lo: f64, hi: f64, n: usize) -> Axis {
        let span = (hi - lo).abs().max(1e-12);
        let raw = span / n as f64;
        let p = 10f64.powf(raw.log10().floor());
        let step = [1.0, 2.0, 5.0, 10.0]
            .iter()
            .map(|m| m * p)
            .find(|s| *s >= raw)
            .unwrap_or(10.0 * p);
        Axis {
            lo: (lo / step).floor() * step,
            hi: (hi / step).ceil() * step,
            step,
        }
    }

    /// The ticks of this axis's step that fall inside `lo..=hi` (for plots
    /// whose range is padded rather than widened to whole ticks).
    pub fn ticks_within(&self, lo: f64, hi: f64) -> Vec<f64> {
        let first = (lo / self.step).ceil() * self.step;
        (0..40)
            .map(|i| first + self.step * i as f64)
            .take_while(|v| *v <= hi + self.step * 1e-9)
            .collect()
    }

    /// A tick label: as many decimals as the step needs; scientific
    /// notation for steps below 0.001 or from 10,000 up.
    pub fn label(&self, v: f64) -> String {
        let step = self.step;
        if !(1e-3..1e4).contains(&step) {
            return if v.abs() < step * 1e-9 {
                "0".into()
            } else {
                format!("{v:.2e}")
            };
        }
        let dec = if step >= 1.0 {
            0
        } else {
            (-step.log10().floor()) as usize
        };
        let s = format!("{v:.dec$}");
        if s == "-0"
            || s.starts_with("-0.") && s.trim_start_matches("-0.").chars().all(|c| c == '0')
        {
            s.trim_start_matches('-').to_string()
        } else {
            s
        }
    }
}

/// Marker lines and their labels: a muted brick red, our own choice, apart
/// from the viridis lines.
pub(crate) const MARKER_COLOUR: &str = "#a4462f";
const MARK: &str = MARKER_COLOUR;
/// Marker label text: a darker shade of [`MARK`].
const MARK_INK: &str = "#6e2a1b";
/// Approximate advance of one character of the 11 px label font, px.
const LABEL_CHAR_PX: f64 = 6.4;
/// Height of one label line, px.
const LABEL_LINE_PX: f64 = 14.0;

/// A vertical line across a line plot where the design sits (its gap, its
/// edges), with a label and optionally a dot on the curve.
#[derive(Debug, Clone, PartialEq)]
pub struct Marker {
    /// Position on the x-axis, in the plot's x units.
    pub at: f64,
    /// Label; `\n` starts a new line.
    pub label: String,
    /// Value on the y-axis to mark with a dot (the operating point), in the
    /// plot's y units.
    pub point: Option<f64>,
}

impl Marker {
    /// A marker line at `at` with a label and no dot.
    pub fn new(at: f64, label: impl Into<String>) -> Marker {
        Marker {
            at,
            label: label.into(),
            point: None,
        }
    }

    /// The same marker with a dot at `y` (the operating point).
    pub fn with_point(mut self, y: f64) -> Marker {
        self.point = Some(y);
        self
    }
}

/// An axis-aligned box in pixels: (left, top, right, bottom).
type PxBox = (f64, f64, f64, f64);

fn boxes_overlap(a: PxBox, b: PxBox) -> bool {
    a.0 < b.2 && b.0 < a.2 && a.1 < b.3 && b.1 < a.3
}

/// Whether the segment from `p` to `q` (px) passes through `bx`: sampled
/// every pixel or so, which is exact enough for placing labels.
fn segment_hits(p: (f64, f64), q: (f64, f64), bx: PxBox) -> bool {
    let n = ((q.0 - p.0).hypot(q.1 - p.1).ceil() as usize).clamp(1, 2000);
    (0..=n).any(|k| {
        let t = k as f64 / n as f64;
        let (x, y) = (p.0 + (q.0 - p.0) * t, p.1 + (q.1 - p.1) * t);
        x >= bx.0 && x <= bx.2 && y >= bx.1 && y <= bx.3
    })
}

/// Where to put a marker label of `size` (px) beside the line at `x`
/// inside `area`: the first place, from the top down, right of the line
/// before left of it, that touches no curve, no other marker line and no
/// label placed before; the top right if none is free.
fn place_label(
    x: f64,
    size: (f64, f64),
    area: PxBox,
    curves: &[Vec<(f64, f64)>],
    lines: &[f64],
    taken: &[PxBox],
) -> PxBox {
    let (w, h) = size;
    let clamp_x = |left: f64| left.clamp(area.0 + 2.0, (area.2 - w - 2.0).max(area.0 + 2.0));
    let free = |b: PxBox| {
        b.0 >= area.0
            && b.2 <= area.2
            && b.1 >= area.1
            && b.3 <= area.3
            && !taken.iter().any(|t| boxes_overlap(*t, b))
            && !lines.iter().any(|l| *l > b.0 - 1.0 && *l < b.2 + 1.0)
            && !curves
                .iter()
                .any(|c| c.windows(2).any(|s| segment_hits(s[0], s[1], b)))
    };
    let rows = ((area.3 - area.1 - h - 8.0) / 6.0).max(0.0) as usize;
    (0..=rows)
        .map(|r| area.1 + 4.0 + 6.0 * r as f64)
        .flat_map(|top| {
            [x + 5.0, x - 5.0 - w]
                .into_iter()
                .map(move |left| (left, top, left + w, top + h))
        })
        .find(|b| free(*b))
        .unwrap_or_else(|| {
            let left = clamp_x(x + 5.0);
            (left, area.1 + 4.0, left + w, area.1 + 4.0 + h)
        })
}

/// How an axis maps values to positions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Scale {
    /// Equal steps for equal differences; the y-axis includes zero.
    Linear,
    /// Equal steps for equal ratios: ticks at whole decades (every second
    /// or more when there are many), labelled 1, 10, 100, 1k, ...;
    /// values at or below zero are left out.
    Log,
}

impl Scale {
    fn map(self, v: f64) -> f64 {
        match self {
            Scale::Linear => v,
            Scale::Log if v > 0.0 => v.log10(),
            Scale::Log => f64::NAN,
        }
    }
}

/// The label of the decade `10^e`: 1, 10, 100, then with SI prefixes
/// (1k, 10k, ..., 1G; 100m, 10m, 1m, 100u, ...).
fn decade_label(e: f64) -> String {
    let e = e.round() as i32;
    let prefixes = [
        (-12, "p"),
        (-9, "n"),
        (-6, "u"),
        (-3, "m"),
        (0, ""),
        (3, "k"),
        (6, "M"),
        (9, "G"),
        (12, "T"),
    ];
    let (base, p) = prefixes
        .iter()
        .rev()
        .find(|(b, _)| e >= *b)
        .copied()
        .unwrap_or((-12, "p"));
    format!("{}{p}", 10i64.pow((e - base).clamp(0, 2) as u32))
}

/// A line plot with axes, ticks, grid, labels, a legend and marker lines,
/// as SVG text. The x range is widened to show every marker.
pub fn line_plot(
    title: &str,
    xlabel: &str,
    ylabel: &str,
    series: &[(&str, Vec<(f64, f64)>)],
    markers: &[Marker],
) -> String {
    line_plot_scaled(
        title,
        xlabel,
        ylabel,
        series,
        markers,
        Scale::Linear,
        Scale::Linear,
    )
}

/// [`line_plot`] with a [`Scale`] for each axis (markers and points are
/// given in data units and mapped like the data).
pub fn line_plot_scaled(
    title: &str,
    xlabel: &str,
    ylabel: &str,
    series: &[(&str, Vec<(f64, f64)>)],
    markers: &[Marker],
    xscale: Scale,
    yscale: Scale,
) -> String {
    let mapped: Vec<(&str, Vec<(f64, f64)>)> = series
        .iter()
        .map(|(n, pts)| {
            (
                *n,
                pts.iter()
                    .map(|&(x, y)| (xscale.map(x), yscale.map(y)))
                    .collect(),
            )
        })
        .collect();
    let marks: Vec<Marker> = markers
        .iter()
        .map(|m| Marker {
            at: xscale.map(m.at),
            label: m.label.clone(),
            point: m.point.map(|y| yscale.map(y)),
        })
        .collect();
    let (series, markers) = (&mapped[..], &marks[..]);
    let (w, h) = (640.0, 400.0);
    let (l, r, t, b) = (78.0, 20.0, 40.0, 56.0);
    let all = series.iter().flat_map(|s| s.1.iter());
    let (mut x0, mut x1, mut y0, mut y1) = (
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    );
    for &(x, y) in all {
        if x.is_finite() && y.is_finite() {
            x0 = x0.min(x);
            x1 = x1.max(x);
            y0 = y0.min(y);
            y1 = y1.max(y);
        }
    }
    if !x0.is_finite() {
        (x0, x1, y0, y1) = (0.0, 1.0, 0.0, 1.0);
    }
    for m in markers.iter().filter(|m| m.at.is_finite()) {
        x0 = x0.min(m.at);
        x1 = x1.max(m.at);
    }
    if yscale == Scale::Linear {
        y0 = y0.min(0.0);
    }
    if y1 <= y0 {
        y1 = y0 + 1.0;
    }
    if x1 <= x0 {
        x1 = x0 + 1.0;
    }
    let decades = |lo: f64, hi: f64, n: f64| {
        let (lo, hi) = (lo.floor(), hi.ceil().max(lo.floor() + 1.0));
        Axis {
            lo,
            hi,
            step: ((hi - lo) / n).ceil().max(1.0),
        }
    };
    let xaxis = match xscale {
        Scale::Linear => Axis::nice(x0, x1, 8),
        Scale::Log => decades(x0, x1, 10.0),
    };
    let yaxis = match yscale {
        Scale::Linear => Axis::nice(y0, y1, 6),
        Scale::Log => decades(y0, y1, 7.0),
    };
    let xtick = |v: f64| match xscale {
        Scale::Linear => xaxis.label(v),
        Scale::Log => decade_label(v),
    };
    let ytick = |v: f64| match yscale {
        Scale::Linear => yaxis.label(v),
        Scale::Log => decade_label(v),
    };
    let (xa, xb, xs) = (xaxis.lo, xaxis.hi, xaxis.step);
    let (ya, yb, ys) = (yaxis.lo, yaxis.hi, yaxis.step);
    let px = |x: f64| l + (x - xa) / (xb - xa) * (w - l - r);
    let py = |y: f64| h - b - (y - ya) / (yb - ya) * (h - t - b);
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" font-family="DejaVu Sans, Arial, sans-serif" font-size="12">"#
    );
    let _ = writeln!(
        s,
        r##"<rect x="0" y="0" width="{w}" height="{h}" fill="#ffffff"/>"##
    );
    let _ = writeln!(
        s,
        r##"<text x="{}" y="22" text-anchor="middle" font-size="14" fill="#1a1a1a">{}</text>"##,
        w / 2.0,
        esc(title)
    );
    // Grid and ticks.
    let mut x = xa;
    while x <= xb + xs * 1e-9 {
        let gx = px(x);
        let _ = writeln!(
            s,
            r##"<line x1="{gx:.2}" y1="{:.2}" x2="{gx:.2}" y2="{:.2}" stroke="#e4e4e4"/>"##,
            py(ya),
            py(yb)
        );
        let _ = writeln!(
            s,
            r##"<line x1="{gx:.2}" y1="{:.2}" x2="{gx:.2}" y2="{:.2}" stroke="#333333"/>"##,
            py(ya),
            py(ya) + 5.0
        );
        let _ = writeln!(
            s,
            r##"<text x="{gx:.2}" y="{:.2}" text-anchor="middle" fill="#333333">{}</text>"##,
            py(ya) + 18.0,
            xtick(x)
        );
        x += xs;
    }
    let mut y = ya;
    while y <= yb + ys * 1e-9 {
        let gy = py(y);
        let _ = writeln!(
            s,
            r##"<line x1="{:.2}" y1="{gy:.2}" x2="{:.2}" y2="{gy:.2}" stroke="#e4e4e4"/>"##,
            px(xa),
            px(xb)
        );
        let _ = writeln!(
            s,
            r##"<line x1="{:.2}" y1="{gy:.2}" x2="{:.2}" y2="{gy:.2}" stroke="#333333"/>"##,
            px(xa) - 5.0,
            px(xa)
        );
        let _ = writeln!(
            s,
            r##"<text x="{:.2}" y="{:.2}" text-anchor="end" fill="#333333">{}</text>"##,
            px(xa) - 8.0,
            gy + 4.0,
            ytick(y)
        );
        y += ys;
    }
    if yscale == Scale::Linear && ya < 0.0 && yb > 0.0 {
        let _ = writeln!(
            s,
            r##"<line x1="{:.2}" y1="{:.2}" x2="{:.2}" y2="{:.2}" stroke="#999999" stroke-dasharray="4 3"/>"##,
            px(xa),
            py(0.0),
            px(xb),
            py(0.0)
        );
    }
    // Axes.
    let _ = writeln!(
        s,
        r##"<path d="M{:.2},{:.2} L{:.2},{:.2} L{:.2},{:.2}" fill="none" stroke="#333333"/>"##,
        px(xa),
        py(yb),
        px(xa),
        py(ya),
        px(xb),
        py(ya)
    );
    let _ = writeln!(
        s,
        r##"<text x="{:.2}" y="{:.2}" text-anchor="middle" fill="#1a1a1a">{}</text>"##,
        (px(xa) + px(xb)) / 2.0,
        h - 14.0,
        esc(xlabel)
    );
    let _ = writeln!(
        s,
        r##"<text x="18" y="{:.2}" text-anchor="middle" fill="#1a1a1a" transform="rotate(-90 18 {:.2})">{}</text>"##,
        (py(ya) + py(yb)) / 2.0,
        (py(ya) + py(yb)) / 2.0,
        esc(ylabel)
    );
    // Series, then the markers over them.
    let mut curves = Vec::new();
    for (i, (_, pts)) in series.iter().enumerate() {
        let c = COLOURS[i % COLOURS.len()];
        let d: Vec<String> = pts
            .iter()
            .filter(|p| p.0.is_finite() && p.1.is_finite())
            .enumerate()
            .map(|(k, &(x, y))| {
                format!(
                    "{}{:.2},{:.2}",
                    if k == 0 { "M" } else { "L" },
                    px(x),
                    py(y)
                )
            })
            .collect();
        let _ = writeln!(
            s,
            r#"<path d="{}" fill="none" stroke="{c}" stroke-width="2"/>"#,
            d.join(" ")
        );
        curves.push(
            pts.iter()
                .filter(|p| p.0.is_finite() && p.1.is_finite())
                .map(|&(x, y)| (px(x), py(y)))
                .collect::<Vec<_>>(),
        );
    }
    let area = (px(xa), py(yb), px(xb), py(ya));
    // The legend (several series): in the first corner of the plot where
    // it covers no curve and no marker line (top right, top left, bottom
    // left, bottom right), else the first such place along the bottom or
    // the top, else a corner with no curve, else the top right; labels
    // keep off it.
    let mut taken: Vec<PxBox> = Vec::new();
    if series.len() > 1 {
        let (lw, lh) = (154.0, 16.0 + 16.0 * series.len() as f64);
        let (right, left) = (w - r - lw, area.0 + 4.0);
        let (top, bottom) = (t + 4.0, area.3 - 4.0 - lh);
        let corners = [(right, top), (left, top), (left, bottom), (right, bottom)];
        // Then along the bottom and the top, from the right, between the
        // marker lines.
        let steps = ((right - left) / 10.0).max(0.0) as usize;
        let along: Vec<(f64, f64)> = [bottom, top]
            .into_iter()
            .flat_map(|y| (0..=steps).map(move |k| (right - 10.0 * k as f64, y)))
            .collect();
        let clear = |&(x, y): &(f64, f64)| {
            !curves.iter().any(|c| {
                c.windows(2)
                    .any(|s| segment_hits(s[0], s[1], (x, y, x + lw, y + lh)))
            })
        };
        let marks: Vec<f64> = markers
            .iter()
            .filter(|m| m.at.is_finite())
            .map(|m| px(m.at))
            .collect();
        let off_marks =
            |&(x, _): &(f64, f64)| !marks.iter().any(|m| *m > x - 1.0 && *m < x + lw + 1.0);
        let (bx, by) = corners
            .iter()
            .copied()
            .chain(along.iter().copied())
            .find(|c| clear(c) && off_marks(c))
            .or_else(|| corners.iter().copied().find(clear))
            .unwrap_or(corners[0]);
        for (i, (name, _)) in series.iter().enumerate() {
            let c = COLOURS[i % COLOURS.len()];
            let ly = by + 10.0 + 16.0 * i as f64;
            let lx = bx + 4.0;
            let _ = writeln!(
                s,
                r#"<line x1="{lx}" y1="{ly}" x2="{}" y2="{ly}" stroke="{c}" stroke-width="2"/>"#,
                lx + 20.0
            );
            let _ = writeln!(
                s,
                r##"<text x="{}" y="{}" fill="#1a1a1a">{}</text>"##,
                lx + 26.0,
                ly + 4.0,
                esc(name)
            );
        }
        taken.push((bx, by, bx + lw, by + lh));
    }
    let shown: Vec<&Marker> = markers.iter().filter(|m| m.at.is_finite()).collect();
    // Labels keep off the dots too.
    for m in &shown {
        if let Some(y) = m.point.filter(|y| y.is_finite()) {
            let (cx, cy) = (px(m.at), py(y));
            taken.push((cx - 7.0, cy - 7.0, cx + 7.0, cy + 7.0));
        }
    }
    let lines: Vec<f64> = shown.iter().map(|m| px(m.at)).collect();
    for (k, m) in shown.iter().enumerate() {
        let mx = px(m.at);
        let _ = writeln!(
            s,
            r#"<line x1="{mx:.2}" y1="{:.2}" x2="{mx:.2}" y2="{:.2}" stroke="{MARK}" stroke-width="1.5" stroke-dasharray="6 3"/>"#,
            area.1, area.3
        );
        if let Some(y) = m.point.filter(|y| y.is_finite()) {
            let _ = writeln!(
                s,
                r##"<circle cx="{mx:.2}" cy="{:.2}" r="4" fill="{MARK}" stroke="#ffffff" stroke-width="1.5"/>"##,
                py(y)
            );
        }
        let text: Vec<&str> = m.label.lines().collect();
        let longest = text.iter().map(|l| l.chars().count()).max().unwrap_or(0);
        let size = (
            longest as f64 * LABEL_CHAR_PX + 8.0,
            text.len() as f64 * LABEL_LINE_PX + 4.0,
        );
        let others: Vec<f64> = lines
            .iter()
            .enumerate()
            .filter(|&(j, _)| j != k)
            .map(|(_, l)| *l)
            .collect();
        let b = place_label(mx, size, area, &curves, &others, &taken);
        taken.push(b);
        let _ = writeln!(
            s,
            r##"<rect x="{:.2}" y="{:.2}" width="{:.2}" height="{:.2}" fill="#ffffff" fill-opacity="0.9"/>"##,
            b.0,
            b.1,
            b.2 - b.0,
            b.3 - b.1
        );
        for (i, line) in text.iter().enumerate() {
            let _ = writeln!(
                s,
                r#"<text x="{:.2}" y="{:.2}" font-size="11" fill="{MARK_INK}">{}</text>"#,
                b.0 + 4.0,
                b.1 + 13.0 + LABEL_LINE_PX * i as f64,
                esc(line)
            );
        }
    }
    s.push_str("</svg>\n");
    s
}

/// cividis colour map samples (perceptually uniform; matplotlib's data).
const DOT: &str = "#7c7b78";
const FRONT: &str = "#00224e";
const BEST: &str = "#fee838";
const FAIL: &str = "#c9c5bd";
const PAPER: &str = "#fbfaf7";
const INK: &str = "#22222a";

/// Scatter plot of all candidates with the front drawn as a line and the
/// best candidate ringed.
pub fn tradeoff(
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
    for tx in Axis::nice(x0, x1, 5).ticks_within(x0, x1) {
        let x = px(tx);
        let _ = writeln!(
            s,
            r##"<line x1="{x:.1}" y1="{t}" x2="{x:.1}" y2="{:.1}" stroke="#e4e0d8"/><text x="{x:.1}" y="{:.1}" text-anchor="middle" fill="{INK}">{}</text>"##,
            h - b,
            h - b + 18.0,
            Axis::nice(x0, x1, 5).label(tx)
        );
    }
    for ty in Axis::nice(y0, y1, 5).ticks_within(y0, y1) {
        let y = py(ty);
        let _ = writeln!(
            s,
            r##"<line x1="{l}" y1="{y:.1}" x2="{:.1}" y2="{y:.1}" stroke="#e4e0d8"/><text x="{:.1}" y="{:.1}" text-anchor="end" fill="{INK}">{}</text>"##,
            w - r,
            l - 6.0,
            y + 4.0,
            Axis::nice(y0, y1, 5).label(ty)
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
    fn ticks_are_nice() {
        let a = Axis::nice(0.0, 9.3, 8);
        assert_eq!((a.lo, a.hi, a.step), (0.0, 10.0, 2.0));
        let b = Axis::nice(-0.013, 0.42, 6);
        assert!(
            (b.step - 0.1).abs() < 1e-12
                && (b.lo + 0.1).abs() < 1e-12
                && (b.hi - 0.5).abs() < 1e-12
        );
        assert_eq!(b.label(0.30000000000000004), "0.3");
    }

    #[test]
    fn marker_labels_keep_off_the_curve_and_each_other() {
        let curve: Vec<(f64, f64)> = (0..=50)
            .map(|i| {
                let x = i as f64 * 0.2;
                (x, 8.0 * (-x / 3.0).exp())
            })
            .collect();
        let svg = line_plot(
            "t",
            "x",
            "y",
            &[("c", curve.clone())],
            &[
                Marker::new(0.5, "a long label at the steep start"),
                Marker::new(2.0, "second label\nin two lines")
                    .with_point(8.0 * (-2.0f64 / 3.0).exp()),
            ],
        );
        // Marker lines at their x (plot area 78..620 px for 0..10).
        for x in [0.5, 2.0] {
            let want = format!(r#"<line x1="{:.2}""#, 78.0 + x / 10.0 * 542.0);
            assert!(svg.contains(&want), "{want} missing");
        }
        let boxes: Vec<PxBox> = svg
            .lines()
            .filter(|l| l.contains("fill-opacity=\"0.9\""))
            .map(|l| {
                let v = |n: &str| -> f64 {
                    let i = l.find(&format!(" {n}=\"")).unwrap() + n.len() + 3;
                    l[i..].split('"').next().unwrap().parse().unwrap()
                };
                (v("x"), v("y"), v("x") + v("width"), v("y") + v("height"))
            })
            .collect();
        assert_eq!(boxes.len(), 2);
        assert!(!boxes_overlap(boxes[0], boxes[1]));
        let px = |x: f64| 78.0 + x / 10.0 * 542.0;
        let py = |y: f64| 400.0 - 56.0 - y / 8.0 * 304.0;
        let pts: Vec<(f64, f64)> = curve.iter().map(|&(x, y)| (px(x), py(y))).collect();
        for b in boxes {
            assert!(
                !pts.windows(2).any(|s| segment_hits(s[0], s[1], b)),
                "{b:?}"
            );
        }
    }

    #[test]
    fn ticks_cover_the_range_in_one_two_five_steps() {
        let a = Axis::nice(0.0, 1.0, 5);
        assert_eq!(a.step, 0.2);
        assert_eq!(a.ticks_within(0.0, 1.0).len(), 6);
        let b = Axis::nice(0.13, 7.9, 8);
        assert_eq!((b.lo, b.hi, b.step), (0.0, 8.0, 1.0));
        assert_eq!(b.label(3.0), "3");
        assert_eq!(Axis::nice(0.0, 0.5, 5).label(0.1), "0.1");
        assert_eq!(Axis::nice(0.0, 3e-6, 5).label(1e-6), "1.00e-6");
        assert_eq!(Axis::nice(-1.0, 1.0, 4).label(-0.0), "0.0");
    }
}
