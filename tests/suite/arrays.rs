//! Many coils on one board: ring arrays built from the fan-stator example
//! with other pole counts and connections pass their own rule check (every
//! coil and bus, different nets kept apart by the clearance), every phase is
//! one unbroken chain from its pad "1" to its pad "2", and each coil is
//! passed in the sense the star of slots gives it. The same for rings of
//! sector coils (the gimbal-stator example), whose copper must also stay
//! in its slot of the annulus with the spacing to its neighbours. Grids of
//! coils (one phase along a serpentine, buses in the channels between
//! rows) pass the same rule check and make one chain through every coil.

use coilwright::geometry::{Node, TrackRole};
use coilwright::rules::{self, Profile};

const STATOR: &str = include_str!("../../examples/fan-stator.toml");

/// The example with `count` coils, `poles` poles and `connection`, on a ring
/// large enough for twelve coils.
fn variant(count: u32, poles: u32, connection: &str, neutral: bool) -> String {
    crate::common::poles_only(STATOR)
        .replace("count = 9", &format!("count = {count}"))
        .replace("poles = 6", &format!("poles = {poles}"))
        .replace(
            "connection = \"star\"",
            &format!("connection = \"{connection}\""),
        )
        .replace("neutral = true ", &format!("neutral = {neutral} "))
        .replace("outer_diameter = \"56mm\"", "outer_diameter = \"80mm\"")
        .replace("inner_diameter = \"26mm\" ", "inner_diameter = \"50mm\" ")
}

const VARIANTS: [(u32, u32, &str, bool); 6] = [
    (9, 6, "star", true),
    (9, 8, "delta", false),
    (9, 6, "separate", false),
    (12, 10, "star", true),
    (12, 14, "delta", false),
    (12, 10, "separate", false),
];

const SECTORS: &str = include_str!("../../examples/gimbal-stator.toml");

/// The sector example with `count` coils, `poles` poles, `connection` and
/// `layers`.
fn sector_variant(count: u32, poles: u32, connection: &str, neutral: bool, layers: u8) -> String {
    crate::common::poles_only(SECTORS)
        .replace("count = 12", &format!("count = {count}"))
        .replace("poles = 14", &format!("poles = {poles}"))
        .replace(
            "connection = \"star\"",
            &format!("connection = \"{connection}\""),
        )
        .replace("neutral = true ", &format!("neutral = {neutral} "))
        .replace("layers = 4 ", &format!("layers = {layers} "))
}

const SECTOR_VARIANTS: [(u32, u32, &str, bool, u8); 5] = [
    (12, 14, "star", true, 4),
    (9, 6, "star", false, 4),
    (9, 8, "delta", false, 6),
    (12, 10, "separate", false, 4),
    (6, 4, "star", true, 6),
];

/// Every variant's text: the round coils' and the sectors', with a label.
fn all_variants() -> Vec<(String, String, u32, &'static str, bool)> {
    let mut v: Vec<_> = VARIANTS
        .iter()
        .map(|&(q, p, c, n)| (format!("{q}/{p} {c}"), variant(q, p, c, n), q, c, n))
        .collect();
    v.extend(SECTOR_VARIANTS.iter().map(|&(q, p, c, n, l)| {
        (
            format!("sectors {q}/{p} {c} {l} layers"),
            sector_variant(q, p, c, n, l),
            q,
            c,
            n,
        )
    }));
    v
}

#[test]
fn stators_pass_their_own_rule_check() {
    let profile = Profile::builtin("standard").unwrap();
    for (label, text, q, c, n) in all_variants() {
        let (d, board) = coilwright::pipeline::parse_and_build(&text).unwrap();
        let v = rules::check(&d, &board, &profile);
        assert!(v.is_empty(), "{label}: {v:#?}");
        assert_eq!(board.coils.len(), q as usize);
        assert_eq!(board.phases.len(), 3);
        let terminals: Vec<String> = board
            .buses
            .iter()
            .filter_map(|b| b.terminal.clone())
            .collect();
        let want: &[&str] = match (c, n) {
            ("star", true) => &["A", "B", "C", "N"],
            ("star", false) | ("delta", _) => &["A", "B", "C"],
            _ => &["A1", "A2", "B1", "B2", "C1", "C2"],
        };
        assert_eq!(terminals, want, "{label}");
    }
}

#[test]
fn each_phase_is_one_chain_in_the_sense_of_its_coils() {
    for (label, text, ..) in all_variants() {
        let (_, board) = coilwright::pipeline::parse_and_build(&text).unwrap();
        for (ph, phase) in board.phases.iter().enumerate() {
            let view = board.phase_view(ph);
            // From pad "1" to pad "2", each winding starting where the
            // previous one ends, each track where the previous one ends
            // (within the 0.1 um slivers the view leaves out).
            assert_eq!(view.windings[0].from, Node::Pad(0));
            assert_eq!(view.windings.last().unwrap().to, Node::Pad(1));
            for w in view.windings.windows(2) {
                assert_eq!(w[0].to, w[1].from, "{label} phase {ph}");
            }
            for w in &view.windings {
                let ts = view.winding_tracks(w);
                assert!(ts[0].segment.start().distance(view.node_at(w.from)) < 1e-6);
                assert!(
                    ts.last()
                        .unwrap()
                        .segment
                        .end()
                        .distance(view.node_at(w.to))
                        < 1e-6
                );
                for t in ts.windows(2) {
                    assert!(t[0].segment.end().distance(t[1].segment.start()) < 1e-3);
                }
            }
            // The circulation about each coil's own axis: as built
            // (clockwise seen from the top) for sense +1, reversed for -1.
            for &(k, sense) in &phase.coils {
                let axis = board.coils[k].position;
                let swept: f64 = view
                    .tracks
                    .iter()
                    .filter(|t| t.role == TrackRole::Winding)
                    .filter(|t| t.segment.start().distance(axis) < 6.0)
                    .map(|t| {
                        let (a, b) = (
                            t.segment.start() - axis.to_vec2(),
                            t.segment.end() - axis.to_vec2(),
                        );
                        let (a, b) = (a.to_vec2(), b.to_vec2());
                        let mid = t.segment.point_at(0.5).to_vec2() - axis.to_vec2();
                        coilwright::geometry::angle_between(a, mid)
                            + coilwright::geometry::angle_between(mid, b)
                    })
                    .sum();
                assert!(
                    swept * -sense > 0.0,
                    "{label}: coil {k} sense {sense} sweeps {swept}"
                );
            }
        }
    }
}

#[test]
fn twelve_coils_ten_poles_reverse_half_the_coils() {
    let (_, board) =
        coilwright::pipeline::parse_and_build(&variant(12, 10, "star", false)).unwrap();
    let negative = board
        .phases
        .iter()
        .flat_map(|p| &p.coils)
        .filter(|c| c.1 < 0.0)
        .count();
    assert_eq!(negative, 6);
    // Winding factor of 12/10 (checked against the textbook closed form in
    // design::winding).
    assert!((board.winding_factor.unwrap() - 0.9330).abs() < 1e-4);
}

#[test]
fn every_phase_heats_the_board() {
    // The board's heat balance counts every phase's loss: its electrical
    // power is the phases times one phase's, and it equals the heat the
    // board sheds at its steady temperature.
    let (d, board) = coilwright::pipeline::parse_and_build(STATOR).unwrap();
    let a = coilwright::physics::analyse(&d, &board).unwrap();
    let t = &a.thermal;
    assert!((t.power_w / (3.0 * t.current_a * t.voltage_v) - 1.0).abs() < 1e-12);
    let avg = t.temperature_board_c.unwrap();
    let shed = t.board.losses(avg).power_w;
    assert!(
        (shed / t.power_w - 1.0).abs() < 1e-6,
        "{shed} {}",
        t.power_w
    );
    // A slow balanced sine: sin^2 x + sin^2 (x - 120) + sin^2 (x - 240)
    // = 3/2 at every instant, so the board's temperature does not ripple
    // although each phase's loss swings fully every half period.
    let slow = STATOR.replace(
        "frequency = \"150Hz\"",
        "waveform = \"sine\"\nfrequency = \"0.002Hz\"",
    );
    let (d, board) = coilwright::pipeline::parse_and_build(&slow).unwrap();
    let a = coilwright::physics::analyse(&d, &board).unwrap();
    let ripple = a.heating.ripple_k;
    assert!(ripple < 1e-6 * (a.thermal.operating_c - 30.0), "{ripple}");
}

#[test]
fn phase_mutual_inductance_is_the_series_excess() {
    // Two phases in series store L_A + L_B + 2 M: the mutual inductance of
    // the report equals half the excess of the pair's Neumann inductance
    // (one filament list) over the two alone (energy identity).
    use coilwright::physics::conductor::Conductor;
    use coilwright::physics::inductance::{NEUMANN_SAGITTA, filaments_inductance};
    let (d, board) = coilwright::pipeline::parse_and_build(STATOR).unwrap();
    let a = coilwright::physics::analyse(&d, &board).unwrap();
    let r = a.array.as_ref().unwrap();
    assert_eq!(r.mutual_inductance.len(), 3);
    let fa = Conductor::of_phase(&d, &board, 0).filaments(NEUMANN_SAGITTA);
    let fb = Conductor::of_phase(&d, &board, 1).filaments(NEUMANN_SAGITTA);
    let both: Vec<_> = fa.iter().chain(&fb).cloned().collect();
    let (la, lb) = (filaments_inductance(&fa), filaments_inductance(&fb));
    let m = (filaments_inductance(&both) - la - lb) / 2.0;
    let ab = &r.mutual_inductance[0];
    assert_eq!(ab.phases, ["A".to_string(), "B".to_string()]);
    assert!(
        (ab.mutual_inductance_h / m - 1.0).abs() < 1e-9,
        "{} {m}",
        ab.mutual_inductance_h
    );
    assert!((ab.coupling - m / (la * lb).sqrt()).abs() < 1e-9);
    // Phase A's own inductance is the report's.
    assert!((r.phases[0].inductance_h.unwrap() / a.inductance.inductance_h - 1.0).abs() < 1e-12);
}

#[test]
fn grids_pass_their_own_rule_check_and_chain_every_coil() {
    let profile = Profile::builtin("standard").unwrap();
    for (rows, columns) in [(1, 3), (2, 2), (3, 4), (4, 3)] {
        let text = crate::common::grid(rows, columns, "14mm", "17mm");
        let (d, board) = coilwright::pipeline::parse_and_build(&text).unwrap();
        let v = rules::check(&d, &board, &profile);
        assert!(v.is_empty(), "{rows}x{columns}: {v:#?}");
        let n = (rows * columns) as usize;
        assert_eq!(board.coils.len(), n);
        assert_eq!(board.phases.len(), 1);
        assert_eq!(board.phases[0].coils.len(), n);
        let terminals: Vec<String> = board
            .buses
            .iter()
            .filter_map(|b| b.terminal.clone())
            .collect();
        assert_eq!(terminals, ["A1", "A2"]);
        // Consecutive coils of the chain are neighbours on the grid.
        for w in board.phases[0].coils.windows(2) {
            let (a, b) = (board.coils[w[0].0].position, board.coils[w[1].0].position);
            let d = a.distance(b);
            assert!((d - 14.0).abs() < 1e-9 || (d - 17.0).abs() < 1e-9, "{d}");
        }
        // One unbroken chain from pad "1" to pad "2".
        let view = board.phase_view(0);
        assert_eq!(view.windings[0].from, Node::Pad(0));
        assert_eq!(view.windings.last().unwrap().to, Node::Pad(1));
        for w in view.windings.windows(2) {
            assert_eq!(w[0].to, w[1].from, "{rows}x{columns}");
        }
        // The outline holds every copper edge.
        let (o, c) = (board.outline_bounds(), board.copper_bounds());
        assert!(o.min.x < c.min.x && o.min.y < c.min.y && o.max.x > c.max.x && o.max.y > c.max.y);
        // The phase's resistance is the coils' and its buses'.
        let a = coilwright::physics::analyse(&d, &board).unwrap();
        let r = a.array.as_ref().unwrap();
        let single = coilwright::geometry::build(&d).unwrap();
        let one = coilwright::physics::array::tracks_resistance(
            &coilwright::physics::conductor::Conductor::new(&d, &single),
        );
        assert!(r.phases[0].tracks_ohm_20c > n as f64 * one);
        assert!(r.phases[0].tracks_ohm_20c < n as f64 * one * 1.2);
    }
}
/// Sector coils fill their slot: every winding track's copper lies in the
/// annulus (the outermost turn touching its outer edge), every piece of a
/// coil's copper (tracks, vias, pads) keeps half the spacing inside the
/// rays bounding its slot (so neighbours are the spacing apart), and the
/// arcs of the winding are concentric with the ring.
#[test]
fn sectors_fill_their_slots_and_keep_the_spacing() {
    for &(q, p, c, n, l) in &SECTOR_VARIANTS {
        let (d, board) =
            coilwright::pipeline::parse_and_build(&sector_variant(q, p, c, n, l)).unwrap();
        let (ri, ro) = (12.0, 25.0);
        let (half, gap) = (std::f64::consts::PI / q as f64, 0.3);
        let w = d.coil.trace_width;
        let mut reach = 0.0f64;
        for coil in &board.coils {
            // In the slot's frame: the slot's bisector on +x.
            let turn = -coil.rotation;
            let side = |left: bool| {
                coilwright::geometry::Vec2::new(
                    -half.sin(),
                    if left { half.cos() } else { -half.cos() },
                )
            };
            for t in &board.tracks[coil.tracks.clone()] {
                let seg = t.segment.rotated(turn);
                for left in [true, false] {
                    let beyond = seg.support(side(left)) + t.width / 2.0;
                    assert!(
                        beyond <= -gap / 2.0 + 1e-9,
                        "{q}/{p}: track {beyond} past its slot"
                    );
                }
                if t.role == TrackRole::Winding {
                    assert!(seg.min_radius() - w / 2.0 >= ri - 1e-9);
                    assert!(seg.max_radius() + w / 2.0 <= ro + 1e-9);
                    reach = reach.max(seg.max_radius() + w / 2.0);
                    if let coilwright::geometry::Segment::Arc(a) = seg
                        && a.radius() > 5.0
                    {
                        assert!(a.center.distance(coilwright::geometry::Point::ORIGIN) < 1e-9);
                    }
                }
            }
            let round = board.vias[coil.vias.clone()]
                .iter()
                .map(|v| (v.at, v.diameter))
                .chain(
                    board.pads[coil.pads.clone()]
                        .iter()
                        .map(|p| (p.at, p.diameter)),
                );
            for (at, dia) in round {
                let at = at.rotated(turn).to_vec2();
                for left in [true, false] {
                    assert!(at.dot(side(left)) + dia / 2.0 <= -gap / 2.0 + 1e-9);
                }
            }
        }
        assert!(
            (reach - ro).abs() < 1e-6,
            "{q}/{p}: outermost copper at {reach}"
        );
    }
}

/// A sector coil's resistance is that of its copper walked independently
/// here (lines by their end points, arcs by radius x sweep) as a bar of
/// resistivity 1.7241e-8 ohm m (IEC 60028 annealed copper at 20 C) and
/// the track's cross-section.
#[test]
fn sector_coil_resistance_is_its_walked_copper() {
    use coilwright::geometry::Segment;
    let (d, board) = coilwright::pipeline::parse_and_build(SECTORS).unwrap();
    let a = coilwright::physics::analyse(&d, &board).unwrap();
    let t = 35e-6;
    let w = d.coil.trace_width * 1e-3;
    // Phase A starts at coil 1: its four layers follow the terminal's bus.
    let first = &board.coils[0];
    let rows = &a.resistance.layers[1..=4];
    for (row, wi) in rows.iter().zip(first.windings.clone()) {
        let winding = &board.windings[wi];
        assert_eq!(row.layer, winding.layer);
        let walked: f64 = board.tracks[winding.tracks.0..winding.tracks.1]
            .iter()
            .map(|t| match t.segment {
                Segment::Line(l) => (l.end.x - l.start.x).hypot(l.end.y - l.start.y),
                Segment::Arc(a) => {
                    a.sweep.abs() * (a.start.x - a.center.x).hypot(a.start.y - a.center.y)
                }
            })
            .sum();
        assert!(
            (row.length_mm / walked - 1.0).abs() < 1e-9,
            "{} {}",
            row.length_mm,
            walked
        );
        let r = 1.7241e-8 * walked * 1e-3 / (w * t);
        assert!(
            (row.resistance_ohm_20c / r - 1.0).abs() < 1e-6,
            "{} {r}",
            row.resistance_ohm_20c
        );
    }
}

/// Sectors fill the slot that a round coil leaves half empty: under the
/// same rotor, with the same track, clearance and layers and as many turns
/// as fit, the sector stator's phase links more flux (a larger back-EMF
/// constant) than a stator of the largest round coils that fit the same
/// ring.
#[test]
fn sectors_link_more_flux_than_round_coils_in_the_same_slots() {
    let emf = |text: &str| {
        let (d, board) = coilwright::pipeline::parse_and_build(text).ok()?;
        let a = coilwright::physics::analyse(&d, &board).ok()?;
        Some(a.rotor?.constants.back_emf_v_per_rad_s)
    };
    let sector = emf(SECTORS).unwrap();
    // The largest round coil (0.25 mm steps) whose copper, vias and pads
    // fit the annulus and keep the spacing.
    let round = (0..40)
        .map(|k| 14.0 - 0.25 * k as f64)
        .find_map(|od| {
            emf(&SECTORS
                .replace("shape = \"sector\"", "shape = \"circle\"")
                .replace(
                    "turns = \"max\"",
                    &format!("turns = \"max\"\nouter_diameter = {od}"),
                )
                .replace("corner_radius = \"1mm\"", ""))
        })
        .unwrap();
    assert!(sector > 1.3 * round, "sector {sector} round {round}");
}
