//! The coil as a part of the user's KiCad project: a schematic symbol
//! library (`kicad/<name>.kicad_sym`, KiCad 6 s-expressions) whose symbol
//! is linked to the footprint (`Footprint` property `coilwright:<name>`),
//! and the project library tables (`kicad/sym-lib-table`,
//! `kicad/fp-lib-table`) that register both libraries under the nickname
//! [`LIBRARY`] with paths relative to the project (`${KIPRJMOD}`).
//!
//! The symbol is an inductor of our own drawing: four half-circle humps
//! between two passive pins numbered "1" and "2", the footprint's pad
//! names, so the schematic's nets land on the coil's terminals. An array
//! (a stator) is a box with one passive pin per terminal brought out, named
//! and numbered as its footprint pad ("A", "B", "C", "N"; "A1", "A2" ...):
//! phase starts on the left, star point and phase ends on the right.

use super::ExportError;
use super::gerber::REFDES;
use super::kicad::quote;
use crate::design::Design;
use crate::geometry::Board;
use std::fmt::Write as _;

/// Nickname of the symbol and footprint libraries in the tables.
pub const LIBRARY: &str = "coilwright";

/// Path of the symbol library.
pub fn symbol_file_name(stem: &str) -> String {
    format!("kicad/{stem}.kicad_sym")
}

/// Path of the project's symbol library table.
pub const SYM_TABLE: &str = "kicad/sym-lib-table";

/// Path of the project's footprint library table.
pub const FP_TABLE: &str = "kicad/fp-lib-table";

/// A property of the symbol; `hide` for those not shown on the sheet.
fn property(o: &mut String, id: u8, key: &str, value: &str, y: f64, hide: bool) {
    let _ = writeln!(
        o,
        "    (property {} {} (id {id}) (at 0 {y} 0)\n      (effects (font (size 1.27 1.27)){})\n    )",
        quote(key),
        quote(value),
        if hide { " hide" } else { "" }
    );
}

/// The symbol library: one symbol named after the design, linked to its
/// footprint. Symbol coordinates in mm on KiCad's 1.27 mm grid.
pub fn symbol(design: &Design, layout: &Board) -> Result<Vec<u8>, ExportError> {
    let stem = super::gerber::file_stem(&design.name);
    let c = &design.coil;
    let mut o = String::new();
    let _ = writeln!(
        o,
        "(kicad_symbol_lib (version 20211014) (generator coilwright)"
    );
    let terminals: Vec<&str> = layout
        .buses
        .iter()
        .filter_map(|b| b.terminal.as_deref())
        .collect();
    // A coil's two pins need no names; an array's pins are its phases.
    let _ = writeln!(
        o,
        "  (symbol {} (pin_numbers hide) (pin_names (offset 1.016){}) (in_bom yes) (on_board yes)",
        quote(&stem),
        if terminals.is_empty() { " hide" } else { "" }
    );
    let (ref_y, value_y) = if terminals.is_empty() {
        (2.54, -2.54)
    } else {
        let (top, bottom) = array_box(&terminals);
        (top + 1.27, bottom - 1.27)
    };
    property(&mut o, 0, "Reference", &REFDES[..1], ref_y, false);
    property(&mut o, 1, "Value", &stem, value_y, false);
    property(
        &mut o,
        2,
        "Footprint",
        &format!("{LIBRARY}:{stem}"),
        -5.08,
        true,
    );
    property(&mut o, 3, "Datasheet", "", -7.62, true);
    property(
        &mut o,
        4,
        "ki_description",
        &format!(
            "Printed coil {}: {} layers, {} turns per layer, outer {} (coilwright)",
            design.name,
            c.layers,
            c.turns_text(),
            c.outer_size_text()
        ),
        -10.16,
        true,
    );
    property(
        &mut o,
        5,
        "ki_keywords",
        "coil inductor printed",
        -12.7,
        true,
    );
    if terminals.is_empty() {
        coil_body(&mut o, &stem);
    } else {
        array_body(&mut o, &stem, &terminals);
    }
    let _ = writeln!(o, "  )");
    let _ = writeln!(o, ")");
    Ok(o.into_bytes())
}

/// Graphics and pins of a coil alone: four humps between pins "1" and "2".
fn coil_body(o: &mut String, stem: &str) {
    // Body: four humps from x = -5.08 to 5.08 on the axis, bulging up.
    let _ = writeln!(o, "    (symbol {}", quote(&format!("{stem}_0_1")));
    for k in 0..4 {
        let x0 = -5.08 + 2.54 * f64::from(k);
        let _ = writeln!(
            o,
            "      (arc (start {} 0) (mid {} 1.27) (end {} 0)\n        (stroke (width 0.254) (type default) (color 0 0 0 0))\n        (fill (type none))\n      )",
            fmt(x0 + 2.54),
            fmt(x0 + 1.27),
            fmt(x0)
        );
    }
    let _ = writeln!(o, "    )");
    // Pins: 1 on the left, 2 on the right, passive, as the footprint's pads.
    let _ = writeln!(o, "    (symbol {}", quote(&format!("{stem}_1_1")));
    for (name, x, angle) in [("1", -7.62, 0), ("2", 7.62, 180)] {
        pin(o, name, x, 0.0, angle);
    }
    let _ = writeln!(o, "    )");
}

/// Graphics and pins of an array: a box, phase starts on the left, the
/// star point and phase ends ("N", "A2" ...) on the right, 2.54 mm apart.
fn array_body(o: &mut String, stem: &str, terminals: &[&str]) {
    let (l, r) = array_sides(terminals);
    let (top, bottom) = array_box(terminals);
    let _ = writeln!(o, "    (symbol {}", quote(&format!("{stem}_0_1")));
    let _ = writeln!(
        o,
        "      (rectangle (start -5.08 {}) (end 5.08 {})\n        (stroke (width 0.254) (type default) (color 0 0 0 0))\n        (fill (type background))\n      )",
        fmt(top),
        fmt(bottom)
    );
    let _ = writeln!(o, "    )");
    let _ = writeln!(o, "    (symbol {}", quote(&format!("{stem}_1_1")));
    for (side, x, angle) in [(&l, -7.62, 0), (&r, 7.62, 180)] {
        for (k, name) in side.iter().enumerate() {
            pin(o, name, x, top - 2.54 * (k as f64 + 1.0), angle);
        }
    }
    let _ = writeln!(o, "    )");
}

/// An array's pins on the left (phase starts) and on the right (the star
/// point "N" and phase ends "A2" ...).
fn array_sides<'a>(terminals: &[&'a str]) -> (Vec<&'a str>, Vec<&'a str>) {
    terminals
        .iter()
        .copied()
        .partition(|t| !(*t == "N" || t.ends_with('2')))
}

/// Top and bottom of an array's box, mm on the symbol grid: a pin row per
/// terminal on the longer side and half a row above and below.
fn array_box(terminals: &[&str]) -> (f64, f64) {
    let (l, r) = array_sides(terminals);
    let rows = l.len().max(r.len()) as f64;
    let top = 2.54 * ((rows - 1.0) / 2.0).ceil() + 2.54;
    (top, top - 2.54 * (rows + 1.0))
}

/// A passive pin named and numbered `name` at (`x`, `y`), pointing `angle`.
fn pin(o: &mut String, name: &str, x: f64, y: f64, angle: u16) {
    let _ = writeln!(
        o,
        "      (pin passive line (at {} {} {angle}) (length 2.54)\n        (name {} (effects (font (size 1.27 1.27))))\n        (number {} (effects (font (size 1.27 1.27))))\n      )",
        fmt(x),
        fmt(y),
        quote(name),
        quote(name)
    );
}

/// A number on the symbol grid, without float noise ("-5.08", "1.27", "0").
fn fmt(v: f64) -> String {
    let s = format!("{:.3}", (v * 1000.0).round() / 1000.0);
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" { "0".into() } else { s.into() }
}

/// A project library table (`sym` or `fp`) naming one library.
fn table(kind: &str, uri: &str, descr: &str) -> Vec<u8> {
    format!(
        "({kind}_lib_table\n  (lib (name {})(type \"KiCad\")(uri {})(options \"\")(descr {}))\n)\n",
        quote(LIBRARY),
        quote(uri),
        quote(descr)
    )
    .into_bytes()
}

/// `sym-lib-table`: the symbol library of this coil, as `coilwright`.
pub fn symbol_table(design: &Design) -> Vec<u8> {
    let stem = super::gerber::file_stem(&design.name);
    table(
        "sym",
        &format!("${{KIPRJMOD}}/{stem}.kicad_sym"),
        &format!("coilwright: symbol of the printed coil {}", design.name),
    )
}

/// `fp-lib-table`: the footprint library of this coil, as `coilwright`.
pub fn footprint_table(design: &Design) -> Vec<u8> {
    let stem = super::gerber::file_stem(&design.name);
    table(
        "fp",
        &format!("${{KIPRJMOD}}/{stem}.pretty"),
        &format!("coilwright: footprint of the printed coil {}", design.name),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn symbol_links_its_footprint_and_has_two_pins() {
        let d = Design::sample();
        let b = crate::geometry::build(&d).unwrap();
        let text = String::from_utf8(symbol(&d, &b).unwrap()).unwrap();
        let stem = super::super::gerber::file_stem(&d.name);
        assert!(text.contains(&format!("\"Footprint\" \"coilwright:{stem}\"")));
        assert_eq!(text.matches("(pin passive line").count(), 2);
        assert!(text.contains("(number \"1\"") && text.contains("(number \"2\""));
        assert_eq!(text.matches('(').count(), text.matches(')').count());
        assert_eq!(fmt(-5.08 + 2.54 * 3.0), "2.54");
        let t = String::from_utf8(symbol_table(&d)).unwrap();
        assert!(t.starts_with("(sym_lib_table\n  (lib (name \"coilwright\")"));
        assert!(t.contains(&format!("${{KIPRJMOD}}/{stem}.kicad_sym")));
    }

    #[test]
    fn a_stator_symbol_has_a_pin_per_terminal() {
        let text = include_str!("../../examples/fan-stator.toml");
        let (d, b) = crate::pipeline::parse_and_build(text).unwrap();
        let text = String::from_utf8(symbol(&d, &b).unwrap()).unwrap();
        for name in ["A", "B", "C", "N"] {
            assert!(text.contains(&format!("(number \"{name}\"")), "{name}");
        }
        assert_eq!(text.matches("(pin passive line").count(), 4);
        assert!(!text.contains("(pin_names (offset 1.016) hide)"));
        assert_eq!(text.matches('(').count(), text.matches(')').count());
    }
}
