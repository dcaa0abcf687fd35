//! Published closed-form formulas, used as cross-checks of the numerical
//! results and reported beside them. SI units (metres, amperes, tesla,
//! henry) unless a function says otherwise.

use super::MU0;
use serde::Serialize;

/// On-axis field of a circular current loop (textbook Biot-Savart
/// integration): `B = mu0 I a^2 / (2 (a^2 + z^2)^1.5)`, tesla.
///
/// # Units
/// `current` A, `radius` and `z` m.
pub fn loop_on_axis(current: f64, radius: f64, z: f64) -> f64 {
    MU0 * current * radius * radius / (2.0 * (radius * radius + z * z).powf(1.5))
}

/// On-axis field of a flat spiral of `turns` turns spread evenly from
/// radius `r1` to `r2`, carrying `current` (textbook integration of the loop
/// formula over the radius), tesla.
pub fn spiral_on_axis(current: f64, turns: f64, r1: f64, r2: f64, z: f64) -> f64 {
    let s1 = (r1 * r1 + z * z).sqrt();
    let s2 = (r2 * r2 + z * z).sqrt();
    let log = if z == 0.0 {
        (r2 / r1).ln()
    } else {
        ((r2 + s2) / (r1 + s1)).ln()
    };
    MU0 * turns * current / (2.0 * (r2 - r1)) * (log - r2 / s2 + r1 / s1)
}

/// On-axis field of an axially magnetised cylinder at distance `z` from its
/// near face (Derby & Olbert, Am. J. Phys. 78(3), 2010; textbook):
/// `B = Br/2 ((z+L)/sqrt(R^2+(z+L)^2) - z/sqrt(R^2+z^2))`, tesla.
pub fn magnet_on_axis(remanence: f64, radius: f64, length: f64, z: f64) -> f64 {
    let zl = z + length;
    remanence / 2.0
        * (zl / (radius * radius + zl * zl).sqrt() - z / (radius * radius + z * z).sqrt())
}

/// Self inductance of a circular ring of rectangular cross-section
/// `b` x `c` and mean radius `a` (Grover, Inductance Calculations, 1946,
/// GMD method): `L = mu0 a (ln(8a/R) - 2)`, `R = 0.2235 (b + c)`, henry.
pub fn ring_self(a: f64, b: f64, c: f64) -> f64 {
    MU0 * a * ((8.0 * a / gmd_rect_self(b, c)).ln() - 2.0)
}

/// Geometric mean distance of a `b` x `c` rectangle from itself, Grover's
/// approximation `0.2235 (b + c)`, metres.
pub fn gmd_rect_self(b: f64, c: f64) -> f64 {
    0.2235 * (b + c)
}

/// The source of [`mohan_modified_wheeler`] and [`mohan_current_sheet`].
pub const MOHAN_SOURCE: &str = "Mohan, Hershenson, Boyd, Lee, \"Simple accurate expressions for planar spiral inductances\", IEEE J. Solid-State Circuits 34(10), 1999";

/// The source of [`wheeler_1928`].
pub const WHEELER_1928_SOURCE: &str =
    "Wheeler, \"Simple inductance formulas for radio coils\", Proc. IRE 16(10), 1928";

/// Planar-spiral shapes covered by Mohan et al. (1999).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum MohanShape {
    /// Square.
    Square,
    /// Hexagon.
    Hexagon,
    /// Octagon.
    Octagon,
    /// Circle (current-sheet only).
    Circle,
}

/// Modified Wheeler formula (Mohan, Hershenson, Boyd, Lee, IEEE JSSC 34(10),
/// 1999): `L = K1 mu0 n^2 d_avg / (1 + K2 rho)`, henry. Coefficients recalled
/// from memory (REFERENCES.md, tag M): square 2.34/2.75, hexagon 2.33/3.82,
/// octagon 2.25/3.55. `None` for a circle (not covered).
///
/// # Units
/// `d_out`, `d_in` m: across the outer edge of the outermost turn and the
/// inner edge of the innermost turn, across flats for polygons (see
/// [`crate::physics::inductance::estimate_sizes`]).
pub fn mohan_modified_wheeler(shape: MohanShape, n: f64, d_out: f64, d_in: f64) -> Option<f64> {
    let (k1, k2) = match shape {
        MohanShape::Square => (2.34, 2.75),
        MohanShape::Hexagon => (2.33, 3.82),
        MohanShape::Octagon => (2.25, 3.55),
        MohanShape::Circle => return None,
    };
    let d_avg = (d_out + d_in) / 2.0;
    let rho = (d_out - d_in) / (d_out + d_in);
    Some(k1 * MU0 * n * n * d_avg / (1.0 + k2 * rho))
}

/// Current-sheet formula (Mohan et al. 1999):
/// `L = mu0 n^2 d_avg c1/2 (ln(c2/rho) + c3 rho + c4 rho^2)`, henry.
/// Coefficients recalled from memory (REFERENCES.md, tag M).
pub fn mohan_current_sheet(shape: MohanShape, n: f64, d_out: f64, d_in: f64) -> f64 {
    let (c1, c2, c3, c4) = match shape {
        MohanShape::Square => (1.27, 2.07, 0.18, 0.13),
        MohanShape::Hexagon => (1.09, 2.23, 0.0, 0.17),
        MohanShape::Octagon => (1.07, 2.29, 0.0, 0.19),
        MohanShape::Circle => (1.00, 2.46, 0.0, 0.20),
    };
    let d_avg = (d_out + d_in) / 2.0;
    let rho = (d_out - d_in) / (d_out + d_in);
    MU0 * n * n * d_avg * c1 / 2.0 * ((c2 / rho).ln() + c3 * rho + c4 * rho * rho)
}

/// Wheeler (Proc. IRE 16(10), 1928) flat spiral: `L[uH] = a^2 n^2 / (8a + 11c)`
/// with `a` the mean radius and `c` the radial depth in inches; stated
/// within 5 % for `c > 0.2 a`. Returns henry; inputs in metres.
pub fn wheeler_1928(n: f64, r_in: f64, r_out: f64) -> f64 {
    let inch = 0.0254;
    let a = (r_in + r_out) / 2.0 / inch;
    let c = (r_out - r_in) / inch;
    a * a * n * n / (8.0 * a + 11.0 * c) * 1e-6
}

/// Mohan's inner diameter for `n` turns of width `w` and spacing `s`:
/// `d_in = d_out - 2 n w - 2 (n - 1) s`, metres.
pub fn mohan_d_in(d_out: f64, n: f64, w: f64, s: f64) -> f64 {
    d_out - 2.0 * n * w - 2.0 * (n - 1.0) * s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reference_values() {
        // REFERENCES.md [C]: d_out 20 mm, n 10, w = s = 0.25 mm.
        let d_out = 0.020;
        let d_in = mohan_d_in(d_out, 10.0, 0.25e-3, 0.25e-3);
        let cs = mohan_current_sheet(MohanShape::Circle, 10.0, d_out, d_in);
        assert!((cs * 1e9 - 1998.8).abs() < 0.1, "{}", cs * 1e9);
        let mw = mohan_modified_wheeler(MohanShape::Square, 10.0, d_out, d_in).unwrap();
        assert!((mw * 1e9 - 2415.4).abs() < 0.1, "{}", mw * 1e9);
        let cs = mohan_current_sheet(MohanShape::Square, 10.0, d_out, d_in);
        assert!((cs * 1e9 - 2388.4).abs() < 0.1, "{}", cs * 1e9);
        // Wheeler 1928, same coil: 2.021 uH (REFERENCES.md [C]).
        let w = wheeler_1928(10.0, d_in / 2.0, d_out / 2.0);
        assert!((w * 1e6 - 2.021).abs() < 0.0005, "{}", w * 1e6);
        // Grover ring: a = 10 mm, 0.2 mm x 35 um -> 66.96 nH (REFERENCES.md [C]).
        let l = ring_self(0.010, 0.2e-3, 35e-6);
        assert!((l * 1e9 - 66.96).abs() < 0.005, "{}", l * 1e9);
        // Flat spiral r1 = 5, r2 = 10 mm, N = 10, 1 A: 0.87103 mT at z = 0 (REFERENCES.md [C]).
        let b = spiral_on_axis(1.0, 10.0, 0.005, 0.010, 0.0);
        assert!((b * 1e3 - 0.87103).abs() < 5e-6, "{}", b * 1e3);
    }

    #[test]
    fn magnet_far_field_is_a_dipole() {
        // Far away the cylinder is a dipole m = Br V / mu0 (textbook):
        // B = mu0 m / (2 pi z^3) on the axis, z from the centre.
        let (br, r, l) = (1.3, 2.5e-3, 2e-3);
        let zc = 0.2;
        let b = magnet_on_axis(br, r, l, zc - l / 2.0);
        let m = br * std::f64::consts::PI * r * r * l / MU0;
        let dip = MU0 * m / (2.0 * std::f64::consts::PI * zc.powi(3));
        assert!((b / dip - 1.0).abs() < 1e-3);
    }
}
