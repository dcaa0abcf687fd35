//! The pipeline end to end on small designs: defaults, units, problems
//! named by key and span (also those found by the fit and the build).

use super::parse;
use crate::design::*;
use crate::geometry;

const BASE: &str = r#"
name = "t"
[coil]
outer_diameter = "20mm"
turns = 10
trace_width = "0.1mm"
clearance = "0.1mm"
layers = 4
"#;

fn err(text: &str) -> DesignErrors {
    parse(text).expect_err("should fail")
}

fn with(extra_coil: &str) -> String {
    BASE.replace("layers = 4\n", &format!("layers = 4\n{extra_coil}\n"))
}

#[test]
fn minimal_design_gets_defaults() {
    let d = parse(BASE).unwrap();
    assert_eq!(d.name, "t");
    assert_eq!(d.coil.shape, Shape::Circle);
    assert_eq!(d.coil.layers, 4);
    assert_eq!(d.coil.turns, 10.0);
    assert!((d.coil.outer_diameter - 20.0).abs() < 1e-6);
    assert!(d.coil.inner_diameter > 0.0 && d.coil.inner_diameter < 20.0);
    assert_eq!(d.stackup.kind, BoardKind::Flex);
    assert_eq!(d.stackup.copper, vec![0.035; 4]);
    assert_eq!(d.stackup.dielectric, vec![0.05; 3]);
    assert_eq!(d.stackup.dielectric_material, "Polyimide");
    assert_eq!(d.via.drill, 0.2);
    assert_eq!(d.terminal.diameter, 0.8);
    assert_eq!(d.board.margin, 0.5);
    assert_eq!(d.rules.profile, "standard");
    assert_eq!(d.magnet, None);
    assert_eq!(d.drive.source, Source::Current(DEFAULT_CURRENT_A));
    assert_eq!(d.drive.ambient, 25.0);
    assert_eq!(d.drive.max_temperature, 80.0);
    assert_eq!(d.drive.emissivity, 0.9);
    geometry::build(&d).unwrap();
}

#[test]
fn units_and_tables_are_read() {
    let text = format!(
        "{BASE}[stackup]\nkind = \"rigid\"\ncopper = [\"1oz\", \"0.5oz\", \"0.5oz\", \"1oz\"]\ndielectric = \"8mil\"\n\
         [magnet]\ndiameter = 5\nthickness = \"2mm\"\nremanence = \"1.3T\"\ngap = \"500um\"\n\
         [drive]\nvoltage = \"3.3V\"\nambient = \"30C\"\nfrequency = \"100kHz\"\n"
    );
    let d = parse(&text).unwrap();
    assert_eq!(d.stackup.kind, BoardKind::Rigid);
    assert_eq!(d.stackup.copper, vec![0.035, 0.0175, 0.0175, 0.035]);
    assert!((d.stackup.dielectric[0] - 0.2032).abs() < 1e-12);
    assert_eq!(d.stackup.dielectric_material, "FR4");
    let m = d.magnet.unwrap();
    assert_eq!((m.diameter, m.thickness, m.remanence), (5.0, 2.0, 1.3));
    assert!((m.gap - 0.5).abs() < 1e-12);
    assert_eq!(d.drive.source, Source::Voltage(3.3));
    assert_eq!(d.drive.frequency, Some(1e5));
}

#[test]
fn errors_name_key_and_span() {
    let text = BASE.replace("\"0.1mm\"\nclearance", "\"-0.1mm\"\nclearance");
    let e = err(&text);
    let first = e.first();
    assert_eq!(first.key, "coil.trace_width");
    let span = first.span.clone().unwrap();
    assert_eq!(&text[span], "\"-0.1mm\"");
}

#[test]
fn unknown_key_suggests_nearest() {
    let e = err(&BASE.replace("trace_width", "trace_widht"));
    assert!(e.has_key("coil.trace_widht"), "{e}");
    let u = e
        .errors
        .iter()
        .find(|x| x.key == "coil.trace_widht")
        .unwrap();
    assert!(u.help.as_deref().unwrap().contains("trace_width"));
    let e = err(&format!("{BASE}[coill]\nx = 1\n"));
    assert_eq!(e.first().key, "coill");
    assert_eq!(e.first().message, "unknown table");
}

#[test]
fn several_errors_are_collected() {
    let text = BASE
        .replace("\"0.1mm\"\nclearance", "0\nclearance")
        .replace("layers = 4", "layers = 40");
    let e = err(&text);
    assert!(
        e.has_key("coil.trace_width") && e.has_key("coil.layers"),
        "{e}"
    );
}

#[test]
fn fit_errors_map_to_keys() {
    let e = err(&BASE.replace("turns = 10", "turns = 100"));
    assert_eq!(e.first().key, "coil.turns");
    assert!(e.first().message.contains("at most"), "{e}");
    let e = err(&BASE.replace("turns = 10", "inner_diameter = \"0.3mm\""));
    assert_eq!(e.first().key, "coil.inner_diameter");
    assert!(e.first().message.contains("minimum"), "{e}");
    let e = err(&with("inner_diameter = \"4mm\""));
    assert_eq!(e.first().key, "coil");
}

#[test]
fn shapes() {
    let poly = with("shape = \"polygon\"\nsides = 6\ncorner = \"round\"");
    let d = parse(&poly).unwrap();
    assert_eq!(d.coil.shape, Shape::Polygon { sides: 6 });
    assert_eq!(d.coil.corner, Corner::Round { radius: 0.2 });
    let e = err(&with("shape = \"polygon\""));
    assert!(e.has_key("coil.sides"));
    let rect = BASE.replace(
        "outer_diameter = \"20mm\"",
        "shape = \"rectangle\"\nwidth = \"30mm\"\nheight = \"12mm\"",
    );
    let d = parse(&rect).unwrap();
    assert!(matches!(d.coil.shape, Shape::Rectangle { .. }));
    let e = err(&with("shape = \"hexagon\""));
    assert_eq!(e.first().key, "coil.shape");
}

#[test]
fn max_turns_fills_the_outer_size() {
    let d = parse(&BASE.replace("turns = 10", "turns = \"max\"")).unwrap();
    assert!(d.coil.turns > 10.0, "{}", d.coil.turns);
    assert!(d.coil.outer_diameter <= 20.0 + 1e-9);
}

#[test]
fn syntax_error_has_a_span() {
    let e = err("name = \"x\"\n[coil\n");
    assert_eq!(e.first().key, "syntax");
    assert!(e.first().span.is_some());
}

#[test]
fn parallel_pairs_need_even_layers() {
    let e = err(&BASE.replace("layers = 4", "layers = 3\nwiring = \"parallel-pairs\""));
    assert_eq!(e.first().key, "coil.wiring");
    parse(&with("wiring = \"parallel-pairs\"")).unwrap();
}

#[test]
fn drive_rules() {
    let e = err(&format!("{BASE}[drive]\nvoltage = 3\ncurrent = 1\n"));
    assert_eq!(e.first().key, "drive.current");
    let e = err(&format!("{BASE}[drive]\nambient = 90\n"));
    assert_eq!(e.first().key, "drive.ambient");
    let e = err(&format!("{BASE}[drive]\nemissivity = 1.5\n"));
    assert_eq!(e.first().key, "drive.emissivity");
}

#[test]
fn waveform_surroundings_and_fin_are_read() {
    let d = parse(BASE).unwrap();
    assert_eq!(d.drive.waveform, Waveform::Dc);
    assert_eq!(d.drive.surroundings, Surroundings::StillAir);
    assert_eq!(d.fin, None);
    let text = format!(
        "{BASE}[magnet]\ndiameter = 5\nthickness = 2\nremanence = 1.3\ngap = 1\n\
         [drive]\ncurrent = \"0.1A\"\nwaveform = \"square\"\nfrequency = \"5Hz\"\nbipolar = true\n\
         surroundings = \"moving-air\"\nair_speed = \"1.5m/s\"\n\
         [fin]\nfree_length = \"20mm\"\nwidth = \"12mm\"\nmoving = \"magnet\"\nadded_mass = \"50mg\"\n"
    );
    let d = parse(&text).unwrap();
    assert_eq!(d.drive.waveform, Waveform::Square);
    assert_eq!(d.drive.duty, 0.5);
    assert!(d.drive.bipolar);
    assert_eq!(
        d.drive.surroundings,
        Surroundings::MovingAir { air_speed_m_s: 1.5 }
    );
    let f = d.fin.unwrap();
    assert_eq!((f.free_length, f.width, f.load_at), (20.0, 12.0, 20.0));
    assert_eq!(f.moving, Moving::Magnet);
    assert!((f.added_mass - 0.05).abs() < 1e-12);
    assert_eq!(f.damping_ratio, DEFAULT_DAMPING_RATIO);
    // A sine takes no duty; bipolar only for squares; moving air needs a speed.
    let e = err(&format!(
        "{BASE}[drive]\nwaveform = \"sine\"\nfrequency = 50\nduty = 0.3\n"
    ));
    assert_eq!(e.first().key, "drive.duty");
    let e = err(&format!(
        "{BASE}[drive]\nwaveform = \"pulse\"\nfrequency = 50\nbipolar = true\n"
    ));
    assert_eq!(e.first().key, "drive.bipolar");
    let e = err(&format!("{BASE}[drive]\nsurroundings = \"moving-air\"\n"));
    assert_eq!(e.first().key, "drive.surroundings");
}

#[test]
fn rectangle_with_inner_diameter_and_polygon_with_max_turns() {
    let rect = BASE
        .replace(
            "outer_diameter = \"20mm\"",
            "shape = \"rectangle\"\nwidth = 30\nheight = 12",
        )
        .replace("turns = 10", "inner_diameter = \"3mm\"");
    let d = parse(&rect).unwrap();
    assert!((d.coil.inner_diameter - 3.0).abs() < 1e-9);
    assert!(d.coil.turns > 1.0);
    let e = err(&rect.replace("width = 30", "width = 30\nouter_diameter = 30"));
    assert!(e.has_key("coil.outer_diameter"), "{e}");
    let poly = BASE
        .replace("turns = 10", "turns = \"max\"")
        .replace("layers = 4", "layers = 4\nshape = \"polygon\"\nsides = 5");
    let d = parse(&poly).unwrap();
    assert!(d.coil.turns > 10.0);
}

#[test]
fn absurd_sizes_fail_fast_with_a_key() {
    let e = err(&BASE.replace("\"20mm\"", "1e9"));
    assert_eq!(e.first().key, "coil.outer_diameter");
    let e = err(&BASE
        .replace("turns = 10", "turns = \"max\"")
        .replace("\"0.1mm\"", "\"0.5um\""));
    assert!(e.has_key("coil.trace_width"), "{e}");
}

#[test]
fn wrong_types_are_named() {
    let e = err(&BASE.replace("layers = 4", "layers = \"four\""));
    assert_eq!(e.first().key, "coil.layers");
    let e = err(&format!("coil = 3\n{}", BASE.replace("[coil]", "[x]")));
    assert!(e.has_key("coil"), "{e}");
    let e = err(&BASE.replace("name = \"t\"", "name = \"a/b\""));
    assert_eq!(e.first().key, "name");
}

#[test]
fn a_typo_is_one_problem_that_lists_the_table_keys() {
    let e = err(&BASE.replace("trace_width", "trace_widht"));
    assert_eq!(e.errors.len(), 1, "{e}");
    let help = e.first().help.as_deref().unwrap();
    assert!(help.starts_with("did you mean `trace_width`?"), "{help}");
    assert!(help.contains("allowed in [coil]: shape, sides,"), "{help}");
    // A misspelled table is one problem too, not also "needs a [coil] table".
    let e = err(&BASE.replace("[coil]", "[coill]"));
    assert_eq!(e.errors.len(), 1, "{e}");
    assert_eq!(e.first().key, "coill");
    // A key in the wrong table: what the table accepts first, then the
    // key's home.
    let e = err(&format!("{BASE}[via]\nmargin = 1\n"));
    let help = e.first().help.as_deref().unwrap();
    assert_eq!(
        help,
        "allowed in [via]: drill, diameter; `margin` is a key of the [board] table"
    );
    let e = err(&format!("{BASE}[board]\nwidth = \"30mm\"\n"));
    let help = e.first().help.as_deref().unwrap();
    assert!(help.starts_with("allowed in [board]: margin;"), "{help}");
}

/// An unknown shape is the one problem reported: not also complaints about
/// keys that belong to another shape.
#[test]
fn unknown_shape_is_one_problem() {
    let text = "[coil]\nshape = \"hexagon\"\nsides = 6\nouter_diameter = \"20mm\"\nturns = 8\n\
                trace_width = \"0.5mm\"\nclearance = \"0.2mm\"\nlayers = 2\ncorner = \"round\"\n";
    let e = err(text);
    assert_eq!(e.errors.len(), 1, "{e}");
    assert_eq!(e.first().key, "coil.shape");
}

/// The default corner radius is always valid for the design it applies to
/// (0.5 mm track: trace width + clearance is too large for the innermost
/// side, so a smaller radius is used); a radius the file gives is checked.
#[test]
fn default_corner_radius_always_fits() {
    let text = "[coil]\nshape = \"polygon\"\nsides = 6\nouter_diameter = \"20mm\"\nturns = 8\n\
                trace_width = \"0.5mm\"\nclearance = \"0.2mm\"\nlayers = 2\ncorner = \"round\"\n";
    let d = super::parse(text).unwrap();
    match d.coil.corner {
        crate::design::Corner::Round { radius } => {
            assert!(radius > 0.0 && radius < 0.7, "{radius}")
        }
        c => panic!("{c:?}"),
    }
    let e = err(&text.replace(
        "corner = \"round\"",
        "corner = \"round\"\ncorner_radius = \"0.7mm\"",
    ));
    assert_eq!(e.first().key, "coil.corner_radius");
}

/// Parallel pairs on two layers would strand the inner end: refused at
/// `wiring`.
#[test]
fn parallel_pairs_on_two_layers_is_refused() {
    let e = err(&BASE.replace("layers = 4", "layers = 2\nwiring = \"parallel-pairs\""));
    assert_eq!(e.first().key, "coil.wiring", "{e}");
    assert!(e.first().message.contains("4 or more layers"), "{e}");
}

#[test]
fn rule_limits_are_read_from_the_rule_registry() {
    let d = parse(&format!(
        "{BASE}[rules]\nprofile = \"fine\"\nmin_clearance = \"3mil\"\nmin_annular_ring = 0\n"
    ))
    .unwrap();
    assert_eq!(d.rules.profile, "fine");
    assert_eq!(d.rules.overrides.len(), 2);
    assert!((d.rules.overrides["min_clearance"] - 0.0762).abs() < 1e-12);
    assert_eq!(d.rules.overrides["min_annular_ring"], 0.0);
    let e = err(&format!("{BASE}[rules]\nmin_drill = 0\n"));
    assert_eq!(e.first().key, "rules.min_drill");
    assert_eq!(e.first().message, "must be greater than zero");
    let e = err(&format!("{BASE}[rules]\nmin_via = 0.2\n"));
    assert_eq!(e.first().key, "rules.min_via");
    assert!(
        e.first()
            .help
            .as_deref()
            .unwrap()
            .contains("profile, min_trace_width, min_clearance, min_drill"),
        "{e}"
    );
    // Without the rule registry's limits the reader knows no such key.
    let text = format!("{BASE}[rules]\nmin_drill = 0.2\n");
    assert!(crate::design::read(&text, &[]).is_err());
    assert!(crate::design::read(&text, crate::rules::LIMITS).is_ok());
}

#[test]
fn messages_never_repeat_their_key() {
    let bad = [
        BASE.replace("layers = 4", "layers = 40"),
        BASE.replace("layers = 4", "layers = \"four\""),
        BASE.replace("\"0.1mm\"\nclearance", "\"-0.1mm\"\nclearance"),
        BASE.replace("\"0.1mm\"\nclearance", "0\nclearance"),
        BASE.replace("\"0.1mm\"\nclearance", "nan\nclearance"),
        BASE.replace("\"0.1mm\"\nclearance", "true\nclearance"),
        BASE.replace("trace_width = \"0.1mm\"\n", ""),
        BASE.replace("turns = 10", "turns = \"ten\""),
        BASE.replace("turns = 10", "turns = 100"),
        BASE.replace("name = \"t\"", "name = 3"),
        BASE.replace("name = \"t\"", "name = \".t\""),
        with("shape = \"hexagon\""),
        with("sides = 5"),
        with("corner = \"round\""),
        with("corner_radius = \"1mm\""),
        with("width = 3"),
        format!(
            "{BASE}[stackup]\ncopper = [\"1oz\"]\nbend = \"static\"\ndielectric_material = \"\"\n"
        ),
        format!("{BASE}[stackup]\nkind = \"rigid\"\nbend_radius = 3\ndielectric_constant = 200\n"),
        format!("{BASE}[rules]\nprofile = \"\"\n"),
        format!("{BASE}[magnet]\ndiameter = 3\n"),
        format!("{BASE}[drive]\nemissivity = \"high\"\nfrequency = \"3parsec\"\n"),
        format!("stackup = 1\n{BASE}"),
    ];
    let mut seen = 0;
    for text in &bad {
        for e in &err(text).errors {
            seen += 1;
            assert!(
                !e.message.contains(&format!("`{}`", e.key)) && !e.message.starts_with(&e.key),
                "{}: {}",
                e.key,
                e.message
            );
        }
    }
    assert!(seen > bad.len(), "{seen}");
}

#[test]
fn terminal_angle_moves_both_outside_terminals() {
    use std::f64::consts::PI;
    let d = parse(BASE).unwrap();
    assert_eq!(d.terminal_place, TerminalPlace::DEFAULT);
    assert_eq!(d.terminal_place.angle(), PI / 2.0);
    let d = parse(&format!("{BASE}[terminal]\nangle = 210\n")).unwrap();
    assert_eq!(d.terminal_place.angle_deg, 210.0);
    let b = geometry::build(&d).unwrap();
    let a1 = b.pads[0].at.angle().rem_euclid(2.0 * PI);
    assert!((a1 - 210f64.to_radians()).abs() < 1e-9, "{a1}");
    // Four layers end outside: terminal 2 next to terminal 1, counter-clockwise.
    let a2 = b.pads[1].at.angle().rem_euclid(2.0 * PI);
    assert!(a2 > a1 && a2 - a1 < 0.6, "{a1} {a2}");
}

#[test]
fn surface_pads_sit_on_their_face_with_a_via_where_the_winding_is_elsewhere() {
    let text = format!("{BASE}[terminal]\nkind = \"smd\"\npad_width = 0.8\npad_length = 1.2\n");
    let d = parse(&text).unwrap();
    assert!(d.terminal_place.is_smd());
    let b = geometry::build(&d).unwrap();
    for p in &b.pads {
        let s = p.smd.expect("surface pad");
        assert_eq!((s.layer, p.drill, p.joins.clone()), (1, 0.0, vec![1]));
        assert!((p.diameter - (0.8f64.hypot(1.2))).abs() < 1e-12);
    }
    // Terminal 2 ends the bottom layer's winding: a via beside the pad joins
    // layer 4 to the top, where a lead of the pad's layer runs out to it.
    let slot_via = b
        .vias
        .iter()
        .find(|v| v.joins == vec![1, 4])
        .expect("via beside pad 2");
    let w = b.windings.last().unwrap();
    let last = b.winding_tracks(w).last().unwrap();
    assert_eq!(last.layer, 1);
    assert!(last.segment.start().distance(slot_via.at) < 1e-9);
    assert!(last.segment.end().distance(b.pads[1].at) < 1e-9);
    // Bottom face: pads on layer 4, the via beside pad 1 this time.
    let d = parse(&text.replace("kind = \"smd\"", "kind = \"smd\"\nside = \"bottom\"")).unwrap();
    let b = geometry::build(&d).unwrap();
    assert!(b.pads.iter().all(|p| p.smd.unwrap().layer == 4));
    assert!(b.vias.iter().any(|v| v.joins == vec![1, 4]));
}

/// A four-finger tail at 1 mm pitch on the four-layer base.
fn tail_text(pitch: &str, finger_width: &str) -> String {
    format!(
        "{BASE}[tail]\nlength = \"12mm\"\nwidth = \"5mm\"\nfingers = 4\npitch = \"{pitch}\"\nfinger_width = \"{finger_width}\"\nfinger_length = \"3mm\"\nstiffener = \"0.2mm\"\n"
    )
}

#[test]
fn a_tail_brings_the_terminals_to_its_first_two_fingers() {
    let d = parse(&tail_text("1mm", "0.6mm")).unwrap();
    let b = geometry::build(&d).unwrap();
    let t = b.tail.as_ref().expect("tail");
    assert_eq!(t.fingers.len(), 4);
    let names: Vec<&str> = t.fingers.iter().map(|&i| b.pads[i].name.as_str()).collect();
    assert_eq!(names, ["1", "2", "3", "4"]);
    // Fingers across the tail at the pitch, all on the top, size as asked.
    let u = crate::geometry::Vec2::from_angle(t.angle);
    let v = u.perp();
    for w in t.fingers.windows(2) {
        let (a, c) = (b.pads[w[0]].at, b.pads[w[1]].at);
        assert!(((c - a).dot(v) - 1.0).abs() < 1e-9);
        assert!((c - a).dot(u).abs() < 1e-9);
    }
    for &i in &t.fingers {
        let s = b.pads[i].smd.unwrap();
        assert_eq!((s.layer, s.width, s.length), (1, 0.6, 3.0));
        // The finger ends the margin short of the tail's end.
        let far = b.pads[i].at.to_vec2().dot(u) + 1.5;
        assert!((t.end - far - d.board.margin).abs() < 1e-9);
    }
    // Terminal 2 ends the bottom layer: its lead reaches its finger on the
    // top from the via in its slot.
    let last = b.winding_tracks(b.windings.last().unwrap()).last().unwrap();
    assert_eq!(last.layer, 1);
    assert!(last.segment.end().distance(b.pads[1].at) < 1e-9);
    // The outline reaches the tail's end; the stiffener covers the fingers.
    let reach = b
        .outline
        .segments
        .iter()
        .flat_map(|s| s.flatten(1e-4))
        .map(|p| p.to_vec2().dot(u))
        .fold(f64::MIN, f64::max);
    assert!((reach - t.end).abs() < 1e-9, "{reach} {}", t.end);
    assert!(t.stiffener.is_some() && t.stiff_from < t.end - 3.0 - d.board.margin);
    // Board 4 x 35 um copper + 3 x 50 um polyimide + one 37.5 um cover,
    // plus 0.2 mm stiffener.
    let want = 4.0 * 0.035 + 3.0 * 0.05 + 0.0375 + 0.2;
    let got = d.finger_thickness().unwrap();
    assert!((got - want).abs() < 1e-9, "{got}");
    let profile = crate::rules::Profile::builtin("standard").unwrap();
    let v = crate::rules::check(&d, &b, &profile);
    assert!(crate::rules::is_clean(&v), "{v:?}");
}

#[test]
fn fingers_closer_than_the_clearance_break_the_pad_spacing_rule() {
    // 1 mm pitch, 0.95 mm fingers: 0.05 mm gaps, below the standard
    // profile's clearance; the rule measures the rectangles (three gaps).
    let d = parse(&tail_text("1mm", "0.95mm")).unwrap();
    let b = geometry::build(&d).unwrap();
    let profile = crate::rules::Profile::builtin("standard").unwrap();
    let v = crate::rules::check(&d, &b, &profile);
    let gaps: Vec<_> = v.iter().filter(|x| x.rule == "via-via-clearance").collect();
    assert_eq!(gaps.len(), 3, "{v:?}");
    assert!(
        gaps.iter().all(|x| (x.measured - 0.05).abs() < 1e-6),
        "{gaps:?}"
    );
}

#[test]
fn a_tail_is_refused_on_rigid_boards_and_where_the_fingers_do_not_fit() {
    let rigid = tail_text("1mm", "0.6mm").replace("[tail]", "[stackup]\nkind = \"rigid\"\n[tail]");
    assert!(err(&rigid).errors.iter().any(|e| e.key == "tail"));
    let narrow = tail_text("1mm", "0.6mm").replace("width = \"5mm\"", "width = \"3.5mm\"");
    let e = err(&narrow);
    let f = e.errors.iter().find(|e| e.key == "tail.fingers").unwrap();
    assert!(
        f.help.as_deref().unwrap().contains("at most 3 fingers"),
        "{f:?}"
    );
    assert!(
        err(&tail_text("1mm", "1mm"))
            .errors
            .iter()
            .any(|e| e.key == "tail.finger_width")
    );
}

/// A sector takes its slot from the ring: count, the annulus's radii and
/// the spacing (the clearance when not given); its corner radius defaults
/// to four pitches; "max" gives whole turns whose outermost copper touches
/// the slot's outline.
#[test]
fn sector_takes_its_slot_from_the_ring() {
    let text = include_str!("../../examples/gimbal-stator.toml");
    let d = parse(text).unwrap();
    assert_eq!(
        d.coil.shape,
        Shape::Sector {
            count: 12,
            inner_radius: 12.0,
            outer_radius: 25.0,
            spacing: 0.3,
            corner_radius: 1.0,
        }
    );
    assert_eq!(d.coil.turns.fract(), 0.0);
    assert_eq!(d.terminal_place.angle_deg, 0.0);
    let plain = text
        .replace("corner_radius = \"1mm\"", "")
        .replace("spacing = \"0.3mm\"", "");
    let d = parse(&plain).unwrap();
    match d.coil.shape {
        Shape::Sector {
            spacing,
            corner_radius,
            ..
        } => {
            assert_eq!(spacing, 0.15);
            assert!((corner_radius - 4.0 * 0.3).abs() < 1e-12);
        }
        other => panic!("{other:?}"),
    }
    // The outermost turn's copper reaches the outer arc: 25 mm from the
    // ring's centre, which lies (12 + 25) / 2 mm from the coil's axis on -x.
    let board = geometry::build(&d).unwrap();
    let reach = board
        .tracks
        .iter()
        .filter(|t| t.role == geometry::TrackRole::Winding)
        .map(|t| t.segment.start().distance(geometry::Point::new(-18.5, 0.0)) + t.width / 2.0)
        .fold(0.0, f64::max);
    assert!((reach - 25.0).abs() < 1e-6, "{reach}");
}
