//! Straight filaments (polygon and rectangle coils): Neumann's double line
//! integral, in closed form for parallel pieces and for pieces at an angle
//! of more than about 11.5 degrees that are close, with the inner integral
//! in closed form and the outer one by Gauss-Legendre quadrature otherwise
//! (a two-point rule along both for far pairs), with the geometric mean
//! distance of the sections for close, nearly parallel pieces. The coil's
//! sums go by blocks of filaments so that the repeated layers of a coil are
//! summed once ([`filaments_inductances`]).

use super::NEAR;
use crate::numeric::quadrature::rule;
use crate::physics::MU0;
use crate::physics::conductor::Filament;
use crate::physics::gmd::cached_gmd;
use std::f64::consts::PI;

fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}
fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}
fn norm(a: [f64; 3]) -> f64 {
    dot(a, a).sqrt()
}

/// `int int dx dy / sqrt((x-y)^2 + d^2)` over `x in [a1,a2]`, `y in [b1,b2]`
/// (parallel filaments, Grover): with `F(x) = x asinh(x/d) - sqrt(x^2+d^2)`
/// it is `F(b2-a1) + F(b1-a2) - F(b2-a2) - F(b1-a1)`.
fn parallel_integral(a1: f64, a2: f64, b1: f64, b2: f64, d: f64) -> f64 {
    // F is even; for x >= 0, asinh(x/d) = ln((x + r)/d) with r = sqrt(x^2 +
    // d^2), free of cancellation (one logarithm instead of asinh's log1p
    // and hypot).
    let f = |x: f64| {
        let x = x.abs();
        let r = (x * x + d * d).sqrt();
        x * ((x + r) / d).ln() - r
    };
    f(b2 - a1) + f(b1 - a2) - f(b2 - a2) - f(b1 - a1)
}

/// `int dl / |P - Q(l)|` along a straight filament from `qa` with unit
/// direction `u` and length `len`, in closed form:
/// `asinh((len - s)/rho) + asinh(s/rho)`, written with logarithms of the
/// end distances in the form free of cancellation for each position of
/// the point along the line.
fn line_potential(p: [f64; 3], qa: [f64; 3], u: [f64; 3], len: f64) -> f64 {
    let r = sub(p, qa);
    let s = dot(r, u);
    let ra2 = dot(r, r);
    let ra = ra2.sqrt();
    let rb = (ra2 - 2.0 * s * len + len * len).max(0.0).sqrt();
    if s < 0.0 {
        ((len - s + rb) / (ra - s)).ln()
    } else if s > len {
        ((s + ra) / (s - len + rb)).ln()
    } else {
        let rho2 = (ra2 - s * s).max(1e-30);
        ((ra + s) * (rb + len - s) / rho2).ln()
    }
}

/// A straight piece: start, unit direction, length (m).
#[derive(Debug, Clone, Copy)]
struct Line {
    a: [f64; 3],
    u: [f64; 3],
    len: f64,
}

/// Smallest `|sin|` of the angle between two pieces for which
/// [`skew_integral`] replaces quadrature (below it the feet of the common
/// perpendicular run far beyond the pieces and its four terms cancel).
const SKEW: f64 = 0.2;

/// `int int ds dt / r` of two straight horizontal filaments that are not
/// parallel, in closed form: with `s`, `t`
/// measured along each line from the feet of their common perpendicular
/// (of length `d`, vertical here) and `r^2 = s^2 + t^2 - 2 s t c + d^2`,
/// `F(s, t) = s ln(t - s c + r) + t ln(s - t c + r)
///  - (d / sin e) atan((d^2 c + s t sin^2 e) / (d r sin e))`
/// has `d^2 F / ds dt = 1 / r` (Grover 1946, ch. 9, filaments inclined in
/// parallel planes; checked here by differentiation and against adaptive
/// quadrature, scipy `dblquad`, to 1e-14), so the integral is `F` at the four
/// corners of the parameter rectangle. Each logarithm's argument is taken
/// in the form free of cancellation (`a + r = (r^2 - a^2) / (r - a)` for
/// `a < 0`), and `x ln x -> 0` where pieces share an end.
fn skew_integral(p: Line, q: Line) -> f64 {
    let (pa, up, lp) = (p.a, p.u, p.len);
    let (qa, uq, lq) = (q.a, q.u, q.len);
    let cross = up[0] * uq[1] - up[1] * uq[0];
    let c = dot(up, uq);
    let w = [qa[0] - pa[0], qa[1] - pa[1]];
    // Feet of the common perpendicular along each line (the projected
    // lines' crossing): s up - t uq = w.
    let sf = (w[0] * uq[1] - w[1] * uq[0]) / cross;
    let tf = (w[0] * up[1] - w[1] * up[0]) / cross;
    let d = (qa[2] - pa[2]).abs();
    let sin2 = cross * cross;
    let sin = cross.abs();
    let d2 = d * d;
    let plus_r = |a: f64, other: f64, r: f64| {
        // a + r with r^2 = a^2 + other, other >= 0.
        if a >= 0.0 { a + r } else { other / (r - a) }
    };
    let xlog = |x: f64, y: f64| if x == 0.0 { 0.0 } else { x * y.ln() };
    let f = |s: f64, t: f64| {
        let r = (s * s + t * t - 2.0 * s * t * c + d2).max(0.0).sqrt();
        let a = plus_r(t - s * c, s * s * sin2 + d2, r);
        let b = plus_r(s - t * c, t * t * sin2 + d2, r);
        let mut v = xlog(s, a) + xlog(t, b);
        if d > 0.0 {
            v -= d / sin * ((d2 * c + s * t * sin2) / (d * r * sin)).atan();
        }
        v
    };
    let (s0, s1) = (-sf, lp - sf);
    let (t0, t1) = (-tf, lq - tf);
    f(s1, t1) - f(s1, t0) - f(s0, t1) + f(s0, t0)
}

/// Distance from point `p` to the segment `a`-`b`, m.
fn point_seg(p: [f64; 3], a: [f64; 3], b: [f64; 3]) -> f64 {
    let ab = sub(b, a);
    let l2 = dot(ab, ab);
    let t = if l2 > 0.0 {
        (dot(sub(p, a), ab) / l2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    norm(sub(
        p,
        [a[0] + ab[0] * t, a[1] + ab[1] * t, a[2] + ab[2] * t],
    ))
}

/// Neumann integral `int int dl_p . dl_q / r` of two straight filaments
/// with the GMD correction for close pieces, metres (multiply by mu0/4pi
/// for henry).
/// Closest approach, in lengths of the longer piece, beyond which a pair is
/// integrated with the two-point rule along both pieces.
const FAR_RATIO: f64 = 4.0;

fn straight_pair(p: &Filament, q: &Filament) -> f64 {
    let dp = sub(p.b, p.a);
    let dq = sub(q.b, q.a);
    let (lp, lq) = (norm(dp), norm(dq));
    if lp == 0.0 || lq == 0.0 {
        return 0.0;
    }
    let up = [dp[0] / lp, dp[1] / lp, dp[2] / lp];
    let uq = [dq[0] / lq, dq[1] / lq, dq[2] / lq];
    let c = dot(up, uq);
    if c.abs() < 1e-12 {
        return 0.0;
    }
    // Far pieces (closest approach more than FAR_RATIO times the longer
    // piece, bounded from below by the distance of the middles less both
    // half lengths): two-point Gauss-Legendre along both, no logarithms.
    // The rule's error for int dl / r along a piece of length L at
    // distance d is about (L/d)^4 / 180 of the integral (the remainder
    // L^5 f''''/4320 with f'''' ~ 24/d^5; Abramowitz & Stegun 25.4.30), so
    // at most 3e-5 per dimension at 4 L, and the far pairs' share of the
    // sum is small: the examples' inductances moved by at most 3.2e-7
    // against the exact line integral along one piece.
    let pm = [
        (p.a[0] + p.b[0]) / 2.0,
        (p.a[1] + p.b[1]) / 2.0,
        (p.a[2] + p.b[2]) / 2.0,
    ];
    let qm = [
        (q.a[0] + q.b[0]) / 2.0,
        (q.a[1] + q.b[1]) / 2.0,
        (q.a[2] + q.b[2]) / 2.0,
    ];
    let lmax = lp.max(lq);
    if norm(sub(qm, pm)) - (lp + lq) / 2.0 > FAR_RATIO * lmax {
        let h = 0.5 / 3f64.sqrt();
        let mut sum = 0.0;
        for sp in [-h, h] {
            let a = [pm[0] + dp[0] * sp, pm[1] + dp[1] * sp, pm[2] + dp[2] * sp];
            for sq in [-h, h] {
                let b = [qm[0] + dq[0] * sq, qm[1] + dq[1] * sq, qm[2] + dq[2] * sq];
                sum += 1.0 / norm(sub(a, b));
            }
        }
        return c * lp * lq / 4.0 * sum;
    }
    let cross = up[0] * uq[1] - up[1] * uq[0];
    // In-plane normal of p, lateral and vertical offset of q's middle.
    let n = [-up[1], up[0], 0.0];
    let rel = sub(qm, p.a);
    let lat = dot(rel, n);
    let dz = q.a[2] - p.a[2];
    let size = p.width.max(p.thickness).max(q.width).max(q.thickness);
    let sa = dot(sub(q.a, p.a), up);
    let sb = dot(sub(q.b, p.a), up);
    // Nearly parallel pieces close to p's line use the GMD of their
    // sections (for pieces far along the line this changes nothing).
    let near = cross.abs() < SKEW && (lat * lat + dz * dz).sqrt() < NEAR * size;
    let g = if near {
        Some(cached_gmd(
            lat,
            dz,
            p.width,
            p.thickness,
            q.width,
            q.thickness,
        ))
    } else {
        None
    };
    if cross.abs() < 1e-9 {
        let (lo, hi) = (sa.min(sb), sa.max(sb));
        let d = g.unwrap_or_else(|| (lat * lat + dz * dz).sqrt());
        return c.signum() * parallel_integral(0.0, lp, lo, hi, d);
    }
    // Raise q so that its distance from p equals the GMD.
    let shift = match g {
        Some(g) if g > lat.hypot(dz) => {
            let s = if dz < 0.0 { -1.0 } else { 1.0 };
            s * (g * g - lat * lat).max(0.0).sqrt() - dz
        }
        _ => 0.0,
    };
    let qa = [q.a[0], q.a[1], q.a[2] + shift];
    let f = |t: f64| {
        let pt = [p.a[0] + up[0] * t, p.a[1] + up[1] * t, p.a[2] + up[2] * t];
        line_potential(pt, qa, uq, lq)
    };
    // Closest approach (the pieces do not cross: endpoint distances bound
    // it) decides the quadrature: fixed Gauss rules where the integrand is
    // smooth, adaptive near a shared corner.
    let qa3 = qa;
    let qb3 = [q.b[0], q.b[1], q.b[2] + shift];
    let dmin = point_seg(p.a, qa3, qb3)
        .min(point_seg(p.b, qa3, qb3))
        .min(point_seg(qa3, p.a, p.b))
        .min(point_seg(qb3, p.a, p.b));
    if cross.abs() >= SKEW && dmin <= lmax && shift == 0.0 {
        return c * skew_integral(
            Line {
                a: p.a,
                u: up,
                len: lp,
            },
            Line {
                a: qa,
                u: uq,
                len: lq,
            },
        );
    }
    let order = if dmin > 4.0 * lmax {
        2
    } else if dmin > lmax {
        4
    } else if dmin > 0.3 * lmax {
        8
    } else {
        0
    };
    let gauss = |n: usize| {
        let (x, w) = rule(n);
        x.iter()
            .zip(w)
            .map(|(x, w)| w * f(lp / 2.0 * (1.0 + x)))
            .sum::<f64>()
            * lp
            / 2.0
    };
    let val = if order > 0 {
        gauss(order)
    } else {
        // Panels graded geometrically (ratio 4) away from the point of p
        // nearest to q, 4-point Gauss-Legendre on each.
        let cands = [
            0.0,
            lp,
            dot(sub(qa3, p.a), up).clamp(0.0, lp),
            dot(sub(qb3, p.a), up).clamp(0.0, lp),
        ];
        let at = |t: f64| [p.a[0] + up[0] * t, p.a[1] + up[1] * t, p.a[2] + up[2] * t];
        let ts = cands
            .iter()
            .copied()
            .min_by(|x, y| point_seg(at(*x), qa3, qb3).total_cmp(&point_seg(at(*y), qa3, qb3)))
            .unwrap_or(0.0);
        let mut br = vec![0.0, lp, ts];
        let mut h = dmin.max(lp * 1e-9);
        while h < lp {
            for t in [ts - h, ts + h] {
                if t > 0.0 && t < lp {
                    br.push(t);
                }
            }
            h *= 4.0;
        }
        br.sort_by(f64::total_cmp);
        br.dedup();
        let (x, w) = rule(4);
        br.windows(2)
            .map(|b| {
                let (hh, cc) = ((b[1] - b[0]) / 2.0, (b[1] + b[0]) / 2.0);
                x.iter()
                    .zip(w)
                    .map(|(x, w)| w * f(cc + hh * x))
                    .sum::<f64>()
                    * hh
            })
            .sum()
    };
    c * val
}

/// Inductance of straight filaments by Neumann's formula, henry.
pub fn filaments_inductance(f: &[Filament]) -> f64 {
    filaments_inductances(f, false).whole
}

/// The inductances the report gives of one set of filaments, henry, from
/// one pass over the pairs (each pair's Neumann integral is computed once
/// and added to every sum it belongs to).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FilamentInductances {
    /// Every filament, with its share of the current.
    pub whole: f64,
    /// The filaments of layer 1 alone, carrying the whole current.
    pub top: f64,
    /// The filaments of the turns (no leads), with their shares.
    pub bare: f64,
    /// The turns of layer 1 alone, carrying the whole current.
    pub bare_top: f64,
}

/// [`FilamentInductances`] of `f`; with `leads_apart` false the two sums
/// without leads are left at zero (and cost nothing).
///
/// The filaments are taken in blocks: the consecutive filaments of one
/// layer with the same share of the current and role (the winding's turns,
/// a lead). Every pair sum is a sum over block pairs, and a block pair's
/// sum depends only on the two blocks' copper in the plane and on the
/// height between them. The layers of a coil are copies of one spiral
/// (mirrored on every second layer), so in a coil of `n` layers most of the
/// `n (n + 1) / 2` winding block pairs repeat: each distinct pair (the same
/// two plane shapes, in either order, the same height apart up or down) is
/// summed once. Exact up to rounding: Neumann's integral does not change
/// when the two pieces swap or the whole is mirrored in a horizontal plane
/// (the pair integral is evaluated along the first piece, which agrees with
/// the swapped evaluation to the quadrature's accuracy, within 1e-7 of the
/// pair; tested in this module against the sum over every pair).
pub fn filaments_inductances(f: &[Filament], leads_apart: bool) -> FilamentInductances {
    let blocks = Block::split(f);
    // Plane shape classes: blocks with the same copper in the plane (the
    // same filaments' x, y, width and thickness, bit for bit).
    let mut shapes: Vec<&[Filament]> = Vec::new();
    let class: Vec<usize> = blocks
        .iter()
        .map(|b| {
            let fb = &f[b.range.clone()];
            match shapes.iter().position(|s| same_plane_shape(s, fb)) {
                Some(c) => c,
                None => {
                    shapes.push(fb);
                    shapes.len() - 1
                }
            }
        })
        .collect();
    // Distinct block pairs (i <= j): key = the two classes in order and the
    // height between them to 1 pm; the first pair of each key is summed.
    let mut keys: Vec<(usize, usize, i64)> = Vec::new();
    let mut tasks: Vec<(usize, usize)> = Vec::new();
    let mut task_of = Vec::with_capacity(blocks.len() * (blocks.len() + 1) / 2);
    for i in 0..blocks.len() {
        for j in i..blocks.len() {
            let dz = ((blocks[j].z - blocks[i].z).abs() * 1e12).round() as i64;
            let self_pair = i == j;
            let key = if self_pair {
                (class[i], usize::MAX, 0)
            } else {
                (class[i].min(class[j]), class[i].max(class[j]), dz)
            };
            let t = match keys.iter().position(|k| *k == key) {
                Some(t) => t,
                None => {
                    keys.push(key);
                    tasks.push((i, j));
                    keys.len() - 1
                }
            };
            task_of.push((i, j, t));
        }
    }
    let sums: Vec<f64> = tasks
        .iter()
        .map(|&(i, j)| block_pair_sum(f, &blocks[i], &blocks[j]))
        .collect();
    let mut t = [0.0f64; 4];
    for &(i, j, task) in &task_of {
        let (bi, bj) = (&blocks[i], &blocks[j]);
        let v = sums[task];
        let w = bi.weight * bj.weight;
        let top = bi.layer == 1 && bj.layer == 1;
        let bare = leads_apart && !bi.lead && !bj.lead;
        t[0] += w * v;
        if top {
            t[1] += v;
        }
        if bare {
            t[2] += w * v;
            if top {
                t[3] += v;
            }
        }
    }
    let k = MU0 / (4.0 * PI);
    FilamentInductances {
        whole: k * t[0],
        top: k * t[1],
        bare: k * t[2],
        bare_top: k * t[3],
    }
}

/// Consecutive filaments of one layer with one share and one role.
#[derive(Debug, Clone)]
struct Block {
    range: std::ops::Range<usize>,
    layer: u8,
    lead: bool,
    weight: f64,
    /// Height of the copper centre, m.
    z: f64,
}

impl Block {
    fn split(f: &[Filament]) -> Vec<Block> {
        let mut out: Vec<Block> = Vec::new();
        for (i, x) in f.iter().enumerate() {
            match out.last_mut() {
                Some(b)
                    if b.layer == x.layer
                        && b.lead == x.lead
                        && b.weight == x.weight
                        && b.z == x.a[2] =>
                {
                    b.range.end = i + 1
                }
                _ => out.push(Block {
                    range: i..i + 1,
                    layer: x.layer,
                    lead: x.lead,
                    weight: x.weight,
                    z: x.a[2],
                }),
            }
        }
        out
    }
}

/// Whether two blocks have the same copper in the plane, bit for bit.
fn same_plane_shape(a: &[Filament], b: &[Filament]) -> bool {
    a.len() == b.len()
        && a.iter().zip(b).all(|(p, q)| {
            p.a[0] == q.a[0]
                && p.a[1] == q.a[1]
                && p.b[0] == q.b[0]
                && p.b[1] == q.b[1]
                && p.width == q.width
                && p.thickness == q.thickness
                && p.a[2] == p.b[2]
                && q.a[2] == q.b[2]
        })
}

/// `sum sum straight_pair(p, q)` over the ordered pairs of two blocks (a
/// block with itself: every pair twice and each filament with itself
/// once), metres.
fn block_pair_sum(f: &[Filament], a: &Block, b: &Block) -> f64 {
    let same = a.range == b.range;
    let fb = &f[b.range.clone()];
    let start = a.range.start;
    let rows = crate::physics::map_indices(a.range.len(), |i| {
        let p = &f[start + i];
        if same {
            straight_pair(p, p) + 2.0 * fb[i + 1..].iter().map(|q| straight_pair(p, q)).sum::<f64>()
        } else {
            2.0 * fb.iter().map(|q| straight_pair(p, q)).sum::<f64>()
        }
    });
    // Summed in a fixed order: the same inputs give the same bits.
    rows.iter().sum()
}

/// The sums of [`filaments_inductances`] over every pair, one by one (the
/// reference the block sums are tested against).
#[cfg(test)]
fn filaments_inductances_direct(f: &[Filament], leads_apart: bool) -> FilamentInductances {
    let rows = crate::physics::map_indices(f.len(), |i| {
        let p = &f[i];
        let mut s = [0.0f64; 4];
        let mut add = |q: &Filament, k: f64| {
            let v = k * straight_pair(p, q);
            let top = p.layer == 1 && q.layer == 1;
            let bare = leads_apart && !p.lead && !q.lead;
            s[0] += p.weight * q.weight * v;
            if top {
                s[1] += v;
            }
            if bare {
                s[2] += p.weight * q.weight * v;
                if top {
                    s[3] += v;
                }
            }
        };
        add(p, 1.0);
        for q in &f[i + 1..] {
            add(q, 2.0);
        }
        s
    });
    let mut t = [0.0f64; 4];
    for r in &rows {
        for (a, b) in t.iter_mut().zip(r) {
            *a += b;
        }
    }
    let k = MU0 / (4.0 * PI);
    FilamentInductances {
        whole: k * t[0],
        top: k * t[1],
        bare: k * t[2],
        bare_top: k * t[3],
    }
}

/// Mutual inductance of two sets of straight filaments by Neumann's
/// formula, henry: every pair of one filament of `a` and one of `b`,
/// weighted by both shares of the current, with the same pair integral
/// (and so the same GMD correction for close, nearly parallel pieces and
/// the same far-pair rule) as [`filaments_inductance`]. The sign follows
/// the filaments' directions (current entering each set's first filament).
pub fn filaments_mutual(a: &[Filament], b: &[Filament]) -> f64 {
    let rows = crate::physics::map_indices(a.len(), |i| {
        let p = &a[i];
        b.iter()
            .map(|q| p.weight * q.weight * straight_pair(p, q))
            .sum::<f64>()
    });
    // Summed in a fixed order: the same inputs give the same bits.
    MU0 / (4.0 * PI) * rows.iter().sum::<f64>()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Far pairs take the two-point rule along both pieces: against a
    /// 24-point Gauss-Legendre rule along one piece with the exact line
    /// integral along the other, within 5e-5 (relative) at every distance
    /// beyond FAR_RATIO lengths, any orientation.
    #[test]
    fn far_pairs_keep_their_accuracy() {
        let mut rnd = crate::numeric::test_uniform(7);
        let fil = |a: [f64; 3], b: [f64; 3]| Filament {
            a,
            b,
            weight: 1.0,
            layer: 1,
            width: 1e-4,
            thickness: 35e-6,
            lead: false,
        };
        let mut checked = 0;
        for _ in 0..2000 {
            let lp = 0.2 + rnd();
            let lq = 0.2 + rnd();
            let ang = |r: f64| r * std::f64::consts::TAU;
            let (t1, t2) = (ang(rnd()), ang(rnd()));
            let p = fil([0.0, 0.0, 0.0], [lp * t1.cos(), lp * t1.sin(), 0.0]);
            let dist = (FAR_RATIO + 0.05 + 6.0 * rnd()) * lp.max(lq) + (lp + lq) / 2.0;
            let dir = ang(rnd());
            let z = 0.3 * (rnd() - 0.5);
            let qa = [dist * dir.cos(), dist * dir.sin(), z];
            let q = fil(qa, [qa[0] + lq * t2.cos(), qa[1] + lq * t2.sin(), z]);
            let v = straight_pair(&p, &q);
            let up = [t1.cos(), t1.sin(), 0.0];
            let uq = [t2.cos(), t2.sin(), 0.0];
            let (x, w) = rule(24);
            let exact: f64 = dot(up, uq)
                * x.iter()
                    .zip(w)
                    .map(|(x, w)| {
                        let t = lp / 2.0 * (1.0 + x);
                        w * line_potential([up[0] * t, up[1] * t, 0.0], qa, uq, lq)
                    })
                    .sum::<f64>()
                * lp
                / 2.0;
            if exact.abs() < 1e-9 * lp * lq / dist {
                continue;
            }
            checked += 1;
            assert!((v / exact - 1.0).abs() < 5e-5, "{v} {exact} at {dist}");
        }
        assert!(checked > 1500);
    }

    /// The block sums against the sum over every pair, on 4-layer
    /// hexagons and squares in series and in parallel pairs, with 35 and
    /// 18 um copper mixed: within 1e-7.
    #[test]
    fn block_sums_match_every_pair() {
        use crate::design::{Design, Shape, Wiring};
        use crate::physics::conductor::Conductor;
        for (sides, wiring, copper) in [
            (6, Wiring::Series, vec![0.035; 4]),
            (4, Wiring::ParallelPairs, vec![0.035, 0.018, 0.035, 0.018]),
            (6, Wiring::ParallelPairs, vec![0.035; 4]),
        ] {
            let mut d = Design::sample();
            d.coil.shape = Shape::Polygon { sides };
            d.coil.wiring = wiring;
            d.stackup.copper = copper;
            let layout = crate::geometry::build(&d).unwrap();
            let f = Conductor::new(&d, &layout).filaments(super::super::NEUMANN_SAGITTA);
            let fast = filaments_inductances(&f, true);
            let every = filaments_inductances_direct(&f, true);
            for (x, y) in [
                (fast.whole, every.whole),
                (fast.top, every.top),
                (fast.bare, every.bare),
                (fast.bare_top, every.bare_top),
            ] {
                assert!((x / y - 1.0).abs() < 1e-7, "{sides} {wiring:?}: {x} {y}");
            }
        }
    }

    /// The closed form for skew pieces against 48-point Gauss-Legendre
    /// panels along p with the exact line integral along q, and scipy's
    /// `dblquad` value for one case (computed once: c = 0.5, d = 0.3,
    /// s in [-1, 2], t in [0.5, 3]: 4.702251337418946).
    #[test]
    fn skew_pairs_match_quadrature() {
        // p runs over s = -1..2 and q over t = 0.5..3 from the feet at the
        // origin (q passes over it half a unit before its start).
        let shifted = skew_integral(
            Line {
                a: [-1.0, 0.0, 0.0],
                u: [1.0, 0.0, 0.0],
                len: 3.0,
            },
            Line {
                a: [0.25, 3f64.sqrt() / 4.0, 0.3],
                u: [0.5, 3f64.sqrt() / 2.0, 0.0],
                len: 2.5,
            },
        );
        assert!(
            (shifted / 4.702251337418946 - 1.0).abs() < 1e-13,
            "{shifted}"
        );
        let mut rnd = crate::numeric::test_uniform(11);
        for _ in 0..300 {
            let ang = |r: f64| r * std::f64::consts::TAU;
            let (t1, t2) = (ang(rnd()), ang(rnd()));
            let up = [t1.cos(), t1.sin(), 0.0];
            let uq = [t2.cos(), t2.sin(), 0.0];
            let cross = up[0] * uq[1] - up[1] * uq[0];
            if cross.abs() < SKEW {
                continue;
            }
            let lp = 0.2 + rnd();
            let lq = 0.2 + rnd();
            let qa = [2.0 * rnd() - 1.0, 2.0 * rnd() - 1.0, 0.2 * rnd()];
            let v = skew_integral(
                Line {
                    a: [0.0; 3],
                    u: up,
                    len: lp,
                },
                Line {
                    a: qa,
                    u: uq,
                    len: lq,
                },
            );
            let (x, w) = rule(48);
            let panels = 16;
            let mut exact = 0.0;
            for k in 0..panels {
                let (a, b) = (
                    lp * k as f64 / panels as f64,
                    lp * (k + 1) as f64 / panels as f64,
                );
                let (h, m) = ((b - a) / 2.0, (a + b) / 2.0);
                for (x, w) in x.iter().zip(w) {
                    let t = m + h * x;
                    exact += w * h * line_potential([up[0] * t, up[1] * t, 0.0], qa, uq, lq);
                }
            }
            if qa[2] < 0.02 {
                // Near-crossing pieces: the quadrature itself is rough.
                continue;
            }
            assert!((v / exact - 1.0).abs() < 1e-8, "{v} {exact}");
        }
    }

    #[test]
    fn line_potential_matches_asinh_form() {
        // int dl / r along a segment = asinh((L-s)/rho) + asinh(s/rho) (textbook).
        let u = [0.6, 0.8, 0.0];
        for p in [
            [0.3, -0.2, 0.1],
            [-2.0, -2.0, 0.01],
            [5.0, 6.0, -0.2],
            [0.6, 0.8, 1e-3],
        ] {
            let r = sub(p, [0.0; 3]);
            let s = dot(r, u);
            let rho = (dot(r, r) - s * s).sqrt();
            let exact = ((2.0 - s) / rho).asinh() + (s / rho).asinh();
            let v = line_potential(p, [0.0; 3], u, 2.0);
            assert!((v / exact - 1.0).abs() < 1e-10, "{p:?}: {v} {exact}");
        }
    }

    #[test]
    fn neumann_square_loop_matches_grover_closed_form() {
        // Square loop of side s from round wire (Grover 1946; also Rosa 1908):
        // L = (2 mu0 s / pi) (ln(s/r) - 0.774) for a thin wire of radius r.
        // Emulate with a square section of GMD r: side a = r / 0.44705.
        let s = 0.05;
        let r = 0.2e-3;
        let a = r / 0.44705;
        let pts = [[0.0, 0.0], [s, 0.0], [s, s], [0.0, s], [0.0, 0.0]];
        let f: Vec<Filament> = pts
            .windows(2)
            .map(|p| Filament {
                a: [p[0][0], p[0][1], 0.0],
                b: [p[1][0], p[1][1], 0.0],
                weight: 1.0,
                layer: 1,
                width: a,
                thickness: a,
                lead: false,
            })
            .collect();
        let l = filaments_inductance(&f);
        let grover = 2.0 * MU0 * s / PI * ((s / r).ln() - 0.774);
        // The closed form assumes a round section (GMD = r, 0.44705 a is
        // within 0.1 %) and drops terms of order r/s.
        assert!((l / grover - 1.0).abs() < 0.01, "{l} {grover}");
    }
}
