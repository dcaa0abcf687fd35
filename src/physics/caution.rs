//! Cautions: what the analysis found that a person must hear about, as
//! data. Each [`Caution`] carries its numbers and says whether a limit the
//! design sets for itself is exceeded or it is advice ([`CautionKind`]); it
//! becomes text only where it is shown ([`Caution`]'s `Display`, used by
//! the report and the command line).
//!
//! The phases of the analysis add cautions and notes to one [`Findings`]
//! in the order they run, so the limits of the design (found by the
//! heating phase, which runs first) come first.

use crate::design::BendKind;
use std::fmt;

/// Whether a caution means the design exceeds a limit of its own or is
/// advice.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CautionKind {
    /// A limit the design file sets for itself (today `drive.max_temperature`)
    /// is exceeded at the drive.
    LimitExceeded,
    /// Advice: common practice is not met, or a result deserves distrust;
    /// the design's own limits hold.
    Advice,
}

/// One caution from the analysis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Caution {
    /// No steady temperature exists below the hottest temperature the
    /// solver searches: at the drive the copper keeps heating until it
    /// burns out (thermal runaway).
    NoSteadyState {
        /// Hottest temperature searched, C.
        ceiling_c: f64,
    },
    /// The steady temperature at the drive is above the design's
    /// `drive.max_temperature`.
    TemperatureAboveLimit {
        /// Predicted steady temperature, C.
        predicted_c: f64,
        /// The design's limit, C.
        limit_c: f64,
    },
    /// The operating temperature is above about 80 C (common practice):
    /// hot enough to burn skin, and dielectrics and adhesives age.
    HotToTouch {
        /// Operating temperature, C.
        temperature_c: f64,
    },
    /// The two force methods (coaxial rings, real conductor) disagree by
    /// more than 5 % on a shape where they should agree: the force is
    /// rough.
    ForceRough {
        /// `|A - B| / |A|` (fraction, not percent).
        difference: f64,
    },
    /// The design's bend radius (`stackup.bend_radius`) is below the
    /// minimum that the common bend ratios give for the board's thickness.
    BendTooTight {
        /// The design's bend radius, mm.
        radius_mm: f64,
        /// Minimum radius for this kind of bend, mm.
        minimum_mm: f64,
        /// Bent once or repeatedly.
        bend: BendKind,
        /// Finished board thickness, mm.
        thickness_mm: f64,
    },
    /// A flex board that bends repeatedly with more than two copper layers
    /// in the bend: most fabs advise one or two (common practice, no
    /// source), as the outer layers crack first.
    DynamicBendManyLayers {
        /// Copper layers in the bending zone.
        layers: usize,
    },
    /// The fin has no stable position: the mean force attracts and grows
    /// faster than the fin's stiffness as the gap closes (pull-in).
    FinPulledIn {
        /// Gap at rest, mm.
        gap_mm: f64,
    },
    /// The fin's swing (static deflection plus every harmonic's amplitude)
    /// reaches the gap: the coil would strike the magnet, and the linear
    /// estimate of the swing no longer holds.
    SwingReachesGap {
        /// Largest swing, mm.
        swing_mm: f64,
        /// Gap at rest, mm.
        gap_mm: f64,
    },
    /// The drive frequency is above the coil's self-resonance, or within
    /// a third of it (the fraction is common practice, no source): the
    /// coil no longer behaves as an inductor (the self-capacitance carries
    /// current, Q and the reactance fall).
    NearSelfResonance {
        /// Drive frequency, Hz.
        frequency_hz: f64,
        /// Self-resonant frequency, Hz.
        self_resonance_hz: f64,
    },
    /// The rotor's `torque` needs more copper loss than the board sheds with
    /// its hottest copper at `drive.max_temperature`.
    TorqueAboveLimit {
        /// The design's torque, N m.
        torque_n_m: f64,
        /// Largest continuous torque, N m.
        limit_n_m: f64,
        /// The design's max_temperature, C.
        max_temperature_c: f64,
    },
}

/// The fraction of the self-resonance above which a working frequency
/// draws [`Caution::NearSelfResonance`] (common practice, no source).
pub const RESONANCE_MARGIN: f64 = 1.0 / 3.0;

impl Caution {
    /// Whether this caution is a limit of the design exceeded.
    pub fn is_limit(&self) -> bool {
        self.kind() == CautionKind::LimitExceeded
    }

    /// A stable id for scripts (`check --json`), e.g. "max-temperature".
    pub fn id(&self) -> &'static str {
        match self {
            Caution::NoSteadyState { .. } => "thermal-runaway",
            Caution::TemperatureAboveLimit { .. } => "max-temperature",
            Caution::HotToTouch { .. } => "hot-to-touch",
            Caution::ForceRough { .. } => "force-rough",
            Caution::BendTooTight { .. } => "bend-too-tight",
            Caution::DynamicBendManyLayers { .. } => "dynamic-bend-layers",
            Caution::FinPulledIn { .. } => "fin-pulled-in",
            Caution::SwingReachesGap { .. } => "swing-reaches-gap",
            Caution::NearSelfResonance { .. } => "near-self-resonance",
            Caution::TorqueAboveLimit { .. } => "torque-above-limit",
        }
    }

    /// Whether the caution is a limit of the design exceeded or advice.
    pub fn kind(&self) -> CautionKind {
        match self {
            Caution::NoSteadyState { .. }
            | Caution::TemperatureAboveLimit { .. }
            | Caution::TorqueAboveLimit { .. } => CautionKind::LimitExceeded,
            Caution::HotToTouch { .. }
            | Caution::ForceRough { .. }
            | Caution::BendTooTight { .. }
            | Caution::DynamicBendManyLayers { .. }
            | Caution::FinPulledIn { .. }
            | Caution::SwingReachesGap { .. }
            | Caution::NearSelfResonance { .. } => CautionKind::Advice,
        }
    }
}

/// The two force methods' disagreement as the start of a sentence (shared
/// by [`Caution::ForceRough`] and the note for rectangles, where the
/// disagreement is expected).
pub(crate) fn force_methods_differ(difference: f64) -> String {
    format!(
        "the two force methods differ by {:.1} % (coaxial-ring model vs real conductor)",
        100.0 * difference
    )
}

impl fmt::Display for Caution {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Caution::NoSteadyState { ceiling_c } => write!(
                f,
                "no steady temperature below {ceiling_c:.0} C at the drive: the coil would overheat and burn out"
            ),
            Caution::TemperatureAboveLimit {
                predicted_c,
                limit_c,
            } => write!(
                f,
                "temperature {predicted_c:.0} C exceeds max_temperature {limit_c:.0} C at the drive"
            ),
            Caution::HotToTouch { temperature_c } => write!(
                f,
                "{temperature_c:.0} C is above about 80 C: burns to the touch and ageing of the dielectric and adhesive (common practice)"
            ),
            Caution::ForceRough { difference } => write!(
                f,
                "{}: treat the force as rough",
                force_methods_differ(difference)
            ),
            Caution::BendTooTight {
                radius_mm,
                minimum_mm,
                bend,
                thickness_mm,
            } => write!(
                f,
                "bend radius {radius_mm:.2} mm is below the {minimum_mm:.2} mm minimum for {} bending of a {thickness_mm:.3} mm board (ratios quoted from IPC-2223, common practice)",
                match bend {
                    BendKind::Static => "static",
                    BendKind::Dynamic => "dynamic",
                }
            ),
            Caution::DynamicBendManyLayers { layers } => write!(
                f,
                "{layers} copper layers bend repeatedly (bend = \"dynamic\"): most fabs advise one or two copper layers in a dynamic bending zone (common practice, no source)"
            ),
            Caution::FinPulledIn { gap_mm } => write!(
                f,
                "the fin has no stable position: the magnet's mean pull grows faster than the fin's stiffness and closes the {gap_mm} mm gap (pull-in); stiffen the fin, widen the gap or reverse the drive's mean"
            ),
            Caution::SwingReachesGap { swing_mm, gap_mm } => write!(
                f,
                "the fin swings up to {swing_mm:.2} mm, as much as the {gap_mm} mm gap: the coil would strike the magnet, and the linear swing estimate no longer holds"
            ),
            Caution::NearSelfResonance {
                frequency_hz,
                self_resonance_hz,
            } => {
                let (ff, fs) = (frequency_hz / 1e6, self_resonance_hz / 1e6);
                if frequency_hz >= self_resonance_hz {
                    write!(
                        f,
                        "the drive frequency {ff:.4} MHz is above the self-resonance {fs:.4} MHz: the coil acts as a capacitor there"
                    )
                } else {
                    write!(
                        f,
                        "the drive frequency {ff:.4} MHz is above a third of the self-resonance {fs:.4} MHz (staying below a third is common practice, no source): the self-capacitance lowers Q and shifts the reactance"
                    )
                }
            }
            Caution::TorqueAboveLimit {
                torque_n_m,
                limit_n_m,
                max_temperature_c,
            } => write!(
                f,
                "rotor torque {:.3} mN m exceeds the {:.3} mN m the board gives continuously with its hottest copper at max_temperature {max_temperature_c:.0} C",
                torque_n_m * 1e3,
                limit_n_m * 1e3
            ),
        }
    }
}

/// What the phases of the analysis found beside their numbers: cautions
/// and notes (assumptions and approximations, as text), each in the order
/// found.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Findings {
    /// Cautions.
    pub cautions: Vec<Caution>,
    /// Notes.
    pub notes: Vec<String>,
}

impl Findings {
    /// Adds a caution.
    pub fn caution(&mut self, c: Caution) {
        self.cautions.push(c);
    }

    /// Adds a note.
    pub fn note(&mut self, n: impl Into<String>) {
        self.notes.push(n.into());
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn limits_and_advice_are_told_apart() {
        let limit = Caution::TemperatureAboveLimit {
            predicted_c: 97.6,
            limit_c: 80.0,
        };
        assert_eq!(limit.kind(), CautionKind::LimitExceeded);
        assert_eq!(
            limit.to_string(),
            "temperature 98 C exceeds max_temperature 80 C at the drive"
        );
        let runaway = Caution::NoSteadyState { ceiling_c: 1000.0 };
        assert_eq!(runaway.kind(), CautionKind::LimitExceeded);
        let advice = [
            Caution::HotToTouch {
                temperature_c: 120.0,
            },
            Caution::ForceRough { difference: 0.073 },
            Caution::BendTooTight {
                radius_mm: 3.0,
                minimum_mm: 7.3,
                bend: BendKind::Static,
                thickness_mm: 0.365,
            },
        ];
        for a in advice {
            assert_eq!(a.kind(), CautionKind::Advice, "{a}");
        }
        assert_eq!(
            advice[1].to_string(),
            "the two force methods differ by 7.3 % (coaxial-ring model vs real conductor): treat the force as rough"
        );
    }
}
