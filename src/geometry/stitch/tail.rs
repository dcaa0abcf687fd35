//! The flex tail (`[tail]`): where its strip, its fingers and the lanes of
//! the two terminal leads go. Planned before the nodes (the terminals are
//! its first two fingers), used by `nodes.rs` (finger pads), `windings.rs`
//! (the leads from the slots to the fingers) and `outline.rs` (the strip).
//!
//! Frame: `u` along the tail from the axis outward (at the terminal angle,
//! where terminal 1's slot is; terminal 2's is next to it), `v` across it
//! (`u` turned a quarter counter-clockwise). Fingers sit at `v` offsets
//! `(k - (n - 1) / 2) pitch`, their centres the board margin plus half a
//! finger short of the tail's end. The terminal whose slot lies at the
//! smaller `v` takes finger 0, the other finger 1, so the two leads never
//! cross: each runs straight from its slot to its lane point (at least
//! twice as far along `u` as across, so at most 26.6 degrees off the
//! axis), then straight along its finger's line. Where the slots lie wider
//! apart than the strip, a wider neck (the leads' span plus the margin,
//! out to the lane points) joins the strip to the coil's board.

use super::GeometryError;
use super::outer::OuterSlots;
use super::plan::Plan;
use crate::design::Design;
use crate::geometry::board::TailLayout;
use crate::geometry::{Point, Vec2};

/// Length of the stiffener beyond the fingers towards the coil, mm: the
/// flex must not start bending at the fingers' ends (common practice, no
/// source).
pub const STIFFENER_OVERLAP: f64 = 1.0;

/// The tail of a design, planned.
#[derive(Debug, Clone)]
pub(super) struct TailPlan {
    /// Along the tail.
    pub u: Vec2,
    /// The layout handed to the board (fingers and lanes filled in by
    /// `nodes.rs`).
    pub layout: TailLayout,
    /// Centre of each finger, across the tail in order.
    pub centres: Vec<Point>,
    /// Finger index of terminal 1 and terminal 2.
    pub finger_of: [usize; 2],
    /// Lane point of terminal 1 and terminal 2.
    pub lane_of: [Point; 2],
    /// Half width of the neck that holds the leads from their slots to
    /// their lanes, with the margin, mm (no neck when at most half the
    /// tail's width).
    pub neck_half: f64,
    /// How far along the tail the neck reaches, mm.
    pub neck_reach: f64,
}

/// Plans the tail of `design` (`None` without one): `outer` gives the two
/// terminal slots (slot 0 and slot `groups / 2`).
pub(super) fn plan(
    design: &Design,
    plan: &Plan,
    outer: &OuterSlots,
) -> Result<Option<TailPlan>, GeometryError> {
    let Some(t) = design.tail else {
        return Ok(None);
    };
    if plan.ends_in_centre() {
        return Err(GeometryError::TailInCentre);
    }
    let g = plan.groups.len();
    let slots = [
        outer.via_at(outer.angle(0)),
        outer.via_at(outer.angle(g / 2)),
    ];
    let u = Vec2::from_angle(design.terminal_place.angle());
    let v = u.perp();
    let angle = u.angle();
    let edge = outer.via_ring.grown(outer.dmax / 2.0 + design.board.margin);
    let root = edge.at(angle).to_vec2().dot(u);
    let end = root + t.length;
    let margin = design.board.margin;
    let along = end - margin - t.finger_length / 2.0;
    let n = t.fingers as usize;
    let offset = |k: usize| (k as f64 - (n as f64 - 1.0) / 2.0) * t.pitch;
    let centres: Vec<Point> = (0..n)
        .map(|k| Point::ORIGIN + u * along + v * offset(k))
        .collect();
    let first_low = slots[0].to_vec2().dot(v) <= slots[1].to_vec2().dot(v);
    let finger_of = if first_low { [0, 1] } else { [1, 0] };
    // The lane points: one common distance along the tail, far enough out
    // that each diagonal is at most half as steep across as along and
    // clears its slot's via.
    let lane = slots
        .iter()
        .zip(finger_of)
        .map(|(s, k)| s.to_vec2().dot(u) + 2.0 * (s.to_vec2().dot(v) - offset(k)).abs())
        .fold(f64::MIN, f64::max)
        + design.via.diameter / 2.0
        + design.coil.clearance;
    let finger_start = along - t.finger_length / 2.0;
    if lane > finger_start {
        return Err(GeometryError::TailShort {
            need: lane - root + t.finger_length + margin,
        });
    }
    let lane_of = finger_of.map(|k| Point::ORIGIN + u * lane + v * offset(k));
    let reach_v = |p: Point| p.to_vec2().dot(v).abs();
    let neck_half = slots
        .iter()
        .map(|&s| reach_v(s) + design.via.diameter.max(design.coil.trace_width) / 2.0)
        .chain(
            lane_of
                .iter()
                .map(|&l| reach_v(l) + design.coil.trace_width / 2.0),
        )
        .fold(0.0, f64::max)
        + margin;
    let neck_reach = lane + design.coil.trace_width / 2.0 + margin;
    let stiff_from = (finger_start - STIFFENER_OVERLAP).max(root);
    let half = t.width / 2.0;
    let stiffener = (t.stiffener > 0.0).then(|| {
        let (a, b) = (Point::ORIGIN + u * stiff_from, Point::ORIGIN + u * end);
        [a + v * -half, b + v * -half, b + v * half, a + v * half]
    });
    Ok(Some(TailPlan {
        u,
        layout: TailLayout {
            angle,
            root,
            end,
            width: t.width,
            fingers: vec![],
            lanes: vec![],
            stiffener,
            stiffener_thickness: t.stiffener,
            stiff_from,
        },
        centres,
        finger_of,
        lane_of,
        neck_half,
        neck_reach,
    }))
}
