//! `--require "METRIC OP NUMBER"`: a requirement on a report metric, e.g.
//! `temperature_c <= 80`, `force_n >= 0.01`, `outer_diameter_mm <= 20`.

use super::SweepError;
use std::collections::BTreeMap;

/// Comparison operator.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Op {
    /// `<=`
    Le,
    /// `>=`
    Ge,
    /// `<`
    Lt,
    /// `>`
    Gt,
    /// `==` (or `=`), within 1e-9 relative.
    Eq,
}

/// A parsed requirement.
#[derive(Debug, Clone, PartialEq)]
pub struct Requirement {
    /// Metric name (a report JSON key or a derived metric).
    pub metric: String,
    /// Operator.
    pub op: Op,
    /// Bound.
    pub value: f64,
    /// As typed, for messages.
    pub text: String,
}

impl Requirement {
    /// Parses `METRIC OP NUMBER`, checking the metric against `known`.
    pub fn parse(text: &str, known: &[String]) -> Result<Requirement, SweepError> {
        let ops = [
            ("<=", Op::Le),
            (">=", Op::Ge),
            ("==", Op::Eq),
            ("<", Op::Lt),
            (">", Op::Gt),
            ("=", Op::Eq),
        ];
        let bad = |message: &str| SweepError::BadRequirement {
            text: text.into(),
            message: message.into(),
        };
        let (pos, sym, op) = ops
            .iter()
            .filter_map(|(s, op)| text.find(s).map(|p| (p, *s, *op)))
            .min_by_key(|(p, s, _)| (*p, std::cmp::Reverse(s.len())))
            .ok_or_else(|| bad("expected METRIC OP NUMBER with OP one of <= >= < > =="))?;
        let metric = text[..pos].trim().to_string();
        let number = text[pos + sym.len()..].trim();
        check_metric(&metric, known)?;
        let value = bound(&metric, number).map_err(|m| bad(&m))?;
        Ok(Requirement {
            metric,
            op,
            value,
            text: text.trim().into(),
        })
    }

    /// Whether `metrics` satisfy this requirement; `None` when the metric is
    /// missing for this candidate.
    pub fn holds(&self, metrics: &BTreeMap<String, f64>) -> Option<bool> {
        let x = *metrics.get(&self.metric)?;
        Some(match self.op {
            Op::Le => x <= self.value,
            Op::Ge => x >= self.value,
            Op::Lt => x < self.value,
            Op::Gt => x > self.value,
            Op::Eq => (x - self.value).abs() <= 1e-9 * self.value.abs().max(1.0),
        })
    }
}

impl Requirement {
    /// How far `metrics` miss this requirement, relative to the bound
    /// (|value - bound| / |bound|; the absolute gap when the bound is 0);
    /// `None` when it holds, infinity when the metric is missing.
    pub fn shortfall(&self, metrics: &BTreeMap<String, f64>) -> Option<f64> {
        match self.holds(metrics) {
            Some(true) => None,
            None => Some(f64::INFINITY),
            Some(false) => {
                let x = metrics[&self.metric];
                let gap = (x - self.value).abs();
                Some(if self.value == 0.0 {
                    gap
                } else {
                    gap / self.value.abs()
                })
            }
        }
    }
}

/// The unit a metric is given in, from its name's suffix: (symbol, scale
/// of the symbol in the metric's unit). Lengths in `_mm` metrics and
/// temperatures in `_c` metrics have their own readers.
fn metric_unit(metric: &str) -> Option<&'static str> {
    const SUFFIXES: &[(&str, &str)] = &[
        ("_t_per_a", "T/A"),
        ("_n_per_a", "N/A"),
        ("_ohm_20c", "ohm"),
        ("_ohm_hot", "ohm"),
        ("_ohm_ac", "ohm"),
        ("_ohm", "ohm"),
        ("_hz", "Hz"),
        ("_h", "H"),
        ("_a", "A"),
        ("_v", "V"),
        ("_w", "W"),
        ("_n", "N"),
        ("_t", "T"),
        ("_s", "s"),
        ("_f", "F"),
    ];
    SUFFIXES
        .iter()
        .find(|(s, _)| metric.ends_with(s))
        .map(|(_, u)| *u)
}

/// SI prefixes accepted before a unit symbol.
const PREFIXES: &[(&str, f64)] = &[
    ("p", 1e-12),
    ("n", 1e-9),
    ("u", 1e-6),
    ("\u{b5}", 1e-6),
    ("m", 1e-3),
    ("k", 1e3),
    ("M", 1e6),
    ("G", 1e9),
];

/// The bound of a requirement in the metric's unit: a bare number is
/// already in it; a number with a unit is converted (`1.5uH` for an `_h`
/// metric, `60C` for a `_c` metric, `0.5in` for an `_mm` metric).
fn bound(metric: &str, text: &str) -> Result<f64, String> {
    let split = text
        .find(|c: char| !(c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | 'e' | 'E')))
        .map(|i| {
            let (n, u) = text.split_at(i);
            (n.trim(), u.trim())
        })
        .unwrap_or((text.trim(), ""));
    let (num, unit) = split;
    let value: f64 = num
        .parse()
        .ok()
        .filter(|v: &f64| v.is_finite())
        .ok_or_else(|| {
            format!("'{text}' is not a number with an optional unit (e.g. 80 or 60C for temperature_c, 1.5uH for inductance_h)")
        })?;
    if unit.is_empty() {
        return Ok(value);
    }
    if metric.ends_with("_mm") {
        use crate::design::units::{Length, Quantity};
        return Length::from_text(&format!("{value}{unit}"))
            .map(|l| l.value())
            .map_err(|e| format!("{metric} is a length in mm: {e}"));
    }
    if metric.ends_with("_c") {
        return if unit == "C" {
            Ok(value)
        } else {
            Err(format!(
                "{metric} is a temperature: write it in C (e.g. 60C), not '{unit}'"
            ))
        };
    }
    let Some(base) = metric_unit(metric) else {
        return Err(format!(
            "{metric} has no unit: give a plain number, not '{unit}'"
        ));
    };
    if unit.eq_ignore_ascii_case(base) {
        return Ok(value);
    }
    for (p, scale) in PREFIXES {
        if let Some(rest) = unit.strip_prefix(p)
            && rest.eq_ignore_ascii_case(base)
        {
            return Ok(value * scale);
        }
    }
    Err(format!(
        "{metric} is in {base}: write the bound in {base}, optionally with a prefix p, n, u, m, k, M or G (e.g. 1.5u{base}), not '{unit}'"
    ))
}

/// Checks a metric name, suggesting the nearest known one.
pub fn check_metric(metric: &str, known: &[String]) -> Result<(), SweepError> {
    if known.iter().any(|k| k == metric) {
        Ok(())
    } else {
        Err(SweepError::UnknownMetric {
            metric: metric.into(),
            suggestion: crate::suggest::closest(metric, known.iter().map(String::as_str))
                .map(str::to_string),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn known() -> Vec<String> {
        vec!["temperature_c".into(), "force_n".into()]
    }

    #[test]
    fn parses_and_evaluates() {
        let r = Requirement::parse("temperature_c <= 80", &known()).unwrap();
        assert_eq!(r.op, Op::Le);
        let mut m = BTreeMap::new();
        m.insert("temperature_c".to_string(), 79.0);
        assert_eq!(r.holds(&m), Some(true));
        m.insert("temperature_c".to_string(), 81.0);
        assert_eq!(r.holds(&m), Some(false));
        let g = Requirement::parse("force_n>0.01", &known()).unwrap();
        assert_eq!(g.op, Op::Gt);
    }

    #[test]
    fn bounds_take_units_of_the_metric() {
        let k = |m: &str| vec![m.to_string()];
        let r = Requirement::parse("inductance_h >= 1.5uH", &k("inductance_h")).unwrap();
        assert!((r.value - 1.5e-6).abs() < 1e-18);
        let t = Requirement::parse("temperature_c <= 60C", &k("temperature_c")).unwrap();
        assert_eq!(t.value, 60.0);
        let l = Requirement::parse("outer_diameter_mm <= 0.5in", &k("outer_diameter_mm")).unwrap();
        assert!((l.value - 12.7).abs() < 1e-12);
        let f = Requirement::parse("force_n >= 10mN", &k("force_n")).unwrap();
        assert!((f.value - 0.01).abs() < 1e-15);
        let bare = Requirement::parse("inductance_h >= 1.5e-6", &k("inductance_h")).unwrap();
        assert_eq!(bare.value, 1.5e-6);
        let e = Requirement::parse("inductance_h >= 1.5uF", &k("inductance_h")).unwrap_err();
        assert!(e.to_string().contains("inductance_h is in H"), "{e}");
        assert!(Requirement::parse("temperature_c <= 60K", &k("temperature_c")).is_err());
    }

    #[test]
    fn shortfall_is_relative_to_the_bound() {
        let r = Requirement::parse("temperature_c <= 80", &known()).unwrap();
        let mut m = BTreeMap::new();
        m.insert("temperature_c".to_string(), 88.0);
        assert!((r.shortfall(&m).unwrap() - 0.1).abs() < 1e-12);
        m.insert("temperature_c".to_string(), 70.0);
        assert_eq!(r.shortfall(&m), None);
        assert_eq!(r.shortfall(&BTreeMap::new()), Some(f64::INFINITY));
    }

    #[test]
    fn rejects_unknown_metric_with_suggestion() {
        match Requirement::parse("temprature_c <= 80", &known()) {
            Err(SweepError::UnknownMetric { suggestion, .. }) => {
                assert_eq!(suggestion.as_deref(), Some("temperature_c"))
            }
            other => panic!("{other:?}"),
        }
        assert!(Requirement::parse("force_n >= lots", &known()).is_err());
        assert!(Requirement::parse("force_n", &known()).is_err());
    }
}
