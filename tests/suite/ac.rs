//! The coil at frequency (issue 15) against outside truth: the section's
//! skin and eddy response and the capacitance formulas against 2-D
//! finite-element solutions (scikit-fem, `tests/interop/section_fem.py`),
//! the self-resonance identity, the AC resistance's limits on a real
//! coil, and the report's new keys.

use coilwright::physics::capacitance::{coplanar_strips, facing_strips, run_energy};
use coilwright::physics::section::SectionTable;
use std::io::Write;
use std::path::Path;
use std::process::{Command, Stdio};

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// Runs the finite-element checker on `cases` (JSON); it exits 1 when a
/// value is outside its tolerance.
fn fem(cases: &serde_json::Value) -> serde_json::Value {
    let python = root().join(".venv-interop/bin/python");
    assert!(
        python.exists(),
        "{} is missing: run tests/interop/setup.sh (scikit-fem, scipy)",
        python.display()
    );
    let mut child = Command::new(&python)
        .arg(root().join("tests/interop/section_fem.py"))
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    child
        .stdin
        .take()
        .unwrap()
        .write_all(cases.to_string().as_bytes())
        .unwrap();
    let o = child.wait_with_output().unwrap();
    assert!(
        o.status.success(),
        "{}\n{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
    serde_json::from_slice(&o.stdout).unwrap()
}

#[test]
fn section_response_matches_finite_elements() {
    // Rectangular traces of aspect 3 (0.1 mm x 35 um) and 17 (0.6 mm x
    // 35 um) at 1 to 10 skin depths across the thickness: R_ac / R_dc and
    // the eddy loss in a field across and along the section within 5 % of
    // scikit-fem's solution of the current-diffusion equation.
    let mut skin = Vec::new();
    for aspect in [3.0, 17.0] {
        let t = SectionTable::new(aspect);
        for x in [1.0, 2.0, 5.0, 10.0] {
            skin.push(serde_json::json!({
                "aspect": aspect, "x": x,
                "ours": [t.skin(x), t.across(x), t.along(x)],
            }));
        }
    }
    let out = fem(&serde_json::json!({ "skin": skin }));
    assert_eq!(out["skin"].as_array().unwrap().len(), 8);
}

#[test]
fn capacitance_formulas_match_finite_elements() {
    // Outside truth: scikit-fem's 2-D electrostatic solution of the same
    // cross-sections (tests/interop/section_fem.py), each within 10 %.
    // Coplanar traces on FR4-like dielectric (er 4.5) with air above: the
    // conformal-mapping pair capacitance with eps_eff = (er + 1) / 2 and
    // the side-wall term; traces facing through the dielectric: parallel
    // plate with Palmer's fringe.
    let er = 4.5;
    let eps = (er + 1.0) / 2.0;
    let t = 35e-6;
    let mut pairs = Vec::new();
    for (w, s) in [(0.15e-3, 0.15e-3), (0.6e-3, 0.4e-3), (0.1e-3, 0.3e-3)] {
        pairs.push(serde_json::json!({
            "w": w, "s": s, "t": t, "er": er, "ours": coplanar_strips(w, s, t, eps),
        }));
    }
    let mut facing = Vec::new();
    for (w, h) in [(0.3e-3, 0.1e-3), (0.6e-3, 0.2e-3)] {
        facing.push(serde_json::json!({
            "w": w, "h": h, "t": t, "er": er, "ours": facing_strips(w, h, er, [None, None]),
        }));
    }
    // Runs of 4 and 8 traces at a winding's linear voltage: the in-layer
    // model (the method-of-moments partial capacitances of the whole run,
    // coupling past the next trace included).
    let mut array = Vec::new();
    for (w, s, n) in [
        (0.15e-3, 0.15e-3, 4usize),
        (0.6e-3, 0.4e-3, 4),
        (0.1e-3, 0.1e-3, 8),
    ] {
        let volts: Vec<f64> = (0..n).map(|k| k as f64 / (n - 1) as f64 - 0.5).collect();
        array.push(serde_json::json!({
            "w": w, "s": s, "t": t, "er": er, "n": n,
            "ours": run_energy(w, s, t, eps, &volts),
        }));
    }
    // Two layers of a series winding on the faces of one dielectric (rigid
    // FR4 and thin polyimide): n traces on top from the outside in at
    // k / 2n, n under them coming back out at 1 - (k + 1) / 2n. Ours: each
    // layer's run plus the facing pairs, whose fringe stops halfway to the
    // next turn (the model of physics::capacitance::analyse).
    let mut sections = Vec::new();
    for (w, s, h, tc, er2, n) in [
        (0.15e-3, 0.15e-3, 0.1e-3, 35e-6, 4.5, 4usize),
        (0.6e-3, 0.4e-3, 1.5e-3, 35e-6, 4.5, 4),
        (0.1e-3, 0.1e-3, 25e-6, 18e-6, 3.4, 4),
        (0.3e-3, 0.2e-3, 0.2e-3, 35e-6, 4.5, 6),
        (0.2e-3, 0.2e-3, 0.8e-3, 35e-6, 4.5, 6),
    ] {
        let p = w + s;
        let top: Vec<f64> = (0..n).map(|k| k as f64 / (2 * n) as f64).collect();
        let bottom: Vec<f64> = (0..n)
            .map(|k| 1.0 - (k + 1) as f64 / (2 * n) as f64)
            .collect();
        let mut traces = Vec::new();
        for k in 0..n {
            let x = k as f64 * p;
            traces.push([
                x - w / 2.0,
                x + w / 2.0,
                h / 2.0,
                h / 2.0 + tc,
                top[k] - 0.5,
            ]);
            traces.push([
                x - w / 2.0,
                x + w / 2.0,
                -h / 2.0 - tc,
                -h / 2.0,
                bottom[k] - 0.5,
            ]);
        }
        let e_in = run_energy(w, s, tc, (er2 + 1.0) / 2.0, &top)
            + run_energy(w, s, tc, (er2 + 1.0) / 2.0, &bottom);
        let e_face: f64 = (0..n)
            .map(|k| {
                let room = [(k > 0).then_some(s), (k + 1 < n).then_some(s)];
                0.5 * facing_strips(w, h, er2, room) * (top[k] - bottom[k]).powi(2)
            })
            .sum();
        sections.push(serde_json::json!({
            "traces": traces, "slab": h, "er": er2, "ours": e_in + e_face,
        }));
    }
    let out = fem(&serde_json::json!({
        "pairs": pairs, "facing": facing, "array": array, "sections": sections,
    }));
    for kind in ["pairs", "facing", "array", "sections"] {
        for c in out[kind].as_array().unwrap() {
            let rel = c["relative"].as_f64().unwrap();
            println!("{kind}: ours / fem - 1 = {rel:+.4}");
            assert!(rel.abs() <= 0.10, "{kind}: {rel}");
        }
    }
    assert_eq!(out["sections"].as_array().unwrap().len(), 5);
}

fn tag_reader(frequency: Option<&str>) -> (coilwright::physics::Analysis, serde_json::Value) {
    let text = std::fs::read_to_string(root().join("examples/toy-tag-reader.toml")).unwrap();
    let text = match frequency {
        Some(f) => text.replace("frequency = \"6.78MHz\"", &format!("frequency = \"{f}\"")),
        None => text
            .replace("waveform = \"sine\"\n", "")
            .replace("frequency = \"6.78MHz\"\n", ""),
    };
    let (d, l) = coilwright::pipeline::parse_and_build(&text).expect("design");
    let a = coilwright::physics::analyse(&d, &l).expect("analysis");
    let j = serde_json::to_value(&a).unwrap();
    (a, j)
}

#[test]
fn report_gives_the_values_at_the_drive_frequency() {
    let (a, j) = tag_reader(None);
    assert!(j["resistance_ohm_ac"].is_null() && j["q_factor"].is_null());
    let (l, c) = (
        j["inductance_h"].as_f64().unwrap(),
        j["capacitance_f"].as_f64().unwrap(),
    );
    let srf = j["self_resonance_hz"].as_f64().unwrap();
    // The resonance identity 2 pi f sqrt(L C) = 1.
    assert!((std::f64::consts::TAU * srf * (l * c).sqrt() - 1.0).abs() < 1e-12);
    // DC limit: the AC resistance tends to the hot DC resistance.
    let r_hot = j["resistance_ohm_hot"].as_f64().unwrap();
    assert!((a.resistance_ac_at(1.0) / r_hot - 1.0).abs() < 1e-6);
    // High-frequency limit: R_ac grows as sqrt(f) once the copper is many
    // skin depths thick (a factor 10 in f gives sqrt(10) within 10 %).
    let (r1, r2) = (a.resistance_ac_at(1e9), a.resistance_ac_at(1e10));
    assert!((r2 / r1 / 10f64.sqrt() - 1.0).abs() < 0.1, "{r1} {r2}");

    let (a, j) = tag_reader(Some("6.78MHz"));
    let f = 6.78e6;
    let rac = j["resistance_ohm_ac"].as_f64().unwrap();
    let q = j["q_factor"].as_f64().unwrap();
    assert!(
        rac > r_hot * 1.2,
        "skin and proximity raise R: {rac} {r_hot}"
    );
    let l_ac = j["inductance_h_ac"].as_f64().unwrap();
    assert_eq!(l_ac, j["impedance"]["inductance_h"].as_f64().unwrap());
    assert!(l_ac < l && l_ac > 0.99 * l, "{l_ac} {l}");
    assert!((q - std::f64::consts::TAU * f * l_ac / rac).abs() < 1e-9 * q);
    // L(f): at low frequency the DC inductance (1e-6); it falls with f; at
    // high frequency the fall settles at the internal inductance of the
    // copper at DC (the section solution's flux inside the copper, which
    // for a round wire is the exact mu0 / (8 pi) per length:
    // physics::section's round-wire test against the Bessel solution).
    assert!((a.ac.inductance(1.0) / l - 1.0).abs() < 1e-6);
    let fs = [1e3, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10];
    for w in fs.windows(2) {
        assert!(a.ac.inductance(w[1]) <= a.ac.inductance(w[0]));
    }
    let (d12, d14) = (l - a.ac.inductance(1e12), l - a.ac.inductance(1e14));
    assert!(d12 > 0.0 && (d12 / d14 - 1.0).abs() < 0.02, "{d12} {d14}");
    // The reactive part of the proximity effect, left out, is bounded by
    // 3 % of L (the perfect-conductor limit: 2.6 % here).
    let bound = a.ac.proximity_inductance_bound();
    assert!(bound > 0.0 && bound < 0.03 * l, "{bound} {l}");
    assert_eq!(q, a.q_at(f));
    assert_eq!(j["impedance"]["q"].as_f64().unwrap(), q);
    assert!(
        j["warnings"].as_array().unwrap().is_empty(),
        "{}",
        j["warnings"]
    );
    // Within a third of the self-resonance: the caution.
    let (_, j) = tag_reader(Some("20MHz"));
    let w = j["warnings"].to_string();
    assert!(w.contains("above a third of the self-resonance"), "{w}");
    let (_, j) = tag_reader(Some("60MHz"));
    assert!(
        j["warnings"]
            .to_string()
            .contains("above the self-resonance")
    );
}
