//! The files `coilwright couple` writes: couple.json, a short couple.md
//! and the two coupling plots (against gap and against lateral offset).

use super::OutFile;
use super::plot::{Marker, line_plot};
use crate::physics::coupling::{CouplingReport, CurvePoint, Facing};
use crate::physics::inductance::InductanceMethod;

/// Engineering notation with an SI prefix, e.g. `1.234 uH`.
fn si(v: f64, unit: &str) -> String {
    let a = v.abs();
    let (scale, prefix) = if a == 0.0 {
        (1.0, "")
    } else if a < 1e-6 {
        (1e9, "n")
    } else if a < 1e-3 {
        (1e6, "u")
    } else if a < 1.0 {
        (1e3, "m")
    } else if a < 1e3 {
        (1.0, "")
    } else if a < 1e6 {
        (1e-3, "k")
    } else {
        (1e-6, "M")
    };
    let x = v * scale;
    // Four significant digits.
    let digits = (3 - x.abs().max(1e-300).log10().floor() as i32).clamp(0, 3) as usize;
    format!("{x:.digits$} {prefix}{unit}")
}

fn opt(v: Option<f64>, f: impl Fn(f64) -> String) -> String {
    v.map(f).unwrap_or_else(|| "-".into())
}

/// The short text summary `couple` prints and writes as couple.md.
pub fn markdown(r: &CouplingReport) -> String {
    let mut s = format!("# Coupling: {} and {}\n\n", r.coil_a.name, r.coil_b.name);
    s.push_str(&format!(
        "{} below, {} above, {} gap between the facing copper surfaces, {} lateral offset; {}.\n\n",
        r.coil_a.name,
        r.coil_b.name,
        format_mm(r.gap_mm),
        format_mm(r.offset_mm),
        match r.facing {
            Facing::TopToTop => "the upper coil turned over (top layers facing)",
            Facing::SameWay => "both coils the right way up (the upper coil's bottom layer facing)",
        }
    ));
    for w in &r.warnings {
        s.push_str(&format!("**Warning:** {w}\n\n"));
    }
    s.push_str("| quantity | value |\n|---|---|\n");
    s.push_str(&format!(
        "| mutual inductance | {} ({}) |\n",
        si(r.mutual_inductance_h, "H"),
        if r.terminals_aiding {
            "aiding with current into both terminal 1"
        } else {
            "opposing with current into both terminal 1"
        }
    ));
    s.push_str(&format!("| coupling k | {:.4} |\n", r.coupling));
    for c in [&r.coil_a, &r.coil_b] {
        s.push_str(&format!(
            "| {}: inductance / Q / loss resistance | {} / {} / {} |\n",
            c.name,
            si(c.inductance_h, "H"),
            opt(c.q, |q| format!("{q:.1}")),
            opt(c.resistance_ohm, |x| si(x, "ohm")),
        ));
    }
    match (r.frequency_hz, r.link_efficiency_max, r.optimal_load_ohm) {
        (Some(f), Some(eta), Some(load)) => {
            s.push_str(&format!(
                "| best link efficiency at {} | {:.1} % |\n| load for it (across the tuned upper coil) | {} |\n\n",
                si(f, "Hz"),
                100.0 * eta,
                si(load, "ohm")
            ));
            s.push_str(&format!(
                "Best efficiency of a two-coil resonant link, eta = x / (1 + sqrt(1 + x))^2 with x = k^2 Q1 Q2, and its load R2 sqrt(1 + x): {}. Q is each coil's X / R at the frequency from its own analysis, with the resistance that analysis gives at the drive's operating temperature (skin and proximity effect raise it at high frequency).\n\n",
                r.efficiency_source
            ));
        }
        _ => s.push_str("\nGive --frequency for Q and the best link efficiency.\n\n"),
    }
    s.push_str(&format!(
        "Mutual inductance by {} on the copper of both coils.\n",
        match r.method {
            InductanceMethod::MaxwellRings =>
                "Maxwell's formula for coaxial rings (one ring per turn)",
            InductanceMethod::NeumannFilaments => "Neumann's formula on straight filaments",
            // The mutual inductance is always computed.
            InductanceMethod::NotComputed => "no method",
        }
    ));
    s
}

fn format_mm(v: f64) -> String {
    format!("{} mm", crate::explore::settle(v))
}

fn series(points: &[CurvePoint]) -> Vec<(f64, f64)> {
    points.iter().map(|p| (p.at_mm, p.coupling)).collect()
}

/// The coupling against gap (at the offset), SVG.
pub fn gap_plot(r: &CouplingReport) -> String {
    line_plot(
        &format!(
            "Coupling of {} and {} against gap",
            r.coil_a.name, r.coil_b.name
        ),
        &format!(
            "gap between the facing copper, mm (offset {})",
            format_mm(r.offset_mm)
        ),
        "coupling k",
        &[("k", series(&r.against_gap))],
        &[Marker::new(
            r.gap_mm,
            format!("gap {}\nk = {:.3}", format_mm(r.gap_mm), r.coupling),
        )
        .with_point(r.coupling)],
    )
}

/// The coupling against lateral offset (at the gap), SVG.
pub fn offset_plot(r: &CouplingReport) -> String {
    line_plot(
        &format!(
            "Coupling of {} and {} against lateral offset",
            r.coil_a.name, r.coil_b.name
        ),
        &format!("offset of the centres, mm (gap {})", format_mm(r.gap_mm)),
        "coupling k (below 0: flux reversed)",
        &[("k", series(&r.against_offset))],
        &[Marker::new(
            r.offset_mm,
            format!("offset {}\nk = {:.3}", format_mm(r.offset_mm), r.coupling),
        )
        .with_point(r.coupling)],
    )
}

/// couple.json, couple.md and the two plots, in that order.
///
/// # Errors
/// When the report cannot be serialised (not expected).
pub fn files(r: &CouplingReport) -> Result<Vec<OutFile>, serde_json::Error> {
    let file = |path: &str, role: &str, bytes: Vec<u8>| OutFile {
        path: path.into(),
        role: role.into(),
        bytes,
    };
    Ok(vec![
        file(
            "couple.json",
            "coupling of the two coils (JSON, SI units)",
            format!("{}\n", serde_json::to_string_pretty(r)?).into_bytes(),
        ),
        file("couple.md", "coupling summary", markdown(r).into_bytes()),
        file(
            "coupling_gap.svg",
            "coupling against gap",
            gap_plot(r).into_bytes(),
        ),
        file(
            "coupling_offset.svg",
            "coupling against lateral offset",
            offset_plot(r).into_bytes(),
        ),
    ])
}
