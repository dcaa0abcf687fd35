//! Rule check speed: an 8-layer circular coil with 100 turns per layer,
//! the same coil with every track cut into 10 (ten times the segments, same
//! copper), and an 8-layer coil with 1000 turns per layer (ten times the
//! segments and the turns; about a hundred times the copper length); and
//! the growth with the turn count of an 8-layer hexagon with sharp corners
//! (100, 200, 400 and 1000 turns) and of a long rectangle, whose straight
//! sides the index measures with the layer's own gauge; and what the
//! `check` command does for the 1000-turn hexagon (rules and limits).

use coilwright::design::Design;
use coilwright::geometry::{self, Arc, Board, Segment};
use coilwright::physics;
use coilwright::rules::{self, Profile};
use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;

/// The sample design with `layers` layers and `turns` turns per layer, the
/// smallest free centre of at least 6 mm that holds the centre vias.
fn coil(layers: u8, turns: f64) -> Design {
    let mut d = Design::sample();
    let c = &mut d.coil;
    c.layers = layers;
    c.turns = turns;
    c.inner_diameter = geometry::min_inner_diameter(
        &c.shape,
        layers,
        c.wiring,
        c.clearance,
        c.trace_width,
        d.via.diameter,
        d.terminal.diameter,
    )
    .max(6.0);
    c.outer_diameter = c.inner_diameter + 2.0 * turns * c.pitch() + 2.0 * c.trace_width;
    d.stackup.copper = vec![0.035; layers as usize];
    d.stackup.dielectric = vec![0.05; layers as usize - 1];
    d
}

/// The layout with every track cut into `n` equal tracks.
fn split(l: &Board, n: usize) -> Board {
    let mut out = l.clone();
    out.tracks.clear();
    for w in out.windings.iter_mut() {
        let start = out.tracks.len();
        for t in &l.tracks[w.tracks.0..w.tracks.1] {
            for k in 0..n {
                let (t0, t1) = (k as f64 / n as f64, (k + 1) as f64 / n as f64);
                let segment = match t.segment {
                    Segment::Line(x) => {
                        Segment::line(x.start.lerp(x.end, t0), x.start.lerp(x.end, t1))
                    }
                    Segment::Arc(a) => Segment::Arc(Arc::from_start(
                        a.center,
                        a.point_at(t0),
                        a.sweep / n as f64,
                    )),
                };
                out.tracks.push(geometry::Track { segment, ..*t });
            }
        }
        w.tracks = (start, out.tracks.len());
    }
    out
}

fn bench(c: &mut Criterion) {
    let profile = Profile::builtin("standard").expect("built-in profile");
    let mut g = c.benchmark_group("rules");
    g.sample_size(10);
    let d100 = coil(8, 100.0);
    let l100 = geometry::build(&d100).expect("layout");
    assert!(rules::is_clean(&rules::check(&d100, &l100, &profile)));
    g.bench_function("check 8 layers x 100 turns", |b| {
        b.iter(|| rules::check(black_box(&d100), black_box(&l100), &profile))
    });
    let l100s = split(&l100, 10);
    assert!(rules::is_clean(&rules::check(&d100, &l100s, &profile)));
    g.bench_function("check 8 layers x 100 turns, tracks cut in 10", |b| {
        b.iter(|| rules::check(black_box(&d100), black_box(&l100s), &profile))
    });
    let d1000 = coil(8, 1000.0);
    let l1000 = geometry::build(&d1000).expect("layout");
    assert!(rules::is_clean(&rules::check(&d1000, &l1000, &profile)));
    g.bench_function("check 8 layers x 1000 turns", |b| {
        b.iter(|| rules::check(black_box(&d1000), black_box(&l1000), &profile))
    });
    for turns in [100, 200, 400, 1000] {
        let (d, l) = polygon_coil("shape = \"polygon\"\nsides = 6", turns);
        assert!(rules::is_clean(&rules::check(&d, &l, &profile)));
        g.bench_function(format!("check 8 layers x {turns} turns hexagon"), |b| {
            b.iter(|| rules::check(black_box(&d), black_box(&l), &profile))
        });
        if turns == 1000 {
            // What `coilwright check` does after the build: the rules and
            // the design's limits (Detail::Limits: no inductance for a
            // steady drive).
            g.bench_function("check command 8 layers x 1000 turns hexagon", |b| {
                b.iter(|| {
                    let v = rules::check(black_box(&d), black_box(&l), &profile);
                    let a = physics::analyse_with(&d, &l, physics::Detail::Limits);
                    (v, a.expect("analysis").thermal.temperature_c)
                })
            });
        }
    }
    let (d, l) = polygon_coil(
        "shape = \"rectangle\"\nwidth = \"200mm\"\nheight = \"130mm\"",
        300,
    );
    assert!(rules::is_clean(&rules::check(&d, &l, &profile)));
    g.bench_function("check 8 layers x 300 turns rectangle 200 x 130 mm", |b| {
        b.iter(|| rules::check(black_box(&d), black_box(&l), &profile))
    });
    g.finish();
}

/// An 8-layer coil of 0.1/0.1 mm track with `turns` turns about a 6 mm
/// free centre (rectangles: a free centre of their own), sharp corners.
fn polygon_coil(shape: &str, turns: u32) -> (Design, Board) {
    let inner = if shape.contains("rectangle") {
        ""
    } else {
        "inner_diameter = \"6mm\"\n"
    };
    let text = format!(
        "name = \"bench\"\n[coil]\n{shape}\n{inner}turns = {turns}\n\
         trace_width = \"0.1mm\"\nclearance = \"0.1mm\"\nlayers = 8\n\
         [stackup]\nkind = \"rigid\"\ncopper = \"1oz\"\ndielectric = \"0.1mm\"\n"
    );
    coilwright::pipeline::parse_and_build(&text).expect("bench design")
}

criterion_group!(benches, bench);
criterion_main!(benches);
