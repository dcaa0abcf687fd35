//! The `sweep` command end to end: a real sweep writes its table, plot and
//! best design; bad arguments exit 2 with a clear message and write nothing.
use std::path::Path;

use super::common::coilwright;

fn example() -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples/fin-actuator.toml")
        .display()
        .to_string()
}

#[test]
fn sweep_writes_table_plot_and_best_design() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("sweep");
    let (code, stdout, stderr) = coilwright(&[
        "sweep",
        &example(),
        "--vary",
        "layers=2,4",
        "--vary",
        "turns=6..12:3",
        "--require",
        "outer_diameter_mm <= 20",
        "--maximize",
        "trace_length_mm",
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{stdout}{stderr}");
    assert!(stdout.contains("6 candidates"), "{stdout}");
    let csv = std::fs::read_to_string(out.join("candidates.csv")).unwrap();
    assert_eq!(csv.lines().count(), 7);
    assert!(
        std::fs::read_to_string(out.join("tradeoff.svg"))
            .unwrap()
            .starts_with("<svg")
    );
    // The best design is a valid design file that builds.
    let best = out.join("best.toml");
    let (code, o, e) = coilwright(&["check", best.to_str().unwrap()]);
    assert_eq!(code, 0, "{o}{e}");
    let text = std::fs::read_to_string(&best).unwrap();
    assert!(
        text.contains("layers = 4") && text.contains("turns = 12"),
        "{text}"
    );
}

#[test]
fn best_design_finds_a_profile_named_relative_to_the_base_design() {
    // The base design names its rule profile relative to itself; best.toml
    // is written elsewhere and must still find it.
    let dir = tempfile::tempdir().unwrap();
    let designs = dir.path().join("designs");
    std::fs::create_dir(&designs).unwrap();
    let text = std::fs::read_to_string(example())
        .unwrap()
        .replace("profile = \"standard\"", "profile = \"house-rules.toml\"");
    assert!(text.contains("house-rules.toml"));
    std::fs::write(designs.join("coil.toml"), text).unwrap();
    std::fs::write(
        designs.join("house-rules.toml"),
        "name = \"house\"\nmin_trace_width = 0.1\nmin_clearance = 0.1\nmin_drill = 0.2\n\
         min_annular_ring = 0.1\nmin_hole_spacing = 0.25\nmin_edge_clearance = 0.3\n",
    )
    .unwrap();
    let out = dir.path().join("results");
    let (code, o, e) = coilwright(&[
        "sweep",
        designs.join("coil.toml").to_str().unwrap(),
        "--vary",
        "turns=6..8",
        "--maximize",
        "trace_length_mm",
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{o}{e}");
    let best = out.join("best.toml");
    let (code, o, e) = coilwright(&["check", best.to_str().unwrap()]);
    assert_eq!(
        code,
        0,
        "{o}{e}\n{}",
        std::fs::read_to_string(&best).unwrap()
    );
}

#[test]
fn bad_sweep_arguments_exit_2_and_write_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("sweep");
    let o = out.to_str().unwrap();
    let ex = example();
    let cases: &[(&[&str], &str)] = &[
        (
            &[
                "--vary",
                "trace_widht=0.1mm,0.2mm",
                "--maximize",
                "trace_length_mm",
            ],
            "did you mean 'trace_width'",
        ),
        (
            &["--vary", "turns=4..20", "--maximize", "trace_lenght_mm"],
            "did you mean 'trace_length_mm'",
        ),
        (
            &["--vary", "turns=20..4", "--maximize", "trace_length_mm"],
            "range is empty",
        ),
        (
            &["--vary", "turns=4..20:0", "--maximize", "trace_length_mm"],
            "step must be positive",
        ),
        (
            &["--vary", "shape=1,2", "--maximize", "trace_length_mm"],
            "not a numeric key",
        ),
        (
            &[
                "--vary",
                "turns=4..8",
                "--require",
                "tempreature_c <= 80",
                "--maximize",
                "trace_length_mm",
            ],
            "did you mean",
        ),
        (
            &[
                "--vary",
                "turns=4..8",
                "--require",
                "turns <= lots",
                "--maximize",
                "trace_length_mm",
            ],
            "is not a number",
        ),
        (
            &["--vary", "layers=2.5", "--maximize", "trace_length_mm"],
            "whole numbers",
        ),
    ];
    for (args, expect) in cases {
        let mut all = vec!["sweep", ex.as_str()];
        all.extend_from_slice(args);
        all.extend_from_slice(&["-o", o]);
        let (code, stdout, stderr) = coilwright(&all);
        assert_eq!(code, 2, "{args:?}: {stdout}{stderr}");
        assert!(
            stderr.contains(expect),
            "{args:?}: expected '{expect}' in: {stderr}"
        );
        assert!(!out.exists(), "{args:?} wrote output");
    }
}
