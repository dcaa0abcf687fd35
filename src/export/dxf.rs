//! DXF drawings for mechanical CAD and for EDA programs that import DXF:
//! the board outline and each copper layer, written with the `dxf` crate
//! (AutoCAD 2000 format, ASCII, millimetres).
//!
//! # What is in the files
//! - `dxf/<name>-outline.dxf`: the closed board outline on DXF layer
//!   `OUTLINE` as `LINE` and `ARC` entities (true arcs, counter-clockwise
//!   as DXF draws them).
//! - `dxf/<name>-L<n>-copper.dxf`: copper layer `n` (1 = top).
//!   Tracks on DXF layer `TRACKS` as their centre lines: one `LWPOLYLINE`
//!   per run of connected tracks, with the track width as its constant
//!   width (group code 43) and arcs as true arcs (a vertex's bulge is
//!   tan(sweep / 4)). Round lands of vias and hole terminals on layer
//!   `PADS` as `CIRCLE`s of the land diameter, SMD pads there as closed
//!   `LWPOLYLINE` rectangles; finished holes on layer `HOLES` as `CIRCLE`s
//!   of the drill diameter.
//!
//! A reader that ignores polyline width still gets the exact centre lines,
//! so the copper length in the file equals the Gerber's.
//!
//! Every coordinate passes through [`crate::geometry::round::to_nm`], like
//! the other exporters. The header's dates are fixed and its GUIDs are
//! derived from the design name and file, so the same design always gives
//! the same bytes.

use super::ExportError;
use crate::design::Design;
use crate::geometry::round::{nm_to_mm, to_nm};
use crate::geometry::{Board, Point, Segment};
use ::dxf::entities::{Arc, Circle, Entity, EntityType, Line, LwPolyline};
use ::dxf::enums::{AcadVersion, DrawingUnits, Units};
use ::dxf::tables::Layer;
use ::dxf::{Color, Drawing, LwPolylineVertex};
use std::f64::consts::TAU;

/// DXF layer of the board outline.
pub const OUTLINE_LAYER: &str = "OUTLINE";
/// DXF layer of the track centre lines.
pub const TRACK_LAYER: &str = "TRACKS";
/// DXF layer of pad and via lands.
pub const PAD_LAYER: &str = "PADS";
/// DXF layer of finished holes.
pub const HOLE_LAYER: &str = "HOLES";

/// Path of the outline DXF in the output folder.
pub fn outline_file_name(stem: &str) -> String {
    format!("dxf/{stem}-outline.dxf")
}

/// Path of the copper DXF of `layer` (1 = top).
pub fn copper_file_name(stem: &str, layer: u8) -> String {
    format!("dxf/{stem}-L{layer}-copper.dxf")
}

/// A millimetre value on the nanometre grid.
fn mm(v: f64) -> f64 {
    nm_to_mm(to_nm(v))
}

fn point(p: Point) -> ::dxf::Point {
    ::dxf::Point::new(mm(p.x), mm(p.y), 0.0)
}

/// An empty drawing in millimetres with the given layers (and their
/// colour indices), its header fixed for reproducible output.
fn drawing(design: &Design, what: &str, layers: &[(&str, u8)]) -> Drawing {
    use chrono::TimeZone;
    let mut d = Drawing::new();
    d.header.version = AcadVersion::R2000;
    d.header.default_drawing_units = Units::Millimeters;
    d.header.drawing_units = DrawingUnits::Metric;
    // DXF dates count days from 1900-01-01 local time: the fixed date is
    // that epoch plus 36 524 days (2000-01-01), the same number in every
    // time zone.
    let days = chrono::Duration::days(36_524);
    let local = chrono::Local
        .with_ymd_and_hms(1900, 1, 1, 0, 0, 0)
        .earliest()
        .map(|e| e + days);
    let utc = chrono::Utc.with_ymd_and_hms(1900, 1, 1, 0, 0, 0).unwrap() + days;
    if let Some(local) = local {
        d.header.creation_date = local;
        d.header.update_date = local;
    }
    d.header.creation_date_universal = utc;
    d.header.update_date_universal = utc;
    d.header.fingerprint_guid = guid(&format!("{}/{what}/fingerprint", design.name));
    d.header.version_guid = guid(&format!("{}/{what}/version", design.name));
    for &(name, colour) in layers {
        d.add_layer(Layer {
            name: name.into(),
            color: Color::from_index(colour),
            ..Default::default()
        });
    }
    d
}

/// A GUID made from the SHA-256 of `text` (stable across runs).
fn guid(text: &str) -> uuid::Uuid {
    use sha2::{Digest, Sha256};
    let h = Sha256::digest(text.as_bytes());
    let mut b = [0u8; 16];
    b.copy_from_slice(&h[..16]);
    uuid::Builder::from_random_bytes(b).into_uuid()
}

fn add(d: &mut Drawing, layer: &str, specific: EntityType) {
    let mut e = Entity::new(specific);
    e.common.layer = layer.into();
    d.add_entity(e);
}

fn save(d: &Drawing) -> Result<Vec<u8>, ExportError> {
    let mut out = Vec::new();
    d.save(&mut out)
        .map_err(|e| ExportError::Unrepresentable(format!("dxf: {e}")))?;
    Ok(out)
}

/// One segment as a DXF `LINE` or `ARC` entity.
fn segment_entity(s: &Segment) -> EntityType {
    match s {
        Segment::Line(l) => EntityType::Line(Line::new(point(l.start), point(l.end))),
        Segment::Arc(a) => {
            // DXF arcs run counter-clockwise from start to end angle.
            let (from, to) = if a.sweep >= 0.0 {
                (a.start, a.end)
            } else {
                (a.end, a.start)
            };
            let deg = |p: Point| (p - a.center).angle().rem_euclid(TAU).to_degrees();
            EntityType::Arc(Arc::new(
                point(a.center),
                mm(a.radius()),
                deg(from),
                deg(to),
            ))
        }
    }
}

/// The outline drawing: every outline segment as a `LINE` or `ARC`.
pub fn outline(design: &Design, layout: &Board) -> Result<Vec<u8>, ExportError> {
    let mut d = drawing(design, "outline", &[(OUTLINE_LAYER, 7)]);
    for s in &layout.outline.segments {
        add(&mut d, OUTLINE_LAYER, segment_entity(s));
    }
    save(&d)
}

/// A polyline vertex at `p` whose next piece has the bulge `bulge`.
fn vertex(p: Point, bulge: f64) -> LwPolylineVertex {
    LwPolylineVertex {
        x: mm(p.x),
        y: mm(p.y),
        bulge,
        ..Default::default()
    }
}

/// Bulge of a segment: 0 for a line, tan(sweep / 4) for an arc (signed,
/// positive counter-clockwise).
fn bulge(s: &Segment) -> f64 {
    match s {
        Segment::Line(_) => 0.0,
        Segment::Arc(a) => (a.sweep / 4.0).tan(),
    }
}

/// Runs of connected segments of equal width: each run starts where a
/// segment does not begin at the previous one's end (on the nanometre
/// grid) or changes width.
fn runs<'a>(tracks: impl Iterator<Item = (&'a Segment, f64)>) -> Vec<(Vec<Segment>, f64)> {
    let key = |p: Point| (to_nm(p.x), to_nm(p.y));
    let mut out: Vec<(Vec<Segment>, f64)> = Vec::new();
    for (s, w) in tracks {
        match out.last_mut() {
            Some((segs, width))
                if to_nm(*width) == to_nm(w)
                    && segs.last().map(|l| key(l.end())) == Some(key(s.start())) =>
            {
                segs.push(*s)
            }
            _ => out.push((vec![*s], w)),
        }
    }
    out
}

/// The copper drawing of `layer` (1 = top): track centre lines as
/// width-carrying polylines, lands and holes as circles.
pub fn copper(design: &Design, layout: &Board, layer: u8) -> Result<Vec<u8>, ExportError> {
    let mut d = drawing(
        design,
        &format!("copper-{layer}"),
        &[(TRACK_LAYER, 1), (PAD_LAYER, 3), (HOLE_LAYER, 5)],
    );
    for (segs, width) in runs(layout.tracks_on(layer).map(|t| (&t.segment, t.width))) {
        let mut poly = LwPolyline {
            constant_width: mm(width),
            ..Default::default()
        };
        for s in &segs {
            poly.vertices.push(vertex(s.start(), bulge(s)));
        }
        if let Some(last) = segs.last() {
            poly.vertices.push(vertex(last.end(), 0.0));
        }
        add(&mut d, TRACK_LAYER, EntityType::LwPolyline(poly));
    }
    let circle = |d: &mut Drawing, l: &str, at: Point, dia: f64| {
        add(
            d,
            l,
            EntityType::Circle(Circle::new(point(at), mm(dia / 2.0))),
        )
    };
    for v in layout.vias.iter().filter(|v| v.joins.contains(&layer)) {
        circle(&mut d, PAD_LAYER, v.at, v.diameter);
    }
    for p in &layout.pads {
        match &p.smd {
            Some(s) if s.layer == layer => {
                let mut poly = LwPolyline::default();
                poly.set_is_closed(true);
                for c in s.corners(p.at) {
                    poly.vertices.push(vertex(c, 0.0));
                }
                add(&mut d, PAD_LAYER, EntityType::LwPolyline(poly));
            }
            Some(_) => {}
            None => circle(&mut d, PAD_LAYER, p.at, p.diameter),
        }
    }
    for v in &layout.vias {
        circle(&mut d, HOLE_LAYER, v.at, v.drill);
    }
    for p in layout.pads.iter().filter(|p| p.smd.is_none()) {
        circle(&mut d, HOLE_LAYER, p.at, p.drill);
    }
    save(&d)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::Design;
    use crate::geometry::build;

    fn text(bytes: &[u8]) -> String {
        String::from_utf8(bytes.to_vec()).unwrap()
    }

    #[test]
    fn same_design_same_bytes_and_readable_back() {
        let design = Design::sample();
        let board = build(&design).unwrap();
        let a = copper(&design, &board, 1).unwrap();
        let b = copper(&design, &board, 1).unwrap();
        assert_eq!(a, b);
        let back = Drawing::load(&mut a.as_slice()).unwrap();
        // Track length read back equals the board's, to the rounding.
        let mut length = 0.0;
        for e in back.entities() {
            if let EntityType::LwPolyline(p) = &e.specific {
                for w in p.vertices.windows(2) {
                    let chord = ((w[1].x - w[0].x).powi(2) + (w[1].y - w[0].y).powi(2)).sqrt();
                    let t = 4.0 * w[0].bulge.atan(); // sweep
                    length += if t.abs() < 1e-15 {
                        chord
                    } else {
                        chord / 2.0 / (t / 2.0).sin().abs() * t.abs()
                    };
                }
            }
        }
        let want: f64 = board.tracks_on(1).map(|t| t.segment.length()).sum();
        assert!((length - want).abs() < 1e-5 * want, "{length} vs {want}");
        assert!(text(&a).contains("LWPOLYLINE"));
    }

    #[test]
    fn outline_uses_true_arcs_for_a_round_board() {
        let design = Design::sample();
        let board = build(&design).unwrap();
        let t = text(&outline(&design, &board).unwrap());
        let arcs = board
            .outline
            .segments
            .iter()
            .filter(|s| matches!(s, Segment::Arc(_)))
            .count();
        assert_eq!(
            t.matches("\nARC\r\n").count() + t.matches("\nARC\n").count(),
            arcs
        );
    }

    #[test]
    fn file_names_follow_the_scheme() {
        assert_eq!(outline_file_name("c"), "dxf/c-outline.dxf");
        assert_eq!(copper_file_name("c", 2), "dxf/c-L2-copper.dxf");
    }
}
