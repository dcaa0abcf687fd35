//! Building the layout of an 8-layer, 100-turn circular coil (issue 2's
//! speed note: should take milliseconds), and a 6-sided one with round corners.
use coilwright::design::{Corner, Design, Shape};
use coilwright::geometry;
use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;

fn design(shape: Shape, corner: Corner) -> Design {
    let mut d = Design::sample();
    d.coil.shape = shape;
    d.coil.corner = corner;
    d.coil.layers = 8;
    d.coil.turns = 100.0;
    d.coil.inner_diameter = 10.0;
    d.stackup.copper = vec![0.035; 8];
    d.stackup.dielectric = vec![0.05; 7];
    d
}

fn bench(c: &mut Criterion) {
    let circle = design(Shape::Circle, Corner::Sharp);
    c.bench_function("layout 8 layers x 100 turns circle", |b| {
        b.iter(|| geometry::build(black_box(&circle)).unwrap())
    });
    let hex = design(Shape::Polygon { sides: 6 }, Corner::Round { radius: 0.3 });
    c.bench_function("layout 8 layers x 100 turns hexagon, round corners", |b| {
        b.iter(|| geometry::build(black_box(&hex)).unwrap())
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
