//! Benchmarks of the analysis: the Biot-Savart sum (10,000 segments x
//! 10,000 points), the full analysis of an 8-layer, 100-turn coil
//! (target under 1 s) and the full report of the fin starter with its
//! square-wave drive and `[fin]` (target under 50 ms), and the
//! capacitance phase of one 8-layer sweep candidate.

use coilwright::design::Design;
use coilwright::physics::field::Segments;
use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::time::Duration;

fn biot_savart(c: &mut Criterion) {
    let n = 10_000;
    let mut segs = Segments::default();
    let verts: Vec<[f64; 3]> = (0..=n)
        .map(|i| {
            let t = i as f64 / 100.0 * std::f64::consts::TAU;
            let r = 0.002 + 0.01 * i as f64 / n as f64;
            [r * t.cos(), r * t.sin(), 0.0]
        })
        .collect();
    for w in verts.windows(2) {
        segs.push(w[0], w[1], 1.0);
    }
    let points: Vec<[f64; 3]> = (0..n)
        .map(|k| {
            [
                -0.015 + 0.03 * (k % 100) as f64 / 100.0,
                -0.015 + 0.03 * (k / 100) as f64 / 100.0,
                0.001,
            ]
        })
        .collect();
    let mut g = c.benchmark_group("biot_savart");
    g.sample_size(10).measurement_time(Duration::from_secs(10));
    g.bench_function("10k_segments_x_10k_points", |b| {
        b.iter(|| black_box(segs.field(black_box(&points))))
    });
    g.finish();
}

fn report_8_layer_100_turns(c: &mut Criterion) {
    let mut d = Design::sample();
    d.coil.layers = 8;
    d.stackup.copper = vec![0.035; 8];
    d.stackup.dielectric = vec![0.05; 7];
    d.coil.turns = 100.0;
    d.coil.inner_diameter = 6.0;
    d.coil.outer_diameter = 6.0 + 2.0 * (100.0 * d.coil.pitch() + d.coil.clearance);
    let layout = coilwright::geometry::build(&d).expect("layout");
    let mut g = c.benchmark_group("report");
    g.sample_size(10).measurement_time(Duration::from_secs(10));
    g.bench_function("8_layers_100_turns", |b| {
        b.iter(|| {
            let a =
                coilwright::physics::analyse(black_box(&d), black_box(&layout)).expect("analysis");
            black_box(coilwright::export::report::files(&d, &layout, &a).expect("report"))
        })
    });
    g.finish();
}

fn report_fin_starter(c: &mut Criterion) {
    let text = include_str!("../examples/fin-actuator.toml");
    let mut g = c.benchmark_group("report");
    g.sample_size(20).measurement_time(Duration::from_secs(10));
    g.bench_function("fin_starter_square_wave_and_fin", |b| {
        b.iter(|| {
            let d = coilwright::pipeline::parse(black_box(text)).expect("design");
            let layout = coilwright::geometry::build(&d).expect("layout");
            let a = coilwright::physics::analyse(&d, &layout).expect("analysis");
            assert!(a.fin.is_some());
            black_box(coilwright::export::report::files(&d, &layout, &a).expect("report"))
        })
    });
    g.finish();
}

/// The impedance curve of the README's fin example at 200 frequencies
/// from its analysis (issue 15 asks under 100 ms); the analysis itself
/// (chords, proximity field, capacitance) is the fin report above.
fn impedance_sweep_fin(c: &mut Criterion) {
    let text = include_str!("../examples/fin-actuator.toml");
    let d = coilwright::pipeline::parse(text).expect("design");
    let layout = coilwright::geometry::build(&d).expect("layout");
    let a = coilwright::physics::analyse(&d, &layout).expect("analysis");
    let srf = a.self_resonance_hz();
    let mut g = c.benchmark_group("impedance");
    g.bench_function("fin_200_frequencies", |b| {
        b.iter(|| black_box(a.ac.curve(black_box(1.0), black_box(3.0 * srf), 200)))
    });
    g.bench_function("fin_analysis_and_200_frequencies", |b| {
        b.iter(|| {
            let a =
                coilwright::physics::analyse(black_box(&d), black_box(&layout)).expect("analysis");
            black_box(a.ac.curve(1.0, 3.0 * srf, 200))
        })
    });
    g.finish();
}

/// The capacitance phase of one sweep candidate (issue 18's sweep: the
/// fin example at 8 layers, 20 turns, 0.13 mm traces, 17 mm across), from
/// its chords at the sweep's limit: the neighbour index, the searches and
/// the runs of turns.
fn capacitance_sweep_candidate(c: &mut Criterion) {
    use coilwright::physics::{capacitance, chords, conductor::Conductor};
    let text = include_str!("../examples/fin-actuator.toml")
        .replace("layers = 2 ", "layers = 8 ")
        .replace("trace_width = \"0.1mm\"", "trace_width = \"0.13mm\"")
        .replace("outer_diameter = \"12mm\"", "outer_diameter = \"17mm\"");
    let (d, layout) = coilwright::pipeline::parse_and_build(&text).expect("design");
    assert_eq!(layout.layers, 8);
    let cond = Conductor::new(&d, &layout);
    let ch = chords::chords(&d, &layout, &cond, chords::MAX_CHORDS_METRICS);
    let mut g = c.benchmark_group("capacitance");
    g.bench_function("sweep_candidate_8_layers", |b| {
        b.iter(|| black_box(capacitance::analyse(black_box(&d), black_box(&ch), 8, 1e-6)))
    });
    g.finish();
}

criterion_group!(
    benches,
    biot_savart,
    report_8_layer_100_turns,
    report_fin_starter,
    impedance_sweep_fin,
    capacitance_sweep_candidate
);
criterion_main!(benches);
