//! Two coils across a gap (issue 15, `coilwright couple`), against outside
//! truth (sources named beside each check):
//!
//! - the mutual inductance of two spiral coils on their real copper
//!   (Neumann, filaments) against a sum of Maxwell's coaxial-ring formula
//!   over their turns, within 2 %;
//! - identical coaxial coils against magpylib: the flux of one coil's field
//!   (magpylib's straight-segment Biot-Savart) through the other's turns
//!   (tests/interop/coupling_flux.py, needs the venv from
//!   tests/interop/setup.sh; fails, never skips, without it).
//!
//! Loops and straight filaments against Maxwell and Grover are unit tests
//! in `src/physics/coupling.rs`.

use coilwright::physics::conductor::{Conductor, m};
use coilwright::physics::coupling::{CoilCopper, Facing, Placement, mutual};
use std::path::Path;
use std::process::Command;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn coil(name: &str) -> (coilwright::design::Design, coilwright::geometry::Board) {
    let text = std::fs::read_to_string(root().join(format!("examples/{name}.toml"))).unwrap();
    coilwright::pipeline::parse_and_build(&text).unwrap()
}

fn copper(name: &str) -> (CoilCopper, Conductor) {
    let (d, l) = coil(name);
    let cond = Conductor::new(&d, &l);
    (CoilCopper::new(&d, &cond), cond)
}

fn at(gap_mm: f64, offset_mm: f64, facing: Facing) -> Placement {
    Placement {
        gap_m: m(gap_mm),
        offset_m: m(offset_mm),
        facing,
    }
}

/// Neumann on the real copper of both coils (a lateral offset of 1 nm
/// sends the sum through the filaments) against Maxwell's formula for
/// coaxial rings summed over the turns of both (Maxwell 1873, Grover 1946,
/// one ring per turn at its mean radius): within 2 %, both facings, gaps
/// from 0.5 to 20 mm.
#[test]
fn spirals_on_real_copper_match_a_maxwell_sum_over_turns() {
    let (tx, _) = copper("puck-transmit");
    let (rx, _) = copper("puck-receive");
    for facing in [Facing::TopToTop, Facing::SameWay] {
        for gap in [0.5, 2.0, 4.0, 10.0, 20.0] {
            let rings = mutual(&tx, &rx, at(gap, 0.0, facing));
            let neumann = mutual(&tx, &rx, at(gap, 1e-6, facing));
            eprintln!("{facing:?} gap {gap}: Neumann {neumann} Maxwell rings {rings}");
            assert!(
                (neumann / rings - 1.0).abs() < 0.02,
                "{facing:?} gap {gap}: Neumann {neumann} Maxwell rings {rings}"
            );
        }
    }
}

/// Two copies of one coil, the upper one turned over, 3 mm apart: our
/// mutual inductance (Maxwell rings, as `couple` reports it, and Neumann on
/// both coppers) against magpylib's field of the lower coil's real copper
/// integrated over the upper coil's turns (tests/interop/coupling_flux.py),
/// within 0.5 % (the upper coil's turns are rings there: the spiral differs
/// from its rings by order (pitch / radius)^2 and its leads); the coupling
/// k = M / L follows with the same L.
#[test]
fn identical_coaxial_coils_match_magpylib_flux() {
    let python = root().join(".venv-interop/bin/python");
    assert!(
        python.exists(),
        "{} is missing: run tests/interop/setup.sh (magpylib)",
        python.display()
    );
    let (c, cond) = copper("puck-receive");
    let gap = 3.0;
    let place = at(gap, 0.0, Facing::TopToTop);
    let ours_rings = mutual(&c, &c, place);
    let ours_neumann = mutual(&c, &c, at(gap, 1e-6, Facing::TopToTop));
    let segments: Vec<[f64; 7]> = cond
        .filaments(1e-3)
        .iter()
        .map(|f| [f.a[0], f.a[1], f.a[2], f.b[0], f.b[1], f.b[2], f.weight])
        .collect();
    // The upper coil turned over: z -> gap - z, circulation reversed.
    let rings: Vec<[f64; 3]> = cond
        .rings()
        .iter()
        .map(|r| [r.radius, m(gap) - r.z, -r.frac * r.weight])
        .collect();
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("coils.json");
    std::fs::write(
        &input,
        serde_json::json!({ "segments": segments, "rings": rings }).to_string(),
    )
    .unwrap();
    let o = Command::new(&python)
        .arg(root().join("tests/interop/coupling_flux.py"))
        .arg(&input)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let magpy = v["mutual_h"].as_f64().unwrap();
    eprintln!("M: Maxwell rings {ours_rings}, Neumann {ours_neumann}, magpylib flux {magpy}");
    for ours in [ours_rings, ours_neumann] {
        assert!(
            (ours / magpy - 1.0).abs() < 0.005,
            "ours {ours} magpylib flux {magpy}"
        );
    }
}
