//! Copper geometry: primitives, the spiral of one layer, the stitching of
//! layers with vias, and the resulting [`Board`].

mod board;
pub(crate) mod fit;
mod primitives;
pub mod round;
mod shape;
mod spiral;
mod stitch;

pub use board::{Board, Direction, Node, Outline, Pad, Place, Track, TrackRole, Via, Winding};
pub use fit::{Fit, FitError, FitInput, TurnsRequest};
pub use primitives::{Arc, Line, Nearest, Point, Rect, Segment, Vec2, angle_between, arc_steps};
pub use spiral::{SpiralError, SpiralSpec, cut_at_polar_angle};
pub use stitch::{GeometryError, build, min_inner_diameter};
