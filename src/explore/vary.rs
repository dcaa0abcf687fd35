//! `--vary KEY=VALUES`: which design key to change and the values to try.
//!
//! VALUES is a list (`layers=2,4,6`, `copper=1oz,2oz`) or an inclusive
//! range `A..B` (step 1, unit-less keys only) or `A..B:STEP`
//! (`trace_width=0.1mm..0.2mm:0.05mm`). Values with a unit are handed to the
//! design file as strings ("0.15mm"), so the design file's own unit rules
//! apply; bare numbers stay numbers.

use super::SweepError;
use crate::design::{self, Key};
use crate::suggest::closest;

/// How a key's values are written.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// Whole number (layers, sides).
    Integer,
    /// Plain number (turns, emissivity, convection).
    Number,
    /// Number with an optional unit (lengths, copper weight, volts, ...).
    Quantity,
}

/// How a sweep writes values of a design key: `None` for keys that hold
/// words (shape, wiring, names), which cannot be swept.
pub fn kind_of(key: &Key) -> Option<Kind> {
    match key.kind {
        design::keys::Kind::Length | design::keys::Kind::Quantity { .. } => Some(Kind::Quantity),
        design::keys::Kind::Number => Some(Kind::Number),
        design::keys::Kind::Integer => Some(Kind::Integer),
        design::keys::Kind::Choice(_) | design::keys::Kind::Text | design::keys::Kind::Switch => {
            None
        }
    }
}

/// The design keys a sweep may vary, by full path, with how their values
/// are written: every numeric key of [`crate::pipeline::design_keys`].
pub fn numeric_keys() -> Vec<(String, Kind)> {
    crate::pipeline::design_keys()
        .iter()
        .filter_map(|k| Some((k.path(), kind_of(k)?)))
        .collect()
}

/// One value to try.
#[derive(Debug, Clone, PartialEq)]
pub struct Value {
    /// As shown in tables ("0.15mm", "4").
    pub text: String,
    /// As written into the design file.
    pub toml: toml::Value,
}

/// One `--vary` argument, parsed.
#[derive(Debug, Clone, PartialEq)]
pub struct Vary {
    /// Full key path, e.g. "coil.trace_width".
    pub key: String,
    /// Values in the order given.
    pub values: Vec<Value>,
}

/// Resolves a key as typed (`turns`, `coil.turns`, `trace_width`) to its
/// full path among the numeric keys. A short name that several tables use
/// means the `[coil]` key when the coil has one (`outer_diameter` is
/// `coil.outer_diameter`; the ring's is `array.outer_diameter`).
pub fn resolve_key(typed: &str) -> Result<(String, Kind), SweepError> {
    let typed = typed.trim();
    let keys = crate::pipeline::design_keys();
    let short = |k: &Key| k.name == typed;
    let numeric: Vec<(&Key, Kind)> = keys.iter().filter_map(|k| Some((k, kind_of(k)?))).collect();
    if let Some(&(k, kind)) = numeric.iter().find(|(k, _)| k.path() == typed) {
        return Ok((k.path(), kind));
    }
    let mut matches: Vec<_> = numeric.iter().filter(|(k, _)| short(k)).collect();
    if matches.len() > 1 && matches.iter().any(|(k, _)| k.table == "coil") {
        matches.retain(|(k, _)| k.table == "coil");
    }
    match matches.as_slice() {
        [one] => return Ok((one.0.path(), one.1)),
        [] => {}
        many => {
            return Err(SweepError::AmbiguousKey {
                key: typed.into(),
                candidates: many.iter().map(|(k, _)| k.path()).collect(),
            });
        }
    }
    if keys
        .iter()
        .any(|k| kind_of(k).is_none() && (k.path() == typed || short(k)))
    {
        return Err(SweepError::NotNumeric { key: typed.into() });
    }
    let names: Vec<String> = numeric
        .iter()
        .flat_map(|(k, _)| [k.path(), k.name.to_string()])
        .collect();
    Err(SweepError::UnknownKey {
        key: typed.into(),
        suggestion: closest(typed, names.iter().map(String::as_str)).map(str::to_string),
    })
}

/// A number with an optional unit suffix, e.g. "0.1mm" -> (0.1, "mm").
pub(crate) fn split_unit(s: &str) -> Option<(f64, String)> {
    let s = s.trim();
    let cut = s
        .char_indices()
        .find(|(i, c)| {
            !(c.is_ascii_digit() || *c == '.' || ((*c == '-' || *c == '+') && *i == 0))
                && !((*c == 'e' || *c == 'E')
                    && s[i + 1..].starts_with(|d: char| d.is_ascii_digit() || d == '-'))
        })
        .map_or(s.len(), |(i, _)| i);
    let number: f64 = s[..cut].parse().ok()?;
    number
        .is_finite()
        .then(|| (number, s[cut..].trim().to_string()))
}

/// Formats a number without float noise (up to 9 significant decimals).
fn tidy(x: f64) -> String {
    let s = format!("{:.9}", x);
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" { "0".into() } else { s.into() }
}

pub(crate) fn value(
    key: &str,
    kind: Kind,
    number: f64,
    unit: &str,
    arg: &str,
) -> Result<Value, SweepError> {
    match kind {
        Kind::Integer => {
            if !unit.is_empty() || number.fract() != 0.0 {
                return Err(SweepError::BadValues {
                    arg: arg.into(),
                    message: format!("{key} takes whole numbers without a unit"),
                });
            }
            Ok(Value {
                text: tidy(number),
                toml: toml::Value::Integer(number as i64),
            })
        }
        Kind::Number => {
            if !unit.is_empty() {
                return Err(SweepError::BadValues {
                    arg: arg.into(),
                    message: format!("{key} takes plain numbers without a unit"),
                });
            }
            Ok(Value {
                text: tidy(number),
                toml: toml::Value::Float(number),
            })
        }
        Kind::Quantity => {
            let text = format!("{}{}", tidy(number), unit);
            let toml = if unit.is_empty() {
                toml::Value::Float(number)
            } else {
                toml::Value::String(text.clone())
            };
            Ok(Value { text, toml })
        }
    }
}

/// Most candidates a single `--vary` may produce.
pub const MAX_VALUES: usize = 10_000;

/// Parses `KEY=VALUES`.
pub fn parse(arg: &str) -> Result<Vary, SweepError> {
    let Some((k, vals)) = arg.split_once('=') else {
        return Err(SweepError::BadValues {
            arg: arg.into(),
            message: "expected KEY=VALUES, e.g. layers=2,4,6 or turns=4..20 or trace_width=0.1mm..0.2mm:0.05mm".into(),
        });
    };
    let (key, kind) = resolve_key(k)?;
    let key = key.as_str();
    let vals = vals.trim();
    let bad = |message: String| SweepError::BadValues {
        arg: arg.into(),
        message,
    };
    let values = if let Some((a, rest)) = vals.split_once("..") {
        let (b, step) = match rest.split_once(':') {
            Some((b, s)) => (b, Some(s)),
            None => (rest, None),
        };
        let (a, ua) = split_unit(a).ok_or_else(|| bad(format!("'{a}' is not a number")))?;
        let (b, ub) = split_unit(b).ok_or_else(|| bad(format!("'{b}' is not a number")))?;
        let ub = if ub.is_empty() { ua.clone() } else { ub };
        if ua != ub {
            return Err(bad(format!(
                "range ends have different units '{ua}' and '{ub}'"
            )));
        }
        let step = match step {
            Some(s) => {
                let (s, us) =
                    split_unit(s).ok_or_else(|| bad(format!("step '{s}' is not a number")))?;
                if !us.is_empty() && us != ua {
                    return Err(bad(format!(
                        "step unit '{us}' differs from the range unit '{ua}'"
                    )));
                }
                s
            }
            None if ua.is_empty() => 1.0,
            None => return Err(bad("a range with a unit needs a step: A..B:STEP".into())),
        };
        if step <= 0.0 {
            return Err(SweepError::ZeroStep { arg: arg.into() });
        }
        if b < a {
            return Err(SweepError::EmptyRange { arg: arg.into() });
        }
        let n = ((b - a) / step + 1e-9).floor() as usize + 1;
        if n > MAX_VALUES {
            return Err(bad(format!("{n} values; at most {MAX_VALUES}")));
        }
        (0..n)
            .map(|i| value(key, kind, a + step * i as f64, &ua, arg))
            .collect::<Result<Vec<_>, _>>()?
    } else {
        let items: Vec<&str> = vals
            .split(',')
            .map(str::trim)
            .filter(|s| !s.is_empty())
            .collect();
        if items.is_empty() {
            return Err(SweepError::EmptyRange { arg: arg.into() });
        }
        items
            .iter()
            .map(|s| {
                let (x, u) = split_unit(s).ok_or_else(|| bad(format!("'{s}' is not a number")))?;
                value(key, kind, x, &u, arg)
            })
            .collect::<Result<Vec<_>, _>>()?
    };
    Ok(Vary {
        key: key.to_string(),
        values,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lists_and_ranges() {
        let v = parse("layers=2,4,6").unwrap();
        assert_eq!(v.key, "coil.layers");
        assert_eq!(v.values.len(), 3);
        assert_eq!(v.values[1].toml, toml::Value::Integer(4));
        let t = parse("turns=4..20").unwrap();
        assert_eq!(t.values.len(), 17);
        let w = parse("trace_width=0.1mm..0.2mm:0.05mm").unwrap();
        let texts: Vec<_> = w.values.iter().map(|v| v.text.as_str()).collect();
        assert_eq!(texts, ["0.1mm", "0.15mm", "0.2mm"]);
        assert_eq!(w.values[0].toml, toml::Value::String("0.1mm".into()));
        let c = parse("stackup.copper=1oz,2oz").unwrap();
        assert_eq!(c.values[1].text, "2oz");
    }

    #[test]
    fn bad_input() {
        assert!(matches!(
            parse("turns=20..4"),
            Err(SweepError::EmptyRange { .. })
        ));
        assert!(matches!(
            parse("turns=4..20:0"),
            Err(SweepError::ZeroStep { .. })
        ));
        assert!(matches!(
            parse("turns="),
            Err(SweepError::EmptyRange { .. })
        ));
        assert!(matches!(
            parse("shape=1,2"),
            Err(SweepError::NotNumeric { .. })
        ));
        assert!(matches!(
            parse("layers=2.5"),
            Err(SweepError::BadValues { .. })
        ));
        assert!(matches!(
            parse("trace_width=0.1mm..0.2mm"),
            Err(SweepError::BadValues { .. })
        ));
        match parse("trace_widht=0.1mm") {
            Err(SweepError::UnknownKey { suggestion, .. }) => {
                assert_eq!(suggestion.as_deref(), Some("trace_width"))
            }
            other => panic!("{other:?}"),
        }
        assert_eq!(
            parse("outer_diameter=12mm").unwrap().key,
            "coil.outer_diameter"
        );
        assert!(matches!(
            parse("diameter=1"),
            Err(SweepError::AmbiguousKey { .. })
        ));
        match parse("drill=1") {
            Err(SweepError::AmbiguousKey { candidates, .. }) => {
                assert_eq!(candidates, ["via.drill", "terminal.drill"])
            }
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn keys_come_from_the_registries() {
        let keys = numeric_keys();
        let kind = |p: &str| keys.iter().find(|(k, _)| k == p).map(|(_, kind)| *kind);
        assert_eq!(kind("coil.layers"), Some(Kind::Integer));
        assert_eq!(kind("coil.turns"), Some(Kind::Number));
        assert_eq!(kind("stackup.copper"), Some(Kind::Quantity));
        assert_eq!(kind("rules.min_edge_clearance"), Some(Kind::Quantity));
        assert_eq!(kind("coil.shape"), None);
        assert_eq!(kind("fin.free_length"), Some(Kind::Quantity));
        assert_eq!(kind("drive.duty"), Some(Kind::Number));
        assert_eq!(kind("drive.bipolar"), None);
        assert_eq!(kind("terminal.angle"), Some(Kind::Number));
        assert_eq!(kind("terminal.pad_width"), Some(Kind::Quantity));
        assert_eq!(kind("tail.fingers"), Some(Kind::Integer));
        assert_eq!(kind("tail.pitch"), Some(Kind::Quantity));
        assert_eq!(kind("array.count"), Some(Kind::Integer));
        assert_eq!(kind("array.spacing"), Some(Kind::Quantity));
        assert_eq!(kind("rotor.poles"), Some(Kind::Integer));
        assert_eq!(kind("array.connection"), None);
        assert_eq!(kind("rotor.gap"), Some(Kind::Quantity));
        assert_eq!(keys.len(), 78);
        assert_eq!(
            parse("min_drill=0.15mm,0.2mm").unwrap().key,
            "rules.min_drill"
        );
    }
}
