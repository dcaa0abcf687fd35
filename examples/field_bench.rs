//! Times the Biot-Savart sum on a fixed problem: a helical polyline of
//! `N` straight segments (default 10,000) and `N` observation points
//! (default 10,000). Writes the geometry and our result as JSON to the path
//! given with `--dump PATH` so that tests/interop/bench_field.py can time
//! magpylib on the same problem and compare.
//!
//! `cargo run --release --example field_bench -- [--n N] [--dump PATH]`

use coilwright::physics::field::Segments;
use std::time::Instant;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let args: Vec<String> = std::env::args().collect();
    let get = |k: &str| {
        args.iter()
            .position(|a| a == k)
            .and_then(|i| args.get(i + 1))
            .cloned()
    };
    let n: usize = get("--n").map_or(Ok(10_000), |s| s.parse())?;
    // A flat spiral of 100 turns (like a coil), 100 segments per turn.
    let verts: Vec<[f64; 3]> = (0..=n)
        .map(|i| {
            let t = i as f64 / 100.0 * std::f64::consts::TAU;
            let r = 0.002 + 0.01 * i as f64 / n as f64;
            [r * t.cos(), r * t.sin(), -1e-5 * (i % 7) as f64]
        })
        .collect();
    let mut segs = Segments::default();
    for w in verts.windows(2) {
        segs.push(w[0], w[1], 1.0);
    }
    // Points on a 100 x 100 grid in a plane above the coil.
    let side = (n as f64).sqrt().ceil() as usize;
    let points: Vec<[f64; 3]> = (0..n)
        .map(|k| {
            let (i, j) = (k % side, k / side);
            [
                -0.015 + 0.03 * i as f64 / side as f64,
                -0.015 + 0.03 * j as f64 / side as f64,
                0.001,
            ]
        })
        .collect();
    let t = Instant::now();
    let b = segs.field(&points);
    let secs = t.elapsed().as_secs_f64();
    println!(
        "coilwright Biot-Savart: {} segments x {} points in {:.3} s ({:.2} ns per segment-point, {} threads)",
        segs.len(),
        points.len(),
        secs,
        secs * 1e9 / (segs.len() * points.len()) as f64,
        rayon::current_num_threads()
    );
    if let Some(path) = get("--dump") {
        let v = serde_json::json!({"vertices": verts, "points": points, "b": b, "seconds": secs});
        std::fs::write(path, serde_json::to_string(&v)?)?;
    }
    Ok(())
}
