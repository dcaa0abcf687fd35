//! The vector paths of the hot sums, and the only `unsafe` code in the
//! crate: the Biot-Savart sum of [`super::field::Segments::field_at`]
//! (AVX-512 intrinsics, or the plain sum compiled for AVX2 and FMA) and
//! Maxwell's formula eight ring pairs at a time
//! ([`super::inductance::maxwell_mutual_8`], the plain body compiled for
//! AVX-512 or AVX2), and the magnet's radial field eight points at a time
//! ([`super::magnet::Cylinder::b_rho_8`], likewise).
//!
//! The processor's features are detected once ([`Level::detected`]) and
//! every call dispatches from here. The plain paths live beside their
//! maths (`field::sum`, `inductance::maxwell_8`); the tests below run every
//! path the machine has against them: the field to 1e-13 of the largest
//! component, Maxwell's formula bit for bit.
//!
//! Rules for this module: every `unsafe` block or function call carries a
//! `// SAFETY:` comment; a `target_feature` function is only called when
//! [`Level::supported`] says the processor has its features.

use super::MU0;
use super::field::{self, Segments};
use super::inductance;
use super::magnet::Cylinder;
use std::f64::consts::PI;
use std::sync::LazyLock;
use std::sync::atomic::{AtomicBool, Ordering};

/// Set by [`use_plain_arithmetic`]: every sum takes the plain path.
static PLAIN_ONLY: AtomicBool = AtomicBool::new(false);

/// Makes every vectorised sum take its plain path from now on, so that
/// results are the same bits on every processor (the vector paths agree
/// with the plain one to 1e-13, not bit for bit). For reproducible
/// outputs, e.g. comparing files made on different machines; slower.
pub fn use_plain_arithmetic() {
    PLAIN_ONLY.store(true, Ordering::Relaxed);
}

/// A set of vector instructions the sums can use, from none to the widest.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Level {
    /// Plain code (what the compiler makes of it for the base target).
    Plain,
    /// AVX2 (Maxwell's formula only; the field sum needs FMA too).
    Avx2,
    /// AVX2 and FMA.
    Avx2Fma,
    /// AVX-512F.
    Avx512,
}

/// The processor's features, detected once.
#[derive(Debug, Clone, Copy)]
struct Features {
    avx512f: bool,
    avx2: bool,
    fma: bool,
}

static FEATURES: LazyLock<Features> = LazyLock::new(|| {
    #[cfg(target_arch = "x86_64")]
    {
        Features {
            avx512f: std::arch::is_x86_feature_detected!("avx512f"),
            avx2: std::arch::is_x86_feature_detected!("avx2"),
            fma: std::arch::is_x86_feature_detected!("fma"),
        }
    }
    #[cfg(not(target_arch = "x86_64"))]
    {
        Features {
            avx512f: false,
            avx2: false,
            fma: false,
        }
    }
});

static DETECTED: LazyLock<Level> = LazyLock::new(|| {
    [Level::Avx512, Level::Avx2Fma, Level::Avx2]
        .into_iter()
        .find(|l| l.supported())
        .unwrap_or(Level::Plain)
});

impl Level {
    /// The widest level this processor supports (detected on first use).
    pub(crate) fn detected() -> Level {
        if PLAIN_ONLY.load(Ordering::Relaxed) {
            Level::Plain
        } else {
            *DETECTED
        }
    }

    /// Whether this processor has the level's instructions.
    pub(crate) fn supported(self) -> bool {
        let f = *FEATURES;
        match self {
            Level::Plain => true,
            Level::Avx2 => f.avx2,
            Level::Avx2Fma => f.avx2 && f.fma,
            Level::Avx512 => f.avx512f,
        }
    }

    /// Every level this processor supports, plain first.
    #[cfg(test)]
    pub(crate) fn available() -> impl Iterator<Item = Level> {
        [Level::Plain, Level::Avx2, Level::Avx2Fma, Level::Avx512]
            .into_iter()
            .filter(|l| l.supported())
    }
}

/// Flux density of `s` at `p` (m), tesla, by the widest path the processor
/// has: AVX-512 intrinsics, else the plain sum compiled for AVX2 and FMA,
/// else the plain sum.
pub(super) fn field_sum(s: &Segments, p: [f64; 3]) -> [f64; 3] {
    field_sum_on(Level::detected(), s, p)
}

/// [`field_sum`] by the path of `level` (the plain sum where that level
/// has no path of its own or the processor lacks it).
pub(super) fn field_sum_on(level: Level, s: &Segments, p: [f64; 3]) -> [f64; 3] {
    #[cfg(target_arch = "x86_64")]
    match level {
        Level::Avx512 if level.supported() => {
            // SAFETY: the processor has AVX-512F (`supported` just above).
            return unsafe { field_avx512(s, p) };
        }
        Level::Avx2Fma if level.supported() => {
            // SAFETY: the processor has AVX2 and FMA (`supported` just above).
            return unsafe { field_avx2(s, p) };
        }
        _ => {}
    }
    let _ = level;
    field::sum(s, p)
}

/// Maxwell's mutual inductance of eight ring pairs (see
/// [`inductance::maxwell_mutual_8`]) by the widest path: the plain body
/// compiled for AVX-512F, else for AVX2, else plain. The same bits on every
/// path.
pub(super) fn maxwell_8(a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
    maxwell_8_on(Level::detected(), a, b, d)
}

/// [`maxwell_8`] by the path of `level` (plain where the processor lacks it).
pub(super) fn maxwell_8_on(level: Level, a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
    #[cfg(target_arch = "x86_64")]
    match level {
        Level::Avx512 if level.supported() => {
            // SAFETY: the processor has AVX-512F (`supported` just above).
            return unsafe { maxwell_avx512(a, b, d) };
        }
        Level::Avx2 | Level::Avx2Fma if Level::Avx2.supported() => {
            // SAFETY: the processor has AVX2 (`supported` just above).
            return unsafe { maxwell_avx2(a, b, d) };
        }
        _ => {}
    }
    let _ = level;
    inductance::maxwell_8(a, b, d)
}

/// The plain eight-pair Maxwell body compiled for AVX-512F.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f")]
unsafe fn maxwell_avx512(a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
    inductance::maxwell_8(a, b, d)
}

/// The plain eight-pair Maxwell body compiled for AVX2.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn maxwell_avx2(a: [f64; 8], b: [f64; 8], d: [f64; 8]) -> [f64; 8] {
    inductance::maxwell_8(a, b, d)
}

/// The magnet's radial field at eight points (see
/// [`super::magnet::Cylinder::b_rho_8`]) by the widest path: the plain
/// body compiled for AVX-512F, else for AVX2, else plain. The same bits on
/// every path.
pub(super) fn b_rho_8(mag: &Cylinder, rho: [f64; 8], z: [f64; 8]) -> [f64; 8] {
    b_rho_8_on(Level::detected(), mag, rho, z)
}

/// [`b_rho_8`] by the path of `level` (plain where the processor lacks it).
pub(super) fn b_rho_8_on(level: Level, mag: &Cylinder, rho: [f64; 8], z: [f64; 8]) -> [f64; 8] {
    #[cfg(target_arch = "x86_64")]
    match level {
        Level::Avx512 if level.supported() => {
            // SAFETY: the processor has AVX-512F (`supported` just above).
            return unsafe { b_rho_avx512(mag, rho, z) };
        }
        Level::Avx2 | Level::Avx2Fma if Level::Avx2.supported() => {
            // SAFETY: the processor has AVX2 (`supported` just above).
            return unsafe { b_rho_avx2(mag, rho, z) };
        }
        _ => {}
    }
    let _ = level;
    mag.b_rho_lanes(rho, z)
}

/// The plain eight-point radial field compiled for AVX-512F.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f")]
unsafe fn b_rho_avx512(mag: &Cylinder, rho: [f64; 8], z: [f64; 8]) -> [f64; 8] {
    mag.b_rho_lanes(rho, z)
}

/// The plain eight-point radial field compiled for AVX2.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn b_rho_avx2(mag: &Cylinder, rho: [f64; 8], z: [f64; 8]) -> [f64; 8] {
    mag.b_rho_lanes(rho, z)
}

/// The plain field sum ([`field::sum`]) compiled for AVX2 and FMA.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn field_avx2(s: &Segments, p: [f64; 3]) -> [f64; 3] {
    field::sum(s, p)
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
unsafe fn field_avx512(s: &Segments, p: [f64; 3]) -> [f64; 3] {
    use std::arch::x86_64::*;
    const BLOCK: usize = field::BLOCK;
    let (vx, vy, vz, cur) = s.arrays();
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
    let nseg = cur.len();
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
                let x = _mm512_sub_pd(_mm512_maskz_loadu_pd(mask, vx.as_ptr().add(at)), px);
                let y = _mm512_sub_pd(_mm512_maskz_loadu_pd(mask, vy.as_ptr().add(at)), py);
                let z = _mm512_sub_pd(_mm512_maskz_loadu_pd(mask, vz.as_ptr().add(at)), pz);
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
                let cur = _mm512_maskz_loadu_pd(mask, cur.as_ptr().add(start + k));
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::inductance::maxwell_mutual;

    #[test]
    fn detection_is_one_of_the_supported_levels() {
        let l = Level::detected();
        assert!(l.supported());
        assert!(Level::available().any(|a| a == l));
        assert!(Level::available().next() == Some(Level::Plain));
    }

    #[test]
    fn every_field_path_gives_the_plain_sum() {
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
        let (vx, vy, vz, _) = s.arrays();
        let v = [vx[7], vy[7], vz[7]];
        let mid = [
            (vx[9] + vx[10]) / 2.0,
            (vy[9] + vy[10]) / 2.0,
            (vz[9] + vz[10]) / 2.0,
        ];
        for p in [
            [0.0, 0.0, 0.0],
            [1e-3, 2e-3, 5e-4],
            [3e-3, -1e-3, 1e-5],
            [0.05, 0.01, -0.02],
            v,
            mid,
        ] {
            let plain = field::sum(&s, p);
            let scale = plain.iter().map(|c| c.abs()).fold(0.0, f64::max);
            let mut paths = vec![s.field_at(p)];
            for level in Level::available() {
                paths.push(field_sum_on(level, &s, p));
            }
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

    /// The magnet's radial field, every path lane by lane against the
    /// one-point formula, bit for bit: points near the rim (a small
    /// modulus), inside the radius and far away.
    #[test]
    fn every_magnet_field_path_gives_the_same_bits() {
        let mag = Cylinder {
            radius: 2.5e-3,
            length: 1.5e-3,
            remanence: 1.2,
            gap: 1e-3,
        };
        for i in 0..40 {
            let t = i as f64;
            let rho: [f64; 8] = std::array::from_fn(|l| match l {
                0 => mag.radius * (1.0 + 1e-9 * t),
                1 => 1e-13,
                _ => 1e-2 * ((t * 1.7 + l as f64) * 0.29).fract(),
            });
            let z: [f64; 8] = std::array::from_fn(|l| {
                if l == 0 {
                    mag.gap
                } else {
                    -2e-4 + 3e-3 * ((t + 3.0 * l as f64) * 0.41).fract()
                }
            });
            for level in Level::available() {
                let b = b_rho_8_on(level, &mag, rho, z);
                for l in 0..8 {
                    assert_eq!(
                        b[l].to_bits(),
                        mag.b_rho(rho[l], z[l]).to_bits(),
                        "{level:?} {} {}",
                        rho[l],
                        z[l]
                    );
                }
            }
        }
    }

    #[test]
    fn every_maxwell_path_gives_the_same_bits() {
        // Radii and distances of real coils and far pairs (the series
        // branch), lane by lane against the one-pair formula.
        let mut n = 0;
        for i in 0..40 {
            let t = i as f64;
            let a: [f64; 8] =
                std::array::from_fn(|l| 1e-3 + 1e-3 * ((t + l as f64) * 0.37).fract() * 9.0);
            let b: [f64; 8] = std::array::from_fn(|l| {
                if l == 7 {
                    3e-5
                } else {
                    1e-3 + 1e-2 * ((t * 1.3 + l as f64) * 0.61).fract()
                }
            });
            let d: [f64; 8] = std::array::from_fn(|l| 2e-4 * ((t + 2.0 * l as f64) * 0.23).fract());
            for level in Level::available() {
                let m = maxwell_8_on(level, a, b, d);
                for l in 0..8 {
                    assert_eq!(
                        m[l].to_bits(),
                        maxwell_mutual(a[l], b[l], d[l]).to_bits(),
                        "{} {} {}",
                        a[l],
                        b[l],
                        d[l]
                    );
                    n += 1;
                }
            }
        }
        assert_eq!(n, 320 * Level::available().count());
    }
}
