//! The engineering report: `report.md` (for people), `report.json` (the
//! [`Analysis`] as JSON) and SVG plots (field on the axis, field across the
//! coil, force against gap). Translates the analysis; computes nothing new.

use super::plot::{Marker, Scale, line_plot, line_plot_scaled};
use super::{ExportError, OutFile};
use crate::design::{Design, Magnet, Shape, Source};
use crate::geometry::Board;
use crate::physics::{
    Analysis, Caution, FieldReport, Impedance, InductanceReport, MagnetReport, Mechanics,
    ProfilePoint, Resistance, ThermalReport,
};
use std::fmt::Write as _;

/// `report.md`, `report.json` and the plots, in a fixed order.
///
/// # Errors
/// [`ExportError::Unrepresentable`] if the analysis cannot be written as JSON.
pub fn files(
    design: &Design,
    board: &Board,
    analysis: &Analysis,
) -> Result<Vec<OutFile>, ExportError> {
    let json = serde_json::to_vec_pretty(analysis)
        .map_err(|e| ExportError::Unrepresentable(format!("report.json: {e}")))?;
    let mut out = vec![
        OutFile {
            path: "report.md".into(),
            role: "engineering report".into(),
            bytes: markdown(design, board, analysis).into_bytes(),
        },
        OutFile {
            path: "report.json".into(),
            role: "engineering report (JSON, SI units)".into(),
            bytes: json,
        },
    ];
    for (name, role, svg) in plots(design, board, analysis) {
        out.push(OutFile {
            path: format!("plots/{name}"),
            role: role.into(),
            bytes: svg.into_bytes(),
        });
    }
    Ok(out)
}

/// The plots as (file name, role, SVG text), each with the design's
/// operating point marked: the magnet's face (or the top copper) on the
/// field along the axis, the winding's inner and outer edge on the field
/// across the coil, the design's gap on the force against gap.
pub fn plots(design: &Design, board: &Board, a: &Analysis) -> Vec<(String, &'static str, String)> {
    let drive = si_given(a.thermal.current_a, "A");
    let axis_marker = match &design.magnet {
        Some(mg) => Marker::new(mg.gap, format!("magnet face (gap {})", mm(mg.gap))),
        None => Marker::new(
            0.0,
            format!(
                "top copper: {} mT/A,\n{} mT at the drive ({drive})",
                sig(a.field.center_t_per_a * 1e3, 4),
                sig(a.field.center_at_drive_t * 1e3, 4)
            ),
        )
        .with_point(a.field.center_t_per_a * 1e3),
    };
    // A circle's winding edges are its radii; other shapes reach their
    // nearest and farthest copper in different directions.
    let (inner, outer) = match design.coil.shape {
        Shape::Circle => ("inner edge", "outer edge"),
        _ => ("nearest copper", "farthest copper"),
    };
    let mut v = vec![
        (
            "field_axis.svg".to_string(),
            "plot: field on the axis",
            line_plot(
                "Field on the coil axis (per ampere)",
                "height above top copper (mm)",
                "B (mT/A)",
                &[("B on axis", to_xy(&a.field.axial, 1e3))],
                &[axis_marker],
            ),
        ),
        (
            "field_radial.svg".to_string(),
            "plot: field across the coil",
            line_plot(
                &format!(
                    "Bz across the coil, {} above the top copper (per ampere)",
                    mm(a.field.radial_height_mm)
                ),
                "distance from axis (mm)",
                "Bz (mT/A)",
                &[("Bz", to_xy(&a.field.radial, 1e3))],
                &[
                    Marker::new(
                        board.inner_radius,
                        format!("{inner} {:.2} mm", board.inner_radius),
                    ),
                    Marker::new(
                        board.outer_radius,
                        format!("{outer} {:.2} mm", board.outer_radius),
                    ),
                ],
            ),
        ),
    ];
    if !a.response.is_empty() {
        v.push((
            "impedance.svg".to_string(),
            "plot: impedance against frequency",
            impedance_plot(a),
        ));
    }
    motion_plots(design, a, &mut v);
    if let Some(r) = &a.rotor {
        v.push((
            "back_emf.svg".to_string(),
            "plot: back-EMF of each phase",
            back_emf_plot(r),
        ));
    }
    if let (Some(m), Some(mg)) = (&a.magnet, &design.magnet) {
        let pts: Vec<(f64, f64)> = m
            .force_vs_gap
            .iter()
            .map(|p| (p.gap_mm, p.force_n_per_a * 1e3))
            .collect();
        let gap = Marker::new(
            mg.gap,
            format!(
                "design gap {}: {},\n{} at the drive ({drive})",
                mm(mg.gap),
                millinewton(m.force_per_a_n, "/A"),
                millinewton(m.force_n, "")
            ),
        )
        .with_point(m.force_per_a_n * 1e3);
        v.push((
            "force_gap.svg".to_string(),
            "plot: force on the magnet against gap",
            line_plot(
                "Axial force on the magnet against gap (per ampere)",
                "gap from top copper to magnet (mm)",
                "force (mN/A)",
                &[("force", pts)],
                &[gap],
            ),
        ));
    }
    v
}

/// |Z|, R_ac and omega L against frequency on log axes, self-resonance
/// and the drive frequency marked.
fn impedance_plot(a: &Analysis) -> String {
    let r = &a.response;
    let z: Vec<(f64, f64)> = r
        .iter()
        .map(|p| (p.frequency_hz, p.impedance_ohm))
        .collect();
    let rac: Vec<(f64, f64)> = r
        .iter()
        .map(|p| (p.frequency_hz, p.resistance_ohm))
        .collect();
    let xl: Vec<(f64, f64)> = r
        .iter()
        .map(|p| {
            (
                p.frequency_hz,
                std::f64::consts::TAU * p.frequency_hz * p.inductance_h,
            )
        })
        .collect();
    let mut marks = Vec::new();
    let srf = a.capacitance.self_resonance_hz;
    if srf.is_finite() {
        marks.push(Marker::new(
            srf,
            format!("self-resonance\n{}", si(srf, "Hz")),
        ));
    }
    if let Some(zd) = &a.impedance {
        marks.push(
            Marker::new(
                zd.frequency_hz,
                format!(
                    "drive {}: |Z| {} ohm,\nQ {}, phase {:.1} deg",
                    si_given(zd.frequency_hz, "Hz"),
                    sig(zd.impedance_ohm, 3),
                    sig(zd.q, 3),
                    zd.phase_deg
                ),
            )
            .with_point(zd.impedance_ohm),
        );
    }
    line_plot_scaled(
        "Impedance against frequency (lumped model)",
        "frequency (Hz)",
        "ohm",
        &[("|Z|", z), ("R_ac", rac), ("omega L", xl)],
        &marks,
        Scale::Log,
        Scale::Log,
    )
}

/// Back-EMF per unit speed of each phase against the electrical angle.
fn back_emf_plot(r: &crate::physics::rotor::RotorReport) -> String {
    let series: Vec<(String, Vec<(f64, f64)>)> = r
        .phases
        .iter()
        .map(|p| {
            let pts = r
                .electrical_degrees
                .iter()
                .zip(&p.emf_v_per_rad_s)
                .map(|(x, e)| (*x, e * 1e3))
                .collect();
            (format!("phase {}", p.phase), pts)
        })
        .collect();
    let named: Vec<(&str, Vec<(f64, f64)>)> = series
        .iter()
        .map(|(n, p)| (n.as_str(), p.clone()))
        .collect();
    let c = &r.constants;
    line_plot(
        &format!(
            "Back-EMF per phase, {} poles (per unit rotor speed)",
            r.poles
        ),
        "electrical angle (degrees)",
        "back-EMF (mV per rad/s)",
        &named,
        &[Marker::new(
            360.0,
            format!(
                "phase peak {} mV/(rad/s); torque {} mN m/A (sine drive)",
                sig(c.back_emf_v_per_rad_s * 1e3, 4),
                sig(c.torque_constant_n_m_per_a * 1e3, 4)
            ),
        )],
    )
}

/// The plots of the drive over time, the heating from switch-on and the
/// fin's response.
fn motion_plots(design: &Design, a: &Analysis, v: &mut Vec<(String, &'static str, String)>) {
    let d = &a.drive;
    if !d.current_curve.is_empty() {
        let pts: Vec<(f64, f64)> = d
            .current_curve
            .iter()
            .map(|p| (p.t_s * 1e3, p.value * 1e3))
            .collect();
        let period_ms = d.frequency_hz.map_or(1.0, |f| 1e3 / f);
        v.push((
            "current.svg".to_string(),
            "plot: current over two periods",
            line_plot(
                &format!(
                    "Coil current, {}{} (periodic state, two periods)",
                    waveform_words(d),
                    d.frequency_hz
                        .map_or(String::new(), |f| format!(" at {}", si_given(f, "Hz")))
                ),
                "time (ms)",
                "current (mA)",
                &[("current", pts)],
                &[Marker::new(
                    period_ms,
                    format!(
                        "one period; RMS {}, peak {}",
                        si(d.current_rms_a, "A"),
                        si(d.current_peak_a, "A")
                    ),
                )],
            ),
        ));
    }
    let h = &a.heating;
    if !h.curve.is_empty() {
        let ta = a.inputs.ambient_c;
        let hot: Vec<(f64, f64)> = h.curve.iter().map(|p| (p.t_s, p.hottest_c - ta)).collect();
        let avg: Vec<(f64, f64)> = h.curve.iter().map(|p| (p.t_s, p.board_c - ta)).collect();
        let mut marks = Vec::new();
        if let Some(r) = h.rise_time_s {
            marks.push(Marker::new(r, format!("63 % of the rise: {} s", sig(r, 3))));
        }
        if let Some(t) = h.time_to_max_temperature_s {
            marks.push(
                Marker::new(
                    t,
                    format!(
                        "max_temperature {} C after {} s",
                        a.inputs.max_temperature_c,
                        sig(t, 3)
                    ),
                )
                .with_point(a.inputs.max_temperature_c - ta),
            );
        }
        v.push((
            "heating.svg".to_string(),
            "plot: temperature from switch-on",
            line_plot(
                &format!("Temperature rise from switch-on, above {ta} C ambient"),
                "time (s)",
                "rise above ambient (K)",
                &[("hottest copper", hot), ("board average", avg)],
                &marks,
            ),
        ));
    }
    if let (Some(f), Some(fd)) = (&a.fin, &design.fin) {
        let pts: Vec<(f64, f64)> = f
            .response
            .iter()
            .map(|p| (p.frequency_hz, p.amplitude_mm))
            .collect();
        let mut marks = vec![Marker::new(
            f.resonance_hz,
            format!("first resonance {} Hz", sig(f.resonance_hz, 3)),
        )];
        if let Some(fr) = d.frequency_hz {
            marks.push(
                Marker::new(
                    fr,
                    format!(
                        "drive {}: {} mm",
                        si_given(fr, "Hz"),
                        sig(f.amplitude_mm, 3)
                    ),
                )
                .with_point(f.amplitude_mm),
            );
        }
        v.push((
            "fin_response.svg".to_string(),
            "plot: fin swing against frequency",
            line_plot(
                &format!(
                    "Fin swing at {} from the clamp against frequency (drive's fundamental force)",
                    mm(fd.load_at)
                ),
                "frequency (Hz)",
                "amplitude (mm)",
                &[("amplitude", pts)],
                &marks,
            ),
        ));
    }
}

/// The waveform in words: "bipolar square, duty 0.5".
fn waveform_words(d: &crate::physics::DriveReport) -> String {
    use crate::design::Waveform;
    match d.waveform {
        Waveform::Dc => "dc".into(),
        Waveform::Sine => "sine".into(),
        Waveform::Square if d.bipolar => format!("bipolar square, duty {}", d.duty),
        Waveform::Square => format!("on/off square, duty {}", d.duty),
        Waveform::Pulse => format!("pulses, duty {}", d.duty),
    }
}

/// The drive over time: RMS, peak, power, harmonics.
fn waveform(a: &Analysis) -> String {
    let d = &a.drive;
    let mut s = String::new();
    let _ = writeln!(
        s,
        "## Drive over time
"
    );
    let _ = writeln!(
        s,
        "- waveform: {}{}",
        waveform_words(d),
        d.frequency_hz
            .map_or(String::new(), |f| format!(" at {}", si_given(f, "Hz")))
    );
    let _ = writeln!(
        s,
        "- current: RMS {}, peak {}, mean {}; average power {}",
        si(d.current_rms_a, "A"),
        si(d.current_peak_a, "A"),
        si(d.current_mean_a, "A"),
        si(d.power_avg_w, "W")
    );
    let _ = writeln!(
        s,
        "- the coil as a series R-L load at its operating resistance: L/R = {} (voltage drives rise and fall with it; a current source imposes its waveform)",
        si(d.l_over_r_s, "s")
    );
    if let Some(f) = d.force_mean_n {
        let _ = writeln!(s, "- mean force on the magnet {}", millinewton(f, ""));
    }
    if !d.harmonics.is_empty() {
        let _ = writeln!(
            s,
            "
| harmonic | frequency | current amplitude | force amplitude |
|---|---|---|---|"
        );
        for h in &d.harmonics {
            let _ = writeln!(
                s,
                "| {} | {} | {} | {} |",
                h.n,
                si_given(h.frequency_hz, "Hz"),
                si(h.current_a, "A"),
                h.force_n.map_or("-".to_string(), |f| millinewton(f, ""))
            );
        }
    }
    if !d.current_curve.is_empty() {
        let _ = writeln!(
            s,
            "
![current over two periods](plots/current.svg)

The current over two periods in the periodic state (after the switch-on transient of a few L/R has died away)."
        );
    }
    let _ = writeln!(s);
    s
}

/// Heating over time from switch-on.
fn heating_over_time(a: &Analysis) -> String {
    let (h, t) = (&a.heating, &a.thermal);
    let mut s = String::new();
    let _ = writeln!(
        s,
        "## Heating over time and the hottest copper
"
    );
    let _ = writeln!(
        s,
        "- hottest copper rises {:.2} x as much as the board average, the winding's mean {:.2} x (the winding's losses spread radially through the layers on a disc of the board's area; leads outside the winding left out)",
        t.spread.peak, t.spread.winding
    );
    match h.rise_time_s {
        Some(r) => {
            let _ = writeln!(
                s,
                "- rise time (63 % of the final rise, read from the curve): {} s; the lumped C/G is {} s",
                sig(r, 3),
                sig(t.time_constant_s, 3)
            );
        }
        None => {
            let _ = writeln!(s, "- no steady state: the copper keeps heating");
        }
    }
    match h.time_to_max_temperature_s {
        Some(x) => {
            let _ = writeln!(
                s,
                "- the hottest copper reaches max_temperature ({} C) {} s after switch-on",
                a.inputs.max_temperature_c,
                sig(x, 3)
            );
        }
        None => {
            let _ = writeln!(
                s,
                "- the hottest copper never reaches max_temperature ({} C)",
                a.inputs.max_temperature_c
            );
        }
    }
    if h.ripple_k >= 0.01 {
        let _ = writeln!(
            s,
            "- within each period the hottest copper swings {} K above its mean (the board answering the power's swing as a first-order system); peak {}",
            sig(h.ripple_k, 3),
            h.temperature_peak_c
                .map_or("-".to_string(), |p| format!("{p:.1} C"))
        );
    }
    if !h.curve.is_empty() {
        let _ = writeln!(
            s,
            "
![temperature from switch-on](plots/heating.svg)

The board's energy balance integrated from ambient (RK4): under the drive's average power, or, when a period is longer than 1/100 of the rise, under the power within each period; the hottest copper follows the board average through the lateral spread (its profile settles far faster than the board heats). The rise time is that of the average power's curve."
        );
    }
    let _ = writeln!(s);
    s
}

/// The fin's stiffness, resonance and swing.
fn fin(a: &Analysis) -> String {
    let Some(f) = &a.fin else {
        return String::new();
    };
    let mut s = String::new();
    let _ = writeln!(
        s,
        "## The fin
"
    );
    let _ = writeln!(
        s,
        "- bending stiffness EI {:.3e} N m^2 between clamp and coil, {:.3e} N m^2 through the coil's centre (transformed section of the laminate)",
        f.bending_stiffness_n_m2, f.bending_stiffness_coil_n_m2
    );
    let _ = writeln!(
        s,
        "- stiffness at the load point {} N/m; fin mass {} g, mass at the load point {} g ({} rides on the fin)",
        sig(f.stiffness_n_per_m, 4),
        sig(f.fin_mass_kg * 1e3, 3),
        sig(f.tip_mass_kg * 1e3, 3),
        match f.moving {
            crate::design::Moving::Coil => "the coil",
            crate::design::Moving::Magnet => "the magnet",
        }
    );
    let _ = writeln!(
        s,
        "- first resonance {} Hz (Euler-Bernoulli beam, finite elements)",
        sig(f.resonance_hz, 4)
    );
    match f.deflection_mm {
        Some(d) => {
            let _ = writeln!(
                s,
                "- static deflection under the mean force {} mm (positive: the gap opens), with the force following the gap",
                sig(d, 3)
            );
        }
        None => {
            let _ = writeln!(
                s,
                "- **no stable position**: the mean force attracts and grows faster than the fin's stiffness as the gap closes; the fin is pulled in"
            );
        }
    }
    let _ = writeln!(
        s,
        "- swing at the drive frequency {} mm (one mode, damping ratio {}); all harmonics together at most {} mm",
        sig(f.amplitude_mm, 3),
        f.damping_ratio,
        sig(f.swing_peak_mm, 3)
    );
    if f.harmonics.len() > 1 {
        let _ = writeln!(
            s,
            "
| harmonic | frequency | force amplitude | swing amplitude |
|---|---|---|---|"
        );
        for h in &f.harmonics {
            let _ = writeln!(
                s,
                "| {} | {} | {} | {} mm |",
                h.n,
                si_given(h.frequency_hz, "Hz"),
                millinewton(h.force_n, ""),
                sig(h.amplitude_mm, 3)
            );
        }
    }
    let _ = writeln!(s, "- {}", f.materials_source);
    let _ = writeln!(
        s,
        "
![fin swing against frequency](plots/fin_response.svg)

The swing at the load point against frequency under the drive's fundamental force, one mode with the stated damping: a linear estimate, valid while the swing is small against the gap.
"
    );
    s
}

fn to_xy(p: &[ProfilePoint], scale: f64) -> Vec<(f64, f64)> {
    p.iter().map(|q| (q.at_mm, q.b_t_per_a * scale)).collect()
}

/// `v` to `n` significant digits in fixed notation ("0.3848", "2886",
/// "12.80"); zero and non-finite values as Rust writes them.
fn sig(v: f64, n: usize) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let digits = |mag: i32| (n as i32 - 1 - mag).max(0) as usize;
    let mag = v.abs().log10().floor() as i32;
    let text = format!("{v:.*}", digits(mag));
    // Rounding up to the next power of ten (9.9996 -> 10.000) adds a digit.
    match text.parse::<f64>() {
        Ok(r) if r.abs() >= 10f64.powi(mag + 1) => format!("{v:.*}", digits(mag + 1)),
        _ => text,
    }
}

/// `v` with an SI prefix (n, u, m, k, M, G) chosen so that 1 <= mantissa
/// < 1000, to 4 significant digits: "12.83 uH", "120.0 mA", "130.0 kHz".
fn si(v: f64, unit: &str) -> String {
    const PREFIXES: [&str; 7] = ["n", "u", "m", "", "k", "M", "G"];
    if v == 0.0 || !v.is_finite() {
        return format!("{v} {unit}");
    }
    let mut k = ((v.abs().log10() / 3.0).floor() as i32).clamp(-3, 3);
    let mut text = sig(v / 10f64.powi(3 * k), 4);
    if k < 3 && text.parse::<f64>().is_ok_and(|r| r.abs() >= 1000.0) {
        k += 1;
        text = sig(v / 10f64.powi(3 * k), 4);
    }
    format!("{text} {}{unit}", PREFIXES[(k + 3) as usize])
}

/// A value the user gave (drive, frequency), with an SI prefix and no
/// trailing zeros: "120 mA", "130 kHz", "5 V".
fn si_given(v: f64, unit: &str) -> String {
    let s = si(v, unit);
    match s.split_once(' ') {
        Some((num, u)) if num.contains('.') => {
            format!("{} {u}", num.trim_end_matches('0').trim_end_matches('.'))
        }
        _ => s,
    }
}

/// A force (N, or N per `per`) in mN to 4 significant digits, the unit
/// the force plot uses: "62.69 mN/A", "0.6562 mN".
fn millinewton(v: f64, per: &str) -> String {
    format!("{} mN{per}", sig(v * 1e3, 4))
}

/// A length in mm as people read it: up to 3 decimals, no trailing zeros
/// ("0.6 mm", "6.24 mm", "12 mm").
fn mm(v: f64) -> String {
    let s = format!("{v:.3}");
    format!("{} mm", s.trim_end_matches('0').trim_end_matches('.'))
}

/// The report for people, in Markdown: the design in one line, the
/// cautions first, then the numbers with units (one section per quantity,
/// each written from that quantity's report), the notes and the general
/// cautions.
pub fn markdown(design: &Design, board: &Board, a: &Analysis) -> String {
    [
        heading(design, board),
        cautions(&a.cautions),
        phases(a),
        rotor(a),
        at_the_drive(a),
        layers(&a.resistance),
        inductance(&a.inductance, a.impedance.as_ref()),
        at_frequency(a),
        field(&a.field),
        match (&a.magnet, &design.magnet) {
            (Some(m), Some(mg)) => force(m, mg),
            _ => String::new(),
        },
        waveform(a),
        heating(&a.thermal, a.inputs.max_temperature_c),
        heating_over_time(a),
        fin(a),
        bending(&a.mechanics),
        tail(design, board),
        notes(&a.notes),
        general_cautions(),
    ]
    .concat()
}

/// An array's coils and phases; nothing for a coil alone.
fn phases(a: &Analysis) -> String {
    let Some(ar) = &a.array else {
        return String::new();
    };
    let mut s = String::from("## Phases\n\n");
    let (coils, phases, kw) = a.whole;
    let _ = writeln!(
        s,
        "{coils} coils in {phases} phase(s), {} connection{}; terminal pads {}.\n",
        match ar.connection {
            crate::design::Connection::Star => "star",
            crate::design::Connection::Delta => "delta",
            crate::design::Connection::Separate => "separate",
        },
        match (ar.poles, kw) {
            (Some(p), Some(k)) =>
                format!(", {p} rotor poles, winding factor {k:.4} (star of slots)"),
            _ => String::new(),
        },
        ar.terminals.join(", ")
    );
    let _ = writeln!(
        s,
        "| phase | coils (sense) | tracks R at 20 C |\n|---|---|---|"
    );
    for p in &ar.phases {
        let list: Vec<String> = p
            .coils
            .iter()
            .map(|&(k, sg)| format!("{k}{}", if sg > 0.0 { "+" } else { "-" }))
            .collect();
        let _ = writeln!(
            s,
            "| {} | {} | {:.4} ohm |",
            p.name,
            list.join(" "),
            p.tracks_ohm_20c
        );
    }
    if !ar.mutual_inductance.is_empty() {
        let _ = writeln!(
            s,
            "\n| phases | mutual inductance | coupling |\n|---|---|---|"
        );
        for m in &ar.mutual_inductance {
            let _ = writeln!(
                s,
                "| {}-{} | {} | {:.4} |",
                m.phases[0],
                m.phases[1],
                si(m.mutual_inductance_h, "H"),
                m.coupling
            );
        }
    }
    s.push_str(
        "\nThe sections below describe phase A alone (its coils and its own buses, star point or delta corner left out) with the drive's current in it; fields are those of phase A's copper about the board's centre. The heating is the whole board's: every phase carries the drive (a fraction of its period apart) and the power is all phases'.\n\n",
    );
    s
}

/// The rotor's constants and what its torque costs; nothing without one.
fn rotor(a: &Analysis) -> String {
    let Some(r) = &a.rotor else {
        return String::new();
    };
    let c = &r.constants;
    let mut s = format!(
        "## Rotor\n\n{} poles, {} disc(s)\n\n| quantity | value |\n|---|---|\n",
        r.poles, r.discs
    );
    let mut row = |k: &str, v: String| {
        let _ = writeln!(s, "| {k} | {v} |");
    };
    row(
        "back-EMF constant, phase peak",
        format!("{} V per rad/s", sig(c.back_emf_v_per_rad_s, 4)),
    );
    if let Some(l) = c.back_emf_line_v_per_rad_s {
        row(
            "back-EMF constant, line to line peak",
            format!("{} V per rad/s", sig(l, 4)),
        );
    }
    row(
        "torque constant, sinusoidal drive",
        format!("{} N m/A (phase peak)", sig(c.torque_constant_n_m_per_a, 4)),
    );
    if let Some(k6) = c.torque_constant_six_step_n_m_per_a {
        row(
            "torque constant, six-step drive",
            format!("{} N m/A", sig(k6, 4)),
        );
    }
    row(
        "torque ripple, sinusoidal drive",
        format!("{:.1} %", c.torque_ripple_percent),
    );
    if let Some(l) = &r.load {
        row(
            "motor constant (copper at 20 C)",
            format!("{} N m/sqrt(W)", sig(l.motor_constant_n_m_per_sqrt_w, 4)),
        );
        row(
            "largest continuous torque (hottest copper at max_temperature)",
            format!("{} N m", sig(l.torque_max_n_m, 4)),
        );
        if let (Some(t), Some(i), Some(p)) = (l.torque_n_m, l.phase_current_peak_a, l.copper_loss_w)
        {
            row(
                "at the rotor's torque",
                format!(
                    "{} N m: phase peak current {}, copper loss {} (copper at 20 C)",
                    sig(t, 4),
                    si(i, "A"),
                    si(p, "W")
                ),
            );
        }
    }
    let _ = writeln!(
        s,
        "\nLorentz torque and back-EMF agree to {:.2} % of the peak back-EMF (energy balance).\n\n![back-EMF](plots/back_emf.svg)\n",
        c.energy_balance * 100.0
    );
    s
}

/// Title, the design in one line, and what its outer size measures
/// against the whole copper.
fn heading(design: &Design, board: &Board) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "# Coil report: {}\n", design.name);
    let c = &design.coil;
    let shape = match c.shape {
        Shape::Rectangle { .. } => "rectangle".to_string(),
        Shape::Polygon { sides } => format!("{sides}-sided polygon"),
        Shape::Circle => "circle".to_string(),
        Shape::Sector { .. } => "annular sector".to_string(),
    };
    let _ = writeln!(
        s,
        "{shape} {}, free centre {:.3} mm; {}, {} turns per layer, trace {:.3} mm, clearance {:.3} mm, {} wiring, {} board.\n",
        c.outer_size_text(),
        c.inner_diameter,
        match c.layers {
            1 => "1 layer".to_string(),
            n => format!("{n} layers"),
        },
        c.turns_text(),
        c.trace_width,
        c.clearance,
        c.wiring.words(),
        design.stackup.kind.words(),
    );
    let copper = board.copper_bounds();
    let _ = writeln!(
        s,
        "The outer size is that of the outermost turn; all copper, including the leads and the outer vias, measures {:.2} x {:.2} mm.\n",
        copper.width(),
        copper.height()
    );
    s
}

/// The analysis' cautions (none: no section).
fn cautions(cautions: &[Caution]) -> String {
    let mut s = String::new();
    if !cautions.is_empty() {
        let _ = writeln!(s, "## Warnings\n");
        for c in cautions {
            let _ = writeln!(s, "- **{c}**");
        }
        let _ = writeln!(s);
    }
    s
}

/// The headline numbers at the drive, from every quantity.
fn at_the_drive(a: &Analysis) -> String {
    let mut s = String::new();
    let (t, r) = (&a.thermal, &a.resistance);
    let drive = match a.inputs.drive {
        Source::Voltage(v) => si_given(v, "V"),
        Source::Current(i) => si_given(i, "A"),
    };
    let _ = writeln!(
        s,
        "## At the drive ({drive}, ambient {} C)\n",
        a.inputs.ambient_c
    );
    let _ = writeln!(s, "| quantity | value |\n|---|---|");
    let temp = t
        .temperature_c
        .map_or("no steady state (burns out)".to_string(), |t| {
            format!("{t:.1} C")
        });
    let rows = [
        ("current", si(t.current_a, "A")),
        ("voltage", si(t.voltage_v, "V")),
        (
            if a.whole.1 > 1 {
                "power (all phases)"
            } else {
                "power"
            },
            si(t.power_w, "W"),
        ),
        ("steady temperature, hottest copper", temp),
        (
            "steady temperature, board average",
            t.temperature_board_c
                .map_or("no steady state".to_string(), |t| format!("{t:.1} C")),
        ),
        (
            "resistance at 20 C",
            format!("{} ohm", sig(r.total_ohm_20c, 4)),
        ),
        (
            "resistance at operating temperature",
            format!("{} ohm", sig(t.resistance_ohm_hot, 4)),
        ),
        ("inductance", si(a.inductance.inductance_h, "H")),
        (
            "field at the centre of the top copper, per ampere",
            format!("{} mT/A", sig(a.field.center_t_per_a * 1e3, 4)),
        ),
        (
            "field at the centre at the drive",
            format!("{} mT", sig(a.field.center_at_drive_t * 1e3, 4)),
        ),
        (
            "max current / voltage for max_temperature",
            format!(
                "{} / {} (at {} C)",
                si(t.max_current_a, "A"),
                si(t.max_voltage_v, "V"),
                a.inputs.max_temperature_c
            ),
        ),
        ("trace length", format!("{:.1} mm", r.trace_length_mm)),
        (
            "finished thickness",
            format!("{:.3} mm", a.mechanics.thickness_mm),
        ),
        (
            "min bend radius, static / dynamic",
            format!(
                "{:.2} mm / {:.2} mm",
                a.mechanics.bend_radius_min_mm, a.mechanics.bend_radius_dynamic_mm
            ),
        ),
    ];
    for (k, v) in rows {
        let _ = writeln!(s, "| {k} | {v} |");
    }
    if let Some(m) = &a.magnet {
        let _ = writeln!(
            s,
            "| force on the magnet at the drive | {} |",
            millinewton(m.force_n, "")
        );
        let _ = writeln!(
            s,
            "| force per ampere | {} |",
            millinewton(m.force_per_a_n, "/A")
        );
        let _ = writeln!(
            s,
            "| force per square-root watt | {} |",
            millinewton(m.force_per_sqrt_w_n, "/sqrt(W)")
        );
    }
    let _ = writeln!(s);
    s
}

/// Length and resistance per layer, and the vias.
fn layers(r: &Resistance) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "## Layers\n\n| layer | group | length (mm) | copper (um) | R at 20 C (ohm) |\n|---|---|---|---|---|"
    );
    for l in &r.layers {
        let _ = writeln!(
            s,
            "| {} | {} | {:.1} | {:.1} | {} |",
            l.layer,
            l.group,
            l.length_mm,
            l.copper_um,
            sig(l.resistance_ohm_20c, 4)
        );
    }
    let _ = writeln!(
        s,
        "\nVia barrels: {} ohm at 20 C.\n",
        sig(r.vias_ohm_20c, 3)
    );
    s
}

/// The inductance, the published estimates and the impedance.
fn inductance(i: &InductanceReport, impedance: Option<&Impedance>) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "## Inductance\n");
    let _ = writeln!(s, "- computed (all layers): {}", si(i.inductance_h, "H"));
    let _ = writeln!(
        s,
        "- computed, top layer alone (with its leads): {}",
        si(i.single_layer_h, "H")
    );
    if let Some(w) = i.winding_h {
        let _ = writeln!(
            s,
            "- computed, winding alone (every layer as built, no leads, no vias): {}",
            si(w, "H")
        );
    }
    if let Some(w1) = i.single_layer_winding_h {
        let _ = writeln!(
            s,
            "- computed, top layer's winding alone (no leads, no vias): {}",
            si(w1, "H")
        );
        let _ = writeln!(
            s,
            "- published estimates, each for {} (d_out {:.3} mm, d_in {:.3} mm as the sources define them), against the top layer's winding alone:",
            crate::physics::inductance::ESTIMATE_INCLUDES,
            i.d_out_mm,
            i.d_in_mm
        );
        if i.estimates.is_empty() {
            let _ = writeln!(s, "  - none applies to this shape");
        }
        for e in &i.estimates {
            let _ = writeln!(
                s,
                "  - {} ({}; {}): {} ({:+.1} %)",
                match e.name {
                    "mohan_modified_wheeler" => "modified Wheeler formula",
                    "mohan_current_sheet" => "current-sheet formula",
                    "wheeler_1928" => "Wheeler's flat-spiral formula",
                    other => other,
                },
                e.source,
                e.stated_accuracy,
                si(e.inductance_h, "H"),
                100.0 * e.relative_difference
            );
        }
        let _ = writeln!(s, "  - {}", w1_note(w1, i.single_layer_h));
    }
    if let Some(z) = impedance {
        let _ = writeln!(
            s,
            "- at {}: L(f) {}, reactance {} ohm, |Z| {} ohm, Q {}; skin depth {:.1} um",
            si_given(z.frequency_hz, "Hz"),
            si(z.inductance_h, "H"),
            sig(z.reactance_ohm, 4),
            sig(z.impedance_ohm, 4),
            sig(z.q, 3),
            z.skin_depth_um
        );
    }
    let _ = writeln!(s);
    s
}

/// The coil at frequency: AC resistance, self-capacitance and resonance,
/// the values at the drive frequency.
fn at_frequency(a: &Analysis) -> String {
    let c = &a.capacitance;
    let mut s = String::from(
        "## At frequency

",
    );
    let _ = writeln!(
        s,
        "- self-capacitance {} (turn to turn {}, layer to layer {}; energy method, voltage linear along the winding)",
        si(c.capacitance_f, "F"),
        si(c.turn_to_turn_f, "F"),
        si(c.layer_to_layer_f, "F")
    );
    if c.self_resonance_hz.is_finite() {
        let _ = writeln!(
            s,
            "- self-resonance {} (1 / (2 pi sqrt(L C)))",
            si(c.self_resonance_hz, "Hz")
        );
    }
    if let Some(z) = &a.impedance {
        let _ = writeln!(
            s,
            "- at {}: AC resistance {} ohm ({} ohm of it from the proximity effect; DC {} ohm), Q {} (omega L(f) / R_ac), |Z| {} ohm at {:.1} deg (with the self-capacitance), {:.3} of the self-resonance",
            si_given(z.frequency_hz, "Hz"),
            sig(z.resistance_ac_ohm, 4),
            sig(z.proximity_ohm, 3),
            sig(a.thermal.resistance_ohm_hot, 4),
            sig(z.q, 3),
            sig(z.impedance_ohm, 4),
            z.phase_deg,
            z.resonance_fraction
        );
        if let Some(d) = z.dowell_ohm {
            let _ = writeln!(
                s,
                "  - Dowell 1966 (layers of foil, a cross-check only): {} ohm",
                sig(d, 4)
            );
        }
        for sh in &z.shares {
            let _ = writeln!(
                s,
                "  - layer {} carries {:.3} of the current at {:.1} deg (at DC {:.3})",
                sh.layer, sh.share, sh.phase_deg, sh.share_dc
            );
        }
    }
    s.push_str("- lumped model: (R_ac + j omega L(f)) in parallel with the self-capacitance, L(f) less the internal inductance the skin effect takes; plot: plots/impedance.svg\n\n");
    s
}

/// How much the top layer's leads add to (or take from) its inductance.
fn w1_note(winding: f64, with_leads: f64) -> String {
    format!(
        "the leads change the top layer's inductance by {:+.1} % (a lead ring running against the turns can lower it)",
        100.0 * (with_leads / winding - 1.0)
    )
}

/// The field on the axis and across the coil.
fn field(f: &FieldReport) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "## Field\n");
    let _ = writeln!(
        s,
        "- on the axis at the top copper surface: {} mT/A (pointing into the board for current entering terminal 1)",
        sig(f.center_t_per_a * 1e3, 4)
    );
    let r = |x: Option<f64>| x.map_or("not reached".to_string(), |v| format!("{v:.2} mm"));
    let _ = writeln!(
        s,
        "- {:.2} mm above the top copper, Bz falls to 90 % of its axis value at {} and to 50 % at {} from the axis",
        f.radial_height_mm,
        r(f.radius_90_mm),
        r(f.radius_50_mm)
    );
    let _ = writeln!(
        s,
        "- Biot-Savart on {} straight filaments; each arc as pairs of filaments over sub-arcs whose chord sagitta is at most {:.1e} of their radius, every pair keeping its sub-arc's dipole moment (tested on a 4-layer, 20-turn coil: centre field within 1e-7, field 0.5 mm above the copper within 2e-4 of the centre value)",
        f.filaments, f.chord_sagitta_relative
    );
    let _ = writeln!(
        s,
        "\n![field on the axis](plots/field_axis.svg)\n\n![field across the coil](plots/field_radial.svg)\n"
    );
    s
}

/// The force on the magnet by both methods.
fn force(m: &MagnetReport, mg: &Magnet) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "## Force on the magnet\n");
    let _ = writeln!(
        s,
        "Cylinder {:.2} mm x {:.2} mm, Br {:.2} T, {:.2} mm above the top copper, magnetised away from the coil. Positive force pushes the magnet away; flip the magnet or the current to pull.\n",
        mg.diameter, mg.thickness, mg.remanence, mg.gap
    );
    let _ = writeln!(
        s,
        "- Lorentz force on the real conductor in the magnet's field (magnet as surface current Br/mu0, Derby & Olbert 2010): {}",
        millinewton(m.lorentz_n_per_a, "/A")
    );
    let _ = writeln!(
        s,
        "- cross-check, coil as coaxial loops with Maxwell's mutual inductance: {} ({:.1} % apart)",
        millinewton(m.rings_n_per_a, "/A"),
        100.0 * m.methods_difference
    );
    let _ = writeln!(
        s,
        "- the magnet's own field at the coil centre: {:.1} mT",
        m.magnet_field_at_coil_t * 1e3
    );
    let _ = writeln!(s, "\n![force against gap](plots/force_gap.svg)\n");
    s
}

/// Heat balance, time constant and pulse length (`max_temperature_c`: the
/// design's limit, C).
fn heating(t: &ThermalReport, max_temperature_c: f64) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "## Heating\n");
    let _ = writeln!(
        s,
        "- board face {:.1} mm^2, characteristic length {:.2} mm, heat capacity {} J/K",
        t.area_mm2,
        t.char_length_mm,
        sig(t.heat_capacity_j_per_k, 3)
    );
    let _ = writeln!(
        s,
        "- at the operating temperature: convection top {:.2}, bottom {:.2}, radiation {:.2} W/(m^2 K); Rayleigh number {:.0}",
        t.losses.h_top_w_per_m2k,
        t.losses.h_bottom_w_per_m2k,
        t.losses.h_radiation_w_per_m2k,
        t.losses.rayleigh
    );
    let _ = writeln!(s, "- convection: {}", t.convection_source);
    let _ = writeln!(s, "- thermal time constant {} s", sig(t.time_constant_s, 3));
    match t.pulse_s {
        Some(p) => {
            let _ = writeln!(
                s,
                "- from ambient, the drive may last {} s before the coil reaches {max_temperature_c} C",
                sig(p, 3)
            );
        }
        None => {
            let _ = writeln!(
                s,
                "- the drive may stay on indefinitely (steady temperature below {max_temperature_c} C)"
            );
        }
    }
    s
}

/// Thickness and bend radii.
fn bending(m: &Mechanics) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "\n## Bending\n");
    let _ = writeln!(
        s,
        "Finished thickness {:.3} mm; minimum bend radius {:.2} mm ({} x, bent once to install) and {:.2} mm ({} x, repeated bending): {}.\n",
        m.thickness_mm,
        m.bend_radius_min_mm,
        m.static_ratio,
        m.bend_radius_dynamic_mm,
        m.dynamic_ratio,
        m.source
    );
    s
}

/// The flex tail: its fingers and the finished thickness the connector
/// specifies; empty without a tail.
fn tail(design: &Design, board: &Board) -> String {
    let (Some(t), Some(thick), Some(laid)) =
        (design.tail, design.finger_thickness(), board.tail.as_ref())
    else {
        return String::new();
    };
    let mut s = String::new();
    let _ = writeln!(s, "\n## Tail\n");
    let _ = writeln!(
        s,
        "{} mm long, {} mm wide; {} fingers {} x {} mm at {} mm pitch (gap {:.3} mm), the first two carrying the coil, the coverlay opened over them.\n",
        t.length,
        t.width,
        t.fingers,
        t.finger_width,
        t.finger_length,
        t.pitch,
        t.pitch - t.finger_width
    );
    let _ = writeln!(
        s,
        "Finished thickness at the fingers {thick:.3} mm (board without the coverlay on the fingers' face, plus the stiffener): the connector's mating thickness must match it. Stiffener {} mm behind the fingers ({}); the stiffened part must not bend: bend the tail only between the coil and the stiffener (the first {:.2} mm from the coil's board edge), no tighter than the minimum bend radius under Bending.\n",
        t.stiffener,
        super::gerber::stiffener_file_name(&super::gerber::file_stem(&design.name)),
        laid.stiff_from - laid.root
    );
    s
}

/// Assumptions and approximations.
fn notes(notes: &[String]) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "## Notes\n");
    for n in notes {
        let _ = writeln!(s, "- {n}");
    }
    s
}

/// What holds for every design: the limits of the models.
fn general_cautions() -> String {
    [
        "\n## Cautions\n\n",
        "- These are estimates from models; measure a prototype before relying on them.\n",
        "- Copper thickness, trace width and dielectric vary from fab to fab (copper +-10 % is common): check your fab's stack-up.\n",
        "- Above about 80 C a coil burns skin on touch, and adhesives and dielectrics age; keep well below the dielectric's rating.\n",
        "- Heating assumes the board lies flat in its surroundings (still air, moving air or still water as the design says); an enclosure, a heat sink or nearby parts change it a lot.\n",
    ]
    .concat()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::{BoardKind, Wiring};

    fn report_of(d: &Design) -> (Board, Analysis) {
        let board = crate::geometry::build(d).expect("sample builds");
        let a = crate::physics::analyse(d, &board).expect("sample analyses");
        (board, a)
    }

    /// The design line of the report (the first line after the title).
    fn summary(md: &str) -> &str {
        md.lines().nth(2).unwrap_or("")
    }

    #[test]
    fn summary_rounds_turns_and_says_wiring_and_board_in_words() {
        let mut d = Design::sample();
        d.coil.turns = 15.24550251162513;
        d.coil.layers = 2;
        d.coil.wiring = Wiring::ParallelPairs;
        d.stackup.kind = BoardKind::Rigid;
        d.stackup.copper = vec![0.035; 2];
        d.stackup.dielectric = vec![1.5];
        let (board, _) = report_of(&Design::sample());
        let line = heading(&d, &board);
        assert!(line.contains("15.25 turns per layer"), "{line}");
        assert!(!line.contains("15.2455"), "{line}");
        assert!(
            line.contains("parallel pairs wiring, rigid board"),
            "{line}"
        );
        assert!(line.contains("2 layers"), "{line}");
        let (board, a) = report_of(&Design::sample());
        let md = markdown(&Design::sample(), &board, &a);
        assert!(summary(&md).contains("series wiring, flex board"), "{md}");
        assert!(!md.contains("Series") && !md.contains("Flex board"), "{md}");
    }

    #[test]
    fn rectangle_is_described_by_width_and_height() {
        let mut d = Design::sample();
        d.coil.shape = Shape::Rectangle {
            width: 24.0,
            height: 12.0,
        };
        d.coil.outer_diameter = 24f64.hypot(12.0);
        d.coil.inner_diameter = 4.0;
        d.coil.turns = 8.0;
        let (board, a) = report_of(&d);
        let md = markdown(&d, &board, &a);
        let line = summary(&md);
        assert!(line.starts_with("rectangle 24.000 x 12.000 mm,"), "{line}");
        assert!(!md.contains("26.833"), "the diagonal is not a size: {md}");
        let copper = board.copper_bounds();
        let extent = format!("{:.2} x {:.2} mm", copper.width(), copper.height());
        assert!(md.contains(&extent), "{extent} missing: {md}");
    }

    #[test]
    fn displayed_numbers_have_no_long_tails() {
        let mut d = Design::sample();
        d.drive.frequency = Some(130e3);
        let (board, a) = report_of(&d);
        let md = markdown(&d, &board, &a);
        assert!(md.contains("at 130 kHz:"), "{md}");
        // No number with more than 6 significant digits (the summary line
        // once said 15.24550251162513).
        let long = md
            .split(|c: char| !(c.is_ascii_digit() || c == '.'))
            .filter(|w| w.contains('.'))
            .map(|w| w.replace('.', "").trim_start_matches('0').len())
            .max();
        assert!(long.unwrap_or(0) <= 6, "{md}");
    }

    #[test]
    fn numbers_round_to_significant_digits_with_prefixes() {
        assert_eq!(sig(0.38481, 4), "0.3848");
        assert_eq!(sig(2886.4, 4), "2886");
        assert_eq!(sig(9.99996, 4), "10.00");
        assert_eq!(si(12.83e-6, "H"), "12.83 uH");
        assert_eq!(si(0.12, "A"), "120.0 mA");
        assert_eq!(si(0.99999, "V"), "1.000 V");
        assert_eq!(si_given(130e3, "Hz"), "130 kHz");
        assert_eq!(si_given(0.12, "A"), "120 mA");
        assert_eq!(si_given(5.0, "V"), "5 V");
        assert_eq!(millinewton(6.562e-4, ""), "0.6562 mN");
        assert_eq!(mm(0.6), "0.6 mm");
    }

    #[test]
    fn force_plot_marks_the_design_gap() {
        let d = Design::sample();
        let gap = d.magnet.expect("the sample has a magnet").gap;
        let (board, a) = report_of(&d);
        let plots = plots(&d, &board, &a);
        let (_, _, svg) = plots
            .iter()
            .find(|p| p.0 == "force_gap.svg")
            .expect("a force plot");
        assert!(
            svg.contains(&format!("design gap {}:", mm(gap))),
            "no gap label: {svg}"
        );
        // The marker line and the operating-point dot share one x, and that
        // x sits where the gap falls between the first and last gap ticks.
        let marker_x = svg
            .lines()
            .find(|l| l.starts_with("<line") && l.contains(super::super::plot::MARKER_COLOUR))
            .and_then(|l| attr(l, "x1"))
            .expect("a marker line");
        let dot = svg
            .lines()
            .find(|l| l.starts_with("<circle"))
            .expect("an operating-point dot");
        assert_eq!(attr(dot, "cx"), Some(marker_x));
        let m = a.magnet.as_ref().expect("a magnet report");
        let (g0, g1) = (
            m.force_vs_gap.first().unwrap().gap_mm,
            m.force_vs_gap.last().unwrap().gap_mm,
        );
        let axis = super::super::plot::Axis::nice(g0.min(gap), g1.max(gap), 8);
        let want = 78.0 + (gap - axis.lo) / (axis.hi - axis.lo) * (640.0 - 78.0 - 20.0);
        assert!((marker_x - want).abs() < 0.01, "{marker_x} vs {want}");
    }

    fn attr(line: &str, name: &str) -> Option<f64> {
        let start = line.find(&format!(" {name}=\""))? + name.len() + 3;
        line[start..].split('"').next()?.parse().ok()
    }
}
