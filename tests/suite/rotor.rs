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
    let python = root().join(".venv-interop/bin/python");
    assert!(
        python.exists(),
        "{} is missing: run tests/interop/setup.sh first (it installs magpylib)",
        python.display()
    );
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
    let o = Command::new(&python)
        .arg(root().join("tests/interop/rotor_magpylib.py"))
        .arg(&file)
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "{}\n{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
}
