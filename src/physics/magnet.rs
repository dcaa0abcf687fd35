//! Axial force between the coil and an axially magnetised cylinder magnet
//! on the coil axis, by two independent methods.
//!
//! The magnet (remanence `Br`, radius `R`, length `L`) is replaced by the
//! equivalent surface current `K = Br / mu0` (A/m) circulating on its side
//! (Derby & Olbert, Am. J. Phys. 78(3), 2010). It is magnetised along +z
//! (north face away from the coil); its lower face is `gap` above the top
//! copper surface (`z = 0`).
//!
//! * Method A (primary, real conductor): the Lorentz force `I dl x B` on
//!   every filament of the conductor in the magnet's field, the field being
//!   the elliptic-integral field of the sheet's loops integrated over the
//!   magnet's length by graded Gauss-Legendre panels; the force on the
//!   magnet is its opposite.
//! * Method B (cross-check): each piece as a fraction of a coaxial loop,
//!   force `I K (M(a, R, h0 + L) - M(a, R, h0))` with Maxwell's mutual
//!   inductance `M` (REFERENCES.md).
//!
//! Sign: positive force pushes the magnet away from the coil. Current
//! entering terminal 1 circulates clockwise seen from the top, so its field
//! at the centre points into the board and repels a magnet whose north
//! face points away; flip the magnet or the current to attract.
//!
//! [`analyse`] is the analysis phase ([`MagnetReport`]).

use super::caution::{Caution, Findings, force_methods_differ};
use super::closed_forms::magnet_on_axis;
use super::conductor::{Conductor, Filament, Piece, Ring, m};
use super::field::loop_field;
use super::inductance::maxwell_mutual;
use super::{Detail, MU0};
use crate::design::{Design, Magnet, Shape};
use crate::geometry::{Segment, Vec2};
use crate::numeric::elliptic::{cel, cel_lanes};
use crate::numeric::quadrature::rule;
use serde::Serialize;

/// Force on the magnet: at the drive, per ampere by both methods, and
/// against the gap (serialised as report.json's `magnet` object).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MagnetReport {
    /// Axial force at the drive, N (positive: pushes the magnet away).
    pub force_n: f64,
    /// Per ampere, N/A.
    pub force_per_a_n: f64,
    /// Per square-root watt at the operating temperature, N/sqrt(W).
    pub force_per_sqrt_w_n: f64,
    /// Method A (Lorentz force on the real conductor), N per ampere.
    pub lorentz_n_per_a: f64,
    /// Method B (coaxial rings, Maxwell), N per ampere.
    pub rings_n_per_a: f64,
    /// |A - B| / |A|.
    pub methods_difference: f64,
    /// Force per ampere against the gap, N/A (method B for circular coils,
    /// method A otherwise).
    pub force_vs_gap: Vec<GapPoint>,
    /// Magnet's own field on its axis at the top copper surface, T
    /// (Derby & Olbert closed form).
    pub magnet_field_at_coil_t: f64,
}

/// One point of the force-against-gap curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct GapPoint {
    /// Gap from the top copper surface to the magnet face, mm.
    pub gap_mm: f64,
    /// Force per ampere, N/A.
    pub force_n_per_a: f64,
}

/// The force phase of the analysis, for a design with a magnet: method A
/// (Lorentz force on the real conductor) and method B (coaxial rings) per
/// ampere, the force at the drive (`current_a` A, `power_w` W), the
/// force against the gap (not for [`Detail::Metrics`]) and a caution (or,
/// for rectangles, a note) when the two methods differ by more than 5 %.
pub fn analyse(
    design: &Design,
    mg: &Magnet,
    cond: &Conductor,
    rings: &[Ring],
    detail: Detail,
    (current, power): (f64, f64),
    findings: &mut Findings,
) -> MagnetReport {
    let full = detail == Detail::Full;
    let circular = matches!(design.coil.shape, Shape::Circle);
    let cyl = Cylinder {
        radius: m(mg.diameter / 2.0),
        length: m(mg.thickness),
        remanence: mg.remanence,
        gap: m(mg.gap),
    };
    let fa = force_lorentz_pieces(&cond.pieces, 1.0, &cyl);
    let fb = force_rings(rings, 1.0, &cyl);
    let diff = if fa != 0.0 {
        ((fa - fb) / fa).abs()
    } else {
        0.0
    };
    let gap_max = (3.0 * mg.gap).max(mg.diameter).max(1.0);
    // Circles: the ring model (agrees with the real conductor to a
    // fraction of a percent, and is fast); other shapes: the real
    // conductor on fewer points.
    let (n_gap, by_rings) = match (full, circular) {
        (false, _) => (0, true),
        (true, true) => (40, true),
        (true, false) => (20, false),
    };
    let curve = if n_gap == 0 {
        Vec::new()
    } else {
        (0..=n_gap)
            .map(|i| {
                let g = gap_max * i as f64 / n_gap as f64;
                let c = Cylinder { gap: m(g), ..cyl };
                let f = if by_rings {
                    force_rings(rings, 1.0, &c)
                } else {
                    force_lorentz_pieces(&cond.pieces, 1.0, &c)
                };
                GapPoint {
                    gap_mm: g,
                    force_n_per_a: f,
                }
            })
            .collect()
    };
    if diff > 0.05 {
        if matches!(design.coil.shape, Shape::Rectangle { .. }) {
            findings.note(format!(
                "{}: expected for a rectangle, whose sides are far from circles; the real-conductor value is used",
                force_methods_differ(diff)
            ));
        } else {
            findings.caution(Caution::ForceRough { difference: diff });
        }
    }
    MagnetReport {
        force_n: fa * current,
        force_per_a_n: fa,
        force_per_sqrt_w_n: if power > 0.0 {
            fa * current / power.sqrt()
        } else {
            0.0
        },
        lorentz_n_per_a: fa,
        rings_n_per_a: fb,
        methods_difference: diff,
        force_vs_gap: curve,
        magnet_field_at_coil_t: magnet_on_axis(mg.remanence, cyl.radius, cyl.length, cyl.gap),
    }
}

/// A cylinder magnet in SI units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cylinder {
    /// Radius, m.
    pub radius: f64,
    /// Axial length, m.
    pub length: f64,
    /// Remanence, T.
    pub remanence: f64,
    /// Height of the lower face above the top copper surface, m.
    pub gap: f64,
}

impl Cylinder {
    /// Equivalent surface current density, A/m.
    pub fn sheet_current(&self) -> f64 {
        self.remanence / MU0
    }

    /// The magnet's flux density at cylindrical `(rho, z)` outside the
    /// magnet: `(B_rho, B_z)`, tesla. Closed form of the ideal solenoid
    /// with Bulirsch's generalized complete elliptic integral (Derby &
    /// Olbert, Am. J. Phys. 78(3), 2010, eqs. 3 and 4): with `a` the
    /// radius, `b` the half length, `z` from the middle of the magnet,
    /// `z+- = z +- b`, `alpha = a / sqrt(z^2 + (rho + a)^2)`,
    /// `beta = z / sqrt(...)`, `gamma = (a - rho) / (a + rho)` and
    /// `k^2 = (z^2 + (a - rho)^2) / (z^2 + (a + rho)^2)`:
    /// `B_rho = Br/pi [alpha+ cel(k+, 1, 1, -1) - alpha- cel(k-, 1, 1, -1)]`,
    /// `B_z = Br/pi a/(a + rho) [beta+ cel(k+, g^2, 1, g) - beta- cel(k-, g^2, 1, g)]`.
    pub fn field(&self, rho: f64, z: f64) -> (f64, f64) {
        let a = self.radius;
        let g = (a - rho) / (a + rho);
        let bz: f64 = self
            .faces(rho, z)
            .iter()
            .map(|&(zs, sign, q, kc)| sign * (zs / q) * cel(kc, g * g, 1.0, g))
            .sum();
        let b0 = self.remanence / std::f64::consts::PI;
        (self.b_rho(rho, z), b0 * a / (a + rho) * bz)
    }

    /// The radial component alone (the only one that pushes on flat
    /// copper along the axis), tesla: the first half of [`Cylinder::field`].
    pub fn b_rho(&self, rho: f64, z: f64) -> f64 {
        let a = self.radius;
        let br: f64 = self
            .faces(rho, z)
            .iter()
            .map(|&(_, sign, q, kc)| sign * (a / q) * cel(kc, 1.0, 1.0, -1.0))
            .sum();
        self.remanence / std::f64::consts::PI * br
    }

    /// [`Cylinder::b_rho`] at eight points `(rho, z)` at once: lane by
    /// lane the same operations, so the same bits, with the elliptic
    /// integrals of all lanes in vector registers (AVX-512 or AVX2 where
    /// the processor has them, see `physics/simd.rs`).
    pub fn b_rho_8(&self, rho: [f64; 8], z: [f64; 8]) -> [f64; 8] {
        super::simd::b_rho_8(self, rho, z)
    }

    /// The plain eight-lane body of [`Cylinder::b_rho_8`] (also compiled
    /// for AVX-512 and AVX2 in `physics/simd.rs`).
    #[inline(always)]
    pub(in crate::physics) fn b_rho_lanes(&self, rho: [f64; 8], z: [f64; 8]) -> [f64; 8] {
        let a = self.radius;
        let mut kc = [[0.0; 8]; 2];
        let mut alpha = [[0.0; 8]; 2];
        for l in 0..8 {
            for (f, (_, _, q, k)) in self.faces(rho[l], z[l]).into_iter().enumerate() {
                kc[f][l] = k;
                alpha[f][l] = a / q;
            }
        }
        let ones = [1.0; 8];
        let upper = cel_lanes(kc[0], ones, ones, [-1.0; 8]);
        let lower = cel_lanes(kc[1], ones, ones, [-1.0; 8]);
        let mut out = [0.0; 8];
        for l in 0..8 {
            // The faces' signs are + and -, as in `faces` (a product
            // with 1 or -1 is exact: the same bits as `b_rho`).
            let br = alpha[0][l] * upper[l] + -alpha[1][l] * lower[l];
            out[l] = self.remanence / std::f64::consts::PI * br;
        }
        out
    }

    /// Per face of the magnet, the terms of [`Cylinder::field`]: `(z+-,
    /// sign, sqrt(z+-^2 + (rho + a)^2), k+-)`. The modulus is floored: on
    /// the rim itself the field is singular.
    fn faces(&self, rho: f64, z: f64) -> [(f64, f64, f64, f64); 2] {
        let a = self.radius;
        let b = self.length / 2.0;
        let zc = z - (self.gap + b);
        [(zc + b, 1.0), (zc - b, -1.0)].map(|(zs, sign)| {
            let q = (zs * zs + (rho + a) * (rho + a)).sqrt();
            let kc = ((zs * zs + (a - rho) * (a - rho)).sqrt() / q).max(1e-15);
            (zs, sign, q, kc)
        })
    }

    /// The same field by integrating the sheet's loops over the magnet's
    /// length (8-point Gauss-Legendre panels that grow geometrically away
    /// from the face nearest the point): the slow, independent check of
    /// [`Cylinder::field`].
    pub fn field_by_loops(&self, rho: f64, z: f64) -> (f64, f64) {
        let (z0, z1) = (self.gap, self.gap + self.length);
        let near = if (z - z0).abs() < (z - z1).abs() {
            z0
        } else {
            z1
        };
        let delta = ((z - near).abs()).max((rho - self.radius).abs()).max(1e-7);
        // Breakpoints graded from the near face.
        let mut br = vec![near];
        let mut h = delta;
        let dir = if near == z0 { 1.0 } else { -1.0 };
        loop {
            let next = near + dir * h;
            if (dir > 0.0 && next >= z1) || (dir < 0.0 && next <= z0) {
                break;
            }
            br.push(next);
            h *= 2.0;
        }
        br.push(if dir > 0.0 { z1 } else { z0 });
        let (x, w) = rule(8);
        let k = self.sheet_current();
        let (mut sr, mut sz) = (0.0, 0.0);
        for p in br.windows(2) {
            let (hh, c) = ((p[1] - p[0]) / 2.0, (p[1] + p[0]) / 2.0);
            for (xi, wi) in x.iter().zip(w) {
                let zs = c + hh * xi;
                let (a, b) = loop_field(1.0, self.radius, rho, z - zs);
                sr += a * wi * hh.abs();
                sz += b * wi * hh.abs();
            }
        }
        (k * sr, k * sz)
    }
}

/// Axial force on the magnet from current elements: `items` gives, per
/// element, a point (m) and `I dl` (A m) in the plane of the element; the
/// result is minus the z component of the Lorentz force on them, newton.
fn force_on_magnet(points: &[([f64; 3], [f64; 2])], mag: &Cylinder) -> f64 {
    // Eight points at a time (the field's elliptic integrals in vector
    // lanes); the last chunk is padded with a harmless point.
    let terms = super::map_indices(points.len().div_ceil(8), |c| {
        let chunk = &points[8 * c..(8 * c + 8).min(points.len())];
        let mut rho = [1.0; 8];
        let mut z = [0.0; 8];
        for (l, (p, _)) in chunk.iter().enumerate() {
            rho[l] = (p[0] * p[0] + p[1] * p[1]).sqrt();
            z[l] = p[2];
        }
        let brho = mag.b_rho_8(rho, z);
        let mut out = [0.0; 8];
        for (l, (p, idl)) in chunk.iter().enumerate() {
            if rho[l] < 1e-12 {
                continue;
            }
            let (bx, by) = (brho[l] * p[0] / rho[l], brho[l] * p[1] / rho[l]);
            // (dl x B)_z = dl_x B_y - dl_y B_x.
            out[l] = idl[0] * by - idl[1] * bx;
        }
        out
    });
    // Summed in a fixed order, point by point: the same inputs give the
    // same bits.
    let fz: f64 = terms.iter().flatten().take(points.len()).sum();
    -fz
}

/// Length limit for one integration piece at distance `edge` from the
/// magnet's lower edge, m.
fn piece_len(edge: f64, mag: &Cylinder) -> f64 {
    (edge / 4.0).max(mag.radius / 8.0)
}

/// Method A on straight filaments carrying `current` amperes at the
/// terminals, newton. Each filament is cut into pieces no longer than a
/// quarter of its distance from the magnet's lower edge (and at least an
/// eighth of the magnet radius), with 2-point Gauss-Legendre per piece.
pub fn force_lorentz(f: &[Filament], current: f64, mag: &Cylinder) -> f64 {
    let g = 0.5 / 3f64.sqrt();
    let mut pts = Vec::new();
    for s in f {
        let d = [s.b[0] - s.a[0], s.b[1] - s.a[1]];
        let len = d[0].hypot(d[1]);
        let rho_mid = ((s.a[0] + s.b[0]) / 2.0).hypot((s.a[1] + s.b[1]) / 2.0);
        let edge = (rho_mid - mag.radius).hypot(mag.gap - s.a[2]);
        let n = (len / piece_len(edge, mag)).ceil().max(1.0) as usize;
        let c = current * s.weight / (2 * n) as f64;
        for i in 0..n {
            for off in [0.5 - g, 0.5 + g] {
                let t = (i as f64 + off) / n as f64;
                pts.push((
                    [s.a[0] + d[0] * t, s.a[1] + d[1] * t, s.a[2]],
                    [c * d[0], c * d[1]],
                ));
            }
        }
    }
    force_on_magnet(&pts, mag)
}

/// Largest angle about the axis one integration piece of an arc or line
/// may sweep, radians.
const MAX_TURN: f64 = std::f64::consts::PI / 4.0;

/// How far a segment moves towards or away from the axis (its travel in
/// the magnet's meridian plane, where the magnet's field varies), at most,
/// m. For a line that is bounded by its length; for an arc about a centre
/// `c` off the axis, the distance from the axis changes by at most
/// `r |c| / rho_min` per radian, so an arc nearly about the axis (a
/// circular turn) travels far less than its length.
fn travel(s: &Segment) -> f64 {
    let len = m(s.length());
    match s {
        Segment::Line(_) => len,
        Segment::Arc(a) => {
            let rho_min = s.min_radius();
            if rho_min <= 0.0 {
                return len;
            }
            let rate = a.radius() * a.center.radius() / rho_min;
            len.min(m(rate * a.sweep.abs()))
        }
    }
}

/// Method A on the exact pieces (true arcs, no flattening), newton: the
/// same integration with the points and tangents of the arcs themselves.
/// Each piece is cut into parts that travel (see `travel`) no more than
/// a quarter of their distance from the magnet's lower edge (and at least
/// an eighth of the magnet radius) and sweep at most pi/4 about the axis,
/// with 2-point Gauss-Legendre per part.
pub fn force_lorentz_pieces(pieces: &[Piece], current: f64, mag: &Cylinder) -> f64 {
    let g = 0.5 / 3f64.sqrt();
    let parts: Vec<usize> = pieces
        .iter()
        .map(|p| {
            let mid = p.segment.point_at(0.5);
            let edge = (m(mid.radius()) - mag.radius).hypot(mag.gap - p.z);
            (travel(&p.segment) / piece_len(edge, mag))
                .ceil()
                .max((p.segment.swept_about_origin().abs() / MAX_TURN).ceil())
                .max(1.0) as usize
        })
        .collect();
    let mut pts = Vec::with_capacity(2 * parts.iter().sum::<usize>());
    for (p, &n) in pieces.iter().zip(&parts) {
        // Each Gauss point's share of the current element.
        let w = current * p.weight / (2 * n) as f64;
        match p.segment {
            Segment::Line(l) => {
                let dl = [m(l.end.x - l.start.x), m(l.end.y - l.start.y)];
                for i in 0..n {
                    for off in [0.5 - g, 0.5 + g] {
                        let q = l.start.lerp(l.end, (i as f64 + off) / n as f64);
                        pts.push(([m(q.x), m(q.y), p.z], [w * dl[0], w * dl[1]]));
                    }
                }
            }
            Segment::Arc(a) => {
                // The two Gauss points of every part, by rotating the
                // radius vector one part at a time.
                let step = a.sweep / n as f64;
                let (sin, cos) = step.sin_cos();
                let v0 = a.start - a.center;
                let mut vs = [v0.rotated(step * (0.5 - g)), v0.rotated(step * (0.5 + g))];
                for _ in 0..n {
                    for v in &mut vs {
                        let q = a.center + *v;
                        // Tangent times the sweep: the arc's dl per unit t.
                        let dl = [m(-v.y * a.sweep), m(v.x * a.sweep)];
                        pts.push(([m(q.x), m(q.y), p.z], [w * dl[0], w * dl[1]]));
                        *v = Vec2::new(v.x * cos - v.y * sin, v.x * sin + v.y * cos);
                    }
                }
            }
        }
    }
    force_on_magnet(&pts, mag)
}

/// Method B: axial force on the magnet with the conductor as coaxial ring
/// elements and Maxwell's mutual inductance, newton.
pub fn force_rings(rings: &[Ring], current: f64, mag: &Cylinder) -> f64 {
    let k = mag.sheet_current();
    rings
        .iter()
        .map(|r| {
            let h0 = mag.gap - r.z;
            let m = maxwell_mutual(r.radius, mag.radius, h0 + mag.length)
                - maxwell_mutual(r.radius, mag.radius, h0);
            current * r.weight * r.frac * k * m
        })
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::closed_forms::magnet_on_axis;

    #[test]
    fn sheet_field_on_axis_matches_closed_form() {
        // Derby & Olbert 2010 / textbook on-axis field of the cylinder.
        let m = Cylinder {
            radius: 2.5e-3,
            length: 2e-3,
            remanence: 1.3,
            gap: 0.5e-3,
        };
        for z in [0.0, -0.3e-3, 0.2e-3, -5e-3, 4e-3] {
            let (_, bz) = m.field(0.0, z);
            let exact = if z < m.gap {
                magnet_on_axis(1.3, 2.5e-3, 2e-3, m.gap - z)
            } else {
                magnet_on_axis(1.3, 2.5e-3, 2e-3, z - m.gap - m.length)
            };
            assert!((bz / exact - 1.0).abs() < 1e-8, "{z}: {bz} {exact}");
        }
    }

    #[test]
    fn closed_form_field_matches_loop_integration() {
        // Derby & Olbert's closed form against the sheet integrated loop
        // by loop (Jackson's loop field), in and around the magnet's
        // footprint, near its rim and far away, above and below.
        let m = Cylinder {
            radius: 2.5e-3,
            length: 2e-3,
            remanence: 1.3,
            gap: 0.5e-3,
        };
        for rho in [0.0, 1e-4, 1.2e-3, 2.4e-3, 2.5e-3, 2.6e-3, 4e-3, 2e-2] {
            for z in [-2e-3, -3.5e-5, 0.0, 0.45e-3, 2.6e-3, 3e-3, 1e-2] {
                let (r1, z1) = m.field(rho, z);
                let (r2, z2) = m.field_by_loops(rho, z);
                let scale = r2.abs().max(z2.abs()).max(1e-6);
                assert!((r1 - r2).abs() < 1e-9 * scale, "rho {rho} z {z}: {r1} {r2}");
                assert!((z1 - z2).abs() < 1e-9 * scale, "rho {rho} z {z}: {z1} {z2}");
            }
        }
    }

    #[test]
    fn methods_agree_for_a_loop() {
        // One loop of radius 3 mm at z = 0 as 2000 chords vs as one ring:
        // both methods must give the same force (independent formulas).
        let mag = Cylinder {
            radius: 2.5e-3,
            length: 2e-3,
            remanence: 1.3,
            gap: 0.5e-3,
        };
        let n = 2000;
        let r = 3e-3;
        let f: Vec<Filament> = (0..n)
            .map(|i| {
                let a0 = -std::f64::consts::TAU * i as f64 / n as f64;
                let a1 = -std::f64::consts::TAU * (i + 1) as f64 / n as f64;
                Filament {
                    a: [r * a0.cos(), r * a0.sin(), 0.0],
                    b: [r * a1.cos(), r * a1.sin(), 0.0],
                    weight: 1.0,
                    layer: 1,
                    width: 1e-4,
                    thickness: 35e-6,
                    lead: false,
                }
            })
            .collect();
        let ring = Ring {
            radius: r,
            z: 0.0,
            frac: -1.0,
            width: 1e-4,
            thickness: 35e-6,
            weight: 1.0,
            layer: 1,
        };
        let fa = force_lorentz(&f, 1.0, &mag);
        let fb = force_rings(&[ring], 1.0, &mag);
        assert!(fa > 0.0, "clockwise current repels a north-up magnet");
        assert!((fa / fb - 1.0).abs() < 1e-5, "{fa} {fb}");
    }
}
