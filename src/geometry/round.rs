//! The one place where coordinates become integers.
//!
//! Every exporter (Gerber, Excellon, KiCad, SVG) writes coordinates through
//! [`to_nm`], so all files agree to the nanometre. Rounding is to nearest,
//! never truncation (0.1 mm added ten times is 999 999.999... nm and must
//! become 1 000 000 nm).

use super::Point;

/// Millimetres to integer nanometres, rounded to nearest (ties away from zero).
pub fn to_nm(mm: f64) -> i64 {
    (mm * 1.0e6).round() as i64
}

/// A point in integer nanometres.
pub fn point_nm(p: Point) -> (i64, i64) {
    (to_nm(p.x), to_nm(p.y))
}

/// Integer nanometres back to millimetres (exact for |mm| < 9e9).
pub fn nm_to_mm(nm: i64) -> f64 {
    nm as f64 / 1.0e6
}

/// A length rounded to the nanometre grid, in millimetres.
pub fn snap_mm(mm: f64) -> f64 {
    nm_to_mm(to_nm(mm))
}

/// Formats integer nanometres as a decimal millimetre string with up to six
/// decimals and no trailing zeros ("1.5", "-0.000001", "12").
pub fn format_mm(nm: i64) -> String {
    let sign = if nm < 0 { "-" } else { "" };
    let a = nm.unsigned_abs();
    let int = a / 1_000_000;
    let frac = a % 1_000_000;
    if frac == 0 {
        format!("{sign}{int}")
    } else {
        let f = format!("{frac:06}");
        format!("{sign}{int}.{}", f.trim_end_matches('0'))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rounds_not_truncates() {
        let mut x = 0.0;
        for _ in 0..10 {
            x += 0.1;
        }
        assert_eq!(to_nm(x), 1_000_000);
        assert_eq!(to_nm(-0.0000004), 0);
        assert_eq!(to_nm(-0.0000006), -1);
    }

    #[test]
    fn formats_mm() {
        assert_eq!(format_mm(1_500_000), "1.5");
        assert_eq!(format_mm(-1), "-0.000001");
        assert_eq!(format_mm(12_000_000), "12");
        assert_eq!(format_mm(0), "0");
    }
}
