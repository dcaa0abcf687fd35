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
use crate::geometry::board::{Board, Node, Pad, Place, SmdLand, Via};

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
    // A terminal outside the winding, joining the layers `group`, at slot
    // angle `angle`: a plated hole, or a surface pad on its face (with a
    // via in the slot when the group is not that face's layer alone, the
    // pad then far enough out to clear it).
    let terminal = |board: &mut Board, name: &str, group: &[u8], angle: f64| -> Pad {
        let slot = outer.via_at(angle);
        let u = Vec2::from_angle(angle);
        let Some(layer) = design.smd_layer() else {
            return Pad {
                name: name.into(),
                at: slot + u * lead,
                drill: design.terminal.drill,
                diameter: term_d,
                joins: group.to_vec(),
                place: Place::Outside,
                smd: None,
            };
        };
        let t = &design.terminal_place;
        let mut reach = lead;
        if group != [layer] {
            let mut joins: Vec<u8> = group.to_vec();
            joins.push(layer);
            joins.sort();
            joins.dedup();
            board.vias.push(Via {
                at: slot,
                drill: design.via.drill,
                diameter: via_d,
                joins,
                place: Place::Outside,
            });
            reach = reach.max(via_d / 2.0 + design.coil.clearance + t.pad_length / 2.0);
        }
        Pad {
            name: name.into(),
            at: slot + u * reach,
            drill: 0.0,
            diameter: design.terminal_land(),
            joins: vec![layer],
            place: Place::Outside,
            smd: Some(SmdLand {
                layer,
                width: t.pad_width,
                length: t.pad_length,
                angle,
            }),
        }
    };
    let pad1 = terminal(board, "1", &plan.groups[0], outer.angle(0));
    board.pads.push(pad1);
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
            let pad2 = if place == Place::Outside {
                terminal(board, "2", &plan.groups[i], angle)
            } else {
                Pad {
                    name: "2".into(),
                    at,
                    drill: design.terminal.drill,
                    diameter: term_d,
                    joins: plan.groups[i].clone(),
                    place,
                    smd: None,
                }
            };
            board.pads.push(pad2);
            Node::Pad(1)
        };
        boundary.push(Boundary { node, angle });
    }
    boundary
}
