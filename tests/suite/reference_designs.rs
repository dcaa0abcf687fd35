//! Designs shared by the magpylib fixture export (examples/export_conductor.rs)
//! and the Rust test that compares with the fixtures (tests/suite/physics_magpylib.rs).
//! Invented designs.

use coilwright::design::{Design, Magnet, Shape};

/// (name, design) for every reference case.
pub fn cases() -> Vec<(&'static str, Design)> {
    let mut out = Vec::new();
    // 1. The sample: 4-layer circle, 10 turns, 20 mm.
    out.push(("circle-4-layer", Design::sample()));
    // 2. Two-layer hexagon with a thicker magnet close by.
    let mut d = Design::sample();
    d.coil.shape = Shape::Polygon { sides: 6 };
    d.coil.layers = 2;
    d.coil.turns = 8.0;
    d.coil.inner_diameter = 6.0;
    d.stackup.copper = vec![0.035; 2];
    d.stackup.dielectric = vec![0.1];
    d.magnet = Some(Magnet {
        diameter: 6.0,
        thickness: 3.0,
        remanence: 1.2,
        gap: 0.3,
    });
    out.push(("hexagon-2-layer", d));
    // 3. One-layer rectangle, rounded corners, 18 um copper, no magnet
    //    replaced by a small one far off.
    let mut d = Design::sample();
    d.coil.shape = Shape::Rectangle {
        width: 24.0,
        height: 16.0,
    };
    d.coil.corner = coilwright::design::Corner::Round { radius: 0.5 };
    d.coil.layers = 1;
    d.coil.turns = 6.5;
    d.coil.inner_diameter = 5.0;
    d.coil.trace_width = 0.2;
    d.coil.clearance = 0.15;
    d.stackup.copper = vec![0.018];
    d.stackup.dielectric = vec![];
    d.magnet = Some(Magnet {
        diameter: 3.0,
        thickness: 1.5,
        remanence: 1.4,
        gap: 1.0,
    });
    out.push(("rectangle-1-layer", d));
    out
}

/// Observation points for the field comparison, metres.
pub fn points() -> Vec<[f64; 3]> {
    let mut p = Vec::new();
    for z in [0.2e-3, 0.5e-3, 1e-3, 2e-3, 5e-3, 15e-3, -1e-3] {
        p.push([0.0, 0.0, z]);
    }
    for r in [1e-3, 3e-3, 6e-3, 9e-3, 11e-3, 14e-3] {
        p.push([r, 0.0, 0.7e-3]);
        p.push([0.6 * r, 0.8 * r, 2e-3]);
    }
    p.push([2e-3, -3e-3, -2e-3]);
    p.push([-7e-3, 4e-3, 3e-3]);
    p
}
