//! Phase 5: the nodes of the conductor: terminal 1 in outer slot 0, then
//! one node at the end of every group, alternately in the centre and
//! outside: a via between two groups, terminal 2 after the last. A
//! terminal outside the winding sits `lead_length` ([`TerminalPlace`]
//! (crate::design::TerminalPlace)) further out than its slot, radially.

use super::centre::CentreSlots;
use super::outer::OuterSlots;
use super::plan::Plan;
use crate::design::Design;
use crate::geometry::Vec2;
use crate::geometry::board::{Board, Node, Pad, Place, Via};

/// A node between two groups (or a terminal) and the polar angle of its
/// slot, radians.
#[derive(Debug, Clone, Copy)]
pub(super) struct Boundary {
    /// The pad or via.
    pub node: Node,
    /// Polar angle of its slot, radians.
    pub angle: f64,
}

/// Adds the terminal pads and the vias to `board`; returns the node before
/// each group and after the last (`groups + 1` entries, in current order).
pub(super) fn place(
    board: &mut Board,
    design: &Design,
    plan: &Plan,
    centre: &CentreSlots,
    outer: &OuterSlots,
) -> Vec<Boundary> {
    let (via_d, term_d) = (design.via.diameter, design.terminal.diameter);
    let g = plan.groups.len();
    let lead = design.terminal_place.lead_length;
    let brought_out = |angle: f64| outer.via_at(angle) + Vec2::from_angle(angle) * lead;
    board.pads.push(Pad {
        name: "1".into(),
        at: brought_out(outer.angle(0)),
        drill: design.terminal.drill,
        diameter: term_d,
        joins: plan.groups[0].clone(),
        place: Place::Outside,
    });
    // Node between group i and i+1 (i = 0..g-1), and the final terminal.
    let mut boundary: Vec<Boundary> = Vec::with_capacity(g + 1);
    boundary.push(Boundary {
        node: Node::Pad(0),
        angle: outer.angle(0),
    });
    let (mut next_centre, mut next_outer) = (0usize, 1usize);
    for i in 0..g {
        let centre_side = i % 2 == 0; // group i runs inward when i is even
        let (at, angle, place) = if centre_side {
            let j = next_centre;
            next_centre += 1;
            (centre.point(j), centre.angle(j), Place::Centre)
        } else {
            let j = next_outer;
            next_outer += 1;
            (outer.via_at(outer.angle(j)), outer.angle(j), Place::Outside)
        };
        let node = if i + 1 < g {
            let mut joins: Vec<u8> = plan.groups[i].clone();
            joins.extend(&plan.groups[i + 1]);
            joins.sort();
            board.vias.push(Via {
                at,
                drill: design.via.drill,
                diameter: via_d,
                joins,
                place,
            });
            Node::Via(board.vias.len() - 1)
        } else {
            board.pads.push(Pad {
                name: "2".into(),
                at: if place == Place::Outside {
                    brought_out(angle)
                } else {
                    at
                },
                drill: design.terminal.drill,
                diameter: term_d,
                joins: plan.groups[i].clone(),
                place,
            });
            Node::Pad(1)
        };
        boundary.push(Boundary { node, angle });
    }
    boundary
}
