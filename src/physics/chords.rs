//! The conductor as short straight chords, each with its section, share of
//! the current and the voltage along the winding at its ends: what the
//! frequency phases sample (the proximity field at each chord's middle,
//! the neighbours that make the self-capacitance).
//!
//! Chord length and the sagitta of arcs start at two pitches and 1/20 of
//! a pitch; on a large coil both grow (length with the ratio, sagitta
//! with its square) until there are at most [`MAX_CHORDS`] ([`MAX_CHORDS_METRICS`]
//! in a sweep): a 20-turn
//! coil keeps the fine chords, an 8-layer 100-turn coil gets chords of a
//! few millimetres (one per side of a polygon turn).

use super::conductor::{Conductor, m};
use crate::design::Design;
use crate::geometry::{Board, Point, Segment, TrackRole, Vec2};

/// Most chords the frequency phases sample in a full report (the
/// proximity field costs four sources per chord at every chord).
pub const MAX_CHORDS: usize = 2500;

/// Most chords in a sweep's analysis ([`super::Detail::Metrics`]).
pub const MAX_CHORDS_METRICS: usize = 600;

/// One chord of the conductor.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Chord {
    /// Start and end in the layout's coordinates, mm (current order).
    pub a: Point,
    /// End, mm.
    pub b: Point,
    /// Height of the copper centre, m.
    pub z: f64,
    /// Copper layer, 1 = top.
    pub layer: u8,
    /// Index of the winding in `Board::windings`.
    pub winding: usize,
    /// Track width, m.
    pub width: f64,
    /// Copper thickness, m.
    pub thickness: f64,
    /// Share of the terminal current at DC.
    pub weight: f64,
    /// Voltage at `a` and `b` as a fraction of the terminal voltage,
    /// linear along the current path (each group of the series chain gets
    /// its length's part).
    pub volt: (f64, f64),
    /// Part of a lead.
    pub lead: bool,
}

impl Chord {
    /// Length, m.
    pub fn length(&self) -> f64 {
        m((self.b - self.a).length())
    }
    /// Middle, mm.
    pub fn mid(&self) -> Point {
        self.a.midpoint(self.b)
    }
    /// Unit direction of the current.
    pub fn dir(&self) -> Vec2 {
        (self.b - self.a)
            .normalized()
            .unwrap_or(Vec2::new(1.0, 0.0))
    }
}

/// Chords of every winding, in current order, at most about `max`.
pub fn chords(design: &Design, layout: &Board, cond: &Conductor, max: usize) -> Vec<Chord> {
    let pitch = design.coil.trace_width + design.coil.clearance;
    let (mut step, mut sag) = (2.0 * pitch, pitch / 20.0);
    let mut n = count(layout, step, sag);
    for _ in 0..4 {
        if n <= max {
            break;
        }
        let k = n as f64 / max as f64 * 1.05;
        step *= k;
        sag *= k * k;
        n = count(layout, step, sag);
    }
    // Voltage: group g spans its windings' mean length's share.
    let groups = layout
        .windings
        .iter()
        .map(|w| w.group + 1)
        .max()
        .unwrap_or(1);
    let mut glen = vec![(0.0, 0usize); groups];
    for w in &layout.windings {
        let len: f64 = layout
            .winding_tracks(w)
            .iter()
            .map(|t| t.segment.length())
            .sum();
        glen[w.group].0 += len;
        glen[w.group].1 += 1;
    }
    let glen: Vec<f64> = glen.iter().map(|(l, k)| l / (*k).max(1) as f64).collect();
    let total: f64 = glen.iter().sum::<f64>().max(1e-12);
    let mut start = vec![0.0; groups];
    for g in 1..groups {
        start[g] = start[g - 1] + glen[g - 1] / total;
    }
    let mut out = Vec::with_capacity(n);
    let mut piece = 0;
    for (wi, w) in layout.windings.iter().enumerate() {
        let tracks = layout.winding_tracks(w);
        let span = glen[w.group] / total;
        let own: f64 = tracks
            .iter()
            .map(|t| t.segment.length())
            .sum::<f64>()
            .max(1e-12);
        let mut along = 0.0;
        for t in tracks {
            let p = &cond.pieces[piece.min(cond.pieces.len() - 1)];
            piece += 1;
            let k = parts(&t.segment, step, sag);
            let len = t.segment.length();
            for i in 0..k {
                let (u0, u1) = (i as f64 / k as f64, (i + 1) as f64 / k as f64);
                let v0 = start[w.group] + span * (along + u0 * len) / own;
                let v1 = start[w.group] + span * (along + u1 * len) / own;
                out.push(Chord {
                    a: t.segment.point_at(u0),
                    b: t.segment.point_at(u1),
                    z: p.z,
                    layer: w.layer,
                    winding: wi,
                    width: m(t.width),
                    thickness: p.thickness,
                    weight: p.weight,
                    volt: (v0, v1),
                    lead: t.role != TrackRole::Winding,
                });
            }
            along += len;
        }
    }
    out
}

/// Chords of one track: at most `step` long, arcs with at most `sag`
/// sagitta (mm).
fn parts(s: &Segment, step: f64, sag: f64) -> usize {
    let by_length = (s.length() / step).ceil().max(1.0) as usize;
    match s {
        Segment::Line(_) => by_length,
        Segment::Arc(a) => {
            let r = (a.start - a.center).length().max(1e-9);
            let max_angle = 2.0 * (1.0 - (sag / r).min(1.0)).acos();
            let by_angle = (a.sweep.abs() / max_angle.max(1e-6)).ceil() as usize;
            by_length.max(by_angle).max(1)
        }
    }
}

fn count(layout: &Board, step: f64, sag: f64) -> usize {
    layout
        .windings
        .iter()
        .flat_map(|w| layout.winding_tracks(w))
        .map(|t| parts(&t.segment, step, sag))
        .sum()
}

/// The chords by the square cells (side `cell`, mm) of their layer that
/// they pass through, for neighbour searches: each chord is listed in
/// every cell met at steps of half a cell along it.
///
/// The cells are a dense grid over the chords' extent (one count per
/// cell, then the list in cell order: no hashing), or, where that grid
/// would be far larger than the list, the list sorted by cell and
/// searched; both give the same chords for a cell.
pub struct CellIndex {
    cell: f64,
    store: CellStore,
}

enum CellStore {
    /// Cells `(layer, ix, iy)` from `lo` on, `n` per axis and `layers`
    /// layers (0 ..= the highest); the chords of cell `c` are
    /// `items[start[c]..start[c + 1]]`.
    Dense {
        lo: (i64, i64),
        n: (i64, i64),
        layers: u8,
        start: Vec<u32>,
        items: Vec<u32>,
    },
    /// `(layer, ix, iy, chord)`, sorted.
    Sorted(Vec<(u8, i64, i64, u32)>),
}

/// `x.floor() as i64` without the library call (exact: the truncation,
/// one lower for a negative non-integer; saturating like the cast).
fn floor_i64(x: f64) -> i64 {
    let t = x as i64;
    if (t as f64) > x {
        t.saturating_sub(1)
    } else {
        t
    }
}

/// The cell along one axis of the points of a chord taken in order:
/// `floor(v / cell)` of each, which can only move one way (the points
/// `a + (b - a) t` are monotone in `t` in floating point too), so the
/// division is skipped while a point is clearly inside the current cell.
struct Axis {
    cell: f64,
    rising: bool,
    /// Current cell and the bound the next point must stay below (rising)
    /// or at or above (falling) to be in it for certain.
    at: Option<(i64, f64)>,
}

impl Axis {
    fn new(delta: f64, cell: f64) -> Axis {
        Axis {
            cell,
            rising: delta >= 0.0,
            at: None,
        }
    }

    fn cell(&mut self, v: f64) -> i64 {
        if let Some((i, bound)) = self.at
            && (if self.rising { v < bound } else { v >= bound })
        {
            return i;
        }
        let i = floor_i64(v / self.cell);
        // The edge the points move towards, pulled into the cell by far
        // more than the rounding of the division (and off zero).
        let edge = (if self.rising { i + 1 } else { i }) as f64 * self.cell;
        let margin = edge.abs() * 1e-9 + 1e-290;
        self.at = Some((
            i,
            if self.rising {
                edge - margin
            } else {
                edge + margin
            },
        ));
        i
    }
}

impl CellIndex {
    /// The index of `chords` in cells of side `cell` (mm).
    pub fn new(chords: &[Chord], cell: f64) -> CellIndex {
        CellIndex::build(chords, cell, true)
    }

    /// [`CellIndex::new`], the dense grid only when `dense` allows it.
    fn build(chords: &[Chord], cell: f64, dense: bool) -> CellIndex {
        let at = |x: f64| floor_i64(x / cell);
        // Points on a chord are within rounding of its ends: one cell of
        // margin holds them all.
        let (mut lo, mut hi) = ((i64::MAX, i64::MAX), (i64::MIN, i64::MIN));
        let (mut layers, mut samples) = (0u8, 0usize);
        for c in chords {
            for p in [c.a, c.b] {
                lo = (lo.0.min(at(p.x) - 1), lo.1.min(at(p.y) - 1));
                hi = (hi.0.max(at(p.x) + 1), hi.1.max(at(p.y) + 1));
            }
            layers = layers.max(c.layer);
            samples += steps(c, cell) + 1;
        }
        let n = (hi.0 - lo.0 + 1, hi.1 - lo.1 + 1);
        let cells = (n.0 as u128) * (n.1 as u128) * (u128::from(layers) + 1);
        // Each chord's cells in order along it, `visit(layer, ix, iy)`.
        if !dense || chords.is_empty() || cells > 2 * samples as u128 + 4096 {
            let mut pairs: Vec<(u8, i64, i64, u32)> = Vec::with_capacity(samples);
            for (i, c) in chords.iter().enumerate() {
                along(c, cell, |l, x, y| pairs.push((l, x, y, i as u32)));
            }
            pairs.sort_unstable();
            return CellIndex {
                cell,
                store: CellStore::Sorted(pairs),
            };
        }
        let id =
            |l: u8, x: i64, y: i64| ((i64::from(l) * n.0 + (x - lo.0)) * n.1 + (y - lo.1)) as u32;
        let mut pairs: Vec<(u32, u32)> = Vec::with_capacity(samples);
        for (i, c) in chords.iter().enumerate() {
            along(c, cell, |l, x, y| pairs.push((id(l, x, y), i as u32)));
        }
        let mut start = vec![0u32; cells as usize + 1];
        for &(c, _) in &pairs {
            start[c as usize + 1] += 1;
        }
        for c in 1..start.len() {
            start[c] += start[c - 1];
        }
        let mut fill = start.clone();
        let mut items = vec![0u32; pairs.len()];
        for &(c, i) in &pairs {
            items[fill[c as usize] as usize] = i;
            fill[c as usize] += 1;
        }
        CellIndex {
            cell,
            store: CellStore::Dense {
                lo,
                n,
                layers,
                start,
                items,
            },
        }
    }

    /// The cell of a point, `(ix, iy)`.
    pub fn cell_of(&self, p: Point) -> (i64, i64) {
        (floor_i64(p.x / self.cell), floor_i64(p.y / self.cell))
    }

    /// Appends the chords listed in the 3 x 3 cells around `(ix, iy)` on
    /// `layer` to `out` (a chord once per cell it is listed in).
    pub fn around(&self, layer: u8, (ix, iy): (i64, i64), out: &mut Vec<usize>) {
        match &self.store {
            CellStore::Dense {
                lo,
                n,
                layers,
                start,
                items,
            } => {
                if layer > *layers {
                    return;
                }
                let y0 = (iy - 1 - lo.1).max(0);
                let y1 = (iy + 1 - lo.1).min(n.1 - 1);
                if y0 > y1 {
                    return;
                }
                for x in (ix - 1 - lo.0).max(0)..=(ix + 1 - lo.0).min(n.0 - 1) {
                    let row = (i64::from(layer) * n.0 + x) * n.1;
                    let (a, b) = ((row + y0) as usize, (row + y1) as usize + 1);
                    let items = &items[start[a] as usize..start[b] as usize];
                    out.extend(items.iter().map(|&i| i as usize));
                }
            }
            CellStore::Sorted(pairs) => {
                for x in ix - 1..=ix + 1 {
                    let from = pairs.partition_point(|p| (p.0, p.1, p.2) < (layer, x, iy - 1));
                    out.extend(
                        pairs[from..]
                            .iter()
                            .take_while(|p| (p.0, p.1, p.2) <= (layer, x, iy + 1))
                            .map(|p| p.3 as usize),
                    );
                }
            }
        }
    }
}

/// Calls `visit(layer, ix, iy)` with each cell a chord passes through, in
/// order along it (its points half a cell apart, consecutive repeats
/// skipped), for [`CellIndex`].
fn along(c: &Chord, cell: f64, mut visit: impl FnMut(u8, i64, i64)) {
    let steps = steps(c, cell);
    let d = c.b - c.a;
    let (mut x, mut y) = (Axis::new(d.x, cell), Axis::new(d.y, cell));
    let mut last = None;
    for k in 0..=steps {
        let p = c.a.lerp(c.b, k as f64 / steps as f64);
        let here = (x.cell(p.x), y.cell(p.y));
        if last != Some(here) {
            visit(c.layer, here.0, here.1);
            last = Some(here);
        }
    }
}

/// Samples (less one) along a chord for [`CellIndex`]: half a cell apart.
fn steps(c: &Chord, cell: f64) -> usize {
    ((c.b - c.a).length() / (cell / 2.0)).ceil().max(1.0) as usize
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The dense grid and the sorted list list the same chords around
    /// every cell, and a chord is listed around the cell of each of its
    /// points at half-cell steps (chords on three layers, at every angle,
    /// including negative coordinates).
    #[test]
    fn cell_index_forms_agree() {
        let mut chords = Vec::new();
        for k in 0..60u32 {
            let a = f64::from(k) * 0.37;
            let (r, len) = (1.0 + f64::from(k % 7), 0.2 + f64::from(k % 5) * 0.9);
            let p = Point::new(r * a.cos() - 3.0, r * a.sin() + 0.5);
            chords.push(Chord {
                a: p,
                b: Point::new(p.x + len * a.sin(), p.y - len * a.cos()),
                z: 0.0,
                layer: (k % 3 + 1) as u8,
                winding: 0,
                width: 1e-4,
                thickness: 1.8e-5,
                weight: 1.0,
                volt: (0.0, 1.0),
                lead: false,
            });
        }
        let cell = 0.45;
        let (dense, sorted) = (
            CellIndex::build(&chords, cell, true),
            CellIndex::build(&chords, cell, false),
        );
        assert!(matches!(dense.store, CellStore::Dense { .. }));
        assert!(matches!(sorted.store, CellStore::Sorted(_)));
        let listed = |index: &CellIndex, layer: u8, at: (i64, i64)| {
            let mut out = Vec::new();
            index.around(layer, at, &mut out);
            out.sort_unstable();
            out.dedup();
            out
        };
        for layer in 0..=4u8 {
            for ix in -25..15 {
                for iy in -20..20 {
                    assert_eq!(
                        listed(&dense, layer, (ix, iy)),
                        listed(&sorted, layer, (ix, iy))
                    );
                }
            }
        }
        for (i, c) in chords.iter().enumerate() {
            for k in 0..=10 {
                let at = dense.cell_of(c.a.lerp(c.b, f64::from(k) / 10.0));
                assert!(listed(&dense, c.layer, at).contains(&i), "chord {i}");
            }
        }
        // The shortcut of the cells along a chord gives the plain floor.
        for (a, b) in [
            (-3.7, 5.2),
            (5.2, -3.7),
            (0.0, 0.0),
            (-1e-300, 1e-300),
            (0.4, 0.4 * 7.0),
        ] {
            let (mut ax, n) = (Axis::new(b - a, 0.4), 997);
            for k in 0..=n {
                let v = a + (b - a) * (f64::from(k) / f64::from(n));
                assert_eq!(ax.cell(v), (v / 0.4).floor() as i64, "{a} {b} {k}");
            }
        }
        // The floor without the library call, at and near integers.
        for x in [
            -2.0, -1.5, -1.0, -0.5, -0.0, 0.0, 0.5, 1.0, 2.5, -1e-300, 1e-300,
        ] {
            assert_eq!(floor_i64(x), x.floor() as i64, "{x}");
        }
    }
}
