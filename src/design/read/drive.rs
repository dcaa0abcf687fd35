//! `[drive]`: the source and the thermal environment.

use super::super::model::{Drive, Source, Surroundings, Waveform};
use super::super::units::{Current, Frequency, Speed, Temperature, Voltage};
use super::table::{Ctx, Sign, Table};

/// Current used when a design gives neither voltage nor current, A.
pub const DEFAULT_CURRENT_A: f64 = 0.1;

/// Reads `[drive]`.
pub(super) fn read(cx: &mut Ctx, t: &Table) -> Drive {
    let voltage = cx
        .quantity::<Voltage>(t, "voltage", Sign::Positive)
        .map(Voltage::volts);
    let current = cx
        .quantity::<Current>(t, "current", Sign::Positive)
        .map(Current::amperes);
    if t.has("voltage") && t.has("current") {
        cx.err(
            t.key("current"),
            t.span_of("current"),
            "give either voltage or current in [drive], not both",
            Some("a voltage source sets the current through the coil's resistance; keep one of the two".into()),
        );
    }
    let source = match (voltage, current) {
        (Some(v), _) => Source::Voltage(v),
        (None, Some(a)) => Source::Current(a),
        _ => Source::Current(DEFAULT_CURRENT_A),
    };
    let ambient = cx
        .quantity::<Temperature>(t, "ambient", Sign::Any)
        .map_or(25.0, Temperature::celsius);
    let max_temperature = cx
        .quantity::<Temperature>(t, "max_temperature", Sign::Any)
        .map_or(80.0, Temperature::celsius);
    if max_temperature <= ambient {
        let k = if t.has("max_temperature") {
            "max_temperature"
        } else {
            "ambient"
        };
        cx.err(
            t.key(k),
            t.span_of(k),
            format!("max_temperature ({max_temperature} C) must be above ambient ({ambient} C)"),
            None,
        );
    }
    let frequency = cx
        .quantity::<Frequency>(t, "frequency", Sign::Positive)
        .map(Frequency::hertz);
    let convection = cx.number(
        t,
        "convection",
        1e-3,
        1e6,
        "a heat transfer coefficient in W/(m^2 K) as a plain number, e.g. 10",
    );
    let emissivity = cx
        .number(
            t,
            "emissivity",
            0.0,
            1.0,
            "a plain number from 0 to 1, e.g. 0.9",
        )
        .unwrap_or(0.9);
    let waveform = match cx.choice(t, "waveform") {
        Some(1) => Waveform::Square,
        Some(2) => Waveform::Sine,
        Some(3) => Waveform::Pulse,
        _ => Waveform::Dc,
    };
    if waveform != Waveform::Dc && frequency.is_none() && !t.has("frequency") {
        cx.err(
            t.key("waveform"),
            t.span_of("waveform"),
            "a waveform other than \"dc\" needs drive.frequency",
            Some(
                "give frequency = \"5Hz\" (the waveform's repetition rate), or waveform = \"dc\""
                    .into(),
            ),
        );
    }
    let duty = match t.get("duty") {
        None => None,
        Some(v) => {
            let d = cx.number(
                t,
                "duty",
                f64::MIN,
                f64::MAX,
                "a fraction above 0 up to 1, e.g. 0.25",
            );
            match d {
                Some(d) if d > 0.0 && d <= 1.0 => Some(d),
                Some(d) => {
                    cx.err(
                        t.key("duty"),
                        Some(v.span()),
                        format!("{d} is out of range"),
                        Some("allowed: a fraction above 0 up to 1, e.g. 0.25".into()),
                    );
                    None
                }
                None => None,
            }
        }
    };
    if duty.is_some() && !matches!(waveform, Waveform::Square | Waveform::Pulse) {
        cx.err(
            t.key("duty"),
            t.span_of("duty"),
            "applies only to waveform = \"square\" or \"pulse\"",
            Some("remove duty, or choose a square or pulse waveform".into()),
        );
    }
    let bipolar = cx.switch(t, "bipolar").unwrap_or(false);
    if bipolar && waveform != Waveform::Square {
        cx.err(
            t.key("bipolar"),
            t.span_of("bipolar"),
            "applies only to waveform = \"square\"",
            Some("remove bipolar, or choose waveform = \"square\"".into()),
        );
    }
    let air_speed = cx
        .quantity::<Speed>(t, "air_speed", Sign::Positive)
        .map(Speed::metres_per_second);
    let surroundings = match cx.choice(t, "surroundings") {
        Some(1) => {
            if air_speed.is_none() && !t.has("air_speed") {
                cx.err(
                    t.key("surroundings"),
                    t.span_of("surroundings"),
                    "moving air needs drive.air_speed",
                    Some("give air_speed = \"1m/s\"".into()),
                );
            }
            Surroundings::MovingAir {
                air_speed_m_s: air_speed.unwrap_or(1.0),
            }
        }
        Some(2) => Surroundings::Water,
        _ => Surroundings::StillAir,
    };
    if t.has("air_speed") && !matches!(surroundings, Surroundings::MovingAir { .. }) {
        cx.err(
            t.key("air_speed"),
            t.span_of("air_speed"),
            "applies only to surroundings = \"moving-air\"",
            Some("set surroundings = \"moving-air\", or remove air_speed".into()),
        );
    }
    Drive {
        source,
        ambient,
        max_temperature,
        frequency,
        convection,
        emissivity,
        waveform,
        duty: duty.unwrap_or(if waveform == Waveform::Dc || waveform == Waveform::Sine {
            1.0
        } else {
            0.5
        }),
        bipolar,
        surroundings,
    }
}
