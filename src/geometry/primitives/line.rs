//! The straight track primitive.

use super::{Nearest, Point, Rect, Vec2};
use std::ops::Range;

/// A straight track centre line from `start` to `end`.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Line {
    /// Start point, mm.
    pub start: Point,
    /// End point, mm.
    pub end: Point,
}

impl Line {
    /// The point at fraction `t` (0..1) of the way from start to end.
    pub fn point_at(&self, t: f64) -> Point {
        self.start.lerp(self.end, t)
    }

    /// The parameter of the foot of the perpendicular from `p` onto the
    /// infinite line (not clamped), with the direction `end - start`; `None`
    /// when the line is a single point.
    fn foot(&self, p: Point) -> Option<(f64, Vec2)> {
        let ab = self.end - self.start;
        let l2 = ab.dot(ab);
        (l2 != 0.0).then(|| ((p - self.start).dot(ab) / l2, ab))
    }

    /// The point of the line nearest to `p`, with its parameter.
    pub fn nearest(&self, p: Point) -> Nearest {
        match self.foot(p) {
            None => Nearest {
                point: self.start,
                t: 0.0,
                interior: false,
            },
            Some((raw, ab)) => {
                let t = raw.clamp(0.0, 1.0);
                Nearest {
                    point: self.start + ab * t,
                    t,
                    interior: raw == t,
                }
            }
        }
    }

    /// Shortest distance from `p` to the line, mm.
    pub fn distance(&self, p: Point) -> f64 {
        p.distance(self.nearest(p).point)
    }

    /// The part between fractions `range.start` and `range.end` (0..1),
    /// both ends evaluated by [`Line::point_at`].
    pub fn subsegment(&self, range: Range<f64>) -> Line {
        Line {
            start: self.point_at(range.start),
            end: self.point_at(range.end),
        }
    }

    /// Axis-aligned bounding box.
    pub fn bounding_box(&self) -> Rect {
        Rect::from_points(self.start, self.end)
    }
}
