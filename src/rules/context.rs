//! What every rule needs: the copper cut into short pieces that know where
//! they lie along the conductor, a spatial index of the pieces per layer,
//! and the plated holes.
//!
//! # Pieces
//! Each track is cut into pieces (true sub-arcs and sub-lines, no
//! flattening) short enough that their bounding boxes are tight: the
//! sagitta of an arc piece is at most one pitch `h` (widest track plus the
//! required clearance), a piece is at most `16 h` long and an arc piece
//! sweeps at most a quarter turn. Boxes of pieces go into one R-tree per
//! layer (rstar), so finding the copper near a piece costs `O(log n)`.
//!
//! # Along the conductor
//! Tracks of a winding (`Layout::windings`) form one path from node to
//! node; each piece knows its path and its position `s` (mm from the
//! path's start) so rules can tell neighbours along the conductor from
//! copper that only comes close across the coil (turn to turn). A track in
//! no winding is a path of its own.
//!
//! # Units
//! Millimetres.

use super::Item;
use super::distance::sub_segment;
use super::profile::Profile;
use crate::geometry::{Layout, Node, Point, Segment, arc_steps};
use crate::spec::Design;
use rstar::primitives::{GeomWithData, Rectangle};
use rstar::{AABB, RTree};

/// How candidate pairs are found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Broadphase {
    /// Spatial index (R-tree of piece boxes per layer): the normal check.
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
    /// Index into `Layout::tracks`.
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
    /// Bounding box of the centre line.
    pub lo: [f64; 2],
    /// Bounding box of the centre line.
    pub hi: [f64; 2],
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
            sub_segment(&self.seg, t0, t1)
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
}

type Entry = GeomWithData<Rectangle<[f64; 2]>, usize>;

/// Everything the rules share.
pub(crate) struct Context<'a> {
    /// The design.
    pub design: &'a Design,
    /// The layout under test.
    pub layout: &'a Layout,
    /// The rule values.
    pub profile: &'a Profile,
    /// All pieces of all tracks.
    pub pieces: Vec<Piece>,
    /// Conductor paths.
    pub paths: Vec<PathInfo>,
    /// Plated holes (vias first, then pads).
    pub holes: Vec<Hole>,
    /// Number of copper layers (at least `Layout::layers`).
    pub layers: u8,
    /// Largest half width of a track per layer (index `layer - 1`).
    pub max_hw: Vec<f64>,
    by_layer: Vec<Vec<usize>>,
    trees: Vec<RTree<Entry>>,
    broadphase: Broadphase,
}

impl<'a> Context<'a> {
    /// Cuts, indexes and collects.
    pub fn new(
        design: &'a Design,
        layout: &'a Layout,
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
        let widest = layout.tracks.iter().map(|t| t.width).fold(0.0, f64::max);
        let h = (widest + profile.min_clearance).max(1e-3);

        // Paths: windings first, then lone tracks.
        let mut track_path: Vec<Option<(usize, f64)>> = vec![None; layout.tracks.len()];
        let mut paths = Vec::new();
        let mut ends: Vec<(Node, usize, f64)> = Vec::new();
        for w in &layout.windings {
            let id = paths.len();
            let mut s = 0.0;
            let mut wmax: f64 = 0.0;
            for i in w.tracks.0..w.tracks.1.min(layout.tracks.len()) {
                if track_path[i].is_none() {
                    track_path[i] = Some((id, s));
                    s += layout.tracks[i].segment.length();
                    wmax = wmax.max(layout.tracks[i].width);
                }
            }
            paths.push(path_info(wmax, profile.min_clearance));
            ends.push((w.from, id, 0.0));
            ends.push((w.to, id, s));
        }
        for (i, t) in layout.tracks.iter().enumerate() {
            if track_path[i].is_none() {
                track_path[i] = Some((paths.len(), 0.0));
                paths.push(path_info(t.width, profile.min_clearance));
            }
        }

        let mut pieces = Vec::new();
        for (i, t) in layout.tracks.iter().enumerate() {
            let (path, s_start) = track_path[i].unwrap_or((0, 0.0));
            let len = t.segment.length();
            let n = match t.segment {
                Segment::Line(_) => (len / (16.0 * h)).ceil() as usize,
                Segment::Arc(a) => arc_steps(a.radius(), a.sweep.abs(), h)
                    .max((len / (16.0 * h)).ceil() as usize)
                    .max((a.sweep.abs() / std::f64::consts::FRAC_PI_2).ceil() as usize),
            }
            .max(1);
            for k in 0..n {
                let (t0, t1) = (k as f64 / n as f64, (k + 1) as f64 / n as f64);
                let seg = if n == 1 {
                    t.segment
                } else {
                    sub_segment(&t.segment, t0, t1)
                };
                let (lo, hi) = seg.bounds();
                pieces.push(Piece {
                    seg,
                    track: i,
                    layer: t.layer,
                    hw: t.width / 2.0,
                    path,
                    s0: s_start + len * t0,
                    s1: s_start + len * t1,
                    lo: [lo.x, lo.y],
                    hi: [hi.x, hi.y],
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
        let trees = match broadphase {
            Broadphase::Index => by_layer
                .iter()
                .map(|ids| {
                    RTree::bulk_load(
                        ids.iter()
                            .map(|&i| {
                                let p = &pieces[i];
                                GeomWithData::new(Rectangle::from_corners(p.lo, p.hi), i)
                            })
                            .collect(),
                    )
                })
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
        for (i, v) in layout.vias.iter().enumerate() {
            holes.push(Hole {
                item: Item::Via(i),
                at: v.at,
                drill: v.drill,
                diameter: v.diameter,
                joins: v.joins.clone(),
                ends: node_ends(Node::Via(i)),
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
            by_layer,
            trees,
            broadphase,
        }
    }

    /// Indices of the pieces on `layer` whose boxes meet the box `lo`..`hi`
    /// (index), or of every piece on the layer (all pairs). Ascending.
    pub fn near(&self, layer: u8, lo: [f64; 2], hi: [f64; 2]) -> Vec<usize> {
        if layer == 0 || layer as usize > self.by_layer.len() {
            return Vec::new();
        }
        let l = layer as usize - 1;
        match self.broadphase {
            Broadphase::AllPairs => self.by_layer[l].clone(),
            Broadphase::Index => {
                let mut v: Vec<usize> = self.trees[l]
                    .locate_in_envelope_intersecting(AABB::from_corners(lo, hi))
                    .map(|e| e.data)
                    .collect();
                v.sort_unstable();
                v
            }
        }
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

/// A box grown by `by` on every side.
pub(crate) fn grown(lo: [f64; 2], hi: [f64; 2], by: f64) -> ([f64; 2], [f64; 2]) {
    ([lo[0] - by, lo[1] - by], [hi[0] + by, hi[1] + by])
}
