//! Positions and displacements in the board plane.

use std::ops::{Add, Mul, Neg, Sub};

/// A position in the board plane, millimetres.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct Point {
    /// x, mm.
    pub x: f64,
    /// y, mm (up).
    pub y: f64,
}

/// A displacement in the board plane, millimetres.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct Vec2 {
    /// x component, mm.
    pub x: f64,
    /// y component, mm.
    pub y: f64,
}

impl Point {
    /// The origin, which is the coil axis.
    pub const ORIGIN: Point = Point { x: 0.0, y: 0.0 };

    /// A point from its coordinates, mm.
    pub const fn new(x: f64, y: f64) -> Self {
        Point { x, y }
    }

    /// A point at `radius` mm from the origin in direction `angle` (radians).
    pub fn polar(radius: f64, angle: f64) -> Self {
        Point::new(radius * angle.cos(), radius * angle.sin())
    }

    /// Displacement from the origin to this point.
    pub fn to_vec2(self) -> Vec2 {
        Vec2::new(self.x, self.y)
    }

    /// Distance to another point, mm.
    pub fn distance(self, other: Point) -> f64 {
        (self - other).length()
    }

    /// Distance from the origin (the coil axis), mm.
    pub fn radius(self) -> f64 {
        self.to_vec2().length()
    }

    /// Polar angle about the origin, radians in (-pi, pi].
    pub fn angle(self) -> f64 {
        self.y.atan2(self.x)
    }

    /// This point rotated about the origin by `angle` radians (counter-clockwise).
    pub fn rotated(self, angle: f64) -> Point {
        let (s, c) = angle.sin_cos();
        Point::new(c * self.x - s * self.y, s * self.x + c * self.y)
    }

    /// This point rotated about `center` by `angle` radians.
    pub fn rotated_about(self, center: Point, angle: f64) -> Point {
        center + (self - center).rotated(angle)
    }

    /// Mirror image across the x axis (y -> -y).
    pub fn mirrored(self) -> Point {
        Point::new(self.x, -self.y)
    }

    /// Linear interpolation: `t = 0` gives `self`, `t = 1` gives `other`.
    pub fn lerp(self, other: Point, t: f64) -> Point {
        self + (other - self) * t
    }

    /// Midpoint between two points.
    pub fn midpoint(self, other: Point) -> Point {
        self.lerp(other, 0.5)
    }
}

impl Vec2 {
    /// A displacement from its components, mm.
    pub const fn new(x: f64, y: f64) -> Self {
        Vec2 { x, y }
    }

    /// Unit vector in direction `angle` radians.
    pub fn from_angle(angle: f64) -> Self {
        Vec2::new(angle.cos(), angle.sin())
    }

    /// Euclidean length, mm (`sqrt(x^2 + y^2)`: several times faster than
    /// `hypot`, and neither overflows nor loses precision at board scale).
    pub fn length(self) -> f64 {
        (self.x * self.x + self.y * self.y).sqrt()
    }

    /// Dot product, mm^2.
    pub fn dot(self, o: Vec2) -> f64 {
        self.x * o.x + self.y * o.y
    }

    /// z component of the cross product, mm^2 (positive when `o` is
    /// counter-clockwise from `self`).
    pub fn cross(self, o: Vec2) -> f64 {
        self.x * o.y - self.y * o.x
    }

    /// Direction angle, radians.
    pub fn angle(self) -> f64 {
        self.y.atan2(self.x)
    }

    /// Rotated counter-clockwise by `angle` radians.
    pub fn rotated(self, angle: f64) -> Vec2 {
        let (s, c) = angle.sin_cos();
        Vec2::new(c * self.x - s * self.y, s * self.x + c * self.y)
    }

    /// The unit vector in this direction, or `None` for a zero vector.
    pub fn normalized(self) -> Option<Vec2> {
        let l = self.length();
        (l > 0.0 && l.is_finite()).then(|| Vec2::new(self.x / l, self.y / l))
    }

    /// Rotated +90 degrees.
    pub fn perp(self) -> Vec2 {
        Vec2::new(-self.y, self.x)
    }
}

impl Sub for Point {
    type Output = Vec2;
    fn sub(self, o: Point) -> Vec2 {
        Vec2::new(self.x - o.x, self.y - o.y)
    }
}
impl Add<Vec2> for Point {
    type Output = Point;
    fn add(self, v: Vec2) -> Point {
        Point::new(self.x + v.x, self.y + v.y)
    }
}
impl Sub<Vec2> for Point {
    type Output = Point;
    fn sub(self, v: Vec2) -> Point {
        Point::new(self.x - v.x, self.y - v.y)
    }
}
impl Add for Vec2 {
    type Output = Vec2;
    fn add(self, v: Vec2) -> Vec2 {
        Vec2::new(self.x + v.x, self.y + v.y)
    }
}
impl Sub for Vec2 {
    type Output = Vec2;
    fn sub(self, v: Vec2) -> Vec2 {
        Vec2::new(self.x - v.x, self.y - v.y)
    }
}
impl Mul<f64> for Vec2 {
    type Output = Vec2;
    fn mul(self, k: f64) -> Vec2 {
        Vec2::new(self.x * k, self.y * k)
    }
}
impl Neg for Vec2 {
    type Output = Vec2;
    fn neg(self) -> Vec2 {
        Vec2::new(-self.x, -self.y)
    }
}
