use coilwright::design::{Corner, Design, Shape, Wiring};
use coilwright::geometry::{self, Node};

fn check(d: &Design) {
    let l = geometry::build(d).unwrap_or_else(|e| panic!("{e}"));
    for w in &l.windings {
        let t = l.winding_tracks(w);
        assert!(l.node_at(w.from).distance(t[0].segment.start()) < 1e-9);
        assert!(l.node_at(w.to).distance(t.last().unwrap().segment.end()) < 1e-9);
        for p in t.windows(2) {
            assert!(p[0].segment.end().distance(p[1].segment.start()) < 1e-9);
        }
        assert!(l.circulation(w) < 0.0, "layer {} circulates ccw", w.layer);
    }
    assert_eq!(l.windings.first().unwrap().from, Node::Pad(0));
    assert_eq!(l.windings.last().unwrap().to, Node::Pad(1));
}

#[test]
fn builds_all_shapes_and_layer_counts() {
    for layers in [1u8, 2, 3, 4, 5, 8, 32] {
        for shape in [
            Shape::Circle,
            Shape::Polygon { sides: 6 },
            Shape::Rectangle {
                width: 30.0,
                height: 20.0,
            },
        ] {
            let mut d = Design::sample();
            d.coil.layers = layers;
            d.coil.shape = shape;
            d.coil.inner_diameter = 6.0;
            d.coil.turns = 8.25;
            d.stackup.copper = vec![0.035; layers as usize];
            d.stackup.dielectric = vec![0.05; layers.max(1) as usize - 1];
            check(&d);
            d.coil.corner = Corner::Round { radius: 0.5 };
            if layers % 2 == 0 {
                d.coil.wiring = Wiring::ParallelPairs;
            }
            check(&d);
        }
    }
}
