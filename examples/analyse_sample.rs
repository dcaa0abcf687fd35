//! Prints the analysis of a design as JSON: `cargo run --example analyse_sample [layers] [turns] [shape]`.
use coilwright::design::{Design, Shape};

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let mut d = Design::sample();
    if let Some(l) = args.get(1).and_then(|s| s.parse::<u8>().ok()) {
        d.coil.layers = l;
        d.stackup.copper = vec![0.035; l as usize];
        d.stackup.dielectric = vec![0.05; l as usize - 1];
    }
    if let Some(t) = args.get(2).and_then(|s| s.parse::<f64>().ok()) {
        d.coil.turns = t;
        d.coil.inner_diameter = 6.0;
        d.coil.outer_diameter = 6.0 + 2.0 * (t * d.coil.pitch() + d.coil.clearance);
    }
    match args.get(3).map(|s| s.as_str()) {
        Some("hex") => d.coil.shape = Shape::Polygon { sides: 6 },
        Some("square") => d.coil.shape = Shape::Polygon { sides: 4 },
        Some("rect") => {
            d.coil.shape = Shape::Rectangle {
                width: 30.0,
                height: 20.0,
            }
        }
        _ => {}
    }
    let layout = coilwright::geometry::build(&d).expect("layout");
    let t = std::time::Instant::now();
    let a = coilwright::physics::analyse(&d, &layout).expect("analysis");
    let el = t.elapsed();
    let mut v = serde_json::to_value(&a).unwrap();
    for k in ["field", "magnet"] {
        if let Some(o) = v.get_mut(k).and_then(|x| x.as_object_mut()) {
            o.remove("axial");
            o.remove("radial");
            o.remove("force_vs_gap");
        }
    }
    println!("{}", serde_json::to_string_pretty(&v).unwrap());
    eprintln!("analysis took {el:?}");
}
