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
//! # Units
//! Millimetres and radians.

use super::board::{Board, Direction, Node, Outline, Pad, Place, Track, TrackRole, Via, Winding};
use super::spiral::{SpiralError, SpiralSpec};
use super::{Arc, Point, Segment, Vec2};
use crate::design::{Design, Shape, Wiring};
use std::f64::consts::{PI, TAU};

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

/// How the layers are grouped and which junctions they need.
struct Plan {
    /// Layers of each group in current order; a group is one layer (series)
    /// or two (parallel pairs).
    groups: Vec<Vec<u8>>,
}

impl Plan {
    fn new(layers: u8, wiring: Wiring) -> Result<Plan, GeometryError> {
        if !(1..=32).contains(&layers) {
            return Err(GeometryError::Layers(layers));
        }
        let groups = match wiring {
            Wiring::Series => (1..=layers).map(|l| vec![l]).collect(),
            Wiring::ParallelPairs => {
                if !layers.is_multiple_of(2) {
                    return Err(GeometryError::OddParallel(layers));
                }
                (0..layers / 2)
                    .map(|g| vec![2 * g + 1, 2 * g + 2])
                    .collect()
            }
        };
        Ok(Plan { groups })
    }

    /// Number of nodes in the centre: a via for each inward->outward change,
    /// plus the second terminal when the chain ends in the centre.
    fn centre_slots(&self) -> usize {
        self.groups.len().div_ceil(2)
    }

    /// Number of nodes outside: terminal 1, a via for each outward->inward
    /// change, and terminal 2 when the chain ends outside.
    fn outer_slots(&self) -> usize {
        let g = self.groups.len();
        1 + (g - 1) / 2 + usize::from(g.is_multiple_of(2))
    }

    /// Whether the second terminal is in the centre.
    fn ends_in_centre(&self) -> bool {
        self.groups.len() % 2 == 1
    }
}

/// The smallest free centre (inner diameter, mm) that holds the centre vias
/// and the centre terminal with `clearance` between them and to the
/// innermost turn.
pub fn min_inner_diameter(
    shape: &Shape,
    layers: u8,
    wiring: Wiring,
    clearance: f64,
    trace_width: f64,
    via_diameter: f64,
    terminal_diameter: f64,
) -> f64 {
    let Ok(plan) = Plan::new(layers, wiring) else {
        return f64::NAN;
    };
    let dmax = if plan.ends_in_centre() {
        via_diameter.max(terminal_diameter)
    } else {
        via_diameter
    };
    let ring = centre_ring_radius(plan.centre_slots(), dmax, clearance, trace_width);
    let lead_ring = if centre_leads_need_ring(shape, plan.centre_slots()) {
        trace_width + clearance
    } else {
        0.0
    };
    2.0 * (ring + dmax / 2.0 + clearance + lead_ring)
}

/// Circles rotate each layer so its inner end points at its centre slot;
/// polygons and rectangles keep their orientation and reach the slot along
/// a lead ring inside the innermost turn (unless there is a single slot on
/// the axis, straight inward from the inner end).
fn centre_leads_need_ring(shape: &Shape, slots: usize) -> bool {
    !shape.turns_to_face_vias() && slots > 1
}

/// Radius of the circle of centre slots: zero for one slot, otherwise large
/// enough that neighbouring pads are `clearance` apart and a lead passing a
/// neighbour keeps `clearance` too.
/// Polar angle between neighbouring slots on a circle of radius `r` so
/// that pads of diameter `dmax` keep `clearance` and a lead passing a
/// neighbour keeps it too (with a little slack for polygon rings).
fn chord_angle(r: f64, dmax: f64, clearance: f64, trace_width: f64) -> f64 {
    let chord = 1.05 * (dmax + clearance).max(dmax / 2.0 + trace_width / 2.0 + clearance);
    if r <= 0.0 {
        return TAU;
    }
    2.0 * (chord / (2.0 * r)).min(1.0).asin()
}

/// `n` polar angles of points on `ring`, consecutive points `need` apart
/// (straight-line distance), the group centred on angle `at`.
fn cluster_on(ring: &impl Fn(f64) -> Point, n: usize, at: f64, need: f64) -> Vec<f64> {
    let walk = |start: f64| {
        let mut out = vec![start];
        for _ in 1..n {
            let prev = *out.last().unwrap_or(&start);
            let p = ring(prev);
            // Smallest increment reaching `need`, by doubling then bisection.
            let (mut lo, mut hi) = (0.0, 1e-3);
            while p.distance(ring(prev + hi)) < need && hi < TAU {
                lo = hi;
                hi *= 2.0;
            }
            for _ in 0..24 {
                let mid = 0.5 * (lo + hi);
                if p.distance(ring(prev + mid)) < need {
                    lo = mid;
                } else {
                    hi = mid;
                }
            }
            out.push(prev + hi);
        }
        out
    };
    let first = walk(at);
    let span = first.last().copied().unwrap_or(at) - at;
    walk(at - span / 2.0)
}

/// `n` angles `step` apart centred on `at`; evenly around the circle when
/// they do not fit.
fn cluster(n: usize, at: f64, step: f64) -> Vec<f64> {
    if step * n as f64 >= TAU {
        return (0..n).map(|j| at + TAU * j as f64 / n as f64).collect();
    }
    (0..n)
        .map(|j| at + (j as f64 - (n as f64 - 1.0) / 2.0) * step)
        .collect()
}

fn centre_ring_radius(n: usize, dmax: f64, clearance: f64, trace_width: f64) -> f64 {
    if n <= 1 {
        return 0.0;
    }
    let chord = (dmax + clearance).max(dmax / 2.0 + trace_width / 2.0 + clearance);
    chord / (2.0 * (PI / n as f64).sin())
}

/// A closed convex ring about the axis along which outer leads run and on
/// which outer vias sit: a circle, or a polygon given by its side normals
/// and distances.
#[derive(Debug, Clone)]
enum Ring {
    Circle(f64),
    Polygon { normals: Vec<Vec2>, dist: Vec<f64> },
}

impl Ring {
    /// The ring `by` mm further out (parallel sides for a polygon).
    fn grown(&self, by: f64) -> Ring {
        match self {
            Ring::Circle(r) => Ring::Circle(r + by),
            Ring::Polygon { normals, dist } => Ring::Polygon {
                normals: normals.clone(),
                dist: dist.iter().map(|d| d + by).collect(),
            },
        }
    }

    /// The point of the ring on the ray from the axis at `angle`.
    fn at(&self, angle: f64) -> Point {
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
    fn vertex_angles(&self) -> Vec<f64> {
        match self {
            Ring::Circle(_) => vec![],
            Ring::Polygon { normals, dist } => {
                let n = normals.len();
                (0..n)
                    .map(|i| {
                        let j = (i + 1) % n;
                        let (n1, n2) = (normals[i], normals[j]);
                        let det = n1.cross(n2);
                        let p = Point::new(
                            (dist[i] * n2.y - dist[j] * n1.y) / det,
                            (n1.x * dist[j] - n2.x * dist[i]) / det,
                        );
                        p.angle()
                    })
                    .collect()
            }
        }
    }
}

/// The signed sweep from angle `a` to angle `b` the short way, radians.
fn short_sweep(a: f64, b: f64) -> f64 {
    let d = (b - a).rem_euclid(TAU);
    if d > PI { d - TAU } else { d }
}

/// Reverses a chain of segments (order and direction).
fn reversed(path: &[Segment]) -> Vec<Segment> {
    path.iter().rev().map(|s| s.reversed()).collect()
}

/// Builds the copper of every layer from a validated design.
pub fn build(design: &Design) -> Result<Board, GeometryError> {
    let coil = &design.coil;
    let plan = Plan::new(coil.layers, coil.wiring)?;
    let w = coil.trace_width;
    let s = coil.clearance;
    let p = coil.pitch();
    let via_d = design.via.diameter;
    let term_d = design.terminal.diameter;
    let min_id = min_inner_diameter(&coil.shape, coil.layers, coil.wiring, s, w, via_d, term_d);
    if coil.inner_diameter < min_id - 1e-9 {
        return Err(GeometryError::InnerTooSmall {
            given: coil.inner_diameter,
            min: min_id,
        });
    }

    // Canonical spiral: inner end on +x, outward counter-clockwise.
    let inner = coil.shape.spiral_inner(coil.inner_diameter, w);
    let spiral_spec = SpiralSpec {
        shape: coil.shape,
        corner: coil.corner,
        pitch: p,
        inner,
        turns: coil.turns,
    };
    let spiral = spiral_spec.segments()?;
    // Polygons and rectangles: a lead ring shaped like the next turn (one
    // pitch out, same corners), so leads meet it square, never in a hairpin.
    let lead_loop = spiral_spec.lead_ring(&spiral).map(|segs| Loop { segs });
    let spiral_end = spiral
        .last()
        .map(|x| x.end())
        .unwrap_or(Point::new(inner, 0.0));
    let outer_end_angle = spiral_end.angle();

    // Centre slots.
    let nc = plan.centre_slots();
    let centre_dmax = if plan.ends_in_centre() {
        via_d.max(term_d)
    } else {
        via_d
    };
    let centre_ring = centre_leads_need_ring(&coil.shape, nc);
    // Put the centre slots as far out as the innermost turn allows, which
    // keeps the leads short and the middle of the coil free (for a magnet
    // or a sensor); never closer together than the minimum.
    let ring_allowance = if centre_ring { w + s } else { 0.0 };
    let rc = centre_ring_radius(nc, centre_dmax, s, w)
        .max(coil.inner_diameter / 2.0 - s - centre_dmax / 2.0 - ring_allowance);
    let inner_lead_radius = rc + centre_dmax / 2.0 + s + w / 2.0;
    // Circles turn each layer to face its slot, so slots spread evenly;
    // other shapes keep every inner end at angle 0, so their slots cluster
    // there, as close as the clearances allow, to keep the leads short.
    let centre_angles: Vec<f64> = if centre_ring {
        cluster(nc, 0.0, chord_angle(rc, centre_dmax, s, w))
    } else {
        (0..nc).map(|j| TAU * j as f64 / nc as f64).collect()
    };
    let centre_angle = |j: usize| centre_angles[j];
    let centre_point = |j: usize| Point::polar(rc, centre_angle(j));

    // Lead ring one pitch outside the winding (for polygons: the sides that
    // hold every layer's loop, mirrored layers included), vias one pad
    // further out.
    let lead_ring = match (coil.shape.sides(), &lead_loop) {
        (Some(sides), Some(l)) => {
            let mut segs = l.segs.clone();
            if coil.layers > 1 {
                segs.extend(l.mirrored().segs);
            }
            support_polygon(&segs, sides)
        }
        _ => Ring::Circle(super::spiral::radial_extent(&spiral).1 + p),
    };
    let outer_dmax = via_d.max(term_d);
    let via_ring = lead_ring.grown(w / 2.0 + s + outer_dmax / 2.0);
    // Where a via or pad sits for a slot angle: on a circle for circular
    // coils; for other shapes exactly the pad clearance outside every
    // layer's own lead ring (found along the ray), so the square connector
    // from the pad to its ring is short and stays in its slot.
    let via_gap = w / 2.0 + s + outer_dmax / 2.0;
    let loops: Vec<Loop> = match &lead_loop {
        Some(l) if coil.layers > 1 => vec![l.clone(), l.mirrored()],
        Some(l) => vec![l.clone()],
        None => vec![],
    };
    let via_at = |angle: f64| -> Point {
        if loops.is_empty() {
            return via_ring.at(angle);
        }
        let u = Vec2::from_angle(angle);
        let gap = |r: f64| {
            let p = Point::ORIGIN + u * r;
            loops
                .iter()
                .map(|l| l.closest(p).point.distance(p))
                .fold(f64::INFINITY, f64::min)
        };
        // From the ring's own support polygon (inside every loop's reach
        // along the ray is not needed: start where the loops end).
        let (mut lo, mut hi) = (lead_ring.at(angle).radius(), via_ring.at(angle).radius());
        if gap(hi) < via_gap {
            return via_ring.at(angle);
        }
        if gap(lo) >= via_gap {
            return Point::ORIGIN + u * lo;
        }
        for _ in 0..32 {
            let mid = 0.5 * (lo + hi);
            if gap(mid) >= via_gap {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        Point::ORIGIN + u * hi
    };
    let no = plan.outer_slots();
    // Terminal 1 at the top; terminal 2 (when outside) next to it, about a
    // 2.54 mm header pitch away (common practice, no source); junction vias
    // spread evenly over the rest of the ring, clockwise from terminal 1.
    let ends_outside = !plan.ends_in_centre();
    let terminal_step = if ends_outside && no > 1 {
        let r = via_at(PI / 2.0).radius();
        let chord = 2.54f64.max(term_d + s + w);
        (2.0 * (chord / (2.0 * r)).min(1.0).asin()).min(TAU / no as f64)
    } else {
        0.0
    };
    let even_angles: Vec<f64> = (0..no)
        .map(|j| {
            if ends_outside && no > 1 {
                PI / 2.0 - (TAU - terminal_step) * j as f64 / (no - 1) as f64
            } else {
                PI / 2.0 - TAU * j as f64 / no as f64
            }
        })
        .collect();
    // Whether a set of slot angles leaves room: pads `need` apart, and the
    // connector from each pad to each lead ring it may join clear of every
    // other pad.
    let need = (outer_dmax + s).max(outer_dmax / 2.0 + w / 2.0 + s);
    let room = |angles: &[f64]| -> f64 {
        let pts: Vec<Point> = angles.iter().map(|&a| via_at(a)).collect();
        let mut worst = f64::INFINITY;
        for (i, &a) in angles.iter().enumerate() {
            let targets: Vec<Point> = if loops.is_empty() {
                vec![lead_ring.at(a)]
            } else {
                loops.iter().map(|l| l.closest(pts[i]).point).collect()
            };
            for (j, q) in pts.iter().enumerate() {
                if i == j {
                    continue;
                }
                worst = worst.min(pts[i].distance(*q) - need);
                for t in &targets {
                    let d = Segment::line(pts[i], *t).distance(*q);
                    worst = worst.min(d - (outer_dmax / 2.0 + w / 2.0 + s));
                }
            }
        }
        worst
    };
    let outer_angles: Vec<f64> = match &lead_loop {
        Some(_) if no > 1 + usize::from(ends_outside) => {
            // Junction vias next to the layers' outer ends, which sit near
            // the x axis on both sides (mirrored layers): cluster them on
            // the axis at the nearer side, terminals stay at the top.
            let junctions = no - 1 - usize::from(ends_outside);
            let side = if outer_end_angle.cos() >= 0.0 {
                0.0
            } else {
                PI
            };
            let spread = cluster_on(&via_at, junctions, side, 1.02 * need);
            let mut a = vec![PI / 2.0];
            a.extend(spread);
            if ends_outside {
                a.push(PI / 2.0 + terminal_step);
            }
            // Keep the cluster only where every slot has room.
            if room(&a) >= 0.0 { a } else { even_angles }
        }
        _ => even_angles,
    };
    let outer_angle = |j: usize| outer_angles[j];
    if no > 1 {
        let worst = room(&outer_angles);
        if worst < -1e-9 {
            return Err(GeometryError::OuterCrowded {
                gap: need + worst,
                need,
            });
        }
    }

    let mut layout = Board {
        name: design.name.clone(),
        layers: coil.layers,
        wiring: coil.wiring,
        tracks: vec![],
        vias: vec![],
        pads: vec![],
        windings: vec![],
        outline: Outline { segments: vec![] },
        trace_width: w,
        clearance: s,
        pitch: p,
        inner_radius: 0.0,
        outer_radius: 0.0,
        turns: coil.turns,
    };

    // Nodes: terminal 1 at outer slot 0; then alternately centre and outer.
    let g = plan.groups.len();
    layout.pads.push(Pad {
        name: "1".into(),
        at: via_at(outer_angle(0)),
        drill: design.terminal.drill,
        diameter: term_d,
        joins: plan.groups[0].clone(),
        place: Place::Outside,
    });
    // Node between group i and i+1 (i = 0..g-1), and the final terminal.
    let mut boundary: Vec<(Node, Place, f64)> = Vec::with_capacity(g + 1);
    boundary.push((Node::Pad(0), Place::Outside, outer_angle(0)));
    let (mut next_centre, mut next_outer) = (0usize, 1usize);
    for i in 0..g {
        let centre = i % 2 == 0; // group i runs inward when i is even
        let (at, angle, place) = if centre {
            let j = next_centre;
            next_centre += 1;
            (centre_point(j), centre_angle(j), Place::Centre)
        } else {
            let j = next_outer;
            next_outer += 1;
            (via_at(outer_angle(j)), outer_angle(j), Place::Outside)
        };
        let node = if i + 1 < g {
            let mut joins: Vec<u8> = plan.groups[i].clone();
            joins.extend(&plan.groups[i + 1]);
            joins.sort();
            layout.vias.push(Via {
                at,
                drill: design.via.drill,
                diameter: via_d,
                joins,
                place,
            });
            Node::Via(layout.vias.len() - 1)
        } else {
            layout.pads.push(Pad {
                name: "2".into(),
                at,
                drill: design.terminal.drill,
                diameter: term_d,
                joins: plan.groups[i].clone(),
                place,
            });
            Node::Pad(1)
        };
        boundary.push((node, place, angle));
    }

    for (i, group) in plan.groups.iter().enumerate() {
        let inward = i % 2 == 0;
        // The centre node of this group decides its rotation.
        let (centre_node, _, centre_angle_i) = if inward { boundary[i + 1] } else { boundary[i] };
        let (outer_node, _, outer_slot_angle) = if inward { boundary[i] } else { boundary[i + 1] };
        // Circles turn each layer to face its centre slot; other shapes keep
        // their orientation.
        let rot = if centre_ring { 0.0 } else { centre_angle_i };
        // Inward groups use the canonical spiral, outward ones its mirror.
        let oriented: Vec<Segment> = spiral
            .iter()
            .map(|x| {
                let x = if inward { *x } else { x.mirrored() };
                x.rotated(rot)
            })
            .collect();
        let inner_end = oriented[0].start();
        let outer_end = oriented.last().map(|x| x.end()).unwrap_or(inner_end);
        let end_angle = if inward {
            rot + outer_end_angle
        } else {
            rot - outer_end_angle
        };
        // Centre lead: node -> (inner lead ring ->) inner end.
        let centre_at = layout.node_at(centre_node);
        let centre_lead = if centre_ring {
            circle_lead(inner_lead_radius, centre_at, centre_angle_i, rot, inner_end)
        } else {
            vec![Segment::line(centre_at, inner_end)]
        };
        // Outer lead: node -> lead ring -> along ring -> outer end.
        let node_at = layout.node_at(outer_node);
        let outer_lead = if let Some(canonical) = &lead_loop {
            // Square onto this layer's own ring from the node, along the
            // ring, square onto the spiral's outer end.
            let ring = if inward {
                canonical.clone()
            } else {
                canonical.mirrored()
            };
            let q = ring.closest(node_at);
            let e = ring.closest(outer_end);
            let mut lead = vec![Segment::line(node_at, q.point)];
            lead.extend(ring.walk(q, e));
            let last = lead.last().map(|x| x.end()).unwrap_or(q.point);
            lead.push(Segment::line(last, outer_end));
            lead
        } else {
            let radius = lead_ring.at(outer_slot_angle).radius();
            circle_lead(radius, node_at, outer_slot_angle, end_angle, outer_end)
        };

        let (from, to, chain): (Node, Node, Vec<(Segment, TrackRole)>) = if inward {
            let mut c: Vec<_> = outer_lead.iter().map(|x| (*x, TrackRole::Lead)).collect();
            c.extend(
                reversed(&oriented)
                    .into_iter()
                    .map(|x| (x, TrackRole::Winding)),
            );
            c.extend(
                reversed(&centre_lead)
                    .into_iter()
                    .map(|x| (x, TrackRole::Lead)),
            );
            (outer_node, centre_node, c)
        } else {
            let mut c: Vec<_> = centre_lead.iter().map(|x| (*x, TrackRole::Lead)).collect();
            c.extend(oriented.iter().map(|x| (*x, TrackRole::Winding)));
            c.extend(
                reversed(&outer_lead)
                    .into_iter()
                    .map(|x| (x, TrackRole::Lead)),
            );
            (centre_node, outer_node, c)
        };
        for &layer in group {
            let start = layout.tracks.len();
            layout
                .tracks
                .extend(
                    chain
                        .iter()
                        .filter(|(x, _)| x.length() > 0.0)
                        .map(|&(segment, role)| Track {
                            layer,
                            segment,
                            width: w,
                            role,
                        }),
                );
            layout.windings.push(Winding {
                layer,
                group: i,
                tracks: (start, layout.tracks.len()),
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

    let (rmin, rmax) = super::spiral::radial_extent(&spiral);
    layout.inner_radius = rmin - w / 2.0;
    layout.outer_radius = rmax + w / 2.0;
    let edge = via_ring.grown(outer_dmax / 2.0 + design.board.margin);
    layout.outline = Outline {
        segments: match &edge {
            Ring::Circle(r) => {
                let start = Point::new(*r, 0.0);
                vec![
                    Segment::Arc(Arc::from_start(Point::ORIGIN, start, PI)),
                    Segment::Arc(Arc {
                        center: Point::ORIGIN,
                        start: Point::new(-r, 0.0),
                        end: start,
                        sweep: PI,
                    }),
                ]
            }
            Ring::Polygon { .. } => {
                let pts: Vec<Point> = edge
                    .vertex_angles()
                    .into_iter()
                    .map(|a| edge.at(a))
                    .collect();
                // Cut the corners by a circle that keeps the margin to the
                // farthest copper: rounded-corner coils get a rounded board.
                let reach = layout
                    .tracks
                    .iter()
                    .map(|t| t.segment.max_radius() + t.width / 2.0)
                    .chain(layout.vias.iter().map(|v| v.at.radius() + v.diameter / 2.0))
                    .chain(layout.pads.iter().map(|p| p.at.radius() + p.diameter / 2.0))
                    .fold(0.0, f64::max);
                polygon_in_disc(&pts, reach + design.board.margin)
            }
        },
    };
    // Make the first outline arc end exactly where the second starts.
    if let [Segment::Arc(a), Segment::Arc(b)] = layout.outline.segments.as_mut_slice() {
        a.end = b.start;
    }
    Ok(layout)
}

/// The boundary of a convex polygon (vertices counter-clockwise about the
/// origin) intersected with the disc of radius `r` about the origin: the
/// polygon's sides where they are inside, arcs of the circle elsewhere.
fn polygon_in_disc(pts: &[Point], r: f64) -> Vec<Segment> {
    let n = pts.len();
    // Part of each side inside the disc, as (start, end) or None.
    let clipped: Vec<Option<(Point, Point)>> = (0..n)
        .map(|i| {
            let (a, b) = (pts[i], pts[(i + 1) % n]);
            let d = b - a;
            let (qa, qb, qc) = (
                d.dot(d),
                2.0 * a.to_vec2().dot(d),
                a.to_vec2().dot(a.to_vec2()) - r * r,
            );
            let disc = qb * qb - 4.0 * qa * qc;
            if disc <= 0.0 {
                return None;
            }
            let sq = disc.sqrt();
            let t0 = ((-qb - sq) / (2.0 * qa)).max(0.0);
            let t1 = ((-qb + sq) / (2.0 * qa)).min(1.0);
            (t1 - t0 > 1e-9).then(|| (a.lerp(b, t0), a.lerp(b, t1)))
        })
        .collect();
    let inside: Vec<(Point, Point)> = clipped.iter().flatten().copied().collect();
    if inside.is_empty() {
        let start = Point::new(r, 0.0);
        let half = Segment::Arc(Arc::from_start(Point::ORIGIN, start, PI));
        let rest = Segment::Arc(Arc {
            center: Point::ORIGIN,
            start: half.end(),
            end: start,
            sweep: PI,
        });
        return vec![half, rest];
    }
    let mut out = Vec::new();
    let m = inside.len();
    for k in 0..m {
        let (a, b) = inside[k];
        let start = out.last().map(|s: &Segment| s.end()).unwrap_or(a);
        out.push(Segment::line(start, b));
        let next = inside[(k + 1) % m].0;
        if b.distance(next) > 1e-9 {
            let sweep = (next.angle() - b.angle()).rem_euclid(TAU);
            let arc = Arc::from_start(Point::ORIGIN, b, sweep);
            out.push(Segment::Arc(arc));
        }
    }
    // Close exactly onto the first point.
    let first = out[0].start();
    if let Some(last) = out.last_mut() {
        match last {
            Segment::Line(l) => l.end = first,
            Segment::Arc(a) => a.end = first,
        }
    }
    out
}

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
    if sweep.abs() >= 1e-12 {
        lead.push(Segment::Arc(Arc::from_start(Point::ORIGIN, on_ring, sweep)));
    }
    let last = lead.last().map(|x| x.end()).unwrap_or(on_ring);
    lead.push(Segment::line(last, end));
    lead
}

/// A place on a closed loop: segment index, fraction along it, the point.
#[derive(Debug, Clone, Copy)]
struct OnLoop {
    index: usize,
    t: f64,
    point: Point,
}

/// A closed path of segments, each starting where the previous ends.
#[derive(Debug, Clone)]
struct Loop {
    segs: Vec<Segment>,
}

impl Loop {
    /// Mirror image across the x axis.
    fn mirrored(&self) -> Loop {
        Loop {
            segs: self.segs.iter().map(|s| s.mirrored()).collect(),
        }
    }

    /// The point of the loop nearest to `p`.
    fn closest(&self, p: Point) -> OnLoop {
        let mut best = OnLoop {
            index: 0,
            t: 0.0,
            point: self.segs[0].start(),
        };
        let mut dist = f64::INFINITY;
        for (index, s) in self.segs.iter().enumerate() {
            let n = s.nearest(p);
            // Within the span, the point is re-evaluated from its parameter,
            // as the pieces cut there begin ([`Segment::subsegment`]).
            let (point, t) = if n.interior {
                (s.point_at(n.t), n.t)
            } else {
                (n.point, n.t)
            };
            let d = point.distance(p);
            if d < dist {
                dist = d;
                best = OnLoop { index, t, point };
            }
        }
        best
    }

    /// Part of segment `i` from fraction `t0` (starting exactly at `start`)
    /// to fraction `t1`.
    fn piece(&self, i: usize, start: Point, t0: f64, t1: f64) -> Segment {
        let s = self.segs[i];
        match s {
            // Up to a line's end: keep that end exactly.
            Segment::Line(_) if t1 >= 1.0 => s.with_start(start),
            _ => s.subsegment(t0..t1).with_start(start),
        }
    }

    /// The path along the loop in its own direction from `a` to `b`.
    fn forward(&self, a: OnLoop, b: OnLoop) -> Vec<Segment> {
        let n = self.segs.len();
        let mut out = Vec::new();
        let mut at = a.point;
        let (mut i, mut t) = (a.index, a.t);
        for _ in 0..=n {
            if i == b.index && b.t >= t {
                out.push(self.piece(i, at, t, b.t));
                break;
            }
            let s = self.piece(i, at, t, 1.0);
            at = s.end();
            out.push(s);
            i = (i + 1) % n;
            t = 0.0;
        }
        out.retain(|s| s.length() > 1e-9);
        out
    }

    /// The shorter path along the loop from `a` to `b` (either direction).
    fn walk(&self, a: OnLoop, b: OnLoop) -> Vec<Segment> {
        let fwd = self.forward(a, b);
        let back = reversed(&self.forward(b, a));
        let len = |v: &[Segment]| v.iter().map(|s| s.length()).sum::<f64>();
        let mut path = if len(&fwd) <= len(&back) { fwd } else { back };
        // Start exactly at `a` whichever way was taken.
        if let Some(first) = path.first_mut() {
            *first = first.with_start(a.point);
        }
        // Rejoin consecutive pieces exactly (the first may have moved by rounding).
        for k in 1..path.len() {
            path[k] = path[k].with_start(path[k - 1].end());
        }
        path
    }
}

/// The regular polygon (sides at angles `k 2 pi / sides`) whose every side
/// touches the farthest point of `segs` in its normal direction.
fn support_polygon(segs: &[Segment], sides: usize) -> Ring {
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
