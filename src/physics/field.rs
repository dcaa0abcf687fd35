//! Magnetic field of the conductor by the Biot-Savart law on straight
//! filaments, each in closed form, and of circular loops (for the magnet)
//! with complete elliptic integrals.
//!
//! The analysis flattens arcs into balanced filament pairs (see
//! [`super::conductor::Conductor::balanced_filaments`]), which keep every
//! sub-arc's dipole moment; plain inscribed chords
//! ([`super::conductor::Conductor::filaments`]) make the on-axis field of a
//! circle too large by about `2/3 * sagitta/radius`, and at a distance `d`
//! from the copper the local error of either is of order `sagitta / d`.
//!
//! [`analyse`] is the analysis phase: the field on the axis and across the
//! coil, per ampere ([`FieldReport`]).

use super::conductor::{Conductor, Filament, m, to_mm};
use super::{Detail, MU0};
use crate::design::{Design, Shape};
use crate::geometry::Board;
use crate::numeric::elliptic::ke;
use crate::numeric::roots::largest_feasible;
use serde::Serialize;
use std::f64::consts::PI;

/// Relative chord sagitta of the balanced filaments the field is computed
/// on ([`super::conductor::Conductor::balanced_filaments`]; on a 4-layer,
/// 20-turn circular coil the centre field is within 1e-7 and the profile
/// 0.5 mm above the copper within 2e-4 of the field's centre value, against
/// chords 1e5 times finer: tested in `conductor.rs`).
pub const FIELD_SAGITTA: f64 = 1e-3;

/// The same for [`super::Detail::Metrics`] (sweeps): centre field within 3e-6,
/// profile within 6e-3 of the centre value, on that coil; the fall radii
/// within 0.02 mm of the report's (tested in `tests/suite/physics_reference.rs`).
pub const FIELD_SAGITTA_METRICS: f64 = 8e-3;

/// One point of a field profile.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ProfilePoint {
    /// Position along the profile (height above the top copper surface
    /// for the axial profile, distance from the axis for the radial one), mm.
    pub at_mm: f64,
    /// Flux density along the coil's own field direction per ampere at the
    /// terminals, T/A (positive where it points the same way as at the centre).
    pub b_t_per_a: f64,
}

/// Field of the coil per ampere: on the axis, across the coil and the
/// radii where it falls (serialised as report.json's `field` object).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FieldReport {
    /// On-axis field per ampere at the centre of the top copper surface,
    /// T/A (magnitude; it points into the board for current entering
    /// terminal 1).
    pub center_t_per_a: f64,
    /// Same at the drive current, T.
    pub center_at_drive_t: f64,
    /// B along the axis from the top surface upwards.
    pub axial: Vec<ProfilePoint>,
    /// Height of the radial profile above the top copper surface, mm.
    pub radial_height_mm: f64,
    /// Bz against the distance from the axis at that height (for polygons and rectangles the mean of two directions 45 degrees apart).
    pub radial: Vec<ProfilePoint>,
    /// Radius where Bz at that height first falls to 90 % of its value on
    /// the axis, mm.
    pub radius_90_mm: Option<f64>,
    /// Radius where it falls to 50 %, mm.
    pub radius_50_mm: Option<f64>,
    /// Arcs are flattened into balanced filament pairs over sub-arcs whose
    /// chord has a sagitta of at most this fraction of their radius.
    pub chord_sagitta_relative: f64,
    /// Straight filaments used.
    pub filaments: usize,
}

/// The field phase of the analysis: Biot-Savart on balanced filaments
/// (chord sagitta [`FIELD_SAGITTA`], or [`FIELD_SAGITTA_METRICS`] for
/// [`Detail::Metrics`]) along the axis and across the coil at the magnet's
/// gap (0.5 mm without a magnet), with the fall radii refined on the
/// field itself; `current_a` (A) is the drive's current, for the centre
/// field at the drive.
pub fn analyse(
    design: &Design,
    layout: &Board,
    cond: &Conductor,
    detail: Detail,
    current_a: f64,
) -> FieldReport {
    let full = detail == Detail::Full;
    let circular = matches!(design.coil.shape, Shape::Circle);
    let sagitta = if full {
        FIELD_SAGITTA
    } else {
        FIELD_SAGITTA_METRICS
    };
    let segs = cond.field_segments(sagitta, 1.0);
    let r_out = m(layout.outer_radius);
    let b0 = segs.field_at([0.0, 0.0, 0.0])[2];
    let sign = if b0 < 0.0 { -1.0 } else { 1.0 };
    let n_ax = if full { 41 } else { 2 };
    let z_max = 2.0 * r_out;
    // (The first point is the centre, already known.)
    let ax_pts: Vec<[f64; 3]> = (1..n_ax)
        .map(|i| [0.0, 0.0, z_max * i as f64 / (n_ax - 1) as f64])
        .collect();
    let axial: Vec<ProfilePoint> = std::iter::once(([0.0; 3], b0))
        .chain(
            segs.field(&ax_pts)
                .iter()
                .zip(&ax_pts)
                .map(|(b, p)| (*p, b[2])),
        )
        .map(|(p, bz)| ProfilePoint {
            at_mm: to_mm(p[2]),
            b_t_per_a: sign * bz,
        })
        .collect();
    let h = design.magnet.map_or(0.5, |mg| mg.gap);
    let crate::geometry::Rect { min: lo, max: hi } = layout.outline_bounds();
    let r_edge = m(lo.x.abs().max(lo.y.abs()).max(hi.x).max(hi.y)).max(1.2 * r_out);
    let n_r = if full { 101 } else { 13 };
    // Circles are round: one direction; other shapes: the mean of two.
    let dirs = if circular { 1 } else { 2 };
    // Bz at distance `r` (m) from the axis at the radial height, signed to
    // the centre's direction: on the grid below and, for the fall radii,
    // anywhere.
    let radial_at = |r: f64| {
        sign * (0..dirs)
            .map(|d| {
                let a = std::f64::consts::FRAC_PI_4 * d as f64;
                segs.field_at([r * a.cos(), r * a.sin(), m(h)])[2]
            })
            .sum::<f64>()
            / dirs as f64
    };
    let radial: Vec<ProfilePoint> = super::map_indices(n_r, |i| {
        let r = r_edge * i as f64 / (n_r - 1) as f64;
        ProfilePoint {
            at_mm: to_mm(r),
            b_t_per_a: radial_at(r),
        }
    });
    let field_center = b0.abs();
    FieldReport {
        center_t_per_a: field_center,
        center_at_drive_t: field_center * current_a,
        radius_90_mm: fall_radius(&radial, 0.9, |r_mm| radial_at(m(r_mm))),
        radius_50_mm: fall_radius(&radial, 0.5, |r_mm| radial_at(m(r_mm))),
        axial,
        radial_height_mm: h,
        radial,
        chord_sagitta_relative: sagitta,
        filaments: segs.len(),
    }
}

/// Radius (mm) where a profile first falls to `frac` of its first value:
/// the first interval of the sampled profile that crosses it, then the
/// crossing of the profile function `at` (mm -> value) itself within that
/// interval, to 1 um ([`largest_feasible`]). Sweeps sample
/// the profile more coarsely than reports but find the same crossing
/// unless a dip narrower than their spacing comes first.
fn fall_radius(profile: &[ProfilePoint], frac: f64, at: impl Fn(f64) -> f64) -> Option<f64> {
    let b0 = profile.first()?.b_t_per_a;
    let target = frac * b0;
    let w = profile
        .windows(2)
        .find(|w| w[1].b_t_per_a <= target && w[0].b_t_per_a > target)?;
    if w[1].b_t_per_a == target {
        return Some(w[1].at_mm);
    }
    let g = |r: f64| Ok::<f64, std::convert::Infallible>(target - at(r));
    let lo = (w[0].at_mm, target - w[0].b_t_per_a);
    let hi = (w[1].at_mm, target - w[1].b_t_per_a);
    largest_feasible(g, lo, hi, 1e-3).ok()
}

/// Straight filaments in structure-of-arrays form for fast field sums.
///
/// Stored as one chain of vertices: segment `k` runs from vertex `k` to
/// vertex `k + 1` with current `cur[k]`; a segment that does not start where
/// the previous one ended is joined by a link carrying no current. The
/// distance from an observation point to each vertex is then computed once
/// for the two segments that share it.
#[derive(Debug, Clone, Default)]
pub struct Segments {
    vx: Vec<f64>,
    vy: Vec<f64>,
    vz: Vec<f64>,
    /// Current from vertex k to k + 1, A (terminal current times share).
    cur: Vec<f64>,
    /// Segments pushed (links not counted).
    count: usize,
}

impl Segments {
    /// Segments from filaments carrying `current` amperes at the terminals.
    pub fn new(f: &[Filament], current: f64) -> Segments {
        let mut s = Segments::with_capacity(f.len());
        for x in f {
            s.push(x.a, x.b, current * x.weight);
        }
        s
    }

    /// Empty, with room for `n` segments in one chain.
    pub fn with_capacity(n: usize) -> Segments {
        Segments {
            vx: Vec::with_capacity(n + 1),
            vy: Vec::with_capacity(n + 1),
            vz: Vec::with_capacity(n + 1),
            cur: Vec::with_capacity(n),
            count: 0,
        }
    }

    /// Adds a segment from `a` to `b` (m) carrying `current` (A).
    pub fn push(&mut self, a: [f64; 3], b: [f64; 3], current: f64) {
        let n = self.vx.len();
        let joined =
            n > 0 && self.vx[n - 1] == a[0] && self.vy[n - 1] == a[1] && self.vz[n - 1] == a[2];
        if !joined {
            if n > 0 {
                self.cur.push(0.0);
            }
            self.vx.push(a[0]);
            self.vy.push(a[1]);
            self.vz.push(a[2]);
        }
        self.cur.push(current);
        self.vx.push(b[0]);
        self.vy.push(b[1]);
        self.vz.push(b[2]);
        self.count += 1;
    }

    /// Number of segments.
    pub fn len(&self) -> usize {
        self.count
    }

    /// Whether there are no segments.
    pub fn is_empty(&self) -> bool {
        self.count == 0
    }

    /// Flux density at `p` (m), tesla. Closed form for a straight segment
    /// (Biot-Savart): with `a = A - P`, `b = B - P`,
    /// `B = mu0 I / 4pi (a x b) (|a| + |b|) / (|a||b| (|a||b| + a.b))`.
    /// Points on a segment's line contribute nothing from that segment.
    ///
    /// Summed by the fastest path the processor has (see `physics/simd.rs`);
    /// every path agrees with the plain sum to 1e-13 of the largest
    /// component.
    pub fn field_at(&self, p: [f64; 3]) -> [f64; 3] {
        super::simd::field_sum(self, p)
    }

    /// Flux density at many points (in parallel over the points), tesla.
    pub fn field(&self, points: &[[f64; 3]]) -> Vec<[f64; 3]> {
        super::map_indices(points.len(), |i| self.field_at(points[i]))
    }

    /// The chain as arrays: vertex coordinates `x`, `y`, `z` (m, one more
    /// than the currents) and the current from each vertex to the next (A).
    pub(super) fn arrays(&self) -> (&[f64], &[f64], &[f64], &[f64]) {
        (&self.vx, &self.vy, &self.vz, &self.cur)
    }
}

/// Lanes of the field sum: independent partial sums that the compiler can
/// keep in one SIMD register each.
const LANES: usize = 4;

/// Vertices per block of the field sum (stack buffers; the AVX-512 path of
/// [`super::simd`] uses the same blocks).
pub(super) const BLOCK: usize = 256;

/// The plain field sum of [`Segments::field_at`], written so that it
/// vectorises: per block of vertices, the offsets and distances to the
/// point are computed once, then every segment of the block is summed with
/// a branch-free body into `LANES` independent accumulators. Also compiled
/// for AVX2 and FMA in [`super::simd`].
#[inline(always)]
pub(super) fn sum(s: &Segments, p: [f64; 3]) -> [f64; 3] {
    let nseg = s.cur.len();
    let (mut sx, mut sy, mut sz) = ([0.0f64; LANES], [0.0f64; LANES], [0.0f64; LANES]);
    let mut rx = [0.0f64; BLOCK + 1];
    let mut ry = [0.0f64; BLOCK + 1];
    let mut rz = [0.0f64; BLOCK + 1];
    let mut rl = [0.0f64; BLOCK + 1];
    let mut fx = [0.0f64; BLOCK];
    let mut fy = [0.0f64; BLOCK];
    let mut fz = [0.0f64; BLOCK];
    let mut start = 0;
    while start < nseg {
        let m = (nseg - start).min(BLOCK);
        // Vertices start ..= start + m.
        let nv = m + 1;
        let (vx, vy, vz) = (
            &s.vx[start..start + nv],
            &s.vy[start..start + nv],
            &s.vz[start..start + nv],
        );
        let (ox, oy, oz, ol) = (&mut rx[..nv], &mut ry[..nv], &mut rz[..nv], &mut rl[..nv]);
        for k in 0..nv {
            let (x, y, z) = (vx[k] - p[0], vy[k] - p[1], vz[k] - p[2]);
            ox[k] = x;
            oy[k] = y;
            oz[k] = z;
            ol[k] = (x * x + y * y + z * z).sqrt();
        }
        let cur = &s.cur[start..start + m];
        // Contribution of every segment of the block (element-wise, vectorises).
        let (x1, y1, z1, l1) = (&rx[..m], &ry[..m], &rz[..m], &rl[..m]);
        let (x2, y2, z2, l2) = (&rx[1..nv], &ry[1..nv], &rz[1..nv], &rl[1..nv]);
        let (tx, ty, tz) = (&mut fx[..m], &mut fy[..m], &mut fz[..m]);
        for k in 0..m {
            let (la, lb) = (l1[k], l2[k]);
            let den = la * lb * (la * lb + x1[k] * x2[k] + y1[k] * y2[k] + z1[k] * z2[k]);
            let f = cur[k] * (la + lb) / den.max(1e-300);
            let f = if den > 1e-300 { f } else { 0.0 };
            tx[k] = f * (y1[k] * z2[k] - z1[k] * y2[k]);
            ty[k] = f * (z1[k] * x2[k] - x1[k] * z2[k]);
            tz[k] = f * (x1[k] * y2[k] - y1[k] * x2[k]);
        }
        // Sum into independent lanes.
        let chunks = m / LANES;
        for c in 0..chunks {
            let o = c * LANES;
            let (a, b, d) = (&tx[o..o + LANES], &ty[o..o + LANES], &tz[o..o + LANES]);
            for l in 0..LANES {
                sx[l] += a[l];
                sy[l] += b[l];
                sz[l] += d[l];
            }
        }
        for k in chunks * LANES..m {
            sx[0] += tx[k];
            sy[0] += ty[k];
            sz[0] += tz[k];
        }
        start += m;
    }
    let k = MU0 / (4.0 * PI);
    [
        k * sx.iter().sum::<f64>(),
        k * sy.iter().sum::<f64>(),
        k * sz.iter().sum::<f64>(),
    ]
}

/// Field of a circular loop of radius `a` (m) in the plane `z = 0` about the
/// z axis, current `i` (A, positive counter-clockwise seen from +z), at
/// cylindrical `(rho, z)`: `(B_rho, B_z)` in tesla (textbook closed form
/// with complete elliptic integrals, e.g. Jackson, Classical
/// Electrodynamics, 5.37; Simpson et al., NASA TM 2001):
/// `B_z = mu0 I / (2 pi) / sqrt((a+rho)^2+z^2) (K + (a^2-rho^2-z^2)/((a-rho)^2+z^2) E)`,
/// `B_rho = mu0 I / (2 pi) z / (rho sqrt((a+rho)^2+z^2)) (-K + (a^2+rho^2+z^2)/((a-rho)^2+z^2) E)`.
pub fn loop_field(i: f64, a: f64, rho: f64, z: f64) -> (f64, f64) {
    let q = (a + rho) * (a + rho) + z * z;
    let d = (a - rho) * (a - rho) + z * z;
    if d <= 0.0 {
        return (0.0, 0.0);
    }
    let k = (4.0 * a * rho / q).sqrt().min(1.0 - 1e-16);
    let (kk, ee) = ke(k);
    let c = MU0 * i / (2.0 * PI) / q.sqrt();
    let bz = c * (kk + (a * a - rho * rho - z * z) / d * ee);
    let brho = if rho < 1e-12 * a {
        0.0
    } else {
        c * z / rho * (-kk + (a * a + rho * rho + z * z) / d * ee)
    };
    (brho, bz)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::closed_forms::{loop_on_axis, spiral_on_axis};

    fn polygon_loop(r: f64, n: usize, z: f64, current: f64, s: &mut Segments) {
        for i in 0..n {
            let t0 = 2.0 * PI * i as f64 / n as f64;
            let t1 = 2.0 * PI * (i + 1) as f64 / n as f64;
            s.push(
                [r * t0.cos(), r * t0.sin(), z],
                [r * t1.cos(), r * t1.sin(), z],
                current,
            );
        }
    }

    #[test]
    fn loop_on_axis_matches_closed_form() {
        // Textbook on-axis field of a loop, 1e-6 relative: a polygon of n
        // sides inscribed in the circle differs by (n/pi) tan(pi/n) - 1
        // ~ pi^2/(3 n^2) at the centre, so n = 4000 (1e-7) is enough.
        let mut s = Segments::default();
        polygon_loop(0.01, 4000, 0.0, 1.0, &mut s);
        for z in [0.0, 0.003, 0.01, 0.05] {
            let b = s.field_at([0.0, 0.0, z])[2];
            let exact = loop_on_axis(1.0, 0.01, z);
            assert!((b / exact - 1.0).abs() < 1e-6, "z {z}: {b} {exact}");
        }
        // Inscribed polygon at the centre: exactly (n/pi) tan(pi/n) times the circle.
        let n = 12;
        let mut s = Segments::default();
        polygon_loop(0.01, n, 0.0, 1.0, &mut s);
        let ratio = s.field_at([0.0; 3])[2] / loop_on_axis(1.0, 0.01, 0.0);
        let t = (PI / n as f64).tan() * n as f64 / PI;
        assert!((ratio - t).abs() < 1e-12);
    }

    #[test]
    fn flat_spiral_matches_closed_form() {
        // Textbook flat spiral, r1 = 5, r2 = 10 mm, N = 10 (REFERENCES.md:
        // 0.87103 mT at z = 0): many thin concentric loops spread evenly
        // (midpoint rule in r, 2000 loops) approximate the even spread to
        // better than 1e-6.
        let (r1, r2, nt) = (0.005, 0.010, 10.0);
        let loops = 2000;
        let mut s = Segments::default();
        for k in 0..loops {
            let r = r1 + (r2 - r1) * (k as f64 + 0.5) / loops as f64;
            polygon_loop(r, 3000, 0.0, nt / loops as f64, &mut s);
        }
        for z in [0.0, 0.004] {
            let b = s.field_at([0.0, 0.0, z])[2];
            let exact = spiral_on_axis(1.0, nt, r1, r2, z);
            assert!((b / exact - 1.0).abs() < 1e-6, "z {z}: {b} {exact}");
        }
    }

    #[test]
    fn elliptic_loop_field_agrees_with_biot_savart() {
        let mut s = Segments::default();
        polygon_loop(0.004, 20000, 0.0, 2.0, &mut s);
        for (rho, z) in [
            (0.0, 0.002),
            (0.002, 0.001),
            (0.0035, -0.0005),
            (0.009, 0.003),
        ] {
            let (br, bz) = loop_field(2.0, 0.004, rho, z);
            let b = s.field_at([rho, 0.0, z]);
            assert!(
                (b[2] - bz).abs() < 1e-6 * bz.abs().max(1e-6),
                "{rho} {z}: {b:?} {bz}"
            );
            assert!(
                (b[0] - br).abs() < 1e-6 * b[0].abs().max(1e-6) + 1e-12,
                "{rho} {z}: {b:?} {br}"
            );
        }
    }
}
