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
        let value: f64 = number
            .parse()
            .ok()
            .filter(|v: &f64| v.is_finite())
            .ok_or_else(|| bad(&format!("'{number}' is not a number (give it in the metric's unit, e.g. 80 for temperature_c)")))?;
        check_metric(&metric, known)?;
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
