//! Phase 6: every layer's copper: the canonical spiral turned to its centre
//! slot (mirrored for outward groups), the lead from the centre node to its
//! inner end and from its outer end to the outer node, in the order the
//! current flows.

use super::canonical::Canonical;
use super::centre::CentreSlots;
use super::lead_loop::reversed;
use super::nodes::Boundary;
use super::outer::OuterSlots;
use super::plan::Plan;
use crate::design::Design;
use crate::geometry::board::{Board, Direction, Node, Track, TrackRole, Winding};
use crate::geometry::{Arc, Point, Segment};
use std::f64::consts::{PI, TAU};

/// Adds every group's tracks and windings to `board`, between the nodes
/// `boundary` ([`super::nodes::place`]).
pub(super) fn lay(
    board: &mut Board,
    design: &Design,
    plan: &Plan,
    canonical: &Canonical,
    centre: &CentreSlots,
    outer: &OuterSlots,
    boundary: &[Boundary],
) {
    let coil = &design.coil;
    for (i, group) in plan.groups.iter().enumerate() {
        let inward = i % 2 == 0;
        let (centre_side, outer_side) = if inward {
            (boundary[i + 1], boundary[i])
        } else {
            (boundary[i], boundary[i + 1])
        };
        let chain = group_chain(
            board,
            canonical,
            centre,
            outer,
            inward,
            centre_side,
            outer_side,
        );
        let (from, to) = if inward {
            (outer_side.node, centre_side.node)
        } else {
            (centre_side.node, outer_side.node)
        };
        // A surface pad brought out from its slot: the lead from the slot
        // to the pad is on the pad's layer alone (a via in the slot joins
        // the group's layers to it), drawn once.
        let stub = match outer_side.node {
            Node::Pad(p) => board.pads[p]
                .smd
                .map(|s| s.layer)
                .filter(|_| board.pads[p].at.distance(outer.via_at(outer_side.angle)) > 1e-9),
            Node::Via(_) => None,
        };
        let stub_len = stub_path(board, outer, outer_side).len();
        let in_stub = |j: usize| {
            if inward {
                j < stub_len
            } else {
                j + stub_len >= chain.len()
            }
        };
        for (k, &layer) in group.iter().enumerate() {
            let start = board.tracks.len();
            board.tracks.extend(
                chain
                    .iter()
                    .enumerate()
                    .filter(|(_, (x, _))| x.length() > 0.0)
                    .filter_map(|(j, &(segment, role))| {
                        let layer = match stub {
                            Some(s) if in_stub(j) => {
                                // With the winding of the pad's layer when
                                // the group has it (one path there), else
                                // with the group's first.
                                let own = if group.contains(&s) {
                                    layer == s
                                } else {
                                    k == 0
                                };
                                if !own {
                                    return None;
                                }
                                s
                            }
                            _ => layer,
                        };
                        Some(Track {
                            layer,
                            segment,
                            width: coil.trace_width,
                            role,
                        })
                    }),
            );
            board.windings.push(Winding {
                layer,
                group: i,
                tracks: (start, board.tracks.len()),
                from,
                to,
                direction: if inward {
                    Direction::Inward
                } else {
                    Direction::Outward
                },
                turns: coil.turns,
            });
        }
    }
}

/// The copper of one group's layer in current order, each piece with its
/// role: for an inward group the outer lead, the spiral from its outer end
/// in, the centre lead; for an outward group the reverse path.
fn group_chain(
    board: &Board,
    canonical: &Canonical,
    centre: &CentreSlots,
    outer: &OuterSlots,
    inward: bool,
    centre_side: Boundary,
    outer_side: Boundary,
) -> Vec<(Segment, TrackRole)> {
    // The centre node of this group decides its rotation.
    let centre_angle_i = centre_side.angle;
    // Circles turn each layer to face its centre slot; other shapes keep
    // their orientation.
    let rot = if centre.ring { 0.0 } else { centre_angle_i };
    // Inward groups use the canonical spiral, outward ones its mirror.
    let oriented: Vec<Segment> = canonical
        .spiral
        .iter()
        .map(|x| {
            let x = if inward { *x } else { x.mirrored() };
            x.rotated(rot)
        })
        .collect();
    let inner_end = oriented[0].start();
    let outer_end = oriented.last().map(|x| x.end()).unwrap_or(inner_end);
    let end_angle = if inward {
        rot + canonical.outer_end_angle
    } else {
        rot - canonical.outer_end_angle
    };
    // Centre lead: node -> (inner lead ring ->) inner end.
    let centre_at = board.node_at(centre_side.node);
    let centre_lead = if centre.ring {
        circle_lead(
            centre.lead_radius,
            centre_at,
            centre_angle_i,
            rot,
            inner_end,
        )
    } else {
        vec![Segment::line(centre_at, inner_end)]
    };
    // Outer lead: node (-> its slot, for a terminal brought out) -> lead
    // ring -> along ring -> outer end.
    let node_at = outer.via_at(outer_side.angle);
    let stub = stub_path(board, outer, outer_side);
    let outer_lead = if let Some(lead_loop) = &canonical.lead_loop {
        // Square onto this layer's own ring from the node, along the
        // ring, square onto the spiral's outer end.
        let ring = if inward {
            lead_loop.clone()
        } else {
            lead_loop.mirrored()
        };
        let q = ring.closest(node_at);
        let e = ring.closest(outer_end);
        let mut lead = vec![Segment::line(node_at, q.point)];
        lead.extend(ring.walk(q, e));
        let last = lead.last().map(|x| x.end()).unwrap_or(q.point);
        lead.push(Segment::line(last, outer_end));
        lead
    } else {
        let radius = outer.lead_ring.at(outer_side.angle).radius();
        circle_lead(radius, node_at, outer_side.angle, end_angle, outer_end)
    };

    let outer_lead: Vec<Segment> = stub.into_iter().chain(outer_lead).collect();
    let lead = |path: Vec<Segment>| path.into_iter().map(|x| (x, TrackRole::Lead));
    let winding = |path: Vec<Segment>| path.into_iter().map(|x| (x, TrackRole::Winding));
    if inward {
        lead(outer_lead)
            .chain(winding(reversed(&oriented)))
            .chain(lead(reversed(&centre_lead)))
            .collect()
    } else {
        lead(centre_lead)
            .chain(winding(oriented))
            .chain(lead(reversed(&outer_lead)))
            .collect()
    }
}

/// The lead from a terminal brought out to its slot, from the pad: one
/// line, or on a tail two (along the finger's lane, then to the slot);
/// empty when the terminal sits in its slot.
fn stub_path(board: &Board, outer: &OuterSlots, outer_side: Boundary) -> Vec<Segment> {
    let pad_at = board.node_at(outer_side.node);
    let node_at = outer.via_at(outer_side.angle);
    if pad_at.distance(node_at) <= 1e-9 {
        return vec![];
    }
    let lane = match (outer_side.node, &board.tail) {
        (Node::Pad(p), Some(t)) => t.lanes.iter().find(|(i, _)| *i == p).map(|l| l.1),
        _ => None,
    };
    match lane {
        Some(l) => vec![Segment::line(pad_at, l), Segment::line(l, node_at)],
        None => vec![Segment::line(pad_at, node_at)],
    }
}

/// Shortest lead arc written, mm.
const MIN_ARC_MM: f64 = 1e-3;

/// A lead along a circle about the axis: radially from `node` to the circle
/// at `slot_angle`, along the circle the short way to `end_angle`, then
/// straight (radially) to `end`. Used outside circular windings and inside
/// the innermost turn of polygon and rectangle windings.
fn circle_lead(
    radius: f64,
    node: Point,
    slot_angle: f64,
    end_angle: f64,
    end: Point,
) -> Vec<Segment> {
    let on_ring = Point::polar(radius, slot_angle);
    let mut lead = vec![Segment::line(node, on_ring)];
    let sweep = short_sweep(slot_angle, end_angle);
    // An arc shorter than a micrometre is rounding between two angles
    // meant to be equal: left out (KiCad builds a wild circle through three
    // points nanometres apart), the line below bridging the gap.
    if sweep.abs() * radius >= MIN_ARC_MM {
        lead.push(Segment::Arc(Arc::from_start(Point::ORIGIN, on_ring, sweep)));
    }
    let last = lead.last().map(|x| x.end()).unwrap_or(on_ring);
    lead.push(Segment::line(last, end));
    lead
}

/// The signed sweep from angle `a` to angle `b` the short way, radians.
fn short_sweep(a: f64, b: f64) -> f64 {
    let d = (b - a).rem_euclid(TAU);
    if d > PI { d - TAU } else { d }
}
