//! KiCad outputs in the KiCad 6 file format (version 20211014, which newer
//! KiCad opens too), written by us as text:
//!
//! - a footprint `kicad/<name>.pretty/<name>.kicad_mod` to drop the coil into
//!   a board of one's own, and
//! - a board `kicad/<name>.kicad_pcb` (with its project file holding the
//!   design rules) where the coil is ordinary tracks and vias, so that
//!   KiCad's rule check sees it as copper and can plot it.
//!
//! # Footprint
//! Anchored at the coil centre. Each layer's copper is one custom pad named
//! "1" whose primitives are the tracks: it carries the net of terminal "1",
//! so KiCad checks that the winding, the via pads (through-hole pads "1"
//! that keep their land only on layers with a connection) and the terminals
//! are connected; a via off its copper shows as unconnected. Terminals are
//! through-hole pads "1" and "2". The footprint is a net tie (keywords
//! beginning with "net tie"): the coil joins its two terminals. A rule area
//! forbids copper pour over the coil on its layers (a pour in the centre or
//! the gaps would form a shorted turn). Courtyard and fab outline follow the
//! board outline.
//!
//! An array (a stator) is one footprint too: every pad, via and piece of
//! copper is named after its net ([`Board::array_nets`]): the phase
//! terminals "A", "B", "C" (and "N", or "A1"/"A2" ... for separate
//! phases), the links between a phase's coils "A_L1" ... Each placed
//! coil's copper is a custom pad per layer and each bus track a custom pad
//! of its own, so KiCad's connectivity check sees every join between them.
//!
//! # Coordinates
//! Our frame has y up, KiCad's y down: y is negated (on the nanometre
//! integers from [`crate::geometry::round::to_nm`], so exactly). KiCad 6
//! draws an arc shape (`fp_arc`, `gr_arc`) clockwise on screen from its
//! start to its end (the mid point does not choose the side), so every arc
//! is written in the order that runs clockwise on screen. The flip of y and
//! the y-down screen cancel, so that is the order that runs clockwise in our
//! frame too: arcs with a positive sweep are written end first.

use super::ExportError;
use super::gerber::{NET_1, NET_2, REFDES};
use crate::design::Design;
use crate::geometry::round::{format_mm, point_nm, to_nm};
use crate::geometry::{Board, Point, Segment};
use std::fmt::Write as _;

/// Where the coil centre sits on the board, KiCad coordinates, nm.
const BOARD_ORIGIN_NM: (i64, i64) = (100_000_000, 100_000_000);
/// Chord tolerance for the rule-area polygon, mm.
const KEEPOUT_TOLERANCE: f64 = 0.005;
/// Line width of courtyard, fab and edge drawings, mm.
const DRAWING_WIDTH: &str = "0.05";

/// Path of the footprint library folder.
pub fn library_dir(stem: &str) -> String {
    format!("kicad/{stem}.pretty")
}

/// Path of the footprint file.
pub fn footprint_file_name(stem: &str) -> String {
    format!("kicad/{stem}.pretty/{stem}.kicad_mod")
}

/// Name of the board's terminals footprint (in the same library).
pub fn terminals_name(stem: &str) -> String {
    format!("{stem}_terminals")
}

/// Path of the terminals footprint in the library.
pub fn terminals_file_name(stem: &str) -> String {
    format!("kicad/{stem}.pretty/{}.kicad_mod", terminals_name(stem))
}

/// The terminals footprint's contents (descr to pads), indented for the
/// board (`nets`: pads on the coil's nets) or for the library file.
fn terminals_body(o: &mut String, stem: &str, layout: &Board, nets: bool) {
    let _ = writeln!(
        o,
        "    (descr \"Terminals of the printed coil; the coil tracks tie the two nets\")"
    );
    let _ = writeln!(o, "    (tags \"net tie coil terminals\")");
    let _ = writeln!(o, "    (attr through_hole)");
    let _ = writeln!(
        o,
        "    (fp_text reference \"{REFDES}\" (at 0 0) (layer \"F.Fab\")\n      (effects (font (size 1 1) (thickness 0.15)))\n    )"
    );
    let _ = writeln!(
        o,
        "    (fp_text value {} (at 0 2) (layer \"F.Fab\")\n      (effects (font (size 1 1) (thickness 0.15)))\n    )",
        quote(stem)
    );
    let array = layout.array_nets();
    for (i, p) in layout.pads.iter().enumerate() {
        // Spare tail fingers ("3" on) are on no net.
        let net = match (nets, p.name.as_str()) {
            (true, _) if array.is_some() => array.as_ref().map_or(String::new(), |a| {
                let n = a.pad[i];
                format!(" (net {n} {})", quote(&a.names[n - 1]))
            }),
            (true, "1") => format!(" (net 1 {})", quote(NET_1)),
            (true, "2") => format!(" (net 2 {})", quote(NET_2)),
            _ => String::new(),
        };
        let _ = writeln!(o, "    {}", terminal_pad(p, &p.name, Frame::LOCAL, &net));
    }
}

/// The board's terminals footprint as a library file
/// (`<name>_terminals.kicad_mod`), so that the board's footprint link
/// resolves in the generated library: the terminal pads alone, the coil
/// itself being tracks on the board.
pub fn terminals_footprint(design: &Design, layout: &Board) -> Result<Vec<u8>, ExportError> {
    let stem = super::gerber::file_stem(&design.name);
    let mut o = String::new();
    let _ = writeln!(
        o,
        "(footprint {} (version 20211014) (generator coilwright)",
        quote(&terminals_name(&stem))
    );
    let _ = writeln!(o, "  (layer \"F.Cu\")");
    terminals_body(&mut o, &stem, layout, false);
    let _ = writeln!(o, ")");
    Ok(o.into_bytes())
}

/// Path of the board file.
pub fn board_file_name(stem: &str) -> String {
    format!("kicad/{stem}.kicad_pcb")
}

/// Path of the board's project file (design rules).
pub fn project_file_name(stem: &str) -> String {
    format!("kicad/{stem}.kicad_pro")
}

/// KiCad name of copper layer `layer` (1 = top) of `layers`.
pub fn copper_layer_name(layer: u8, layers: u8) -> String {
    if layer == 1 {
        "F.Cu".into()
    } else if layer == layers {
        "B.Cu".into()
    } else {
        format!("In{}.Cu", layer - 1)
    }
}

/// KiCad's internal number of a copper layer (F.Cu 0, In1.Cu 1, B.Cu 31).
/// The KiCad pad text of terminal `p` in frame `f`: a through-hole circle,
/// or a rotated surface rectangle on its face with the mask opened; `net`
/// is appended inside the pad (board) or empty (footprint).
fn terminal_pad(p: &crate::geometry::Pad, name: &str, f: Frame, net: &str) -> String {
    match &p.smd {
        Some(s) => {
            let face = if s.layer == 1 { "F" } else { "B" };
            // KiCad turns pads counter-clockwise as seen, with y down: the
            // same sense as ours with y up.
            let deg = s.angle.to_degrees().rem_euclid(360.0);
            let deg = crate::geometry::round::format_mm(crate::geometry::round::to_nm(deg));
            format!(
                "(pad {} smd rect (at {} {deg}) (size {} {}) (layers \"{face}.Cu\" \"{face}.Mask\"){net})",
                quote(name),
                f.xy(p.at),
                mm(s.length),
                mm(s.width)
            )
        }
        None => format!(
            "(pad {} thru_hole circle (at {}) (size {d} {d}) (drill {}) (layers \"*.Cu\" \"*.Mask\"){net})",
            quote(name),
            f.xy(p.at),
            mm(p.drill),
            d = mm(p.diameter)
        ),
    }
}

fn copper_layer_id(layer: u8, layers: u8) -> u8 {
    if layer == layers && layer != 1 {
        31
    } else {
        layer - 1
    }
}

/// Copper layers of the KiCad board for a coil of `layers`: KiCad boards
/// have an even count, two at least (an odd coil leaves one inner layer
/// empty, the coil's last layer stays on B.Cu).
pub fn board_copper_layers(layers: u8) -> u8 {
    (layers + layers % 2).max(2)
}

/// A frame: translation applied after the y flip, nm.
#[derive(Clone, Copy)]
struct Frame {
    dx: i64,
    dy: i64,
}

impl Frame {
    const LOCAL: Frame = Frame { dx: 0, dy: 0 };

    fn xy(self, p: Point) -> String {
        let (x, y) = point_nm(p);
        format!("{} {}", format_mm(x + self.dx), format_mm(-y + self.dy))
    }

    /// A point in this frame, integer nm (y flipped).
    fn nm(self, p: Point) -> (i64, i64) {
        let (x, y) = point_nm(p);
        (x + self.dx, -y + self.dy)
    }

    /// `(start ..) (mid ..) (end ..)` of an arc, clockwise on screen.
    ///
    /// KiCad 6 finds the centre from the three points and divides by the
    /// slope of the start-to-mid chord: when that chord is exactly
    /// horizontal the centre comes out at infinity (observed with pcbnew
    /// 6.0.11: dangling tracks and lost pad arcs). The mid point is then
    /// written 1 nm lower, which moves the centre by about a nanometre.
    fn arc(self, a: &crate::geometry::Arc) -> String {
        // The y flip and KiCad's y-down screen cancel: what is clockwise in
        // our frame (negative sweep) is clockwise on KiCad's screen.
        let (s, e) = if a.sweep <= 0.0 {
            (a.start, a.end)
        } else {
            (a.end, a.start)
        };
        let (s, mut m, e) = (self.nm(s), self.nm(a.mid()), self.nm(e));
        if m.1 == s.1 {
            m.1 += 1;
        }
        let f = |p: (i64, i64)| format!("{} {}", format_mm(p.0), format_mm(p.1));
        format!("(start {}) (mid {}) (end {})", f(s), f(m), f(e))
    }
}

fn mm(x: f64) -> String {
    format_mm(to_nm(x))
}

/// A KiCad s-expression string: quoted, with `"` and `\\` escaped and
/// newlines as spaces.
pub(crate) fn quote(s: &str) -> String {
    let mut o = String::from("\"");
    for c in s.chars() {
        match c {
            '"' => o.push_str("\\\""),
            '\\' => o.push_str("\\\\"),
            '\n' => o.push(' '),
            c => o.push(c),
        }
    }
    o.push('"');
    o
}

/// A graphic line or arc: `kind` is "fp" or "gr".
fn graphic(kind: &str, f: Frame, s: &Segment, layer: &str, width: &str) -> String {
    match s {
        Segment::Line(l) => format!(
            "({kind}_line (start {}) (end {}) (layer \"{layer}\") (width {width}))",
            f.xy(l.start),
            f.xy(l.end)
        ),
        Segment::Arc(a) => format!(
            "({kind}_arc {} (layer \"{layer}\") (width {width}))",
            f.arc(a)
        ),
    }
}

fn all_copper_layers(layers: u8) -> String {
    (1..=layers)
        .map(|l| quote(&copper_layer_name(l, layers)))
        .collect::<Vec<_>>()
        .join(" ")
}

/// The rule area (keep-out of copper pour) polygon: the outline flattened.
fn keepout_zone(layout: &Board, f: Frame, indent: &str) -> String {
    let mut pts: Vec<Point> = Vec::new();
    for s in &layout.outline.segments {
        let flat = s.flatten(KEEPOUT_TOLERANCE);
        pts.extend(&flat[..flat.len() - 1]);
    }
    let mut o = String::new();
    let _ = writeln!(
        o,
        "{indent}(zone (net 0) (net_name \"\") (layers {}) (hatch edge 0.508)",
        all_copper_layers(layout.layers)
    );
    let _ = writeln!(o, "{indent}  (connect_pads (clearance 0))");
    let _ = writeln!(o, "{indent}  (min_thickness 0.254)");
    let _ = writeln!(
        o,
        "{indent}  (keepout (tracks allowed) (vias allowed) (pads allowed) (copperpour not_allowed) (footprints allowed))"
    );
    let _ = writeln!(
        o,
        "{indent}  (fill (thermal_gap 0.508) (thermal_bridge_width 0.508))"
    );
    let _ = writeln!(o, "{indent}  (polygon");
    let _ = writeln!(o, "{indent}    (pts");
    for p in pts {
        let _ = writeln!(o, "{indent}      (xy {})", f.xy(p));
    }
    let _ = writeln!(o, "{indent}    )");
    let _ = writeln!(o, "{indent}  )");
    let _ = writeln!(o, "{indent})");
    o
}

/// The footprint file (`.kicad_mod`) of the coil.
pub fn footprint(design: &Design, layout: &Board) -> Result<Vec<u8>, ExportError> {
    let stem = super::gerber::file_stem(&design.name);
    let f = Frame::LOCAL;
    let crate::geometry::Rect { min: lo, max: hi } = layout.outline_bounds();
    let mut o = String::new();
    let _ = writeln!(
        o,
        "(footprint {} (version 20211014) (generator coilwright)",
        quote(&stem)
    );
    let _ = writeln!(o, "  (layer \"F.Cu\")");
    let _ = writeln!(
        o,
        "  (descr {})",
        quote(&format!(
            "Printed coil {}: {} layers, {} turns per layer, trace {} mm, clearance {} mm (coilwright)",
            design.name,
            layout.layers,
            crate::design::turns_text(layout.turns),
            mm(layout.trace_width),
            mm(layout.clearance)
        ))
    );
    let _ = writeln!(o, "  (tags \"net tie coil printed inductor\")");
    let _ = writeln!(o, "  (attr through_hole)");
    // The reference on the legend (silkscreen), where board designers look
    // for it, and again on the fabrication layer through KiCad's
    // `${REFERENCE}` text variable.
    let _ = writeln!(
        o,
        "  (fp_text reference \"{REFDES}\" (at {}) (layer \"F.SilkS\")\n    (effects (font (size 1 1) (thickness 0.15)))\n  )",
        f.xy(Point::new(0.0, hi.y + 1.0))
    );
    let _ = writeln!(
        o,
        "  (fp_text user \"${{REFERENCE}}\" (at {}) (layer \"F.Fab\")\n    (effects (font (size 1 1) (thickness 0.15)))\n  )",
        f.xy(Point::new(0.0, hi.y + 2.5))
    );
    let _ = writeln!(
        o,
        "  (fp_text value {} (at {}) (layer \"F.Fab\")\n    (effects (font (size 1 1) (thickness 0.15)))\n  )",
        quote(&stem),
        f.xy(Point::new(0.0, lo.y - 1.0))
    );
    for s in &layout.outline.segments {
        let _ = writeln!(o, "  {}", graphic("fp", f, s, "F.CrtYd", DRAWING_WIDTH));
        let _ = writeln!(o, "  {}", graphic("fp", f, s, "F.Fab", "0.1"));
    }
    // Pad names: a coil alone has its terminals "1" and "2" and everything
    // else on "1"; an array's pads, vias and copper are named after their
    // net ("A", "B", "C", "N", "A_L1" ...), so that KiCad joins what the
    // nets join and its check finds a break in any of them.
    let nets = layout.array_nets();
    let named = |net: Option<usize>| match (&nets, net) {
        (Some(n), Some(k)) if k > 0 => n.names[k - 1].as_str(),
        _ => "1",
    };
    // Terminals.
    for (i, p) in layout.pads.iter().enumerate() {
        let name = match &nets {
            Some(n) => named(Some(n.pad[i])),
            None => p.name.as_str(),
        };
        let _ = writeln!(o, "  {}", terminal_pad(p, name, f, ""));
    }
    // Vias: through-hole pads that keep their land only where a layer's
    // copper connects to them.
    for (i, v) in layout.vias.iter().enumerate() {
        let _ = writeln!(
            o,
            "  (pad {} thru_hole circle (at {}) (size {d} {d}) (drill {}) (layers \"*.Cu\") (remove_unused_layers))",
            quote(named(nets.as_ref().map(|n| n.via[i]))),
            f.xy(v.at),
            mm(v.drill),
            d = mm(v.diameter)
        );
    }
    // Copper: one custom pad per layer of a coil alone; per layer of each
    // placed coil and per bus track in an array (pads of one name are
    // joined by KiCad, so a pad holds copper that is joined itself).
    let groups: Vec<Vec<usize>> = if nets.is_some() {
        let mut g: Vec<Vec<usize>> = Vec::new();
        for c in &layout.coils {
            for layer in 1..=layout.layers {
                g.push(
                    c.tracks
                        .clone()
                        .filter(|&t| layout.tracks[t].layer == layer)
                        .collect(),
                );
            }
        }
        for b in &layout.buses {
            g.extend(b.tracks.clone().map(|t| vec![t]));
        }
        g
    } else {
        (1..=layout.layers)
            .map(|layer| {
                (0..layout.tracks.len())
                    .filter(|&t| layout.tracks[t].layer == layer)
                    .collect()
            })
            .collect()
    };
    for group in groups {
        let Some(&first) = group.first() else {
            continue;
        };
        let first = &layout.tracks[first];
        let anchor = first.segment.start();
        let (ax, ay) = point_nm(anchor);
        let rel = Frame { dx: -ax, dy: ay };
        let _ = writeln!(
            o,
            "  (pad {} smd custom (at {}) (size {w} {w}) (layers {})\n    (options (clearance outline) (anchor circle))\n    (primitives",
            quote(named(nets.as_ref().map(|n| n.track[group[0]]))),
            f.xy(anchor),
            quote(&copper_layer_name(first.layer, layout.layers)),
            w = mm(first.width)
        );
        for t in group.iter().map(|&t| &layout.tracks[t]) {
            let g = match &t.segment {
                Segment::Line(l) => format!(
                    "(gr_line (start {}) (end {}) (width {}))",
                    rel.xy(l.start),
                    rel.xy(l.end),
                    mm(t.width)
                ),
                Segment::Arc(a) => format!("(gr_arc {} (width {}))", rel.arc(a), mm(t.width)),
            };
            let _ = writeln!(o, "      {g}");
        }
        let _ = writeln!(o, "    ))");
    }
    o.push_str(&keepout_zone(layout, f, "  "));
    let _ = writeln!(o, ")");
    Ok(o.into_bytes())
}

/// The board file (`.kicad_pcb`): the coil centred at (100, 100) mm (also
/// the auxiliary origin, so plots in aux-origin coordinates share our
/// frame), its copper as tracks and arcs of net [`NET_1`], vias of net
/// [`NET_1`] with lands only on connected layers, the terminals in a small
/// net-tie footprint (pad "1" on [`NET_1`], pad "2" on [`NET_2`]) and the
/// board outline on Edge.Cuts.
pub fn board(design: &Design, layout: &Board) -> Result<Vec<u8>, ExportError> {
    let stem = super::gerber::file_stem(&design.name);
    let n = layout.layers;
    let kl = board_copper_layers(n);
    let f = Frame {
        dx: BOARD_ORIGIN_NM.0,
        dy: BOARD_ORIGIN_NM.1,
    };
    let origin = format!(
        "{} {}",
        format_mm(BOARD_ORIGIN_NM.0),
        format_mm(BOARD_ORIGIN_NM.1)
    );
    let thickness = design.stackup.finished_thickness();
    let mut o = String::new();
    let _ = writeln!(o, "(kicad_pcb (version 20211014) (generator coilwright)");
    let _ = writeln!(o, "  (general (thickness {}))", mm(thickness));
    let _ = writeln!(o, "  (paper \"A4\")");
    let _ = writeln!(o, "  (layers");
    for l in 1..=kl {
        let _ = writeln!(
            o,
            "    ({} {} signal)",
            copper_layer_id(l, kl),
            quote(&copper_layer_name(l, kl))
        );
    }
    for (id, name) in [
        (32, "B.Adhes"),
        (33, "F.Adhes"),
        (34, "B.Paste"),
        (35, "F.Paste"),
        (36, "B.SilkS"),
        (37, "F.SilkS"),
        (38, "B.Mask"),
        (39, "F.Mask"),
        (40, "Dwgs.User"),
        (41, "Cmts.User"),
        (44, "Edge.Cuts"),
        (45, "Margin"),
        (46, "B.CrtYd"),
        (47, "F.CrtYd"),
        (48, "B.Fab"),
        (49, "F.Fab"),
    ] {
        let _ = writeln!(o, "    ({id} \"{name}\" user)");
    }
    let _ = writeln!(o, "  )");
    let _ = writeln!(o, "  (setup");
    let _ = writeln!(o, "    (pad_to_mask_clearance 0)");
    let _ = writeln!(o, "    (aux_axis_origin {origin})");
    let _ = writeln!(o, "    (grid_origin {origin})");
    let _ = writeln!(o, "  )");
    let _ = writeln!(o, "  (net 0 \"\")");
    let array = layout.array_nets();
    match &array {
        Some(a) => {
            for (i, name) in a.names.iter().enumerate() {
                let _ = writeln!(o, "  (net {} {})", i + 1, quote(name));
            }
        }
        None => {
            let _ = writeln!(o, "  (net 1 {})", quote(NET_1));
            let _ = writeln!(o, "  (net 2 {})", quote(NET_2));
        }
    }

    // Terminals: a net-tie footprint at the coil centre, the one in the
    // footprint library (`terminals_footprint`) with the coil's nets.
    let _ = writeln!(
        o,
        "  (footprint {} (layer \"F.Cu\") (at {origin})",
        quote(&format!("coilwright:{}", terminals_name(&stem)))
    );
    terminals_body(&mut o, &stem, layout, true);
    let _ = writeln!(o, "  )");

    for s in &layout.outline.segments {
        let _ = writeln!(o, "  {}", graphic("gr", f, s, "Edge.Cuts", DRAWING_WIDTH));
    }
    for (i, t) in layout.tracks.iter().enumerate() {
        let layer = copper_layer_name(t.layer, n);
        let w = mm(t.width);
        let net = array.as_ref().map_or(1, |a| a.track[i]);
        let _ = match &t.segment {
            Segment::Line(l) => writeln!(
                o,
                "  (segment (start {}) (end {}) (width {w}) (layer \"{layer}\") (net {net}))",
                f.xy(l.start),
                f.xy(l.end)
            ),
            Segment::Arc(a) => writeln!(
                o,
                "  (arc {} (width {w}) (layer \"{layer}\") (net {net}))",
                f.arc(a)
            ),
        };
    }
    for (i, v) in layout.vias.iter().enumerate() {
        let net = array.as_ref().map_or(1, |a| a.via[i]);
        let _ = writeln!(
            o,
            "  (via (at {}) (size {}) (drill {}) (layers \"F.Cu\" \"B.Cu\") (remove_unused_layers) (net {net}))",
            f.xy(v.at),
            mm(v.diameter),
            mm(v.drill)
        );
    }
    let _ = writeln!(o, ")");
    Ok(o.into_bytes())
}

/// The board's project file (`.kicad_pro`, JSON): the design rules of the
/// board are the coil's own sizes (track width, clearance, via and hole
/// sizes), so KiCad's rule check measures the copper against them; the fab's
/// limits are checked by coilwright's own rule check.
pub fn project(design: &Design, layout: &Board) -> Result<Vec<u8>, ExportError> {
    let stem = super::gerber::file_stem(&design.name);
    let r = |x: f64| crate::geometry::round::nm_to_mm(to_nm(x));
    let min_drill = layout
        .vias
        .iter()
        .map(|v| v.drill)
        .chain(
            layout
                .pads
                .iter()
                .filter(|p| p.smd.is_none())
                .map(|p| p.drill),
        )
        .fold(f64::INFINITY, f64::min);
    let min_via = layout
        .vias
        .iter()
        .map(|v| v.diameter)
        .fold(design.via.diameter, f64::min);
    let min_ring = layout
        .vias
        .iter()
        .map(|v| (v.diameter - v.drill) / 2.0)
        .fold((design.via.diameter - design.via.drill) / 2.0, f64::min);
    let v = serde_json::json!({
        "board": {
            "design_settings": {
                "rules": {
                    "min_clearance": r(layout.clearance),
                    "min_track_width": r(layout.trace_width),
                    "min_through_hole_diameter": r(min_drill),
                    "min_via_diameter": r(min_via),
                    "min_via_annular_width": r(min_ring),
                    "min_hole_to_hole": r(layout.clearance),
                    "min_hole_clearance": r(layout.clearance),
                    "min_copper_edge_clearance": 0.0,
                    "min_microvia_diameter": r(min_via),
                    "min_microvia_drill": r(min_drill),
                    "allow_blind_buried_vias": false,
                    "allow_microvias": false,
                    "max_error": 0.005,
                },
            },
        },
        "meta": { "filename": format!("{stem}.kicad_pro"), "version": 1 },
        "net_settings": {
            "classes": [{
                "name": "Default",
                "clearance": r(layout.clearance),
                "track_width": r(layout.trace_width),
                "via_diameter": r(design.via.diameter),
                "via_drill": r(design.via.drill),
                "microvia_diameter": r(design.via.diameter),
                "microvia_drill": r(design.via.drill),
            }],
            "meta": { "version": 2 },
        },
    });
    serde_json::to_vec_pretty(&v)
        .map_err(|e| ExportError::Unrepresentable(format!("kicad project: {e}")))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::geometry::Arc;

    #[test]
    fn arcs_are_written_clockwise_on_screen() {
        // Counter-clockwise in our frame (y up) from (1, 0) to (0, 1): KiCad
        // draws start -> end clockwise on its y-down screen, so the file
        // starts at the end point, flipped: (0, -1), then (1, 0).
        let ccw = Arc::from_start(
            Point::ORIGIN,
            Point::new(1.0, 0.0),
            std::f64::consts::FRAC_PI_2,
        );
        assert_eq!(
            Frame::LOCAL.arc(&ccw),
            "(start 0 -1) (mid 0.707107 -0.707107) (end 1 0)"
        );
        let cw = Arc::from_start(
            Point::ORIGIN,
            Point::new(0.0, 1.0),
            -std::f64::consts::FRAC_PI_2,
        );
        assert_eq!(
            Frame::LOCAL.arc(&cw),
            "(start 0 -1) (mid 0.707107 -0.707107) (end 1 0)"
        );
    }

    #[test]
    fn horizontal_start_mid_chord_is_nudged_by_one_nanometre() {
        // From 120 deg clockwise to 0 deg: start and mid (60 deg) share y.
        let a = Arc::from_start(
            Point::ORIGIN,
            Point::polar(1.0, 2.0 * std::f64::consts::FRAC_PI_3),
            -2.0 * std::f64::consts::FRAC_PI_3,
        );
        assert_eq!(
            Frame::LOCAL.arc(&a),
            "(start -0.5 -0.866025) (mid 0.5 -0.866024) (end 1 0)"
        );
    }

    #[test]
    fn layer_names() {
        assert_eq!(copper_layer_name(1, 1), "F.Cu");
        assert_eq!(copper_layer_name(2, 2), "B.Cu");
        assert_eq!(copper_layer_name(3, 5), "In2.Cu");
        assert_eq!(board_copper_layers(1), 2);
        assert_eq!(board_copper_layers(3), 4);
        assert_eq!(board_copper_layers(8), 8);
    }
}
