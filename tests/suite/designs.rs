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
fn readme_example_is_a_four_layer_flex_circle_with_a_magnet() {
    let text = include_str!("../../examples/fin-actuator.toml");
    let d = parse(text).unwrap();
    assert_eq!(d.coil.layers, 4);
    assert_eq!(d.coil.shape, Shape::Circle);
    assert_eq!(d.stackup.kind, coilwright::design::BoardKind::Flex);
    assert!(d.magnet.is_some());
}
