//! SVG previews: one drawing per copper layer and a stacked view, with vias,
//! terminal pads, the board outline, current-direction arrows, a legend, a
//! scale bar and (optionally) rule violations marked on top.
//!
//! Coordinates go through [`crate::geometry::round`] like every other
//! exporter; y is flipped (SVG y runs down). Colours are samples of the
//! viridis colour map (perceptually uniform), one per layer.

use crate::geometry::round::{format_mm, to_nm};
use crate::geometry::{Board, Direction, Point, Segment, TrackRole, Vec2};
use crate::rules::{Severity, Violation};
use std::fmt::Write;

/// Viridis colour map, 9 samples from 0.0 to 1.0 (matplotlib's data).
const VIRIDIS: [(f64, f64, f64); 9] = [
    (0.267, 0.005, 0.329),
    (0.278, 0.176, 0.482),
    (0.231, 0.322, 0.545),
    (0.173, 0.443, 0.557),
    (0.129, 0.565, 0.553),
    (0.153, 0.682, 0.502),
    (0.361, 0.784, 0.388),
    (0.667, 0.863, 0.196),
    (0.992, 0.906, 0.145),
];

/// Paper, ink and marker colours of the previews.
const PAPER: &str = "#faf7f2";
const INK: &str = "#2b2b33";
const OUTLINE: &str = "#8a8578";
const MARK_ERROR: &str = "#d7263d";
const MARK_WARNING: &str = "#f18f01";

/// Colour of layer `layer` (1-based) of `layers`, as `#rrggbb`: viridis
/// sampled between 0.0 and 0.85 (the bright yellow end is hard to see on paper).
pub fn layer_colour(layer: u8, layers: u8) -> String {
    let t = if layers <= 1 {
        0.0
    } else {
        0.85 * f64::from(layer - 1) / f64::from(layers - 1)
    };
    let x = t * (VIRIDIS.len() - 1) as f64;
    let i = (x.floor() as usize).min(VIRIDIS.len() - 2);
    let f = x - i as f64;
    let (a, b) = (VIRIDIS[i], VIRIDIS[i + 1]);
    let c = |u: f64, v: f64| ((u + (v - u) * f) * 255.0).round() as u8;
    format!("#{:02x}{:02x}{:02x}", c(a.0, b.0), c(a.1, b.1), c(a.2, b.2))
}

/// One legend row at (`lx`, `ly`) with text size `font` (all mm): a
/// swatch of `colour` and `text` (already escaped), the text carrying the
/// extra attributes `attrs` (empty, or starting with a space).
fn swatch(s: &mut String, (lx, ly, font): (f64, f64, f64), colour: &str, attrs: &str, text: &str) {
    let _ = writeln!(
        s,
        r#"<rect x="{}" y="{}" width="{}" height="{}" fill="{colour}"/><text x="{}" y="{}" font-size="{}" fill="{INK}"{attrs}>{text}</text>"#,
        mm(lx),
        mm(ly - font * 0.7),
        mm(font * 1.2),
        mm(font * 0.7),
        mm(lx + font * 1.6),
        mm(ly),
        mm(font * 0.8),
    );
}

/// Colour of an array's phase `ph` (0 = A) on the stacked preview: viridis
/// sampled at 0.0, 0.45 and 0.8 (far apart, and clear of the pale end);
/// copper shared by phases (`None`) in the outline grey.
pub fn phase_colour(ph: Option<usize>) -> String {
    let Some(ph) = ph else {
        return OUTLINE.to_string();
    };
    let t = [0.0, 0.45, 0.8][ph.min(2)];
    let x = t * (VIRIDIS.len() - 1) as f64;
    let i = (x.floor() as usize).min(VIRIDIS.len() - 2);
    let f = x - i as f64;
    let (a, b) = (VIRIDIS[i], VIRIDIS[i + 1]);
    let c = |u: f64, v: f64| ((u + (v - u) * f) * 255.0).round() as u8;
    format!("#{:02x}{:02x}{:02x}", c(a.0, b.0), c(a.1, b.1), c(a.2, b.2))
}

/// The phase colour of winding `wi` of an array: its coil's phase, or the
/// phase whose own bus it belongs to (shared buses in grey).
fn winding_phase_colour(layout: &Board, wi: usize) -> String {
    let phase_of_coil = |k: usize| {
        layout
            .phases
            .iter()
            .position(|p| p.coils.iter().any(|c| c.0 == k))
    };
    if let Some(k) = layout.coils.iter().position(|c| c.windings.contains(&wi)) {
        return phase_colour(phase_of_coil(k));
    }
    let bus = layout.buses.iter().position(|b| b.windings.contains(&wi));
    let ph = bus.and_then(|b| layout.phases.iter().position(|p| p.buses.contains(&b)));
    phase_colour(ph)
}

/// A coordinate in SVG user units (mm) with y flipped, rounded through the
/// shared nanometre grid.
fn xy(p: Point) -> String {
    format!("{} {}", format_mm(to_nm(p.x)), format_mm(-to_nm(p.y)))
}

fn mm(v: f64) -> String {
    format_mm(to_nm(v))
}

/// SVG path data of a chain of segments starting with a move-to.
fn path_data(segs: &[Segment]) -> String {
    let mut d = String::new();
    let mut at: Option<Point> = None;
    for s in segs {
        if at.is_none_or(|p| to_nm(p.x) != to_nm(s.start().x) || to_nm(p.y) != to_nm(s.start().y)) {
            let _ = write!(d, "M{} ", xy(s.start()));
        }
        match s {
            Segment::Line(l) => {
                let _ = write!(d, "L{} ", xy(l.end));
            }
            Segment::Arc(a) => {
                let r = mm(a.radius());
                let large = u8::from(a.sweep.abs() > std::f64::consts::PI);
                // Counter-clockwise with y up is counter-clockwise on screen,
                // which is SVG's negative sweep direction.
                let sweep = u8::from(a.sweep < 0.0);
                let _ = write!(d, "A{r} {r} 0 {large} {sweep} {} ", xy(a.end));
            }
        }
        at = Some(s.end());
    }
    d.trim_end().to_string()
}

/// Which layers and overlays a drawing shows.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum View {
    /// One copper layer (1 = top).
    Layer(u8),
    /// All layers stacked, top drawn last.
    Stack,
}

/// Draws a preview of `layout` as an SVG document.
pub fn preview(layout: &Board, view: View, violations: &[Violation]) -> String {
    let crate::geometry::Rect { min: lo, max: hi } = layout.outline_bounds();
    let legend_w = 0.8 * (hi.x - lo.x).max(hi.y - lo.y).max(12.0);
    let pad = 0.08 * (hi.x - lo.x).max(hi.y - lo.y).max(2.0);
    let (x0, y0) = (lo.x - pad, -hi.y - pad);
    let w = hi.x - lo.x + 2.0 * pad + legend_w;
    let h_main = (hi.y - lo.y + 2.0 * pad).max(0.9 * legend_w);
    let font = (0.035 * h_main).max(0.3);
    let strip = LayerStrip::new(
        layout,
        view,
        w - 2.0 * pad,
        (hi.x - lo.x).max(hi.y - lo.y),
        font,
    );
    let h = h_main + strip.height;
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" viewBox="{} {} {} {}" width="{}mm" height="{}mm" font-family="DejaVu Sans, Helvetica, Arial, sans-serif">"#,
        mm(x0),
        mm(y0),
        mm(w),
        mm(h),
        mm(w),
        mm(h)
    );
    let title = match view {
        View::Layer(l) => format!("{} - copper layer {l} of {}", layout.name, layout.layers),
        View::Stack => format!("{} - all {} layers stacked", layout.name, layout.layers),
    };
    let _ = writeln!(s, "<title>{}</title>", escape(&title));
    let _ = writeln!(
        s,
        r#"<rect x="{}" y="{}" width="{}" height="{}" fill="{PAPER}"/>"#,
        mm(x0),
        mm(y0),
        mm(w),
        mm(h)
    );
    // Board outline.
    let _ = writeln!(
        s,
        r#"<path d="{}" fill="none" stroke="{OUTLINE}" stroke-width="{}" stroke-dasharray="{} {}"/>"#,
        path_data(&layout.outline.segments),
        mm(font * 0.08),
        mm(font * 0.5),
        mm(font * 0.3)
    );
    let layers: Vec<u8> = match view {
        View::Layer(l) => vec![l],
        View::Stack => (1..=layout.layers).rev().collect(),
    };
    let opacity = if matches!(view, View::Stack) && layout.layers > 1 {
        0.6
    } else {
        1.0
    };
    let phased = matches!(view, View::Stack) && !layout.phases.is_empty();
    for &l in &layers {
        let colour = layer_colour(l, layout.layers);
        if phased {
            // An array's stacked view: each phase in its own colour.
            let _ = writeln!(
                s,
                r#"<g id="layer-{l}" stroke-opacity="{opacity}" fill="none" stroke-linecap="round" stroke-linejoin="round">"#
            );
            for (wi, w) in layout.windings.iter().enumerate() {
                let segs: Vec<Segment> = layout
                    .winding_tracks(w)
                    .iter()
                    .filter(|t| t.layer == l)
                    .map(|t| t.segment)
                    .collect();
                if !segs.is_empty() {
                    let _ = writeln!(
                        s,
                        r#"<path d="{}" stroke="{}" stroke-width="{}"/>"#,
                        path_data(&segs),
                        winding_phase_colour(layout, wi),
                        mm(layout.trace_width)
                    );
                }
            }
            let _ = writeln!(s, "</g>");
            continue;
        }
        let _ = writeln!(
            s,
            r#"<g id="layer-{l}" stroke="{colour}" stroke-opacity="{opacity}" fill="none" stroke-linecap="round" stroke-linejoin="round">"#
        );
        // Each winding's tracks on this layer (a surface pad's lead from
        // the via beside it lies on the pad's layer, whichever winding).
        for segs in layer_runs(layout, l) {
            let _ = writeln!(
                s,
                r#"<path d="{}" stroke-width="{}"/>"#,
                path_data(&segs),
                mm(layout.trace_width)
            );
        }
        let _ = writeln!(s, "</g>");
    }
    // Current-direction arrows on the drawn layers. An array's coils are
    // small beside its board: fewer arrows, sized to the coil, none on the
    // buses.
    let array = layout.is_array();
    let (count, most) = if array {
        (2, 0.3 * layout.outer_radius)
    } else {
        (4, f64::INFINITY)
    };
    for &l in layers.iter().filter(|_| !phased) {
        let colour = layer_colour(l, layout.layers);
        for w in layout
            .windings
            .iter()
            .filter(|w| w.layer == l && !(array && w.turns == 0.0))
        {
            for (p, dir) in arrow_points(layout, w, count) {
                let size = (layout.pitch * 2.5).max(font * 0.6).min(most);
                arrow(&mut s, p, dir, size, &colour, 0.04);
            }
        }
    }
    // Vias and pads (through holes: drawn on every view).
    for v in &layout.vias {
        let joined = match view {
            View::Layer(l) => v.joins.contains(&l),
            View::Stack => true,
        };
        let ring = if joined { INK } else { OUTLINE };
        let _ = writeln!(
            s,
            r#"<circle cx="{}" cy="{}" r="{}" fill="{ring}" fill-opacity="{}"/><circle cx="{}" cy="{}" r="{}" fill="{PAPER}"/>"#,
            mm(v.at.x),
            mm(-v.at.y),
            mm(v.diameter / 2.0),
            if joined { "0.9" } else { "0.35" },
            mm(v.at.x),
            mm(-v.at.y),
            mm(v.drill / 2.0)
        );
    }
    // An array's coil pads ("<coil>.1", a millimetre apart) are not named
    // one by one: each coil's number stands inside the ring beside it, and
    // the phase pads' names stand radially outside them.
    for p in layout.pads.iter().filter(|p| p.smd.is_none()) {
        let _ = write!(
            s,
            r#"<circle cx="{}" cy="{}" r="{}" fill="{INK}"/><circle cx="{}" cy="{}" r="{}" fill="{PAPER}"/>"#,
            mm(p.at.x),
            mm(-p.at.y),
            mm(p.diameter / 2.0),
            mm(p.at.x),
            mm(-p.at.y),
            mm(p.drill / 2.0),
        );
        if !array {
            let _ = writeln!(
                s,
                r#"<text x="{}" y="{}" font-size="{}" fill="{INK}" font-weight="bold">{}</text>"#,
                mm(p.at.x + p.diameter * 0.6),
                mm(-p.at.y - p.diameter * 0.6),
                mm(font),
                escape(&p.name)
            );
        } else if p.name.contains('.') {
            s.push('\n');
        } else {
            let out = p.at.to_vec2().normalized().unwrap_or(Vec2::new(1.0, 0.0));
            let at = p.at + out * (p.diameter / 2.0 + 0.8 * font);
            let _ = writeln!(
                s,
                r#"<text x="{}" y="{}" font-size="{}" fill="{INK}" font-weight="bold" text-anchor="middle" dominant-baseline="central">{}</text>"#,
                mm(at.x),
                mm(-at.y),
                mm(font),
                escape(&p.name)
            );
        }
    }
    if array {
        // A ring's coils all sit at one radius: their numbers go inside the
        // ring; a grid's beside each coil's upper left.
        let radii = layout.coils.iter().map(|c| c.position.to_vec2().length());
        let (lo, hi) = radii.fold((f64::INFINITY, 0.0_f64), |(a, b), r| (a.min(r), b.max(r)));
        let ring = hi - lo < 1e-6;
        for (k, c) in layout.coils.iter().enumerate() {
            let v = c.position.to_vec2();
            let r = v.length();
            let at = if ring {
                Point::ORIGIN + v * ((r - layout.outer_radius - 0.9 * font) / r.max(1e-9))
            } else {
                let d = (layout.outer_radius + 0.5 * font) / std::f64::consts::SQRT_2;
                c.position + Vec2::new(-d, d)
            };
            let _ = writeln!(
                s,
                r#"<text x="{}" y="{}" font-size="{}" fill="{INK}" fill-opacity="0.7" text-anchor="middle" dominant-baseline="central">{}</text>"#,
                mm(at.x),
                mm(-at.y),
                mm(0.8 * font),
                k + 1
            );
        }
    }
    // Surface pads: their rectangle, faint on views of other layers.
    for p in &layout.pads {
        let Some(land) = &p.smd else { continue };
        let here = match view {
            View::Layer(l) => l == land.layer,
            View::Stack => true,
        };
        let corners = land.corners(p.at);
        let pts: Vec<String> = corners
            .iter()
            .map(|c| format!("{},{}", mm(c.x), mm(-c.y)))
            .collect();
        // The name inside the pad, light on the dark copper, small enough
        // for a narrow finger.
        let narrow = corners[0]
            .distance(corners[1])
            .min(corners[1].distance(corners[2]));
        let _ = writeln!(
            s,
            r#"<polygon points="{}" fill="{}" fill-opacity="{}"/><text x="{}" y="{}" font-size="{}" fill="{PAPER}" font-weight="bold" text-anchor="middle" dominant-baseline="central">{}</text>"#,
            pts.join(" "),
            if here { INK } else { OUTLINE },
            if here { "0.9" } else { "0.35" },
            mm(p.at.x),
            mm(-p.at.y),
            mm(font.min(0.8 * narrow)),
            escape(&p.name)
        );
    }
    // Violations, one mark per group (rule along one track, or at one
    // set of holes): a ring at the worst place, a dashed box around every
    // place when there are several, and the rule id with the count.
    let groups = crate::rules::group(violations);
    for g in groups.iter().filter(|g| match view {
        View::Layer(l) => g.layer.is_none_or(|x| x == l),
        View::Stack => true,
    }) {
        let v = &g.worst;
        let c = if v.severity == Severity::Error {
            MARK_ERROR
        } else {
            MARK_WARNING
        };
        let r = (layout.pitch * 3.0).max(font * 0.8);
        let label = if g.count() > 1 {
            format!("{} \u{d7}{}", v.rule, g.count())
        } else {
            v.rule.to_string()
        };
        let _ = write!(s, r#"<g class="violation">"#);
        if g.count() > 1 {
            let m = r * 0.6;
            let _ = write!(
                s,
                r#"<rect x="{}" y="{}" width="{}" height="{}" fill="none" stroke="{c}" stroke-width="{}" stroke-dasharray="{} {}"/>"#,
                mm(g.extent_min.x - m),
                mm(-g.extent_max.y - m),
                mm(g.extent_max.x - g.extent_min.x + 2.0 * m),
                mm(g.extent_max.y - g.extent_min.y + 2.0 * m),
                mm(r * 0.12),
                mm(r * 0.4),
                mm(r * 0.25)
            );
        }
        let _ = writeln!(
            s,
            r#"<circle cx="{}" cy="{}" r="{}" fill="none" stroke="{c}" stroke-width="{}"/><text x="{}" y="{}" font-size="{}" fill="{c}">{}</text></g>"#,
            mm(v.at.x),
            mm(-v.at.y),
            mm(r),
            mm(r * 0.2),
            mm(v.at.x + r * 1.1),
            mm(-v.at.y - r * 1.1),
            mm(font * 0.8),
            escape(&label)
        );
    }
    // Legend at the right.
    let lx = hi.x + pad;
    let mut ly = -hi.y + font;
    let _ = writeln!(
        s,
        r#"<text x="{}" y="{}" font-size="{}" fill="{INK}" font-weight="bold">{}</text>"#,
        mm(lx),
        mm(ly),
        mm(font * 1.1),
        escape(&layout.name)
    );
    ly += font * 1.5;
    let info = format!(
        "{} turns/layer, w {} mm, gap {} mm",
        crate::design::turns_text(layout.turns),
        mm(layout.trace_width),
        mm(layout.clearance)
    );
    let _ = writeln!(
        s,
        r#"<text x="{}" y="{}" font-size="{}" fill="{INK}">{}</text>"#,
        mm(lx),
        mm(ly),
        mm(font * 0.8),
        escape(&info)
    );
    ly += font * 1.4;
    if matches!(view, View::Stack) && !layout.phases.is_empty() {
        for (ph, p) in layout.phases.iter().enumerate() {
            let mut coils: Vec<String> = p
                .coils
                .iter()
                .map(|&(k, sg)| format!("{}{}", k + 1, if sg > 0.0 { "+" } else { "-" }))
                .collect();
            // A long list (a grid's single phase) keeps its ends.
            if coils.len() > 8 {
                let n = coils.len();
                coils.splice(3..n - 2, [format!("… ({n} coils)")]);
            }
            let text = format!("phase {}: coils {}", escape(&p.name), coils.join(" "));
            swatch(&mut s, (lx, ly, font), &phase_colour(Some(ph)), "", &text);
            ly += font * 1.1;
        }
        let shared = "shared: star point / delta corners";
        swatch(&mut s, (lx, ly, font), &phase_colour(None), "", shared);
        ly += font * 1.1;
    }
    for l in (1..=layout.layers).filter(|_| !phased) {
        if let View::Layer(v) = view
            && v != l
            && layout.layers > 8
        {
            continue;
        }
        let dir = direction_word(layout, l);
        let weight = if view == View::Layer(l) {
            "bold"
        } else {
            "normal"
        };
        let face = if l == 1 {
            " top"
        } else if l == layout.layers {
            " bottom"
        } else {
            ""
        };
        let text = format!("L{l}{face}: {dir}, clockwise");
        let weight = format!(r#" font-weight="{weight}""#);
        swatch(
            &mut s,
            (lx, ly, font),
            &layer_colour(l, layout.layers),
            &weight,
            &text,
        );
        ly += font * 1.1;
    }
    ly += font * 0.4;
    let _ = writeln!(
        s,
        r#"<circle cx="{}" cy="{}" r="{}" fill="{INK}"/><text x="{}" y="{}" font-size="{}" fill="{INK}">via / terminal pad (grey: not joined here)</text>"#,
        mm(lx + font * 0.6),
        mm(ly - font * 0.3),
        mm(font * 0.35),
        mm(lx + font * 1.6),
        mm(ly),
        mm(font * 0.8)
    );
    ly += font * 1.1;
    let arrows = if matches!(view, View::Stack) && !layout.phases.is_empty() {
        "+/-: coil sense (-: enters at pad 2)"
    } else {
        "arrows: current from pad 1 to pad 2"
    };
    let _ = writeln!(
        s,
        r#"<text x="{}" y="{}" font-size="{}" fill="{INK}">{arrows}</text>"#,
        mm(lx),
        mm(ly),
        mm(font * 0.8)
    );
    ly += font * 1.1;
    let _ = writeln!(
        s,
        r#"<path d="M{} {} h{}" stroke="{OUTLINE}" stroke-width="{}" stroke-dasharray="{} {}"/><text x="{}" y="{}" font-size="{}" fill="{INK}">board outline</text>"#,
        mm(lx),
        mm(ly - font * 0.3),
        mm(font * 1.2),
        mm(font * 0.08),
        mm(font * 0.5),
        mm(font * 0.3),
        mm(lx + font * 1.6),
        mm(ly),
        mm(font * 0.8)
    );
    if !violations.is_empty() {
        ly += font * 1.1;
        let groups = groups.len();
        let _ = writeln!(
            s,
            r#"<text x="{}" y="{}" font-size="{}" fill="{MARK_ERROR}">rings: {} problem(s), {} place(s)</text>"#,
            mm(lx),
            mm(ly),
            mm(font * 0.8),
            groups,
            violations.len()
        );
        ly += font * 1.1;
        let _ = writeln!(
            s,
            r#"<text x="{}" y="{}" font-size="{}" fill="{MARK_ERROR}">dashed box: one problem, many places</text>"#,
            mm(lx),
            mm(ly),
            mm(font * 0.8)
        );
    }
    // Each layer on its own, small, below the stacked view: where many
    // turns blur together when stacked, each layer's direction stays
    // visible here.
    strip.draw(&mut s, layout, x0 + pad, y0 + h_main, lo.midpoint(hi), font);
    // Scale bar: a round length about a quarter of the board.
    let span = (hi.x - lo.x).max(1e-3);
    let bar = nice_length(span / 4.0);
    let by = -lo.y + pad * 0.55;
    let _ = writeln!(
        s,
        r#"<path d="M{} {} h{} M{} {} v{} M{} {} v{}" stroke="{INK}" stroke-width="{}"/><text x="{}" y="{}" font-size="{}" fill="{INK}">{} mm</text>"#,
        mm(lo.x),
        mm(by),
        mm(bar),
        mm(lo.x),
        mm(by - font * 0.3),
        mm(font * 0.6),
        mm(lo.x + bar),
        mm(by - font * 0.3),
        mm(font * 0.6),
        mm(font * 0.1),
        mm(lo.x + bar + font * 0.4),
        mm(by + font * 0.3),
        mm(font * 0.8),
        mm(bar)
    );
    s.push_str("</svg>\n");
    s
}

/// A 1-2-5 series length not above `x`, mm.
fn nice_length(x: f64) -> f64 {
    let e = 10f64.powf(x.log10().floor());
    [5.0, 2.0, 1.0]
        .into_iter()
        .map(|m| m * e)
        .find(|&v| v <= x)
        .unwrap_or(e)
}

/// `n` positions and current directions spread along the winding part of
/// a layer's copper (by length).
/// The row(s) of small per-layer views under a stacked preview.
struct LayerStrip {
    /// Layers per row.
    per_row: usize,
    /// Side of one small view, mm of the drawing.
    cell: f64,
    /// Scale from board mm to drawing mm inside a small view.
    scale: f64,
    /// Height the strip adds to the drawing, mm (0: no strip).
    height: f64,
}

impl LayerStrip {
    /// At most this many layers per row.
    const MAX_PER_ROW: usize = 8;

    fn new(layout: &Board, view: View, width: f64, board_size: f64, font: f64) -> LayerStrip {
        let n = layout.layers as usize;
        if view != View::Stack || n < 2 {
            return LayerStrip {
                per_row: 1,
                cell: 0.0,
                scale: 0.0,
                height: 0.0,
            };
        }
        let per_row = n.min(Self::MAX_PER_ROW);
        let rows = n.div_ceil(per_row);
        let cell = (width / per_row as f64).min(board_size * 0.45);
        LayerStrip {
            per_row,
            cell,
            scale: 0.85 * cell / board_size.max(1e-9),
            height: rows as f64 * (cell + font * 1.4) + font * 0.6,
        }
    }

    /// Draws the strip with its top-left corner at (`x`, `y`) (drawing
    /// coordinates, y down); `centre` is the board's centre.
    fn draw(&self, s: &mut String, layout: &Board, x: f64, y: f64, centre: Point, font: f64) {
        if self.height == 0.0 {
            return;
        }
        let k = self.scale;
        for l in 1..=layout.layers {
            let i = (l - 1) as usize;
            let (col, row) = (i % self.per_row, i / self.per_row);
            let cx = x + (col as f64 + 0.5) * self.cell;
            let cy = y + font * 0.3 + row as f64 * (self.cell + font * 1.4) + self.cell / 2.0;
            let colour = layer_colour(l, layout.layers);
            // Board coordinates (y up) into the small view (y down).
            let _ = writeln!(
                s,
                r#"<g class="layer-thumb" transform="translate({} {}) scale({}) translate({} {})" stroke="{colour}" fill="none" stroke-linecap="round" stroke-linejoin="round">"#,
                mm(cx),
                mm(cy),
                mm(k),
                mm(-centre.x),
                mm(centre.y)
            );
            let stroke = layout.trace_width.max(0.6 * font / k * 0.08);
            for segs in layer_runs(layout, l) {
                let _ = writeln!(
                    s,
                    r#"<path d="{}" stroke-width="{}"/>"#,
                    path_data(&segs),
                    mm(stroke)
                );
            }
            // An array's coils: one arrow each, sized to the coil; none on
            // its buses.
            let array = layout.is_array();
            let (count, size) = if array {
                (1, (0.9 * font / k).min(0.5 * layout.outer_radius))
            } else {
                (3, 0.9 * font / k)
            };
            for w in layout
                .windings
                .iter()
                .filter(|w| w.layer == l && !(array && w.turns == 0.0))
            {
                for (p, dir) in arrow_points(layout, w, count) {
                    arrow(s, p, dir, size, &colour, 0.05);
                }
            }
            let _ = writeln!(s, "</g>");
            let dir = direction_word(layout, l);
            let _ = writeln!(
                s,
                r#"<text x="{}" y="{}" font-size="{}" fill="{INK}" text-anchor="middle">L{l} {dir}</text>"#,
                mm(cx),
                mm(cy + 0.45 * self.cell + font * 0.8),
                mm(font * 0.7)
            );
        }
    }
}

/// A current-direction arrow head of `size` (mm) at `p` pointing along
/// `dir`, outlined with `outline` x `size`.
fn arrow(
    s: &mut String,
    p: Point,
    dir: crate::geometry::Vec2,
    size: f64,
    colour: &str,
    outline: f64,
) {
    let tip = p + dir * (size * 0.6);
    let back = p - dir * (size * 0.4);
    let side = dir.perp() * (size * 0.35);
    let _ = writeln!(
        s,
        r#"<path d="M{} L{} L{} Z" fill="{colour}" stroke="{INK}" stroke-width="{}"/>"#,
        xy(tip),
        xy(back + side),
        xy(back - side),
        mm(size * outline)
    );
}

/// "inward" or "outward": which way layer `l`'s winding runs from its
/// first end ("" for a layer without one).
fn direction_word(layout: &Board, l: u8) -> &'static str {
    layout
        .windings
        .iter()
        .find(|w| w.layer == l)
        .map(|w| match w.direction {
            Direction::Inward => "inward",
            Direction::Outward => "outward",
        })
        .unwrap_or("")
}

fn arrow_points(
    layout: &Board,
    w: &crate::geometry::Winding,
    n: usize,
) -> Vec<(Point, crate::geometry::Vec2)> {
    let tracks: Vec<_> = layout
        .winding_tracks(w)
        .iter()
        .filter(|t| t.role == TrackRole::Winding)
        .collect();
    let total: f64 = tracks.iter().map(|t| t.segment.length()).sum();
    let mut out = Vec::new();
    for k in 0..n {
        let mut target = total * (k as f64 + 0.5) / n as f64;
        for t in &tracks {
            let len = t.segment.length();
            if target <= len && len > 0.0 {
                let f = target / len;
                let p = t.segment.point_at(f);
                let dir = match t.segment {
                    Segment::Line(l) => l.end - l.start,
                    Segment::Arc(a) => (p - a.center).perp() * a.sweep.signum(),
                };
                if let Some(d) = dir.normalized() {
                    out.push((p, d));
                }
                break;
            }
            target -= len;
        }
    }
    out
}

/// Escapes text for SVG/XML content.
pub(crate) fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
}

/// The centre lines on layer `l`, one run per winding that has tracks there
/// (its own, or a surface pad's lead from the via beside the pad).
fn layer_runs(layout: &Board, l: u8) -> Vec<Vec<Segment>> {
    layout
        .windings
        .iter()
        .map(|w| {
            layout
                .winding_tracks(w)
                .iter()
                .filter(|t| t.layer == l)
                .map(|t| t.segment)
                .collect::<Vec<_>>()
        })
        .filter(|segs| !segs.is_empty())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn colours_are_viridis_ends() {
        assert_eq!(layer_colour(1, 4), "#440154");
        assert_eq!(layer_colour(1, 1), "#440154");
    }

    #[test]
    fn nice_lengths() {
        assert_eq!(nice_length(7.0), 5.0);
        assert_eq!(nice_length(0.3), 0.2);
        assert_eq!(nice_length(1.0), 1.0);
    }
}
