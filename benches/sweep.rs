//! One full sweep candidate (parse, geometry, rule check, analysis at
//! `Detail::Metrics`, metrics) for a 4-layer, 20-turn circular coil, and a
//! 61-candidate batch through `Sweep::run` (parallel, all cores), so the
//! candidates-per-second figure of issue 6 can be read off.
//!
//! Figures on the 2-core development machine (2026-12-02; timings there
//! vary by about 10 % from run to run): the batch took 329 ms before the
//! speed work of that day (185 candidates/s) and about 87 ms after it
//! (about 700/s); the target is 61 ms (1000/s). The batch repeats the same
//! 61 designs, so its per-thread GMD cache is warm; a sweep of 601
//! distinct designs (`coilwright sweep` on this design with
//! `--vary turns=17..20:0.005`) takes 0.92-1.07 s on both cores (560-650
//! candidates/s) and about 1.6 s on one. One candidate on one thread,
//! repeated: parse and build 0.08 ms, rule check 0.84 ms, analysis
//! 1.34 ms, led by the Biot-Savart sums and Maxwell's ring pairs.

use coilwright::explore::{self, Evaluation, Objective, Sweep};
use coilwright::{physics, rules, spec};
use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;

const BASE: &str = r#"
name = "bench"
[coil]
outer_diameter = "20mm"
turns = 20
trace_width = "0.15mm"
clearance = "0.1mm"
layers = 4
[magnet]
diameter = "5mm"
thickness = "2mm"
remanence = "1.3T"
gap = "0.5mm"
[drive]
voltage = "3.3V"
"#;

fn evaluate(text: &str) -> Evaluation {
    let (d, l) = match spec::parse_and_build(text) {
        Ok(built) => built,
        Err(e) => return Evaluation::Invalid(e.to_string()),
    };
    let profile = rules::Profile::builtin("standard").expect("built-in profile");
    let v = rules::check(&d, &l, &profile);
    let a = physics::analyse_with(&d, &l, physics::Detail::Metrics).expect("analysis");
    let json = serde_json::to_value(&a).expect("json");
    Evaluation::Metrics(explore::metrics(&d, &l, &v, &json))
}

fn bench(c: &mut Criterion) {
    c.bench_function("sweep candidate 4 layers x 20 turns (one core)", |b| {
        b.iter(|| evaluate(black_box(BASE)))
    });
    let known: Vec<String> = match evaluate(BASE) {
        Evaluation::Metrics(m) => m.into_keys().collect(),
        _ => panic!("base design must evaluate"),
    };
    let sweep = Sweep::new(
        BASE,
        vec![explore::parse_vary("turns=17..20:0.05").expect("vary")],
        vec![],
        Objective {
            metric: "force_per_sqrt_w_n".into(),
            maximize: true,
        },
        None,
        &known,
    )
    .expect("sweep");
    assert_eq!(sweep.len(), 61);
    let mut g = c.benchmark_group("sweep batch");
    g.sample_size(10);
    g.bench_function("61 candidates, all cores", |b| {
        b.iter(|| sweep.run(evaluate, || {}))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
