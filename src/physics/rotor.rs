//! A rotor of alternating magnets turning over the copper: the flux each
//! conductor links against the rotor angle, the torque on the rotor per
//! ampere in it, and from those the motor's constants.
//!
//! * Magnets: each magnet is uniformly magnetised along the axis
//!   (remanence `Br`, alternating sign from pole to pole) and replaced by
//!   the equivalent surface current `K = Br / mu0` on its side wall
//!   (Derby & Olbert, Am. J. Phys. 78(3), 2010, as for the single magnet
//!   in [`super::magnet`]): the wall becomes polygon loops
//!   ([`WALL_SIDES`] sides for a round outline, area kept) at
//!   [`THICKNESS_POINTS`] Gauss-Legendre heights graded towards the face
//!   nearest the copper. Their field is the Biot-Savart sum of
//!   [`super::field::Segments`]. A second disc below the board has the
//!   same magnetisation, so its field adds to the first's in the copper.
//! * Tables: the axial field `Bz` of the rotor at angle 0 is tabulated on a
//!   polar grid at the height of every copper layer, over one pole pitch
//!   (the next pole's field is the same with the sign turned), with a node
//!   spacing of at most a third of the distance from the copper to the
//!   nearest magnet face; values between nodes by Catmull-Rom cubics.
//! * Flux linkage: with `F(r, phi) = integral from r0 to r of Bz r' dr'`
//!   (each interval of the cubic integrated exactly), `A = F / r` along
//!   `phi` is a vector potential of `Bz` in the plane, so the flux a
//!   conductor links is the line integral `sum of F dphi` along its copper
//!   (Stokes; for a closed path this is the flux through it whatever `r0`,
//!   for a coil between two terminals the usual line integral of a
//!   potential). The rotor turned by `theta` is the copper turned by
//!   `-theta`.
//! * Torque: the Lorentz force `I dl x B` on the horizontal copper has the
//!   moment `-I Bz r dr` about the axis; the rotor feels the opposite,
//!   `I sum of Bz r dr`. By energy (power = EMF x current = torque x
//!   speed) it equals `I dLambda/dtheta`: the two are computed separately
//!   and compared ([`Linkage::energy_balance`]).
//!
//! Accuracy: the field of the polygon loops agrees with the closed form
//! of a cylinder magnet on its axis (Derby & Olbert) to better than 1e-3
//! at the copper; tables and quadrature add less than about 1e-3 of the
//! flux (tests).

use super::conductor::Filament;
use super::field::Segments;
use super::{MU0, map_indices};
use crate::design::{Rotor, RotorMagnet, RotorMagnets};
use crate::numeric::quadrature::rule;
use std::f64::consts::PI;

/// Sides of the polygon that stands for a round magnet outline (radius
/// chosen so that the polygon keeps the circle's area).
pub const WALL_SIDES: usize = 96;
/// Gauss-Legendre heights through a magnet's thickness.
pub const THICKNESS_POINTS: usize = 10;
/// Node spacing of the field tables as a fraction of the distance from the
/// copper to the nearest magnet face.
const TABLE_STEP: f64 = 1.0 / 3.0;

/// The rotor's magnets as loops of equivalent surface current, at rotor
/// angle 0 (magnet `k` centred at `2 pi k / poles` from +x, north face
/// towards the copper for even `k`). Metres, amperes.
#[derive(Debug, Clone)]
pub struct RotorSource {
    segs: Segments,
    poles: u32,
    /// Smallest height of a magnet face above the top copper surface, and
    /// below the bottom one with two discs, m.
    gap: f64,
}

impl RotorSource {
    /// The rotor of `poles` magnets `rotor` over copper whose top surface
    /// is at `z = 0` and whose bottom copper surface is at `z = bottom` (m,
    /// negative; the second disc's magnets face it from `gap` below).
    pub fn new(poles: u32, rotor: &RotorMagnets, bottom: f64) -> RotorSource {
        let outline = outline(rotor);
        let t = rotor.thickness * 1e-3;
        let k = rotor.remanence / MU0;
        let gap = rotor.gap * 1e-3;
        // Heights graded towards the face nearest the copper: z = face +
        // t u^2 over u in [0, 1], so dz = 2 t u du.
        let (x, w) = rule(THICKNESS_POINTS);
        let heights: Vec<(f64, f64)> = x
            .iter()
            .zip(w)
            .map(|(xi, wi)| {
                let u = 0.5 * (xi + 1.0);
                (t * u * u, 2.0 * t * u * 0.5 * wi)
            })
            .collect();
        let mut segs = Segments::with_capacity(
            poles as usize * outline.len() * heights.len() * rotor.discs as usize,
        );
        for pole in 0..poles {
            let angle = 2.0 * PI * pole as f64 / poles as f64;
            let sign = if pole % 2 == 0 { 1.0 } else { -1.0 };
            let (c, s) = (angle.cos(), angle.sin());
            let turned: Vec<[f64; 2]> = outline
                .iter()
                .map(|p| [c * p[0] - s * p[1], s * p[0] + c * p[1]])
                .collect();
            for disc in 0..rotor.discs {
                for &(depth, weight) in &heights {
                    // Upper disc: from the face at `gap` upwards; lower
                    // disc: from its face at `bottom - gap` downwards.
                    let z = if disc == 0 {
                        gap + depth
                    } else {
                        bottom - gap - depth
                    };
                    let current = sign * k * weight;
                    for i in 0..turned.len() {
                        let (a, b) = (turned[i], turned[(i + 1) % turned.len()]);
                        segs.push([a[0], a[1], z], [b[0], b[1], z], current);
                    }
                }
            }
        }
        RotorSource { segs, poles, gap }
    }

    /// Flux density of the rotor at angle 0 at `p` (m), tesla.
    pub fn field_at(&self, p: [f64; 3]) -> [f64; 3] {
        self.segs.field_at(p)
    }
}

/// A magnet's outline about its own centre placed at angle 0 (on +x),
/// counter-clockwise, metres.
fn outline(rotor: &RotorMagnets) -> Vec<[f64; 2]> {
    let rp = rotor.pitch_diameter * 0.5e-3;
    let round = |cx: f64, r: f64| -> Vec<[f64; 2]> {
        let n = WALL_SIDES as f64;
        // The polygon with the circle's area.
        let rr = r * (2.0 * PI / (n * (2.0 * PI / n).sin())).sqrt();
        (0..WALL_SIDES)
            .map(|i| {
                let a = 2.0 * PI * i as f64 / n;
                [cx + rr * a.cos(), rr * a.sin()]
            })
            .collect()
    };
    match rotor.magnet {
        RotorMagnet::Cylinder { diameter } => round(rp, diameter * 0.5e-3),
        RotorMagnet::Block { width, length } => {
            let (h, w) = (length * 0.5e-3, width * 0.5e-3);
            vec![[rp - h, -w], [rp + h, -w], [rp + h, w], [rp - h, w]]
        }
        RotorMagnet::Arc {
            inner_diameter,
            outer_diameter,
            angle,
        } => {
            let (ri, ro) = (inner_diameter * 0.5e-3, outer_diameter * 0.5e-3);
            let half = angle.to_radians() / 2.0;
            let n = ((WALL_SIDES as f64) * angle / 360.0).ceil().max(4.0) as usize;
            // Chords whose polygon keeps each arc's sector area.
            let keep = |r: f64| {
                let d = 2.0 * half / n as f64;
                r * (d / d.sin()).sqrt()
            };
            let (ki, ko) = (keep(ri), keep(ro));
            let mut v = Vec::with_capacity(2 * n + 2);
            for i in 0..=n {
                let a = -half + 2.0 * half * i as f64 / n as f64;
                let r = if i == 0 || i == n { ro } else { ko };
                v.push([r * a.cos(), r * a.sin()]);
            }
            for i in (0..=n).rev() {
                let a = -half + 2.0 * half * i as f64 / n as f64;
                let r = if i == 0 || i == n { ri } else { ki };
                v.push([r * a.cos(), r * a.sin()]);
            }
            v
        }
    }
}

/// `Bz` and its radial integral `F` on a polar grid at one height, over one
/// pole pitch of the rotor at angle 0.
#[derive(Debug, Clone)]
struct Table {
    r0: f64,
    dr: f64,
    nr: usize,
    dphi: f64,
    nphi: usize,
    /// `[F, Bz]` at node (i, j), row-major by radius.
    fb: Vec<[f64; 2]>,
}

impl Table {
    fn new(src: &RotorSource, z: f64, r_min: f64, r_max: f64) -> Table {
        let dist = (src.gap - z).max(1e-5);
        let step = dist * TABLE_STEP;
        // Two nodes beyond each end for the cubics.
        let r0 = (r_min - 2.0 * step).max(0.0);
        let nr = (((r_max + 2.0 * step - r0) / step).ceil() as usize).max(4) + 1;
        let dr = (r_max + 2.0 * step - r0) / (nr - 1) as f64;
        let pitch = 2.0 * PI / src.poles as f64;
        let nphi = ((pitch * r_max.max(step) / step).ceil() as usize).max(8);
        let dphi = pitch / nphi as f64;
        let points: Vec<[f64; 3]> = (0..nr * nphi)
            .map(|k| {
                let (i, j) = (k / nphi, k % nphi);
                let (r, phi) = (r0 + dr * i as f64, dphi * j as f64);
                [r * phi.cos(), r * phi.sin(), z]
            })
            .collect();
        let bz: Vec<f64> = map_indices(points.len(), |k| src.field_at(points[k])[2]);
        // F(r_i) = sum over intervals of the cubic through g = Bz r,
        // integrated exactly: (g1 + g2)/2 + (g2 - g0 - g3 + g1)/24 per step.
        let mut f = vec![0.0; nr * nphi];
        for j in 0..nphi {
            let g = |i: isize| {
                let i = i.clamp(0, nr as isize - 1) as usize;
                bz[i * nphi + j] * (r0 + dr * i as f64)
            };
            for i in 1..nr {
                let i = i as isize;
                let (g0, g1, g2, g3) = (g(i - 2), g(i - 1), g(i), g(i + 1));
                let step = dr * ((g1 + g2) / 2.0 + (g2 - g0 - g3 + g1) / 24.0);
                f[i as usize * nphi + j] = f[(i as usize - 1) * nphi + j] + step;
            }
        }
        Table {
            r0,
            dr,
            nr,
            dphi,
            nphi,
            fb: f.iter().zip(&bz).map(|(f, b)| [*f, *b]).collect(),
        }
    }

    /// The row of the cubic about radius `r` and its four weights.
    fn radial(&self, r: f64) -> (usize, [f64; 4]) {
        let u = ((r - self.r0) / self.dr).clamp(1.0, self.nr as f64 - 2.000_001);
        let i = u.floor() as usize;
        (i - 1, weights(u - i as f64))
    }

    /// `[F, Bz]` by Catmull-Rom cubics at the radius of `row`/`wr` (see
    /// [`Table::radial`]) and the angle `phi` in node steps: the grid
    /// repeats every pole pitch with the sign turned.
    fn at(&self, row: usize, wr: &[f64; 4], w: f64) -> [f64; 2] {
        let jf = w.floor();
        let wp = weights(w - jf);
        let n = self.nphi as i64;
        let j = jf as i64 - 1;
        let mut out = [0.0; 2];
        for (dj, wj) in wp.iter().enumerate() {
            let jj = j + dj as i64;
            let wraps = jj.div_euclid(n);
            let jm = (jj - wraps * n) as usize;
            let sign = if wraps & 1 == 0 { *wj } else { -*wj };
            let mut col = [0.0; 2];
            for (di, wi) in wr.iter().enumerate() {
                let v = self.fb[(row + di) * self.nphi + jm];
                col[0] += wi * v[0];
                col[1] += wi * v[1];
            }
            out[0] += sign * col[0];
            out[1] += sign * col[1];
        }
        out
    }
}

/// The Catmull-Rom weights of the four nodes about an interval at the
/// fraction `t` of it (the cubic through the middle two, with the
/// neighbours' differences as slopes).
fn weights(t: f64) -> [f64; 4] {
    let (t2, t3) = (t * t, t * t * t);
    [
        0.5 * (-t3 + 2.0 * t2 - t),
        0.5 * (3.0 * t3 - 5.0 * t2 + 2.0),
        0.5 * (-3.0 * t3 + 4.0 * t2 + t),
        0.5 * (t3 - t2),
    ]
}

/// A point on the copper where the line integrals are sampled: polar
/// position, `dphi` and `r dr` of its share of the path, its table.
#[derive(Debug, Clone, Copy)]
struct Sample {
    /// First row of the radial cubic and its weights.
    row: usize,
    wr: [f64; 4],
    phi: f64,
    dphi: f64,
    rdr: f64,
    table: usize,
}

/// The rotor's field tables at the heights of a conductor's copper, and
/// the conductor sampled for the line integrals.
#[derive(Debug, Clone)]
pub struct Coupling {
    tables: Vec<Table>,
    samples: Vec<Sample>,
    poles: u32,
}

impl Coupling {
    /// The rotor `src` against the copper `filaments` (each weighted by its
    /// share of the terminal current).
    pub fn new(src: &RotorSource, filaments: &[Filament]) -> Coupling {
        let mut heights: Vec<f64> = filaments.iter().map(|f| f.a[2]).collect();
        heights.sort_by(f64::total_cmp);
        heights.dedup();
        let radius = |p: [f64; 3]| p[0].hypot(p[1]);
        let (r_min, r_max) = filaments.iter().fold((f64::MAX, 0.0_f64), |(lo, hi), f| {
            // The closest approach of a chord to the axis can be inside its
            // ends.
            let (a, b) = (f.a, f.b);
            let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
            let l2 = dx * dx + dy * dy;
            let t = if l2 > 0.0 {
                (-(a[0] * dx + a[1] * dy) / l2).clamp(0.0, 1.0)
            } else {
                0.0
            };
            let near = (a[0] + t * dx).hypot(a[1] + t * dy);
            (lo.min(near), hi.max(radius(a)).max(radius(b)))
        });
        let tables: Vec<Table> = heights
            .iter()
            .map(|&z| Table::new(src, z, r_min, r_max))
            .collect();
        let (x, w) = rule(2);
        let mut samples = Vec::new();
        for f in filaments {
            let table = heights.partition_point(|&h| h < f.a[2]);
            let step = tables[table].dr.min(tables[table].dphi * r_max);
            let (dx, dy) = (f.b[0] - f.a[0], f.b[1] - f.a[1]);
            let n = ((dx.hypot(dy) / step).ceil() as usize).max(1);
            for k in 0..n {
                for (xi, wi) in x.iter().zip(w) {
                    let t = (k as f64 + 0.5 * (xi + 1.0)) / n as f64;
                    let (px, py) = (f.a[0] + t * dx, f.a[1] + t * dy);
                    let r2 = px * px + py * py;
                    // d/dt of phi and of r^2/2, times dt = 1/n for this
                    // piece and the rule's weight on [-1, 1] halved.
                    let h = 0.5 * wi / n as f64 * f.weight;
                    let (row, wr) = tables[table].radial(r2.sqrt());
                    samples.push(Sample {
                        row,
                        wr,
                        phi: py.atan2(px),
                        dphi: h * (px * dy - py * dx) / r2,
                        rdr: h * (px * dx + py * dy),
                        table,
                    });
                }
            }
        }
        Coupling {
            tables,
            samples,
            poles: src.poles,
        }
    }

    /// Flux linked (Wb) and torque on the rotor per ampere (N m/A) with the
    /// rotor turned by `theta` (radians, counter-clockwise).
    pub fn at(&self, theta: f64) -> (f64, f64) {
        let (mut flux, mut torque) = (0.0, 0.0);
        for s in &self.samples {
            let t = &self.tables[s.table];
            let [f, bz] = t.at(s.row, &s.wr, (s.phi - theta) / t.dphi);
            flux += f * s.dphi;
            torque += bz * s.rdr;
        }
        (flux, torque)
    }

    /// Flux and torque per ampere over one electrical period (two pole
    /// pitches of rotor angle) at `steps` equal steps.
    pub fn over_period(&self, steps: usize) -> Linkage {
        let period = 4.0 * PI / self.poles as f64;
        let angles: Vec<f64> = (0..steps)
            .map(|k| period * k as f64 / steps as f64)
            .collect();
        let both = map_indices(steps, |k| self.at(angles[k]));
        Linkage {
            poles: self.poles,
            angles,
            flux_wb: both.iter().map(|b| b.0).collect(),
            torque_n_m_per_a: both.iter().map(|b| b.1).collect(),
        }
    }
}

/// One conductor's flux linkage and torque per ampere over one electrical
/// period of rotor angle.
#[derive(Debug, Clone, PartialEq)]
pub struct Linkage {
    /// Poles of the rotor.
    pub poles: u32,
    /// Rotor angles, radians (mechanical), equally spaced over the period.
    pub angles: Vec<f64>,
    /// Flux linked at each angle, Wb.
    pub flux_wb: Vec<f64>,
    /// Torque on the rotor per ampere at each angle, N m/A (Lorentz force
    /// on the copper).
    pub torque_n_m_per_a: Vec<f64>,
}

impl Linkage {
    /// The back-EMF per unit speed, `dLambda/dtheta` (V per rad/s of
    /// rotor speed), at each angle: the derivative of the flux's Fourier
    /// series over the period (exact for a band-limited flux).
    pub fn emf_v_per_rad_s(&self) -> Vec<f64> {
        let n = self.flux_wb.len();
        let period = 4.0 * PI / self.poles as f64;
        let w = 2.0 * PI / period;
        let mut out = vec![0.0; n];
        for h in 1..n.div_ceil(2) {
            let (a, b) = harmonic(&self.flux_wb, h);
            let (a, b) = (2.0 * a / n as f64, 2.0 * b / n as f64);
            // Lambda contains a cos(h w theta) + b sin(h w theta).
            for (k, o) in out.iter_mut().enumerate() {
                let x = 2.0 * PI * (h * k) as f64 / n as f64;
                *o += h as f64 * w * (b * x.cos() - a * x.sin());
            }
        }
        out
    }

    /// The same curves at `n` equal steps, by their Fourier series over
    /// the period (exact for curves without harmonics above half the
    /// computed steps).
    pub fn resampled(&self, n: usize) -> Linkage {
        let period = 4.0 * PI / self.poles as f64;
        Linkage {
            poles: self.poles,
            angles: (0..n).map(|k| period * k as f64 / n as f64).collect(),
            flux_wb: trig_resample(&self.flux_wb, n),
            torque_n_m_per_a: trig_resample(&self.torque_n_m_per_a, n),
        }
    }

    /// Largest difference between the torque per ampere and the back-EMF
    /// per unit speed, relative to the largest back-EMF (power = EMF x
    /// current = torque x speed).
    pub fn energy_balance(&self) -> f64 {
        let emf = self.emf_v_per_rad_s();
        let peak = emf.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        emf.iter()
            .zip(&self.torque_n_m_per_a)
            .map(|(e, t)| (e - t).abs())
            .fold(0.0, f64::max)
            / peak
    }
}

/// The sums `(sum v_k cos(2 pi h k / n), sum v_k sin(2 pi h k / n))` of
/// the `n` periodic samples `v` for harmonic `h` (a discrete Fourier
/// coefficient before its scale).
fn harmonic(v: &[f64], h: usize) -> (f64, f64) {
    let n = v.len();
    let (mut a, mut b) = (0.0, 0.0);
    for (k, x) in v.iter().enumerate() {
        let t = 2.0 * PI * (h * k) as f64 / n as f64;
        a += x * t.cos();
        b += x * t.sin();
    }
    (a, b)
}

/// The periodic samples `v` at `n` equal steps over the same period, by
/// their trigonometric interpolant (the highest harmonic of an even count
/// split evenly between cosine and sine, as usual).
fn trig_resample(v: &[f64], n: usize) -> Vec<f64> {
    let m = v.len();
    let mut out = vec![0.0; n];
    for h in 0..=m / 2 {
        let (a, b) = harmonic(v, h);
        let scale = if h == 0 || 2 * h == m { 1.0 } else { 2.0 } / m as f64;
        let (a, b) = (a * scale, b * scale);
        for (k, o) in out.iter_mut().enumerate() {
            let t = 2.0 * PI * (h * k) as f64 / n as f64;
            *o += a * t.cos() + if 2 * h == m { 0.0 } else { b * t.sin() };
        }
    }
    out
}

/// The constants of a machine of one or more phases, from each phase's
/// [`Linkage`] (same angles).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct MotorConstants {
    /// Back-EMF constant, V per rad/s: phase peak of `dLambda/dtheta`.
    pub back_emf_v_per_rad_s: f64,
    /// Amplitude of the back-EMF's fundamental (one electrical period), V
    /// per rad/s: under balanced three-phase sinusoidal currents the mean
    /// torque per ampere is 1.5 times this, whatever the harmonics.
    pub back_emf_fundamental_v_per_rad_s: f64,
    /// Line-to-line peak back-EMF constant, V per rad/s (phases A and B;
    /// `None` for one phase).
    pub back_emf_line_v_per_rad_s: Option<f64>,
    /// Mean torque per ampere of phase peak current, sinusoidal currents in
    /// phase with each phase's back-EMF fundamental, N m/A.
    pub torque_constant_n_m_per_a: f64,
    /// Mean torque per ampere under six-step (120-degree block) drive, N m/A
    /// (three phases only).
    pub torque_constant_six_step_n_m_per_a: Option<f64>,
    /// Peak-to-peak torque over its mean under sinusoidal drive, percent.
    pub torque_ripple_percent: f64,
    /// The same under six-step drive, percent.
    pub torque_ripple_six_step_percent: Option<f64>,
    /// Largest relative difference between the Lorentz torque and the
    /// back-EMF of any phase at any angle ([`Linkage::energy_balance`]).
    pub energy_balance: f64,
}

/// What the motor's torque costs in copper (report.json's `rotor.load`),
/// under balanced sinusoidal phase currents in phase with the back-EMF:
/// torque `T = k_t I` (`I` the phase peak current) and copper loss
/// `P = m I^2 R / 2` for `m` phases of resistance `R`.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct MotorLoad {
    /// Motor constant `T / sqrt(P)` with the copper at 20 C,
    /// N m / sqrt(W).
    pub motor_constant_n_m_per_sqrt_w: f64,
    /// Largest continuous torque: the loss the board sheds with its
    /// hottest copper at `drive.max_temperature`, the phase resistance at
    /// that temperature, N m.
    pub torque_max_n_m: f64,
    /// The design's `rotor.torque`, N m.
    pub torque_n_m: Option<f64>,
    /// Phase peak current for it, A.
    pub phase_current_peak_a: Option<f64>,
    /// Copper loss for it, the copper at 20 C (hot copper loses
    /// `1 + alpha (T - 20 C)` times more), W.
    pub copper_loss_w: Option<f64>,
}

impl MotorLoad {
    /// The load of a motor with constants `c` and `phases` phases of
    /// resistance `r20` (ohm at 20 C); `limit`: the loss the board sheds at
    /// its temperature limit (W) and the phase resistance there (ohm);
    /// `torque` the design's (N m).
    pub fn of(
        c: &MotorConstants,
        phases: usize,
        r20: f64,
        (p_max, r_max): (f64, f64),
        torque: Option<f64>,
    ) -> MotorLoad {
        let half_m = phases as f64 / 2.0;
        let kt = c.torque_constant_n_m_per_a;
        let current = torque.map(|t| t / kt);
        MotorLoad {
            motor_constant_n_m_per_sqrt_w: kt / (half_m * r20).sqrt(),
            torque_max_n_m: kt * (p_max / (half_m * r_max)).sqrt(),
            torque_n_m: torque,
            phase_current_peak_a: current,
            copper_loss_w: current.map(|i| half_m * i * i * r20),
        }
    }
}

impl MotorConstants {
    /// The constants of the phases `phases`.
    pub fn of(phases: &[Linkage]) -> MotorConstants {
        let emf: Vec<Vec<f64>> = phases.iter().map(Linkage::emf_v_per_rad_s).collect();
        let peak = |v: &[f64]| v.iter().fold(0.0_f64, |m, x| m.max(x.abs()));
        let n = emf[0].len();
        // Each phase's fundamental (one electrical period over the table).
        let fundamental: Vec<(f64, f64)> = emf
            .iter()
            .map(|e| {
                let (a, b) = harmonic(e, 1);
                (2.0 * a / n as f64, 2.0 * b / n as f64)
            })
            .collect();
        let unit = |p: usize, k: usize| {
            let (a, b) = fundamental[p];
            let x = 2.0 * PI * k as f64 / n as f64;
            (a * x.cos() + b * x.sin()) / a.hypot(b)
        };
        let torque_of = |current: &dyn Fn(usize, usize) -> f64| -> Vec<f64> {
            (0..n)
                .map(|k| {
                    (0..phases.len())
                        .map(|p| current(p, k) * phases[p].torque_n_m_per_a[k])
                        .sum()
                })
                .collect()
        };
        let stats = |t: &[f64]| {
            let mean = t.iter().sum::<f64>() / t.len() as f64;
            let (lo, hi) = t
                .iter()
                .fold((f64::MAX, f64::MIN), |(l, h), v| (l.min(*v), h.max(*v)));
            (mean, 100.0 * (hi - lo) / mean.abs())
        };
        let (kt, ripple) = stats(&torque_of(&unit));
        let six = (phases.len() == 3).then(|| {
            stats(&torque_of(&|p, k| {
                let f: Vec<f64> = (0..3).map(|q| unit(q, k)).collect();
                let hi = (0..3).max_by(|a, b| f[*a].total_cmp(&f[*b])).unwrap_or(0);
                let lo = (0..3).min_by(|a, b| f[*a].total_cmp(&f[*b])).unwrap_or(0);
                if p == hi {
                    1.0
                } else if p == lo {
                    -1.0
                } else {
                    0.0
                }
            }))
        });
        MotorConstants {
            back_emf_v_per_rad_s: peak(&emf[0]),
            back_emf_fundamental_v_per_rad_s: fundamental[0].0.hypot(fundamental[0].1),
            back_emf_line_v_per_rad_s: (phases.len() > 1).then(|| {
                let line: Vec<f64> = emf[0].iter().zip(&emf[1]).map(|(a, b)| a - b).collect();
                peak(&line)
            }),
            torque_constant_n_m_per_a: kt,
            torque_constant_six_step_n_m_per_a: six.map(|s| s.0),
            torque_ripple_percent: ripple,
            torque_ripple_six_step_percent: six.map(|s| s.1),
            energy_balance: phases
                .iter()
                .map(Linkage::energy_balance)
                .fold(0.0, f64::max),
        }
    }
}

/// Relative chord sagitta of the copper's arcs for the rotor's line
/// integrals ([`super::conductor::Conductor::balanced_filaments`], which
/// keep each sub-arc's area, so the flux to about 1e-6).
pub const SAGITTA: f64 = 1e-3;

/// Points per electrical period of the report's curves (one electrical
/// degree).
pub const CURVE_POINTS: usize = 360;
/// Rotor angles computed per electrical period for the report: 3
/// electrical degrees, so harmonics up to the 59th; the curves are the
/// Fourier series of these ([`Linkage::resampled`]). The field of magnets
/// a gap `g` from the copper holds harmonics of wavelength `lambda` only
/// by about `exp(-2 pi g / lambda)` (Laplace's equation), so those beyond
/// are below 1e-4 of the fundamental for any gap above a hundredth of the
/// pole pitch.
pub const STEPS_FULL: usize = 120;
/// See [`STEPS_FULL`]: 5 electrical degrees, for a sweep's metrics.
pub const STEPS_METRICS: usize = 72;

/// One phase's curves over an electrical period.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PhaseCurve {
    /// Phase name ("A", "B", "C").
    pub phase: String,
    /// Flux linked, Wb, at each of the report's angles.
    pub flux_wb: Vec<f64>,
    /// Back-EMF per unit rotor speed, V per rad/s.
    pub emf_v_per_rad_s: Vec<f64>,
    /// Lorentz torque on the rotor per ampere in this phase, N m/A.
    pub torque_n_m_per_a: Vec<f64>,
}

/// The rotor phase of the analysis (report.json's `rotor` object).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct RotorReport {
    /// Poles of the rotor.
    pub poles: u32,
    /// Rotor discs.
    pub discs: u8,
    /// The machine's constants.
    #[serde(flatten)]
    pub constants: MotorConstants,
    /// Electrical angle of each curve point, degrees (rotor angle times
    /// half the pole count).
    pub electrical_degrees: Vec<f64>,
    /// Each phase's flux, back-EMF and torque over one electrical period.
    pub phases: Vec<PhaseCurve>,
    /// What the torque costs in copper (set by the analysis, which knows
    /// the phase resistance and the board's heat limit).
    pub load: Option<MotorLoad>,
}

impl RotorReport {
    /// The analysis note on how the rotor's numbers were computed and how
    /// well the two paths agree.
    pub fn method_note(&self) -> String {
        format!(
            "rotor: magnets as equivalent surface currents (Derby & Olbert 2010), flux linkage by the line integral of the field's potential along each phase's copper, torque by the Lorentz force on it; the two agree to {:.2} % of the peak back-EMF (power = EMF x current = torque x speed)",
            self.constants.energy_balance * 100.0
        )
    }
}

/// Each phase of an array (`board.phases`) as the rotor sees it: its name
/// and its own copper ([`super::conductor::Conductor::of_phase`]) as
/// filaments of [`SAGITTA`].
pub fn phase_copper(
    design: &crate::design::Design,
    board: &crate::geometry::Board,
) -> Vec<(String, Vec<Filament>)> {
    (0..board.phases.len())
        .map(|i| {
            let c = super::conductor::Conductor::of_phase(design, board, i);
            (board.phases[i].name.clone(), c.balanced_filaments(SAGITTA))
        })
        .collect()
}

/// The rotor phase: each phase's copper (`phases`: name and filaments in
/// SI, weighted by their share of the phase current) against the
/// design's rotor, over one electrical period ([`STEPS_FULL`] steps and
/// curves of [`CURVE_POINTS`], or [`STEPS_METRICS`] when `full` is false).
pub fn analyse(
    rotor: &Rotor,
    magnets: &RotorMagnets,
    phases: &[(String, Vec<Filament>)],
    full: bool,
) -> RotorReport {
    let bottom = phases
        .iter()
        .flat_map(|(_, f)| f.iter().map(|x| x.a[2] - x.thickness / 2.0))
        .fold(0.0_f64, f64::min);
    let src = RotorSource::new(rotor.poles, magnets, bottom);
    let steps = if full { STEPS_FULL } else { STEPS_METRICS };
    let links: Vec<Linkage> = phases
        .iter()
        .map(|(_, f)| Coupling::new(&src, f).over_period(steps))
        .collect();
    // Peaks read on one-degree curves whatever was computed.
    let links: Vec<Linkage> = links.iter().map(|l| l.resampled(CURVE_POINTS)).collect();
    let constants = MotorConstants::of(&links);
    let half = rotor.poles as f64 / 2.0;
    RotorReport {
        poles: rotor.poles,
        discs: magnets.discs,
        constants,
        electrical_degrees: links[0]
            .angles
            .iter()
            .map(|a| (a * half).to_degrees())
            .collect(),
        phases: phases
            .iter()
            .zip(&links)
            .map(|((name, _), l)| PhaseCurve {
                phase: name.clone(),
                flux_wb: l.flux_wb.clone(),
                emf_v_per_rad_s: l.emf_v_per_rad_s(),
                torque_n_m_per_a: l.torque_n_m_per_a.clone(),
            })
            .collect(),
        load: None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::closed_forms::magnet_on_axis;
    use crate::physics::inductance::maxwell_mutual;

    fn source(
        poles: u32,
        magnet: RotorMagnet,
        pitch_diameter: f64,
        discs: u8,
        bottom: f64,
    ) -> RotorSource {
        let m = RotorMagnets {
            magnet,
            thickness: 3.0,
            remanence: 1.2,
            gap: 1.0,
            pitch_diameter,
            discs,
        };
        RotorSource::new(poles, &m, bottom)
    }

    /// A closed circular loop of radius `a` (m) about (`cx`, 0) at height
    /// `z`, as `n` straight filaments, counter-clockwise.
    fn ring(cx: f64, a: f64, z: f64, n: usize) -> Vec<Filament> {
        let p = |k: usize| {
            let t = 2.0 * PI * k as f64 / n as f64;
            [cx + a * t.cos(), a * t.sin(), z]
        };
        (0..n)
            .map(|k| Filament {
                a: p(k),
                b: p(k + 1),
                weight: 1.0,
                layer: 1,
                width: 1e-4,
                thickness: 3.5e-5,
                lead: false,
            })
            .collect()
    }

    /// The polygon walls reproduce the cylinder's closed-form field on its
    /// axis (Derby & Olbert 2010): one magnet of a two-pole rotor whose
    /// other magnet is 2 m away.
    #[test]
    fn cylinder_on_axis_matches_closed_form() {
        let src = source(
            2,
            RotorMagnet::Cylinder { diameter: 10.0 },
            2000.0,
            1,
            -1e-3,
        );
        for depth in [0.0, 0.5e-3, 2e-3, 5e-3] {
            let b = src.field_at([1.0, 0.0, -depth])[2];
            let want = magnet_on_axis(1.2, 5e-3, 3e-3, 1e-3 + depth);
            assert!((b / want - 1.0).abs() < 1e-6, "{depth}: {b} vs {want}");
        }
    }

    /// Flux of one magnet through a coaxial loop below it: Maxwell's mutual
    /// inductance of the loop with each slice of the equivalent current
    /// sheet (REFERENCES.md), integrated over the thickness, against the
    /// tabulated potential along a 720-gon; and the torque on a loop about
    /// the axis is zero.
    #[test]
    fn coaxial_loop_flux_matches_maxwell() {
        let src = source(
            2,
            RotorMagnet::Cylinder { diameter: 10.0 },
            2000.0,
            1,
            -1e-3,
        );
        for (a, z) in [(3e-3, -2e-5), (6e-3, -2e-5), (4e-3, -3e-4)] {
            let c = Coupling::new(&src, &ring(1.0, a, z, 720));
            let (flux, _) = c.at(0.0);
            let (x, w) = rule(24);
            let k = 1.2 / MU0;
            let want: f64 = x
                .iter()
                .zip(w)
                .map(|(xi, wi)| {
                    let h = 1e-3 - z + 1.5e-3 * (xi + 1.0);
                    k * 1.5e-3 * wi * maxwell_mutual(a, 5e-3, h)
                })
                .sum();
            assert!(
                (flux / want - 1.0).abs() < 2e-4,
                "{a} {z}: {flux} vs {want}"
            );
        }
    }

    /// Power = EMF x current = torque x speed: the Lorentz torque on a loop
    /// off the pitch circle equals dLambda/dtheta at every angle, for
    /// every magnet shape and with two discs.
    #[test]
    fn energy_balance_of_an_off_centre_loop() {
        for (magnet, discs) in [
            (RotorMagnet::Cylinder { diameter: 8.0 }, 1),
            (
                RotorMagnet::Block {
                    width: 6.0,
                    length: 9.0,
                },
                2,
            ),
            (
                RotorMagnet::Arc {
                    inner_diameter: 20.0,
                    outer_diameter: 40.0,
                    angle: 35.0,
                },
                1,
            ),
        ] {
            let src = source(8, magnet, 30.0, discs, -1.6e-3);
            let c = Coupling::new(&src, &ring(15e-3, 4e-3, -2e-5, 360));
            let l = c.over_period(90);
            assert!(
                l.energy_balance() < 1e-3,
                "{magnet:?}: {}",
                l.energy_balance()
            );
            let peak = l.flux_wb.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
            assert!(peak > 1e-6, "{magnet:?}: {peak}");
        }
    }

    /// Three phases of sinusoidal flux 120 degrees apart: the torque
    /// constant is 1.5 times the back-EMF constant under sinusoidal drive
    /// with no ripple, and the line back-EMF is sqrt(3) times the phase's
    /// (textbook three-phase relations).
    #[test]
    fn sinusoidal_three_phase_constants() {
        let (poles, n, lam) = (8u32, 120usize, 2e-3);
        let period = 4.0 * PI / poles as f64;
        let we = 2.0 * PI / period;
        let phases: Vec<Linkage> = (0..3)
            .map(|p| {
                let angles: Vec<f64> = (0..n).map(|k| period * k as f64 / n as f64).collect();
                let shift = 2.0 * PI * p as f64 / 3.0;
                Linkage {
                    poles,
                    flux_wb: angles
                        .iter()
                        .map(|t| lam * (we * t - shift).cos())
                        .collect(),
                    torque_n_m_per_a: angles
                        .iter()
                        .map(|t| -lam * we * (we * t - shift).sin())
                        .collect(),
                    angles,
                }
            })
            .collect();
        let c = MotorConstants::of(&phases);
        let ke = lam * we;
        assert!((c.back_emf_v_per_rad_s / ke - 1.0).abs() < 1e-9);
        assert!((c.torque_constant_n_m_per_a / (1.5 * ke) - 1.0).abs() < 1e-9);
        assert!(c.torque_ripple_percent < 1e-6);
        let line = c.back_emf_line_v_per_rad_s.unwrap();
        assert!((line / (3f64.sqrt() * ke) - 1.0).abs() < 1e-9);
        assert!(c.energy_balance < 1e-9);
        // Six-step on sinusoidal EMF: mean 3 sqrt(3)/pi ke... per ampere
        // of block current: (3/pi) * sqrt(3) ke; ripple 1 - cos 30 deg.
        let six = c.torque_constant_six_step_n_m_per_a.unwrap();
        assert!(
            (six / (3.0 * 3f64.sqrt() / PI * ke) - 1.0).abs() < 2e-3,
            "{six}"
        );
    }

    /// The Fourier resampling reproduces a band-limited curve exactly.
    #[test]
    fn resampling_is_exact_for_band_limited_curves() {
        let f = |x: f64| 0.3 + x.cos() - 0.2 * (3.0 * x).sin() + 0.05 * (7.0 * x + 0.3).cos();
        let v: Vec<f64> = (0..20).map(|k| f(2.0 * PI * k as f64 / 20.0)).collect();
        let w = trig_resample(&v, 37);
        for (k, y) in w.iter().enumerate() {
            assert!((y - f(2.0 * PI * k as f64 / 37.0)).abs() < 1e-12, "{k}");
        }
    }
}
