//! The annular-sector spiral of a coreless stator coil: every turn is the
//! sector's outline offset inward, with the outer arc, the inner arc (both
//! about the ring's centre), the two straight sides (parallel to the
//! slot's bounding rays) and four rounded corners.
//!
//! Edge `k` of the spiral (from the inner end outward) is of kind `k mod 4`:
//! 0 the outer arc (crossing +x, where the spiral starts), 1 the side on
//! +y, 2 the inner arc, 3 the side on -y. Its centre line lies
//! `D(k) = D0 - p k / 4` inside the outline (the outermost turn's outer
//! copper edge), so the same edge one turn later is exactly one pitch
//! further out, as the polygon spiral's sides are (`polygon.rs`): the outer
//! arc's radius grows by a pitch, the inner arc's shrinks by a pitch, the
//! sides move parallel to themselves. The corner after edge `k` is an arc
//! of radius `max(Rf - D(k), p / 2)` (`Rf` the outline's corner radius)
//! tangent to both edges. While the first term holds, its centre is the
//! same for the same corner of every turn (concentric corners: the pitch
//! stays exact around them); further in, the radius stays at half a pitch
//! (so the copper's inner edge keeps a radius of half a clearance), which
//! rounds those corners more than an exact offset would, so neighbouring
//! turns there are farther apart than the pitch, never closer.
//!
//! The outermost turn's copper lies inside the outline: exactly within the
//! annulus and the sides; at a corner whose two edges are a quarter pitch
//! apart in offset, the corner's centre sits a little off the outline
//! corner's, so its copper may pass the outline's rounded corner by an
//! amount second order in that step (51 nm for a 0.3 mm pitch and 1 mm
//! corners; tested), never the annulus or the sides.
//!
//! `SpiralSpec::inner` is, for a sector, the smallest distance of the
//! innermost turn's centre line from the axis (the free radius plus half a
//! trace), which fixes `D0`.
//!
//! # Units
//! Millimetres and radians.

use super::{SpiralError, SpiralSpec};
use crate::design::Shape;
use crate::geometry::{Arc, Point, Segment, Vec2, angle_between};
use std::f64::consts::PI;

/// A sector's outline in the coil's own frame (axis at the origin, the
/// ring's centre on -x).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(in crate::geometry) struct SectorOutline {
    /// The ring's centre.
    pub centre: Point,
    /// Inner radius of the annulus, mm.
    pub inner: f64,
    /// Outer radius of the annulus, mm.
    pub outer: f64,
    /// Half the slot angle, radians.
    pub half_angle: f64,
    /// Distance of each side from its slot ray (half the spacing), mm.
    pub half_gap: f64,
    /// Corner radius of the outline, mm.
    pub corner: f64,
}

/// One edge of a turn's centre line, about the ring's centre.
#[derive(Debug, Clone, Copy)]
enum Edge {
    /// An arc of this radius; `outer`: the outer arc (run counter-clockwise
    /// about the ring's centre), else the inner arc (clockwise).
    Arc { radius: f64, outer: bool },
    /// The line `n . (x - centre) = -h` (`n` the outward normal), run along
    /// `u` when `outward`, against it otherwise.
    Line {
        n: Vec2,
        u: Vec2,
        h: f64,
        outward: bool,
    },
}

impl SectorOutline {
    /// The outline of a sector shape (`None` for other shapes).
    pub fn of(shape: &Shape) -> Option<SectorOutline> {
        match *shape {
            Shape::Sector {
                count,
                inner_radius,
                outer_radius,
                spacing,
                corner_radius,
            } => Some(SectorOutline {
                centre: Point::new(-(inner_radius + outer_radius) / 2.0, 0.0),
                inner: inner_radius,
                outer: outer_radius,
                half_angle: PI / count.max(2) as f64,
                half_gap: spacing / 2.0,
                corner: corner_radius,
            }),
            _ => None,
        }
    }

    /// Unit vector along a side, away from the ring's centre (`left`: the
    /// side on +y).
    fn along(&self, left: bool) -> Vec2 {
        let b = self.half_angle;
        Vec2::new(b.cos(), if left { b.sin() } else { -b.sin() })
    }

    /// Outward unit normal of a side.
    pub fn normal(&self, left: bool) -> Vec2 {
        let b = self.half_angle;
        Vec2::new(-b.sin(), if left { b.cos() } else { -b.cos() })
    }

    /// Inset `D0` of edge 0 of a spiral whose centre line comes no closer
    /// than `inner` to the axis, pitch `p`: the nearest edges of the first
    /// turn are the outer arc on +x (edge 0) and the side on +y (edge 1, a
    /// quarter pitch further out); the inner arc and the other side lie
    /// farther (half and three quarters of a pitch further out, and the
    /// annulus's half width is the same on both arcs). A side's distance is
    /// that of its line (its foot lies on the side for any sector whose
    /// slot is not wider than its depth; otherwise the free centre is
    /// larger than stated, which is safe).
    pub fn first_inset(&self, inner: f64, p: f64) -> f64 {
        let a = (self.outer - self.inner) / 2.0;
        let rc = -self.centre.x;
        let b = rc * self.half_angle.sin() - self.half_gap;
        a.min(b + p / 4.0) - inner
    }

    /// Edge `k` of a spiral whose edge 0 is `d0` inside the outline.
    fn edge(&self, k: usize, d0: f64, p: f64) -> Edge {
        let d = d0 - p * k as f64 / 4.0;
        match k % 4 {
            0 => Edge::Arc {
                radius: self.outer - d,
                outer: true,
            },
            2 => Edge::Arc {
                radius: self.inner + d,
                outer: false,
            },
            kind => {
                let left = kind == 1;
                Edge::Line {
                    n: self.normal(left),
                    u: self.along(left),
                    h: self.half_gap + d,
                    outward: !left,
                }
            }
        }
    }

    /// Corner radius after edge `k`.
    fn corner_radius(&self, k: usize, d0: f64, p: f64) -> f64 {
        (self.corner - (d0 - p * k as f64 / 4.0)).max(p / 2.0)
    }

    /// The corner after edge `k` with radius `r`: its centre, and its
    /// tangent points on edge `k` and on edge `k + 1`.
    fn corner(&self, k: usize, d0: f64, p: f64, r: f64) -> Result<(Point, Point, Point), ()> {
        let (e1, e2) = (self.edge(k, d0, p), self.edge(k + 1, d0, p));
        let (arc_first, (radius, outer), (n, u, h)) = match (e1, e2) {
            (Edge::Arc { radius, outer }, Edge::Line { n, u, h, .. }) => {
                (true, (radius, outer), (n, u, h))
            }
            (Edge::Line { n, u, h, .. }, Edge::Arc { radius, outer }) => {
                (false, (radius, outer), (n, u, h))
            }
            _ => return Err(()),
        };
        let reach = if outer { radius - r } else { radius + r };
        let off = h + r;
        if reach <= off || r <= 0.0 {
            return Err(());
        }
        let t = (reach * reach - off * off).sqrt();
        let c = u * t - n * off;
        let on_arc = self.centre + c * (radius / c.length());
        let on_line = self.centre + c + n * r;
        let c = self.centre + c;
        Ok(if arc_first {
            (c, on_arc, on_line)
        } else {
            (c, on_line, on_arc)
        })
    }

    /// The piece of `edge` from `from` to `to` (both on it), checked to run
    /// the edge's way.
    fn piece(&self, edge: Edge, from: Point, to: Point) -> Result<Segment, ()> {
        match edge {
            Edge::Arc { outer, .. } => {
                let sweep = angle_between(from - self.centre, to - self.centre);
                if (outer && sweep < 0.0) || (!outer && sweep > 0.0) {
                    return Err(());
                }
                Ok(Segment::Arc(Arc {
                    center: self.centre,
                    start: from,
                    end: to,
                    sweep,
                }))
            }
            Edge::Line { u, outward, .. } => {
                let run = (to - from).dot(u);
                if (outward && run < 0.0) || (!outward && run > 0.0) {
                    return Err(());
                }
                Ok(Segment::line(from, to))
            }
        }
    }

    /// Pushes edge `k` from `at` to its corner and that corner; returns
    /// where the corner ends.
    fn edge_and_corner(
        &self,
        k: usize,
        d0: f64,
        p: f64,
        at: Point,
        out: &mut Vec<Segment>,
    ) -> Result<Point, ()> {
        let r = self.corner_radius(k, d0, p);
        let (c, t1, t2) = self.corner(k, d0, p, r)?;
        out.push(self.piece(self.edge(k, d0, p), at, t1)?);
        let sweep = angle_between(t1 - c, t2 - c);
        if sweep <= 0.0 {
            return Err(());
        }
        out.push(Segment::Arc(Arc {
            center: c,
            start: t1,
            end: t2,
            sweep,
        }));
        Ok(t2)
    }

    /// The point where edges `a` and `b` (one an arc, one a side) cross on
    /// the far side of the ring's centre.
    fn crossing(&self, a: Edge, b: Edge) -> Point {
        let (radius, (n, u, h)) = match (a, b) {
            (Edge::Arc { radius, .. }, Edge::Line { n, u, h, .. })
            | (Edge::Line { n, u, h, .. }, Edge::Arc { radius, .. }) => (radius, (n, u, h)),
            _ => return self.centre,
        };
        let t = (radius * radius - h * h).max(0.0).sqrt();
        self.centre + u * t - n * h
    }

    /// How far copper of centre line `segs`, tracks `2 half_width` wide,
    /// reaches beyond the outline (negative: inside), mm: the worst of the
    /// outer arc, the inner arc and the two sides.
    pub fn overreach(&self, segs: &[Segment], half_width: f64) -> f64 {
        let shift = Point::ORIGIN - self.centre;
        let moved: Vec<Segment> = segs.iter().map(|s| shifted(s, shift)).collect();
        let far = moved.iter().map(|s| s.max_radius()).fold(0.0, f64::max);
        let near = moved
            .iter()
            .map(|s| s.min_radius())
            .fold(f64::INFINITY, f64::min);
        let side = |left: bool| {
            let n = self.normal(left);
            moved
                .iter()
                .map(|s| s.support(n))
                .fold(f64::NEG_INFINITY, f64::max)
                + self.half_gap
        };
        (far + half_width - self.outer)
            .max(self.inner - (near - half_width))
            .max(side(true) + half_width)
            .max(side(false) + half_width)
    }
}

/// A segment moved by `v`.
pub(in crate::geometry) fn shifted(s: &Segment, v: Vec2) -> Segment {
    match *s {
        Segment::Line(l) => Segment::line(l.start + v, l.end + v),
        Segment::Arc(a) => Segment::Arc(Arc {
            center: a.center + v,
            start: a.start + v,
            end: a.end + v,
            sweep: a.sweep,
        }),
    }
}

impl SpiralSpec {
    /// Whole turns of a sector spiral, enough to cover `turns`.
    pub(in crate::geometry) fn sector_whole(
        &self,
        g: &SectorOutline,
    ) -> Result<Vec<Segment>, SpiralError> {
        if self.inner <= 0.0 {
            return Err(SpiralError::NoCentre);
        }
        let edges = (self.turns * 4.0).ceil() as usize + 2;
        self.sector_edges(g, edges)
            .map_err(|()| self.corner_error(g))
    }

    /// Edges `0..edges` with their corners, from the inner end on +x.
    fn sector_edges(&self, g: &SectorOutline, edges: usize) -> Result<Vec<Segment>, ()> {
        let p = self.pitch;
        let d0 = g.first_inset(self.inner, p);
        let start = g.centre + Vec2::new(g.outer - d0, 0.0);
        // The corner before edge 0 (after a side a quarter pitch further
        // in) must end below the x axis: the spiral starts on the outer
        // arc's centre line, on +x. Edge 3 of a spiral one pitch further
        // in is that side, and its edge 4 is edge 0.
        let r = g.corner_radius(3, d0 + p, p);
        let (_, _, t) = g.corner(3, d0 + p, p, r)?;
        if t.y >= 0.0 || start.x <= 0.0 {
            return Err(());
        }
        let mut out = Vec::with_capacity(2 * edges);
        let mut at = start;
        for k in 0..edges {
            at = g.edge_and_corner(k, d0, p, at, &mut out)?;
        }
        Ok(out)
    }

    /// The error of a sector whose corners leave no edge on some turn,
    /// with the largest outline corner radius that builds (by bisection).
    fn corner_error(&self, g: &SectorOutline) -> SpiralError {
        let edges = (self.turns * 4.0).ceil() as usize + 2;
        let builds = |r: f64| {
            let h = SectorOutline { corner: r, ..*g };
            self.sector_edges(&h, edges).is_ok()
        };
        if !builds(0.0) {
            return SpiralError::NoCentre;
        }
        let (mut lo, mut hi) = (0.0, g.corner);
        for _ in 0..40 {
            let mid = 0.5 * (lo + hi);
            if builds(mid) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        SpiralError::CornerTooLarge {
            radius: g.corner,
            max: lo,
        }
    }

    /// The lead ring of a sector spiral whose segments are `segs`
    /// ([`SpiralSpec::lead_ring`]): the spiral ends on edge `k`; the ring
    /// is edges `k + 2 ..= k + 5` (edge `k + 4` one pitch outside the end)
    /// with their regular corners, closed by one sharp corner between
    /// edges `k + 5` and `k + 2`, on the far side from the end.
    pub(super) fn sector_lead_ring(&self, g: &SectorOutline, segs: &[Segment]) -> Vec<Segment> {
        let p = self.pitch;
        let d0 = g.first_inset(self.inner, p);
        // Each edge and its corner are two segments: the end's edge.
        let k = segs.len().max(1).saturating_sub(1) / 2;
        let first = k + 2;
        let close = first + 3;
        let v0 = g.crossing(g.edge(close, d0, p), g.edge(first, d0, p));
        let mut out = Vec::with_capacity(8);
        let mut at = v0;
        for e in first..close {
            match g.edge_and_corner(e, d0, p, at, &mut out) {
                Ok(next) => at = next,
                Err(()) => break,
            }
        }
        if let Ok(s) = g.piece(g.edge(close, d0, p), at, v0) {
            out.push(s);
        } else {
            out.push(Segment::line(at, v0));
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::Corner;
    use std::f64::consts::TAU;

    /// A 9-slot ring 26 to 56 mm across, 0.3 mm apart, 1 mm corners.
    pub(crate) fn shape() -> Shape {
        Shape::Sector {
            count: 9,
            inner_radius: 13.0,
            outer_radius: 28.0,
            spacing: 0.3,
            corner_radius: 1.0,
        }
    }

    fn spec(inner: f64, turns: f64) -> SpiralSpec {
        SpiralSpec {
            shape: shape(),
            corner: Corner::Sharp,
            pitch: 0.3,
            inner,
            turns,
        }
    }

    /// Index of the turn a point of the spiral lies on: the polar angle
    /// swept from the start, in turns.
    fn turn_of(segs: &[Segment]) -> Vec<(f64, f64)> {
        let mut swept = 0.0;
        segs.iter()
            .map(|s| {
                let a = swept;
                swept += s.swept_about_origin();
                (a / TAU, swept / TAU)
            })
            .collect()
    }

    #[test]
    fn turns_are_one_pitch_apart_everywhere() {
        let s = spec(2.0, 8.0).segments().unwrap();
        let swept: f64 = s.iter().map(|x| x.swept_about_origin()).sum();
        assert!((swept / TAU - 8.0).abs() < 1e-9, "{}", swept / TAU);
        for w in s.windows(2) {
            assert!(w[0].end().distance(w[1].start()) < 1e-9);
        }
        // Sample the centre line; its distance to the rest of the spiral
        // one turn on (angle + 2 pi) is the pitch at the closest (exact
        // concentric offsets), and never less.
        let turns = turn_of(&s);
        let mut best = f64::INFINITY;
        for (i, a) in s.iter().enumerate() {
            for j in 0..=20 {
                let t = j as f64 / 20.0;
                let q = a.point_at(t);
                let at = turns[i].0 + t * (turns[i].1 - turns[i].0);
                if at + 1.0 > 8.0 {
                    continue;
                }
                let d = s
                    .iter()
                    .zip(&turns)
                    .filter(|(_, (lo, hi))| *hi > at + 0.5 && *lo < at + 1.5)
                    .map(|(b, _)| b.distance(q))
                    .fold(f64::INFINITY, f64::min);
                assert!(d > 0.3 - 1e-6, "turn gap {d} at {q:?}");
                best = best.min(d);
            }
        }
        assert!((best - 0.3).abs() < 1e-6, "{best}");
    }

    #[test]
    fn arcs_are_concentric_with_the_ring() {
        let g = SectorOutline::of(&shape()).unwrap();
        let s = spec(2.0, 6.0).segments().unwrap();
        let mut big = 0;
        for x in &s {
            if let Segment::Arc(a) = x
                && a.radius() > 5.0
            {
                big += 1;
                assert!(a.center.distance(g.centre) < 1e-12);
                assert!((a.end.distance(g.centre) - a.radius()).abs() < 1e-9);
            }
        }
        // An outer and an inner arc per turn, the first outer arc split.
        assert!(big >= 12, "{big}");
    }

    #[test]
    fn innermost_turn_keeps_the_free_radius() {
        let s = spec(2.0, 5.0).segments().unwrap();
        let near = s
            .iter()
            .map(|x| x.min_radius())
            .fold(f64::INFINITY, f64::min);
        assert!((near - 2.0).abs() < 1e-9, "{near}");
    }

    /// Copper (centre line and half a trace) of a spiral filling the
    /// outline stays inside it, rounded corners included: in each corner's
    /// zone (beyond its centre along both edges' outward normals) within the
    /// corner's radius of its centre, up to 0.1 um.
    #[test]
    fn copper_stays_inside_the_rounded_outline() {
        let g = SectorOutline::of(&shape()).unwrap();
        let (p, hw, turns) = (0.3, 0.075, 10.0);
        // The free centre at which ten turns just fill the outline.
        let reach = |inner: f64| g.overreach(&spec(inner, turns).segments().unwrap(), hw);
        let (mut lo, mut hi) = (0.5, 6.0);
        for _ in 0..60 {
            let mid = 0.5 * (lo + hi);
            if reach(mid) <= 0.0 {
                lo = mid
            } else {
                hi = mid
            }
        }
        assert!(reach(lo).abs() < 1e-9);
        let segs = spec(lo, turns).segments().unwrap();
        let mut tested = 0;
        let mut worst = f64::NEG_INFINITY;
        for k in 0..4 {
            // The outline's corner `k`: its edges at no offset, no pitch.
            let (c, _, _) = g.corner(k, 0.0, 0.0, g.corner).unwrap();
            let outward = |q: Point| match k {
                0 => (
                    (q - g.centre).length() - (c - g.centre).length(),
                    g.normal(true).dot(q - c),
                ),
                1 => (
                    (c - g.centre).length() - (q - g.centre).length(),
                    g.normal(true).dot(q - c),
                ),
                2 => (
                    (c - g.centre).length() - (q - g.centre).length(),
                    g.normal(false).dot(q - c),
                ),
                _ => (
                    (q - g.centre).length() - (c - g.centre).length(),
                    g.normal(false).dot(q - c),
                ),
            };
            for x in &segs {
                for j in 0..=50 {
                    let q = x.point_at(j as f64 / 50.0);
                    let (a, b) = outward(q);
                    if a > 0.0 && b > 0.0 {
                        tested += 1;
                        let over = q.distance(c) + hw - g.corner;
                        worst = worst.max(over);
                    }
                }
            }
        }
        assert!(tested > 100, "{tested}");
        // Second order in the quarter-pitch step between an edge and the
        // next (module docs): 51 nm here.
        assert!(worst <= 1e-4, "worst {worst} (pitch {p})");
    }

    #[test]
    fn a_too_large_corner_says_how_large_fits() {
        let mut sp = spec(2.0, 3.0);
        sp.shape = Shape::Sector {
            count: 9,
            inner_radius: 13.0,
            outer_radius: 28.0,
            spacing: 0.3,
            corner_radius: 40.0,
        };
        match sp.segments() {
            Err(SpiralError::CornerTooLarge { max, .. }) => {
                assert!(max > 0.3 && max < 40.0, "{max}");
                sp.shape = Shape::Sector {
                    count: 9,
                    inner_radius: 13.0,
                    outer_radius: 28.0,
                    spacing: 0.3,
                    corner_radius: max * 0.99,
                };
                assert!(sp.segments().is_ok());
            }
            other => panic!("{other:?}"),
        }
    }
}
