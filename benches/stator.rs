//! A 12-coil, 4-layer three-phase stator (the fan-stator example with 12
//! coils facing 10 poles on a larger ring): reading, building every coil
//! and bus, and the rule check over the whole board, together. The issue
//! asks for under 1 s.

use coilwright::rules::{self, Profile};
use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;

fn stator_text() -> String {
    include_str!("../examples/fan-stator.toml")
        .replace("count = 9", "count = 12")
        .replace("poles = 6", "poles = 10")
        .replace("outer_diameter = \"56mm\"", "outer_diameter = \"80mm\"")
        .replace("inner_diameter = \"26mm\" ", "inner_diameter = \"50mm\" ")
}

fn bench(c: &mut Criterion) {
    let text = stator_text();
    let profile = Profile::builtin("standard").unwrap();
    let mut g = c.benchmark_group("stator");
    g.sample_size(10);
    g.bench_function("12 coils, 4 layers: build and rule check", |b| {
        b.iter(|| {
            let (d, board) = coilwright::pipeline::parse_and_build(black_box(&text)).unwrap();
            let v = rules::check(&d, &board, &profile);
            assert!(v.is_empty());
            black_box(v)
        })
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
