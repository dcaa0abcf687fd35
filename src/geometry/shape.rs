//! What differs between coil shapes, in one place: methods on
//! [`Shape`] (declared with the design model) that the spiral, the fit and
//! the stitching ask instead of matching on the shape themselves.
//!
//! A new shape is its `Shape` variant, its arms here, its spiral builder
//! (a file in `geometry/spiral/`) and its reader in the design layer.
//!
//! # Units
//! Millimetres.

use super::Segment;
use super::spiral::{SectorOutline, SpiralError, SpiralSpec, box_extent, radial_extent};
use crate::design::Shape;

impl Shape {
    /// The whole turns of the canonical spiral for `spec` (enough to cover
    /// its turns, cut afterwards by [`SpiralSpec::segments`]): the shape's
    /// spiral builder.
    pub(crate) fn whole_spiral(&self, spec: &SpiralSpec) -> Result<Vec<Segment>, SpiralError> {
        if let Some(g) = SectorOutline::of(self) {
            return spec.sector_whole(&g);
        }
        match self.side_bases(spec.inner) {
            None => spec.circle_whole(),
            Some(bases) => spec.polygon_whole(&bases),
        }
    }

    /// Distances from the axis of the innermost sides (side `k` has its
    /// normal at angle `k * 2 pi / N`) of a shape made of straight sides
    /// whose spiral starts `inner` mm out on +x; `None` for a circle and a
    /// sector (whose sides are not at regular angles).
    pub(crate) fn side_bases(&self, inner: f64) -> Option<Vec<f64>> {
        match *self {
            Shape::Circle | Shape::Sector { .. } => None,
            Shape::Polygon { sides } => Some(vec![inner; sides as usize]),
            Shape::Rectangle { width, height } => {
                let a = inner;
                let b = inner + (height - width) / 2.0;
                Some(vec![a, b, a, b])
            }
        }
    }

    /// Number of straight sides (a rectangle has 4); `None` for a circle.
    /// Shapes with sides reach their outside vias along a lead ring shaped
    /// like the next turn, held by a polygon with as many sides.
    pub fn sides(&self) -> Option<usize> {
        match *self {
            Shape::Circle | Shape::Sector { .. } => None,
            Shape::Polygon { sides } => Some(sides as usize),
            Shape::Rectangle { .. } => Some(4),
        }
    }

    /// Sides of the regular polygon about the axis that holds the lead
    /// ring outside the winding (the outer vias sit beyond it): a polygon's
    /// or rectangle's own sides; for a sector, whose lead ring is the next
    /// turn of arcs and slanted sides, 36 (a side every 10 degrees, close
    /// around the outer arc where its vias sit); `None` for a circle.
    pub fn ring_sides(&self) -> Option<usize> {
        match *self {
            Shape::Sector { .. } => Some(36),
            _ => self.sides(),
        }
    }

    /// Whether the shape's outer size is its own (a rectangle's width and
    /// height, a sector's slot of the ring) rather than a diameter to fit.
    pub fn carries_size(&self) -> bool {
        matches!(self, Shape::Rectangle { .. } | Shape::Sector { .. })
    }

    /// Whether the turns must be whole: a sector's layers end on its outer
    /// arc, facing out of the ring where its outer vias sit.
    pub fn whole_turns(&self) -> bool {
        matches!(self, Shape::Sector { .. })
    }

    /// Whether each layer's spiral is turned about the axis so that its
    /// inner end faces its centre via: a circle looks the same turned;
    /// shapes with sides keep their orientation (so the sides of all layers
    /// line up) and reach their centre vias along a lead ring inside the
    /// innermost turn.
    pub fn turns_to_face_vias(&self) -> bool {
        matches!(self, Shape::Circle)
    }

    /// The outer copper size the shape carries itself (a rectangle's width
    /// and height), mm; `None` when the outer size is a diameter to fit.
    pub fn own_size(&self) -> Option<(f64, f64)> {
        match *self {
            Shape::Rectangle { width, height } => Some((width, height)),
            _ => None,
        }
    }

    /// How far from the axis the spiral's inner end on +x lies beyond the
    /// free radius, mm: half the difference of a rectangle's width and
    /// height when it is wider than tall (its +x side is then the farther
    /// one), otherwise nothing.
    fn inner_offset(&self) -> Option<f64> {
        match *self {
            Shape::Rectangle { width, height } if height < width => Some((width - height) / 2.0),
            _ => None,
        }
    }

    /// The spiral's `inner` parameter ([`SpiralSpec::inner`]) for a free
    /// centre of `inner_diameter` and tracks `trace_width` wide, mm.
    pub fn spiral_inner(&self, inner_diameter: f64, trace_width: f64) -> f64 {
        let r = inner_diameter / 2.0 + trace_width / 2.0;
        match self.inner_offset() {
            Some(offset) => r + offset,
            None => r,
        }
    }

    /// The free-centre diameter of a spiral whose `inner` parameter is
    /// `inner` ([`Shape::spiral_inner`] undone), mm.
    pub fn inner_diameter_of(&self, inner: f64, trace_width: f64) -> f64 {
        let r = match self.inner_offset() {
            Some(offset) => inner - offset,
            None => inner,
        };
        2.0 * (r - trace_width / 2.0)
    }

    /// How far a spiral's copper (centre line `spiral`, tracks
    /// `2 half_width` wide) reaches beyond the outer size, mm (negative:
    /// inside): beyond the shape's own size (a sector's outline), or beyond
    /// the circle of `outer_diameter` about the axis.
    pub fn overreach(&self, spiral: &[Segment], half_width: f64, outer_diameter: f64) -> f64 {
        if let Some(g) = SectorOutline::of(self) {
            return g.overreach(spiral, half_width);
        }
        match self.own_size() {
            Some((width, height)) => {
                let (x, y) = box_extent(spiral);
                (x + half_width - width / 2.0).max(y + half_width - height / 2.0)
            }
            None => radial_extent(spiral).1 + half_width - outer_diameter / 2.0,
        }
    }
}
