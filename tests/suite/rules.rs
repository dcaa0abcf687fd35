//! Rule check: one fixture per rule that breaks it exactly once (snapshot of
//! the whole violation list) and one exactly at the limit that passes.
//! Fixtures are the sample design with some fields changed, or its layout
//! with one item moved or edited by hand where the generator never makes
//! the fault.

use coilwright::design::{Bend, BendKind, Design};
use coilwright::geometry::{self, Arc, Board, Point, Segment, Track, TrackRole};
use coilwright::rules::{self, Profile, Violation};

fn standard() -> Profile {
    Profile::builtin("standard").unwrap()
}

fn build(d: &Design) -> Board {
    geometry::build(d).unwrap_or_else(|e| panic!("{e}"))
}

/// The sample with `layers` layers (stack-up vectors resized).
fn sample_layers(layers: u8) -> Design {
    let mut d = Design::sample();
    d.coil.layers = layers;
    d.stackup.copper = vec![0.035; layers as usize];
    d.stackup.dielectric = vec![0.05; layers as usize - 1];
    d
}

/// The violation list as text, one line each, lengths to 1 nm.
fn show(v: &[Violation]) -> String {
    v.iter().map(|x| format!("{x}\n")).collect()
}

fn of_rule<'a>(v: &'a [Violation], id: &str) -> Vec<&'a Violation> {
    v.iter().filter(|x| x.rule == id).collect()
}

/// Checks that `v` breaks `id` exactly once and snapshots the whole list.
fn once(name: &str, v: &[Violation], id: &str) {
    assert_eq!(of_rule(v, id).len(), 1, "{id}:\n{}", show(v));
    insta::assert_snapshot!(name, show(v));
}

/// Moves a pad or via centre by `by` (mm) along the direction from the axis.
fn push_out(p: Point, by: f64) -> Point {
    let r = p.radius();
    Point::new(p.x * (r + by) / r, p.y * (r + by) / r)
}

#[test]
fn sample_is_clean_under_standard() {
    let d = Design::sample();
    let v = rules::check(&d, &build(&d), &standard());
    assert!(rules::is_clean(&v), "{}", show(&v));
    assert!(!rules::has_errors(&v));
}

#[test]
fn trace_width() {
    // At the limit: the sample's 0.1 mm tracks under 0.1 mm.
    let d = Design::sample();
    let mut l = build(&d);
    assert!(of_rule(&rules::check(&d, &l, &standard()), "trace-width").is_empty());
    // One track drawn 0.09 mm.
    l.tracks[5].width = 0.09;
    once(
        "trace_width",
        &rules::check(&d, &l, &standard()),
        "trace-width",
    );
}

/// A stray stub on layer 1 inside the innermost turn: an arc from 80 to 100
/// degrees, concentric with that turn and `gap` mm from its inner edge.
/// Layer 1's innermost arc is centred on (-0.05, 0) with radius 8.0 mm
/// (inner diameter 15.8 mm, pitch 0.2 mm, first half turn counter-clockwise
/// from +x).
fn with_stub(gap: f64) -> (Design, Board) {
    let d = Design::sample();
    let mut l = build(&d);
    let c = Point::new(-0.05, 0.0);
    let r = 8.0 - 0.05 - gap - 0.05;
    let start = c + (Point::polar(r, 80f64.to_radians()) - Point::ORIGIN);
    l.tracks.push(Track {
        layer: 1,
        segment: Segment::Arc(Arc::from_start(c, start, 20f64.to_radians())),
        width: 0.1,
        role: TrackRole::Lead,
    });
    (d, l)
}

#[test]
fn clearance() {
    let (d, l) = with_stub(0.1);
    let v = rules::check(&d, &l, &standard());
    assert!(rules::is_clean(&v), "{}", show(&v));
    let (d, l) = with_stub(0.08);
    let v = rules::check(&d, &l, &standard());
    once("clearance", &v, "clearance");
    let c = of_rule(&v, "clearance")[0];
    assert!((c.measured - 0.08).abs() < 1e-9, "{}", c.measured);
    // Midway between the edges, between 80 and 100 degrees.
    let rel = c.at - Point::new(-0.05, 0.0);
    assert!(
        (rel.length() - (8.0 - 0.05 - 0.04)).abs() < 1e-9,
        "{:?}",
        c.at
    );
    assert!(
        (80.0..=100.0).contains(&rel.angle().to_degrees()),
        "{:?}",
        c.at
    );
}

#[test]
fn clearance_one_micrometre_below_the_rule_fails() {
    // The sample's turns are exactly 0.1 mm apart; the rule says 0.1 mm.
    let mut d = Design::sample();
    assert!(rules::is_clean(&rules::check(&d, &build(&d), &standard())));
    d.coil.clearance = 0.099;
    let v = rules::check(&d, &build(&d), &standard());
    assert!(rules::has_errors(&v));
    // The generator spaces turns, leads and vias by the design clearance.
    // The centre vias sit one design clearance inside the innermost turn,
    // so the free centre is 2 um short for the rule's clearance too.
    let spaced = [
        "clearance",
        "via-clearance",
        "via-via-clearance",
        "centre-room",
    ];
    assert!(v.iter().all(|x| spaced.contains(&x.rule)), "{}", show(&v));
    // Turn to turn exactly 0.099 mm; where a lead leaves the winding, a
    // little more.
    assert!(
        v.iter()
            .filter(|x| x.rule != "centre-room")
            .all(|x| x.measured > 0.099 - 1e-9 && x.measured < 0.1),
        "{}",
        show(&v)
    );
    assert!(
        v.iter()
            .filter(|x| (x.measured - 0.099).abs() < 1e-9)
            .count()
            > 40
    );
    d.coil.clearance = 0.1;
    assert!(rules::is_clean(&rules::check(&d, &build(&d), &standard())));
}

/// The sample with the smallest free centre its vias allow: the two
/// centre vias then sit on a 0.275 mm circle, 0.55 mm apart (0.45 mm pads,
/// 0.1 mm clearance).
fn tight() -> Design {
    let mut d = Design::sample();
    d.coil.inner_diameter = geometry::min_inner_diameter(
        &d.coil.shape,
        d.coil.layers,
        d.coil.wiring,
        d.coil.clearance,
        d.coil.trace_width,
        d.via.diameter,
        d.terminal.diameter,
    );
    d
}

/// The sample with a short stray track on layer 1 just outside via 1
/// (outside the winding, joins layers 2 and 3), `gap` mm from its pad.
fn with_stray_by_via(gap: f64) -> (Design, Board) {
    let d = Design::sample();
    let mut l = build(&d);
    let via = l.vias[1].clone();
    assert!(!via.joins.contains(&1));
    let out = (via.at - Point::ORIGIN).normalized().unwrap();
    let c = via.at + out * (via.diameter / 2.0 + gap + 0.05);
    l.tracks.push(Track {
        layer: 1,
        segment: Segment::line(c - out.perp() * 0.1, c + out.perp() * 0.1),
        width: 0.1,
        role: TrackRole::Lead,
    });
    (d, l)
}

#[test]
fn via_clearance() {
    let (d, l) = with_stray_by_via(0.1);
    let v = rules::check(&d, &l, &standard());
    assert!(rules::is_clean(&v), "{}", show(&v));
    let (d, l) = with_stray_by_via(0.08);
    let v = rules::check(&d, &l, &standard());
    once("via_clearance", &v, "via-clearance");
    let x = of_rule(&v, "via-clearance")[0];
    assert_eq!(x.layer, Some(1));
    assert!((x.measured - 0.08).abs() < 1e-9, "{}", x.measured);
}

#[test]
fn pad_lead_clearance() {
    // Terminal "1" (pads[0], joins layer 1) moved along its ring from 90 to
    // 45 degrees, over layer 1's own outer lead ring (which runs from 90 to
    // 0 degrees, 0.55 mm inside the pad ring), far along the conductor from
    // where the lead leaves the pad.
    let d = Design::sample();
    let mut l = build(&d);
    let ring = l.pads[0].at.radius();
    let at = |r: f64| Point::polar(r, std::f64::consts::FRAC_PI_4);
    // At the limit: 0.1 mm from the lead ring.
    l.pads[0].at = at(ring);
    let v = rules::check(&d, &l, &standard());
    assert!(of_rule(&v, "pad-lead-clearance").is_empty(), "{}", show(&v));
    l.pads[0].at = at(ring - 0.05);
    let v = rules::check(&d, &l, &standard());
    once("pad_lead_clearance", &v, "pad-lead-clearance");
    let x = of_rule(&v, "pad-lead-clearance")[0];
    assert!((x.measured - 0.05).abs() < 1e-6, "{}", x.measured);
}

#[test]
fn via_via_clearance() {
    // The two centre vias of the tight sample are 0.55 mm apart, 0.45 mm
    // pads: 0.1 mm exactly. Via 0 moved 0.02 mm towards the axis.
    let d = tight();
    let mut l = build(&d);
    assert!(of_rule(&rules::check(&d, &l, &standard()), "via-via-clearance").is_empty());
    l.vias[0].at = push_out(l.vias[0].at, -0.02);
    once(
        "via_via_clearance",
        &rules::check(&d, &l, &standard()),
        "via-via-clearance",
    );
}

#[test]
fn drill() {
    // Two layers: a single via, in the centre.
    let mut d = sample_layers(2);
    d.via.drill = 0.2;
    assert!(rules::is_clean(&rules::check(&d, &build(&d), &standard())));
    d.via.drill = 0.19;
    once("drill", &rules::check(&d, &build(&d), &standard()), "drill");
}

#[test]
fn annular_ring() {
    let mut d = sample_layers(2);
    d.via.diameter = 0.4; // ring exactly 0.1 mm
    assert!(rules::is_clean(&rules::check(&d, &build(&d), &standard())));
    d.via.diameter = 0.39;
    once(
        "annular_ring",
        &rules::check(&d, &build(&d), &standard()),
        "annular-ring",
    );
}

#[test]
fn hole_spacing() {
    // Centre vias: 0.55 mm between centres, 0.2 mm drills: 0.35 mm apart.
    let d = tight();
    let l = build(&d);
    let mut p = standard();
    p.set_limit("min_hole_spacing", 0.35).unwrap();
    assert!(rules::is_clean(&rules::check(&d, &l, &p)));
    p.set_limit("min_hole_spacing", 0.4).unwrap();
    once("hole_spacing", &rules::check(&d, &l, &p), "hole-spacing");
}

#[test]
fn edge_clearance() {
    // The terminal pads are exactly the board margin (0.5 mm) from the edge.
    let d = Design::sample();
    let mut l = build(&d);
    let mut p = standard();
    p.set_limit("min_edge_clearance", 0.5).unwrap();
    assert!(rules::is_clean(&rules::check(&d, &l, &p)));
    // Terminal 1 pushed 0.25 mm outwards: 0.25 mm from the edge, under 0.3.
    l.pads[0].at = push_out(l.pads[0].at, 0.25);
    let v = rules::check(&d, &l, &standard());
    once("edge_clearance", &v, "edge-clearance");
    assert!((of_rule(&v, "edge-clearance")[0].measured - 0.25).abs() < 1e-9);
    // Outside the board altogether: negative.
    l.pads[0].at = push_out(l.pads[0].at, 1.0);
    let v = rules::check(&d, &l, &standard());
    assert!(of_rule(&v, "edge-clearance")[0].measured < -0.4);
}

#[test]
fn centre_room() {
    // One layer: terminal "2" (0.8 mm) on the axis needs 2 x (0.4 + 0.1) = 1.0 mm.
    let mut d = sample_layers(1);
    d.coil.inner_diameter = 1.0;
    let mut l = build(&d);
    let v = rules::check(&d, &l, &standard());
    assert!(rules::is_clean(&v), "{}", show(&v));
    // The generator refuses a smaller centre, so grow the pad in the layout
    // instead: 0.84 mm needs 2 x (0.42 + 0.1) = 1.04 mm.
    l.pads[1].diameter = 0.84;
    once(
        "centre_room",
        &rules::check(&d, &l, &standard()),
        "centre-room",
    );
}

#[test]
fn bend_radius() {
    // Four-layer flex, 0.365 mm finished: a static bend needs 20 x 0.365 = 7.3 mm.
    let mut d = Design::sample();
    d.stackup.bend = Some(Bend {
        radius: 7.3,
        kind: BendKind::Static,
    });
    assert!(rules::is_clean(&rules::check(&d, &build(&d), &standard())));
    d.stackup.bend = Some(Bend {
        radius: 7.0,
        kind: BendKind::Static,
    });
    let v = rules::check(&d, &build(&d), &standard());
    once("bend_radius", &v, "bend-radius");
    assert!(!rules::has_errors(&v));
    assert_eq!(rules::warnings(&v).count(), 1);
    // Rigid boards are not bent.
    d.stackup.kind = coilwright::design::BoardKind::Rigid;
    assert!(rules::is_clean(&rules::check(&d, &build(&d), &standard())));
}

#[test]
fn violations_serialise_with_rule_severity_and_place() {
    let (d, l) = with_stub(0.08);
    let v = rules::check(&d, &l, &standard());
    let j = serde_json::to_value(&v).unwrap();
    let x = &j[0];
    assert_eq!(x["rule"], "clearance");
    assert_eq!(x["severity"], "error");
    assert_eq!(x["layer"], 1);
    // The shape `check --json` promises: rule, severity, measured,
    // required, layer, x, y, items.
    assert!((x["x"].as_f64().unwrap() + 0.05).abs() < 1e-9);
    assert!((x["y"].as_f64().unwrap() - 7.91).abs() < 1e-9);
    assert!(x["measured"].is_f64() && x["required"].is_f64());
    assert_eq!(x["items"][0]["kind"], "track");
}

#[test]
fn every_rule_has_a_stable_unique_id() {
    let ids: Vec<_> = rules::RULES.iter().map(|r| r.id).collect();
    let mut u = ids.clone();
    u.sort();
    u.dedup();
    assert_eq!(u.len(), ids.len());
    assert_eq!(
        ids,
        [
            "trace-width",
            "clearance",
            "via-clearance",
            "pad-lead-clearance",
            "via-via-clearance",
            "drill",
            "annular-ring",
            "hole-spacing",
            "edge-clearance",
            "centre-room",
            "bend-radius"
        ]
    );
}
