//! The conductor as short straight chords, each with its section, share of
//! the current and the voltage along the winding at its ends: what the
//! frequency phases sample (the proximity field at each chord's middle,
//! the neighbours that make the self-capacitance).
//!
//! Chord length and the sagitta of arcs start at two pitches and 1/20 of
//! a pitch; on a large coil both grow (length with the ratio, sagitta
//! with its square) until there are at most [`MAX_CHORDS`] ([`MAX_CHORDS_METRICS`]
//! in a sweep): a 20-turn
//! coil keeps the fine chords, an 8-layer 100-turn coil gets chords of a
//! few millimetres (one per side of a polygon turn).

use super::conductor::{Conductor, m};
use crate::design::Design;
use crate::geometry::{Board, Point, Segment, TrackRole, Vec2};

/// Most chords the frequency phases sample in a full report (the
/// proximity field costs four sources per chord at every chord).
pub const MAX_CHORDS: usize = 2500;

/// Most chords in a sweep's analysis ([`super::Detail::Metrics`]).
pub const MAX_CHORDS_METRICS: usize = 600;

/// One chord of the conductor.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Chord {
    /// Start and end in the layout's coordinates, mm (current order).
    pub a: Point,
    /// End, mm.
    pub b: Point,
    /// Height of the copper centre, m.
    pub z: f64,
    /// Copper layer, 1 = top.
    pub layer: u8,
    /// Index of the winding in `Board::windings`.
    pub winding: usize,
    /// Track width, m.
    pub width: f64,
    /// Copper thickness, m.
    pub thickness: f64,
    /// Share of the terminal current at DC.
    pub weight: f64,
    /// Voltage at `a` and `b` as a fraction of the terminal voltage,
    /// linear along the current path (each group of the series chain gets
    /// its length's part).
    pub volt: (f64, f64),
    /// Part of a lead.
    pub lead: bool,
}

impl Chord {
    /// Length, m.
    pub fn length(&self) -> f64 {
        m((self.b - self.a).length())
    }
    /// Middle, mm.
    pub fn mid(&self) -> Point {
        self.a.midpoint(self.b)
    }
    /// Unit direction of the current.
    pub fn dir(&self) -> Vec2 {
        (self.b - self.a)
            .normalized()
            .unwrap_or(Vec2::new(1.0, 0.0))
    }
}

/// Chords of every winding, in current order, at most about `max`.
pub fn chords(design: &Design, layout: &Board, cond: &Conductor, max: usize) -> Vec<Chord> {
    let pitch = design.coil.trace_width + design.coil.clearance;
    let (mut step, mut sag) = (2.0 * pitch, pitch / 20.0);
    let mut n = count(layout, step, sag);
    for _ in 0..4 {
        if n <= max {
            break;
        }
        let k = n as f64 / max as f64 * 1.05;
        step *= k;
        sag *= k * k;
        n = count(layout, step, sag);
    }
    // Voltage: group g spans its windings' mean length's share.
    let groups = layout
        .windings
        .iter()
        .map(|w| w.group + 1)
        .max()
        .unwrap_or(1);
    let mut glen = vec![(0.0, 0usize); groups];
    for w in &layout.windings {
        let len: f64 = layout
            .winding_tracks(w)
            .iter()
            .map(|t| t.segment.length())
            .sum();
        glen[w.group].0 += len;
        glen[w.group].1 += 1;
    }
    let glen: Vec<f64> = glen.iter().map(|(l, k)| l / (*k).max(1) as f64).collect();
    let total: f64 = glen.iter().sum::<f64>().max(1e-12);
    let mut start = vec![0.0; groups];
    for g in 1..groups {
        start[g] = start[g - 1] + glen[g - 1] / total;
    }
    let mut out = Vec::with_capacity(n);
    let mut piece = 0;
    for (wi, w) in layout.windings.iter().enumerate() {
        let tracks = layout.winding_tracks(w);
        let span = glen[w.group] / total;
        let own: f64 = tracks
            .iter()
            .map(|t| t.segment.length())
            .sum::<f64>()
            .max(1e-12);
        let mut along = 0.0;
        for t in tracks {
            let p = &cond.pieces[piece.min(cond.pieces.len() - 1)];
            piece += 1;
            let k = parts(&t.segment, step, sag);
            let len = t.segment.length();
            for i in 0..k {
                let (u0, u1) = (i as f64 / k as f64, (i + 1) as f64 / k as f64);
                let v0 = start[w.group] + span * (along + u0 * len) / own;
                let v1 = start[w.group] + span * (along + u1 * len) / own;
                out.push(Chord {
                    a: t.segment.point_at(u0),
                    b: t.segment.point_at(u1),
                    z: p.z,
                    layer: w.layer,
                    winding: wi,
                    width: m(t.width),
                    thickness: p.thickness,
                    weight: p.weight,
                    volt: (v0, v1),
                    lead: t.role != TrackRole::Winding,
                });
            }
            along += len;
        }
    }
    out
}

/// Chords of one track: at most `step` long, arcs with at most `sag`
/// sagitta (mm).
fn parts(s: &Segment, step: f64, sag: f64) -> usize {
    let by_length = (s.length() / step).ceil().max(1.0) as usize;
    match s {
        Segment::Line(_) => by_length,
        Segment::Arc(a) => {
            let r = (a.start - a.center).length().max(1e-9);
            let max_angle = 2.0 * (1.0 - (sag / r).min(1.0)).acos();
            let by_angle = (a.sweep.abs() / max_angle.max(1e-6)).ceil() as usize;
            by_length.max(by_angle).max(1)
        }
    }
}

fn count(layout: &Board, step: f64, sag: f64) -> usize {
    layout
        .windings
        .iter()
        .flat_map(|w| layout.winding_tracks(w))
        .map(|t| parts(&t.segment, step, sag))
        .sum()
}
