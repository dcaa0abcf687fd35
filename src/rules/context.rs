//! What every rule needs: the copper cut into short pieces that know where
//! they lie along the conductor, a spatial index of the pieces per layer,
//! and the plated holes.
//!
//! # Pieces and the index
//! Each track is cut into pieces (true sub-arcs and sub-lines, no
//! flattening). The index works on the pieces' boxes in polar coordinates
//! about the coil axis, (distance from the axis, polar angle): a coil's
//! turns are nearly circles about the axis, so a whole half-turn arc is a
//! thin box there and its only neighbours are the turns next to it. Pieces
//! are cut so that an arc sweeps at most a quarter turn and a piece's range
//! of distance from the axis is at most `4 h` (`h` = widest track plus the
//! required clearance). Per layer the boxes are sorted by their smallest
//! distance `r0`; since no box spans more than `4 h` in distance, the boxes
//! that can meet a query lie in one run of that order, found by binary
//! search, and are then tested box against box. A query grows a box by
//! the reach `d` in distance and by `asin(d / r)` in angle (all angles when
//! the box comes within `d` of the axis), with the angle taken modulo a
//! full turn; that is conservative, so no pair closer than the reach is
//! missed. The number of candidates per piece stays bounded, and the check
//! costs `O(n log n)` in the number of pieces.
//!
//! # Distance from the axis: round or by the sides
//! For a polygon or rectangle coil "distance from the axis" is measured
//! with the layer's own gauge, `rho(p) = max_k (n_k . p - o_k)` over the
//! outward normals `n_k` of its straight sides (offsets `o_k >= 0`, the
//! smallest zero), found from the layer's copper (see [`Gauge`]). A side
//! of every turn then has a nearly constant `rho`, so it stays one thin box
//! instead of being cut into pieces that each span `4 h` of Euclidean
//! radius: a side of the outer turns would need a number of pieces that
//! grows with the turn count, and the check would grow with its cube. The
//! gauge is 1-Lipschitz (unit normals) and never exceeds the Euclidean
//! radius (`o_k >= 0`), so a query grown by the reach `d` in `rho` and by
//! `asin(d / rho0)` in angle is still conservative. Any such gauge gives the
//! same verdicts; a poor one only costs time.
//!
//! # Along the conductor
//! Tracks of a winding (`Board::windings`) form one path from node to
//! node; each piece knows its path and its position `s` (mm from the
//! path's start) so rules can tell neighbours along the conductor from
//! copper that only comes close across the coil (turn to turn). A track in
//! no winding is a path of its own.
//!
//! # Units
//! Millimetres.

use super::Item;
use super::profile::Profile;
use crate::design::Design;
use crate::geometry::{Board, Node, Point, Segment, Vec2, angle_between};
use std::f64::consts::{FRAC_PI_2, PI, TAU};

/// How candidate pairs are found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Broadphase {
    /// Spatial index (piece boxes per layer sorted by distance from the
    /// axis): the normal check.
    Index,
    /// Every pair of pieces on a layer: the slow oracle the index is tested
    /// against.
    AllPairs,
}

/// Verdict tolerance, mm (1 nm, the grid every exporter rounds to): a value
/// fails only when it is more than this below the requirement, so a layout
/// exactly at a limit passes despite floating-point noise.
pub const TOLERANCE: f64 = 1e-6;

/// Neighbours along the conductor: points of one path closer than
/// `ADJACENT_PITCHES * (widest track of the path + required clearance)`
/// along the path are the same piece of conductor and are never checked
/// against each other. (Common practice, no source: a short between them
/// removes no turn.)
pub const ADJACENT_PITCHES: f64 = 3.0;

/// The adjacency length is measured in cells of `1 / ADJACENT_CELLS` of it,
/// counted from the path's start, so the verdict does not depend on how
/// tracks are cut into pieces: points more than `ADJACENT_CELLS` cells apart
/// are checked (they are more than the adjacency length apart), points in
/// cells at most that far apart are not (they are less than 1.25 times
/// the adjacency length apart).
pub(crate) const ADJACENT_CELLS: i64 = 4;

/// A short piece of one track.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Piece {
    /// Centre line of the piece.
    pub seg: Segment,
    /// Index into `Board::tracks`.
    pub track: usize,
    /// Copper layer.
    pub layer: u8,
    /// Half the track width, mm.
    pub hw: f64,
    /// Path (conductor) the piece belongs to.
    pub path: usize,
    /// Position of the piece's start along its path, mm.
    pub s0: f64,
    /// Position of the piece's end along its path, mm.
    pub s1: f64,
    /// Polar box of the centre line.
    pub polar: PolarBox,
}

/// A box in polar coordinates about the axis: distance `r0..r1` (mm),
/// angle `t0..t1` (radians, `t0` in `[-pi, pi)`, `t1 - t0` below 2 pi), or
/// every angle (`full`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct PolarBox {
    /// Smallest distance from the axis, mm.
    pub r0: f64,
    /// Largest distance from the axis, mm.
    pub r1: f64,
    /// First angle, radians.
    pub t0: f64,
    /// Last angle, radians.
    pub t1: f64,
    /// Every angle.
    pub full: bool,
}

impl PolarBox {
    /// The polar box of a point, its distance measured with `gauge`.
    pub fn point(p: Point, gauge: &Gauge) -> PolarBox {
        let r = p.radius();
        let g = gauge.at(p);
        PolarBox {
            r0: g,
            r1: g,
            t0: if r > 0.0 { p.angle() } else { 0.0 },
            t1: if r > 0.0 { p.angle() } else { 0.0 },
            full: r <= 0.0,
        }
    }

    /// A conservative polar box of a segment's centre line, its distance
    /// from the axis measured with `gauge`.
    pub fn of(seg: &Segment, gauge: &Gauge) -> PolarBox {
        let r0 = seg.min_radius();
        let r1 = seg.max_radius();
        let (g0, g1) = match gauge {
            Gauge::Round => (r0, r1),
            _ => gauge.range(seg),
        };
        let full = PolarBox {
            r0: g0 - 1e-9,
            r1: g1 + 1e-9,
            t0: -PI,
            t1: 3.0 * PI,
            full: true,
        };
        if r0 <= 1e-9 * (1.0 + r1) {
            return full;
        }
        let (a, b) = match seg {
            Segment::Line(l) => {
                let a = l.start.angle();
                let span = angle_between(l.start.to_vec2(), l.end.to_vec2());
                (a.min(a + span), a.max(a + span))
            }
            Segment::Arc(arc) => {
                let c = arc.center.to_vec2();
                let cl = c.length();
                let r = arc.radius();
                if cl < r * (1.0 - 1e-9) {
                    // Axis inside the circle: the polar angle is monotonic,
                    // in the arc's sense, and a part of a circle sweeps less
                    // than a full turn about any point inside it.
                    let a = arc.start.angle();
                    let sign = arc.sweep.signum();
                    let turn = angle_between(arc.start.to_vec2(), arc.end.to_vec2());
                    let span = sign * (sign * turn).rem_euclid(TAU);
                    (a.min(a + span), a.max(a + span))
                } else if cl > r * (1.0 + 1e-9) {
                    // Axis outside: angles within asin(r / |c|) of the centre's
                    // direction; extremes at the ends or the tangent points.
                    let base = c.angle();
                    let half = (r / cl).min(1.0).asin();
                    let mut lo = angle_between(c, arc.start.to_vec2());
                    let mut hi = lo;
                    let e = angle_between(c, arc.end.to_vec2());
                    lo = lo.min(e);
                    hi = hi.max(e);
                    let tl = (cl * cl - r * r).max(0.0).sqrt();
                    for sign in [1.0, -1.0] {
                        let t = Point::polar(tl, base + sign * half);
                        if arc.contains_direction(t - arc.center) {
                            lo = lo.min(sign * half);
                            hi = hi.max(sign * half);
                        }
                    }
                    (base + lo, base + hi)
                } else {
                    return full;
                }
            }
        };
        let k = ((a + PI) / TAU).floor();
        PolarBox {
            r0: g0 - 1e-9,
            r1: g1 + 1e-9,
            t0: a - k * TAU - 1e-9,
            t1: b - k * TAU + 1e-9,
            full: false,
        }
    }
}

/// How a layer measures distance from the axis for the index (module
/// notes): Euclidean, or by the outward normals of its straight sides.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum Gauge {
    /// Euclidean distance from the axis.
    Round,
    /// `max_k (n_k . p - o_k)`: unit normals positively spanning the plane
    /// (no gap of half a turn or more between neighbouring normals), with
    /// offsets `o_k >= 0`, the smallest zero.
    Sides(Vec<(Vec2, f64)>),
}

impl Gauge {
    /// The gauge of one layer's copper: the outward normals of the straight
    /// tracks that run across the axis' view (more tangential than radial:
    /// polygon and rectangle sides) and are longer than `min_len`, grouped
    /// by direction (1e-6 rad), keeping directions shared by at least two
    /// tracks; each offset is the innermost such track's `n . p` less the
    /// smallest of those. `Round` when fewer than three directions remain,
    /// more than 24, or they do not span the plane.
    pub fn of_layer<'s>(segments: impl Iterator<Item = &'s Segment>, min_len: f64) -> Gauge {
        // (angle of the normal, innermost n . p, count)
        let mut dirs: Vec<(f64, f64, usize)> = Vec::new();
        for seg in segments {
            let Segment::Line(l) = seg else { continue };
            let Some(u) = (l.end - l.start).normalized() else {
                continue;
            };
            if seg.length() < min_len {
                continue;
            }
            let mid = l.start.lerp(l.end, 0.5).to_vec2();
            let mut n = u.perp();
            if n.dot(mid) < 0.0 {
                n = n * -1.0;
            }
            let off = n.dot(mid);
            if off < 0.7 * mid.length() || off <= 0.0 {
                continue;
            }
            let a = n.angle().rem_euclid(TAU);
            match dirs.iter_mut().find(|d| {
                let diff = (d.0 - a).abs();
                diff.min(TAU - diff) < 1e-6
            }) {
                Some(d) => {
                    d.1 = d.1.min(off);
                    d.2 += 1;
                }
                None => dirs.push((a, off, 1)),
            }
            if dirs.len() > 64 {
                return Gauge::Round;
            }
        }
        dirs.retain(|d| d.2 >= 2);
        if dirs.len() < 3 || dirs.len() > 24 {
            return Gauge::Round;
        }
        dirs.sort_by(|a, b| a.0.total_cmp(&b.0));
        let gap = dirs
            .windows(2)
            .map(|w| w[1].0 - w[0].0)
            .chain(std::iter::once(dirs[0].0 + TAU - dirs[dirs.len() - 1].0))
            .fold(0.0, f64::max);
        if gap >= PI - 1e-6 {
            return Gauge::Round;
        }
        let base = dirs.iter().map(|d| d.1).fold(f64::INFINITY, f64::min);
        Gauge::Sides(
            dirs.iter()
                .map(|d| (Vec2::from_angle(d.0), d.1 - base))
                .collect(),
        )
    }

    /// The gauge of a point.
    pub fn at(&self, p: Point) -> f64 {
        match self {
            Gauge::Round => p.radius(),
            Gauge::Sides(ns) => ns
                .iter()
                .map(|&(n, o)| n.dot(p.to_vec2()) - o)
                .fold(f64::NEG_INFINITY, f64::max),
        }
    }

    /// A range `(lo, hi)` holding the gauge of every point of a segment's
    /// centre line: exact for `Round`; for `Sides` `hi` is exact (the
    /// largest support) and `lo` a lower bound (the largest of the
    /// smallest supports, which is exact along a side).
    pub fn range(&self, seg: &Segment) -> (f64, f64) {
        match self {
            Gauge::Round => (seg.min_radius(), seg.max_radius()),
            Gauge::Sides(ns) => {
                let (mut lo, mut hi) = (f64::NEG_INFINITY, f64::NEG_INFINITY);
                for &(n, o) in ns {
                    hi = hi.max(seg.support(n) - o);
                    lo = lo.max(-seg.support(n * -1.0) - o);
                }
                (lo.min(hi), hi)
            }
        }
    }
}

impl Piece {
    /// The part of this piece between path positions `a` and `b`.
    pub fn between(&self, a: f64, b: f64) -> Segment {
        let len = self.s1 - self.s0;
        if len <= 0.0 {
            return self.seg;
        }
        let t0 = ((a - self.s0) / len).clamp(0.0, 1.0);
        let t1 = ((b - self.s0) / len).clamp(0.0, 1.0);
        if t0 == 0.0 && t1 == 1.0 {
            self.seg
        } else {
            self.seg.subsegment(t0..t1)
        }
    }
}

/// One conductor path (a winding, or a lone track).
#[derive(Debug, Clone, Copy)]
pub(crate) struct PathInfo {
    /// Adjacency length along the path, mm.
    pub adjacent: f64,
    /// Cell size, mm (`adjacent / ADJACENT_CELLS`).
    pub cell: f64,
}

/// A plated hole: a via or a terminal pad.
#[derive(Debug, Clone)]
pub(crate) struct Hole {
    /// `Item::Via(i)` or `Item::Pad(i)`.
    pub item: Item,
    /// Centre.
    pub at: Point,
    /// Finished hole diameter, mm.
    pub drill: f64,
    /// Pad diameter, mm.
    pub diameter: f64,
    /// Layers whose copper it joins.
    pub joins: Vec<u8>,
    /// (path, position) of every path end at this hole.
    pub ends: Vec<(usize, f64)>,
    /// A surface pad's corners (then `drill` is 0 and `diameter` the circle
    /// about the corners).
    pub rect: Option<[Point; 4]>,
}

impl Hole {
    /// Distance from this hole's copper (its rectangle, or its circle of
    /// diameter `size`) to the point `p`, mm; negative inside a circle, 0
    /// inside a rectangle.
    fn copper_distance(&self, p: Point, size: f64) -> f64 {
        match &self.rect {
            Some(c) => {
                let inside = (0..4).all(|i| (c[(i + 1) % 4] - c[i]).cross(p - c[i]) >= 0.0);
                if inside {
                    0.0
                } else {
                    (0..4)
                        .map(|i| Segment::line(c[i], c[(i + 1) % 4]).distance(p))
                        .fold(f64::INFINITY, f64::min)
                }
            }
            None => self.at.distance(p) - size / 2.0,
        }
    }
}

/// The pieces of one layer sorted by the smallest distance of their polar
/// boxes from the axis (see the module notes).
#[derive(Debug, Clone, Default)]
struct LayerIndex {
    /// Piece indices, by `r0`.
    ids: Vec<usize>,
    /// Their `r0`, ascending.
    r0: Vec<f64>,
    /// Largest `r1 - r0` of a box on the layer, mm.
    span: f64,
}

impl LayerIndex {
    fn new(ids: &[usize], pieces: &[Piece]) -> LayerIndex {
        let mut ids = ids.to_vec();
        ids.sort_by(|&a, &b| pieces[a].polar.r0.total_cmp(&pieces[b].polar.r0));
        let r0 = ids.iter().map(|&i| pieces[i].polar.r0).collect();
        let span = ids
            .iter()
            .map(|&i| pieces[i].polar.r1 - pieces[i].polar.r0)
            .fold(0.0, f64::max);
        LayerIndex { ids, r0, span }
    }
}

/// Everything the rules share.
pub(crate) struct Context<'a> {
    /// The design.
    pub design: &'a Design,
    /// The layout under test.
    pub layout: &'a Board,
    /// The rule values.
    pub profile: &'a Profile,
    /// All pieces of all tracks.
    pub pieces: Vec<Piece>,
    /// Conductor paths.
    pub paths: Vec<PathInfo>,
    /// Plated holes (vias first, then pads).
    pub holes: Vec<Hole>,
    /// Number of copper layers (at least `Board::layers`).
    pub layers: u8,
    /// Largest half width of a track per layer (index `layer - 1`).
    pub max_hw: Vec<f64>,
    /// Per track: it starts where the track before it on its path ends,
    /// in the same direction (no corner between them).
    smooth_start: Vec<bool>,
    by_layer: Vec<Vec<usize>>,
    gauges: Vec<Gauge>,
    index: Vec<LayerIndex>,
    broadphase: Broadphase,
}

impl<'a> Context<'a> {
    /// Every pair of holes whose circles of diameter `size(hole)` are closer
    /// than `required` edge to edge: (first, second, gap in mm, the point
    /// midway across the gap on the line between the centres).
    pub fn close_hole_pairs(
        &self,
        size: impl Fn(&Hole) -> f64,
        required: f64,
    ) -> Vec<(&Hole, &Hole, f64, Point)> {
        let hs = &self.holes;
        let mut out = Vec::new();
        for i in 0..hs.len() {
            for b in &hs[i + 1..] {
                let a = &hs[i];
                if size(a) <= 0.0 || size(b) <= 0.0 {
                    continue; // a surface pad has no hole
                }
                // A surface pad against a round one: its rectangle; two
                // surface pads: their rectangles (the nearest corner of
                // either to the other; 0 where they overlap).
                let gap = match (&a.rect, &b.rect) {
                    (Some(_), None) => a.copper_distance(b.at, 0.0) - size(b) / 2.0,
                    (None, Some(_)) => b.copper_distance(a.at, 0.0) - size(a) / 2.0,
                    (Some(ra), Some(rb)) => ra
                        .iter()
                        .map(|&c| b.copper_distance(c, 0.0))
                        .chain(rb.iter().map(|&c| a.copper_distance(c, 0.0)))
                        .fold(f64::INFINITY, f64::min),
                    _ => a.at.distance(b.at) - (size(a) + size(b)) / 2.0,
                };
                if super::fails(gap, required) {
                    let at = match (b.at - a.at).normalized() {
                        Some(u) => a.at + u * (size(a) / 2.0 + gap / 2.0),
                        None => a.at,
                    };
                    out.push((a, b, gap, at));
                }
            }
        }
        out
    }

    /// Cuts, indexes and collects.
    pub fn new(
        design: &'a Design,
        layout: &'a Board,
        profile: &'a Profile,
        broadphase: Broadphase,
    ) -> Context<'a> {
        let layers = layout
            .tracks
            .iter()
            .map(|t| t.layer)
            .chain(layout.vias.iter().flat_map(|v| v.joins.iter().copied()))
            .chain(layout.pads.iter().flat_map(|p| p.joins.iter().copied()))
            .fold(layout.layers, u8::max)
            .max(1);
        let min_clearance = profile.min(&super::clearance::LIMIT);
        let widest = layout.tracks.iter().map(|t| t.width).fold(0.0, f64::max);
        let h = (widest + min_clearance).max(1e-3);

        // Paths: windings first, then lone tracks.
        let mut track_path: Vec<Option<(usize, f64)>> = vec![None; layout.tracks.len()];
        let mut paths = Vec::new();
        let mut ends: Vec<(Node, usize, f64)> = Vec::new();
        let mut smooth_start = vec![false; layout.tracks.len()];
        for w in &layout.windings {
            let id = paths.len();
            let mut s = 0.0;
            let mut wmax: f64 = 0.0;
            let end = w.tracks.1.min(layout.tracks.len());
            let start = w.tracks.0.min(end);
            for (slot, t) in track_path[start..end]
                .iter_mut()
                .zip(&layout.tracks[start..end])
            {
                if slot.is_none() {
                    *slot = Some((id, s));
                    s += t.segment.length();
                    wmax = wmax.max(t.width);
                }
            }
            for (i, pair) in layout.tracks[start..end].windows(2).enumerate() {
                let (prev, next) = (&pair[0].segment, &pair[1].segment);
                smooth_start[start + i + 1] = prev.end().distance(next.start()) < 1e-9
                    && match (prev.end_direction(), next.start_direction()) {
                        (Some(u), Some(v)) => u.dot(v) > 0.0 && u.cross(v).abs() < 1e-9,
                        _ => false,
                    };
            }
            paths.push(path_info(wmax, min_clearance));
            ends.push((w.from, id, 0.0));
            ends.push((w.to, id, s));
        }
        for (i, t) in layout.tracks.iter().enumerate() {
            if track_path[i].is_none() {
                track_path[i] = Some((paths.len(), 0.0));
                paths.push(path_info(t.width, min_clearance));
            }
        }

        // Each layer's gauge (module notes), from its tracks longer than
        // 4 h: shorter ones never need cutting.
        let gauges: Vec<Gauge> = (1..=layers)
            .map(|layer| {
                let segs = layout
                    .tracks
                    .iter()
                    .filter(|t| t.layer == layer)
                    .map(|t| &t.segment);
                Gauge::of_layer(segs, 4.0 * h)
            })
            .collect();
        let round = Gauge::Round;
        let gauge_of = |layer: u8| match layer {
            0 => &round,
            l => gauges.get(l as usize - 1).unwrap_or(&round),
        };

        let mut pieces = Vec::new();
        for (i, t) in layout.tracks.iter().enumerate() {
            let (path, s_start) = track_path[i].unwrap_or((0, 0.0));
            let len = t.segment.length();
            let gauge = gauge_of(t.layer);
            // Quarter turns at most; range of distance from the axis (in
            // the layer's gauge) at most 4 h.
            let spread = || {
                let (lo, hi) = gauge.range(&t.segment);
                ((hi - lo) / (4.0 * h)).ceil() as usize
            };
            let n = match (t.segment, gauge) {
                (Segment::Line(l), Gauge::Round) => {
                    let slope = |p: Point| match (l.end - l.start).normalized() {
                        Some(u) if p.radius() > 0.0 => u.dot(p.to_vec2()).abs() / p.radius(),
                        _ => 1.0,
                    };
                    (len * slope(l.start).max(slope(l.end)) / (4.0 * h)).ceil() as usize
                }
                (Segment::Line(_), Gauge::Sides(_)) => spread(),
                (Segment::Arc(a), _) => ((a.sweep.abs() / FRAC_PI_2).ceil() as usize).max(spread()),
            }
            .max(1);
            for k in 0..n {
                let (t0, t1) = (k as f64 / n as f64, (k + 1) as f64 / n as f64);
                let seg = if n == 1 {
                    t.segment
                } else {
                    t.segment.subsegment(t0..t1)
                };
                pieces.push(Piece {
                    seg,
                    track: i,
                    layer: t.layer,
                    hw: t.width / 2.0,
                    path,
                    s0: s_start + len * t0,
                    s1: s_start + len * t1,
                    polar: PolarBox::of(&seg, gauge),
                });
            }
        }

        let mut by_layer = vec![Vec::new(); layers as usize];
        let mut max_hw = vec![0.0f64; layers as usize];
        for (i, p) in pieces.iter().enumerate() {
            if p.layer >= 1 {
                let l = p.layer as usize - 1;
                by_layer[l].push(i);
                max_hw[l] = max_hw[l].max(p.hw);
            }
        }
        let index = match broadphase {
            Broadphase::Index => by_layer
                .iter()
                .map(|ids| LayerIndex::new(ids, &pieces))
                .collect(),
            Broadphase::AllPairs => Vec::new(),
        };

        let mut holes = Vec::new();
        let node_ends = |n: Node| -> Vec<(usize, f64)> {
            ends.iter()
                .filter(|(m, _, _)| *m == n)
                .map(|&(_, p, s)| (p, s))
                .collect()
        };
        // A via that is no node of the chain (the one beside a surface
        // pad, where the pad's lead changes layer) is where its paths pass:
        // every piece end on its centre.
        let passing = |at: Point| -> Vec<(usize, f64)> {
            pieces
                .iter()
                .flat_map(|p| [(p.seg.start(), p.s0, p.path), (p.seg.end(), p.s1, p.path)])
                .filter(|(q, _, _)| q.distance(at) < 1e-6)
                .map(|(_, s, path)| (path, s))
                .collect()
        };
        for (i, v) in layout.vias.iter().enumerate() {
            let mut ends = node_ends(Node::Via(i));
            if ends.is_empty() {
                ends = passing(v.at);
            }
            holes.push(Hole {
                item: Item::Via(i),
                at: v.at,
                drill: v.drill,
                diameter: v.diameter,
                joins: v.joins.clone(),
                ends,
                rect: None,
            });
        }
        for (i, p) in layout.pads.iter().enumerate() {
            holes.push(Hole {
                item: Item::Pad(i),
                at: p.at,
                drill: p.drill,
                diameter: p.diameter,
                joins: p.joins.clone(),
                ends: node_ends(Node::Pad(i)),
                rect: p.smd.map(|s| s.corners(p.at)),
            });
        }

        Context {
            design,
            layout,
            profile,
            pieces,
            paths,
            holes,
            layers,
            max_hw,
            smooth_start,
            by_layer,
            gauges,
            index,
            broadphase,
        }
    }

    /// The polar box of a point on `layer` (distance in the layer's gauge).
    pub fn point_box(&self, layer: u8, p: Point) -> PolarBox {
        match layer
            .checked_sub(1)
            .and_then(|l| self.gauges.get(l as usize))
        {
            Some(g) => PolarBox::point(p, g),
            None => PolarBox::point(p, &Gauge::Round),
        }
    }

    /// Indices of the pieces on `layer` that may come within `reach` (mm)
    /// of a shape with polar box `q` (index), or of every piece on the
    /// layer (all pairs). Ascending, without repeats.
    pub fn near(&self, layer: u8, q: &PolarBox, reach: f64) -> Vec<usize> {
        let mut v = Vec::new();
        self.near_into(layer, q, reach, &mut v);
        v
    }

    /// [`Context::near`] into a buffer the caller reuses (cleared first).
    pub fn near_into(&self, layer: u8, q: &PolarBox, reach: f64, v: &mut Vec<usize>) {
        v.clear();
        if layer == 0 || layer as usize > self.by_layer.len() {
            return;
        }
        let l = layer as usize - 1;
        match self.broadphase {
            Broadphase::AllPairs => v.extend_from_slice(&self.by_layer[l]),
            Broadphase::Index => {
                let (lo, hi) = (q.r0 - reach, q.r1 + reach);
                // Every angle, or the query's angles grown by asin(d / r).
                let window = (!q.full && q.r0 > reach).then(|| {
                    let dt = (reach / q.r0).min(1.0).asin() + 1e-9;
                    (q.t0 - dt, q.t1 + dt)
                });
                let ix = &self.index[l];
                // Boxes with r0 in [lo - span, hi]: every box whose
                // distance range can meet [lo, hi].
                let first = ix.r0.partition_point(|&r| r < lo - ix.span);
                let last = ix.r0.partition_point(|&r| r <= hi);
                for &i in &ix.ids[first..last] {
                    let b = &self.pieces[i].polar;
                    if b.r1 < lo || b.r0 > hi {
                        continue;
                    }
                    let meets = match window {
                        None => true,
                        // Angles modulo a full turn: stored boxes start in
                        // [-pi, pi) and end before 3 pi, so the copies a
                        // turn either side cover every overlap.
                        Some((w0, w1)) => {
                            b.full
                                || [-TAU, 0.0, TAU]
                                    .iter()
                                    .any(|k| b.t0 + k <= w1 && b.t1 + k >= w0)
                        }
                    };
                    if meets {
                        v.push(i);
                    }
                }
                v.sort_unstable();
            }
        }
    }

    /// Smallest radius of curvature (mm) of the path from track `first` to
    /// track `last` (`first <= last`, consecutive tracks of one path), or
    /// `None` when it turns a corner between them.
    pub fn smooth_radius(&self, first: usize, last: usize) -> Option<f64> {
        if first > last || (first + 1..=last).any(|t| !self.smooth_start[t]) {
            return None;
        }
        Some(
            self.layout.tracks[first..=last]
                .iter()
                .map(|t| t.segment.bend_radius())
                .fold(f64::INFINITY, f64::min),
        )
    }

    /// Pieces on `layer` (ascending).
    pub fn on_layer(&self, layer: u8) -> &[usize] {
        if layer == 0 || layer as usize > self.by_layer.len() {
            return &[];
        }
        &self.by_layer[layer as usize - 1]
    }

    /// Largest half track width on `layer`, mm.
    pub fn max_hw_on(&self, layer: u8) -> f64 {
        if layer == 0 || layer as usize > self.max_hw.len() {
            0.0
        } else {
            self.max_hw[layer as usize - 1]
        }
    }
}

fn path_info(width: f64, clearance: f64) -> PathInfo {
    let adjacent = (ADJACENT_PITCHES * (width + clearance)).max(1e-6);
    PathInfo {
        adjacent,
        cell: adjacent / ADJACENT_CELLS as f64,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::geometry::Arc;
    use proptest::prelude::*;

    /// Whether a point lies in a polar box (angle modulo a full turn), its
    /// distance measured with `gauge`.
    fn holds(b: &PolarBox, p: Point, gauge: &Gauge) -> bool {
        let r = gauge.at(p);
        if r < b.r0 - 1e-12 || r > b.r1 + 1e-12 {
            return false;
        }
        if b.full {
            return true;
        }
        let t = p.angle();
        (-2..=2).any(|k| {
            let t = t + k as f64 * TAU;
            t >= b.t0 - 1e-12 && t <= b.t1 + 1e-12
        })
    }

    /// A regular polygon's gauge (`sides` normals from angle `turn`), or a
    /// rectangle's (offset `o` on the x normals) when `sides` is 4.
    fn sides_gauge(sides: usize, turn: f64, o: f64) -> Gauge {
        Gauge::Sides(
            (0..sides)
                .map(|k| {
                    let n = Vec2::from_angle(turn + k as f64 * TAU / sides as f64);
                    (n, if sides == 4 && k % 2 == 0 { o } else { 0.0 })
                })
                .collect(),
        )
    }

    proptest! {
        /// Every point of a line or arc lies in its polar box, wherever the
        /// axis is (inside, outside or near the circle, behind a line), with
        /// the round gauge and with a polygon's or a rectangle's.
        #[test]
        fn polar_boxes_hold_their_segments(
            cx in -3.0..3.0f64, cy in -3.0..3.0f64, r in 0.01..4.0f64,
            a0 in -4.0..4.0f64, sweep in -6.2..6.2f64, arc in any::<bool>(),
            ex in -3.0..3.0f64, ey in -3.0..3.0f64,
            sides in 3usize..9, turn in -1.0..1.0f64, o in 0.0..2.0f64,
        ) {
            let c = Point::new(cx, cy);
            let start = c + crate::geometry::Vec2::from_angle(a0) * r;
            let seg = if arc {
                Segment::Arc(Arc::from_start(c, start, sweep))
            } else {
                Segment::line(start, Point::new(ex, ey))
            };
            for gauge in [Gauge::Round, sides_gauge(sides, turn, o)] {
                let b = PolarBox::of(&seg, &gauge);
                for i in 0..=400 {
                    let p = seg.point_at(i as f64 / 400.0);
                    prop_assert!(holds(&b, p, &gauge), "{seg:?} {b:?} {p:?} {gauge:?}");
                    // The gauge never exceeds the distance from the axis and
                    // changes no faster than the point moves.
                    prop_assert!(gauge.at(p) <= p.radius() + 1e-12);
                    let q = Point::new(ex, ey);
                    prop_assert!((gauge.at(p) - gauge.at(q)).abs() <= p.distance(q) + 1e-12);
                }
            }
        }

        /// The gauge found from a polygon's sides is that polygon's: every
        /// side has one gauge value along its length.
        #[test]
        fn a_polygons_sides_give_its_gauge(sides in 3usize..13, turn in -1.0..1.0f64) {
            let corner = |k: usize, a: f64| {
                let th = turn + (k as f64 + 0.5) * TAU / sides as f64;
                Point::polar(a / (std::f64::consts::PI / sides as f64).cos(), th)
            };
            let segs: Vec<Segment> = [3.0, 3.2]
                .iter()
                .flat_map(|&a| (0..sides).map(move |k| Segment::line(corner(k, a), corner(k + 1, a))))
                .collect();
            let g = Gauge::of_layer(segs.iter(), 0.5);
            prop_assert!(matches!(g, Gauge::Sides(ref n) if n.len() == sides), "{g:?}");
            for s in &segs {
                let (lo, hi) = g.range(s);
                prop_assert!(hi - lo < 1e-9, "{s:?}: {lo}..{hi}");
            }
        }
    }
}
