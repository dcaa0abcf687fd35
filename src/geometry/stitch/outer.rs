//! Phase 4: the outer slots, where terminal 1, the junction vias between
//! outward and inward groups and (for an even number of groups) terminal 2
//! sit, outside the winding and clear of every layer's lead ring.

use super::GeometryError;
use super::canonical::Canonical;
use super::lead_loop::Loop;
use super::plan::Plan;
use super::ring::{Ring, support_polygon};
use crate::design::Design;
use crate::geometry::spiral::radial_extent;
use crate::geometry::{Point, Segment, Vec2};
use std::f64::consts::{PI, TAU};

/// The rings outside the winding and the slot angles on them.
pub(super) struct OuterSlots {
    /// Lead ring one pitch outside the winding (for polygons: the sides that
    /// hold every layer's loop, mirrored layers included).
    pub lead_ring: Ring,
    /// Ring of via centres, one pad further out.
    pub via_ring: Ring,
    /// Every layer's own lead loop (polygons and rectangles; empty for a
    /// circle).
    loops: Vec<Loop>,
    /// Gap from a lead ring's centre line to a pad's centre, mm.
    via_gap: f64,
    /// Larger of the via and terminal pad diameters, mm.
    pub dmax: f64,
    /// Polar angle of each slot, radians; slot 0 holds terminal 1.
    pub angles: Vec<f64>,
}

impl OuterSlots {
    /// Places the outer slots of a design, or says they are crowded.
    pub fn place(
        design: &Design,
        plan: &Plan,
        canonical: &Canonical,
    ) -> Result<OuterSlots, GeometryError> {
        let coil = &design.coil;
        let (w, s, p) = (coil.trace_width, coil.clearance, coil.pitch());
        let (via_d, term_d) = (design.via.diameter, design.terminal_land());
        let lead_ring = match (coil.shape.ring_sides(), &canonical.lead_loop) {
            (Some(sides), Some(l)) => {
                let mut segs = l.segs.clone();
                if coil.layers > 1 {
                    segs.extend(l.mirrored().segs);
                }
                support_polygon(&segs, sides)
            }
            _ => Ring::Circle(radial_extent(&canonical.spiral).1 + p),
        };
        let outer_dmax = via_d.max(term_d);
        let via_ring = lead_ring.grown(w / 2.0 + s + outer_dmax / 2.0);
        let mut slots = OuterSlots {
            lead_ring,
            via_ring,
            loops: canonical.loops(coil.layers),
            via_gap: w / 2.0 + s + outer_dmax / 2.0,
            dmax: outer_dmax,
            angles: vec![],
        };
        let via_at = |angle: f64| slots.via_at(angle);

        let no = plan.outer_slots();
        // Terminal 1 at the terminal angle (the top by default); terminal 2
        // (when outside) next to it counter-clockwise, about a
        // 2.54 mm header pitch away (common practice, no source); junction vias
        // spread evenly over the rest of the ring, clockwise from terminal 1.
        let a0 = design.terminal_place.angle();
        let ends_outside = !plan.ends_in_centre();
        let terminal_step = if ends_outside && no > 1 {
            let r = via_at(a0).radius();
            let chord = 2.54f64.max(term_d + s + w);
            (2.0 * (chord / (2.0 * r)).min(1.0).asin()).min(TAU / no as f64)
        } else {
            0.0
        };
        let even_angles: Vec<f64> = (0..no)
            .map(|j| {
                if ends_outside && no > 1 {
                    a0 - (TAU - terminal_step) * j as f64 / (no - 1) as f64
                } else {
                    a0 - TAU * j as f64 / no as f64
                }
            })
            .collect();
        let need = slots.need(design);
        let outer_angles: Vec<f64> = match &canonical.lead_loop {
            Some(_) if coil.shape.whole_turns() && no > 1 => {
                // A sector's layers all end on its outer arc, at the
                // terminal angle: the slots stand in a row along the outer
                // arc, terminal 1 at that angle, terminal 2 next to it
                // counter-clockwise, the junction vias next to it clockwise.
                let junctions = no - 1 - usize::from(ends_outside);
                let mut a = vec![a0];
                a.extend(walk_from(&via_at, a0, junctions, 1.02 * need, -1.0));
                if ends_outside {
                    a.push(a0 + terminal_step);
                }
                a
            }
            Some(_) if no > 1 + usize::from(ends_outside) => {
                // Junction vias next to the layers' outer ends, which sit near
                // the x axis on both sides (mirrored layers): cluster them on
                // the axis at the nearer side, terminals stay at the top.
                let junctions = no - 1 - usize::from(ends_outside);
                let side = if canonical.outer_end_angle.cos() >= 0.0 {
                    0.0
                } else {
                    PI
                };
                let spread = cluster_on(&via_at, junctions, side, 1.02 * need);
                let mut a = vec![a0];
                a.extend(spread);
                if ends_outside {
                    a.push(a0 + terminal_step);
                }
                // Keep the cluster only where every slot has room.
                if slots.room(design, &a) >= 0.0 {
                    a
                } else {
                    even_angles
                }
            }
            _ => even_angles,
        };
        if no > 1 {
            let worst = slots.room(design, &outer_angles);
            if worst < -1e-9 {
                return Err(GeometryError::OuterCrowded {
                    gap: need + worst,
                    need,
                });
            }
        }
        slots.angles = outer_angles;
        Ok(slots)
    }

    /// Polar angle of slot `j`, radians.
    pub fn angle(&self, j: usize) -> f64 {
        self.angles[j]
    }

    /// Where a via or pad sits for a slot angle: on a circle for circular
    /// coils; for other shapes exactly the pad clearance outside every
    /// layer's own lead ring (found along the ray), so the square connector
    /// from the pad to its ring is short and stays in its slot.
    pub fn via_at(&self, angle: f64) -> Point {
        let (loops, via_ring, lead_ring, via_gap) =
            (&self.loops, &self.via_ring, &self.lead_ring, self.via_gap);
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
    }

    /// Centre-to-centre distance two outer pads need, mm.
    fn need(&self, design: &Design) -> f64 {
        let (w, s) = (design.coil.trace_width, design.coil.clearance);
        let outer_dmax = self.dmax;
        (outer_dmax + s).max(outer_dmax / 2.0 + w / 2.0 + s)
    }

    /// Whether a set of slot angles leaves room: pads `need` apart, and the
    /// connector from each pad to each lead ring it may join clear of every
    /// other pad. The worst margin, mm (negative: too close).
    fn room(&self, design: &Design, angles: &[f64]) -> f64 {
        let (w, s) = (design.coil.trace_width, design.coil.clearance);
        let (outer_dmax, need) = (self.dmax, self.need(design));
        let pts: Vec<Point> = angles.iter().map(|&a| self.via_at(a)).collect();
        let mut worst = f64::INFINITY;
        for (i, &a) in angles.iter().enumerate() {
            let targets: Vec<Point> = if self.loops.is_empty() {
                vec![self.lead_ring.at(a)]
            } else {
                self.loops.iter().map(|l| l.closest(pts[i]).point).collect()
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
    }
}

/// `n` polar angles of points on `ring`, consecutive points `need` apart
/// (straight-line distance), the group centred on angle `at`.
fn cluster_on(ring: &impl Fn(f64) -> Point, n: usize, at: f64, need: f64) -> Vec<f64> {
    let walk = |start: f64| {
        let mut out = vec![start];
        out.extend(walk_from(ring, start, n.saturating_sub(1), need, 1.0));
        out
    };
    let first = walk(at);
    let span = first.last().copied().unwrap_or(at) - at;
    walk(at - span / 2.0)
}

/// `n` polar angles of points on `ring` after `start`, each `need` from
/// the one before (straight-line distance), going counter-clockwise for
/// `sign` 1, clockwise for -1.
fn walk_from(ring: &impl Fn(f64) -> Point, start: f64, n: usize, need: f64, sign: f64) -> Vec<f64> {
    let mut out = Vec::with_capacity(n);
    let mut prev = start;
    for _ in 0..n {
        let p = ring(prev);
        let at = |d: f64| ring(prev + sign * d);
        // Smallest increment reaching `need`, by doubling then bisection.
        let (mut lo, mut hi) = (0.0, 1e-3);
        while p.distance(at(hi)) < need && hi < TAU {
            lo = hi;
            hi *= 2.0;
        }
        for _ in 0..24 {
            let mid = 0.5 * (lo + hi);
            if p.distance(at(mid)) < need {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        prev += sign * hi;
        out.push(prev);
    }
    out
}
