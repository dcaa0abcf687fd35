//! The analysis of real layouts against published formulas and hand
//! calculations (sources named beside each check).

use coilwright::design::{Corner, Design, Shape, Source};
use coilwright::geometry::build;
use coilwright::physics::closed_forms::{self, MohanShape};
use coilwright::physics::conductor::Conductor;
use coilwright::physics::inductance::{self, maxwell_mutual};
use coilwright::physics::{CautionKind, MU0, analyse, resistance, thermal};

/// One-layer circular coil: 20 mm outside, 10 turns, 0.25/0.25 mm (the
/// REFERENCES.md check coil).
fn one_layer() -> Design {
    let mut d = Design::sample();
    d.coil.layers = 1;
    d.coil.turns = 10.0;
    d.coil.trace_width = 0.25;
    d.coil.clearance = 0.25;
    d.coil.outer_diameter = 20.0;
    d.coil.inner_diameter = 20.0 - 2.0 * (10.0 * 0.5 + 0.25);
    d.stackup.copper = vec![0.035];
    d.stackup.dielectric = vec![];
    d
}

#[test]
fn single_layer_circle_against_published_formulas_and_grover_sum() {
    let d = one_layer();
    let layout = build(&d).unwrap();
    let cond = Conductor::new(&d, &layout).without_leads();
    let l = inductance::rings_inductance(&cond.rings());
    // The spiral's n turns match n concentric rings whose copper spans
    // half a pitch less at each side (see physics::inductance::analyse).
    let p = layout.pitch * 1e-3;
    let d_out = 2.0 * layout.outer_radius * 1e-3 - p;
    let d_in = 2.0 * layout.inner_radius * 1e-3 + p;
    let n = 10.0;
    // Mohan et al. 1999 current sheet (circle): stated typical error 2-3 %.
    let cs = closed_forms::mohan_current_sheet(MohanShape::Circle, n, d_out, d_in);
    assert!((l / cs - 1.0).abs() < 0.03, "L {l} vs current sheet {cs}");
    // Wheeler 1928: within 5 % for c > 0.2 a.
    let wh = closed_forms::wheeler_1928(n, d_in / 2.0, d_out / 2.0);
    assert!((l / wh - 1.0).abs() < 0.05, "L {l} vs Wheeler {wh}");
    // Grover: sum of ring self inductances and Maxwell mutual terms of 10
    // concentric rings at the spiral's mean turn radii.
    let (w, t) = (0.25e-3, 35e-6);
    let r0 = d_in / 2.0 + w / 2.0;
    let radii: Vec<f64> = (0..10).map(|k| r0 + k as f64 * p).collect();
    let mut grover = 0.0;
    for (i, a) in radii.iter().enumerate() {
        for (j, b) in radii.iter().enumerate() {
            grover += if i == j {
                closed_forms::ring_self(*a, w, t)
            } else {
                maxwell_mutual(*a, *b, 0.0)
            };
        }
    }
    assert!(
        (l / grover - 1.0).abs() < 0.01,
        "L {l} vs Grover sum {grover}"
    );
    // The report's single-layer value includes the leads: a little more.
    let a = analyse(&d, &layout).unwrap();
    assert!(a.inductance.single_layer_h > l && a.inductance.single_layer_h < 1.15 * l);
    assert!((a.inductance.inductance_h - a.inductance.single_layer_h).abs() < 1e-15);
    // Like for like: the report's winding-only value is this sum, and the
    // estimates stand beside it with the sizes used above.
    let i = &a.inductance;
    assert_eq!(i.winding_h, Some(l));
    assert_eq!(i.single_layer_winding_h, Some(l));
    assert!((i.d_out_mm * 1e-3 - d_out).abs() < 1e-12 && (i.d_in_mm * 1e-3 - d_in).abs() < 1e-12);
    // Mohan et al. 1999 current sheet (circle): stated typical error 2-3 %;
    // Wheeler 1928: within 5 % for a radial depth above 0.2 mean radius.
    let names: Vec<_> = i.estimates.iter().map(|e| e.name).collect();
    assert_eq!(names, ["mohan_current_sheet", "wheeler_1928"]);
    for e in &i.estimates {
        assert!((e.relative_difference - (e.inductance_h / l - 1.0)).abs() < 1e-12);
        assert!(e.includes.contains("no leads"), "{}", e.includes);
        let tolerance = if e.name == "wheeler_1928" { 0.05 } else { 0.03 };
        assert!(e.relative_difference.abs() < tolerance, "{e:?}");
    }
}

/// The winding alone (spiral turns of every layer as built, without the
/// leads and lead rings) is the inductance of the conductor without its
/// lead pieces, by the same method; it differs from the coil with its
/// leads by the leads' share, a few percent either way (a lead ring that
/// runs against the turns lowers the coil's inductance: the octagon
/// example's top layer has 5 % more without its leads). Checked on the
/// sample design and every bundled example; a sweep's analysis leaves it
/// out.
#[test]
fn winding_alone_is_the_coil_without_its_leads() {
    use coilwright::physics::{Detail, analyse_with};
    let root = env!("CARGO_MANIFEST_DIR");
    let mut designs = vec![("sample".to_string(), Design::sample())];
    let mut files: Vec<_> = std::fs::read_dir(format!("{root}/examples"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    files.sort();
    for f in files {
        let text = std::fs::read_to_string(&f).unwrap();
        designs.push((
            f.display().to_string(),
            coilwright::pipeline::parse(&text).unwrap(),
        ));
    }
    assert!(designs.len() >= 4);
    for (name, d) in designs {
        let layout = build(&d).unwrap();
        let i = analyse(&d, &layout).unwrap().inductance;
        let (lw, lw1) = (i.winding_h.unwrap(), i.single_layer_winding_h.unwrap());
        // Coaxial rings for one circular coil; an array's coils: filaments.
        let circular = matches!(d.coil.shape, Shape::Circle) && d.array.is_none();
        let bare = Conductor::new(&d, &layout).without_leads();
        assert!(
            bare.pieces.len() < Conductor::new(&d, &layout).pieces.len(),
            "{name}"
        );
        assert_eq!(lw, inductance::inductance(&bare, circular).0, "{name}");
        assert_eq!(
            lw1,
            inductance::inductance(&bare.only_layer(1), circular).0,
            "{name}"
        );
        assert!(
            lw != i.inductance_h && (lw / i.inductance_h - 1.0).abs() < 0.06,
            "{name}: {i:?}"
        );
        assert!(
            lw1 != i.single_layer_h && (lw1 / i.single_layer_h - 1.0).abs() < 0.06,
            "{name}: {i:?}"
        );
        for e in &i.estimates {
            assert!((e.relative_difference - (e.inductance_h / lw1 - 1.0)).abs() < 1e-12);
        }
        let quick = analyse_with(&d, &layout, Detail::Metrics)
            .unwrap()
            .inductance;
        assert_eq!(
            (quick.winding_h, quick.single_layer_winding_h),
            (None, None)
        );
        assert!(quick.estimates.is_empty());
        assert_eq!(
            (quick.inductance_h, quick.single_layer_h),
            (i.inductance_h, i.single_layer_h)
        );
    }
}

/// The polygon estimates take the sizes Mohan et al. 1999 define: `n`
/// concentric turns across flats, `d_out` to the outer edge of the
/// outermost and `d_in` to the inner edge of the innermost, so that
/// `d_out - d_in = 2 n w + 2 (n - 1) s`; each concentric turn at the mean
/// size (over its angle) of the spiral turn it stands for: half a pitch
/// outside the first side (which is `inner_diameter / 2 + w / 2` from the
/// axis). Read on the sides, the sizes depend neither on the rounding of
/// the corners nor on the round trace end.
#[test]
fn polygon_estimates_take_the_sizes_their_source_defines() {
    for sides in [4u8, 6, 8] {
        let mut sizes = vec![];
        for corner in [Corner::Sharp, Corner::Round { radius: 0.5 }] {
            let mut d = one_layer();
            d.coil.shape = Shape::Polygon { sides };
            d.coil.corner = corner;
            d.coil.inner_diameter = 9.5;
            let layout = build(&d).unwrap();
            let (n, w, s, p) = (10.0, 0.25, 0.25, 0.5);
            assert!((layout.turns - n).abs() < 1e-9);
            let i = analyse(&d, &layout).unwrap().inductance;
            let nn = f64::from(sides);
            let d_in = 2.0 * (9.5 / 2.0 + w / 2.0 + p / 2.0) - w;
            let d_out = d_in + 2.0 * n * w + 2.0 * (n - 1.0) * s;
            assert!(
                (i.d_in_mm - d_in).abs() < 1e-9,
                "{sides} {corner:?}: {} vs {d_in}",
                i.d_in_mm
            );
            assert!(
                (i.d_out_mm - d_out).abs() < 1e-9,
                "{sides} {corner:?}: {} vs {d_out}",
                i.d_out_mm
            );
            // Across flats is inside the across-corners outer size.
            assert!(
                corner != Corner::Sharp
                    || i.d_out_mm < 2.0 * layout.outer_radius * (std::f64::consts::PI / nn).cos()
            );
            sizes.push((i.d_out_mm, i.d_in_mm));
        }
        assert!((sizes[0].0 - sizes[1].0).abs() < 1e-9 && (sizes[0].1 - sizes[1].1).abs() < 1e-9);
    }
}

#[test]
fn neumann_filaments_agree_with_maxwell_rings_on_a_real_layout() {
    // Two independent methods on the same circular two-layer layout.
    let mut d = one_layer();
    d.coil.layers = 2;
    d.coil.turns = 4.0;
    d.coil.inner_diameter = 8.0;
    d.stackup.copper = vec![0.035; 2];
    d.stackup.dielectric = vec![0.05];
    let layout = build(&d).unwrap();
    let cond = Conductor::new(&d, &layout);
    let lr = inductance::rings_inductance(&cond.rings());
    let ln = inductance::filaments_inductance(&cond.filaments(2e-4));
    assert!((ln / lr - 1.0).abs() < 0.02, "Neumann {ln} vs rings {lr}");
}

#[test]
fn coupling_between_close_layers_stays_below_one() {
    // Layers 25 um apart with 0.3 mm traces: closer than the trace width.
    // Centre-line filaments would overestimate the coupling (REFERENCES.md
    // pitfall); with the GMD of the sections k = M / sqrt(L1 L2) < 1.
    let mut d = Design::sample();
    d.coil.layers = 2;
    d.coil.trace_width = 0.3;
    d.coil.turns = 5.0;
    d.coil.inner_diameter = 8.0;
    d.stackup.copper = vec![0.035; 2];
    d.stackup.dielectric = vec![0.025];
    let layout = build(&d).unwrap();
    let cond = Conductor::new(&d, &layout);
    let r1 = cond.only_layer(1).rings();
    let r2 = cond.only_layer(2).rings();
    let (l1, l2) = (
        inductance::rings_inductance(&r1),
        inductance::rings_inductance(&r2),
    );
    let k = inductance::rings_mutual(&r1, &r2) / (l1 * l2).sqrt();
    assert!(k > 0.9 && k < 1.0, "k = {k}");
    let a = analyse(&d, &layout).unwrap();
    assert!(a.inductance.inductance_h < 4.0 * l1.max(l2));
}

#[test]
fn field_of_a_real_spiral_against_flat_spiral_closed_form() {
    // Textbook flat spiral (N turns spread evenly from r1 to r2): the real
    // one-layer spiral with its leads agrees to about a percent.
    let d = one_layer();
    let layout = build(&d).unwrap();
    let a = analyse(&d, &layout).unwrap();
    let r1 = (layout.inner_radius + layout.pitch / 2.0 - layout.trace_width / 2.0) * 1e-3;
    let r2 = (layout.outer_radius - layout.pitch / 2.0 + layout.trace_width / 2.0) * 1e-3;
    let z = 0.035e-3 / 2.0; // top surface is half a copper thickness above the copper centre
    let exact = closed_forms::spiral_on_axis(1.0, 10.0, r1, r2, z);
    assert!(
        (a.field.center_t_per_a / exact - 1.0).abs() < 0.02,
        "{} vs {exact}",
        a.field.center_t_per_a
    );
}

#[test]
fn resistance_of_a_layout_is_the_iacs_hand_calculation() {
    // IACS (IEC 60028): R = rho L / (w t) per layer, plus via barrels.
    let d = Design::sample();
    let layout = build(&d).unwrap();
    let a = analyse(&d, &layout).unwrap();
    let hand: f64 = a
        .resistance
        .layers
        .iter()
        .map(|l| 1.7241e-8 * l.length_mm * 1e-3 / (0.1e-3 * 35e-6))
        .sum();
    assert!((a.resistance.total_ohm_20c - a.resistance.vias_ohm_20c - hand).abs() < 1e-9 * hand);
    let total_len: f64 = a.resistance.layers.iter().map(|l| l.length_mm).sum();
    assert!((total_len - a.resistance.trace_length_mm).abs() < 1e-9);
    // The resistance at the winding's mean temperature.
    let t = a
        .thermal
        .board
        .winding_at(a.thermal.temperature_board_c.unwrap());
    assert!(
        (a.thermal.resistance_ohm_hot - resistance::at_temperature(a.resistance.total_ohm_20c, t))
            .abs()
            < 1e-12
    );
}

#[test]
fn heating_satisfies_its_energy_balance() {
    for src in [
        Source::Voltage(3.3),
        Source::Current(0.2),
        Source::Voltage(1.0),
    ] {
        let mut d = Design::sample();
        d.drive.source = src;
        let layout = build(&d).unwrap();
        let a = analyse(&d, &layout).unwrap();
        let t = a.thermal.temperature_board_c.unwrap();
        // Electrical power at the solved temperature equals the heat leaving
        // both faces (convection up and down plus radiation); the board
        // average carries the balance, the hottest copper lies above it.
        assert!(a.thermal.temperature_c.unwrap() > t);
        assert!(
            (a.thermal.power_w / a.thermal.losses.power_w - 1.0).abs() < 1e-8,
            "{src:?}"
        );
        let h = &a.thermal.losses;
        let area = a.thermal.area_mm2 * 1e-6;
        let out = area
            * (h.h_top_w_per_m2k + h.h_bottom_w_per_m2k + 2.0 * h.h_radiation_w_per_m2k)
            * (t - 25.0);
        assert!((out / a.thermal.power_w - 1.0).abs() < 1e-8);
        // At the limits the hottest copper is at max_temperature.
        let b: thermal::Board = a.thermal.board;
        let tm = b.steady(Source::Current(a.thermal.max_current_a)).unwrap();
        assert!((b.hottest_at(tm) - 80.0).abs() < 1e-6);
        let tm = b.steady(Source::Voltage(a.thermal.max_voltage_v)).unwrap();
        assert!((b.hottest_at(tm) - 80.0).abs() < 1e-6);
    }
}

#[test]
fn overdriven_coil_warns() {
    let mut d = Design::sample();
    d.drive.source = Source::Voltage(6.0);
    let layout = build(&d).unwrap();
    let a = analyse(&d, &layout).unwrap();
    assert!(a.thermal.temperature_c.unwrap() > 80.0);
    assert!(
        a.cautions[0]
            .to_string()
            .contains("exceeds max_temperature 80 C"),
        "{:?}",
        a.cautions
    );
    assert_eq!(a.cautions[0].kind(), CautionKind::LimitExceeded);
    assert!(a.thermal.pulse_s.unwrap() > 0.0);
    let md = coilwright::export::report::markdown(&d, &layout, &a);
    assert!(md.find("## Warnings").unwrap() < md.find("## At the drive").unwrap());
}

#[test]
fn two_layer_flex_bends_at_ten_times_its_thickness() {
    // Common practice, no source (ratios commonly quoted from IPC-2223).
    let mut d = one_layer();
    d.coil.layers = 2;
    d.stackup.copper = vec![0.018; 2];
    d.stackup.dielectric = vec![0.025];
    let layout = build(&d).unwrap();
    let a = analyse(&d, &layout).unwrap();
    let t = 0.018 * 2.0 + 0.025 + 2.0 * d.stackup.cover;
    assert!((a.mechanics.thickness_mm - t).abs() < 1e-12);
    assert!((a.mechanics.bend_radius_min_mm - 10.0 * t).abs() < 1e-12);
}

#[test]
fn json_has_the_contract_keys() {
    let mut d = Design::sample();
    d.drive.frequency = Some(100e3);
    d.coil.shape = Shape::Polygon { sides: 6 };
    let layout = build(&d).unwrap();
    let a = analyse(&d, &layout).unwrap();
    let v = serde_json::to_value(&a).unwrap();
    for k in [
        "trace_length_mm",
        "resistance_ohm_20c",
        "resistance_ohm_hot",
        "inductance_h",
        "field_center_t_per_a",
        "force_n",
        "force_per_a_n",
        "force_per_sqrt_w_n",
        "temperature_c",
        "max_voltage_v",
        "max_current_a",
        "thickness_mm",
        "bend_radius_min_mm",
        "layers",
        "inputs",
    ] {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    assert!(v["layers"][0]["length_mm"].as_f64().unwrap() > 0.0);
    let z = &v["impedance"];
    let x = z["reactance_ohm"].as_f64().unwrap();
    // The reactance is omega L(f), L(f) the inductance at that frequency
    // (below the DC one by the internal inductance the skin effect takes).
    let l_ac = z["inductance_h"].as_f64().unwrap();
    assert_eq!(v["inductance_h_ac"].as_f64().unwrap(), l_ac);
    assert!(l_ac <= a.inductance.inductance_h && l_ac > 0.99 * a.inductance.inductance_h);
    assert!((x - 2.0 * std::f64::consts::PI * 100e3 * l_ac).abs() < 1e-9 * x);
    assert!(a.inductance.mohan_modified_wheeler_h.is_some());
    let _ = MU0;
}

#[test]
fn parallel_pairs_behave_like_one_layer_of_double_copper() {
    // Two identical layers in parallel carry half the current each: the
    // pair's resistance is half a layer's, its inductance close to one
    // layer's (the layers are tightly coupled), its field per ampere that
    // of one layer (Ohm's law; flux linkage with equal current split).
    let mut d = one_layer();
    d.coil.layers = 2;
    d.stackup.copper = vec![0.035; 2];
    d.stackup.dielectric = vec![0.05];
    let series = analyse(&d, &build(&d).unwrap()).unwrap();
    d.coil.wiring = coilwright::design::Wiring::ParallelPairs;
    let layout = build(&d).unwrap();
    let par = analyse(&d, &layout).unwrap();
    let r1 = par.resistance.layers[0].resistance_ohm_20c;
    let r2 = par.resistance.layers[1].resistance_ohm_20c;
    let vias = par.resistance.vias_ohm_20c;
    assert!((par.resistance.total_ohm_20c - vias - r1 * r2 / (r1 + r2)).abs() < 1e-12);
    // L_series = L1 + L2 + 2M ~ 4 L_pair when the coupling is near 1.
    let ratio = series.inductance.inductance_h / par.inductance.inductance_h;
    assert!(ratio > 3.5 && ratio < 4.0, "{ratio}");
    let fr = series.field.center_t_per_a / par.field.center_t_per_a;
    assert!((fr - 2.0).abs() < 0.05, "{fr}");
}

#[test]
fn single_layer_square_against_mohan() {
    // Mohan et al. 1999: modified Wheeler and current sheet for a square
    // spiral, stated typical error 2-3 % (later comparisons found larger
    // errors, Aebischer 2018): checked within 5 %.
    let mut d = one_layer();
    d.coil.shape = Shape::Polygon { sides: 4 };
    d.coil.inner_diameter = 9.5;
    let layout = build(&d).unwrap();
    let cond = Conductor::new(&d, &layout).without_leads();
    let l = inductance::filaments_inductance(&cond.filaments(inductance::NEUMANN_SAGITTA));
    let a = analyse(&d, &layout).unwrap();
    let i = &a.inductance;
    let (d_out, d_in) = (i.d_out_mm * 1e-3, i.d_in_mm * 1e-3);
    let mw = closed_forms::mohan_modified_wheeler(MohanShape::Square, 10.0, d_out, d_in).unwrap();
    let cs = closed_forms::mohan_current_sheet(MohanShape::Square, 10.0, d_out, d_in);
    assert!(
        (l / mw - 1.0).abs() < 0.05,
        "L {l} vs modified Wheeler {mw}"
    );
    assert!((l / cs - 1.0).abs() < 0.05, "L {l} vs current sheet {cs}");
}

#[test]
fn every_shape_and_wiring_gives_finite_results() {
    for layers in [1u8, 2, 3, 4] {
        for shape in [
            Shape::Circle,
            Shape::Polygon { sides: 5 },
            Shape::Rectangle {
                width: 26.0,
                height: 18.0,
            },
        ] {
            for parallel in [false, true] {
                if parallel && layers % 2 == 1 {
                    continue;
                }
                let mut d = Design::sample();
                d.coil.layers = layers;
                d.coil.shape = shape;
                d.coil.inner_diameter = 6.0;
                d.coil.turns = 5.5;
                d.coil.corner = coilwright::design::Corner::Round { radius: 0.4 };
                if parallel {
                    d.coil.wiring = coilwright::design::Wiring::ParallelPairs;
                }
                d.stackup.copper = vec![0.035; layers as usize];
                d.stackup.dielectric = vec![0.05; layers as usize - 1];
                let layout = build(&d).unwrap();
                let a = analyse(&d, &layout).unwrap();
                let v = serde_json::to_value(&a).unwrap();
                for k in [
                    "resistance_ohm_20c",
                    "inductance_h",
                    "field_center_t_per_a",
                    "force_n",
                    "max_current_a",
                ] {
                    let x = v[k].as_f64().unwrap_or(f64::NAN);
                    assert!(
                        x.is_finite() && x > 0.0,
                        "{layers} {shape:?} {parallel}: {k} = {x}"
                    );
                }
                assert!(a.field.radius_50_mm.is_some());
            }
        }
    }
}

/// Balanced filaments (the field's flattening) against inscribed chords
/// 1e5 times finer, on the 4-layer, 20-turn circular coil of the sweep
/// benchmark and on a hexagon with round corners: the bounds that
/// `physics::FIELD_SAGITTA` and `FIELD_SAGITTA_METRICS` document. (The
/// finest chords converge to the true arcs as sagitta / distance: 1e-8
/// relative here, below every bound checked.)
#[test]
fn balanced_filaments_meet_their_documented_accuracy() {
    use coilwright::physics::field::Segments;
    use coilwright::physics::{FIELD_SAGITTA, FIELD_SAGITTA_METRICS};
    for shape in [Shape::Circle, Shape::Polygon { sides: 6 }] {
        let mut d = Design::sample();
        d.coil.shape = shape;
        d.coil.corner = coilwright::design::Corner::Round { radius: 0.5 };
        d.coil.layers = 4;
        d.coil.turns = 20.0;
        d.coil.trace_width = 0.15;
        d.coil.clearance = 0.1;
        d.coil.outer_diameter = 20.0;
        d.coil.inner_diameter = 20.0 - 2.0 * (20.0 * 0.25 + 0.15) - 0.5;
        d.stackup.copper = vec![0.035; 4];
        d.stackup.dielectric = vec![0.1; 3];
        let layout = build(&d).unwrap();
        let cond = Conductor::new(&d, &layout);
        let r = layout.outer_radius * 1e-3;
        let mut pts = vec![[0.0, 0.0, 0.0], [0.0, 0.0, 2.0 * r]];
        for i in 0..=60 {
            let x = 1.2 * r * i as f64 / 60.0;
            pts.push([x, 0.0, 0.5e-3]);
            pts.push([x * 0.6, x * 0.8, 0.5e-3]);
        }
        let truth = Segments::new(&cond.filaments(1e-8), 1.0).field(&pts);
        // The analysis builds the same filaments without the list.
        assert_eq!(
            cond.field_segments(FIELD_SAGITTA, 1.0).field(&pts),
            Segments::new(&cond.balanced_filaments(FIELD_SAGITTA), 1.0).field(&pts)
        );
        let b0 = truth[0][2].abs();
        for (rel, centre, profile) in [
            (FIELD_SAGITTA, 1e-7, 2e-4),
            (FIELD_SAGITTA_METRICS, 3e-6, 6e-3),
        ] {
            let b = Segments::new(&cond.balanced_filaments(rel), 1.0).field(&pts);
            let e0 = (b[0][2] - truth[0][2]).abs() / b0;
            assert!(e0 < centre, "{shape:?} {rel}: centre {e0}");
            let e1 = (b[1][2] - truth[1][2]).abs() / truth[1][2].abs();
            assert!(e1 < centre, "{shape:?} {rel}: axis {e1}");
            for (p, (x, y)) in pts.iter().zip(b.iter().zip(&truth)).skip(2) {
                let e = (0..3).map(|k| (x[k] - y[k]).abs()).fold(0.0, f64::max) / b0;
                assert!(e < profile, "{shape:?} {rel} at {p:?}: {e}");
            }
        }
    }
}

/// A sweep's analysis (`Detail::Metrics`) gives the report's numbers:
/// every scalar the same, except the field values (coarser filaments:
/// 3e-6 relative) and the fall radii (coarser profile, refined on the
/// field: 0.02 mm). Checked on the bundled examples and on a hexagon.
#[test]
fn sweep_metrics_match_the_full_report() {
    use coilwright::physics::{Detail, analyse_with};
    let root = env!("CARGO_MANIFEST_DIR");
    let mut designs = Vec::new();
    for f in ["fin-actuator", "wearable-buzzer", "octagon-charger"] {
        let text = std::fs::read_to_string(format!("{root}/examples/{f}.toml")).unwrap();
        designs.push((f.to_string(), coilwright::pipeline::parse(&text).unwrap()));
    }
    let mut hex = Design::sample();
    hex.coil.shape = Shape::Polygon { sides: 6 };
    designs.push(("hexagon".into(), hex));
    for (name, d) in designs {
        let layout = build(&d).unwrap();
        let flat = |detail| {
            let a = analyse_with(&d, &layout, detail).unwrap();
            coilwright::explore::metrics(&d, &layout, &[], &serde_json::to_value(&a).unwrap())
        };
        let (full, quick) = (flat(Detail::Full), flat(Detail::Metrics));
        // The winding-only inductances are computed in the full report only
        // (they would cost about as much again as the full inductance).
        let full_only = ["inductance.single_layer_winding_h", "inductance.winding_h"];
        assert_eq!(
            full.keys()
                .filter(|k| !full_only.contains(&k.as_str()))
                .collect::<Vec<_>>(),
            quick.keys().collect::<Vec<_>>(),
            "{name}"
        );
        for k in full_only {
            assert!(full.contains_key(k), "{name} {k}");
        }
        for (k, a) in full
            .iter()
            .filter(|(k, _)| !full_only.contains(&k.as_str()))
        {
            let b = quick[k];
            match k.as_str() {
                "field.chord_sagitta_relative" | "field.filaments" => {}
                "field.radius_90_mm" | "field.radius_50_mm" => {
                    assert!((a - b).abs() < 0.02, "{name} {k}: {a} vs {b}")
                }
                // A sweep finds the turn-to-turn neighbours on fewer chords
                // (chords::MAX_CHORDS_METRICS): the capacitance and what
                // follows from it within a few percent.
                _ if k.starts_with("capacitance")
                    || k.contains("resonance")
                    || k.starts_with("impedance")
                    || k == "q_factor"
                    || k == "resistance_ohm_ac" =>
                {
                    // (A proximity loss of picohms at a low drive frequency
                    // counts as equal.)
                    let d = (a - b).abs();
                    assert!(
                        d <= 0.03 * a.abs().max(b.abs()) || d < 1e-9,
                        "{name} {k}: {a} vs {b}"
                    )
                }
                _ if k.starts_with("field") => {
                    assert!((a - b).abs() <= 3e-6 * a.abs(), "{name} {k}: {a} vs {b}")
                }
                _ => assert_eq!(a, &b, "{name} {k}"),
            }
        }
    }
}
