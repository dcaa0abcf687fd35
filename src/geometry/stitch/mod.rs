//! Joining the layers: where the vias go, how each layer's spiral is
//! oriented, and the leads from spiral ends to vias and terminals.
//!
//! Series wiring: layer 1 runs inward from terminal 1, a via in the free
//! centre takes the current to layer 2, which runs outward (a mirror image
//! of layer 1), a via just outside the outermost turn takes it to layer 3,
//! and so on. Seen from the top the current circulates clockwise on every
//! layer. Parallel-pairs wiring does the same with pairs of identical
//! adjacent layers taking the place of single layers.
//!
//! Vias are plated through holes: they pass every layer. They sit on a
//! circle in the free centre ("centre slots") or on a ring outside the
//! winding ("outer slots"), spread evenly in angle. Each layer is rotated
//! so that its inner end points straight at its centre slot; its outer end
//! reaches its outer slot along a lead ring one pitch outside the winding.
//! On any layer the only copper in the centre and outside the winding is
//! that layer's own two leads, so a via meets no copper of layers it does
//! not join.
//!
//! [`build`] runs the phases in order, each in its own file: the layer
//! order and its transitions (`plan.rs`), the canonical spiral and its lead
//! ring (`canonical.rs`), the centre slots (`centre.rs`), the outer slots
//! (`outer.rs`, on the rings of `ring.rs`), the terminal pads and the vias
//! (`nodes.rs`), every layer's winding with its leads (`windings.rs`, along
//! the loops of `lead_loop.rs`), and the board outline (`outline.rs`).
//!
//! # Units
//! Millimetres and radians.

mod canonical;
mod centre;
mod lead_loop;
mod nodes;
mod outer;
mod outline;
mod plan;
mod ring;
mod tail;
mod windings;

use super::Point;
use super::board::{Board, COIL_NETS, Outline, PlacedCoil, Sense};
use super::spiral::SpiralError;
use crate::design::Design;
use canonical::Canonical;
use centre::CentreSlots;
use outer::OuterSlots;
use plan::Plan;

pub use centre::min_inner_diameter;

/// Why a layout cannot be built from a design.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum GeometryError {
    /// The spiral itself cannot be made.
    #[error(transparent)]
    Spiral(#[from] SpiralError),
    /// Parallel-pairs wiring needs an even layer count.
    #[error("parallel-pairs wiring needs an even number of layers, got {0}")]
    OddParallel(u8),
    /// Layer count outside 1..=32.
    #[error("layers must be 1 to 32, got {0}")]
    Layers(u8),
    /// The free centre cannot hold the centre vias.
    #[error(
        "inner diameter {given:.3} mm is too small for the centre vias; the minimum is {min:.3} mm"
    )]
    InnerTooSmall {
        /// Given, mm.
        given: f64,
        /// Minimum, mm.
        min: f64,
    },
    /// Surface pads on a coil that ends in its centre.
    #[error(
        "surface pads need the coil to end outside the winding: an even number of layers in series (of pairs in parallel)"
    )]
    SmdInCentre,
    /// A tail on a coil that ends in its centre.
    #[error(
        "a tail needs both coil ends outside the winding: an even number of layers in series (of pairs in parallel)"
    )]
    TailInCentre,
    /// The tail is too short for the leads to reach its fingers.
    #[error(
        "the tail is too short for the leads to turn onto their fingers: at least {need:.3} mm is needed"
    )]
    TailShort {
        /// Shortest length that works, mm.
        need: f64,
    },
    /// The board outline cannot grow a tab around the terminals' leads.
    #[error("the terminals brought out by lead_length do not fit one tab of the board outline")]
    LeadTab,
    /// The array cannot be placed or wired.
    #[error(transparent)]
    Array(#[from] super::array::ArrayError),
    /// The outer slots are too close for the vias and pads.
    #[error(
        "too many outside vias for the size: neighbouring slots are {gap:.3} mm apart, {need:.3} mm needed"
    )]
    OuterCrowded {
        /// Spacing achieved, mm.
        gap: f64,
        /// Spacing needed, mm.
        need: f64,
    },
}

/// Builds the copper of every layer from a validated design.
pub fn build(design: &Design) -> Result<Board, GeometryError> {
    let plan = Plan::new(design.coil.layers, design.coil.wiring)?;
    if design.terminal_place.is_smd() && plan.ends_in_centre() {
        return Err(GeometryError::SmdInCentre);
    }
    centre::check_room(design)?;
    let canonical = Canonical::new(&design.coil)?;
    let centre = CentreSlots::place(design, &plan);
    let outer = OuterSlots::place(design, &plan, &canonical)?;
    let tail = tail::plan(design, &plan, &outer)?;
    let mut board = empty_board(design);
    let nodes = nodes::place(&mut board, design, &plan, &centre, &outer, tail.as_ref());
    windings::lay(
        &mut board, design, &plan, &canonical, &centre, &outer, &nodes,
    );
    (board.inner_radius, board.outer_radius) = canonical.copper_radii(design.coil.trace_width);
    board.outline = outline::draw(&board, design, &outer, tail.as_ref())?;
    board.coils.push(alone(&board));
    Ok(board)
}

/// Builds the copper of a design: its coil, or (with `[array]`) the copies
/// of its coil with their buses ([`super::array`]).
pub fn build_all(design: &Design) -> Result<Board, GeometryError> {
    let single = build(design)?;
    Ok(super::array::place(design, single)?)
}

/// A design's coil, alone on its board: at the origin, not rotated, as
/// built, on the nets [`COIL_NETS`], owning every track, via, pad and
/// winding.
fn alone(board: &Board) -> PlacedCoil {
    PlacedCoil {
        position: Point::ORIGIN,
        rotation: 0.0,
        sense: Sense::Positive,
        nets: COIL_NETS.map(String::from),
        tracks: 0..board.tracks.len(),
        vias: 0..board.vias.len(),
        pads: 0..board.pads.len(),
        windings: 0..board.windings.len(),
    }
}

/// The board of a design before any copper is placed.
fn empty_board(design: &Design) -> Board {
    let coil = &design.coil;
    Board {
        name: design.name.clone(),
        coils: vec![],
        layers: coil.layers,
        wiring: coil.wiring,
        tracks: vec![],
        vias: vec![],
        pads: vec![],
        windings: vec![],
        outline: Outline { segments: vec![] },
        trace_width: coil.trace_width,
        clearance: coil.clearance,
        pitch: coil.pitch(),
        inner_radius: 0.0,
        outer_radius: 0.0,
        turns: coil.turns,
        tail: None,
        buses: vec![],
        phases: vec![],
        winding_factor: None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_design_is_one_placed_coil_owning_all_its_copper() {
        let board = build(&Design::sample()).unwrap();
        assert_eq!(board.coils.len(), 1);
        let coil = &board.coils[0];
        assert_eq!((coil.position, coil.rotation), (Point::ORIGIN, 0.0));
        assert_eq!(coil.sense, Sense::Positive);
        assert_eq!(coil.nets, ["COIL_1".to_string(), "COIL_2".to_string()]);
        assert!(!board.tracks.is_empty() && !board.vias.is_empty());
        assert!((0..board.tracks.len()).all(|i| board.coil_of_track(i) == Some(coil)));
        assert!((0..board.vias.len()).all(|i| board.coil_of_via(i) == Some(coil)));
        assert!((0..board.pads.len()).all(|i| board.coil_of_pad(i) == Some(coil)));
        assert_eq!(coil.windings, 0..board.windings.len());
        assert_eq!(coil.to_board(Point::new(1.0, 2.0)), Point::new(1.0, 2.0));
    }
}
