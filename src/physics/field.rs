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

use super::MU0;
use super::conductor::Filament;
use super::elliptic::ke;
use std::f64::consts::PI;

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
    pub fn field_at(&self, p: [f64; 3]) -> [f64; 3] {
        #[cfg(target_arch = "x86_64")]
        {
            if std::arch::is_x86_feature_detected!("avx512f") {
                // SAFETY: the CPU supports AVX-512F (checked just above).
                return unsafe { sum_avx512(self, p) };
            }
            if std::arch::is_x86_feature_detected!("avx2")
                && std::arch::is_x86_feature_detected!("fma")
            {
                // SAFETY: the CPU supports AVX2 and FMA (checked just above).
                return unsafe { sum_avx2(self, p) };
            }
        }
        sum(self, p)
    }

    /// Flux density at many points (in parallel over the points), tesla.
    pub fn field(&self, points: &[[f64; 3]]) -> Vec<[f64; 3]> {
        super::map_indices(points.len(), |i| self.field_at(points[i]))
    }
}

/// Lanes of the field sum: independent partial sums that the compiler can
/// keep in one SIMD register each.
const LANES: usize = 4;

/// Vertices per block of the field sum (stack buffers).
const BLOCK: usize = 256;

/// The field sum of [`Segments::field_at`], written so that it vectorises:
/// per block of vertices, the offsets and distances to the point are
/// computed once, then every segment of the block is summed with a
/// branch-free body into `LANES` independent accumulators.
#[inline(always)]
fn sum(s: &Segments, p: [f64; 3]) -> [f64; 3] {
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

/// [`sum`] compiled for AVX2 and FMA.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn sum_avx2(s: &Segments, p: [f64; 3]) -> [f64; 3] {
    sum(s, p)
}

/// The field sum of [`Segments::field_at`] in AVX-512 registers, eight
/// segments at a time, without square roots or divisions: with inverse
/// distances `ia = 1/|a|`, `ib = 1/|b|` the segment factor is
/// `I (ia + ib) ia ib / (1 + (a.b) ia ib)` (the closed form of
/// [`Segments::field_at`] with numerator and denominator divided by
/// `|a|^2 |b|^2`). The inverse square root and the reciprocal start from
/// the processor's 14-bit estimates (`vrsqrt14pd`, `vrcp14pd`, relative
/// error below 2^-14, Intel SDM) and take two Newton steps each, which
/// square the error twice: below 1e-15, as close as the correctly rounded
/// operations of the other paths (the last bits differ from them; tested
/// against the plain sum to 1e-13).
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f")]
unsafe fn sum_avx512(s: &Segments, p: [f64; 3]) -> [f64; 3] {
    use std::arch::x86_64::*;
    const W: usize = 8;
    // Offsets and inverse distances of one block of vertices, padded so
    // that whole registers can be read past the end.
    let mut rx = [0.0f64; BLOCK + 2 * W];
    let mut ry = [0.0f64; BLOCK + 2 * W];
    let mut rz = [0.0f64; BLOCK + 2 * W];
    let mut ri = [0.0f64; BLOCK + 2 * W];
    let (px, py, pz) = (
        _mm512_set1_pd(p[0]),
        _mm512_set1_pd(p[1]),
        _mm512_set1_pd(p[2]),
    );
    let (half, three_halves, two, one) = (
        _mm512_set1_pd(0.5),
        _mm512_set1_pd(1.5),
        _mm512_set1_pd(2.0),
        _mm512_set1_pd(1.0),
    );
    let zero = _mm512_setzero_pd();
    let tiny = _mm512_set1_pd(1e-300);
    let (mut sx, mut sy, mut sz) = (zero, zero, zero);
    // Mask of the first `min(left, 8)` lanes.
    let lanes = |left: usize| -> __mmask8 { if left >= W { 0xff } else { (1u8 << left) - 1 } };
    let nseg = s.cur.len();
    let mut start = 0;
    while start < nseg {
        let m = (nseg - start).min(BLOCK);
        let nv = m + 1;
        let mut k = 0;
        while k < nv {
            // SAFETY: masked loads read only vertices `start + k ..
            // start + nv` (in the arrays); stores stay within the padded
            // buffers (k + 8 <= BLOCK + 8).
            unsafe {
                let mask = lanes(nv - k);
                let at = start + k;
                let x = _mm512_sub_pd(_mm512_maskz_loadu_pd(mask, s.vx.as_ptr().add(at)), px);
                let y = _mm512_sub_pd(_mm512_maskz_loadu_pd(mask, s.vy.as_ptr().add(at)), py);
                let z = _mm512_sub_pd(_mm512_maskz_loadu_pd(mask, s.vz.as_ptr().add(at)), pz);
                let r2 = _mm512_fmadd_pd(x, x, _mm512_fmadd_pd(y, y, _mm512_mul_pd(z, z)));
                // 1/sqrt(r2): estimate, then y <- y (3/2 - r2/2 y^2) twice.
                let mut e = _mm512_rsqrt14_pd(r2);
                let h = _mm512_mul_pd(half, r2);
                for _ in 0..2 {
                    e = _mm512_mul_pd(e, _mm512_fnmadd_pd(h, _mm512_mul_pd(e, e), three_halves));
                }
                // A vertex at the point (or a padding lane) contributes nothing.
                let e = _mm512_maskz_mov_pd(_mm512_cmp_pd_mask::<_CMP_GT_OQ>(r2, zero) & mask, e);
                _mm512_storeu_pd(rx.as_mut_ptr().add(k), x);
                _mm512_storeu_pd(ry.as_mut_ptr().add(k), y);
                _mm512_storeu_pd(rz.as_mut_ptr().add(k), z);
                _mm512_storeu_pd(ri.as_mut_ptr().add(k), e);
            }
            k += W;
        }
        let mut k = 0;
        while k < m {
            // SAFETY: the masked load reads only currents `start + k ..
            // start + m`; buffer loads end at k + 9 <= BLOCK + 9, within
            // the padding (lanes past the block hold finite leftovers and
            // are masked out below).
            unsafe {
                let mask = lanes(m - k);
                let cur = _mm512_maskz_loadu_pd(mask, s.cur.as_ptr().add(start + k));
                let (x1, y1, z1, i1) = (
                    _mm512_loadu_pd(rx.as_ptr().add(k)),
                    _mm512_loadu_pd(ry.as_ptr().add(k)),
                    _mm512_loadu_pd(rz.as_ptr().add(k)),
                    _mm512_loadu_pd(ri.as_ptr().add(k)),
                );
                let (x2, y2, z2, i2) = (
                    _mm512_loadu_pd(rx.as_ptr().add(k + 1)),
                    _mm512_loadu_pd(ry.as_ptr().add(k + 1)),
                    _mm512_loadu_pd(rz.as_ptr().add(k + 1)),
                    _mm512_loadu_pd(ri.as_ptr().add(k + 1)),
                );
                let g = _mm512_mul_pd(i1, i2);
                let dot = _mm512_fmadd_pd(x1, x2, _mm512_fmadd_pd(y1, y2, _mm512_mul_pd(z1, z2)));
                let q = _mm512_fmadd_pd(dot, g, one);
                // 1/q: estimate, then y <- y (2 - q y) twice.
                let mut e = _mm512_rcp14_pd(q);
                for _ in 0..2 {
                    e = _mm512_mul_pd(e, _mm512_fnmadd_pd(q, e, two));
                }
                // Points on a segment between its ends (q = 0) get nothing
                // from it, as in the other paths.
                let ok = _mm512_cmp_pd_mask::<_CMP_GT_OQ>(q, tiny);
                let f = _mm512_mul_pd(
                    _mm512_mul_pd(cur, _mm512_add_pd(i1, i2)),
                    _mm512_mul_pd(g, e),
                );
                let f = _mm512_maskz_mov_pd(ok & mask, f);
                sx = _mm512_fmadd_pd(f, _mm512_fmsub_pd(y1, z2, _mm512_mul_pd(z1, y2)), sx);
                sy = _mm512_fmadd_pd(f, _mm512_fmsub_pd(z1, x2, _mm512_mul_pd(x1, z2)), sy);
                sz = _mm512_fmadd_pd(f, _mm512_fmsub_pd(x1, y2, _mm512_mul_pd(y1, x2)), sz);
            }
            k += W;
        }
        start += m;
    }
    let k = MU0 / (4.0 * PI);
    [
        k * _mm512_reduce_add_pd(sx),
        k * _mm512_reduce_add_pd(sy),
        k * _mm512_reduce_add_pd(sz),
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

    #[test]
    fn every_path_gives_the_plain_sum() {
        // The vectorised paths against the plain loop on a three-layer
        // spiral with links between layers and points near, on and far
        // from the copper (including a vertex and the middle of a
        // segment, which contribute nothing).
        let mut s = Segments::default();
        for layer in 0..3 {
            let z = -2e-4 * layer as f64;
            let pts: Vec<[f64; 3]> = (0..=523)
                .map(|i| {
                    let t = i as f64 * 0.11;
                    let r = 0.002 + 1.3e-5 * i as f64;
                    [r * t.cos(), r * t.sin(), z]
                })
                .collect();
            for w in pts.windows(2) {
                s.push(w[0], w[1], 1.0 - 0.3 * layer as f64);
            }
        }
        let v = [s.vx[7], s.vy[7], s.vz[7]];
        let mid = [
            (s.vx[9] + s.vx[10]) / 2.0,
            (s.vy[9] + s.vy[10]) / 2.0,
            (s.vz[9] + s.vz[10]) / 2.0,
        ];
        for p in [
            [0.0, 0.0, 0.0],
            [1e-3, 2e-3, 5e-4],
            [3e-3, -1e-3, 1e-5],
            [0.05, 0.01, -0.02],
            v,
            mid,
        ] {
            let plain = sum(&s, p);
            let scale = plain.iter().map(|c| c.abs()).fold(0.0, f64::max);
            let paths: Vec<[f64; 3]> = {
                let mut out = vec![s.field_at(p)];
                #[cfg(target_arch = "x86_64")]
                {
                    if std::arch::is_x86_feature_detected!("avx512f") {
                        // SAFETY: checked just above.
                        out.push(unsafe { sum_avx512(&s, p) });
                    }
                    if std::arch::is_x86_feature_detected!("avx2")
                        && std::arch::is_x86_feature_detected!("fma")
                    {
                        // SAFETY: checked just above.
                        out.push(unsafe { sum_avx2(&s, p) });
                    }
                }
                out
            };
            for b in paths {
                for c in 0..3 {
                    assert!(
                        (b[c] - plain[c]).abs() <= 1e-13 * scale,
                        "{p:?}: {b:?} vs {plain:?}"
                    );
                }
            }
        }
    }
}
