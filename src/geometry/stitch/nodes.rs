//! Phase 5: the nodes of the conductor: terminal 1 in outer slot 0, then
//! one node at the end of every group, alternately in the centre and
//! outside: a via between two groups, terminal 2 after the last. A
//! terminal outside the winding sits `lead_length` ([`TerminalPlace`]
//! (crate::design::TerminalPlace)) further out than its slot, radially.

use super::centre::CentreSlots;
use super::outer::OuterSlots;
use super::plan::Plan;
use super::tail::TailPlan;
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
    tail: Option<&TailPlan>,
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
        // On a tail the terminal is its finger, reached by a lead along
        // the tail's lane.
        let finger = tail.map(|tp| {
            let i = usize::from(name == "2");
            let land = SmdLand {
                layer,
                width: design.tail.map_or(0.0, |x| x.finger_width),
                length: design.tail.map_or(0.0, |x| x.finger_length),
                angle: tp.layout.angle,
            };
            (tp.centres[tp.finger_of[i]], land)
        });
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
        if let Some((at, land)) = finger {
            return Pad {
                name: name.into(),
                at,
                drill: 0.0,
                diameter: land.width,
                joins: vec![layer],
                place: Place::Outside,
                smd: Some(land),
            };
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
    if let Some(tp) = tail {
        spare_fingers(board, tp);
    }
    boundary
}

/// Records the tail on `board`: the terminals' lanes and fingers, and the
/// spare fingers ("3" on, across the tail in order) as unconnected
/// surface pads like the terminal fingers.
fn spare_fingers(board: &mut Board, tp: &TailPlan) {
    let mut layout = tp.layout.clone();
    layout.lanes = vec![(0, tp.lane_of[0]), (1, tp.lane_of[1])];
    let land = board.pads[0]
        .smd
        .expect("a tail's terminals are surface pads");
    let mut next = 3;
    for (k, &at) in tp.centres.iter().enumerate() {
        if let Some(i) = tp.finger_of.iter().position(|&f| f == k) {
            layout.fingers.push(i);
            continue;
        }
        // `diameter`: the circle across the finger (the rules' round
        // gauge: exact across the tail, where the neighbours and the
        // strip's sides are; the end keeps the margin by construction).
        board.pads.push(Pad {
            name: next.to_string(),
            at,
            drill: 0.0,
            diameter: land.width,
            joins: vec![land.layer],
            place: Place::Outside,
            smd: Some(land),
        });
        next += 1;
        layout.fingers.push(board.pads.len() - 1);
    }
    board.tail = Some(layout);
}
