//! The drive over time: the current of a series R-L load (the coil at its
//! operating resistance) under the design's waveform, over one period in
//! its periodic steady state; peak, RMS, mean, average power, harmonics and
//! the force on the magnet per harmonic.
//!
//! * Square and pulse drives are piecewise constant: on each piece the
//!   current of a series R-L load under a voltage step is
//!   `i(t) = V/R + (i0 - V/R) exp(-t/tau)`, `tau = L/R` (textbook first-order
//!   step response). The periodic state follows from composing the pieces
//!   (`i(T) = a i(0) + b`, so `i(0) = b / (1 - a)`), and the mean and RMS
//!   from the exact integrals of the exponentials.
//! * Sine: the phasor `I = V / (R + j w L)`.
//! * A current source imposes its waveform exactly (an ideal source; its
//!   voltage follows `L di/dt` at the edges).
//! * Harmonics: a pulse train of duty `D` between levels 0 and 1 has
//!   Fourier amplitudes `2/(n pi) |sin(n pi D)|` (textbook Fourier series;
//!   `4/(n pi)` for odd `n` of a bipolar square of duty one half); each
//!   voltage harmonic drives `V_n / |R + j n w L|`.
//!
//! [`analyse`] is the analysis phase ([`DriveReport`]).

use crate::design::{Drive, Source, Waveform};
use serde::Serialize;
use std::f64::consts::PI;

/// How many harmonics the report lists at most (non-zero ones).
const HARMONICS: usize = 8;

/// The drive's shape, amplitude and timing, as the circuit sees it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Wave {
    /// Amplitude: voltage or current source (peak for a sine).
    pub source: Source,
    /// Shape over time.
    pub waveform: Waveform,
    /// Repetition rate, Hz (unused for dc).
    pub frequency: f64,
    /// Fraction of the period on (square and pulse).
    pub duty: f64,
    /// Square: reverse instead of off.
    pub bipolar: bool,
}

impl From<Source> for Wave {
    fn from(source: Source) -> Wave {
        Wave {
            source,
            waveform: Waveform::Dc,
            frequency: 0.0,
            duty: 1.0,
            bipolar: false,
        }
    }
}

impl Wave {
    /// The wave of a design's drive.
    pub fn of(d: &Drive) -> Wave {
        Wave {
            source: d.source,
            waveform: d.waveform,
            frequency: d.frequency.unwrap_or(0.0),
            duty: d.duty,
            bipolar: d.bipolar,
        }
    }

    /// The source's amplitude, V or A.
    pub fn amplitude(&self) -> f64 {
        match self.source {
            Source::Voltage(v) => v,
            Source::Current(i) => i,
        }
    }

    /// The same wave with another amplitude (same kind of source).
    pub fn with_amplitude(&self, x: f64) -> Wave {
        let source = match self.source {
            Source::Voltage(_) => Source::Voltage(x),
            Source::Current(_) => Source::Current(x),
        };
        Wave { source, ..*self }
    }

    /// Piecewise-constant drives as (fraction of the period, level in
    /// units of the amplitude); `None` for a sine.
    fn pieces(&self) -> Option<Vec<(f64, f64)>> {
        let d = self.duty.clamp(0.0, 1.0);
        match self.waveform {
            Waveform::Sine => None,
            Waveform::Dc => Some(vec![(1.0, 1.0)]),
            _ if d >= 1.0 => Some(vec![(1.0, 1.0)]),
            Waveform::Square if self.bipolar => Some(vec![(d, 1.0), (1.0 - d, -1.0)]),
            Waveform::Square | Waveform::Pulse => Some(vec![(d, 1.0), (1.0 - d, 0.0)]),
        }
    }

    /// The current over one period in the periodic steady state, for a
    /// coil of resistance `r` (ohm) and inductance `l` (H).
    pub fn solve(&self, r: f64, l: f64) -> Period {
        let amp = self.amplitude();
        let period = if self.frequency > 0.0 {
            1.0 / self.frequency
        } else {
            1.0
        };
        let tau = if r > 0.0 { l / r } else { 0.0 };
        let Some(pieces) = self.pieces() else {
            let w = 2.0 * PI * self.frequency;
            let (i_amp, phase) = match self.source {
                Source::Voltage(v) => (v / r.hypot(w * l), (w * l).atan2(r)),
                Source::Current(i) => (i, 0.0),
            };
            return Period {
                period,
                tau,
                form: Form::Sine { i_amp, phase },
            };
        };
        let segs: Vec<Seg> = match self.source {
            Source::Current(i) => pieces
                .iter()
                .map(|&(f, lev)| Seg {
                    dur: f * period,
                    target: lev * i,
                    start: lev * i,
                    tau: 0.0,
                })
                .collect(),
            Source::Voltage(v) => {
                // Compose i_end = a i0 + b over the period.
                let decay = |dur: f64| if tau > 0.0 { (-dur / tau).exp() } else { 0.0 };
                let (mut a, mut b) = (1.0, 0.0);
                for &(f, lev) in &pieces {
                    let e = decay(f * period);
                    let target = lev * v / r;
                    a *= e;
                    b = b * e + target * (1.0 - e);
                }
                let mut i0 = if a < 1.0 { b / (1.0 - a) } else { v / r };
                let mut segs = Vec::new();
                for &(f, lev) in &pieces {
                    let target = lev * v / r;
                    let dur = f * period;
                    segs.push(Seg {
                        dur,
                        target,
                        start: i0,
                        tau,
                    });
                    i0 = target + (i0 - target) * decay(dur);
                }
                segs
            }
        };
        let _ = amp;
        Period {
            period,
            tau,
            form: Form::Pieces(segs),
        }
    }

    /// Average power in a coil of resistance `r` (ohm) and inductance `l`
    /// (H), W: `r` times the square of the RMS current.
    pub fn power(&self, r: f64, l: f64) -> f64 {
        match self.power_without_inductance(r) {
            Some(p) => p,
            None => {
                let p = self.solve(r, l);
                r * p.rms() * p.rms()
            }
        }
    }

    /// Whether the average power, the heating or the drive's limits
    /// depend on the coil's inductance: only a steady drive's do not (a
    /// current source imposes its waveform, but the limits also ask for
    /// the largest voltage, which an inductance smooths).
    pub fn power_needs_inductance(&self) -> bool {
        [Source::Voltage(1.0), Source::Current(1.0)]
            .into_iter()
            .any(|source| {
                Wave { source, ..*self }
                    .power_without_inductance(1.0)
                    .is_none()
            })
    }

    /// The closed forms of [`Wave::power`] that need no inductance.
    fn power_without_inductance(&self, r: f64) -> Option<f64> {
        let on = match self.source {
            Source::Voltage(v) => v * v / r,
            Source::Current(i) => i * i * r,
        };
        let d = self.duty.clamp(0.0, 1.0);
        match (self.waveform, self.source) {
            (Waveform::Dc, _) => Some(on),
            (Waveform::Sine, Source::Current(_)) => Some(on / 2.0),
            (Waveform::Square, Source::Current(_)) if self.bipolar => Some(on),
            (Waveform::Square | Waveform::Pulse, Source::Current(_)) => Some(on * d),
            _ => None,
        }
    }

    /// The current's Fourier components `n = 1, 2, ...` up to `n_max` as
    /// (n, amplitude A) for a coil of `r` ohm and `l` H; zero components
    /// left out.
    pub fn harmonics(&self, r: f64, l: f64, n_max: usize) -> Vec<(usize, f64)> {
        let w = 2.0 * PI * self.frequency;
        let amp = self.amplitude();
        let z = |n: usize| match self.source {
            Source::Voltage(_) => r.hypot(n as f64 * w * l),
            Source::Current(_) => 1.0,
        };
        let d = self.duty.clamp(0.0, 1.0);
        let mut out = Vec::new();
        for n in 1..=n_max {
            let level = match self.waveform {
                Waveform::Dc => 0.0,
                Waveform::Sine => {
                    if n == 1 {
                        1.0
                    } else {
                        0.0
                    }
                }
                Waveform::Square | Waveform::Pulse => {
                    let swing = if self.bipolar && self.waveform == Waveform::Square {
                        2.0
                    } else {
                        1.0
                    };
                    swing * 2.0 / (n as f64 * PI) * (n as f64 * PI * d).sin().abs()
                }
            };
            if level > 1e-9 {
                out.push((n, level * amp / z(n)));
            }
        }
        out
    }
}

/// One constant-drive piece of a period: `i(t) = target + (start -
/// target) exp(-t/tau)` for `0 <= t < dur`.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Seg {
    dur: f64,
    target: f64,
    start: f64,
    tau: f64,
}

impl Seg {
    fn decay(&self, t: f64) -> f64 {
        if self.tau > 0.0 {
            (-t / self.tau).exp()
        } else {
            0.0
        }
    }

    fn at(&self, t: f64) -> f64 {
        self.target + (self.start - self.target) * self.decay(t)
    }

    /// Integrals of i and i^2 over the piece (exact).
    fn integrals(&self) -> (f64, f64) {
        let (a, b, d) = (self.target, self.start - self.target, self.dur);
        if self.tau <= 0.0 {
            return (a * d, a * a * d);
        }
        let t = self.tau;
        let e1 = 1.0 - self.decay(d);
        let e2 = 1.0 - self.decay(2.0 * d);
        (
            a * d + b * t * e1,
            a * a * d + 2.0 * a * b * t * e1 + b * b * t / 2.0 * e2,
        )
    }
}

#[derive(Debug, Clone, PartialEq)]
enum Form {
    Pieces(Vec<Seg>),
    Sine { i_amp: f64, phase: f64 },
}

/// The current over one period in the periodic steady state.
#[derive(Debug, Clone, PartialEq)]
pub struct Period {
    /// Period, s.
    pub period: f64,
    /// L/R time constant, s.
    pub tau: f64,
    form: Form,
}

impl Period {
    /// The current at time `t` (s) into the period, A.
    pub fn at(&self, t: f64) -> f64 {
        let t = t.rem_euclid(self.period);
        match &self.form {
            Form::Sine { i_amp, phase } => i_amp * (2.0 * PI * t / self.period - phase).sin(),
            Form::Pieces(segs) => {
                let mut t0 = 0.0;
                for s in segs {
                    if t < t0 + s.dur {
                        return s.at(t - t0);
                    }
                    t0 += s.dur;
                }
                let s = segs.last().expect("a period has pieces");
                s.at(s.dur)
            }
        }
    }

    /// RMS current, A.
    pub fn rms(&self) -> f64 {
        match &self.form {
            Form::Sine { i_amp, .. } => i_amp / 2f64.sqrt(),
            Form::Pieces(segs) => {
                let sq: f64 = segs.iter().map(|s| s.integrals().1).sum();
                (sq / self.period).max(0.0).sqrt()
            }
        }
    }

    /// Mean current, A.
    pub fn mean(&self) -> f64 {
        match &self.form {
            Form::Sine { .. } => 0.0,
            Form::Pieces(segs) => segs.iter().map(|s| s.integrals().0).sum::<f64>() / self.period,
        }
    }

    /// Largest and smallest current over the period, A (each piece is
    /// monotonic, so its ends bound it).
    pub fn range(&self) -> (f64, f64) {
        match &self.form {
            Form::Sine { i_amp, .. } => (-i_amp, *i_amp),
            Form::Pieces(segs) => segs
                .iter()
                .flat_map(|s| [s.start, s.at(s.dur)])
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), x| {
                    (lo.min(x), hi.max(x))
                }),
        }
    }

    /// Largest magnitude of the current, A.
    pub fn peak(&self) -> f64 {
        let (lo, hi) = self.range();
        lo.abs().max(hi.abs())
    }
}

/// One harmonic of the current and the force it drives.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Harmonic {
    /// Order (1 = the drive frequency).
    pub n: usize,
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// Current amplitude, A.
    pub current_a: f64,
    /// Force amplitude on the magnet, N (when there is a magnet).
    pub force_n: Option<f64>,
}

/// One point of the current over time.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TimePoint {
    /// Time, s.
    pub t_s: f64,
    /// Value (A for current, C for temperature).
    pub value: f64,
}

/// The drive over time (report.json's `drive` object; the headline
/// numbers also at the top level).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DriveReport {
    /// `dc`, `square`, `sine` or `pulse`.
    pub waveform: Waveform,
    /// Repetition rate, Hz (`None` for dc).
    pub frequency_hz: Option<f64>,
    /// Fraction of the period on.
    pub duty: f64,
    /// Whether a square wave reverses instead of switching off.
    pub bipolar: bool,
    /// L/R time constant at the operating temperature, s.
    pub l_over_r_s: f64,
    /// RMS current, A.
    pub current_rms_a: f64,
    /// Largest magnitude of the current, A.
    pub current_peak_a: f64,
    /// Mean current (what a DC meter shows), A.
    pub current_mean_a: f64,
    /// Average power at the operating temperature, W.
    pub power_avg_w: f64,
    /// Mean force on the magnet, N (with a magnet).
    pub force_mean_n: Option<f64>,
    /// The current's harmonics (non-zero ones, at most 8 of the first 15).
    pub harmonics: Vec<Harmonic>,
    /// The current over two periods (full detail only).
    pub current_curve: Vec<TimePoint>,
}

/// The drive phase of the analysis: the current of the coil (`r_hot` ohm
/// at its operating temperature, `l` H) under the design's waveform, and
/// the force per harmonic with a magnet (`force_per_a` N/A).
pub fn analyse(
    drive: &Drive,
    r_hot: f64,
    l: f64,
    force_per_a: Option<f64>,
    full: bool,
) -> DriveReport {
    let wave = Wave::of(drive);
    let p = wave.solve(r_hot, l);
    let rms = p.rms();
    let harmonics = wave
        .harmonics(r_hot, l, 15)
        .into_iter()
        .take(HARMONICS)
        .map(|(n, a)| Harmonic {
            n,
            frequency_hz: n as f64 * wave.frequency,
            current_a: a,
            force_n: force_per_a.map(|f| f * a),
        })
        .collect();
    let curve = if full && wave.waveform != Waveform::Dc {
        let n = 400;
        (0..=n)
            .map(|k| {
                let t = 2.0 * p.period * k as f64 / n as f64;
                TimePoint {
                    t_s: t,
                    value: p.at(t),
                }
            })
            .collect()
    } else {
        Vec::new()
    };
    DriveReport {
        waveform: wave.waveform,
        frequency_hz: (wave.waveform != Waveform::Dc).then_some(wave.frequency),
        duty: wave.duty,
        bipolar: wave.bipolar,
        l_over_r_s: p.tau,
        current_rms_a: rms,
        current_peak_a: p.peak(),
        current_mean_a: p.mean(),
        power_avg_w: rms * rms * r_hot,
        force_mean_n: force_per_a.map(|f| f * p.mean()),
        harmonics,
        current_curve: curve,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn square(source: Source, f: f64, duty: f64, bipolar: bool) -> Wave {
        Wave {
            source,
            waveform: Waveform::Square,
            frequency: f,
            duty,
            bipolar,
        }
    }

    #[test]
    fn unipolar_square_rms_is_i_sqrt_duty() {
        // RMS of an on/off square of duty D and height I is I sqrt(D)
        // (definition of RMS); a current source imposes it exactly.
        for d in [0.1, 0.25, 0.5, 0.9] {
            let p = square(Source::Current(0.4), 10.0, d, false).solve(3.0, 1e-3);
            assert!((p.rms() - 0.4 * d.sqrt()).abs() < 1e-12, "{d}");
            assert!((p.mean() - 0.4 * d).abs() < 1e-12);
            assert!((p.peak() - 0.4).abs() < 1e-12);
        }
        // A voltage source with L/R far below the period: the same to
        // within the rise (tau/T = 1e-6).
        let p = square(Source::Voltage(3.0), 1.0, 0.3, false).solve(3.0, 3e-6);
        assert!((p.rms() - 0.3f64.sqrt()).abs() < 1e-5, "{}", p.rms());
    }

    #[test]
    fn series_rl_square_matches_textbook_closed_form() {
        // Series RL under a 50 % unipolar square wave (textbook, e.g.
        // Hayt & Kemmerly, Engineering Circuit Analysis, first-order
        // circuits): periodic state i_max = (V/R) / (1 + exp(-T/(2 tau))),
        // i_min = i_max exp(-T/(2 tau)).
        let (v, r, l, f) = (5.0, 10.0, 10e-3, 100.0);
        let p = square(Source::Voltage(v), f, 0.5, false).solve(r, l);
        let tau = l / r;
        let x = (-(0.5 / f) / tau).exp();
        let i_max = v / r / (1.0 + x);
        let (lo, hi) = p.range();
        assert!((hi - i_max).abs() < 1e-12, "{hi} {i_max}");
        assert!((lo - i_max * x).abs() < 1e-12);
        // Mean of a 50 % square through any linear load: V/(2R).
        assert!((p.mean() - v / (2.0 * r)).abs() < 1e-12);
        // RMS against a fine numerical integral of the same curve.
        let n = 200_000;
        let sq: f64 = (0..n)
            .map(|k| p.at((k as f64 + 0.5) / n as f64 / f).powi(2))
            .sum::<f64>()
            / n as f64;
        assert!((p.rms() - sq.sqrt()).abs() < 1e-9);
    }

    #[test]
    fn step_response_from_rest() {
        // A very long on-time: the current reaches V/R and the first
        // piece starts from the decayed off state, i(t) = V/R (1 - e^-t/tau)
        // to within e^-(T/2)/tau (textbook step response).
        let (v, r, l) = (2.0, 4.0, 4e-3);
        let p = square(Source::Voltage(v), 1.0, 0.5, false).solve(r, l);
        let tau = l / r;
        for t in [tau / 2.0, tau, 3.0 * tau] {
            let exact = v / r * (1.0 - (-t / tau).exp());
            assert!((p.at(t) - exact).abs() < 1e-12, "{t}");
        }
    }

    #[test]
    fn square_harmonics_are_4_over_n_pi() {
        // Fourier series of a bipolar square wave of duty 1/2 (textbook):
        // odd harmonics 4/(n pi), even ones zero. Unipolar: half of that.
        let w = square(Source::Current(1.0), 50.0, 0.5, true);
        let h = w.harmonics(1.0, 0.0, 9);
        let ns: Vec<usize> = h.iter().map(|x| x.0).collect();
        assert_eq!(ns, [1, 3, 5, 7, 9]);
        for (n, a) in h {
            assert!((a - 4.0 / (n as f64 * PI)).abs() < 1e-12);
        }
        let u = square(Source::Current(1.0), 50.0, 0.5, false).harmonics(1.0, 0.0, 3);
        assert!((u[0].1 - 2.0 / PI).abs() < 1e-12);
        // Parseval: mean^2 + sum(a_n^2 / 2) = RMS^2 for the unipolar wave
        // of duty 0.3 (enough harmonics for 1e-3).
        let w = square(Source::Current(1.0), 50.0, 0.3, false);
        let h = w.harmonics(1.0, 0.0, 20_000);
        let p = w.solve(1.0, 0.0);
        let s = p.mean().powi(2) + h.iter().map(|x| x.1 * x.1 / 2.0).sum::<f64>();
        assert!((s - p.rms().powi(2)).abs() < 1e-4, "{s}");
    }

    #[test]
    fn sine_is_the_phasor() {
        // |I| = V / sqrt(R^2 + (w L)^2) (phasor, textbook).
        let w = Wave {
            source: Source::Voltage(1.0),
            waveform: Waveform::Sine,
            frequency: 1000.0,
            duty: 1.0,
            bipolar: false,
        };
        let (r, l) = (2.0, 1e-3);
        let p = w.solve(r, l);
        let amp = 1.0 / (r * r + (2.0 * PI * 1000.0 * l).powi(2)).sqrt();
        assert!((p.peak() - amp).abs() < 1e-12);
        assert!((p.rms() - amp / 2f64.sqrt()).abs() < 1e-12);
        assert!((w.power(r, l) - r * amp * amp / 2.0).abs() < 1e-12);
    }
}
