//! The copper of a board on every layer: tracks, vias, terminal pads, the
//! placed coils that own them, and the board outline. Produced by
//! [`super::build`]; consumed by the rule check, the physics and every
//! exporter (which translate it and never compute geometry of their own).

use super::{Point, Rect, Segment};
use crate::design::Wiring;
use serde::Serialize;
use std::ops::Range;

/// Net names of a coil built alone: where the current enters (terminal
/// "1" and all the coil's copper) and where it leaves (terminal "2").
pub const COIL_NETS: [&str; 2] = ["COIL_1", "COIL_2"];

/// What a track is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum TrackRole {
    /// Part of the spiral winding.
    Winding,
    /// A lead joining a winding end to a via or a terminal pad.
    Lead,
    /// A bus joining coils of an array, or a coil to a terminal.
    Bus,
}

/// One piece of copper track on one layer.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Track {
    /// Copper layer, 1 = top.
    pub layer: u8,
    /// Centre line (mm).
    pub segment: Segment,
    /// Track width, mm.
    pub width: f64,
    /// Winding or lead.
    pub role: TrackRole,
}

/// A plated through hole that joins windings on different layers.
///
/// Vias go through every layer of the board; they join copper only on the
/// layers in `joins` and must stay clear of copper on all the others.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Via {
    /// Centre, mm.
    pub at: Point,
    /// Finished hole diameter, mm.
    pub drill: f64,
    /// Pad (land) diameter, mm.
    pub diameter: f64,
    /// Layers (1 = top) whose copper this via joins, ascending.
    pub joins: Vec<u8>,
    /// In the free centre of the coil or outside the outermost turn.
    pub place: Place,
}

/// Where a via or pad sits relative to the winding.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Place {
    /// In the free centre, inside the innermost turn.
    Centre,
    /// Outside the outermost turn.
    Outside,
}

/// A terminal of the coil named "1" or "2": a plated through-hole pad, or a
/// surface pad (`smd`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Pad {
    /// Pad name/number: "1" where the current enters, "2" where it leaves.
    pub name: String,
    /// Centre, mm.
    pub at: Point,
    /// Finished hole diameter, mm.
    pub drill: f64,
    /// Pad diameter, mm.
    pub diameter: f64,
    /// Layers whose winding copper this pad joins.
    pub joins: Vec<u8>,
    /// In the centre (odd layer counts) or outside.
    pub place: Place,
    /// For a surface pad: its rectangle and face (then `drill` is 0, `joins`
    /// holds its one layer and `diameter` is the circle about its corners,
    /// which the clearance rules keep clear, conservatively).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub smd: Option<SmdLand>,
}

/// A rectangular surface pad.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SmdLand {
    /// Copper layer, 1 = top.
    pub layer: u8,
    /// Size across the lead, mm.
    pub width: f64,
    /// Size along the lead, mm.
    pub length: f64,
    /// Direction of the length (the lead), radians from +x.
    pub angle: f64,
}

impl SmdLand {
    /// The four corners about `at`, counter-clockwise.
    pub fn corners(&self, at: Point) -> [Point; 4] {
        let u = super::Vec2::from_angle(self.angle);
        let v = u.perp();
        let (a, b) = (u * (self.length / 2.0), v * (self.width / 2.0));
        [
            at + a * -1.0 + b * -1.0,
            at + a + b * -1.0,
            at + a + b,
            at + a * -1.0 + b,
        ]
    }
}

/// A node of the conductor: a terminal pad or a via (index into the layout).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", content = "index", rename_all = "snake_case")]
pub enum Node {
    /// `Board::pads[i]`.
    Pad(usize),
    /// `Board::vias[i]`.
    Via(usize),
}

/// Which way a winding runs from its start node to its end node.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Direction {
    /// From the outside towards the centre.
    Inward,
    /// From the centre towards the outside.
    Outward,
}

/// The copper of one layer between two nodes, in the order the current
/// flows (from `from` to `to`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Winding {
    /// Copper layer, 1 = top.
    pub layer: u8,
    /// Position in the series chain, 0 first. Windings with the same group
    /// are in parallel (parallel-pairs wiring).
    pub group: usize,
    /// Tracks of this layer: `Board::tracks[tracks.0 .. tracks.1]`, ordered
    /// along the current, each starting where the previous ends.
    pub tracks: (usize, usize),
    /// Node where the current enters.
    pub from: Node,
    /// Node where the current leaves.
    pub to: Node,
    /// Inward or outward.
    pub direction: Direction,
    /// Turns of the spiral part (leads excluded).
    pub turns: f64,
}

/// Which way a placed coil's current circulates seen from the top, relative
/// to a coil as [`super::build`] makes it (current entering at the first
/// net circulates clockwise seen from the top).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Sense {
    /// +1: as built.
    Positive,
    /// -1: the other way (mirrored copper, or the nets swapped).
    Negative,
}

impl Sense {
    /// +1.0 or -1.0.
    pub fn sign(self) -> f64 {
        match self {
            Sense::Positive => 1.0,
            Sense::Negative => -1.0,
        }
    }
}

/// One coil on the board: where it sits and which copper is its own.
///
/// A coil is built about the origin (its axis) and then placed: a point
/// `p` of the built coil lies at [`PlacedCoil::to_board`]`(p)` on the board.
/// Its tracks, vias, pads and windings are the index ranges below of the
/// board's lists (a coil's items are contiguous).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PlacedCoil {
    /// Position of the coil's axis on the board, mm.
    pub position: Point,
    /// Rotation about its axis, radians, counter-clockwise.
    pub rotation: f64,
    /// Circulation seen from the top.
    pub sense: Sense,
    /// Net names: where the current enters (terminal "1" and the coil's
    /// copper) and where it leaves (terminal "2").
    pub nets: [String; 2],
    /// Its tracks: `Board::tracks[tracks]`.
    pub tracks: Range<usize>,
    /// Its vias: `Board::vias[vias]`.
    pub vias: Range<usize>,
    /// Its terminal pads: `Board::pads[pads]` ("1" first, then "2").
    pub pads: Range<usize>,
    /// Its windings: `Board::windings[windings]`.
    pub windings: Range<usize>,
}

impl PlacedCoil {
    /// The board position of the point `local` of the coil as built about
    /// the origin: rotated by `rotation`, then moved to `position`.
    pub fn to_board(&self, local: Point) -> Point {
        self.position + local.rotated(self.rotation).to_vec2()
    }
}

/// The closed board outline (profile), mm.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Outline {
    /// Closed path: each segment starts where the previous ends, the last
    /// ends where the first starts.
    pub segments: Vec<Segment>,
}

/// The copper of every coil on the board, on every layer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Board {
    /// Design name.
    pub name: String,
    /// The coils on the board and the copper each owns (a design is one
    /// coil at the origin).
    pub coils: Vec<PlacedCoil>,
    /// Number of copper layers.
    pub layers: u8,
    /// Series or parallel-pairs.
    pub wiring: Wiring,
    /// Every track on every layer.
    pub tracks: Vec<Track>,
    /// Plated vias joining layers.
    pub vias: Vec<Via>,
    /// Terminal pads, each coil's "1" then "2" (one coil: `pads[0]` is "1",
    /// `pads[1]` is "2").
    pub pads: Vec<Pad>,
    /// One entry per layer, in the order the current visits them (parallel
    /// windings of a pair are consecutive and share a group).
    pub windings: Vec<Winding>,
    /// Board outline.
    pub outline: Outline,
    /// Track width, mm.
    pub trace_width: f64,
    /// Required gap between neighbouring turns, mm.
    pub clearance: f64,
    /// Centre-to-centre distance of neighbouring turns, mm.
    pub pitch: f64,
    /// Smallest distance of winding copper (edge) from the axis, mm.
    pub inner_radius: f64,
    /// Largest distance of winding copper (edge) from the axis, mm.
    pub outer_radius: f64,
    /// Turns per layer of the spiral part.
    pub turns: f64,
    /// The flex tail with its fingers, if the design has one.
    pub tail: Option<TailLayout>,
    /// An array's bus nets (empty for a coil alone).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub buses: Vec<Bus>,
    /// An array's phases (empty for a coil alone).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub phases: Vec<Phase>,
    /// An array's winding factor (with a rotor).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub winding_factor: Option<f64>,
}

/// One electrical node of an array between coils (a link from one coil's
/// end to the next coil's start, a star point, a delta corner, a phase's
/// terminal) and the bus copper that makes it. Copper of one bus may touch
/// itself; it keeps the clearance to everything else.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Bus {
    /// Net name: "A", "B", "C" (a phase's terminal, star connection; the
    /// delta corner that starts the phase), "A1"/"A2" (a phase's start and
    /// end, separate connection or one phase), "N" (the star point),
    /// "A_L1" ... (the links between a phase's coils).
    pub name: String,
    /// Its tracks: `Board::tracks[tracks]` (role [`TrackRole::Bus`]).
    pub tracks: Range<usize>,
    /// Its vias: `Board::vias[vias]`.
    pub vias: Range<usize>,
    /// Its windings (one per track): `Board::windings[windings]`.
    pub windings: Range<usize>,
    /// Pads it joins: coils' terminals, then its terminal pad (if any).
    pub pads: Vec<usize>,
    /// Name of its terminal pad, if brought out.
    pub terminal: Option<String>,
}

/// One phase of an array: its coils in the order the current passes them.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Phase {
    /// "A", "B" or "C".
    pub name: String,
    /// `(index into Board::coils, +1.0 or -1.0)`: the sense in which the
    /// phase current passes the coil (-1: it enters at the coil's pad "2").
    pub coils: Vec<(usize, f64)>,
    /// Indices into [`Board::buses`] of the buses that carry this phase's
    /// current alone (its terminal leads and links; a star point or delta
    /// corner shared with another phase is left out).
    pub buses: Vec<usize>,
    /// Pads where the phase current enters and leaves the phase's own
    /// copper (terminal pad, or the coil pad at a shared star point or
    /// delta corner).
    pub ends: [usize; 2],
}

/// A flex tail as built: the strip, its contact fingers (surface pads in
/// [`Board::pads`]: the terminals "1" and "2", then the spare fingers
/// "3" on) and the stiffener behind them.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TailLayout {
    /// Direction of the tail from the axis outward, radians from +x.
    pub angle: f64,
    /// Where the strip leaves the coil's board, along the axis from the
    /// origin, mm.
    pub root: f64,
    /// Where the strip ends, along the axis from the origin, mm.
    pub end: f64,
    /// Width of the strip, mm.
    pub width: f64,
    /// Indices into [`Board::pads`] of the fingers, across the tail in
    /// order.
    pub fingers: Vec<usize>,
    /// For each terminal pad brought to a finger: its index and the point
    /// where its lead turns onto the finger's line along the tail.
    pub lanes: Vec<(usize, Point)>,
    /// The stiffener's corners (counter-clockwise) behind the fingers on
    /// the other face, `None` when its thickness is 0.
    pub stiffener: Option<[Point; 4]>,
    /// Stiffener thickness, mm.
    pub stiffener_thickness: f64,
    /// Along-axis distance from the origin where the stiffened part
    /// starts (no bending beyond it), mm.
    pub stiff_from: f64,
}

impl Board {
    /// The coil that owns track `i`, if any.
    pub fn coil_of_track(&self, i: usize) -> Option<&PlacedCoil> {
        self.coils.iter().find(|c| c.tracks.contains(&i))
    }

    /// The coil that owns via `i`, if any.
    pub fn coil_of_via(&self, i: usize) -> Option<&PlacedCoil> {
        self.coils.iter().find(|c| c.vias.contains(&i))
    }

    /// Phase `ph` of an array alone, as a board of one conductor: the
    /// phase's coils and its own buses (see [`Phase::buses`]), every
    /// winding in the order the current passes it and every track along
    /// the current (a coil the phase passes in sense -1 is walked from its
    /// pad "2"), its pads and vias only, terminals "1" and "2" being
    /// [`Phase::ends`]. The physics of one coil then applies to the phase
    /// as it stands (resistance, inductance, field, force).
    ///
    /// # Panics
    /// If `ph` is not a phase of the board.
    pub fn phase_view(&self, ph: usize) -> Board {
        let phase = &self.phases[ph];
        // Legs: (winding index, walked backwards), in current order.
        let mut legs: Vec<(usize, bool)> = Vec::new();
        let mut at = Node::Pad(phase.ends[0]);
        let bus_walk = |legs: &mut Vec<(usize, bool)>, from: Node, to: Node| {
            for &b in &phase.buses {
                if let Some(path) = self.bus_path(b, from, to) {
                    legs.extend(path);
                    return;
                }
            }
        };
        for &(k, sense) in &phase.coils {
            let c = &self.coils[k];
            let (enter, leave) = if sense > 0.0 {
                (c.pads.start, c.pads.start + 1)
            } else {
                (c.pads.start + 1, c.pads.start)
            };
            bus_walk(&mut legs, at, Node::Pad(enter));
            let ws: Vec<usize> = c.windings.clone().collect();
            if sense > 0.0 {
                legs.extend(ws.iter().map(|&w| (w, false)));
            } else {
                legs.extend(ws.iter().rev().map(|&w| (w, true)));
            }
            at = Node::Pad(leave);
        }
        bus_walk(&mut legs, at, Node::Pad(phase.ends[1]));

        // Nodes kept, renumbered; the ends become pads "1" and "2".
        let mut pads: Vec<usize> = vec![phase.ends[0], phase.ends[1]];
        let mut vias: Vec<usize> = Vec::new();
        let mut keep = |n: Node| match n {
            Node::Pad(i) => Node::Pad(match pads.iter().position(|&p| p == i) {
                Some(j) => j,
                None => {
                    pads.push(i);
                    pads.len() - 1
                }
            }),
            Node::Via(i) => Node::Via(match vias.iter().position(|&v| v == i) {
                Some(j) => j,
                None => {
                    vias.push(i);
                    vias.len() - 1
                }
            }),
        };
        let mut tracks = Vec::new();
        let mut windings = Vec::new();
        let (mut group, mut last) = (0usize, None);
        for &(wi, back) in &legs {
            let w = &self.windings[wi];
            // A new group where the original one changes (parallel
            // windings of a pair stay together).
            let key = (self.coil_of_winding(wi), w.group);
            if last.is_some() && last != Some(key) {
                group += 1;
            }
            last = Some(key);
            let t0 = tracks.len();
            let ts = &self.tracks[w.tracks.0..w.tracks.1];
            // Slivers shorter than 0.1 um (where a spiral is cut at
            // its turn) are left out: moved off the origin they would be
            // filaments of no length to the physics.
            let kept = ts.iter().filter(|t| t.segment.length() > 1e-4);
            if back {
                tracks.extend(kept.rev().map(|t| Track {
                    segment: t.segment.reversed(),
                    ..*t
                }));
            } else {
                tracks.extend(kept.copied());
            }
            let (from, to) = if back { (w.to, w.from) } else { (w.from, w.to) };
            let direction = match (back, w.direction) {
                (false, d) => d,
                (true, Direction::Inward) => Direction::Outward,
                (true, Direction::Outward) => Direction::Inward,
            };
            windings.push(Winding {
                group,
                tracks: (t0, tracks.len()),
                from: keep(from),
                to: keep(to),
                direction,
                ..w.clone()
            });
        }
        let mut pads: Vec<Pad> = pads.iter().map(|&i| self.pads[i].clone()).collect();
        pads[0].name = "1".into();
        pads[1].name = "2".into();
        let vias: Vec<Via> = vias.iter().map(|&i| self.vias[i].clone()).collect();
        Board {
            name: format!("{}-{}", self.name, phase.name),
            coils: vec![],
            tracks,
            vias,
            pads,
            windings,
            buses: vec![],
            phases: vec![],
            ..self.clone()
        }
    }

    /// The coil that owns winding `i` (its index), if any.
    fn coil_of_winding(&self, i: usize) -> Option<usize> {
        self.coils.iter().position(|c| c.windings.contains(&i))
    }

    /// The windings of bus `b` from node `from` to node `to`, each with
    /// whether it is walked backwards; `None` if the bus does not join them.
    fn bus_path(&self, b: usize, from: Node, to: Node) -> Option<Vec<(usize, bool)>> {
        let ws: Vec<usize> = self.buses[b].windings.clone().collect();
        // Breadth-first over the bus's windings.
        let mut seen = vec![from];
        let mut queue = std::collections::VecDeque::from([(from, Vec::new())]);
        while let Some((n, path)) = queue.pop_front() {
            if n == to {
                return Some(path);
            }
            for &w in &ws {
                let wd = &self.windings[w];
                let next = if wd.from == n {
                    Some((wd.to, false))
                } else if wd.to == n {
                    Some((wd.from, true))
                } else {
                    None
                };
                if let Some((m, back)) = next
                    && !seen.contains(&m)
                {
                    seen.push(m);
                    let mut p: Vec<(usize, bool)> = path.clone();
                    p.push((w, back));
                    queue.push_back((m, p));
                }
            }
        }
        None
    }

    /// The bus (index into [`Board::buses`]) that owns track `i`, if any.
    pub fn bus_of_track(&self, i: usize) -> Option<usize> {
        self.buses.iter().position(|b| b.tracks.contains(&i))
    }

    /// The coil that owns pad `i`, if any.
    pub fn coil_of_pad(&self, i: usize) -> Option<&PlacedCoil> {
        self.coils.iter().find(|c| c.pads.contains(&i))
    }

    /// Tracks of one winding, in current order.
    pub fn winding_tracks(&self, w: &Winding) -> &[Track] {
        &self.tracks[w.tracks.0..w.tracks.1]
    }

    /// All tracks on `layer` (1 = top).
    pub fn tracks_on(&self, layer: u8) -> impl Iterator<Item = &Track> {
        self.tracks.iter().filter(move |t| t.layer == layer)
    }

    /// Position of a node.
    pub fn node_at(&self, n: Node) -> Point {
        match n {
            Node::Pad(i) => self.pads[i].at,
            Node::Via(i) => self.vias[i].at,
        }
    }

    /// Total centre-line length of copper tracks, mm (vias excluded).
    pub fn track_length(&self) -> f64 {
        self.tracks.iter().map(|t| t.segment.length()).sum()
    }

    /// Whether the board holds an array: more than one placed coil.
    pub fn is_array(&self) -> bool {
        self.coils.len() > 1
    }

    /// Axis-aligned bounds of all copper (track edges, pads, vias), mm.
    pub fn copper_bounds(&self) -> Rect {
        let tracks = self
            .tracks
            .iter()
            .map(|t| t.segment.bounding_box().inflate(t.width / 2.0));
        let vias = self
            .vias
            .iter()
            .map(|v| Rect::from_point(v.at).inflate(v.diameter / 2.0));
        let pads = self
            .pads
            .iter()
            .map(|p| Rect::from_point(p.at).inflate(p.diameter / 2.0));
        tracks
            .chain(vias)
            .chain(pads)
            .fold(Rect::EMPTY, Rect::union)
    }

    /// Axis-aligned bounds of the outline, mm.
    pub fn outline_bounds(&self) -> Rect {
        self.outline
            .segments
            .iter()
            .map(|s| s.bounding_box())
            .fold(Rect::EMPTY, Rect::union)
    }

    /// Signed angle the winding on `w` sweeps about the axis, radians
    /// (negative = clockwise seen from the top).
    pub fn circulation(&self, w: &Winding) -> f64 {
        self.winding_tracks(w)
            .iter()
            .filter(|t| t.role == TrackRole::Winding)
            .map(|t| t.segment.swept_about_origin())
            .sum()
    }
}

/// The nets of an array's board: one per bus (an electrical node between
/// coils, named as the bus: "A", "B", "C", "N", "A_L1" ...), net
/// numbers from 1 (as KiCad numbers them). A coil's copper is on the net of the bus at its pad "1";
/// its pad "2" is on the next bus's net, tied to it by the coil through the
/// net-tie terminals footprint, as for a coil alone.
pub struct ArrayNets {
    /// Net names, net `i + 1` first.
    pub names: Vec<String>,
    /// Net number of each track.
    pub track: Vec<usize>,
    /// KiCad-style net number of each via.
    pub via: Vec<usize>,
    /// Net number of each pad.
    pub pad: Vec<usize>,
}

impl Board {
    /// The nets of an array's board ([`ArrayNets`]); `None` for a coil
    /// alone.
    pub fn array_nets(&self) -> Option<ArrayNets> {
        let layout = self;
        if layout.buses.is_empty() {
            return None;
        }
        let names = layout.buses.iter().map(|b| b.name.clone()).collect();
        let mut pad = vec![0; layout.pads.len()];
        let mut track = vec![0; layout.tracks.len()];
        let mut via = vec![0; layout.vias.len()];
        for (b, bus) in layout.buses.iter().enumerate() {
            for &p in &bus.pads {
                pad[p] = b + 1;
            }
            track[bus.tracks.clone()].fill(b + 1);
            via[bus.vias.clone()].fill(b + 1);
        }
        for c in &layout.coils {
            let net = pad[c.pads.start];
            track[c.tracks.clone()].fill(net);
            via[c.vias.clone()].fill(net);
        }
        Some(ArrayNets {
            names,
            track,
            via,
            pad,
        })
    }
}
