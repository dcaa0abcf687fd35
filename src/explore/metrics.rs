//! The metrics a sweep can require, rank and plot: every number of the
//! report (JSON names; nested objects joined with '.'), plus values derived
//! from the design itself.
//!
//! Derived metrics (from the design, not the analysis):
//! `outer_diameter_mm`, `inner_diameter_mm`, `turns` (per layer),
//! `total_turns` (turns x layers in series, x layers/2 in parallel pairs),
//! `layers`, `trace_width_mm`, `clearance_mm`, `ambient_c`,
//! `max_temperature_c` (the design's limit), `board_width_mm` and
//! `board_height_mm` (size of the board outline), `rule_errors`, `rule_warnings`.

use crate::design::{Design, Wiring};
use crate::geometry::Board;
use crate::rules::{Severity, Violation};
use std::collections::BTreeMap;

/// Flattens the numbers of a JSON value into `out` under `prefix`.
fn flatten(prefix: &str, v: &serde_json::Value, out: &mut BTreeMap<String, f64>) {
    match v {
        serde_json::Value::Number(n) => {
            if let Some(x) = n.as_f64() {
                out.insert(prefix.to_string(), x);
            }
        }
        serde_json::Value::Bool(b) => {
            out.insert(prefix.to_string(), f64::from(u8::from(*b)));
        }
        serde_json::Value::Object(m) => {
            for (k, x) in m {
                let key = if prefix.is_empty() {
                    k.clone()
                } else {
                    format!("{prefix}.{k}")
                };
                flatten(&key, x, out);
            }
        }
        _ => {}
    }
}

/// All metrics of one evaluated design.
pub fn metrics(
    design: &Design,
    layout: &Board,
    violations: &[Violation],
    analysis: &serde_json::Value,
) -> BTreeMap<String, f64> {
    let mut m = BTreeMap::new();
    flatten("", analysis, &mut m);
    let c = &design.coil;
    let series = match c.wiring {
        Wiring::Series => f64::from(c.layers),
        Wiring::ParallelPairs => f64::from(c.layers) / 2.0,
    };
    let crate::geometry::Rect { min: lo, max: hi } = layout.outline_bounds();
    for (k, v) in [
        ("outer_diameter_mm", c.outer_diameter),
        ("inner_diameter_mm", c.inner_diameter),
        ("turns", c.turns),
        ("total_turns", c.turns * series),
        ("layers", f64::from(c.layers)),
        ("trace_width_mm", c.trace_width),
        ("clearance_mm", c.clearance),
        ("ambient_c", design.drive.ambient),
        ("max_temperature_c", design.drive.max_temperature),
        ("board_width_mm", hi.x - lo.x),
        ("board_height_mm", hi.y - lo.y),
        (
            "rule_errors",
            violations
                .iter()
                .filter(|v| v.severity == Severity::Error)
                .count() as f64,
        ),
        (
            "rule_warnings",
            violations
                .iter()
                .filter(|v| v.severity == Severity::Warning)
                .count() as f64,
        ),
    ] {
        m.entry(k.to_string()).or_insert(v);
    }
    m
}
