//! Property tests of the geometry over random valid designs.

use coilwright::design::{Corner, Design, Shape, Wiring};
use coilwright::geometry::{
    self, Board, FitError, FitInput, Node, Segment, SpiralSpec, TrackRole, TurnsRequest,
    round::to_nm,
};
use proptest::prelude::*;
use std::f64::consts::{PI, TAU};

/// A random valid design: every shape, 1..=8 layers (sometimes up to 32),
/// both wirings, both corner styles, sizes in a sane range, terminals at
/// the top or at any angle, on leads or not.
fn designs() -> impl Strategy<Value = Design> {
    (
        prop_oneof![
            Just(Shape::Circle),
            (3u8..=12).prop_map(|sides| Shape::Polygon { sides }),
            (10.0f64..40.0, 10.0f64..40.0)
                .prop_map(|(width, height)| Shape::Rectangle { width, height }),
        ],
        prop_oneof![4 => 1u8..=8, 1 => 9u8..=32],
        any::<bool>(),
        prop_oneof![Just(None), (0.0f64..0.5).prop_map(Some)],
        (0.075f64..0.3, 0.075f64..0.3),
        (1.0f64..12.0),
        (0.0f64..3.0),
        prop_oneof![
            Just((90.0, 0.0)),
            (0.0f64..360.0, prop_oneof![Just(0.0), 0.0f64..3.0])
        ],
    )
        .prop_map(
            |(shape, layers, parallel, round, (w, s), turns, extra_id, (angle, lead))| {
                let mut d = Design::sample();
                d.terminal_place = coilwright::design::TerminalPlace {
                    angle_deg: angle,
                    lead_length: lead,
                    ..coilwright::design::TerminalPlace::DEFAULT
                };
                d.coil.shape = shape;
                d.coil.layers = layers;
                d.coil.wiring = if parallel && layers % 2 == 0 {
                    Wiring::ParallelPairs
                } else {
                    Wiring::Series
                };
                d.coil.corner = match round {
                    Some(r) => Corner::Round { radius: r },
                    None => Corner::Sharp,
                };
                d.coil.trace_width = w;
                d.coil.clearance = s;
                d.coil.turns = (turns * 100.0).round() / 100.0;
                d.stackup.copper = vec![0.035; layers as usize];
                d.stackup.dielectric = vec![0.05; layers as usize - 1];
                let min_id = geometry::min_inner_diameter(
                    &shape,
                    layers,
                    d.coil.wiring,
                    s,
                    w,
                    d.via.diameter,
                    d.terminal.diameter,
                );
                d.coil.inner_diameter = min_id + extra_id;
                let rectangle = matches!(shape, Shape::Rectangle { .. });
                if let Shape::Rectangle { width, height } = shape {
                    // The outer size must hold the turns: grow the rectangle.
                    let need = d.coil.inner_diameter + 2.0 * (turns + 1.0) * (w + s) + 2.0 * w;
                    let grow = (need - width.min(height)).max(0.0);
                    d.coil.shape = Shape::Rectangle {
                        width: width + grow,
                        height: height + grow,
                    };
                }
                // Rectangles: grow the outer size until the turns fit.
                let fit = loop {
                    let r = FitInput {
                        shape: d.coil.shape,
                        corner: d.coil.corner,
                        trace_width: w,
                        clearance: s,
                        outer_diameter: None,
                        inner_diameter: (!rectangle).then_some(d.coil.inner_diameter),
                        turns: Some(TurnsRequest::Count(d.coil.turns)),
                        min_inner_diameter: min_id,
                    }
                    .resolve();
                    match (r, d.coil.shape) {
                        (Ok(f), _) => break f,
                        (
                            Err(FitError::TooManyTurns { .. } | FitError::InnerNotInside),
                            Shape::Rectangle { width, height },
                        ) if width < 400.0 => {
                            d.coil.shape = Shape::Rectangle {
                                width: width * 1.25,
                                height: height * 1.25,
                            }
                        }
                        (Err(FitError::CornerTooLarge { max, .. }), _) => {
                            d.coil.corner = Corner::Round { radius: max / 2.0 }
                        }
                        (Err(e), _) => panic!("fit: {e}"),
                    }
                };
                d.coil.outer_diameter = fit.outer_diameter;
                d.coil.inner_diameter = fit.inner_diameter;
                d
            },
        )
}

fn build(d: &Design) -> Board {
    geometry::build(d).unwrap_or_else(|e| panic!("{e}: {d:?}"))
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 96, ..ProptestConfig::default() })]

    /// Consecutive primitives meet within 1 nm after rounding, and the
    /// conductor is one chain from pad 1 through the vias to pad 2.
    #[test]
    fn conductor_is_one_chain(d in designs()) {
        let l = build(&d);
        // One placed coil owns every track, via, pad and winding.
        prop_assert_eq!(l.coils.len(), 1);
        let c = &l.coils[0];
        prop_assert_eq!(
            (c.tracks.clone(), c.vias.clone(), c.pads.clone(), c.windings.clone()),
            (0..l.tracks.len(), 0..l.vias.len(), 0..l.pads.len(), 0..l.windings.len())
        );
        prop_assert_eq!(l.windings.len(), d.coil.layers as usize);
        prop_assert_eq!(l.windings[0].from, Node::Pad(0));
        prop_assert_eq!(l.windings.last().unwrap().to, Node::Pad(1));
        let nm = |p: geometry::Point| (to_nm(p.x), to_nm(p.y));
        let close = |a: (i64, i64), b: (i64, i64)| (a.0 - b.0).abs() <= 1 && (a.1 - b.1).abs() <= 1;
        for w in &l.windings {
            let t = l.winding_tracks(w);
            prop_assert!(!t.is_empty());
            prop_assert!(close(nm(l.node_at(w.from)), nm(t[0].segment.start())));
            prop_assert!(close(nm(l.node_at(w.to)), nm(t.last().unwrap().segment.end())));
            for p in t.windows(2) {
                prop_assert!(close(nm(p[0].segment.end()), nm(p[1].segment.start())));
            }
            for n in [w.from, w.to] {
                let joins = match n {
                    Node::Pad(i) => &l.pads[i].joins,
                    Node::Via(i) => &l.vias[i].joins,
                };
                prop_assert!(joins.contains(&w.layer), "node {n:?} does not join layer {}", w.layer);
            }
        }
        // Groups follow one another: each group ends where the next begins.
        let groups = l.windings.iter().map(|w| w.group).max().unwrap() + 1;
        for g in 0..groups - 1 {
            let end = l.windings.iter().find(|w| w.group == g).unwrap().to;
            let start = l.windings.iter().find(|w| w.group == g + 1).unwrap().from;
            prop_assert_eq!(end, start);
        }
    }

    /// Seen from the top the current circulates the same way on every layer,
    /// and each layer's spiral makes exactly the requested turns.
    #[test]
    fn same_sense_and_requested_turns(d in designs()) {
        let l = build(&d);
        for w in &l.windings {
            let turns = -l.circulation(w) / TAU;
            prop_assert!((turns - d.coil.turns).abs() < 1e-6, "layer {}: {turns} turns", w.layer);
        }
    }

    /// Winding copper stays inside the outer size; all copper inside the
    /// board outline with the margin.
    #[test]
    fn copper_inside_outer_size(d in designs()) {
        let l = build(&d);
        let hw = d.coil.trace_width / 2.0;
        for t in l.tracks.iter().filter(|t| t.role == TrackRole::Winding) {
            match d.coil.shape {
                Shape::Rectangle { width, height } => {
                    let b = t.segment.bounding_box().inflate(hw);
                    prop_assert!(b.min.x >= -width / 2.0 - 1e-9 && b.max.x <= width / 2.0 + 1e-9);
                    prop_assert!(b.min.y >= -height / 2.0 - 1e-9 && b.max.y <= height / 2.0 + 1e-9);
                }
                _ => prop_assert!(t.segment.max_radius() + hw <= d.coil.outer_diameter / 2.0 + 1e-9),
            }
            prop_assert!(t.segment.min_radius() - hw >= d.coil.inner_diameter / 2.0 - 1e-9);
        }
        // Every copper item is at least the margin inside the outline.
        let outline = &l.outline.segments;
        let edge = |p: geometry::Point| outline.iter().map(|s| s.distance(p)).fold(f64::INFINITY, f64::min);
        for t in &l.tracks {
            for p in t.segment.flatten(1e-4) {
                prop_assert!(edge(p) >= d.board.margin + t.width / 2.0 - 1e-3);
            }
        }
        for v in &l.vias {
            prop_assert!(edge(v.at) >= d.board.margin + v.diameter / 2.0 - 1e-6);
        }
        for p in &l.pads {
            prop_assert!(edge(p.at) >= d.board.margin + p.diameter / 2.0 - 1e-6);
        }
    }

    /// A through via or pad meets no copper of a layer it does not join
    /// (clearance kept), and vias keep clearance from each other.
    #[test]
    fn vias_clear_of_foreign_copper(d in designs()) {
        let l = build(&d);
        let s = d.coil.clearance;
        let holes: Vec<(geometry::Point, f64, &Vec<u8>)> = l
            .vias
            .iter()
            .map(|v| (v.at, v.diameter, &v.joins))
            .chain(l.pads.iter().map(|p| (p.at, p.diameter, &p.joins)))
            .collect();
        for (at, dia, joins) in &holes {
            for t in l.tracks.iter().filter(|t| !joins.contains(&t.layer)) {
                let gap = t.segment.distance(*at) - dia / 2.0 - t.width / 2.0;
                prop_assert!(gap >= s - 1e-9, "hole at {at:?} is {gap} mm from a track on layer {}", t.layer);
            }
        }
        for (i, a) in holes.iter().enumerate() {
            for b in &holes[i + 1..] {
                let gap = a.0.distance(b.0) - a.1 / 2.0 - b.1 / 2.0;
                prop_assert!(gap >= s - 1e-9, "holes at {:?} and {:?} are {gap} mm apart", a.0, b.0);
            }
        }
    }

    /// Every random valid design passes the rule check under a profile made
    /// of its own values (the generator never makes copper it cannot keep).
    #[test]
    fn passes_its_own_rule_check(d in designs()) {
        let l = build(&d);
        let p = super::common::own_profile(&d);
        let v = coilwright::rules::check(&d, &l, &p);
        prop_assert!(
            coilwright::rules::is_clean(&v),
            "{}",
            v.iter().map(|x| format!("{x}\n")).collect::<String>()
        );
    }

    /// Pitch is exact: every point of the spiral is exactly one pitch (centre
    /// to centre) from the nearest point of the neighbouring turn.
    #[test]
    fn pitch_is_exact(
        shape in prop_oneof![
            Just(Shape::Circle),
            (3u8..=12).prop_map(|sides| Shape::Polygon { sides }),
            (5.0f64..9.0).prop_map(|h| Shape::Rectangle { width: 10.0, height: h }),
        ],
        round in prop_oneof![Just(None), (0.0f64..0.8).prop_map(Some)],
        pitch in 0.15f64..0.6,
        turns in 2.0f64..6.0,
        samples in proptest::collection::vec((0.0f64..1.0, 0.0f64..1.0), 8),
    ) {
        let spec = SpiralSpec {
            shape,
            corner: round.map_or(Corner::Sharp, |radius| Corner::Round { radius }),
            pitch,
            inner: 4.0,
            turns,
        };
        pitch_holds(&spec, &samples)?;
    }

    /// The same for annular sectors (arcs about the ring's centre, slanted
    /// sides) whose corners are all concentric (the outline's corner radius
    /// at least half a pitch above the innermost turn's inset).
    #[test]
    fn sector_pitch_is_exact(
        count in 6u32..=12,
        inner_radius in 14.0f64..20.0,
        depth in 16.0f64..24.0,
        spacing in 0.2f64..0.5,
        extra in 0.0f64..1.0,
        pitch in 0.15f64..0.6,
        turns in 2u32..6,
        samples in proptest::collection::vec((0.0f64..1.0, 0.0f64..1.0), 8),
    ) {
        let outer_radius = inner_radius + depth;
        let rc = inner_radius + depth / 2.0;
        let half = PI / count as f64;
        let inset = (depth / 2.0).min(rc * half.sin() - spacing / 2.0 + pitch / 4.0) - 4.0;
        let spec = SpiralSpec {
            shape: Shape::Sector {
                count,
                inner_radius,
                outer_radius,
                spacing,
                corner_radius: inset + pitch / 2.0 + extra,
            },
            corner: Corner::Sharp,
            pitch,
            inner: 4.0,
            turns: turns as f64,
        };
        pitch_holds(&spec, &samples)?;
    }
}

/// Every sampled point of the spiral is at least a pitch from the turns
/// before and after it, and exactly a pitch from the next turn out.
fn pitch_holds(spec: &SpiralSpec, samples: &[(f64, f64)]) -> Result<(), TestCaseError> {
    let pitch = spec.pitch;
    let segs = spec.segments().unwrap();
    // Polar angle interval swept by each segment (cumulative, from the inner end).
    let mut acc = 0.0;
    let spans: Vec<(f64, f64)> = segs
        .iter()
        .map(|s| {
            let a = acc;
            acc += s.swept_about_origin();
            (a, acc)
        })
        .collect();
    for &(u, f) in samples {
        let i = ((u * segs.len() as f64) as usize).min(segs.len() - 1);
        let p = segs[i].point_at(f);
        let theta = spans[i].0 + f * (spans[i].1 - spans[i].0);
        let others: Vec<&Segment> = segs
            .iter()
            .zip(&spans)
            .filter(|(_, (a, b))| *b <= theta - PI / 2.0 || *a >= theta + PI / 2.0)
            .map(|(s, _)| s)
            .collect();
        let nearest = others
            .iter()
            .map(|s| s.distance(p))
            .fold(f64::INFINITY, f64::min);
        prop_assert!(nearest >= pitch - 1e-9, "closer than a pitch: {nearest}");
        // The next turn out is exactly one pitch away (looking inward
        // from a sharp outer corner the gap is wider, by design).
        if theta + TAU + 0.3 <= acc {
            let outward = segs
                .iter()
                .zip(&spans)
                .filter(|(_, (a, _))| *a >= theta + PI / 2.0)
                .map(|(s, _)| s.distance(p))
                .fold(f64::INFINITY, f64::min);
            prop_assert!(
                (outward - pitch).abs() < 1e-9,
                "pitch {outward} != {pitch} at {p:?}"
            );
        }
    }
    Ok(())
}

/// The circular spiral against the closed-form length of an Archimedean
/// spiral r = a + b theta: L = (1/(2b)) [r sqrt(r^2+b^2) + b^2 asinh(r/b)]
/// between the end radii (standard calculus result, e.g. Bronshtein &
/// Semendyayev, Handbook of Mathematics, arc length in polar coordinates).
/// The two-centre arc spiral has the same pitch; its length agrees to well
/// below 0.1 % for many turns.
#[test]
fn circle_length_matches_archimedean_spiral() {
    let (inner, pitch, turns) = (3.0, 0.25, 20.0);
    let segs = SpiralSpec {
        shape: Shape::Circle,
        corner: Corner::Sharp,
        pitch,
        inner,
        turns,
    }
    .segments()
    .unwrap();
    let ours: f64 = segs.iter().map(|s| s.length()).sum();
    let b = pitch / TAU;
    let f = |r: f64| (r * (r * r + b * b).sqrt() + b * b * (r / b).asinh()) / (2.0 * b);
    let archimedes = f(inner + pitch * turns) - f(inner);
    let rel = (ours - archimedes).abs() / archimedes;
    assert!(rel < 1e-3, "ours {ours} vs Archimedes {archimedes} ({rel})");
    // And the simple mean-circumference estimate, 2 pi r_mean N.
    let mean = TAU * (inner + pitch * turns / 2.0) * turns;
    assert!((ours - mean).abs() / mean < 1e-3);
}
