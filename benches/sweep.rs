//! One full sweep candidate (parse, geometry, rule check, analysis at
//! `Detail::Metrics`, metrics) for a 4-layer, 20-turn circular coil on one
//! thread, and 61-candidate batches through `Sweep::run` (parallel, all
//! cores): the same 61 designs every time, and 61 new designs every time
//! (what a real sweep sees: nothing cached for earlier candidates helps),
//! so the candidates-per-second figure of issue 6 can be read off.
//!
//! Figures on the 2-core development machine (Intel Xeon with AVX-512;
//! timings there vary by 10 to 20 % from run to run): at the start of
//! 2026-12-02 the batch of new designs took about 93 ms (about 660
//! candidates/s); after that day's work it takes about 42 to 45 ms (about
//! 1,400 candidates/s), and one candidate on one core about 1.6 ms. The
//! target is 61 ms (1000/s). The day's gains, largest first: the GMD of
//! separated sections by its moment series instead of the closed form,
//! Maxwell's formula eight ring pairs at a time in vector registers, the
//! Biot-Savart sum without square roots or divisions on AVX-512, and in
//! the rule check the chord bound of Schur's theorem along smooth paths,
//! a sorted index instead of an R-tree and fewer edge distances.

use coilwright::explore::{self, Evaluation, Objective, Sweep};
use coilwright::{physics, pipeline, rules};
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
    let (d, l) = match pipeline::parse_and_build(text) {
        Ok(built) => built,
        Err(e) => return Evaluation::Invalid(e.to_string()),
    };
    let profile = rules::Profile::builtin("standard").expect("built-in profile");
    let v = rules::check(&d, &l, &profile);
    let a = physics::analyse_with(&d, &l, physics::Detail::Metrics).expect("analysis");
    Evaluation::Metrics(explore::metrics_of(&d, &l, &v, &a))
}

fn bench(c: &mut Criterion) {
    // On a one-thread pool the analysis's sums run sequentially, as they
    // do inside a sweep's workers.
    let one = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .expect("pool");
    c.bench_function("sweep candidate 4 layers x 20 turns (one core)", |b| {
        b.iter(|| one.install(|| evaluate(black_box(BASE))))
    });
    let known: Vec<String> = match evaluate(BASE) {
        Evaluation::Metrics(m) => m.into_keys().collect(),
        _ => panic!("base design must evaluate"),
    };
    // 61 candidates, turns from `first` to `first + 3` in steps of 0.05.
    let batch = |first: f64| {
        let vary = format!("turns={first}..{}:0.05", first + 3.0);
        Sweep::new(
            BASE,
            vec![explore::parse_vary(&vary).expect("vary")],
            vec![],
            Objective {
                metric: "force_per_sqrt_w_n".into(),
                maximize: true,
            },
            None,
            &known,
        )
        .expect("sweep")
    };
    let sweep = batch(17.0);
    assert_eq!(sweep.len(), 61);
    let mut g = c.benchmark_group("sweep batch");
    g.sample_size(10);
    g.bench_function("61 candidates, all cores", |b| {
        b.iter(|| sweep.summarise(evaluate))
    });
    // New designs every time (turns shifted by 1e-4 per run), so nothing
    // computed for one batch helps the next: the figure a real sweep sees.
    let shift = std::cell::Cell::new(0u32);
    g.bench_function("61 new candidates each time, all cores", |b| {
        b.iter_batched(
            || {
                shift.set(shift.get() + 1);
                batch(17.0 + f64::from(shift.get()) * 1e-4)
            },
            |s| s.summarise(evaluate),
            criterion::BatchSize::PerIteration,
        )
    });
    // The fin starter (square-wave drive, heating over time, the fin):
    // new candidates each time, as in README's sweep of that design.
    let fin = include_str!("../examples/fin-actuator.toml");
    let known_fin: Vec<String> = match evaluate(fin) {
        Evaluation::Metrics(m) => m.into_keys().collect(),
        _ => panic!("fin starter must evaluate"),
    };
    let fin_batch = |first: f64| {
        let vary = format!("turns={first}..{}:0.05", first + 3.0);
        Sweep::new(
            fin,
            vec![explore::parse_vary(&vary).expect("vary")],
            vec![],
            Objective {
                metric: "fin_amplitude_mm".into(),
                maximize: true,
            },
            None,
            &known_fin,
        )
        .expect("sweep")
    };
    g.bench_function("61 new fin-starter candidates each time, all cores", |b| {
        b.iter_batched(
            || {
                shift.set(shift.get() + 1);
                fin_batch(14.0 + f64::from(shift.get()) * 1e-4)
            },
            |s| s.summarise(evaluate),
            criterion::BatchSize::PerIteration,
        )
    });
    g.finish();
    // README's large sweep of the fin starter (layers 2 to 8, turns 6 to
    // 40, widths 0.1 to 0.16 mm, outer diameters 12 to 22 mm: 20,580
    // candidates) thinned to a spread sample of the same mix: every third
    // turn count and every 2.5 mm of size, all layers and widths (1,680
    // candidates, 1,329 of them analysed, 351 refused before the analysis,
    // e.g. turns that do not fit). Candidates per second =
    // 1,680 / the time. On the 2-core development machine, shared with
    // two other builds (this process got about half a core), it took
    // 6.0 s; the whole 20,580-candidate sweep there took 37.0 s of
    // processor time against 60.5 s before the day's second speed pass
    // (GNU time, same load): about 560 candidates per processor-second,
    // about 1,100 per second on two free cores. The gains: capacitance
    // neighbours from a dense cell index instead of a hash map of lists,
    // the next chunk evaluated while the last one is written, the fin's
    // beam in band storage.
    let mix = Sweep::new(
        fin,
        [
            "layers=2,4,6,8",
            "turns=6..40:3",
            "trace_width=0.1mm..0.16mm:0.01mm",
            "outer_diameter=12mm..22mm:2.5mm",
        ]
        .iter()
        .map(|v| explore::parse_vary(v).expect("vary"))
        .collect(),
        vec![],
        Objective {
            metric: "force_per_sqrt_w_n".into(),
            maximize: true,
        },
        None,
        &known_fin,
    )
    .expect("sweep");
    assert_eq!(mix.len(), 1680);
    let mut g = c.benchmark_group("README large sweep mix");
    g.sample_size(10);
    g.bench_function("1,680 fin-starter candidates, all cores", |b| {
        b.iter(|| mix.summarise(evaluate))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
