//! Exports the conductor of the reference designs as polylines (metres,
//! current share per winding) with the magnets and observation points, as
//! JSON on stdout, for tests/reference/make_magpylib_fixtures.py.
//!
//! `cargo run --release --example export_conductor > /tmp/conductors.json`

#[path = "../tests/suite/reference_designs.rs"]
mod designs;

use coilwright::physics::{FIELD_SAGITTA, conductor::Conductor};
use serde_json::json;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let mut cases = Vec::new();
    for (name, d) in designs::cases() {
        let layout = coilwright::geometry::build(&d)?;
        let cond = Conductor::new(&d, &layout);
        // One polyline per winding, in current order.
        let fil = cond.balanced_filaments(FIELD_SAGITTA);
        let mut lines: Vec<serde_json::Value> = Vec::new();
        let mut cur: Vec<[f64; 3]> = Vec::new();
        let mut key = (0u8, 0.0f64);
        for f in &fil {
            let k = (f.layer, f.weight);
            let joined = cur.last().is_some_and(|l| *l == f.a) && k == key;
            if !joined {
                if cur.len() > 1 {
                    lines.push(json!({"layer": key.0, "weight": key.1, "vertices": cur}));
                }
                cur = vec![f.a];
                key = k;
            }
            cur.push(f.b);
        }
        if cur.len() > 1 {
            lines.push(json!({"layer": key.0, "weight": key.1, "vertices": cur}));
        }
        let magnet = d.magnet.map(|m| {
            json!({"diameter_m": m.diameter * 1e-3, "thickness_m": m.thickness * 1e-3,
                   "remanence_t": m.remanence, "gap_m": m.gap * 1e-3})
        });
        cases.push(json!({"name": name, "polylines": lines, "magnet": magnet, "points_m": designs::points()}));
    }
    println!("{}", serde_json::to_string(&json!({"cases": cases}))?);
    Ok(())
}
