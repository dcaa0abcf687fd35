//! `[drive]`: the source and the thermal environment.

use super::super::model::{Drive, Source};
use super::super::units::{Current, Frequency, Temperature, Voltage};
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
    Drive {
        source,
        ambient,
        max_temperature,
        frequency,
        convection,
        emissivity,
    }
}
