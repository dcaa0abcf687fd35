//! Interop: the bundle of many random valid designs checked by the programs
//! and libraries that consume such files (sources named beside each check,
//! see tests/interop/checks.py and tests/interop/kicad_checks.py):
//!
//! - kiutils reads the symbol library and the project library tables: two
//!   pins named as the footprint's pads, the symbol linked to the footprint;
//! - gerbonara and pygerber (strict) read every Gerber, gerbonara every
//!   Excellon, with warnings turned into errors;
//! - KiCad 6 pcbnew: the footprint loads, its arcs keep their side, placed
//!   on a board it passes DRC with 0 violations and 0 unconnected pads; our
//!   board loads with 0 violations;
//! - gerbv: our copper Gerbers and KiCad's plot of our board differ in at
//!   most 0.5 % of copper pixels per layer;
//! - ezdxf: every DXF reads and audits with no error; its track
//!   centre-line length per layer equals gerbonara's reading of the
//!   copper Gerber within 0.1 %, the outline's the profile's;
//! - shapely: turn-to-turn gap >= clearance - 1 um; every drill hit lands on
//!   copper of exactly the layers it joins;
//! - tails (every fourth design whose coil ends outside): gerbonara reads
//!   the fingers' copper, coverlay and stiffener; shapely finds the gap
//!   between neighbouring fingers equal to pitch - finger_width within
//!   1 um, each finger's coverlay opening equal to the finger, and the
//!   stiffener covering every finger; KiCad's DRC runs on these boards too.
//!
//! - arrays (`[array]`, the fan-stator example with other counts and
//!   connections, rings of sector coils from the gimbal-stator example,
//!   and the fan-stator's coil on a 3 x 4 grid): gerbonara and pygerber
//!   read every Gerber; shapely finds
//!   no copper of different nets (the Gerbers' net attributes) closer than
//!   the clearance, terminal pads aside; KiCad 6 loads
//!   the board with one net per bus and its DRC finds 0 violations and 0
//!   unconnected pads, each phase terminal on the net of its name; the
//!   library footprint, each pad on the net of its own name, passes DRC
//!   with 0 violations and 0 unconnected; kiutils finds a symbol pin per
//!   phase pad; with separate phase ends, each phase's resistance walked
//!   on the copper Gerbers (gerbonara) equals the report's within 1e-6.
//!
//! Needs `tests/interop/setup.sh` to have run (Debian packages kicad, gerbv
//! and the venv .venv-interop); without them this test fails and says so.

use coilwright::design::{BoardKind, Corner, Design, Shape, Wiring};
use coilwright::export;
use coilwright::geometry;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::Mutex;

/// Designs checked (at least 20 by the issue; 24 covers every pairing of
/// the 8 layer counts with the 3 shapes).
const DESIGNS: usize = 24;

/// A small deterministic generator (xorshift64*), so runs are repeatable.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
    fn unit(&mut self) -> f64 {
        (self.next() >> 11) as f64 / (1u64 << 53) as f64
    }
    fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * self.unit()
    }
    fn pick(&mut self, n: usize) -> usize {
        (self.next() % n as u64) as usize
    }
    /// A length on a 5 um grid, mm.
    fn len(&mut self, lo: f64, hi: f64) -> f64 {
        (self.range(lo, hi) * 200.0).round() / 200.0
    }
}

/// The `i`-th random valid design: every shape, 1..8 layers, series and
/// parallel pairs, sharp and round corners, flex and rigid.
pub fn random_design(i: usize) -> Design {
    let mut r = Rng(0x9E37_79B9_7F4A_7C15 ^ (i as u64 + 1).wrapping_mul(0xD1B5_4A32_D192_ED03));
    let _ = r.next();
    let mut d = Design::sample();
    d.name = format!("interop-{i:02}");
    let layers = [1u8, 2, 3, 4, 5, 6, 7, 8][i % 8];
    d.coil.layers = layers;
    d.coil.shape = match i % 3 {
        0 => Shape::Circle,
        1 => Shape::Polygon {
            sides: 3 + r.pick(6) as u8,
        },
        _ => {
            let w = r.len(8.0, 20.0);
            Shape::Rectangle {
                width: w,
                height: r.len(0.5 * w, 1.5 * w),
            }
        }
    };
    d.coil.corner = if (i / 3).is_multiple_of(2) {
        Corner::Sharp
    } else {
        Corner::Round {
            radius: r.len(0.2, 1.0),
        }
    };
    d.coil.wiring = if layers.is_multiple_of(2) && r.pick(2) == 0 {
        Wiring::ParallelPairs
    } else {
        Wiring::Series
    };
    d.coil.trace_width = r.len(0.08, 0.3);
    d.coil.clearance = r.len(0.08, 0.25);
    d.coil.turns = (r.range(2.0, 12.0) * 4.0).round() / 4.0;
    d.via.drill = r.len(0.15, 0.3);
    d.via.diameter = d.via.drill + r.len(0.15, 0.3);
    d.terminal.drill = r.len(0.3, 0.8);
    d.terminal.diameter = d.terminal.drill + r.len(0.3, 0.6);
    let min_id = geometry::min_inner_diameter(
        &d.coil.shape,
        layers,
        d.coil.wiring,
        d.coil.clearance,
        d.coil.trace_width,
        d.via.diameter,
        d.terminal.diameter,
    );
    // On a 5 um grid, never below the smallest free centre.
    d.coil.inner_diameter = ((min_id + r.range(0.0, 4.0)) * 200.0).ceil() / 200.0;
    assert!(d.coil.inner_diameter >= min_id);
    let pitch = d.coil.pitch();
    d.coil.outer_diameter = d.coil.inner_diameter + 2.0 * d.coil.turns * pitch + d.coil.trace_width;
    d.stackup.kind = if r.pick(2) == 0 {
        BoardKind::Flex
    } else {
        BoardKind::Rigid
    };
    d.stackup.copper = (0..layers)
        .map(|_| [0.018, 0.035, 0.07][r.pick(3)])
        .collect();
    d.stackup.dielectric = (1..layers).map(|_| r.len(0.025, 0.2)).collect();
    if d.stackup.kind == BoardKind::Rigid {
        d.stackup.dielectric_material = "FR4".into();
        d.stackup.dielectric_constant = 4.4;
        d.stackup.cover = 0.02;
    }
    d.board.margin = r.len(0.3, 1.5);
    // Every fourth design turns its terminals to another angle and brings
    // them out on leads (a tab of the outline); drawn without the generator
    // so that the other designs stay as they were.
    // Every fourth design on an even layer count, from the fourth, has
    // surface pads (on the bottom every other time), brought out.
    if i % 4 == 3 && layers.is_multiple_of(2) {
        d.terminal_place = coilwright::design::TerminalPlace {
            kind: coilwright::design::TerminalKind::Smd,
            side: if i % 8 == 3 {
                coilwright::design::Face::Top
            } else {
                coilwright::design::Face::Bottom
            },
            pad_width: 0.8,
            pad_length: 1.2,
            angle_deg: ((i * 53) % 360) as f64,
            lead_length: 0.5,
        };
    }
    if i % 4 == 1 {
        d.terminal_place = coilwright::design::TerminalPlace {
            angle_deg: ((i * 97) % 360) as f64,
            lead_length: 0.5 + (i % 3) as f64,
            ..coilwright::design::TerminalPlace::DEFAULT
        };
    }
    // Every fourth design from the second whose coil ends outside the
    // winding gets a flex tail with 2 to 5 fingers at 0.5 or 1 mm pitch
    // (stiffened every other time): its terminals become fingers.
    let groups = match d.coil.wiring {
        Wiring::ParallelPairs => layers / 2,
        Wiring::Series => layers,
    };
    if i % 4 == 1 && groups.is_multiple_of(2) {
        d.stackup.kind = BoardKind::Flex;
        d.stackup.dielectric_material = "Polyimide".into();
        d.stackup.dielectric_constant = 3.4;
        d.stackup.cover = 0.0375;
        let fingers = 2 + ((i / 4) % 4) as u32;
        let pitch = [0.5, 1.0][(i / 4) % 2];
        d.tail = Some(coilwright::design::Tail {
            length: 15.0,
            width: fingers as f64 * pitch + 2.0 * d.board.margin,
            fingers,
            pitch,
            finger_width: 0.6 * pitch,
            finger_length: 2.0,
            stiffener: [0.2, 0.0][(i / 8) % 2],
        });
    }
    // A round corner must fit the innermost side: shrink it until it does.
    while let (Corner::Round { radius }, Err(_)) = (d.coil.corner, geometry::build(&d)) {
        d.coil.corner = if radius > 0.05 {
            Corner::Round {
                radius: (radius * 100.0).round() / 200.0,
            }
        } else {
            Corner::Sharp
        };
    }
    d
}

fn repo() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn require_tools() -> PathBuf {
    let py = repo().join(".venv-interop/bin/python");
    let hint = "run tests/interop/setup.sh (as root on Debian) to install KiCad 6, gerbv and the \
                .venv-interop Python environment";
    assert!(py.exists(), "{} is missing: {hint}", py.display());
    let ok = Command::new(&py)
        .args([
            "-c",
            "import gerbonara, pygerber, shapely, numpy, PIL, ezdxf",
        ])
        .status()
        .map(|s| s.success())
        .unwrap_or(false);
    assert!(
        ok,
        "the interop venv lacks gerbonara/pygerber/shapely/ezdxf: {hint}"
    );
    let ok = Command::new("/usr/bin/python3")
        .args(["-c", "import pcbnew"])
        .output()
        .map(|o| o.status.success())
        .unwrap_or(false);
    assert!(
        ok,
        "Debian's /usr/bin/python3 cannot import pcbnew (KiCad 6): {hint}"
    );
    let ok = Command::new("gerbv")
        .arg("--version")
        .output()
        .map(|o| o.status.success())
        .unwrap_or(false);
    assert!(ok, "gerbv is missing: {hint}");
    py
}

/// Writes the bundle of `d` plus expect.json (the layout the checks compare
/// with) into `dir`.
fn write_bundle(d: &Design, dir: &Path) {
    let layout = geometry::build(d).unwrap_or_else(|e| panic!("{}: {e}", d.name));
    write_built_bundle(d, &layout, dir);
}

/// The outputs of a built design and `expect.json` (design, layout and
/// outline bounds, read by the Python checkers) into `dir`.
fn write_built_bundle(d: &Design, layout: &coilwright::geometry::Board, dir: &Path) {
    let analysis = coilwright::physics::analyse(d, layout).expect("analysis");
    for f in export::bundle(d, layout, &analysis).unwrap() {
        let p = dir.join(&f.path);
        std::fs::create_dir_all(p.parent().unwrap()).unwrap();
        std::fs::write(p, &f.bytes).unwrap();
    }
    let coilwright::geometry::Rect { min: lo, max: hi } = layout.outline_bounds();
    let expect = serde_json::json!({
        "design": d,
        "layout": layout,
        "outline_bounds": [[lo.x, lo.y], [hi.x, hi.y]],
    });
    std::fs::write(
        dir.join("expect.json"),
        serde_json::to_vec(&expect).unwrap(),
    )
    .unwrap();
}

/// Runs one check; returns its report lines or a failure text.
fn run(prog: &Path, args: &[&str]) -> Result<String, String> {
    let out = Command::new(prog)
        .args(args)
        .output()
        .map_err(|e| format!("cannot run {}: {e}", prog.display()))?;
    let text = format!(
        "{}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    if out.status.success() {
        Ok(text)
    } else {
        Err(format!(
            "{} {} exited with {:?}:\n{text}",
            prog.display(),
            args.join(" "),
            out.status.code()
        ))
    }
}

fn check_design(py: &Path, i: usize, root: &Path) -> Result<String, String> {
    let d = random_design(i);
    let dir = root.join(&d.name);
    std::fs::create_dir_all(&dir).unwrap();
    write_bundle(&d, &dir);
    let checks = repo().join("tests/interop/checks.py");
    let kicad = repo().join("tests/interop/kicad_checks.py");
    let (c, k) = (checks.to_str().unwrap(), kicad.to_str().unwrap());
    let dir_s = dir.to_str().unwrap();
    let plot = dir.join("kicad-plot");
    let plot_s = plot.to_str().unwrap();
    let sys = Path::new("/usr/bin/python3");
    let mut report = format!(
        "{} ({:?}, {} layers, {:?}, {:?}, w {} s {} turns {}):\n",
        d.name,
        d.coil.shape,
        d.coil.layers,
        d.coil.wiring,
        d.coil.corner,
        d.coil.trace_width,
        d.coil.clearance,
        d.coil.turns
    );
    let mut errors = String::new();
    for (prog, args) in [
        (py, vec![c, "symbol", dir_s]),
        (py, vec![c, "readers", dir_s]),
        (py, vec![c, "geometry", dir_s]),
        (py, vec![c, "dxf", dir_s]),
        (py, vec![c, "tail", dir_s]),
        (sys, vec![k, "footprint", dir_s]),
        (sys, vec![k, "board", dir_s]),
        (sys, vec![k, "plot", dir_s, plot_s]),
        (py, vec![c, "raster", dir_s, plot_s]),
    ] {
        match run(prog, &args) {
            Ok(t) => report.push_str(&t),
            Err(e) => errors.push_str(&e),
        }
    }
    if errors.is_empty() {
        Ok(report)
    } else {
        Err(format!("{report}{errors}"))
    }
}

#[test]
fn random_designs_pass_real_readers_and_kicad() {
    let py = require_tools();
    let keep = std::env::var_os("COILWRIGHT_INTEROP_KEEP").map(PathBuf::from);
    let tmp = tempfile::tempdir().unwrap();
    let root = keep.unwrap_or_else(|| tmp.path().to_path_buf());
    // COILWRIGHT_INTEROP_ONLY=3,7 checks only those designs (for debugging).
    let only: Vec<usize> = std::env::var("COILWRIGHT_INTEROP_ONLY")
        .map(|s| s.split(',').filter_map(|x| x.trim().parse().ok()).collect())
        .unwrap_or_else(|_| (0..DESIGNS).collect());
    let next = Mutex::new(0usize);
    let results = Mutex::new(Vec::new());
    std::thread::scope(|s| {
        for _ in 0..2 {
            s.spawn(|| {
                loop {
                    let i = {
                        let mut n = next.lock().unwrap();
                        let k = *n;
                        *n += 1;
                        match only.get(k) {
                            Some(&i) => i,
                            None => break,
                        }
                    };
                    let r = check_design(&py, i, &root);
                    results.lock().unwrap().push((i, r));
                }
            });
        }
    });
    let mut results = results.into_inner().unwrap();
    results.sort_by_key(|r| r.0);
    let mut failed = Vec::new();
    for (i, r) in &results {
        match r {
            Ok(t) => println!("{t}"),
            Err(e) => {
                println!("{e}");
                failed.push(*i);
            }
        }
    }
    assert!(
        failed.is_empty(),
        "designs failing interop checks: {failed:?}"
    );
    assert!(results.len() >= only.len(), "not every design was checked");
}

#[test]
fn arrays_pass_real_readers_and_kicad() {
    let py = require_tools();
    let tmp = tempfile::tempdir().unwrap();
    let keep = std::env::var_os("COILWRIGHT_INTEROP_KEEP").map(PathBuf::from);
    let root = keep.unwrap_or_else(|| tmp.path().to_path_buf());
    let base = include_str!("../../examples/fan-stator.toml");
    let checks = repo().join("tests/interop/checks.py");
    let kicad = repo().join("tests/interop/kicad_checks.py");
    let mut errors = String::new();
    let mut cases: Vec<(String, String, bool)> =
        [(9, 6, "star"), (9, 8, "delta"), (12, 10, "separate")]
            .into_iter()
            .map(|(count, poles, connection)| {
                let text = crate::common::poles_only(base)
                    .replace("count = 9", &format!("count = {count}"))
                    .replace("poles = 6", &format!("poles = {poles}"))
                    .replace(
                        "connection = \"star\"",
                        &format!("connection = \"{connection}\""),
                    )
                    .replace(
                        "neutral = true ",
                        &format!("neutral = {} ", connection == "star"),
                    )
                    .replace("outer_diameter = \"56mm\"", "outer_diameter = \"80mm\"")
                    .replace("inner_diameter = \"26mm\" ", "inner_diameter = \"50mm\" ");
                (
                    format!("{count}/{poles} {connection}"),
                    text,
                    connection == "separate",
                )
            })
            .collect();
    // A grid: one phase in series, ends A1 and A2.
    cases.push((
        "grid 3x4".into(),
        crate::common::grid(3, 4, "14mm", "17mm"),
        true,
    ));
    // Sector coils (the gimbal-stator example, and a 9-coil delta on six
    // layers): arcs about the ring's centre, slanted sides.
    let sectors = include_str!("../../examples/gimbal-stator.toml");
    cases.push(("sectors 12/14 star".into(), sectors.to_string(), false));
    cases.push((
        "sectors 9/8 delta 6 layers".into(),
        crate::common::poles_only(sectors)
            .replace("count = 12", "count = 9")
            .replace("poles = 14", "poles = 8")
            .replace("connection = \"star\"", "connection = \"delta\"")
            .replace("neutral = true ", "neutral = false ")
            .replace("layers = 4 ", "layers = 6 "),
        false,
    ));
    for (i, (label, text, separate)) in cases.iter().enumerate() {
        let (d, board) = coilwright::pipeline::parse_and_build(text).unwrap();
        let dir = root.join(format!("stator-{i}"));
        write_built_bundle(&d, &board, &dir);
        let dir_s = dir.to_str().unwrap();
        let clearance = d.coil.clearance.to_string();
        // Separate phases have both ends on pads: walk each phase's
        // resistance on the Gerbers (gerbonara) against the report's.
        let walk = separate.then(|| {
            (
                py.as_path(),
                vec![checks.to_str().unwrap(), "phase_walk", dir_s],
            )
        });
        if label.starts_with("sectors") {
            // Turn to turn in every sector coil, and every drill hit on
            // copper of exactly the layers it joins (shapely, gerbonara).
            match run(py.as_path(), &[checks.to_str().unwrap(), "geometry", dir_s]) {
                Ok(t) => println!("{label}: {t}"),
                Err(e) => errors.push_str(&format!("{label}: {e}\n")),
            }
        }
        for (prog, args) in [
            (
                py.as_path(),
                vec![checks.to_str().unwrap(), "readers", dir_s],
            ),
            (
                py.as_path(),
                vec![checks.to_str().unwrap(), "nets", dir_s, clearance.as_str()],
            ),
            (
                py.as_path(),
                vec![checks.to_str().unwrap(), "symbol", dir_s],
            ),
            (
                Path::new("/usr/bin/python3"),
                vec![kicad.to_str().unwrap(), "stator", dir_s],
            ),
            (
                Path::new("/usr/bin/python3"),
                vec![kicad.to_str().unwrap(), "footprint", dir_s],
            ),
        ]
        .into_iter()
        .chain(walk)
        {
            match run(prog, &args) {
                Ok(t) => println!("{label}: {t}"),
                Err(e) => errors.push_str(&format!("{label}: {e}\n")),
            }
        }
    }
    assert!(errors.is_empty(), "{errors}");
}
