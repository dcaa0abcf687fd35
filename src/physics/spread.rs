//! Where the board is hottest: lateral conduction of the winding's losses
//! through the board.
//!
//! The board is taken as a disc of the same area, the winding as the
//! annulus between its inner and outer copper radius, and the heat it
//! makes as spread evenly over that annulus. In the plane the board
//! conducts through its layers side by side (sheet conductance
//! `sum k_i t_i`, W/K): in the winding each copper layer counts with its
//! fill `w / (w + s)`, the rest of the layer and the dielectric and cover
//! with the dielectric's conductivity; outside the winding only the
//! dielectric conducts (the leads are left out, which errs hot). Both faces
//! lose `H (T - Ta)` with `H` the sum of the faces' convection and
//! radiation coefficients. The steady radial equation
//! `(1/r) d/dr (r k dT/dr) - H (T - Ta) + q = 0` with an insulated rim is
//! solved by finite volumes (a tridiagonal system on 200 rings). The
//! result is linear in the power: the rise of the hottest copper and of
//! the winding's mean over the board's average rise ([`Spread`]) do not
//! depend on it.
//!
//! Conductivities recalled from memory \[M\]: copper 401 W/(m K) (Incropera
//! Table A.1, pure copper at 300 K), polyimide 0.12, FR-4 in the plane
//! 0.8 W/(m K).

use crate::design::{BoardKind, Design};
use crate::geometry::Board as Layout;
use serde::Serialize;

/// Conductivity of copper, W/(m K) (Incropera Table A.1, recalled \[M\]).
pub const K_COPPER: f64 = 401.0;

/// In-plane conductivity of the dielectric, W/(m K) (recalled \[M\]):
/// polyimide 0.12, FR-4 0.8.
pub fn k_dielectric(kind: BoardKind) -> f64 {
    match kind {
        BoardKind::Flex => 0.12,
        BoardKind::Rigid => 0.8,
    }
}

/// Rise of the hottest copper and of the winding's mean temperature over
/// the board's average rise.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Spread {
    /// Hottest copper rise / board average rise.
    pub peak: f64,
    /// Winding's mean rise / board average rise.
    pub winding: f64,
}

impl Spread {
    /// One temperature for the whole board.
    pub const UNIFORM: Spread = Spread {
        peak: 1.0,
        winding: 1.0,
    };
}

/// The board as a disc for the lateral model (SI units).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Disc {
    /// Radius of the disc of the board's area, m.
    pub radius: f64,
    /// Inner radius of the winding, m.
    pub r_in: f64,
    /// Outer radius of the winding, m.
    pub r_out: f64,
    /// Sheet conductance in the winding, W/K.
    pub k_winding: f64,
    /// Sheet conductance outside the winding, W/K.
    pub k_outside: f64,
}

impl Disc {
    /// The disc of a design's board (`area` of one face, m^2).
    ///
    /// A ring of coils heats the annulus it fills, the copper fill thinned
    /// by the share of the annulus its coils' windings cover (each coil
    /// counted as the annulus between its inner and outer copper radius).
    pub fn of(design: &Design, layout: &Layout, area: f64) -> Disc {
        let s = &design.stackup;
        let kd = k_dielectric(s.kind);
        let mut fill = (layout.trace_width / layout.pitch).clamp(0.0, 1.0);
        let (mut r_in, mut r_out) = (layout.inner_radius, layout.outer_radius);
        if let Some(crate::design::Array {
            arrangement:
                crate::design::Arrangement::Ring {
                    count,
                    inner_diameter,
                    outer_diameter,
                    ..
                },
            ..
        }) = design.array
        {
            let coil = f64::from(count) * (r_out * r_out - r_in * r_in);
            (r_in, r_out) = (inner_diameter / 2.0, outer_diameter / 2.0);
            fill *= (coil / (r_out * r_out - r_in * r_in)).clamp(0.0, 1.0);
        }
        let cu: f64 = s.copper.iter().sum::<f64>() * 1e-3;
        let rest = (s.dielectric.iter().sum::<f64>() + 2.0 * s.cover) * 1e-3;
        let radius = (area / std::f64::consts::PI).sqrt();
        let r_out = (r_out * 1e-3).min(radius);
        let r_in = (r_in * 1e-3).min(r_out * 0.999);
        Disc {
            radius,
            r_in,
            r_out,
            k_winding: K_COPPER * cu * fill + kd * (cu * (1.0 - fill) + rest),
            k_outside: kd * (cu + rest),
        }
    }

    /// The temperature rise per ring (centre radius m, rise K) for a power
    /// `p` (W) made in the winding and `h` (W/(m^2 K), both faces) lost.
    pub fn profile(&self, p: f64, h: f64) -> Vec<(f64, f64, f64, f64)> {
        const N: usize = 200;
        let dr = self.radius / N as f64;
        let pi = std::f64::consts::PI;
        let wind_area = pi * (self.r_out * self.r_out - self.r_in * self.r_in);
        let q = p / wind_area.max(1e-30);
        // Per ring: (centre, area, area inside the winding, conductance).
        let rings: Vec<(f64, f64, f64, f64)> = (0..N)
            .map(|i| {
                let (a, b) = (i as f64 * dr, (i + 1) as f64 * dr);
                let (lo, hi) = (a.max(self.r_in), b.min(self.r_out));
                let heated = if hi > lo {
                    pi * (hi * hi - lo * lo)
                } else {
                    0.0
                };
                let mid = (a + b) / 2.0;
                let k = if mid >= self.r_in && mid <= self.r_out {
                    self.k_winding
                } else {
                    self.k_outside
                };
                (mid, pi * (b * b - a * a), heated, k)
            })
            .collect();
        // Tridiagonal: -c_{i-1} T_{i-1} + (c_{i-1} + c_i + H A_i) T_i - c_i T_{i+1} = q A_heated.
        let c: Vec<f64> = (0..N - 1)
            .map(|i| {
                let r = (i + 1) as f64 * dr;
                2.0 * pi * r / (dr / 2.0 / rings[i].3 + dr / 2.0 / rings[i + 1].3)
            })
            .collect();
        let mut diag: Vec<f64> = (0..N)
            .map(|i| {
                let left = if i > 0 { c[i - 1] } else { 0.0 };
                let right = if i < N - 1 { c[i] } else { 0.0 };
                left + right + h * rings[i].1
            })
            .collect();
        let mut rhs: Vec<f64> = rings.iter().map(|r| q * r.2).collect();
        // Thomas algorithm (sub- and super-diagonal -c).
        for i in 1..N {
            let w = -c[i - 1] / diag[i - 1];
            diag[i] -= w * -c[i - 1];
            rhs[i] -= w * rhs[i - 1];
        }
        let mut t = vec![0.0; N];
        t[N - 1] = rhs[N - 1] / diag[N - 1];
        for i in (0..N - 1).rev() {
            t[i] = (rhs[i] + c[i] * t[i + 1]) / diag[i];
        }
        rings
            .iter()
            .zip(t)
            .map(|(r, t)| (r.0, r.1, r.2, t))
            .collect()
    }

    /// The hottest copper's and the winding's mean rise over the board's
    /// average rise with `h` (W/(m^2 K), both faces) lost.
    pub fn spread(&self, h: f64) -> Spread {
        if h.is_nan() || h <= 0.0 || self.r_out <= self.r_in {
            return Spread::UNIFORM;
        }
        let prof = self.profile(1.0, h);
        let area: f64 = prof.iter().map(|r| r.1).sum();
        let avg = prof.iter().map(|r| r.1 * r.3).sum::<f64>() / area;
        let heated: f64 = prof.iter().map(|r| r.2).sum();
        let wind = prof.iter().map(|r| r.2 * r.3).sum::<f64>() / heated;
        let peak = prof
            .iter()
            .filter(|r| r.2 > 0.0)
            .map(|r| r.3)
            .fold(0.0, f64::max);
        Spread {
            peak: peak / avg,
            winding: wind / avg,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn disc(k_in: f64, k_out: f64, r_in: f64, r_out: f64) -> Disc {
        Disc {
            radius: 10e-3,
            r_in,
            r_out,
            k_winding: k_in,
            k_outside: k_out,
        }
    }

    #[test]
    fn heat_made_everywhere_gives_one_temperature() {
        // Uniform heating of the whole disc with uniform losses: no
        // lateral flow, T - Ta = q / H everywhere (energy balance).
        let d = disc(0.01, 1e-5, 0.0, 10e-3);
        let s = d.spread(20.0);
        assert!(
            (s.peak - 1.0).abs() < 1e-9 && (s.winding - 1.0).abs() < 1e-9,
            "{s:?}"
        );
    }

    #[test]
    fn energy_balance_and_average() {
        // The losses of every ring add up to the power made, so the
        // average rise is P / (H A) as in the lumped balance.
        let d = disc(0.02, 2e-5, 1e-3, 6e-3);
        let (p, h) = (0.3, 25.0);
        let prof = d.profile(p, h);
        let lost: f64 = prof.iter().map(|r| h * r.1 * r.3).sum();
        assert!((lost / p - 1.0).abs() < 1e-9, "{lost}");
    }

    #[test]
    fn good_conductor_in_an_insulating_board() {
        // A winding that conducts far better than the board around it is
        // nearly isothermal, and the board outside barely warms: its rise
        // approaches the lumped one times board area / winding area (plus
        // a thin fringe of width sqrt(k_out / H)).
        let d = disc(1.0, 1e-9, 0.0, 5e-3);
        let s = d.spread(20.0);
        assert!((s.peak / 4.0 - 1.0).abs() < 0.01, "{s:?}");
        assert!((s.winding / s.peak - 1.0).abs() < 1e-3);
    }
}
