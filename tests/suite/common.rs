//! Helpers shared by the integration tests (each test file includes the
//! ones it needs with `mod common;`).
#![allow(dead_code)]

use coilwright::design::Design;
use coilwright::rules::Profile;
use std::path::Path;
use std::process::Command;

/// Runs the built binary: (exit code, stdout, stderr).
pub fn coilwright(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_coilwright"))
        .args(args)
        .output()
        .expect("run coilwright");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into(),
        String::from_utf8_lossy(&out.stderr).into(),
    )
}

/// A profile made of the design's own values: its track width and
/// clearance, its smaller drill and ring, its clearance as hole spacing
/// (the generator keeps pads a clearance apart, so holes are farther) and
/// its board margin as edge clearance.
pub fn own_profile(d: &Design) -> Profile {
    Profile::from_limits(
        "own",
        [
            ("min_trace_width", d.coil.trace_width),
            ("min_clearance", d.coil.clearance),
            ("min_drill", d.via.drill.min(d.terminal.drill)),
            (
                "min_annular_ring",
                ((d.via.diameter - d.via.drill) / 2.0)
                    .min((d.terminal.diameter - d.terminal.drill) / 2.0),
            ),
            ("min_hole_spacing", d.coil.clearance),
            ("min_edge_clearance", d.board.margin),
        ],
    )
    .expect("every limit set")
}

/// The names in a folder, sorted.
pub fn entries(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

/// The README's example sweep (585 candidates of the fin example), without
/// the design file and `-o`.
pub const README_SWEEP: &[&str] = &[
    "--vary",
    "layers=2,4,6",
    "--vary",
    "turns=6..30:2",
    "--vary",
    "trace_width=0.1mm..0.2mm:0.05mm",
    "--vary",
    "outer_diameter=12mm..20mm:2mm",
    "--require",
    "temperature_c <= 80",
    "--require",
    "outer_diameter_mm <= 20",
    "--maximize",
    "force_per_sqrt_w_n",
];

/// A design text whose `[rotor]` keeps only its `poles` (the fan-stator
/// example's magnets are sized for its own 6 poles: at other pole counts
/// they would overlap).
pub fn poles_only(text: &str) -> String {
    let mut in_rotor = false;
    let mut out = String::new();
    for line in text.lines() {
        if line.starts_with('[') {
            in_rotor = line.trim() == "[rotor]";
        }
        let magnet_key = in_rotor && !line.starts_with('[') && !line.starts_with("poles");
        if !magnet_key || line.trim().is_empty() {
            out.push_str(line);
            out.push('\n');
        }
    }
    out
}

/// The example's coil on a `rows` x `columns` grid, one phase, a gentle
/// drive.
pub fn grid(rows: u32, columns: u32, pitch_x: &str, pitch_y: &str) -> String {
    let stator = include_str!("../../examples/fan-stator.toml");
    let head = &stator[..stator.find("[array]").unwrap()];
    format!(
        "{head}[array]\narrangement = \"grid\"\nrows = {rows}\ncolumns = {columns}\npitch_x = \"{pitch_x}\"\npitch_y = \"{pitch_y}\"\n\n[drive]\ncurrent = \"0.05A\"\n"
    )
}
