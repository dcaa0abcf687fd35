//! Every starter template and every example design parses and builds.

use coilwright::design::Shape;
use coilwright::pipeline::parse;

#[test]
fn every_template_parses_and_builds() {
    let t = coilwright::design::templates();
    assert!(t.len() >= 3);
    for t in t {
        let d = parse(t.text).unwrap_or_else(|e| panic!("template {}: {e}", t.name));
        assert_eq!(d.name, t.name, "template name matches its name line");
        coilwright::geometry::build(&d).unwrap();
    }
}

#[test]
fn every_example_parses_and_builds() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let mut shapes = Vec::new();
    let mut n = 0;
    for e in std::fs::read_dir(&dir).unwrap() {
        let path = e.unwrap().path();
        if path.extension().is_some_and(|x| x == "toml") {
            let text = std::fs::read_to_string(&path).unwrap();
            let d = parse(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
            coilwright::geometry::build(&d).unwrap();
            shapes.push(d.coil.shape);
            n += 1;
        }
    }
    assert!(n >= 3);
    assert!(shapes.iter().any(|s| matches!(s, Shape::Rectangle { .. })));
    assert!(shapes.iter().any(|s| matches!(s, Shape::Polygon { .. })));
}

#[test]
fn readme_example_is_a_two_layer_flex_circle_with_a_magnet() {
    let text = include_str!("../../examples/fin-actuator.toml");
    let d = parse(text).unwrap();
    assert_eq!(d.coil.layers, 2);
    assert_eq!(d.coil.shape, Shape::Circle);
    assert_eq!(d.stackup.kind, coilwright::design::BoardKind::Flex);
    assert!(d.magnet.is_some());
}

/// Every starter is a sound design: `init --list` and `examples/` are one
/// set, and each starter passes its own rule check without a warning, with
/// no caution in its report and its steady temperature below its own
/// `max_temperature`.
#[test]
fn every_starter_is_an_example_and_is_sound() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let mut files: Vec<String> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .map(|p| p.file_stem().unwrap().to_string_lossy().into_owned())
        .collect();
    files.sort();
    let mut names: Vec<String> = coilwright::design::templates()
        .iter()
        .map(|t| t.name.to_string())
        .collect();
    names.sort();
    assert_eq!(files, names, "examples/*.toml and init --list differ");
    let readme = include_str!("../../README.md");
    for t in coilwright::design::templates() {
        assert!(readme.contains(t.name), "README does not name {}", t.name);
        let d = parse(t.text).unwrap();
        let board = coilwright::geometry::build(&d).unwrap();
        let profile = coilwright::rules::Profile::builtin("standard").unwrap();
        let v = coilwright::rules::check(&d, &board, &profile);
        assert!(v.is_empty(), "{}: {v:?}", t.name);
        let a = coilwright::physics::analyse(&d, &board).unwrap();
        assert!(a.cautions.is_empty(), "{}: {:?}", t.name, a.cautions);
        let temperature = a.thermal.temperature_c.expect("a steady temperature");
        assert!(
            temperature < d.drive.max_temperature,
            "{}: {temperature} C",
            t.name
        );
    }
}

/// `check` computes the design's limits with `Detail::Limits` (no
/// inductance for a steady drive): its cautions, limits and operating
/// point are those of the full analysis for every example, also with a
/// square-wave voltage drive, where the heating depends on the inductance.
#[test]
fn check_limits_equal_the_full_analysis() {
    use coilwright::design::Waveform;
    use coilwright::physics::{Detail, analyse_with};
    for name in crate::common::entries(std::path::Path::new("examples")) {
        if !name.ends_with(".toml") {
            continue;
        }
        let text = std::fs::read_to_string(format!("examples/{name}")).unwrap();
        let (d, l) = coilwright::pipeline::parse_and_build(&text).unwrap();
        let mut square = d.clone();
        square.drive.waveform = Waveform::Square;
        square.drive.frequency = Some(50.0);
        for (what, d) in [("as given", &d), ("square", &square)] {
            let full = analyse_with(d, &l, Detail::Full).unwrap();
            let limits = analyse_with(d, &l, Detail::Limits).unwrap();
            let texts = |a: &coilwright::physics::Analysis| -> Vec<String> {
                a.cautions.iter().map(|c| c.to_string()).collect()
            };
            assert_eq!(texts(&full), texts(&limits), "{name} {what}");
            let (t, u) = (&full.thermal, &limits.thermal);
            assert_eq!(t.temperature_c, u.temperature_c, "{name} {what}");
            assert_eq!(t.max_current_a, u.max_current_a, "{name} {what}");
            assert_eq!(t.max_voltage_v, u.max_voltage_v, "{name} {what}");
        }
    }
}
