//! Many coils on one board (`[array]`): copies of the built coil placed on
//! a ring, wired into phases by the star-of-slots pattern
//! ([`crate::design::winding`]), joined by buses and brought to one
//! terminal pad per phase end.
//!
//! Ring: coil `k` of `N` sits at the polar angle `k 2 pi / N` on the circle
//! midway through the annulus, turned so that its terminals (at the coil's
//! terminal angle) face outward. Its copper must lie in the annulus and
//! keep `spacing` from its neighbours (measured between the circles about
//! each axis that hold all of a coil's copper: conservative).
//!
//! Buses: every electrical node between coils (a link from one coil's end
//! to the next coil's start in a phase, a star point, a delta corner, a
//! phase's terminal) is a bus net. Its coil pads are joined by radial stubs
//! running outward on the *stub layer* to a via on the net's *lane*, a
//! circle outside the coils, where an arc on the *arc layer* joins the
//! vias of the net. The two layers are the first two copper layers that
//! the coil's terminals do not use (so the stubs meet no coil copper at a
//! pad); lanes are handed out greedily so that arcs (with their end vias)
//! on one lane never overlap in angle. A net that ends at a terminal has
//! its first stub carried on past every lane to a terminal pad.
//!
//! Every bus track is a [`Winding`] of its own between two nodes (pads or
//! vias), role [`TrackRole::Bus`], so the rule check knows where it is
//! joined; its net is [`Board::buses`]`[i]`, and copper of one bus net may
//! touch itself.
//!
//! # Units
//! Millimetres and radians.

use super::board::{Board, Bus, Direction, Node, Outline, Pad, Phase, Place, PlacedCoil, Sense};
use super::board::{Track, TrackRole, Via, Winding};
use super::spiral::{SectorOutline, shifted};
use super::{Arc, Point, Segment};
use crate::design::winding::{PHASE_NAMES, pattern};
use crate::design::{Arrangement, Connection, Design};
use std::f64::consts::{PI, TAU};

/// Why an array cannot be built.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ArrayError {
    /// A coil's copper reaches beyond the annulus.
    #[error(
        "each coil's copper reaches {reach:.3} mm from its axis but the annulus leaves {room:.3} mm: {over:.3} mm too wide"
    )]
    Annulus {
        /// Reach of the coil's copper from its axis, mm.
        reach: f64,
        /// Half the width of the annulus, mm.
        room: f64,
        /// By how much, mm.
        over: f64,
    },
    /// Neighbouring coils overlap or come closer than the spacing.
    #[error(
        "neighbouring coils are {gap:.3} mm apart (copper to copper, by the circles that hold them), {need:.3} mm needed: {short:.3} mm short"
    )]
    Overlap {
        /// Gap, mm (negative: overlap).
        gap: f64,
        /// Spacing needed, mm.
        need: f64,
        /// By how much, mm.
        short: f64,
    },
    /// No two free layers for the buses.
    #[error(
        "the buses need two copper layers that the coil's terminals do not use; this coil's terminals use {used:?} of {layers}"
    )]
    BusLayers {
        /// Layers the coil's terminals join.
        used: Vec<u8>,
        /// Copper layers.
        layers: u8,
    },
    /// Neighbouring coils of a grid overlap or come closer than the
    /// spacing (the coil's clearance) along one axis.
    #[error(
        "{axis} = {pitch:.3} mm leaves {gap:.3} mm between neighbouring coils (copper to copper, by the circles that hold them), {need:.3} mm needed: {short:.3} mm short"
    )]
    GridPitch {
        /// "pitch_x" or "pitch_y".
        axis: &'static str,
        /// The pitch, mm.
        pitch: f64,
        /// Gap, mm.
        gap: f64,
        /// Clearance needed, mm.
        need: f64,
        /// By how much, mm.
        short: f64,
    },
    /// A grid's buses do not fit between its rows.
    #[error(
        "the buses below row {row} need {need:.3} mm between the rows' copper but pitch_y leaves {room:.3} mm: {short:.3} mm short"
    )]
    GridChannel {
        /// Row (from 1 at the bottom).
        row: usize,
        /// Height the buses need, mm.
        need: f64,
        /// Height between the rows' copper, mm.
        room: f64,
        /// By how much, mm.
        short: f64,
    },
    /// A grid wired as more than one phase.
    #[error("a grid is wired as one phase, every coil in series; phases = {phases} needs a ring")]
    GridPhases {
        /// The design's phases.
        phases: u32,
    },
    /// A tail with an array.
    #[error("a tail carries one coil's terminals; an array has its own terminal pads")]
    Tail,
    /// A pole count that gives no balanced winding (checked when reading).
    #[error("no balanced winding for this coil and pole count")]
    Unbalanced,
}

/// Places the copies of `single` (a coil built at the origin) that the
/// design's `[array]` asks for, with their buses and terminals.
pub fn place(design: &Design, single: Board) -> Result<Board, ArrayError> {
    let Some(array) = design.array else {
        return Ok(single);
    };
    if design.tail.is_some() {
        return Err(ArrayError::Tail);
    }
    let (count, inner_diameter, outer_diameter, spacing) = match array.arrangement {
        Arrangement::Ring {
            count,
            inner_diameter,
            outer_diameter,
            spacing,
        } => (count, inner_diameter, outer_diameter, spacing),
        Arrangement::Grid {
            rows,
            columns,
            pitch_x,
            pitch_y,
        } => {
            let grid = Grid {
                rows: rows as usize,
                columns: columns as usize,
                pitch: (pitch_x, pitch_y),
            };
            return grid.place(design, single);
        }
    };
    let pat = pattern(count, array.phases, design.rotor.map(|r| r.poles))
        .map_err(|_| ArrayError::Unbalanced)?;
    let reach = coil_reach(&single);
    let room = (outer_diameter - inner_diameter) / 4.0;
    let radius = (outer_diameter + inner_diameter) / 4.0;
    let n = count as usize;
    let need = spacing.unwrap_or(design.coil.clearance);
    let sector = SectorOutline::of(&design.coil.shape);
    if let Some(g) = &sector {
        // A sector's winding fills its slot by construction (the fit keeps
        // it inside the outline); its outer vias and pads stand beyond the
        // outer arc. Measure how close all its copper comes to each side.
        let gap = slot_margin(&single, g, true) + slot_margin(&single, g, false);
        if gap < need - 1e-9 {
            return Err(ArrayError::Overlap {
                gap,
                need,
                short: need - gap,
            });
        }
    } else if reach > room + 1e-9 {
        return Err(ArrayError::Annulus {
            reach,
            room,
            over: reach - room,
        });
    }
    let gap = 2.0 * radius * (PI / n as f64).sin() - 2.0 * reach;
    if sector.is_none() && gap < need - 1e-9 {
        return Err(ArrayError::Overlap {
            gap,
            need,
            short: need - gap,
        });
    }
    let (stub_layer, arc_layer) = bus_layers(&single)?;

    let mut board = emptied(&single);
    let a0 = design.terminal_place.angle();
    for (k, &(ph, sense)) in pat.coils.iter().enumerate() {
        let theta = TAU * k as f64 / n as f64;
        let coil = PlacedCoil {
            position: Point::polar(radius, theta),
            rotation: theta - a0,
            sense: if sense > 0.0 {
                Sense::Positive
            } else {
                Sense::Negative
            },
            nets: [
                format!("{}_{}", PHASE_NAMES[ph], k + 1),
                format!("{}_{}", PHASE_NAMES[ph], k + 1),
            ],
            tracks: 0..0,
            vias: 0..0,
            pads: 0..0,
            windings: 0..0,
        };
        copy_coil(&mut board, &single, coil, k);
    }

    // The circuit: each phase's coils in ring order, in series.
    let phases: Vec<Vec<(usize, f64)>> = (0..pat.phases)
        .map(|ph| {
            pat.coils
                .iter()
                .enumerate()
                .filter(|(_, c)| c.0 == ph)
                .map(|(k, c)| (k, c.1))
                .collect()
        })
        .collect();
    let (nets, ends) = circuit(&board, &phases, array.connection, array.neutral);
    let router = Router {
        // Circles and polygons: the circle about each axis that holds its
        // copper, outermost point; sectors (far from round): measured.
        centre_reach: if sector.is_some() {
            coil_reach(&board)
        } else {
            radius + reach
        },
        stub_layer,
        arc_layer,
        width: design.coil.trace_width,
        clearance: design.coil.clearance,
        via: (design.via.drill, design.via.diameter),
        terminal: (design.terminal.drill, design.terminal.diameter),
    };
    router.route(&mut board, &nets);
    board.phases = phases
        .iter()
        .enumerate()
        .map(|(ph, coils)| phase(&board, &nets, ends[ph], ph, coils))
        .collect();
    board.winding_factor = pat.winding_factor;
    board.outline = disc_outline(&board, design.board.margin);
    Ok(board)
}

/// A grid of coils: `rows` x `columns` copies `pitch` (x, y) apart,
/// centred on the origin, each turned so that its terminals face down
/// (-y), wired in series along a serpentine (row 0 at the bottom left to
/// right, row 1 right to left ...).
///
/// Buses run in the channel below each row: a stub on the stub layer from
/// each coil pad straight down to a via on a lane (a horizontal line below
/// the row's copper), lines on the arc layer along the lane; a link
/// between two rows runs out along its lane beyond the grid's side (right
/// after an even row, left after an odd one), up on the arc layer beside
/// the grid into the next channel and along that channel's lane. The phase
/// ends come out to terminal pads beyond the grid's side on their lanes.
struct Grid {
    rows: usize,
    columns: usize,
    pitch: (f64, f64),
}

impl Grid {
    /// Row and column of the `k`-th coil along the serpentine.
    fn cell(&self, k: usize) -> (usize, usize) {
        let r = k / self.columns;
        let c = k % self.columns;
        (
            r,
            if r.is_multiple_of(2) {
                c
            } else {
                self.columns - 1 - c
            },
        )
    }

    /// Centre of the coil in row `r`, column `c`, mm.
    fn centre(&self, r: usize, c: usize) -> Point {
        Point::new(
            (c as f64 - (self.columns - 1) as f64 / 2.0) * self.pitch.0,
            (r as f64 - (self.rows - 1) as f64 / 2.0) * self.pitch.1,
        )
    }

    fn place(&self, design: &Design, single: Board) -> Result<Board, ArrayError> {
        let array = design.array.expect("a grid is an array");
        if array.phases > 1 {
            return Err(ArrayError::GridPhases {
                phases: array.phases,
            });
        }
        let reach = coil_reach(&single);
        let need = design.coil.clearance;
        for (axis, pitch, n) in [
            ("pitch_x", self.pitch.0, self.columns),
            ("pitch_y", self.pitch.1, self.rows),
        ] {
            let gap = pitch - 2.0 * reach;
            if n > 1 && gap < need - 1e-9 {
                return Err(ArrayError::GridPitch {
                    axis,
                    pitch,
                    gap,
                    need,
                    short: need - gap,
                });
            }
        }
        let (stub_layer, arc_layer) = bus_layers(&single)?;
        let mut board = emptied(&single);
        let a0 = design.terminal_place.angle();
        let n = self.rows * self.columns;
        for k in 0..n {
            let (r, c) = self.cell(k);
            let coil = PlacedCoil {
                position: self.centre(r, c),
                rotation: -PI / 2.0 - a0,
                sense: Sense::Positive,
                nets: [format!("A_{}", k + 1), format!("A_{}", k + 1)],
                tracks: 0..0,
                vias: 0..0,
                pads: 0..0,
                windings: 0..0,
            };
            copy_coil(&mut board, &single, coil, k);
        }
        let phases = vec![(0..n).map(|k| (k, 1.0)).collect::<Vec<_>>()];
        let (nets, ends) = circuit(&board, &phases, array.connection, array.neutral);
        let router = GridRouter {
            grid: self,
            reach,
            stub_layer,
            arc_layer,
            width: design.coil.trace_width,
            clearance: design.coil.clearance,
            via: (design.via.drill, design.via.diameter),
            terminal: (design.terminal.drill, design.terminal.diameter),
        };
        router.route(&mut board, &nets)?;
        board.phases = vec![phase(&board, &nets, ends[0], 0, &phases[0])];
        board.winding_factor = None;
        board.outline = rect_outline(&board, design.board.margin);
        Ok(board)
    }
}

/// Routes the bus nets of a [`Grid`].
struct GridRouter<'a> {
    grid: &'a Grid,
    /// Reach of a coil's copper from its axis, mm.
    reach: f64,
    stub_layer: u8,
    arc_layer: u8,
    width: f64,
    clearance: f64,
    via: (f64, f64),
    terminal: (f64, f64),
}

impl GridRouter<'_> {
    /// Distance between neighbouring lanes (and side runs), mm.
    fn pitch(&self) -> f64 {
        self.width.max(self.via.1) + self.clearance
    }

    /// Height of lane `j` below row `r`, mm.
    fn lane(&self, r: usize, j: usize) -> f64 {
        self.grid.centre(r, 0).y
            - self.reach
            - self.clearance
            - self.width.max(self.via.1) / 2.0
            - j as f64 * self.pitch()
    }

    /// Where side runs go up beside the grid (`right`), mm.
    fn side(&self, right: bool) -> f64 {
        let x = self.grid.centre(0, self.grid.columns - 1).x
            + self.reach
            + self.clearance
            + self.width.max(self.via.1) / 2.0;
        if right { x } else { -x }
    }

    /// Where a terminal pad sits beside the grid (`right`), mm.
    fn terminal_x(&self, right: bool) -> f64 {
        let x = self.side(true) + self.pitch() + self.terminal.1 / 2.0;
        if right { x } else { -x }
    }

    fn route(&self, board: &mut Board, nets: &[Net]) -> Result<(), ArrayError> {
        let row_of = |board: &Board, p: usize| {
            let k = board
                .coils
                .iter()
                .position(|c| c.pads.contains(&p))
                .expect("a bus pad is a coil's");
            self.grid.cell(k).0
        };
        // Each net's pads per row, with the x span its lane covers there
        // (out to the side for a link between rows or a terminal).
        struct Run {
            net: usize,
            row: usize,
            pads: Vec<usize>,
            lo: f64,
            hi: f64,
        }
        let mut runs: Vec<Run> = Vec::new();
        for (i, net) in nets.iter().enumerate() {
            let mut rows: Vec<usize> = net.pads.iter().map(|&p| row_of(board, p)).collect();
            rows.sort_unstable();
            rows.dedup();
            for &r in &rows {
                let pads: Vec<usize> = net
                    .pads
                    .iter()
                    .copied()
                    .filter(|&p| row_of(board, p) == r)
                    .collect();
                let xs = pads.iter().map(|&p| board.pads[p].at.x);
                let (mut lo, mut hi) = xs.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| {
                    (a.min(x), b.max(x))
                });
                if rows.len() > 1 {
                    // A link from row r to r + 1 goes up on the side
                    // where row r ends.
                    let right = rows[0].is_multiple_of(2);
                    let x = self.side(right);
                    (lo, hi) = (lo.min(x), hi.max(x));
                }
                if net.terminal.is_some() {
                    let x = self.terminal_x(hi > 0.0);
                    (lo, hi) = (lo.min(x), hi.max(x));
                }
                runs.push(Run {
                    net: i,
                    row: r,
                    pads,
                    lo,
                    hi,
                });
            }
        }
        // Lanes per row, longest runs first.
        let pad = self.via.1 / 2.0 + self.clearance + self.width.max(self.via.1) / 2.0;
        let mut order: Vec<usize> = (0..runs.len()).collect();
        order.sort_by(|&a, &b| (runs[b].hi - runs[b].lo).total_cmp(&(runs[a].hi - runs[a].lo)));
        let mut lanes: Vec<Vec<Vec<(f64, f64)>>> = vec![Vec::new(); self.grid.rows];
        let mut lane_of = vec![0; runs.len()];
        for &i in &order {
            let run = &runs[i];
            let taken = &mut lanes[run.row];
            let j = (0..)
                .find(|&j| {
                    taken.get(j).is_none_or(|spans: &Vec<(f64, f64)>| {
                        spans
                            .iter()
                            .all(|&(a, b)| run.hi + pad <= a || b + pad <= run.lo)
                    })
                })
                .unwrap_or(0);
            if taken.len() <= j {
                taken.resize(j + 1, Vec::new());
            }
            taken[j].push((run.lo, run.hi));
            lane_of[i] = j;
        }
        // Every channel holds its lanes (and a terminal pad) above the
        // copper of the row below.
        for (r, row) in lanes.iter().enumerate().skip(1) {
            let used = row.len();
            if used == 0 {
                continue;
            }
            let lowest = self.lane(r, used - 1) - self.width.max(self.via.1) / 2.0 - self.clearance;
            let floor = self.grid.centre(r - 1, 0).y + self.reach;
            if lowest < floor - 1e-9 {
                let room = self.grid.centre(r, 0).y - self.reach - floor;
                let need = room + floor - lowest;
                return Err(ArrayError::GridChannel {
                    row: r + 1,
                    need,
                    room,
                    short: need - room,
                });
            }
        }
        for (i, net) in nets.iter().enumerate() {
            let bus = board.buses.len();
            let (t0, v0, w0) = (board.tracks.len(), board.vias.len(), board.windings.len());
            let mut pads = net.pads.clone();
            // Per row: vias under the pads, joined along the lane; the
            // first via of each row run is where side runs and terminals
            // attach (the via nearest the side).
            let mut ends: Vec<(usize, usize, f64)> = Vec::new(); // (row, via at the side, lane y)
            for (ri, run) in runs.iter().enumerate().filter(|(_, r)| r.net == i) {
                let y = self.lane(run.row, lane_of[ri]);
                let mut vias: Vec<usize> = Vec::new();
                let mut at: Vec<usize> = run.pads.clone();
                at.sort_by(|&a, &b| board.pads[a].at.x.total_cmp(&board.pads[b].at.x));
                for &p in &at {
                    let v = board.vias.len();
                    board.vias.push(Via {
                        at: Point::new(board.pads[p].at.x, y),
                        drill: self.via.0,
                        diameter: self.via.1,
                        joins: vec![self.stub_layer, self.arc_layer],
                        place: Place::Outside,
                    });
                    let seg = Segment::line(board.pads[p].at, board.vias[v].at);
                    self.path(
                        board,
                        vec![seg],
                        self.stub_layer,
                        Node::Pad(p),
                        Node::Via(v),
                    );
                    vias.push(v);
                }
                for w in vias.windows(2) {
                    let seg = Segment::line(board.vias[w[0]].at, board.vias[w[1]].at);
                    self.path(
                        board,
                        vec![seg],
                        self.arc_layer,
                        Node::Via(w[0]),
                        Node::Via(w[1]),
                    );
                }
                // The via on the side the run reaches out to.
                let right = run.hi > board.vias[vias[vias.len() - 1]].at.x + 1e-9;
                let side = if right { vias[vias.len() - 1] } else { vias[0] };
                ends.push((run.row, side, y));
            }
            // A link between rows: out to the side, up, and in.
            if let [(r0, a, ya), (_, b, yb)] = ends[..] {
                let x = self.side(r0.is_multiple_of(2));
                let (pa, pb) = (board.vias[a].at, board.vias[b].at);
                let segs = vec![
                    Segment::line(pa, Point::new(x, ya)),
                    Segment::line(Point::new(x, ya), Point::new(x, yb)),
                    Segment::line(Point::new(x, yb), pb),
                ];
                self.path(board, segs, self.arc_layer, Node::Via(a), Node::Via(b));
            }
            if let Some(name) = &net.terminal {
                let (_, v, y) = ends[0];
                let from = board.vias[v].at;
                let t = board.pads.len();
                board.pads.push(Pad {
                    name: name.clone(),
                    at: Point::new(self.terminal_x(from.x > 0.0), y),
                    drill: self.terminal.0,
                    diameter: self.terminal.1,
                    joins: vec![self.arc_layer],
                    place: Place::Outside,
                    smd: None,
                });
                let seg = Segment::line(from, board.pads[t].at);
                self.path(board, vec![seg], self.arc_layer, Node::Via(v), Node::Pad(t));
                pads.push(t);
            }
            close_bus(board, net, self.stub_layer, (t0, v0, w0), pads);
            debug_assert_eq!(bus + 1, board.buses.len());
        }
        Ok(())
    }

    /// Bus tracks `segs` on `layer` as one winding from `a` to `b`.
    fn path(&self, board: &mut Board, segs: Vec<Segment>, layer: u8, a: Node, b: Node) {
        bus_winding(board, segs, self.width, layer, (a, b));
    }
}

/// A rectangle holding every copper edge with the margin.
fn rect_outline(board: &Board, margin: f64) -> Outline {
    let b = board.copper_bounds().inflate(margin);
    let c = [
        b.min,
        Point::new(b.max.x, b.min.y),
        b.max,
        Point::new(b.min.x, b.max.y),
    ];
    Outline {
        segments: (0..4)
            .map(|i| Segment::line(c[i], c[(i + 1) % 4]))
            .collect(),
    }
}

/// A board with the settings of `single` (layers, sizes, nets) and none of
/// its copper or outline, to place copies of it on.
fn emptied(single: &Board) -> Board {
    Board {
        coils: vec![],
        tracks: vec![],
        vias: vec![],
        pads: vec![],
        windings: vec![],
        outline: Outline { segments: vec![] },
        ..single.clone()
    }
}

/// How far a coil built at the origin reaches from its axis: the largest
/// distance of any copper edge (tracks, vias, pads), mm.
fn coil_reach(b: &Board) -> f64 {
    b.tracks
        .iter()
        .map(|t| t.segment.max_radius() + t.width / 2.0)
        .chain(b.vias.iter().map(|v| v.at.radius() + v.diameter / 2.0))
        .chain(b.pads.iter().map(|p| p.at.radius() + p.diameter / 2.0))
        .fold(0.0, f64::max)
}

/// How far all copper of a sector coil built at the origin (tracks, vias,
/// pads, with their widths) stays inside the ray bounding its slot on one
/// side (`left`: +y), mm: half the copper gap to the neighbour there.
fn slot_margin(b: &Board, g: &SectorOutline, left: bool) -> f64 {
    let n = g.normal(left);
    let shift = Point::ORIGIN - g.centre;
    let beyond = |p: Point| n.dot(p - g.centre);
    let reach = b
        .tracks
        .iter()
        .map(|t| shifted(&t.segment, shift).support(n) + t.width / 2.0)
        .chain(b.vias.iter().map(|v| beyond(v.at) + v.diameter / 2.0))
        .chain(b.pads.iter().map(|p| beyond(p.at) + p.diameter / 2.0))
        .fold(f64::NEG_INFINITY, f64::max);
    -reach
}

/// The stub and arc layers: the first two layers the coil's terminals do
/// not join.
fn bus_layers(single: &Board) -> Result<(u8, u8), ArrayError> {
    let mut used: Vec<u8> = single
        .pads
        .iter()
        .flat_map(|p| p.joins.iter().copied())
        .collect();
    used.sort_unstable();
    used.dedup();
    let free: Vec<u8> = (1..=single.layers).filter(|l| !used.contains(l)).collect();
    match free.as_slice() {
        [a, b, ..] => Ok((*a, *b)),
        _ => Err(ArrayError::BusLayers {
            used,
            layers: single.layers,
        }),
    }
}

/// Appends a copy of `single` placed as `coil` (its ranges filled in).
fn copy_coil(board: &mut Board, single: &Board, mut coil: PlacedCoil, k: usize) {
    let (t0, v0, p0, w0) = (
        board.tracks.len(),
        board.vias.len(),
        board.pads.len(),
        board.windings.len(),
    );
    let moved = |s: &Segment| place_segment(s, coil.rotation, coil.position);
    board.tracks.extend(single.tracks.iter().map(|t| Track {
        segment: moved(&t.segment),
        ..*t
    }));
    board.vias.extend(single.vias.iter().map(|v| Via {
        at: coil.to_board(v.at),
        ..v.clone()
    }));
    board.pads.extend(single.pads.iter().map(|p| Pad {
        name: format!("{}.{}", k + 1, p.name),
        at: coil.to_board(p.at),
        ..p.clone()
    }));
    let node = |n: Node| match n {
        Node::Pad(i) => Node::Pad(i + p0),
        Node::Via(i) => Node::Via(i + v0),
    };
    let groups = board
        .windings
        .iter()
        .map(|w| w.group + 1)
        .max()
        .unwrap_or(0);
    board
        .windings
        .extend(single.windings.iter().map(|w| Winding {
            tracks: (w.tracks.0 + t0, w.tracks.1 + t0),
            from: node(w.from),
            to: node(w.to),
            group: w.group + groups,
            ..w.clone()
        }));
    coil.tracks = t0..board.tracks.len();
    coil.vias = v0..board.vias.len();
    coil.pads = p0..board.pads.len();
    coil.windings = w0..board.windings.len();
    board.coils.push(coil);
}

/// A segment of a coil built at the origin, rotated by `rotation` and
/// moved to `position`.
fn place_segment(s: &Segment, rotation: f64, position: Point) -> Segment {
    shifted(&s.rotated(rotation), position.to_vec2())
}

/// One electrical node between coils: the coil pads it joins and the
/// terminal pad it is brought to (if any).
#[derive(Debug, Clone)]
struct Net {
    name: String,
    pads: Vec<usize>,
    terminal: Option<String>,
    /// The phase whose current alone it carries (`None`: shared).
    owner: Option<usize>,
}

/// What the circuit says of one phase: its coil pads where the current
/// enters and leaves, and the indices of its own terminal nets.
#[derive(Debug, Clone, Copy)]
struct PhaseEnds {
    start: usize,
    end: usize,
    start_net: Option<usize>,
    end_net: Option<usize>,
}

/// The pad where the current of coil `k` enters (its "1", or "2" when it
/// runs the other way in its phase) and where it leaves.
fn coil_ends(board: &Board, k: usize, sense: f64) -> (usize, usize) {
    let pads = &board.coils[k].pads;
    let (one, two) = (pads.start, pads.start + 1);
    if sense > 0.0 { (one, two) } else { (two, one) }
}

/// The bus nets of the phases (each phase's coils in series) and their
/// connection, and each phase's ends.
fn circuit(
    board: &Board,
    phases: &[Vec<(usize, f64)>],
    c: Connection,
    neutral: bool,
) -> (Vec<Net>, Vec<PhaseEnds>) {
    let m = phases.len();
    let mut nets = Vec::new();
    let mut ends = Vec::new();
    for (ph, coils) in phases.iter().enumerate() {
        let name = PHASE_NAMES[ph];
        let pads: Vec<(usize, usize)> =
            coils.iter().map(|&(k, s)| coil_ends(board, k, s)).collect();
        for (i, w) in pads.windows(2).enumerate() {
            nets.push(Net {
                name: format!("{name}_L{}", i + 1),
                pads: vec![w[0].1, w[1].0],
                terminal: None,
                owner: Some(ph),
            });
        }
        ends.push(PhaseEnds {
            start: pads[0].0,
            end: pads[pads.len() - 1].1,
            start_net: None,
            end_net: None,
        });
    }
    let lead = |nets: &mut Vec<Net>, name: String, pad: usize, ph: usize| {
        nets.push(Net {
            name: name.clone(),
            pads: vec![pad],
            terminal: Some(name),
            owner: Some(ph),
        });
        nets.len() - 1
    };
    if m == 1 || c == Connection::Separate {
        for ph in 0..m {
            let name = PHASE_NAMES[ph];
            ends[ph].start_net = Some(lead(&mut nets, format!("{name}1"), ends[ph].start, ph));
            ends[ph].end_net = Some(lead(&mut nets, format!("{name}2"), ends[ph].end, ph));
        }
    } else if c == Connection::Star {
        for ph in 0..m {
            ends[ph].start_net = Some(lead(&mut nets, PHASE_NAMES[ph].into(), ends[ph].start, ph));
        }
        nets.push(Net {
            name: "N".into(),
            pads: ends.iter().map(|e| e.end).collect(),
            terminal: neutral.then(|| "N".into()),
            owner: None,
        });
    } else {
        // Delta: corner A joins A's start and the last phase's end, and so on.
        for ph in 0..m {
            let prev = (ph + m - 1) % m;
            nets.push(Net {
                name: PHASE_NAMES[ph].into(),
                pads: vec![ends[ph].start, ends[prev].end],
                terminal: Some(PHASE_NAMES[ph].into()),
                owner: None,
            });
        }
    }
    (nets, ends)
}

/// Routes bus nets outside a ring of coils.
struct Router {
    /// Farthest coil copper from the ring's centre, mm.
    centre_reach: f64,
    stub_layer: u8,
    arc_layer: u8,
    width: f64,
    clearance: f64,
    /// Via drill and land, mm.
    via: (f64, f64),
    /// Terminal drill and land, mm.
    terminal: (f64, f64),
}

/// A net's angular span on its lane: start angle and counter-clockwise
/// sweep, radians.
type Span = (f64, f64);

impl Router {
    /// Distance between neighbouring lanes, mm.
    fn lane_pitch(&self) -> f64 {
        self.width.max(self.via.1) + self.clearance
    }

    /// Radius of lane `j`, mm.
    fn lane(&self, j: usize) -> f64 {
        self.centre_reach
            + self.clearance
            + self.width.max(self.via.1) / 2.0
            + j as f64 * self.lane_pitch()
    }

    fn route(&self, board: &mut Board, nets: &[Net]) {
        // Spans of the nets with two pads or more, and their lanes.
        let mut lanes: Vec<Vec<Span>> = Vec::new();
        let mut lane_of = vec![None; nets.len()];
        let mut order: Vec<usize> = (0..nets.len())
            .filter(|&i| nets[i].pads.len() > 1)
            .collect();
        let spans: Vec<Span> = nets
            .iter()
            .map(|net| {
                let angles: Vec<f64> = net.pads.iter().map(|&p| board.pads[p].at.angle()).collect();
                span(&angles)
            })
            .collect();
        order.sort_by(|&a, &b| spans[b].1.total_cmp(&spans[a].1));
        for &i in &order {
            let s = spans[i];
            let j = (0..)
                .find(|&j| {
                    let r = self.lane(j);
                    let pad = (self.via.1 + self.clearance) / r;
                    lanes
                        .get(j)
                        .is_none_or(|taken: &Vec<Span>| taken.iter().all(|t| !overlaps(*t, s, pad)))
                })
                .unwrap_or(0);
            if lanes.len() <= j {
                lanes.resize(j + 1, Vec::new());
            }
            lanes[j].push(s);
            lane_of[i] = Some(j);
        }
        let r_terminal = self.lane(lanes.len()) - self.width.max(self.via.1) / 2.0
            + self.terminal.1 / 2.0
            + self.width / 2.0;
        for (i, net) in nets.iter().enumerate() {
            let bus = board.buses.len();
            let (t0, v0, w0) = (board.tracks.len(), board.vias.len(), board.windings.len());
            let mut pads = net.pads.clone();
            // Vias on the lane, in angle order along the span.
            if let Some(j) = lane_of[i] {
                let r = self.lane(j);
                let s = spans[i];
                let mut at: Vec<(f64, usize)> = net
                    .pads
                    .iter()
                    .map(|&p| ((board.pads[p].at.angle() - s.0).rem_euclid(TAU), p))
                    .collect();
                at.sort_by(|a, b| a.0.total_cmp(&b.0));
                let mut vias = Vec::new();
                for &(_, p) in &at {
                    let phi = board.pads[p].at.angle();
                    let v = board.vias.len();
                    board.vias.push(Via {
                        at: Point::polar(r, phi),
                        drill: self.via.0,
                        diameter: self.via.1,
                        joins: vec![self.stub_layer, self.arc_layer],
                        place: Place::Outside,
                    });
                    self.stub(board, Node::Pad(p), Node::Via(v), self.stub_layer);
                    vias.push(v);
                }
                for w in vias.windows(2) {
                    let (a, b) = (board.vias[w[0]].at, board.vias[w[1]].at);
                    let sweep = (b.angle() - a.angle()).rem_euclid(TAU);
                    let arc = Arc {
                        center: Point::ORIGIN,
                        start: a,
                        end: b,
                        sweep,
                    };
                    self.track(
                        board,
                        Segment::Arc(arc),
                        self.arc_layer,
                        Node::Via(w[0]),
                        Node::Via(w[1]),
                    );
                }
            }
            if let Some(name) = &net.terminal {
                // The terminal beyond every lane, on the first pad's ray.
                let from = net.pads[0];
                let phi = board.pads[from].at.angle();
                let t = board.pads.len();
                board.pads.push(Pad {
                    name: name.clone(),
                    at: Point::polar(r_terminal, phi),
                    drill: self.terminal.0,
                    diameter: self.terminal.1,
                    joins: vec![self.stub_layer],
                    place: Place::Outside,
                    smd: None,
                });
                let start = match lane_of[i] {
                    // From the net's via on that ray (the stub ends there).
                    Some(_) => Node::Via(
                        (v0..board.vias.len())
                            .find(|&v| (board.vias[v].at.angle() - phi).abs() < 1e-9)
                            .unwrap_or(v0),
                    ),
                    None => Node::Pad(from),
                };
                self.stub(board, start, Node::Pad(t), self.stub_layer);
                pads.push(t);
            }
            close_bus(board, net, self.stub_layer, (t0, v0, w0), pads);
            debug_assert_eq!(bus + 1, board.buses.len());
        }
    }

    /// A straight radial stub on `layer` from node `a` to node `b`.
    fn stub(&self, board: &mut Board, a: Node, b: Node, layer: u8) {
        let seg = Segment::line(board.node_at(a), board.node_at(b));
        self.track(board, seg, layer, a, b);
    }

    /// One bus track as a winding of its own from `a` to `b`.
    fn track(&self, board: &mut Board, seg: Segment, layer: u8, a: Node, b: Node) {
        bus_winding(board, vec![seg], self.width, layer, (a, b));
    }
}

/// Bus tracks `segs` (`width` wide) on `layer` as one winding from node
/// `ends.0` to `ends.1`, in a winding group of its own.
fn bus_winding(board: &mut Board, segs: Vec<Segment>, width: f64, layer: u8, ends: (Node, Node)) {
    let t = board.tracks.len();
    let n = segs.len();
    board.tracks.extend(segs.into_iter().map(|segment| Track {
        layer,
        segment,
        width,
        role: TrackRole::Bus,
    }));
    let group = board
        .windings
        .iter()
        .map(|w| w.group + 1)
        .max()
        .unwrap_or(0);
    board.windings.push(Winding {
        layer,
        group,
        tracks: (t, t + n),
        from: ends.0,
        to: ends.1,
        direction: Direction::Outward,
        turns: 0.0,
    });
}

/// Records the bus of `net` whose copper starts at track, via and winding
/// `starts` (its coil pads now joining `stub_layer`), with `pads` (its coil
/// pads and its terminal pad, if any).
fn close_bus(
    board: &mut Board,
    net: &Net,
    stub_layer: u8,
    starts: (usize, usize, usize),
    pads: Vec<usize>,
) {
    for &p in &net.pads {
        let joins = &mut board.pads[p].joins;
        if !joins.contains(&stub_layer) {
            joins.push(stub_layer);
            joins.sort_unstable();
        }
    }
    let (t0, v0, w0) = starts;
    board.buses.push(Bus {
        name: net.name.clone(),
        tracks: t0..board.tracks.len(),
        vias: v0..board.vias.len(),
        windings: w0..board.windings.len(),
        pads,
        terminal: net.terminal.clone(),
    });
}

/// The smallest counter-clockwise span (start, sweep) holding every angle.
fn span(angles: &[f64]) -> Span {
    let mut a: Vec<f64> = angles.iter().map(|x| x.rem_euclid(TAU)).collect();
    a.sort_by(f64::total_cmp);
    // Leave out the largest gap between neighbours (around the circle).
    let n = a.len();
    let (mut best, mut at) = (-1.0, 0);
    for i in 0..n {
        let gap = (a[(i + 1) % n] - a[i]).rem_euclid(TAU);
        let gap = if n == 1 { TAU } else { gap };
        if gap > best {
            best = gap;
            at = (i + 1) % n;
        }
    }
    (a[at], TAU - best)
}

/// Whether two spans come closer than `pad` radians.
fn overlaps(a: Span, b: Span, pad: f64) -> bool {
    let inside = |x: f64, s: Span| (x - (s.0 - pad)).rem_euclid(TAU) <= s.1 + 2.0 * pad;
    inside(a.0, b) || inside(b.0, a)
}

/// The phase `ph` with its coils, its own buses and its ends.
fn phase(board: &Board, nets: &[Net], e: PhaseEnds, ph: usize, coils: &[(usize, f64)]) -> Phase {
    // Bus `i` is net `i` (routed in order); a terminal pad is its last pad.
    let terminal = |net: Option<usize>, coil_pad: usize| {
        net.and_then(|i| board.buses[i].pads.last().copied())
            .unwrap_or(coil_pad)
    };
    Phase {
        name: PHASE_NAMES[ph].into(),
        coils: coils.to_vec(),
        buses: (0..nets.len())
            .filter(|&i| nets[i].owner == Some(ph))
            .collect(),
        ends: [terminal(e.start_net, e.start), terminal(e.end_net, e.end)],
    }
}

/// A disc about the origin holding every copper edge with the margin.
fn disc_outline(board: &Board, margin: f64) -> Outline {
    let r = coil_reach(board) + margin;
    let start = Point::new(r, 0.0);
    let half = Point::new(-r, 0.0);
    Outline {
        segments: vec![
            Segment::Arc(Arc {
                center: Point::ORIGIN,
                start,
                end: half,
                sweep: PI,
            }),
            Segment::Arc(Arc {
                center: Point::ORIGIN,
                start: half,
                end: start,
                sweep: PI,
            }),
        ],
    }
}
