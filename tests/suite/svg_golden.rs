//! Golden SVG preview of one small design (a 2-layer, 3.5-turn circle).
//! Review changes with `cargo insta review` (or delete the snapshot and rerun).
use coilwright::design::Design;
use coilwright::export::svg::{View, preview};
use coilwright::geometry;

fn small() -> Design {
    let mut d = Design::sample();
    d.name = "golden-small".into();
    d.coil.layers = 2;
    d.coil.turns = 3.5;
    d.coil.inner_diameter = 4.0;
    d.coil.outer_diameter = 4.0 + 2.0 * 3.5 * 0.2 + 0.2;
    d.stackup.copper = vec![0.035; 2];
    d.stackup.dielectric = vec![0.05];
    d
}

#[test]
fn golden_stack_preview() {
    let l = geometry::build(&small()).unwrap();
    insta::assert_snapshot!("stack", preview(&l, View::Stack, &[]));
}

#[test]
fn golden_layer_preview() {
    let l = geometry::build(&small()).unwrap();
    insta::assert_snapshot!("layer2", preview(&l, View::Layer(2), &[]));
}

/// The stacked preview of a many-turn, four-layer coil also draws each
/// layer on its own (small, with its direction), so the layers stay
/// readable where the stack blurs; a single-layer view does not.
#[test]
fn stacked_preview_shows_each_layer_on_its_own() {
    let l = geometry::build(&Design::sample()).unwrap();
    assert_eq!(l.layers, 4);
    let stack = preview(&l, View::Stack, &[]);
    assert_eq!(stack.matches(r#"class="layer-thumb""#).count(), 4);
    for (k, dir) in ["L1 inward", "L2 outward", "L3 inward", "L4 outward"]
        .iter()
        .enumerate()
    {
        assert!(stack.contains(dir), "layer {} label missing", k + 1);
    }
    let one = preview(&l, View::Layer(2), &[]);
    assert!(!one.contains("layer-thumb"));
}
