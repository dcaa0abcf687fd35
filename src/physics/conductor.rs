//! The conductor as the physics sees it: every track of every winding with
//! its layer height, copper section and share of the coil current, in SI
//! units (metres).
//!
//! Heights: `z = 0` is the top surface of the top copper layer, `z` grows
//! away from the board (towards a magnet above it); layer `k` has its copper
//! centre at `-(sum over layers above of copper + dielectric) - t_k / 2`.

use super::field::Segments;
use crate::design::Design;
use crate::design::Wiring;
use crate::geometry::{Board, Point, Segment, TrackRole, Vec2};

/// Millimetres to metres: the one place where the factor 1000 lives.
pub fn m(mm: f64) -> f64 {
    mm * 1e-3
}

/// Metres to millimetres.
pub fn to_mm(m: f64) -> f64 {
    m * 1e3
}

/// How arcs become straight filaments.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Chords {
    /// Chords between points of the arc.
    Inscribed,
    /// Pairs of filaments that keep each sub-arc's dipole moment (see
    /// [`Conductor::balanced_filaments`]).
    Balanced,
}

/// One track as a current path.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Piece {
    /// Centre line in the layout's coordinates, mm (in current order).
    pub segment: Segment,
    /// Copper layer, 1 = top.
    pub layer: u8,
    /// Height of the copper centre, m.
    pub z: f64,
    /// Track width, m.
    pub width: f64,
    /// Copper thickness, m.
    pub thickness: f64,
    /// Share of the terminal current flowing here: 1 in series; in a
    /// parallel pair the winding's DC conductance over the pair's (1/2 for
    /// equal copper; 0.66 and 0.34 for 35 and 18 um), vias left out.
    pub weight: f64,
    /// Spiral or lead.
    pub role: TrackRole,
}

/// A straight current filament in 3-D, metres.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Filament {
    /// Start (current enters), m.
    pub a: [f64; 3],
    /// End, m.
    pub b: [f64; 3],
    /// Share of the terminal current.
    pub weight: f64,
    /// Copper layer, 1 = top.
    pub layer: u8,
    /// Track width, m.
    pub width: f64,
    /// Copper thickness, m.
    pub thickness: f64,
    /// Part of a lead (not of the spiral turns).
    pub lead: bool,
}

/// The conductor of a coil.
#[derive(Debug, Clone, PartialEq)]
pub struct Conductor {
    /// Every track of every winding, in current order.
    pub pieces: Vec<Piece>,
    /// Copper centre height per layer (index 0 = layer 1), m.
    pub layer_z: Vec<f64>,
    /// Copper thickness per layer, m.
    pub layer_t: Vec<f64>,
}

impl Conductor {
    /// The conductor of phase `phase` of an array (index into
    /// [`Board::phases`]): its coils, each in the sense the phase passes it,
    /// and its own bus copper, in current order ([`Board::phase_view`]).
    /// Shared star-point or delta-corner buses are left out.
    ///
    /// # Panics
    /// If `phase` is not a phase of the board.
    pub fn of_phase(design: &Design, board: &Board, phase: usize) -> Conductor {
        Conductor::new(design, &board.phase_view(phase))
    }

    /// Builds the conductor from the layout and the stack-up of the design.
    pub fn new(design: &Design, layout: &Board) -> Conductor {
        let n = layout.layers as usize;
        let mut layer_z = Vec::with_capacity(n);
        let mut layer_t = Vec::with_capacity(n);
        let mut depth = 0.0;
        for k in 0..n {
            let t = m(design.stackup.copper.get(k).copied().unwrap_or(0.035));
            layer_z.push(-(depth + t / 2.0));
            layer_t.push(t);
            depth += t + m(design.stackup.dielectric.get(k).copied().unwrap_or(0.0));
        }
        // Each winding's DC conductance (up to the common resistivity):
        // windings in parallel share the current in proportion to it.
        let conductance = |w: &crate::geometry::Winding| {
            let li = (w.layer as usize).saturating_sub(1).min(n - 1);
            let r: f64 = layout
                .winding_tracks(w)
                .iter()
                .map(|t| m(t.segment.length()) / (m(t.width) * layer_t[li]))
                .sum();
            if r > 0.0 { 1.0 / r } else { 0.0 }
        };
        let g: Vec<f64> = layout.windings.iter().map(conductance).collect();
        let mut pieces = Vec::new();
        for (i, w) in layout.windings.iter().enumerate() {
            let share = match layout.wiring {
                Wiring::Series => 1.0,
                Wiring::ParallelPairs => {
                    let group: Vec<f64> = layout
                        .windings
                        .iter()
                        .zip(&g)
                        .filter(|(o, _)| o.group == w.group)
                        .map(|(_, &x)| x)
                        .collect();
                    let sum: f64 = group.iter().sum();
                    if sum > 0.0 {
                        g[i] / sum
                    } else {
                        1.0 / group.len().max(1) as f64
                    }
                }
            };
            let li = (w.layer as usize).saturating_sub(1).min(n - 1);
            for t in layout.winding_tracks(w) {
                pieces.push(Piece {
                    segment: t.segment,
                    layer: w.layer,
                    z: layer_z[li],
                    width: m(t.width),
                    thickness: layer_t[li],
                    weight: share,
                    role: t.role,
                });
            }
        }
        Conductor {
            pieces,
            layer_z,
            layer_t,
        }
    }

    /// The pieces flattened into straight filaments; each arc becomes
    /// equal chords whose sagitta is at most `rel_sagitta` times the arc's
    /// radius (so the on-axis field of a chord polygon differs from the
    /// circle's by at most about `2/3 * rel_sagitta`, relative, and the
    /// local field at a distance `d` from the copper by about
    /// `rel_sagitta * radius / d`).
    pub fn filaments(&self, rel_sagitta: f64) -> Vec<Filament> {
        self.flatten(rel_sagitta, Chords::Inscribed)
    }

    /// The pieces flattened with [`Chords::Balanced`]: each arc becomes
    /// equal sub-arcs of at most `2 acos(1 - rel_sagitta)` radians (the
    /// sub-arc's chord has sagitta `rel_sagitta` times the radius), and each
    /// sub-arc two straight filaments that meet outside the arc at
    /// `R phi / sin(phi)` (`phi` = half the sub-arc's angle): the two
    /// triangles they make with the centre have the sector's area, so each
    /// sub-arc keeps its dipole moment (and its net current element, the
    /// chord) and the error left is of higher order. On a 4-layer, 20-turn
    /// circular coil, `rel_sagitta = 1e-3` gives the field at the centre
    /// to 1e-8 relative where plain chords of sagitta 1.5e-4 give 1e-4
    /// (tested against chords of 1e-8 in this module).
    pub fn balanced_filaments(&self, rel_sagitta: f64) -> Vec<Filament> {
        self.flatten(rel_sagitta, Chords::Balanced)
    }

    fn flatten(&self, rel_sagitta: f64, chords: Chords) -> Vec<Filament> {
        let mut out = Vec::with_capacity(self.chord_count(rel_sagitta, chords));
        self.flatten_each(rel_sagitta, chords, |p, a, b| {
            out.push(Filament {
                a: [m(a.x), m(a.y), p.z],
                b: [m(b.x), m(b.y), p.z],
                weight: p.weight,
                layer: p.layer,
                width: p.width,
                thickness: p.thickness,
                lead: p.role != TrackRole::Winding,
            })
        });
        out
    }

    /// The balanced filaments straight into the field's structure (what
    /// [`Conductor::balanced_filaments`] gives, without the intermediate
    /// list), carrying `current` amperes at the terminals.
    pub fn field_segments(&self, rel_sagitta: f64, current: f64) -> Segments {
        let mut s = Segments::with_capacity(self.chord_count(rel_sagitta, Chords::Balanced));
        self.flatten_each(rel_sagitta, Chords::Balanced, |p, a, b| {
            s.push(
                [m(a.x), m(a.y), p.z],
                [m(b.x), m(b.y), p.z],
                current * p.weight,
            )
        });
        s
    }

    /// Chords per arc for a relative sagitta: `1 - cos(h) = rel` gives the
    /// half-angle `h` of one chord.
    fn arc_chords(rel_sagitta: f64) -> impl Fn(&Segment) -> usize {
        let max_step = 2.0 * (1.0 - rel_sagitta.clamp(1e-15, 1.0)).acos();
        move |s: &Segment| match s {
            Segment::Line(_) => 1,
            Segment::Arc(a) => (a.sweep.abs() / max_step).ceil().max(1.0) as usize,
        }
    }

    /// How many filaments [`Conductor::flatten_each`] makes.
    fn chord_count(&self, rel_sagitta: f64, chords: Chords) -> usize {
        let n = Self::arc_chords(rel_sagitta);
        self.pieces
            .iter()
            .map(|p| match (p.segment, chords) {
                (Segment::Arc(_), Chords::Balanced) => 2 * n(&p.segment),
                _ => n(&p.segment),
            })
            .sum()
    }

    /// Calls `f(piece, from, to)` for every filament, in current order.
    fn flatten_each(
        &self,
        rel_sagitta: f64,
        chords: Chords,
        mut f: impl FnMut(&Piece, Point, Point),
    ) {
        let chords_of = Self::arc_chords(rel_sagitta);
        for p in &self.pieces {
            match p.segment {
                Segment::Line(l) => f(p, l.start, l.end),
                Segment::Arc(a) => {
                    let n = chords_of(&p.segment);
                    // Vertices by rotating the radius vector in equal
                    // steps (half steps for balanced chords).
                    let parts = match chords {
                        Chords::Inscribed => n,
                        Chords::Balanced => 2 * n,
                    };
                    let step = a.sweep / parts as f64;
                    let (sin, cos) = step.sin_cos();
                    let stretch = match chords {
                        Chords::Inscribed => 1.0,
                        Chords::Balanced => step.abs() / step.abs().sin().max(1e-300),
                    };
                    let mut v = a.start - a.center;
                    let mut prev = a.start;
                    for i in 1..=parts {
                        v = Vec2::new(v.x * cos - v.y * sin, v.x * sin + v.y * cos);
                        let q = if i == parts {
                            a.end
                        } else if chords == Chords::Balanced && i % 2 == 1 {
                            a.center + v * stretch
                        } else {
                            a.center + v
                        };
                        f(p, prev, q);
                        prev = q;
                    }
                }
            }
        }
    }

    /// Only the spiral pieces (leads left out), for comparisons with
    /// formulas that know only the turns.
    pub fn without_leads(&self) -> Conductor {
        Conductor {
            pieces: self
                .pieces
                .iter()
                .filter(|p| p.role == TrackRole::Winding)
                .copied()
                .collect(),
            layer_z: self.layer_z.clone(),
            layer_t: self.layer_t.clone(),
        }
    }

    /// Only the pieces on `layer`, with the full current (for single-layer
    /// comparisons).
    pub fn only_layer(&self, layer: u8) -> Conductor {
        Conductor {
            pieces: self
                .pieces
                .iter()
                .filter(|p| p.layer == layer)
                .map(|p| Piece { weight: 1.0, ..*p })
                .collect(),
            layer_z: self.layer_z.clone(),
            layer_t: self.layer_t.clone(),
        }
    }

    /// The conductor as coaxial rings, one per turn: consecutive pieces of
    /// a layer are gathered (each counting as the fraction `swept / 2 pi` of
    /// a loop, at its mean distance from the axis: Simpson average of start,
    /// middle and end) until they make a whole turn, and the turn becomes
    /// one loop at the fraction-weighted mean radius. A piece that completes
    /// a turn is split by fraction. The rest of a layer is a partial ring.
    ///
    /// Exact for arcs about the axis; the circular spiral (half-turns
    /// centred a quarter pitch off the axis) differs from its rings by
    /// order (pitch / radius)^2.
    pub fn rings(&self) -> Vec<Ring> {
        let mut out = Vec::new();
        let mut acc: Option<(Ring, f64, f64)> = None; // (ring so far, sum |f| r, sum |f|)
        let flush = |acc: &mut Option<(Ring, f64, f64)>, out: &mut Vec<Ring>| {
            if let Some((mut r, fr, fa)) = acc.take()
                && r.frac.abs() > 1e-12
            {
                r.radius = fr / fa;
                out.push(r);
            }
        };
        for p in &self.pieces {
            let frac = p.segment.swept_about_origin() / std::f64::consts::TAU;
            if frac.abs() < 1e-12 {
                continue;
            }
            let r = m((p.segment.start().radius()
                + 4.0 * p.segment.point_at(0.5).radius()
                + p.segment.end().radius())
                / 6.0);
            if let Some((ring, _, _)) = &acc
                && (ring.layer != p.layer || ring.weight != p.weight)
            {
                flush(&mut acc, &mut out);
            }
            let mut left = frac;
            while left.abs() > 1e-12 {
                let (ring, fr, fa) = acc.get_or_insert((
                    Ring {
                        radius: r,
                        z: p.z,
                        frac: 0.0,
                        width: p.width,
                        thickness: p.thickness,
                        weight: p.weight,
                        layer: p.layer,
                    },
                    0.0,
                    0.0,
                ));
                let room = 1.0 - ring.frac.abs();
                let take = left.abs().min(room) * left.signum();
                ring.frac += take;
                *fr += take.abs() * r;
                *fa += take.abs();
                left -= take;
                if ring.frac.abs() >= 1.0 - 1e-12 {
                    flush(&mut acc, &mut out);
                }
            }
        }
        flush(&mut acc, &mut out);
        out
    }
}

/// A fraction of a circular current loop coaxial with the coil.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Ring {
    /// Mean radius, m.
    pub radius: f64,
    /// Height of the copper centre, m.
    pub z: f64,
    /// Signed fraction of a full turn (positive = counter-clockwise seen
    /// from the top).
    pub frac: f64,
    /// Radial width of the section, m.
    pub width: f64,
    /// Axial thickness of the section, m.
    pub thickness: f64,
    /// Share of the terminal current.
    pub weight: f64,
    /// Copper layer, 1 = top.
    pub layer: u8,
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Layers in parallel share the current by their DC conductance: with
    /// 35 and 18 um copper in a pair (the same tracks otherwise, mirrored)
    /// the split is 35/53 = 0.660 and 18/53 = 0.340 (Ohm's law for
    /// parallel conductors); the layers of each pair add up to the whole
    /// current and equal copper gives one half each.
    #[test]
    fn parallel_layers_share_by_conductance() {
        let text = |copper: &str| {
            format!(
                "name = \"t\"\n[coil]\nouter_diameter = \"16mm\"\ninner_diameter = \"6mm\"\n\
                 trace_width = \"0.15mm\"\nclearance = \"0.15mm\"\nlayers = 4\n\
                 wiring = \"parallel-pairs\"\n[stackup]\nkind = \"rigid\"\ncopper = {copper}\n\
                 dielectric = \"0.2mm\"\n"
            )
        };
        let share = |copper: &str| {
            let (d, l) = crate::pipeline::parse_and_build(&text(copper)).expect("design");
            let c = Conductor::new(&d, &l);
            (1..=4u8)
                .map(|layer| {
                    let w: Vec<f64> = c
                        .pieces
                        .iter()
                        .filter(|p| p.layer == layer && p.role == TrackRole::Winding)
                        .map(|p| p.weight)
                        .collect();
                    assert!(w.windows(2).all(|x| x[0] == x[1]), "one share per layer");
                    w[0]
                })
                .collect::<Vec<f64>>()
        };
        let mixed = share("[\"35um\", \"18um\", \"35um\", \"18um\"]");
        assert!((mixed[0] - 35.0 / 53.0).abs() < 5e-3, "{mixed:?}");
        assert!((mixed[1] - 18.0 / 53.0).abs() < 5e-3, "{mixed:?}");
        assert!((mixed[0] + mixed[1] - 1.0).abs() < 1e-12);
        assert!((mixed[2] + mixed[3] - 1.0).abs() < 1e-12);
        let equal = share("\"1oz\"");
        for s in equal {
            assert!((s - 0.5).abs() < 5e-3, "{s}");
        }
    }
}
