//! Closed loops of segments that leads follow (the lead ring one pitch
//! outside a polygon or rectangle winding), and walks along them.

use crate::geometry::{Point, Segment};

/// A place on a closed loop: segment index, fraction along it, the point.
#[derive(Debug, Clone, Copy)]
pub(super) struct OnLoop {
    index: usize,
    t: f64,
    /// The point, mm.
    pub point: Point,
}

/// A closed path of segments, each starting where the previous ends.
#[derive(Debug, Clone)]
pub(super) struct Loop {
    /// The segments, in order.
    pub segs: Vec<Segment>,
}

impl Loop {
    /// Mirror image across the x axis.
    pub fn mirrored(&self) -> Loop {
        Loop {
            segs: self.segs.iter().map(|s| s.mirrored()).collect(),
        }
    }

    /// The point of the loop nearest to `p`.
    pub fn closest(&self, p: Point) -> OnLoop {
        let mut best = OnLoop {
            index: 0,
            t: 0.0,
            point: self.segs[0].start(),
        };
        let mut dist = f64::INFINITY;
        for (index, s) in self.segs.iter().enumerate() {
            let n = s.nearest(p);
            // Within the span, the point is re-evaluated from its parameter,
            // as the pieces cut there begin ([`Segment::subsegment`]).
            let (point, t) = if n.interior {
                (s.point_at(n.t), n.t)
            } else {
                (n.point, n.t)
            };
            let d = point.distance(p);
            if d < dist {
                dist = d;
                best = OnLoop { index, t, point };
            }
        }
        best
    }

    /// Part of segment `i` from fraction `t0` (starting exactly at `start`)
    /// to fraction `t1`.
    fn piece(&self, i: usize, start: Point, t0: f64, t1: f64) -> Segment {
        let s = self.segs[i];
        match s {
            // Up to a line's end: keep that end exactly.
            Segment::Line(_) if t1 >= 1.0 => s.with_start(start),
            _ => s.subsegment(t0..t1).with_start(start),
        }
    }

    /// The path along the loop in its own direction from `a` to `b`.
    fn forward(&self, a: OnLoop, b: OnLoop) -> Vec<Segment> {
        let n = self.segs.len();
        let mut out = Vec::new();
        let mut at = a.point;
        let (mut i, mut t) = (a.index, a.t);
        for _ in 0..=n {
            if i == b.index && b.t >= t {
                out.push(self.piece(i, at, t, b.t));
                break;
            }
            let s = self.piece(i, at, t, 1.0);
            at = s.end();
            out.push(s);
            i = (i + 1) % n;
            t = 0.0;
        }
        out.retain(|s| s.length() > 1e-9);
        out
    }

    /// The shorter path along the loop from `a` to `b` (either direction).
    pub fn walk(&self, a: OnLoop, b: OnLoop) -> Vec<Segment> {
        let fwd = self.forward(a, b);
        let back = reversed(&self.forward(b, a));
        let len = |v: &[Segment]| v.iter().map(|s| s.length()).sum::<f64>();
        let mut path = if len(&fwd) <= len(&back) { fwd } else { back };
        // Start exactly at `a` whichever way was taken.
        if let Some(first) = path.first_mut() {
            *first = first.with_start(a.point);
        }
        // Rejoin consecutive pieces exactly (the first may have moved by rounding).
        for k in 1..path.len() {
            path[k] = path[k].with_start(path[k - 1].end());
        }
        path
    }
}

/// Reverses a chain of segments (order and direction).
pub(super) fn reversed(path: &[Segment]) -> Vec<Segment> {
    path.iter().rev().map(|s| s.reversed()).collect()
}
