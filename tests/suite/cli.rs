//! The command line end to end: the bad-input catalogue (every case exits 2,
//! names its key and line:column, writes nothing), overwrite protection,
//! and the shape of the JSON outputs.

use super::common::entries;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

const BIN: &str = env!("CARGO_BIN_EXE_coilwright");

/// A valid four-layer design the catalogue mutates.
const BASE: &str = r#"name = "catalogue"

[coil]
shape = "circle"
outer_diameter = "16mm"
turns = 20
trace_width = "0.1mm"
clearance = "0.1mm"
layers = 4

[stackup]
kind = "flex"
copper = "1oz"

[magnet]
diameter = "5mm"
thickness = "2mm"
remanence = "1.3T"
gap = "0.5mm"

[drive]
voltage = "1.5V"
"#;

fn run(dir: &Path, args: &[&str]) -> Output {
    Command::new(BIN)
        .args(args)
        .current_dir(dir)
        .env("NO_COLOR", "1")
        .output()
        .expect("run coilwright")
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// Replaces `from` (which must occur) by `to` in the base design.
fn mutate(from: &str, to: &str) -> String {
    assert!(BASE.contains(from), "{from}");
    BASE.replacen(from, to, 1)
}

struct Case {
    what: &'static str,
    text: String,
    key: &'static str,
    /// Text at which the error must point (its line and column); a `|`
    /// marks the exact position inside it.
    at: &'static str,
    /// Further text the message must contain.
    says: &'static str,
}

fn case(
    what: &'static str,
    text: String,
    key: &'static str,
    at: &'static str,
    says: &'static str,
) -> Case {
    Case {
        what,
        text,
        key,
        at,
        says,
    }
}

fn catalogue() -> Vec<Case> {
    vec![
        case(
            "negative length",
            mutate("trace_width = \"0.1mm\"", "trace_width = \"-0.1mm\""),
            "coil.trace_width",
            "trace_width = |\"-0.1mm\"",
            "negative",
        ),
        case(
            "zero clearance",
            mutate("clearance = \"0.1mm\"", "clearance = 0"),
            "coil.clearance",
            "clearance = |0",
            "greater than zero",
        ),
        case(
            "NaN",
            mutate("trace_width = \"0.1mm\"", "trace_width = nan"),
            "coil.trace_width",
            "trace_width = |nan",
            "finite",
        ),
        case(
            "infinity",
            mutate("outer_diameter = \"16mm\"", "outer_diameter = inf"),
            "coil.outer_diameter",
            "= |inf",
            "finite",
        ),
        case(
            "NaN in a string",
            mutate("gap = \"0.5mm\"", "gap = \"nan mm\""),
            "magnet.gap",
            "\"nan mm\"",
            "finite",
        ),
        case(
            "bad unit",
            mutate("trace_width = \"0.1mm\"", "trace_width = \"3furlong\""),
            "coil.trace_width",
            "\"3furlong\"",
            "furlong",
        ),
        case(
            "unknown key",
            mutate("trace_width", "trace_widht"),
            "coil.trace_widht",
            "|trace_widht",
            "did you mean `trace_width`",
        ),
        case(
            "unknown table",
            mutate("[magnet]", "[magnit]"),
            "magnit",
            "[|magnit]",
            "did you mean `magnet`",
        ),
        case(
            "unknown shape",
            mutate("shape = \"circle\"", "shape = \"circel\""),
            "coil.shape",
            "\"circel\"",
            "did you mean \"circle\"",
        ),
        case(
            "polygon with 2 sides",
            mutate("shape = \"circle\"", "shape = \"polygon\"\nsides = 2"),
            "coil.sides",
            "sides = |2",
            "must be 3 to 12",
        ),
        case(
            "polygon with 13 sides",
            mutate("shape = \"circle\"", "shape = \"polygon\"\nsides = 13"),
            "coil.sides",
            "sides = |13",
            "must be 3 to 12",
        ),
        case(
            "zero layers",
            mutate("layers = 4", "layers = 0"),
            "coil.layers",
            "layers = |0",
            "must be 1 to 32",
        ),
        case(
            "33 layers",
            mutate("layers = 4", "layers = 33"),
            "coil.layers",
            "layers = |33",
            "must be 1 to 32",
        ),
        case(
            "turns that do not fit",
            mutate("turns = 20", "turns = 60"),
            "coil.turns",
            "turns = |60",
            "at most 36.50 fit",
        ),
        case(
            "inner diameter too small for the centre vias",
            mutate("turns = 20", "inner_diameter = \"0.3mm\""),
            "coil.inner_diameter",
            "\"0.3mm\"",
            "minimum is",
        ),
        case(
            "three of outer, inner and turns",
            mutate("turns = 20", "turns = 20\ninner_diameter = \"4mm\""),
            "coil",
            "\"4mm\"",
            "exactly two",
        ),
        case(
            "TOML syntax error",
            mutate("[stackup]", "[stackup"),
            "syntax",
            "[stackup|\n",
            "TOML syntax error",
        ),
        case(
            "parallel-pairs with odd layers",
            mutate("layers = 4", "layers = 3\nwiring = \"parallel-pairs\""),
            "coil.wiring",
            "\"parallel-pairs\"",
            "even number of layers",
        ),
        case(
            "wrong number of copper values",
            mutate("copper = \"1oz\"", "copper = [\"1oz\", \"1oz\"]"),
            "stackup.copper",
            "[\"1oz\"",
            "needs 4",
        ),
        case(
            "missing required key",
            mutate("trace_width = \"0.1mm\"\n", ""),
            "coil.trace_width",
            "[|coil]",
            "required",
        ),
        case(
            "voltage and current",
            mutate("voltage = \"1.5V\"", "voltage = \"1.5V\"\ncurrent = \"1A\""),
            "drive.current",
            "\"1A\"",
            "not both",
        ),
        case(
            "negative temperature below absolute zero",
            mutate(
                "voltage = \"1.5V\"",
                "voltage = \"1.5V\"\nambient = \"-300C\"",
            ),
            "drive.ambient",
            "\"-300C\"",
            "absolute zero",
        ),
        case(
            "duty of zero",
            mutate(
                "voltage = \"1.5V\"",
                "voltage = \"1.5V\"\nwaveform = \"square\"\nfrequency = \"5Hz\"\nduty = 0",
            ),
            "drive.duty",
            "duty = |0",
            "above 0 up to 1",
        ),
        case(
            "duty above one",
            mutate(
                "voltage = \"1.5V\"",
                "voltage = \"1.5V\"\nwaveform = \"pulse\"\nfrequency = \"5Hz\"\nduty = 1.5",
            ),
            "drive.duty",
            "duty = |1.5",
            "out of range",
        ),
        case(
            "waveform without frequency",
            mutate(
                "voltage = \"1.5V\"",
                "voltage = \"1.5V\"\nwaveform = \"square\"",
            ),
            "drive.waveform",
            "\"square\"",
            "needs drive.frequency",
        ),
        case(
            "air speed without moving air",
            mutate("voltage = \"1.5V\"", "voltage = \"1.5V\"\nair_speed = \"2m/s\""),
            "drive.air_speed",
            "\"2m/s\"",
            "moving-air",
        ),
        case(
            "load point beyond the fin",
            format!("{BASE}\n[fin]\nfree_length = \"20mm\"\nwidth = \"14mm\"\nload_at = \"25mm\"\n"),
            "fin.load_at",
            "\"25mm\"",
            "beyond free_length",
        ),
        case(
            "zero fin length",
            format!("{BASE}\n[fin]\nfree_length = 0\nwidth = \"14mm\"\n"),
            "fin.free_length",
            "free_length = |0",
            "greater than zero",
        ),
        case(
            "negative added mass",
            format!("{BASE}\n[fin]\nfree_length = \"20mm\"\nwidth = \"14mm\"\nadded_mass = \"-0.1g\"\n"),
            "fin.added_mass",
            "\"-0.1g\"",
            "negative",
        ),
        case(
            "zero damping",
            format!("{BASE}\n[fin]\nfree_length = \"20mm\"\nwidth = \"14mm\"\ndamping_ratio = 0\n"),
            "fin.damping_ratio",
            "damping_ratio = |0",
            "out of range",
        ),
        case(
            "fin without a magnet",
            format!(
                "{}\n[fin]\nfree_length = \"20mm\"\nwidth = \"14mm\"\n",
                BASE.replace(
                    "[magnet]\ndiameter = \"5mm\"\nthickness = \"2mm\"\nremanence = \"1.3T\"\ngap = \"0.5mm\"\n",
                    ""
                )
            ),
            "fin",
            "[|fin]",
            "needs a [magnet]",
        ),
        case(
            "surface pads on an odd layer count",
            mutate("layers = 4", "layers = 3\n\n[terminal]\nkind = \"smd\""),
            "terminal.kind",
            "\"smd\"",
            "bridge",
        ),
        case(
            "tail on a rigid stack-up",
            format!(
                "{}\n[tail]\nlength = \"10mm\"\nwidth = \"5mm\"\nfingers = 4\npitch = \"1mm\"\nfinger_width = \"0.6mm\"\nfinger_length = \"3mm\"\n",
                BASE.replace("kind = \"flex\"", "kind = \"rigid\"")
            ),
            "tail",
            "[|tail]",
            "rigid",
        ),
        case(
            "tail fingers wider than the tail at the pitch",
            format!(
                "{BASE}\n[tail]\nlength = \"10mm\"\nwidth = \"3mm\"\nfingers = 4\npitch = \"1mm\"\nfinger_width = \"0.6mm\"\nfinger_length = \"3mm\"\n"
            ),
            "tail.fingers",
            "fingers = |4",
            "at most 3 fingers fit",
        ),
        case(
            "tail finger as wide as the pitch",
            format!(
                "{BASE}\n[tail]\nlength = \"10mm\"\nwidth = \"5mm\"\nfingers = 4\npitch = \"1mm\"\nfinger_width = \"1mm\"\nfinger_length = \"3mm\"\n"
            ),
            "tail.finger_width",
            "finger_width = |\"1mm\"",
            "no gap",
        ),
        case(
            "tail too short for its leads",
            format!(
                "{BASE}\n[tail]\nlength = \"3.5mm\"\nwidth = \"5mm\"\nfingers = 4\npitch = \"1mm\"\nfinger_width = \"0.6mm\"\nfinger_length = \"3mm\"\n"
            ),
            "tail.length",
            "length = |\"3.5mm\"",
            "too short",
        ),
        case(
            "rotor magnets over a single coil",
            format!(
                "{BASE}\n[rotor]\npoles = 6\ndiameter = \"5mm\"\nthickness = \"2mm\"\nremanence = \"1.2T\"\ngap = \"1mm\"\npitch_diameter = \"30mm\"\n"
            ),
            "rotor",
            "[|rotor]",
            "ring of coils",
        ),
        case(
            "a torque without the rotor's magnets",
            format!("{BASE}\n[rotor]\npoles = 6\ntorque = \"2mNm\"\n"),
            "rotor.torque",
            "torque = |\"2mNm\"",
            "size the magnets",
        ),
        case(
            "a torque in the wrong unit",
            format!("{BASE}\n[rotor]\npoles = 6\ndiameter = \"5mm\"\nthickness = \"2mm\"\nremanence = \"1.2T\"\ngap = \"1mm\"\npitch_diameter = \"30mm\"\ntorque = \"2N\"\n"),
            "rotor.torque",
            "torque = |\"2N\"",
            "mNm",
        ),
        case(
            "grid coils closer than the clearance",
            crate::common::grid(2, 3, "10mm", "17mm"),
            "array.pitch_x",
            "pitch_x = |\"10mm\"",
            "widen the pitch",
        ),
        case(
            "grid rows too close for their buses",
            crate::common::grid(3, 3, "14mm", "14mm"),
            "array.pitch_y",
            "pitch_y = |\"14mm\"",
            "widen pitch_y",
        ),
        case(
            "odd rotor pole count",
            format!("{BASE}\n[rotor]\npoles = 7\n"),
            "rotor.poles",
            "poles = |7",
            "use 6 or 8",
        ),
        case(
            "rotor magnets that overlap",
            format!(
                "{BASE}\n[rotor]\npoles = 8\ndiameter = \"14mm\"\nthickness = \"2mm\"\nremanence = \"1.2T\"\ngap = \"1mm\"\npitch_diameter = \"30mm\"\n"
            ),
            "rotor.diameter",
            "diameter = |\"14mm\"",
            "overlap their neighbours by",
        ),
        case(
            "block magnet sized by a diameter",
            format!(
                "{BASE}\n[rotor]\npoles = 8\nmagnet = \"block\"\nwidth = \"4mm\"\nlength = \"6mm\"\ndiameter = \"5.5mm\"\nthickness = \"2mm\"\nremanence = \"1.2T\"\ngap = \"1mm\"\npitch_diameter = \"30mm\"\n"
            ),
            "rotor.diameter",
            "diameter = |\"5.5mm\"",
            "does not size block magnets",
        ),
        case(
            "terminal angle outside 0-360",
            mutate("[stackup]", "[terminal]\nangle = 400\n\n[stackup]"),
            "terminal.angle",
            "400",
            "0 to 360",
        ),
        case(
            "pole count without a balanced three-phase winding",
            stator("poles = 6", "poles = 18"),
            "array.count",
            "count = |9",
            "with 9 coils use 16 or 20 poles",
        ),
        case(
            "odd pole count",
            stator("poles = 6", "poles = 7"),
            "rotor.poles",
            "poles = |7",
            "even",
        ),
        case(
            "three phases without a rotor",
            stator("[rotor]\npoles = 6\n", ""),
            "rotor.poles",
            "phases = |3",
            "need the rotor's pole count",
        ),
        case(
            "coils wider than the annulus",
            stator("outer_diameter = \"56mm\"", "outer_diameter = \"36mm\""),
            "array.outer_diameter",
            "outer_diameter = |\"36mm\"",
            "too wide",
        ),
        case(
            "neighbouring coils overlap",
            stator("count = 9", "count = 12").replace("poles = 6", "poles = 8"),
            "array.count",
            "count = |12",
            "mm short",
        ),
        case(
            "no free layers for the buses",
            stator("layers = 4 ", "layers = 2 "),
            "coil.layers",
            "layers = |2",
            "two copper layers",
        ),
        case(
            "a sector without a ring",
            mutate("shape = \"circle\"", "shape = \"sector\"")
                .replace("outer_diameter = \"16mm\"\n", ""),
            "coil.shape",
            "shape = |\"sector\"",
            "a sector fills a slot of a ring of coils",
        ),
        case(
            "a sector on a grid",
            sectors("arrangement = \"ring\"", "arrangement = \"grid\"")
                .replace("count = 12\n", "rows = 3\ncolumns = 4\npitch_x = 20\npitch_y = 20\n")
                .replace("inner_diameter = \"24mm\"", "")
                .replace("outer_diameter = \"50mm\"", "")
                .replace("spacing = \"0.3mm\"", ""),
            "coil.shape",
            "shape = |\"sector\"",
            "a sector fills a slot of a ring of coils",
        ),
        case(
            "a sector's size is its slot",
            sectors("turns = \"max\"", "turns = \"max\"\nouter_diameter = 20"),
            "coil.outer_diameter",
            "outer_diameter = |20",
            "not used by a sector",
        ),
        case(
            "a sector takes whole turns",
            sectors("turns = \"max\"", "turns = 7.5"),
            "coil.turns",
            "turns = |7.5",
            "not a whole number",
        ),
        case(
            "too many turns for the slot",
            sectors("turns = \"max\"", "turns = 30"),
            "coil.turns",
            "turns = |30",
            "at most 11",
        ),
        case(
            "a sector's terminals face out of the ring",
            sectors("diameter = \"1mm\"", "diameter = \"1mm\"\nangle = 90"),
            "terminal.angle",
            "angle = |90",
            "face out of the ring",
        ),
        case(
            "a slot too small for the centre vias",
            sectors("inner_diameter = \"24mm\"", "inner_diameter = \"4mm\""),
            "coil.shape",
            "shape = |\"sector\"",
            "leaves no room for one turn",
        ),
    ]
}

/// The gimbal-stator example (sector coils) with `from` replaced by `to`.
fn sectors(from: &str, to: &str) -> String {
    let text = crate::common::poles_only(include_str!("../../examples/gimbal-stator.toml"));
    assert!(text.contains(from), "{from}");
    text.replacen(from, to, 1)
}

/// The fan-stator example with `from` replaced by `to`.
fn stator(from: &str, to: &str) -> String {
    let text = crate::common::poles_only(include_str!("../../examples/fan-stator.toml"));
    assert!(text.contains(from), "{from}");
    text.replacen(from, to, 1)
}

/// Expected `path:line:col` of the first occurrence of `at` in `text`.
fn location(path: &Path, text: &str, at: &str) -> String {
    // `|` marks the position inside the marker (default: its start).
    let bar = at.find('|').unwrap_or(0);
    let marker = at.replace('|', "");
    let offset = text
        .find(&marker)
        .unwrap_or_else(|| panic!("`{at}` not in text"))
        + bar;
    let (line, col) = coilwright::design::line_col(text, offset);
    format!("{}:{line}:{col}", path.display())
}

#[test]
fn bad_input_catalogue_exits_2_names_the_key_and_writes_nothing() {
    for c in catalogue() {
        let dir = tempfile::tempdir().unwrap();
        let spec = dir.path().join("design.toml");
        std::fs::write(&spec, &c.text).unwrap();
        for args in [
            vec!["check", "design.toml"],
            vec!["build", "design.toml", "-o", "out"],
            vec!["report", "design.toml", "-o", "report.json"],
        ] {
            let o = run(dir.path(), &args);
            let err = stderr(&o);
            assert_eq!(o.status.code(), Some(2), "{}: {args:?}\n{err}", c.what);
            assert!(
                err.lines()
                    .any(|l| l.starts_with("error") && l.contains(c.key)),
                "{}: key {} not named\n{err}",
                c.what,
                c.key
            );
            assert!(
                err.contains(c.says),
                "{}: `{}` missing\n{err}",
                c.what,
                c.says
            );
            let loc = location(Path::new("design.toml"), &c.text, c.at);
            assert!(err.contains(&loc), "{}: {loc} missing\n{err}", c.what);
            assert_eq!(entries(dir.path()), vec!["design.toml"], "{}", c.what);
        }
    }
}

#[test]
fn check_json_lists_problems_for_scripts() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("d.toml"),
        mutate("layers = 4", "layers = 33"),
    )
    .unwrap();
    let o = run(dir.path(), &["check", "d.toml", "--json"]);
    assert_eq!(o.status.code(), Some(2));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["errors"][0]["key"], "coil.layers");
    assert_eq!(v["errors"][0]["line"], 9);
    assert!(v["violations"].as_array().unwrap().is_empty());
}

#[test]
fn valid_design_checks_clean_with_json() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("d.toml"), BASE).unwrap();
    let o = run(dir.path(), &["check", "d.toml", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert!(v["violations"].is_array());
    let o = run(dir.path(), &["check", "d.toml"]);
    assert_eq!(o.status.code(), Some(0));
    assert!(stdout(&o).starts_with("ok:"), "{}", stdout(&o));
}

#[test]
fn missing_design_file_exits_2() {
    let dir = tempfile::tempdir().unwrap();
    let o = run(dir.path(), &["check", "nope.toml"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("nope.toml"));
}

fn write_base(dir: &Path) -> PathBuf {
    let p = dir.join("d.toml");
    std::fs::write(&p, BASE).unwrap();
    p
}

#[test]
fn build_refuses_existing_folder_without_force_and_replaces_it_with_force() {
    let dir = tempfile::tempdir().unwrap();
    write_base(dir.path());
    let out = dir.path().join("out");
    std::fs::create_dir(&out).unwrap();
    std::fs::write(out.join("keep.txt"), "mine").unwrap();

    let o = run(dir.path(), &["build", "d.toml", "-o", "out"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("--force"), "{}", stderr(&o));
    assert_eq!(entries(&out), vec!["keep.txt"]);
    assert_eq!(
        std::fs::read_to_string(out.join("keep.txt")).unwrap(),
        "mine"
    );

    let o = run(dir.path(), &["build", "d.toml", "-o", "out", "--force"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(out.is_dir());
    assert!(!out.join("keep.txt").exists(), "old contents replaced");
    // No temporary or old folders are left next to it.
    assert_eq!(entries(dir.path()), vec!["d.toml", "out"]);
    assert!(stdout(&o).contains("built catalogue"), "{}", stdout(&o));
}

#[test]
fn build_into_new_folder() {
    let dir = tempfile::tempdir().unwrap();
    write_base(dir.path());
    let o = run(dir.path(), &["build", "d.toml", "-o", "sub/out"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(dir.path().join("sub/out").is_dir());
    assert_eq!(entries(&dir.path().join("sub")), vec!["out"]);
}

#[test]
fn init_writes_a_valid_design_and_refuses_to_overwrite() {
    let dir = tempfile::tempdir().unwrap();
    let o = run(dir.path(), &["init", "my-coil.toml"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(dir.path().join("my-coil.toml")).unwrap();
    assert!(text.contains("name = \"my-coil\""));
    coilwright::pipeline::parse(&text).unwrap();

    std::fs::write(dir.path().join("my-coil.toml"), "# mine\n").unwrap();
    let o = run(dir.path(), &["init", "my-coil.toml"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("--force"));
    assert_eq!(
        std::fs::read_to_string(dir.path().join("my-coil.toml")).unwrap(),
        "# mine\n"
    );
    let o = run(
        dir.path(),
        &[
            "init",
            "--template",
            "motor-stator",
            "--force",
            "my-coil.toml",
        ],
    );
    assert_eq!(o.status.code(), Some(0));
    let text = std::fs::read_to_string(dir.path().join("my-coil.toml")).unwrap();
    assert!(text.contains("sides = 6"));
}

#[test]
fn init_list_and_unknown_template() {
    let dir = tempfile::tempdir().unwrap();
    let o = run(dir.path(), &["init", "--list"]);
    assert_eq!(o.status.code(), Some(0));
    for t in coilwright::design::templates() {
        assert!(stdout(&o).contains(t.name));
        assert!(stdout(&o).contains(t.description));
    }
    let o = run(dir.path(), &["init", "--template", "pickup", "x.toml"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("pickup-coil"), "{}", stderr(&o));
    assert!(entries(dir.path()).is_empty());
}

#[test]
fn report_json_and_overwrite_protection() {
    let dir = tempfile::tempdir().unwrap();
    write_base(dir.path());
    let o = run(dir.path(), &["report", "d.toml", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert!(v["trace_length_mm"].as_f64().unwrap() > 100.0);

    let o = run(dir.path(), &["report", "d.toml", "--json", "-o", "r.json"]);
    assert_eq!(o.status.code(), Some(0));
    let written = std::fs::read_to_string(dir.path().join("r.json")).unwrap();
    serde_json::from_str::<serde_json::Value>(&written).unwrap();
    let o = run(dir.path(), &["report", "d.toml", "-o", "r.json"]);
    assert_eq!(o.status.code(), Some(2));
    let o = run(dir.path(), &["report", "d.toml", "-o", "r.json", "--force"]);
    assert_eq!(o.status.code(), Some(0));
    assert_eq!(entries(dir.path()), vec!["d.toml", "r.json"]);
}

#[test]
fn usage_errors_exit_2() {
    let dir = tempfile::tempdir().unwrap();
    let o = run(dir.path(), &["build", "d.toml"]);
    assert_eq!(o.status.code(), Some(2));
    let o = run(dir.path(), &["frobnicate"]);
    assert_eq!(o.status.code(), Some(2));
    let o = run(dir.path(), &["--help"]);
    assert_eq!(o.status.code(), Some(0));
}

#[test]
fn closed_output_pipe_is_not_an_error() {
    use std::process::Stdio;
    let dir = tempfile::tempdir().unwrap();
    write_base(dir.path());
    let mut child = Command::new(BIN)
        .args(["report", "d.toml", "--json"])
        .current_dir(dir.path())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Close the reading end before the report is written.
    drop(child.stdout.take());
    let o = child.wait_with_output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stderr(&o).is_empty(), "{}", stderr(&o));
}

#[test]
fn the_key_heads_each_problem_once() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("d.toml"),
        mutate("layers = 4", "layers = 33"),
    )
    .unwrap();
    let err = stderr(&run(dir.path(), &["check", "d.toml"]));
    assert!(
        err.lines()
            .any(|l| l == "error: coil.layers: 33 is out of range; it must be 1 to 32"),
        "{err}"
    );
}

/// The design's own max_temperature is a limit, not advice: the
/// motor-stator starter driven at 0.8 A (about 460 C against 90 C) fails
/// `check` (exit 1, listed with the rule problems, in JSON under
/// `limits`), `build` refuses and writes nothing, and writes only with
/// `--allow-over-limits`.
#[test]
fn limits_are_enforced_by_check_and_build() {
    let dir = tempfile::tempdir().unwrap();
    let stator = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/motor-stator.toml"),
    )
    .unwrap();
    let hot = stator.replace("current = \"0.2A\"", "current = \"0.8A\"");
    assert_ne!(hot, stator);
    std::fs::write(dir.path().join("hot.toml"), hot).unwrap();

    let o = run(dir.path(), &["check", "hot.toml"]);
    assert_eq!(o.status.code(), Some(1), "{}{}", stdout(&o), stderr(&o));
    assert!(
        stdout(&o).contains("limit exceeded (max-temperature)"),
        "{}",
        stdout(&o)
    );
    assert!(!stdout(&o).contains("ok:"));

    let o = run(dir.path(), &["check", "hot.toml", "--json"]);
    assert_eq!(o.status.code(), Some(1));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["limits"][0]["id"], "max-temperature");
    assert!(v["violations"].as_array().unwrap().is_empty());

    let o = run(dir.path(), &["build", "hot.toml", "-o", "out"]);
    assert_eq!(o.status.code(), Some(1), "{}{}", stdout(&o), stderr(&o));
    assert!(stdout(&o).contains("--allow-over-limits"));
    assert!(
        !dir.path().join("out").exists(),
        "build wrote files over its limits"
    );

    let o = run(
        dir.path(),
        &["build", "hot.toml", "-o", "out", "--allow-over-limits"],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stderr(&o).contains("limit exceeded"), "{}", stderr(&o));
    assert!(dir.path().join("out/manifest.json").exists());

    // The starter itself stays within its limits.
    std::fs::write(dir.path().join("ok.toml"), stator).unwrap();
    let o = run(dir.path(), &["check", "ok.toml"]);
    assert_eq!(o.status.code(), Some(0), "{}", stdout(&o));
}

/// `couple`'s bad arguments: each exits 2, names the argument, says what
/// is wrong and writes nothing (no output folder).
#[test]
fn couple_bad_arguments_exit_2_name_the_argument_and_write_nothing() {
    let dir = tempfile::tempdir().unwrap();
    write_base(dir.path());
    // A different design under the same name: both copies would be
    // catalogue.toml in the output folder.
    std::fs::write(
        dir.path().join("other.toml"),
        mutate("trace_width = \"0.1mm\"", "trace_width = \"0.12mm\""),
    )
    .unwrap();
    let cases: &[(&str, &[&str], &str, &str)] = &[
        ("gap zero", &["--gap", "0"], "--gap", "in contact"),
        (
            "gap negative",
            &["--gap=-0.5mm"],
            "--gap",
            "overlap by 0.5 mm",
        ),
        (
            "gap inside the covers",
            &["--gap", "10um"],
            "--gap",
            "cover",
        ),
        (
            "gap without a known unit",
            &["--gap", "3furlong"],
            "--gap",
            "unknown length unit",
        ),
        (
            "offset not a number",
            &["--gap", "3mm", "--offset", "left"],
            "--offset",
            "number",
        ),
        (
            "frequency zero",
            &["--gap", "3mm", "--frequency", "0"],
            "--frequency",
            "above zero",
        ),
        (
            "frequency negative",
            &["--gap", "3mm", "--frequency=-1MHz"],
            "--frequency",
            "negative",
        ),
        (
            "frequency millihertz",
            &["--gap", "3mm", "--frequency", "6mHz"],
            "--frequency",
            "MHz",
        ),
        (
            "unknown flag",
            &["--gap", "3mm", "--gapp", "2mm"],
            "--gapp",
            "unexpected argument",
        ),
        ("gap missing", &[], "--gap", "required"),
    ];
    for (what, extra, arg, says) in cases {
        let mut args = vec!["couple", "d.toml", "d.toml", "-o", "link"];
        args.extend_from_slice(extra);
        let o = run(dir.path(), &args);
        let err = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{what}: {err}");
        assert!(err.contains(arg), "{what}: {arg} not named\n{err}");
        assert!(err.contains(says), "{what}: `{says}` missing\n{err}");
        assert_eq!(entries(dir.path()), vec!["d.toml", "other.toml"], "{what}");
    }
    let o = run(
        dir.path(),
        &[
            "couple",
            "d.toml",
            "other.toml",
            "--gap",
            "3mm",
            "-o",
            "link",
        ],
    );
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(
        err.contains("d.toml") && err.contains("other.toml"),
        "{err}"
    );
    assert!(err.contains("same name `catalogue`"), "{err}");
    assert_eq!(entries(dir.path()), vec!["d.toml", "other.toml"]);
}

/// `couple --json`: the issue's keys, null efficiency without a
/// frequency, the same file twice, the output folder and its overwrite
/// protection.
#[test]
fn couple_prints_json_and_writes_its_folder() {
    let dir = tempfile::tempdir().unwrap();
    write_base(dir.path());
    let o = run(
        dir.path(),
        &["couple", "d.toml", "d.toml", "--gap", "2mm", "--json"],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    for key in ["mutual_inductance_h", "coupling", "gap_mm", "offset_mm"] {
        assert!(v[key].is_number(), "{key}: {v}");
    }
    assert!(v["link_efficiency_max"].is_null());
    assert_eq!(v["gap_mm"], 2.0);
    let k = v["coupling"].as_f64().unwrap();
    assert!(k > 0.0 && k < 1.0, "{k}");
    let o = run(
        dir.path(),
        &[
            "couple",
            "d.toml",
            "d.toml",
            "--gap",
            "2mm",
            "--offset",
            "1mm",
            "--frequency",
            "1MHz",
            "--json",
            "-o",
            "link",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    let eta = v["link_efficiency_max"].as_f64().unwrap();
    assert!(eta > 0.0 && eta < 1.0, "{eta}");
    assert!(v["optimal_load_ohm"].as_f64().unwrap() > 0.0);
    assert!(v["warnings"].as_array().unwrap().is_empty());
    // Near a coil's self-resonance the link warns, naming the coil.
    let srf = v["coil_a"]["self_resonance_hz"].as_f64().unwrap();
    let near = format!("{}Hz", srf / 2.0);
    let o2 = run(
        dir.path(),
        &[
            "couple",
            "d.toml",
            "d.toml",
            "--gap",
            "2mm",
            "--frequency",
            &near,
            "--json",
        ],
    );
    assert_eq!(o2.status.code(), Some(0), "{}", stderr(&o2));
    let v2: serde_json::Value = serde_json::from_str(&stdout(&o2)).unwrap();
    assert_eq!(v2["warnings"].as_array().unwrap().len(), 2);
    assert!(
        stderr(&o2).contains("warning: coil A (catalogue): the drive frequency"),
        "{}",
        stderr(&o2)
    );
    assert!(stderr(&o2).contains("above a third of the self-resonance"));
    assert_eq!(
        entries(&dir.path().join("link")),
        vec![
            "catalogue.toml",
            "couple.json",
            "couple.md",
            "coupling_gap.svg",
            "coupling_offset.svg"
        ]
    );
    let again = run(
        dir.path(),
        &["couple", "d.toml", "d.toml", "--gap", "2mm", "-o", "link"],
    );
    assert_eq!(again.status.code(), Some(2));
    assert!(stderr(&again).contains("--force"), "{}", stderr(&again));
    let forced = run(
        dir.path(),
        &[
            "couple", "d.toml", "d.toml", "--gap", "2mm", "-o", "link", "--force",
        ],
    );
    assert_eq!(forced.status.code(), Some(0), "{}", stderr(&forced));
}
