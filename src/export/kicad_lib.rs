//! The coil as a part of the user's KiCad project: a schematic symbol
//! library (`kicad/<name>.kicad_sym`, KiCad 6 s-expressions) whose symbol
//! is linked to the footprint (`Footprint` property `coilwright:<name>`),
//! and the project library tables (`kicad/sym-lib-table`,
//! `kicad/fp-lib-table`) that register both libraries under the nickname
//! [`LIBRARY`] with paths relative to the project (`${KIPRJMOD}`).
//!
//! The symbol is an inductor of our own drawing: four half-circle humps
//! between two passive pins numbered "1" and "2", the footprint's pad
//! names, so the schematic's nets land on the coil's terminals.

use super::ExportError;
use super::gerber::REFDES;
use super::kicad::quote;
use crate::design::Design;
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
pub fn symbol(design: &Design) -> Result<Vec<u8>, ExportError> {
    let stem = super::gerber::file_stem(&design.name);
    let c = &design.coil;
    let mut o = String::new();
    let _ = writeln!(
        o,
        "(kicad_symbol_lib (version 20211014) (generator coilwright)"
    );
    let _ = writeln!(
        o,
        "  (symbol {} (pin_numbers hide) (pin_names (offset 1.016) hide) (in_bom yes) (on_board yes)",
        quote(&stem)
    );
    property(&mut o, 0, "Reference", &REFDES[..1], 2.54, false);
    property(&mut o, 1, "Value", &stem, -2.54, false);
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
        let _ = writeln!(
            o,
            "      (pin passive line (at {} 0 {angle}) (length 2.54)\n        (name {} (effects (font (size 1.27 1.27))))\n        (number {} (effects (font (size 1.27 1.27))))\n      )",
            fmt(x),
            quote(name),
            quote(name)
        );
    }
    let _ = writeln!(o, "    )");
    let _ = writeln!(o, "  )");
    let _ = writeln!(o, ")");
    Ok(o.into_bytes())
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
        let text = String::from_utf8(symbol(&d).unwrap()).unwrap();
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
}
