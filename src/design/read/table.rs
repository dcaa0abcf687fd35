//! The reader machinery: a table of the design file, and the helpers that
//! read one value of it with its span (length, quantity, number, integer,
//! choice, text, per-layer list) and collect every problem.
//!
//! Messages never repeat the key: a [`DesignError`] carries it beside the
//! message, and whoever shows the error shows both.

use super::super::error::DesignError;
use super::super::keys::{self, LimitKey};
use super::super::units::{Length, Quantity};
use crate::suggest::closest;
use std::ops::Range;
use toml::Spanned;
use toml::de::{DeTable, DeValue};

/// Whether zero (and what else) is allowed for a value.
#[derive(Clone, Copy, PartialEq)]
pub(super) enum Sign {
    /// Greater than zero.
    Positive,
    /// Zero or more.
    NonNegative,
    /// Anything finite (temperatures).
    Any,
}

/// A table of the design file, possibly absent.
pub(super) struct Table<'a, 'i> {
    /// Dotted path ("" for the root).
    pub path: &'static str,
    /// Entries; `None` when the table is absent (or not a table).
    pub map: Option<&'a DeTable<'i>>,
    /// Span of the table's header key, if any.
    pub span: Option<Range<usize>>,
}

impl<'a, 'i> Table<'a, 'i> {
    /// The root table of a parsed file.
    pub fn root(doc: &'a DeTable<'i>) -> Table<'a, 'i> {
        Table {
            path: "",
            map: Some(doc),
            span: None,
        }
    }

    /// The dotted path of key `k` of this table.
    pub fn key(&self, k: &str) -> String {
        if self.path.is_empty() {
            k.to_string()
        } else {
            format!("{}.{k}", self.path)
        }
    }

    pub fn get(&self, k: &str) -> Option<&'a Spanned<DeValue<'i>>> {
        self.map?
            .iter()
            .find(|(key, _)| key.get_ref().as_ref() == k)
            .map(|(_, v)| v)
    }

    pub fn has(&self, k: &str) -> bool {
        self.get(k).is_some()
    }

    /// The span of key `k`'s value, or of the table header when absent.
    pub fn span_of(&self, k: &str) -> Option<Range<usize>> {
        self.get(k).map(|v| v.span()).or_else(|| self.span.clone())
    }

    pub fn present(&self) -> bool {
        self.map.is_some()
    }

    fn absent(path: &'static str) -> Table<'a, 'i> {
        Table {
            path,
            map: None,
            span: None,
        }
    }
}

/// A scalar read from the file: a number or a string.
enum Scalar<'v> {
    Number(f64),
    Text(&'v str),
}

/// Collects problems while reading.
pub(super) struct Ctx<'l> {
    /// Problems found so far, in the order found.
    pub errors: Vec<DesignError>,
    /// The `[rules]` keys that override rule limits (from the rule registry).
    pub limits: &'l [LimitKey],
    /// Dotted keys an unknown key was taken to be a typo of (and which the
    /// file does not have): problems about their absence are not news.
    pub misspelled: Vec<String>,
}

impl<'l> Ctx<'l> {
    pub fn new(limits: &'l [LimitKey]) -> Ctx<'l> {
        Ctx {
            errors: Vec::new(),
            limits,
            misspelled: Vec::new(),
        }
    }

    pub fn err(
        &mut self,
        key: impl Into<String>,
        span: Option<Range<usize>>,
        message: impl Into<String>,
        help: Option<String>,
    ) {
        self.errors.push(DesignError {
            key: key.into(),
            span,
            message: message.into(),
            help,
        });
    }

    /// Keys allowed in `table` (the root is ""), in file order.
    pub fn keys_of(&self, table: &str) -> Vec<&'static str> {
        if table.is_empty() {
            return keys::KEYS
                .iter()
                .filter(|k| k.table.is_empty())
                .map(|k| k.name)
                .chain(keys::tables())
                .collect();
        }
        let mut out: Vec<&'static str> = keys::KEYS
            .iter()
            .filter(|k| k.table == table)
            .map(|k| k.name)
            .collect();
        if table == "rules" {
            out.extend(self.limits.iter().map(|l| l.name));
        }
        out
    }

    /// A sub-table of the root; absent if missing or not a table. Its
    /// unknown keys are reported.
    pub fn table<'a, 'i>(&mut self, root: &Table<'a, 'i>, name: &'static str) -> Table<'a, 'i> {
        let entry = root
            .map
            .and_then(|m| m.iter().find(|(k, _)| k.get_ref().as_ref() == name));
        match entry {
            None => Table::absent(name),
            Some((k, v)) => match v.get_ref() {
                DeValue::Table(map) => {
                    let t = Table {
                        path: name,
                        map: Some(map),
                        span: Some(k.span()),
                    };
                    self.check_keys(&t);
                    t
                }
                other => {
                    self.err(
                        name,
                        Some(v.span()),
                        format!("must be a table, found {}", other.type_str()),
                        Some(format!("write it as a [{name}] section")),
                    );
                    Table::absent(name)
                }
            },
        }
    }

    /// Reports a required key that the table lacks.
    pub fn missing(&mut self, t: &Table, k: &str, help: Option<String>) {
        let where_ = if t.path.is_empty() {
            "the design file".to_string()
        } else {
            format!("[{}]", t.path)
        };
        self.err(
            t.key(k),
            t.span.clone(),
            format!("required in {where_} but missing"),
            help,
        );
    }

    /// Reads a number or string; reports other types.
    fn scalar<'v>(
        &mut self,
        t: &Table<'v, '_>,
        k: &str,
        v: &'v Spanned<DeValue<'_>>,
        allowed: &str,
    ) -> Option<Scalar<'v>> {
        match v.get_ref() {
            DeValue::Integer(i) => {
                let digits = i.as_str().replace('_', "");
                match i64::from_str_radix(&digits, i.radix()) {
                    Ok(n) => Some(Scalar::Number(n as f64)),
                    Err(_) => {
                        self.err(
                            t.key(k),
                            Some(v.span()),
                            format!("`{}` is not a usable integer", i.as_str()),
                            Some(allowed.to_string()),
                        );
                        None
                    }
                }
            }
            DeValue::Float(f) => {
                let x: f64 = f.as_str().replace('_', "").parse().unwrap_or(f64::NAN);
                if x.is_finite() {
                    Some(Scalar::Number(x))
                } else {
                    self.err(
                        t.key(k),
                        Some(v.span()),
                        format!("must be a finite number, found {}", f.as_str()),
                        Some(allowed.to_string()),
                    );
                    None
                }
            }
            DeValue::String(s) => Some(Scalar::Text(s.as_ref())),
            other => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    format!("must be a number or a string, found {}", other.type_str()),
                    Some(allowed.to_string()),
                );
                None
            }
        }
    }

    /// Reads one value as a quantity and checks its sign.
    fn quantity_value<Q: Quantity>(
        &mut self,
        t: &Table,
        k: &str,
        v: &Spanned<DeValue<'_>>,
        sign: Sign,
    ) -> Option<Q> {
        let s = self.scalar(t, k, v, Q::ALLOWED)?;
        let r = match s {
            Scalar::Number(x) => Q::from_number(x),
            Scalar::Text(s) => Q::from_text(s),
        };
        match r {
            Err(e) => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    e.message,
                    Some(format!("allowed: {}", e.allowed)),
                );
                None
            }
            Ok(q) => {
                let x = q.value();
                let bad = match sign {
                    Sign::Positive => x <= 0.0,
                    Sign::NonNegative => x < 0.0,
                    Sign::Any => false,
                };
                if bad {
                    let need = if sign == Sign::Positive {
                        "greater than zero"
                    } else {
                        "zero or more"
                    };
                    self.err(
                        t.key(k),
                        Some(v.span()),
                        format!("must be {need}"),
                        Some(format!("allowed: {}", Q::ALLOWED)),
                    );
                    None
                } else {
                    Some(q)
                }
            }
        }
    }

    /// An optional quantity.
    pub fn quantity<Q: Quantity>(&mut self, t: &Table, k: &str, sign: Sign) -> Option<Q> {
        let v = t.get(k)?;
        self.quantity_value(t, k, v, sign)
    }

    /// An optional length, mm.
    pub fn length(&mut self, t: &Table, k: &str, sign: Sign) -> Option<f64> {
        self.quantity::<Length>(t, k, sign).map(Length::mm)
    }

    /// A required length, mm (0 when missing or bad; an error is recorded).
    pub fn req_length(&mut self, t: &Table, k: &str, sign: Sign) -> f64 {
        if !t.has(k) {
            self.missing(t, k, Some(format!("allowed: {}", Length::ALLOWED)));
            return 0.0;
        }
        self.length(t, k, sign).unwrap_or(0.0)
    }

    /// An optional plain number (no unit) within `lo..=hi`.
    pub fn number(&mut self, t: &Table, k: &str, lo: f64, hi: f64, allowed: &str) -> Option<f64> {
        let v = t.get(k)?;
        match self.scalar(t, k, v, allowed)? {
            Scalar::Number(x) if (lo..=hi).contains(&x) => Some(x),
            Scalar::Number(x) => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    format!("{x} is out of range"),
                    Some(format!("allowed: {allowed}")),
                );
                None
            }
            Scalar::Text(s) => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    format!("must be a plain number, found \"{s}\""),
                    Some(format!("allowed: {allowed}")),
                );
                None
            }
        }
    }

    /// An optional integer within `lo..=hi`.
    pub fn integer(&mut self, t: &Table, k: &str, lo: i64, hi: i64) -> Option<i64> {
        let v = t.get(k)?;
        let allowed = format!("a whole number from {lo} to {hi}");
        match v.get_ref() {
            DeValue::Integer(i) => {
                let n = i64::from_str_radix(&i.as_str().replace('_', ""), i.radix()).ok();
                match n {
                    Some(n) if (lo..=hi).contains(&n) => Some(n),
                    _ => {
                        self.err(
                            t.key(k),
                            Some(v.span()),
                            format!("{} is out of range; it must be {lo} to {hi}", i.as_str()),
                            Some(allowed),
                        );
                        None
                    }
                }
            }
            other => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    format!("must be a whole number, found {}", other.type_str()),
                    Some(allowed),
                );
                None
            }
        }
    }

    /// An optional `true` / `false`.
    pub fn switch(&mut self, t: &Table, k: &str) -> Option<bool> {
        let v = t.get(k)?;
        match v.get_ref() {
            DeValue::Boolean(b) => Some(*b),
            other => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    format!("must be true or false, found {}", other.type_str()),
                    Some("allowed: true, false (without quotes)".into()),
                );
                None
            }
        }
    }

    /// An optional string.
    pub fn string<'a>(&mut self, t: &Table<'a, '_>, k: &str) -> Option<&'a str> {
        let v = t.get(k)?;
        match v.get_ref() {
            DeValue::String(s) => Some(s.as_ref()),
            other => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    format!("must be a string, found {}", other.type_str()),
                    None,
                );
                None
            }
        }
    }

    /// An optional choice among the words the key registry lists for it;
    /// returns the index.
    pub fn choice(&mut self, t: &Table, k: &str) -> Option<usize> {
        let names = keys::choices(t.path, k);
        let v = t.get(k)?;
        let list = names
            .iter()
            .map(|n| format!("\"{n}\""))
            .collect::<Vec<_>>()
            .join(", ");
        let s = self.string(t, k)?;
        if let Some(i) = names.iter().position(|n| *n == s) {
            return Some(i);
        }
        let help = match closest(s, names.iter().copied()) {
            Some(n) => format!("did you mean \"{n}\"? allowed: {list}"),
            None => format!("allowed: {list}"),
        };
        self.err(
            t.key(k),
            Some(v.span()),
            format!("unknown value \"{s}\""),
            Some(help),
        );
        None
    }

    /// One value or an array of `count` values (when `count` is known).
    pub fn per_layer<Q: Quantity>(
        &mut self,
        t: &Table,
        k: &str,
        count: Option<usize>,
        what: &str,
    ) -> Option<Vec<f64>> {
        let v = t.get(k)?;
        match v.get_ref() {
            DeValue::Array(items) => {
                if let Some(n) = count
                    && items.len() != n
                {
                    self.err(
                        t.key(k),
                        Some(v.span()),
                        format!(
                            "lists {} values but the coil needs {n} ({what})",
                            items.len()
                        ),
                        Some(format!("give one value for all, or exactly {n} values")),
                    );
                    return None;
                }
                let vals: Vec<Option<f64>> = items
                    .iter()
                    .map(|item| {
                        self.quantity_value::<Q>(t, k, item, Sign::Positive)
                            .map(Q::value)
                    })
                    .collect();
                vals.into_iter().collect()
            }
            _ => {
                let x = self.quantity_value::<Q>(t, k, v, Sign::Positive)?.value();
                Some(vec![x; count.unwrap_or(1)])
            }
        }
    }
}
