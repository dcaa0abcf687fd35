//! Axis-aligned rectangles: bounding boxes of copper and outlines.

use super::Point;

/// An axis-aligned rectangle from `min` (lower left, y up) to `max`, mm.
///
/// [`Rect::EMPTY`] (min at +infinity, max at -infinity) is the start of a
/// union: it contains nothing and adds nothing.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Rect {
    /// Smallest x and y, mm.
    pub min: Point,
    /// Largest x and y, mm.
    pub max: Point,
}

impl Rect {
    /// The empty rectangle, identity of [`Rect::union`].
    pub const EMPTY: Rect = Rect {
        min: Point::new(f64::INFINITY, f64::INFINITY),
        max: Point::new(f64::NEG_INFINITY, f64::NEG_INFINITY),
    };

    /// The rectangle holding a single point.
    pub const fn from_point(p: Point) -> Rect {
        Rect { min: p, max: p }
    }

    /// The smallest rectangle holding two points.
    pub fn from_points(a: Point, b: Point) -> Rect {
        Rect {
            min: Point::new(a.x.min(b.x), a.y.min(b.y)),
            max: Point::new(a.x.max(b.x), a.y.max(b.y)),
        }
    }

    /// The smallest rectangle holding both.
    pub fn union(self, o: Rect) -> Rect {
        Rect {
            min: Point::new(self.min.x.min(o.min.x), self.min.y.min(o.min.y)),
            max: Point::new(self.max.x.max(o.max.x), self.max.y.max(o.max.y)),
        }
    }

    /// The smallest rectangle holding this one and `p`.
    pub fn union_point(self, p: Point) -> Rect {
        self.union(Rect::from_point(p))
    }

    /// Grown by `by` mm on every side (shrunk when negative).
    pub fn inflate(self, by: f64) -> Rect {
        Rect {
            min: Point::new(self.min.x - by, self.min.y - by),
            max: Point::new(self.max.x + by, self.max.y + by),
        }
    }

    /// Whether `p` lies inside or on the border.
    pub fn contains(self, p: Point) -> bool {
        p.x >= self.min.x && p.x <= self.max.x && p.y >= self.min.y && p.y <= self.max.y
    }

    /// Width (x extent), mm; negative for [`Rect::EMPTY`].
    pub fn width(self) -> f64 {
        self.max.x - self.min.x
    }

    /// Height (y extent), mm; negative for [`Rect::EMPTY`].
    pub fn height(self) -> f64 {
        self.max.y - self.min.y
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn union_inflate_contains() {
        let r = Rect::EMPTY
            .union_point(Point::new(1.0, 2.0))
            .union(Rect::from_points(
                Point::new(3.0, -1.0),
                Point::new(2.0, 0.0),
            ));
        assert_eq!(r.min, Point::new(1.0, -1.0));
        assert_eq!(r.max, Point::new(3.0, 2.0));
        assert_eq!((r.width(), r.height()), (2.0, 3.0));
        assert!(r.contains(Point::new(3.0, 2.0)));
        assert!(!r.contains(Point::new(3.5, 0.0)));
        assert!(r.inflate(0.5).contains(Point::new(3.5, 0.0)));
        assert!(!Rect::EMPTY.contains(Point::ORIGIN));
        assert_eq!(Rect::EMPTY.union(r), r);
    }
}
