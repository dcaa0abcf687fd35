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

/// A temporary folder and the sweep output folder inside it.
fn out_dir() -> (tempfile::TempDir, std::path::PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("sweep");
    (dir, out)
}

/// Runs `coilwright sweep ARGS -o OUT`.
fn sweep_into(out: &Path, args: &[&str]) -> (i32, String, String) {
    let mut all = vec!["sweep"];
    all.extend_from_slice(args);
    all.extend_from_slice(&["-o", out.to_str().unwrap()]);
    coilwright(&all)
}

/// When no candidate meets the requirements the sweep exits 1 (README says
/// so) and lists the nearest misses, smallest relative shortfall first;
/// bounds may carry units; the design's own max_temperature is a
/// requirement of every sweep.
#[test]
fn nothing_passes_exits_1_with_nearest_misses() {
    let (_dir, out) = out_dir();
    let (code, stdout, stderr) = sweep_into(
        &out,
        &[
            &example(),
            "--vary",
            "turns=10..30:4",
            "--require",
            "temperature_c <= 30C",
            "--require",
            "inductance_h >= 1.5uH",
            "--maximize",
            "force_n",
        ],
    );
    assert_eq!(code, 1, "{stdout}{stderr}");
    assert!(
        stdout.contains("no candidate meets every requirement"),
        "{stdout}"
    );
    let misses: Vec<&str> = stdout
        .lines()
        .skip_while(|l| !l.starts_with("nearest misses"))
        .skip(1)
        .take_while(|l| l.contains("% short"))
        .collect();
    assert_eq!(misses.len(), 5, "{stdout}");
    let pct: Vec<f64> = misses
        .iter()
        .map(|l| l.split_whitespace().next().unwrap().parse().unwrap())
        .collect();
    assert!(pct.windows(2).all(|w| w[0] <= w[1]), "{pct:?}");
    // Fewer turns run cooler: the nearest miss is the 10-turn coil.
    assert!(misses[0].contains("coil.turns=10"), "{stdout}");
    // The table is still written (no best design).
    assert!(out.join("candidates.csv").exists());
    assert!(!out.join("best.toml").exists());
}

#[test]
fn the_designs_max_temperature_is_a_requirement_of_every_sweep() {
    // motor-stator: max_temperature 90 C; 0.8 A runs far hotter.
    let stator = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/motor-stator.toml");
    let (_dir, out) = out_dir();
    let (code, stdout, stderr) = sweep_into(
        &out,
        &[
            stator.to_str().unwrap(),
            "--vary",
            "drive.current=0.1A,0.8A",
            "--maximize",
            "force_n",
        ],
    );
    assert_eq!(code, 0, "{stdout}{stderr}");
    let csv = std::fs::read_to_string(out.join("candidates.csv")).unwrap();
    let row = csv.lines().find(|l| l.contains("0.8A")).unwrap();
    assert!(row.contains("fails_requirement"), "{row}");
    assert!(row.contains("the design's limit"), "{row}");
}

#[test]
fn best_design_keeps_the_base_comments_and_writes_whole_numbers_as_integers() {
    let (_dir, out) = out_dir();
    let (code, o, e) = sweep_into(
        &out,
        &[
            &example(),
            "--vary",
            "turns=10..14:2",
            "--maximize",
            "force_per_sqrt_w_n",
        ],
    );
    assert_eq!(code, 0, "{o}{e}");
    let best = std::fs::read_to_string(out.join("best.toml")).unwrap();
    let base = std::fs::read_to_string(example()).unwrap();
    // Every comment line of the base design is still there.
    for line in base.lines().filter(|l| l.starts_with('#')) {
        assert!(best.contains(line), "lost {line:?}\n{best}");
    }
    let turns = best.lines().find(|l| l.starts_with("turns =")).unwrap();
    assert!(!turns.contains(".0"), "{turns}");
    assert!(turns.contains("# inner_diameter and turns"), "{turns}");
}

#[test]
fn tradeoff_axis_moves_on_when_the_outer_size_is_fixed() {
    let (_dir, out) = out_dir();
    let (code, o, e) = sweep_into(
        &out,
        &[
            &example(),
            "--vary",
            "drive.current=0.05A,0.1A,0.12A",
            "--maximize",
            "force_n",
        ],
    );
    assert_eq!(code, 0, "{o}{e}");
    let svg = std::fs::read_to_string(out.join("tradeoff.svg")).unwrap();
    // Neither the fixed outer size nor the fixed resistance: the power.
    assert!(svg.contains("vs power_w"), "{svg}");
}

/// A best candidate with many flex layers comes with a note on cost,
/// stiffness and bending (common practice).
#[test]
fn many_flex_layers_in_the_best_candidate_are_noted() {
    let (_dir, out) = out_dir();
    let (code, o, e) = sweep_into(
        &out,
        &[
            &example(),
            "--vary",
            "layers=2,6",
            "--vary",
            "drive.current=0.02A",
            "--maximize",
            "inductance_h",
        ],
    );
    assert_eq!(code, 0, "{o}{e}");
    assert!(
        o.contains("note: the best candidate has 6 copper layers on a flex board"),
        "{o}"
    );
}

/// The README's sweep arguments (585 candidates) with `extra` and `-o out`.
fn readme_sweep(out: &Path, extra: &[&str]) -> (i32, String, String) {
    let ex = example();
    let mut args = vec!["sweep", ex.as_str()];
    args.extend_from_slice(super::common::README_SWEEP);
    args.extend_from_slice(extra);
    args.extend_from_slice(&["-o", out.to_str().unwrap()]);
    coilwright(&args)
}

/// Every file of a sweep folder whose bytes must not depend on sharding.
const SAME_FILES: &[&str] = &[
    "candidates.csv",
    "candidates.jsonl",
    "ranking.csv",
    "front.csv",
    "tradeoff.svg",
    "best.toml",
];

#[test]
fn shards_merge_to_the_unsharded_result() {
    let dir = tempfile::tempdir().unwrap();
    let whole = dir.path().join("whole");
    let (code, o, e) = readme_sweep(&whole, &[]);
    assert_eq!(code, 0, "{o}{e}");
    let record: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(whole.join("sweep.json")).unwrap()).unwrap();
    assert_eq!(record["complete"], true);
    assert_eq!(record["evaluated"], 585);
    for n in [1usize, 3, 7] {
        let mut shards = Vec::new();
        for k in 1..=n {
            let d = dir.path().join(format!("s{n}-{k}"));
            let (code, o, e) = readme_sweep(&d, &["--shard", &format!("{k}/{n}")]);
            assert!(code == 0 || code == 1, "{o}{e}");
            shards.push(d.to_str().unwrap().to_string());
        }
        // In any order.
        shards.reverse();
        let merged = dir.path().join(format!("merged{n}"));
        let mut args = vec!["sweep", "merge"];
        args.extend(shards.iter().map(String::as_str));
        args.extend(["-o", merged.to_str().unwrap()]);
        let (code, o, e) = coilwright(&args);
        assert_eq!(code, 0, "{o}{e}");
        for f in SAME_FILES {
            assert!(
                std::fs::read(whole.join(f)).unwrap() == std::fs::read(merged.join(f)).unwrap(),
                "{f} differs after merging {n} shards"
            );
        }
        let m: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(merged.join("sweep.json")).unwrap())
                .unwrap();
        assert_eq!(m["results"], record["results"], "{n} shards");
    }
}

#[test]
fn merge_refuses_missing_duplicate_and_foreign_shards() {
    let dir = tempfile::tempdir().unwrap();
    let s = |name: &str, shard: &str| {
        let d = dir.path().join(name);
        let (code, o, e) = readme_sweep(&d, &["--shard", shard]);
        assert!(code == 0 || code == 1, "{o}{e}");
        d.to_str().unwrap().to_string()
    };
    let (a, b) = (s("a", "1/3"), s("b", "2/3"));
    let out = dir.path().join("out");
    let merge = |dirs: &[&str]| {
        let mut args = vec!["sweep", "merge"];
        args.extend_from_slice(dirs);
        args.extend(["-o", out.to_str().unwrap()]);
        coilwright(&args)
    };
    let (code, _, e) = merge(&[&a, &b]);
    assert_eq!(code, 2, "{e}");
    assert!(e.contains("missing: 3/3"), "{e}");
    let (code, _, e) = merge(&[&a, &a, &b]);
    assert_eq!(code, 2, "{e}");
    // A shard of another sweep (one more requirement).
    let other = dir.path().join("other");
    let (code, o, e) = readme_sweep(&other, &["--shard", "3/3", "--require", "turns >= 8"]);
    assert!(code == 0 || code == 1, "{o}{e}");
    let (code, _, e) = merge(&[&a, &b, other.to_str().unwrap()]);
    assert_eq!(code, 2, "{e}");
    assert!(e.contains("different sweep"), "{e}");
    let (code, _, e) = merge(&[dir.path().to_str().unwrap()]);
    assert_eq!(code, 2, "{e}");
    assert!(e.contains("not a sweep folder"), "{e}");
    assert!(!out.exists(), "nothing may be written");
}

#[test]
fn bad_shards_exit_2_and_write_nothing() {
    let dir = tempfile::tempdir().unwrap();
    for bad in ["0/3", "4/3", "2", "a/b"] {
        let out = dir.path().join("out");
        let (code, _, e) = readme_sweep(&out, &["--shard", bad]);
        assert_eq!(code, 2, "{bad}: {e}");
        assert!(e.contains("--shard"), "{bad}: {e}");
        assert!(!out.exists());
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0, "{bad}");
    }
}

/// Ctrl-C (SIGINT, sent with the `kill` program) stops a sweep after the
/// chunk being evaluated: exit 130, the folder holds what was evaluated,
/// marked incomplete, and merge refuses it.
#[test]
fn ctrl_c_writes_what_was_evaluated_and_marks_it_incomplete() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("big");
    let ex = example();
    let child = std::process::Command::new(env!("CARGO_BIN_EXE_coilwright"))
        .args([
            "sweep",
            ex.as_str(),
            "--vary",
            "layers=2,4,6,8",
            "--vary",
            "turns=6..40",
            "--vary",
            "trace_width=0.1mm..0.2mm:0.01mm",
            "--vary",
            "outer_diameter=12mm..20mm:0.5mm",
            "--maximize",
            "force_per_sqrt_w_n",
            "-o",
            out.to_str().unwrap(),
        ])
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    // Wait until the hidden folder has its first rows.
    let started = std::time::Instant::now();
    loop {
        let rows = std::fs::read_dir(dir.path())
            .unwrap()
            .flatten()
            .filter(|e| e.file_name().to_string_lossy().starts_with(".big.tmp"))
            .filter_map(|e| std::fs::metadata(e.path().join("candidates.jsonl")).ok())
            .any(|m| m.len() > 0);
        if rows {
            break;
        }
        assert!(started.elapsed().as_secs() < 120, "the sweep wrote no rows");
        std::thread::sleep(std::time::Duration::from_millis(50));
    }
    let status = std::process::Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(status.success());
    let output = child.wait_with_output().unwrap();
    let stdout = String::from_utf8_lossy(&output.stdout);
    assert_eq!(output.status.code(), Some(130), "{stdout}");
    assert!(stdout.contains("interrupted"), "{stdout}");
    let record: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("sweep.json")).unwrap()).unwrap();
    assert_eq!(record["complete"], false);
    let evaluated = record["evaluated"].as_u64().unwrap() as usize;
    assert!(evaluated > 0 && evaluated < record["total"].as_u64().unwrap() as usize);
    let csv = std::fs::read_to_string(out.join("candidates.csv")).unwrap();
    assert_eq!(csv.lines().count(), evaluated + 1);
    let (code, _, e) = coilwright(&[
        "sweep",
        "merge",
        out.to_str().unwrap(),
        "-o",
        dir.path().join("m").to_str().unwrap(),
    ]);
    assert_eq!(code, 2);
    assert!(e.contains("incomplete"), "{e}");
}

/// `--refine` on the README's sweep: the refined design is at least as good
/// as the best grid point, stays within the swept ranges, keeps layers on
/// the grid and passes `check`.
#[test]
fn refine_improves_on_the_grid_and_the_result_passes_check() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("refined");
    let (code, o, e) = readme_sweep(&out, &["--refine"]);
    assert_eq!(code, 0, "{o}{e}");
    assert!(o.contains("refined (Nelder-Mead"), "{o}");
    let record: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("sweep.json")).unwrap()).unwrap();
    let r = &record["refine"];
    let (grid, value) = (
        r["grid_value"].as_f64().unwrap(),
        r["value"].as_f64().unwrap(),
    );
    assert!(value >= grid, "{r}");
    assert!(r["evaluations"].as_u64().unwrap() <= 500, "{r}");
    let best = out.join("best.toml");
    let (code, o, e) = coilwright(&["check", best.to_str().unwrap()]);
    assert_eq!(code, 0, "{o}{e}");
    let (code, json, e) = coilwright(&["report", best.to_str().unwrap(), "--json"]);
    assert_eq!(code, 0, "{e}");
    let report: serde_json::Value = serde_json::from_str(&json).unwrap();
    let t = report["temperature_c"].as_f64().unwrap();
    assert!(t <= 80.0, "refined design at {t} C breaks the requirement");
    let text = std::fs::read_to_string(&best).unwrap();
    let layers = text.lines().find(|l| l.starts_with("layers")).unwrap();
    let layers = layers.split('#').next().unwrap().trim();
    assert!(
        ["layers = 2", "layers = 4", "layers = 6"].contains(&layers),
        "{layers}"
    );
    // --refine needs the whole sweep.
    let (code, _, e) = readme_sweep(&dir.path().join("x"), &["--refine", "--shard", "1/2"]);
    assert_eq!(code, 2, "{e}");
}
