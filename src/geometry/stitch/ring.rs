//! The closed convex rings about the axis that outer leads follow and outer
//! vias sit on, and the board edge is drawn from.

use crate::geometry::spiral::intersect;
use crate::geometry::{Point, Segment, Vec2};
use std::f64::consts::TAU;

/// A closed convex ring about the axis along which outer leads run and on
/// which outer vias sit: a circle, or a polygon given by its side normals
/// and distances.
#[derive(Debug, Clone)]
pub(super) enum Ring {
    /// A circle about the axis of this radius, mm.
    Circle(f64),
    /// The polygon whose side `k` lies on the line `normals[k] . x =
    /// dist[k]` (unit normals, counter-clockwise; distances in mm).
    Polygon { normals: Vec<Vec2>, dist: Vec<f64> },
}

impl Ring {
    /// The ring `by` mm further out (parallel sides for a polygon).
    pub fn grown(&self, by: f64) -> Ring {
        match self {
            Ring::Circle(r) => Ring::Circle(r + by),
            Ring::Polygon { normals, dist } => Ring::Polygon {
                normals: normals.clone(),
                dist: dist.iter().map(|d| d + by).collect(),
            },
        }
    }

    /// The point of the ring on the ray from the axis at `angle`.
    pub fn at(&self, angle: f64) -> Point {
        match self {
            Ring::Circle(r) => Point::polar(*r, angle),
            Ring::Polygon { normals, dist } => {
                let u = Vec2::from_angle(angle);
                let t = normals
                    .iter()
                    .zip(dist)
                    .filter_map(|(n, d)| {
                        let c = n.dot(u);
                        (c > 1e-12).then(|| d / c)
                    })
                    .fold(f64::INFINITY, f64::min);
                Point::ORIGIN + u * t
            }
        }
    }

    /// Polar angles of the polygon's vertices.
    pub fn vertex_angles(&self) -> Vec<f64> {
        match self {
            Ring::Circle(_) => vec![],
            Ring::Polygon { normals, dist } => {
                let n = normals.len();
                (0..n)
                    .map(|i| {
                        let j = (i + 1) % n;
                        intersect(normals[i], dist[i], normals[j], dist[j]).angle()
                    })
                    .collect()
            }
        }
    }
}

/// The regular polygon (sides at angles `k 2 pi / sides`) whose every side
/// touches the farthest point of `segs` in its normal direction.
pub(super) fn support_polygon(segs: &[Segment], sides: usize) -> Ring {
    let normals: Vec<Vec2> = (0..sides)
        .map(|k| Vec2::from_angle(TAU * k as f64 / sides as f64))
        .collect();
    let dist = normals
        .iter()
        .map(|n| {
            segs.iter()
                .map(|s| s.support(*n))
                .fold(f64::NEG_INFINITY, f64::max)
        })
        .collect();
    Ring::Polygon { normals, dist }
}
