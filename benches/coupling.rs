//! Issue 15's speed targets: the full report of an 8-layer, 100-turn
//! hexagon (target under 0.5 s; the inductance sums were 2.8 s of
//! processor time before the block sums and the closed form for skew
//! pieces) and a coupling map of 100 gaps for two 20-turn coils (target
//! under 1 s on 2 cores): two 2-layer hexagons (Neumann on every filament
//! pair) and two 2-layer circles on one axis (Maxwell rings).

use coilwright::design::{Design, Shape};
use coilwright::physics::conductor::{Conductor, m};
use coilwright::physics::coupling::{CoilCopper, Facing, Placement, mutual_map};
use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::time::Duration;

fn hexagon_8_layers_100_turns() -> Design {
    let mut d = Design::sample();
    d.coil.shape = Shape::Polygon { sides: 6 };
    d.coil.layers = 8;
    d.stackup.copper = vec![0.035; 8];
    d.stackup.dielectric = vec![0.05; 7];
    d.coil.turns = 100.0;
    d.coil.inner_diameter = 6.0;
    d.coil.outer_diameter = 6.0 + 2.0 * (100.0 * d.coil.pitch() + d.coil.clearance);
    d
}

fn report_hexagon(c: &mut Criterion) {
    let d = hexagon_8_layers_100_turns();
    let layout = coilwright::geometry::build(&d).expect("layout");
    let mut g = c.benchmark_group("report");
    g.sample_size(10).measurement_time(Duration::from_secs(10));
    g.bench_function("hexagon_8_layers_100_turns", |b| {
        b.iter(|| {
            let a =
                coilwright::physics::analyse(black_box(&d), black_box(&layout)).expect("analysis");
            black_box(coilwright::export::report::files(&d, &layout, &a).expect("report"))
        })
    });
    g.finish();
}

fn twenty_turns(shape: Shape) -> CoilCopper {
    let mut d = Design::sample();
    d.coil.shape = shape;
    d.coil.layers = 2;
    d.stackup.copper = vec![0.035; 2];
    d.stackup.dielectric = vec![0.2];
    d.coil.turns = 20.0;
    d.coil.inner_diameter = 6.0;
    d.coil.outer_diameter = 6.0 + 2.0 * (20.0 * d.coil.pitch() + d.coil.clearance);
    let layout = coilwright::geometry::build(&d).expect("layout");
    CoilCopper::new(&d, &Conductor::new(&d, &layout))
}

fn coupling_map(c: &mut Criterion) {
    let gaps: Vec<Placement> = (0..100)
        .map(|i| Placement {
            gap_m: m(0.2 + 0.2 * i as f64),
            offset_m: 0.0,
            facing: Facing::TopToTop,
        })
        .collect();
    let mut g = c.benchmark_group("coupling_map");
    g.sample_size(10).measurement_time(Duration::from_secs(10));
    for (name, shape) in [
        ("100_gaps_20_turn_hexagons", Shape::Polygon { sides: 6 }),
        ("100_gaps_20_turn_circles", Shape::Circle),
    ] {
        let coil = twenty_turns(shape);
        g.bench_function(name, |b| {
            b.iter(|| black_box(mutual_map(&coil, &coil, black_box(&gaps))))
        });
    }
    g.finish();
}

criterion_group!(benches, report_hexagon, coupling_map);
criterion_main!(benches);
