//! A piece of track centre line: a line or an arc, and what it can do.

use super::{Arc, Line, Nearest, Point, Rect, Vec2, angle_between, arc_steps};
use std::ops::Range;

/// One piece of track centre line.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Segment {
    /// A straight line.
    Line(Line),
    /// A circular arc.
    Arc(Arc),
}

impl Segment {
    /// A straight segment.
    pub fn line(start: Point, end: Point) -> Segment {
        Segment::Line(Line { start, end })
    }

    /// Start point.
    pub fn start(&self) -> Point {
        match self {
            Segment::Line(l) => l.start,
            Segment::Arc(a) => a.start,
        }
    }

    /// End point.
    pub fn end(&self) -> Point {
        match self {
            Segment::Line(l) => l.end,
            Segment::Arc(a) => a.end,
        }
    }

    /// Unit direction of travel at the start, or `None` for a point.
    pub fn start_direction(&self) -> Option<Vec2> {
        match self {
            Segment::Line(l) => (l.end - l.start).normalized(),
            Segment::Arc(a) => ((a.start - a.center).perp() * a.sweep.signum()).normalized(),
        }
    }

    /// Unit direction of travel at the end, or `None` for a point.
    pub fn end_direction(&self) -> Option<Vec2> {
        match self {
            Segment::Line(l) => (l.end - l.start).normalized(),
            Segment::Arc(a) => ((a.end - a.center).perp() * a.sweep.signum()).normalized(),
        }
    }

    /// Smallest radius of curvature, mm (infinite for a line).
    pub fn bend_radius(&self) -> f64 {
        match self {
            Segment::Line(_) => f64::INFINITY,
            Segment::Arc(a) => a.radius(),
        }
    }

    /// Centre-line length, mm.
    pub fn length(&self) -> f64 {
        match self {
            Segment::Line(l) => l.start.distance(l.end),
            Segment::Arc(a) => a.radius() * a.sweep.abs(),
        }
    }

    /// The point at fraction `t` (0..1) along the segment.
    pub fn point_at(&self, t: f64) -> Point {
        match self {
            Segment::Line(l) => l.point_at(t),
            Segment::Arc(a) => a.point_at(t),
        }
    }

    /// The same centre line traversed the other way.
    pub fn reversed(&self) -> Segment {
        match *self {
            Segment::Line(l) => Segment::line(l.end, l.start),
            Segment::Arc(a) => Segment::Arc(Arc {
                center: a.center,
                start: a.end,
                end: a.start,
                sweep: -a.sweep,
            }),
        }
    }

    /// Rotated about the origin by `angle` radians.
    pub fn rotated(&self, angle: f64) -> Segment {
        match *self {
            Segment::Line(l) => Segment::line(l.start.rotated(angle), l.end.rotated(angle)),
            Segment::Arc(a) => Segment::Arc(Arc {
                center: a.center.rotated(angle),
                start: a.start.rotated(angle),
                end: a.end.rotated(angle),
                sweep: a.sweep,
            }),
        }
    }

    /// Mirror image across the x axis; an arc's sense reverses.
    pub fn mirrored(&self) -> Segment {
        match *self {
            Segment::Line(l) => Segment::line(l.start.mirrored(), l.end.mirrored()),
            Segment::Arc(a) => Segment::Arc(Arc {
                center: a.center.mirrored(),
                start: a.start.mirrored(),
                end: a.end.mirrored(),
                sweep: -a.sweep,
            }),
        }
    }

    /// Signed angle swept about the origin (the coil axis) from start to end,
    /// radians; positive when the segment runs counter-clockwise about the axis.
    pub fn swept_about_origin(&self) -> f64 {
        match self {
            Segment::Line(l) => angle_between(l.start.to_vec2(), l.end.to_vec2()),
            Segment::Arc(a) => {
                let c = a.center.to_vec2();
                let (p0, p1) = (a.start.to_vec2(), a.end.to_vec2());
                if c.length() < a.radius() {
                    // The axis is inside the circle: the polar angle about it
                    // grows with the arc's own angle, and at every point the
                    // two differ by the angle from (p - centre) to p, which
                    // stays within (-pi/2, pi/2) (in the triangle axis,
                    // centre, p the angle at p faces the shorter side).
                    a.sweep + angle_between(p1 - c, p1) - angle_between(p0 - c, p0)
                } else {
                    // The axis is outside (or on) the circle: the whole circle
                    // is seen within less than half a turn, so the principal
                    // angle between the ends is the swept angle.
                    angle_between(p0, p1)
                }
            }
        }
    }

    /// Points along the centre line such that the chords deviate from the
    /// true arc by at most `tolerance` mm. Includes both end points.
    pub fn flatten(&self, tolerance: f64) -> Vec<Point> {
        match self {
            Segment::Line(l) => vec![l.start, l.end],
            Segment::Arc(a) => {
                let n = arc_steps(a.radius(), a.sweep.abs(), tolerance);
                let mut pts = Vec::with_capacity(n + 1);
                pts.push(a.start);
                for i in 1..n {
                    pts.push(a.point_at(i as f64 / n as f64));
                }
                pts.push(a.end);
                pts
            }
        }
    }

    /// The point of the centre line nearest to `p`, with its parameter.
    pub fn nearest(&self, p: Point) -> Nearest {
        match self {
            Segment::Line(l) => l.nearest(p),
            Segment::Arc(a) => a.nearest(p),
        }
    }

    /// The point of the centre line nearest to `p` (the point of
    /// [`Segment::nearest`] without its parameter, which costs an arc
    /// tangent on arcs).
    pub fn nearest_point(&self, p: Point) -> Point {
        match self {
            Segment::Line(l) => l.nearest(p).point,
            Segment::Arc(a) => a.nearest_point(p),
        }
    }

    /// Shortest distance from `p` to the centre line, mm.
    pub fn distance(&self, p: Point) -> f64 {
        match self {
            Segment::Line(l) => l.distance(p),
            Segment::Arc(a) => a.distance(p),
        }
    }

    /// The part between fractions `range.start` and `range.end` (0..1) of
    /// the segment, both ends evaluated at their parameters
    /// ([`Line::subsegment`], [`Arc::subsegment`]).
    pub fn subsegment(&self, range: Range<f64>) -> Segment {
        match self {
            Segment::Line(l) => Segment::Line(l.subsegment(range)),
            Segment::Arc(a) => Segment::Arc(a.subsegment(range)),
        }
    }

    /// The same segment begun exactly at `start` (a point on it, or within
    /// rounding of its start, such as where the previous piece of a path
    /// ended): a line keeps its end, an arc its centre and sweep (its end
    /// follows by rotation).
    pub fn with_start(&self, start: Point) -> Segment {
        match *self {
            Segment::Line(l) => Segment::line(start, l.end),
            Segment::Arc(a) => Segment::Arc(Arc::from_start(a.center, start, a.sweep)),
        }
    }

    /// Axis-aligned bounding box of the centre line.
    pub fn bounding_box(&self) -> Rect {
        match self {
            Segment::Line(l) => l.bounding_box(),
            Segment::Arc(a) => a.bounding_box(),
        }
    }

    /// Largest distance of the centre line from the origin, mm.
    pub fn max_radius(&self) -> f64 {
        match self {
            Segment::Line(l) => l.start.radius().max(l.end.radius()),
            Segment::Arc(a) => {
                let r = a.radius();
                let c = a.center.to_vec2();
                let mut m = a.start.radius().max(a.end.radius());
                if let Some(dir) = c.normalized()
                    && a.contains_direction(dir)
                {
                    m = m.max(c.length() + r);
                }
                if c.length() == 0.0 {
                    m = m.max(r);
                }
                m
            }
        }
    }

    /// Support function: the largest `n . p` over points `p` of the centre
    /// line, mm (for a unit `n`, how far the segment reaches in direction `n`).
    pub fn support(&self, n: Vec2) -> f64 {
        let ends = n
            .dot(self.start().to_vec2())
            .max(n.dot(self.end().to_vec2()));
        match self {
            Segment::Line(_) => ends,
            Segment::Arc(a) => {
                if a.contains_direction(n) {
                    ends.max(n.dot(a.center.to_vec2()) + a.radius() * n.length())
                } else {
                    ends
                }
            }
        }
    }

    /// Smallest distance of the centre line from the origin, mm.
    pub fn min_radius(&self) -> f64 {
        self.distance(Point::ORIGIN)
    }
}
