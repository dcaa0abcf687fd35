//! Excellon drill files: plated holes (vias and terminal pads) in one file,
//! non-plated holes in another (a coil has none today, so that file is only
//! written when there are any).
//!
//! Metric, absolute, decimal coordinates with up to six decimals: the same
//! nanometre values as the Gerber files ([`crate::geometry::round::to_nm`]).
//! The header carries the X2 attributes as `; #@! ` comments, as the Gerber
//! specification recommends for drill files; plating is stated there
//! (`TF.FileFunction,Plated,...` / `NonPlated`) and by the file name. The
//! other header comment is our own wording; the commands (`M48`, `FMAT,2`,
//! `METRIC`, tools, `G05`, `M30`) are as the Excellon format defines them.

use crate::geometry::round::{format_mm, point_nm, to_nm};
use crate::geometry::{Board, Point};
use std::fmt::Write as _;

/// Path of the plated-holes drill file.
pub fn plated_file_name(stem: &str) -> String {
    format!("fab/{stem}-plated.drl")
}

/// Path of the non-plated-holes drill file.
pub fn non_plated_file_name(stem: &str) -> String {
    format!("fab/{stem}-nonplated.drl")
}

/// Integer nanometres as a decimal millimetre number that always has a
/// decimal point (without one, Excellon readers apply an implied format).
fn dec(nm: i64) -> String {
    let s = format_mm(nm);
    if s.contains('.') { s } else { format!("{s}.0") }
}

/// One hole to drill.
struct Hit {
    at: Point,
    drill_nm: i64,
    function: &'static str,
}

/// `.FileFunction` value of the plated file (as in the job file).
pub fn plated_function(layers: u8) -> String {
    format!("Plated,1,{layers},PTH")
}

/// The plated through holes: vias (`ViaDrill`) and terminal pads
/// (`ComponentDrill`), one tool per function and finished diameter, tools
/// numbered in ascending diameter.
pub fn plated(layout: &Board) -> Vec<u8> {
    let mut hits: Vec<Hit> = layout
        .vias
        .iter()
        .map(|v| Hit {
            at: v.at,
            drill_nm: to_nm(v.drill),
            function: "ViaDrill",
        })
        .collect();
    hits.extend(layout.pads.iter().filter(|p| p.smd.is_none()).map(|p| Hit {
        at: p.at,
        drill_nm: to_nm(p.drill),
        function: "ComponentDrill",
    }));
    write_file(
        &layout.name,
        &plated_function(layout.layers),
        "Plated,PTH",
        &hits,
    )
}

fn write_file(name: &str, file_function: &str, tool_prefix: &str, hits: &[Hit]) -> Vec<u8> {
    let mut tools: Vec<(i64, &'static str)> =
        hits.iter().map(|h| (h.drill_nm, h.function)).collect();
    tools.sort();
    tools.dedup();
    let mut s = String::new();
    let _ = writeln!(s, "M48");
    let plated = tool_prefix.starts_with("Plated");
    let _ = writeln!(
        s,
        "; coilwright drill data for {name}: {} holes, millimetres, absolute coordinates with a decimal point",
        if plated { "plated" } else { "non-plated" }
    );
    let _ = writeln!(
        s,
        "; #@! TF.GenerationSoftware,coilwright,coilwright,{}",
        env!("CARGO_PKG_VERSION")
    );
    let _ = writeln!(s, "; #@! TF.FileFunction,{file_function}");
    let _ = writeln!(s, "; #@! TF.FilePolarity,Positive");
    let _ = writeln!(
        s,
        "; #@! TF.SameCoordinates,{}",
        super::gerber::file_stem(name)
    );
    let _ = writeln!(s, "FMAT,2");
    let _ = writeln!(s, "METRIC");
    for (i, (d, f)) in tools.iter().enumerate() {
        let _ = writeln!(s, "; #@! TA.AperFunction,{tool_prefix},{f}");
        let _ = writeln!(s, "T{}C{}", i + 1, dec(*d));
    }
    let _ = writeln!(s, "%");
    let _ = writeln!(s, "G05");
    for (i, tool) in tools.iter().enumerate() {
        let _ = writeln!(s, "T{}", i + 1);
        for h in hits.iter().filter(|h| (h.drill_nm, h.function) == *tool) {
            let (x, y) = point_nm(h.at);
            let _ = writeln!(s, "X{}Y{}", dec(x), dec(y));
        }
    }
    let _ = writeln!(s, "M30");
    s.into_bytes()
}

/// The non-plated holes, or `None` when the layout has none (a coil layout
/// has only plated holes today).
pub fn non_plated(_layout: &Board) -> Option<Vec<u8>> {
    None
}
