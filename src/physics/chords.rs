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
            // Each chord starts where the one before ended (the same
            // point, computed once).
            let mut a = t.segment.point_at(0.0);
            for i in 0..k {
                let (u0, u1) = (i as f64 / k as f64, (i + 1) as f64 / k as f64);
                let v0 = start[w.group] + span * (along + u0 * len) / own;
                let v1 = start[w.group] + span * (along + u1 * len) / own;
                let b = t.segment.point_at(u1);
                out.push(Chord {
                    a,
                    b,
                    z: p.z,
                    layer: w.layer,
                    winding: wi,
                    width: m(t.width),
                    thickness: p.thickness,
                    weight: p.weight,
                    volt: (v0, v1),
                    lead: t.role != TrackRole::Winding,
                });
                a = b;
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
    /// The cells `(layer, ix, iy)` listed, sorted, and beside each its
    /// chord.
    Sorted {
        cells: Vec<(u8, i64, i64)>,
        items: Vec<u32>,
    },
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
        let counts: Vec<usize> = chords.iter().map(|c| steps(c, cell)).collect();
        for (c, &k) in chords.iter().zip(&counts) {
            for p in [c.a, c.b] {
                lo = (lo.0.min(at(p.x) - 1), lo.1.min(at(p.y) - 1));
                hi = (hi.0.max(at(p.x) + 1), hi.1.max(at(p.y) + 1));
            }
            layers = layers.max(c.layer);
            samples += k + 1;
        }
        let n = (hi.0 - lo.0 + 1, hi.1 - lo.1 + 1);
        let cells = (n.0 as u128) * (n.1 as u128) * (u128::from(layers) + 1);
        let mut buf = Vec::new();
        // Each chord's cells in order along it, `visit(layer, ix, iy)`.
        if !dense || chords.is_empty() || cells > 2 * samples as u128 + 4096 {
            let mut pairs: Vec<(u8, i64, i64, u32)> = Vec::with_capacity(samples);
            for (i, c) in chords.iter().enumerate() {
                along(c, cell, counts[i], &mut buf, |l, x, y| {
                    pairs.push((l, x, y, i as u32))
                });
            }
            pairs.sort_unstable();
            return CellIndex {
                cell,
                store: CellStore::Sorted {
                    cells: pairs.iter().map(|p| (p.0, p.1, p.2)).collect(),
                    items: pairs.iter().map(|p| p.3).collect(),
                },
            };
        }
        let id =
            |l: u8, x: i64, y: i64| ((i64::from(l) * n.0 + (x - lo.0)) * n.1 + (y - lo.1)) as u32;
        let mut pairs: Vec<(u32, u32)> = Vec::with_capacity(samples);
        for (i, c) in chords.iter().enumerate() {
            along(c, cell, counts[i], &mut buf, |l, x, y| {
                pairs.push((id(l, x, y), i as u32))
            });
        }
        // Counts, their running sums (where each cell's list ends), then
        // the chords placed from the back, which leaves `start[c]` at the
        // cell's first entry (the chords of a cell in chord order).
        let mut start = vec![0u32; cells as usize + 1];
        for &(c, _) in &pairs {
            start[c as usize] += 1;
        }
        let mut sum = 0;
        for s in start.iter_mut() {
            sum += *s;
            *s = sum;
        }
        let mut items = vec![0u32; pairs.len()];
        for &(c, i) in pairs.iter().rev() {
            let s = &mut start[c as usize];
            *s -= 1;
            items[*s as usize] = i;
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
    pub fn around(&self, layer: u8, at: (i64, i64), out: &mut Vec<usize>) {
        for row in self.rows_around(layer, at) {
            out.extend(row.iter().map(|&i| i as usize));
        }
    }

    /// The chords listed in the 3 x 3 cells around `(ix, iy)` on `layer`,
    /// a slice per column of cells ([`CellIndex::around`] without the
    /// list).
    pub fn rows_around(&self, layer: u8, (ix, iy): (i64, i64)) -> [&[u32]; 3] {
        let mut rows: [&[u32]; 3] = [&[], &[], &[]];
        match &self.store {
            CellStore::Dense {
                lo,
                n,
                layers,
                start,
                items,
            } => {
                let y0 = (iy - 1 - lo.1).max(0);
                let y1 = (iy + 1 - lo.1).min(n.1 - 1);
                if layer > *layers || y0 > y1 {
                    return rows;
                }
                let x0 = (ix - 1 - lo.0).max(0);
                for (row, x) in rows.iter_mut().zip(x0..=(ix + 1 - lo.0).min(n.0 - 1)) {
                    let at = (i64::from(layer) * n.0 + x) * n.1;
                    let (a, b) = ((at + y0) as usize, (at + y1) as usize + 1);
                    *row = &items[start[a] as usize..start[b] as usize];
                }
            }
            CellStore::Sorted { cells, items } => {
                for (row, x) in rows.iter_mut().zip(ix - 1..=ix + 1) {
                    let a = cells.partition_point(|&c| c < (layer, x, iy - 1));
                    let b = cells.partition_point(|&c| c <= (layer, x, iy + 1));
                    *row = &items[a..b];
                }
            }
        }
        rows
    }
}

/// Calls `visit(layer, ix, iy)` with each cell a chord passes through, in
/// order along it (its points half a cell apart, consecutive repeats
/// skipped), for [`CellIndex`]; `steps` is [`steps`] of the chord.
///
/// The points are not all computed: on each axis the cell moves by one at
/// the first point past the next cell edge, and which point that is
/// follows from the straight line, or from a few points where one lies
/// too near an edge for the line to decide ([`Crossings`]); the cells
/// are those of every point ([`along_each`], also taken for a chord with
/// a coordinate that is not finite).
fn along(
    c: &Chord,
    cell: f64,
    steps: usize,
    cells: &mut Vec<(i64, i64)>,
    mut visit: impl FnMut(u8, i64, i64),
) {
    let p0 = c.a.lerp(c.b, 0.0);
    let start = (floor_i64(p0.x / cell), floor_i64(p0.y / cell));
    let (Some(mut x), Some(mut y)) = (
        Crossings::new(c.a.x, c.b.x, start.0, cell, steps),
        Crossings::new(c.a.y, c.b.y, start.1, cell, steps),
    ) else {
        return along_each(c, cell, steps, visit);
    };
    // Decide the whole chord before visiting, so that the fallback can
    // start over.
    cells.clear();
    cells.push(start);
    loop {
        let (kx, ky) = (x.next, y.next);
        let k = kx.min(ky);
        if k > steps {
            break;
        }
        let mut here = cells[cells.len() - 1];
        if kx == k {
            here.0 = x.step(k);
        }
        if ky == k {
            here.1 = y.step(k);
        }
        cells.push(here);
    }
    for &(ix, iy) in cells.iter() {
        visit(c.layer, ix, iy);
    }
}

/// [`along`] point by point: each point `a + (b - a) k / steps`, its cell
/// by [`Axis`].
fn along_each(c: &Chord, cell: f64, steps: usize, mut visit: impl FnMut(u8, i64, i64)) {
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

/// The points of a chord at which its cell along one axis changes: the
/// points `a + (b - a) k / steps` are half a cell apart or less, so the
/// cell moves by one at a time, at the first `k` past
/// `steps (edge - a) / (b - a)` for the next edge. That `k` is taken from
/// the line only when the ratio is farther from a whole number than `1e-9`
/// of its own size and of the coordinates' over the step (a million times
/// the rounding of the points, of their division by the cell and of the
/// ratio itself); otherwise the points decide, halving the span (the
/// cells move one way along the chord).
struct Crossings {
    a: f64,
    /// `b - a`.
    d: f64,
    /// `steps / (b - a)`.
    scale: f64,
    cell: f64,
    steps: usize,
    /// The cell's step along the chord, +1 or -1 (0: the axis is constant).
    dir: i64,
    /// Current cell.
    at: i64,
    /// The point at which the cell next changes (past `steps`: none).
    next: usize,
    /// The coordinates' size over the step, for the tolerance.
    size: f64,
}

impl Crossings {
    fn new(a: f64, b: f64, at: i64, cell: f64, steps: usize) -> Option<Crossings> {
        let d = b - a;
        if !(a.is_finite() && d.is_finite()) {
            return None;
        }
        let mut x = Crossings {
            a,
            d,
            scale: steps as f64 / d,
            cell,
            steps,
            dir: if d > 0.0 {
                1
            } else if d < 0.0 {
                -1
            } else {
                0
            },
            at,
            next: usize::MAX,
            size: 0.0,
        };
        // The same cell at both ends: the same all along.
        if x.dir != 0 && x.cell_at(steps) != at {
            x.size = (1.0 + a.abs() + d.abs()) * (steps as f64 / d.abs());
            x.next = x.find(0);
        }
        Some(x)
    }

    /// The cell of point `k`, as [`along_each`] computes it.
    fn cell_at(&self, k: usize) -> i64 {
        floor_i64((self.a + self.d * (k as f64 / self.steps as f64)) / self.cell)
    }

    /// The first point after `k` in the next cell (past `steps`: none):
    /// from the line, or, when the line cannot tell, by halving the
    /// points after `k` (the cells move one way).
    fn find(&self, k: usize) -> usize {
        let edge = (if self.dir > 0 { self.at + 1 } else { self.at }) as f64 * self.cell;
        let ratio = (edge - self.a) * self.scale;
        let tol = 1e-9 * (ratio.abs() + self.size * (1.0 + edge.abs()));
        if ratio.is_finite() && tol < 0.25 {
            if ratio - tol > self.steps as f64 {
                return usize::MAX;
            }
            let whole = floor_i64(ratio);
            let frac = ratio - whole as f64;
            if frac > tol && 1.0 - frac > tol && whole >= k as i64 {
                return whole as usize + 1;
            }
        }
        if self.cell_at(self.steps) == self.at {
            return usize::MAX;
        }
        // The cell at `hi` has changed, at `lo` not.
        let (mut lo, mut hi) = (k, self.steps);
        while hi - lo > 1 {
            let m = lo + (hi - lo) / 2;
            if self.cell_at(m) == self.at {
                lo = m;
            } else {
                hi = m;
            }
        }
        hi
    }

    /// Moves into the next cell at point `k`; its cell.
    fn step(&mut self, k: usize) -> i64 {
        self.at += self.dir;
        self.next = self.find(k);
        self.at
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
        assert!(matches!(sorted.store, CellStore::Sorted { .. }));
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
        // The cells along a chord from its edges' crossings are those of
        // every point: chords at every angle, from and to cell edges and
        // corners, along an axis, nearly along one, and of zero length.
        let cells = |c: &Chord, fast: bool| {
            let (mut out, mut buf) = (Vec::new(), Vec::new());
            let k = steps(c, cell);
            if fast {
                along(c, cell, k, &mut buf, |_, x, y| out.push((x, y)));
            } else {
                along_each(c, cell, k, |_, x, y| out.push((x, y)));
            }
            out
        };
        let mut ends = Vec::new();
        for k in 0..400u32 {
            let a = f64::from(k) * 0.173;
            let len = 0.05 + f64::from(k % 23) * 0.61;
            let p = Point::new(
                f64::from(k % 9) * 0.37 - 1.6,
                f64::from(k % 13) * -0.29 + 1.1,
            );
            ends.push((p, Point::new(p.x + len * a.cos(), p.y + len * a.sin())));
        }
        for (i, j) in [(-3i32, 4i32), (0, 7), (5, -2), (-1, -1), (2, 2)] {
            let e = |n: i32| f64::from(n) * cell;
            ends.push((Point::new(e(i), e(j)), Point::new(e(j), e(i))));
            ends.push((Point::new(e(i), 0.3), Point::new(e(i), 4.1)));
            ends.push((Point::new(e(i), e(j)), Point::new(e(i) + 1e-15, e(j) - 2.3)));
            ends.push((Point::new(e(i), e(j)), Point::new(e(i), e(j))));
            ends.push((Point::new(e(i) + 0.1, -0.0), Point::new(e(j) + 0.1, 7e-16)));
        }
        for (a, b) in ends {
            let c = Chord { a, b, ..chords[0] };
            assert_eq!(cells(&c, true), cells(&c, false), "{a:?} {b:?}");
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
