//! The rotor of magnets over the copper (issue 14) against outside truth:
//! magpylib 6.3 (PyPI) computes the field of the same magnets (its
//! `Cylinder`, `Cuboid` and `CylinderSegment` sources, closed-form fields)
//! and the flux through rectangular loops by a Gauss-Legendre product rule
//! over their area (tests/interop/rotor_magpylib.py); ours comes from the
//! equivalent surface currents, the polar tables and the line integral
//! along the loop (`physics::rotor`). Needs the venv from
//! tests/interop/setup.sh; fails, never skips, without it.

use coilwright::design::{RotorMagnet, RotorMagnets};
use coilwright::physics::conductor::Filament;
use coilwright::physics::rotor::{Coupling, RotorSource};
use serde_json::json;
use std::path::Path;
use std::process::Command;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// Runs the interop venv's Python on `script` (under tests/interop) with
/// the JSON file `input`; fails with its output unless it exits 0.
fn run_checker(script: &str, input: &Path) {
    let python = root().join(".venv-interop/bin/python");
    assert!(
        python.exists(),
        "{} is missing: run tests/interop/setup.sh first (it installs magpylib)",
        python.display()
    );
    let o = Command::new(&python)
        .arg(root().join("tests/interop").join(script))
        .arg(input)
        .output()
        .unwrap();
    println!("{}", String::from_utf8_lossy(&o.stdout));
    assert!(
        o.status.success(),
        "{}\n{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
}

/// A closed axis-aligned rectangle from (x0, y0) to (x1, y1) at height z
/// (m), counter-clockwise, each side cut in 20 filaments.
fn rectangle(x0: f64, y0: f64, x1: f64, y1: f64, z: f64) -> Vec<Filament> {
    let corners = [[x0, y0], [x1, y0], [x1, y1], [x0, y1]];
    let mut out = Vec::new();
    for i in 0..4 {
        let (a, b) = (corners[i], corners[(i + 1) % 4]);
        for k in 0..20 {
            let p = |t: f64| [a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]), z];
            out.push(Filament {
                a: p(k as f64 / 20.0),
                b: p((k + 1) as f64 / 20.0),
                weight: 1.0,
                layer: 1,
                width: 1e-4,
                thickness: 3.5e-5,
                lead: false,
            });
        }
    }
    out
}

#[test]
fn rotor_field_and_flux_match_magpylib() {
    let rotors = [
        (RotorMagnet::Cylinder { diameter: 8.0 }, 8, 1),
        (
            RotorMagnet::Block {
                width: 6.0,
                length: 9.0,
            },
            6,
            2,
        ),
        (
            RotorMagnet::Arc {
                inner_diameter: 20.0,
                outer_diameter: 40.0,
                angle: 35.0,
            },
            8,
            1,
        ),
    ];
    let bottom = -1.6e-3;
    let mut cases = Vec::new();
    for (magnet, poles, discs) in rotors {
        let rotor = RotorMagnets {
            magnet,
            thickness: 3.0,
            remanence: 1.25,
            gap: 1.0,
            pitch_diameter: 30.0,
            discs,
        };
        let src = RotorSource::new(poles, &rotor, bottom);
        let mut points = Vec::new();
        for (i, z) in [-2e-5, -8e-4, -1.58e-3].iter().enumerate() {
            for k in 0..24 {
                let (r, a) = (0.008 + 0.0005 * k as f64, 0.07 * k as f64 + i as f64);
                let p = [r * a.cos(), r * a.sin(), *z];
                points.push(json!({"at": p, "b": src.field_at(p)}));
            }
        }
        let mut loops = Vec::new();
        for (x0, y0, x1, y1, z) in [
            (0.011, -0.003, 0.019, 0.004, -2e-5),
            (0.005, 0.006, 0.017, 0.012, -8e-4),
            (-0.004, -0.020, 0.006, -0.012, -2e-5),
        ] {
            let c = Coupling::new(&src, &rectangle(x0, y0, x1, y1, z));
            for theta in [0.0, 0.2, 0.5] {
                loops.push(json!({
                    "rect": [x0, y0, x1, y1], "z": z, "theta": theta,
                    "flux": c.at(theta).0,
                }));
            }
        }
        cases.push(json!({"poles": poles, "rotor": rotor, "bottom": bottom, "points": points, "loops": loops}));
    }
    let dir = tempfile::tempdir().unwrap();
    let file = std::env::var("ROTOR_JSON").map_or(dir.path().join("rotor.json"), Into::into);
    std::fs::write(&file, serde_json::to_string(&cases).unwrap()).unwrap();
    run_checker("rotor_magpylib.py", &file);
}

/// The flux through the real copper of one layer of a coil, its spiral and
/// lead closed by the chord from its end back to its start, against
/// magpylib: Bz of the rotor's magnets (magpylib `Cylinder`) integrated over
/// the loop's area weighted by its winding number on a fine grid
/// (tests/interop/rotor_copper_magpylib.py), at three rotor angles, within
/// 2e-3 (the issue asks for 2 %; the grid's staircase edges limit the
/// reference).
#[test]
fn flux_through_real_copper_matches_magpylib() {
    let text = std::fs::read_to_string(root().join("examples/fan-stator.toml")).unwrap();
    // The example's coil alone (no array), moved under the magnet ring.
    let single: String = text.split("[array]").next().unwrap().to_string();
    let (design, board) = coilwright::pipeline::parse_and_build(&single).unwrap();
    let magnets = RotorMagnets {
        magnet: RotorMagnet::Cylinder { diameter: 10.0 },
        thickness: 3.0,
        remanence: 1.25,
        gap: 1.0,
        pitch_diameter: 41.0,
        discs: 1,
    };
    copper_flux_against_magpylib(&design, &board, 0.0205, 6, magnets);
}

/// The same for a sector coil of the gimbal-stator example (arcs about
/// the ring's centre, slanted sides), in its slot of the ring under ten
/// cylinder magnets passing over it.
#[test]
fn flux_through_sector_copper_matches_magpylib() {
    let text = std::fs::read_to_string(root().join("examples/gimbal-stator.toml")).unwrap();
    let design = coilwright::pipeline::parse(&text).unwrap();
    // The coil alone at the origin: its ring's centre is 18.5 mm on -x.
    let board = coilwright::geometry::build(&design).unwrap();
    let magnets = RotorMagnets {
        magnet: RotorMagnet::Cylinder { diameter: 10.0 },
        thickness: 2.0,
        remanence: 1.3,
        gap: 0.6,
        pitch_diameter: 37.0,
        discs: 1,
    };
    copper_flux_against_magpylib(&design, &board, 0.0185, 10, magnets);
}

/// Layer 1 of the coil on `board` (built at the origin), moved `shift` m
/// along x under `poles` `magnets`: its flux at three rotor angles against
/// magpylib (tests/interop/rotor_copper_magpylib.py).
fn copper_flux_against_magpylib(
    design: &coilwright::design::Design,
    board: &coilwright::geometry::Board,
    shift: f64,
    poles: u32,
    magnets: RotorMagnets,
) {
    use coilwright::physics::conductor::Conductor;
    let cond = Conductor::new(design, board);
    let top: Vec<Filament> = cond
        .balanced_filaments(coilwright::physics::rotor::SAGITTA)
        .into_iter()
        .filter(|f| f.layer == 1)
        .map(|f| Filament {
            a: [f.a[0] + shift, f.a[1], f.a[2]],
            b: [f.b[0] + shift, f.b[1], f.b[2]],
            weight: 1.0,
            ..f
        })
        .collect();
    // One chain in current order: each filament starts where the last ended.
    for w in top.windows(2) {
        let d = (w[0].b[0] - w[1].a[0]).hypot(w[0].b[1] - w[1].a[1]);
        assert!(d < 1e-9, "layer 1 is not one chain ({d} m)");
    }
    let mut closed = top.clone();
    closed.push(Filament {
        a: top[top.len() - 1].b,
        b: top[0].a,
        ..top[0]
    });
    let src = RotorSource::new(poles, &magnets, -1.0e-3);
    let c = Coupling::new(&src, &closed);
    let thetas = [0.0, 0.3, 0.7];
    let ours: Vec<f64> = thetas.iter().map(|t| c.at(*t).0).collect();
    let path: Vec<[f64; 2]> = closed.iter().map(|f| [f.a[0], f.a[1]]).collect();
    let case = json!({"poles": poles, "rotor": magnets, "z": top[0].a[2], "path": path,
                      "thetas": thetas, "ours": ours});
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("copper.json");
    std::fs::write(&file, serde_json::to_string(&case).unwrap()).unwrap();
    run_checker("rotor_copper_magpylib.py", &file);
}

/// The fan-stator example end to end: the torque constant comes from the
/// Lorentz force on the copper, the back-EMF from the flux linkage; by
/// energy (power = EMF x current = torque x speed) balanced three-phase
/// sinusoidal currents give 1.5 x the back-EMF fundamental per ampere of
/// phase peak (textbook three-phase relation), and the two curves agree
/// at every angle within 2 % of the peak (the tolerance).
#[test]
fn stator_torque_and_back_emf_agree() {
    let text = std::fs::read_to_string(root().join("examples/fan-stator.toml")).unwrap();
    let (design, board) = coilwright::pipeline::parse_and_build(&text).unwrap();
    let a = coilwright::physics::analyse(&design, &board).unwrap();
    let r = a.rotor.as_ref().expect("the example's rotor has magnets");
    let c = &r.constants;
    assert_eq!(r.phases.len(), 3);
    assert!(c.energy_balance < 0.02, "{}", c.energy_balance);
    let ratio = c.torque_constant_n_m_per_a / c.back_emf_fundamental_v_per_rad_s;
    assert!((ratio / 1.5 - 1.0).abs() < 0.02, "{ratio}");
    // Line EMF of a balanced star: no triplen harmonics, sqrt(3) x the
    // phase fundamental at most.
    let line = c.back_emf_line_v_per_rad_s.unwrap();
    assert!(line <= 3f64.sqrt() * c.back_emf_v_per_rad_s * 1.001);
    // The plot is among the report's plots.
    let plots = coilwright::export::report::plots(&design, &board, &a);
    assert!(plots.iter().any(|p| p.0 == "back_emf.svg"));
}

#[test]
fn the_torque_costs_what_the_constants_say() {
    // Balanced sinusoidal drive of m phases: torque k_t I, copper loss
    // m I^2 R / 2 (I the phase peak): the textbook relations the report's
    // load must satisfy, and its torque limit is the torque constant times
    // the thermal limit's sine amplitude from the heat balance.
    let text = std::fs::read_to_string(root().join("examples/fan-stator.toml"))
        .unwrap()
        .replace(
            "frequency = \"150Hz\"",
            "waveform = \"sine\"\nfrequency = \"150Hz\"",
        );
    let (design, board) = coilwright::pipeline::parse_and_build(&text).unwrap();
    let a = coilwright::physics::analyse(&design, &board).unwrap();
    let j = serde_json::to_value(&a).unwrap();
    let kt = j["torque_constant_n_m_per_a"].as_f64().unwrap();
    let r20 = j["phase_resistance_ohm_20c"].as_f64().unwrap();
    let load = &j["rotor"]["load"];
    let t = load["torque_n_m"].as_f64().unwrap();
    assert_eq!(t, 1e-3);
    let i = t / kt;
    assert!((load["phase_current_peak_a"].as_f64().unwrap() / i - 1.0).abs() < 1e-12);
    let p = j["copper_loss_w"].as_f64().unwrap();
    assert!((p / (1.5 * i * i * r20) - 1.0).abs() < 1e-12, "{p}");
    let km = j["motor_constant_n_m_per_sqrt_w"].as_f64().unwrap();
    assert!((t / p.sqrt() / km - 1.0).abs() < 1e-12);
    let t_max = j["torque_max_n_m"].as_f64().unwrap();
    let i_max = j["max_current_a"].as_f64().unwrap();
    assert!((t_max / (kt * i_max) - 1.0).abs() < 1e-9, "{t_max} {i_max}");
    assert!(!j["warnings"].to_string().contains("torque"));
    // Past the limit: a caution naming it.
    let over = text.replace("torque = \"1mNm\"", "torque = \"20mNm\"");
    let (design, board) = coilwright::pipeline::parse_and_build(&over).unwrap();
    let a = coilwright::physics::analyse(&design, &board).unwrap();
    assert!(
        a.cautions
            .iter()
            .any(|c| c.id() == "torque-above-limit" && c.is_limit()),
        "{:?}",
        a.cautions
    );
}
