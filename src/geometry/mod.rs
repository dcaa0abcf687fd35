//! Copper geometry: primitives, the spiral of one layer, the stitching of
//! layers with vias, and the resulting [`Board`] of placed coils.
//!
//! Files: `primitives/` (Point, Vec2, Line, Arc, Segment, Rect and what they
//! can do), `shape.rs` (everything that differs between coil shapes),
//! `spiral/` (the canonical spiral, one builder per shape family), `fit.rs`
//! (sizes from two of outer diameter, inner diameter and turns), `stitch/`
//! ([`build`] and its phases), `board.rs` (the result), `round.rs` (the one
//! rounding to nanometres every exporter uses).

pub mod array;
mod board;
pub(crate) mod fit;
mod primitives;
pub mod round;
mod shape;
mod spiral;
mod stitch;

pub use board::{
    ArrayNets, Board, Bus, COIL_NETS, Direction, Node, Outline, Pad, Phase, Place, PlacedCoil,
    Sense, SmdLand, Track, TrackRole, Via, Winding,
};
pub use fit::{Fit, FitError, FitInput, TurnsRequest};
pub use primitives::{Arc, Line, Nearest, Point, Rect, Segment, Vec2, angle_between, arc_steps};
pub use spiral::{SpiralError, SpiralSpec, cut_at_polar_angle};
pub use stitch::{GeometryError, build, build_all, min_inner_diameter};
