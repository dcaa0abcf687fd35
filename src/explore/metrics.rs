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
use serde::ser::{self, Serialize, Serializer};
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

/// All metrics of one evaluated design (`analysis`: the analysis as
/// `serde_json::to_value` gives it).
pub fn metrics(
    design: &Design,
    layout: &Board,
    violations: &[Violation],
    analysis: &serde_json::Value,
) -> BTreeMap<String, f64> {
    let mut m = BTreeMap::new();
    flatten("", analysis, &mut m);
    derived(m, design, layout, violations)
}

/// [`metrics`] of `serde_json::to_value(analysis)`, the same keys and
/// numbers, mostly without building the JSON value: the analysis is
/// serialised straight into the flat list (a sweep does this for every
/// candidate).
pub fn metrics_of<T: Serialize + ?Sized>(
    design: &Design,
    layout: &Board,
    violations: &[Violation],
    analysis: &T,
) -> BTreeMap<String, f64> {
    let m = flatten_direct(analysis).unwrap_or_else(|| {
        let mut m = BTreeMap::new();
        flatten(
            "",
            &serde_json::to_value(analysis).unwrap_or_default(),
            &mut m,
        );
        m
    });
    derived(m, design, layout, violations)
}

/// Adds the metrics derived from the design (module notes) to those of
/// the analysis; a name the analysis has keeps the analysis's number.
fn derived(
    mut m: BTreeMap<String, f64>,
    design: &Design,
    layout: &Board,
    violations: &[Violation],
) -> BTreeMap<String, f64> {
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

/// The numbers of a serialisable value flattened as [`flatten`] flattens
/// its `serde_json::Value`, without building the `Value`: the same keys and
/// the same numbers. `None` when that is not sure: a key path met twice
/// (where the `Value`'s map would keep only the last) or something this
/// flattening does not take (a map key other than text, an integer beyond
/// 64 bits, an error of the value's own); the caller then goes through
/// `serde_json::to_value`.
fn flatten_direct<T: Serialize + ?Sized>(value: &T) -> Option<BTreeMap<String, f64>> {
    LAYOUT.with(|layout| {
        let mut layout = layout.borrow_mut();
        let mut flat = Flat::default();
        if let Some(l) = layout.as_ref() {
            flat.paths.reserve(l.paths.len());
            flat.ends.reserve(l.ends.len());
            flat.values.reserve(l.ends.len());
        }
        value
            .serialize(Sink {
                flat: &mut flat,
                on: true,
            })
            .ok()?;
        let same = layout
            .as_ref()
            .is_some_and(|l| l.ends == flat.ends && l.paths == flat.paths);
        if !same {
            *layout = Some(Layout::of(flat.paths.clone(), flat.ends.clone())?);
        }
        let l = layout.as_ref()?;
        Some(
            l.order
                .iter()
                .filter_map(|&k| {
                    let v = flat.values[k as usize]?;
                    Some((l.path(k as usize).to_string(), v))
                })
                .collect(),
        )
    })
}

thread_local! {
    /// The layout of the last value [`flatten_direct`] flattened on this
    /// thread: a sweep's candidates all have the same paths, so their
    /// order is worked out once per thread.
    static LAYOUT: std::cell::RefCell<Option<Layout>> = const { std::cell::RefCell::new(None) };
}

/// The key paths of a flattened value in the order met, and that order
/// sorted.
struct Layout {
    /// Every path, one after another.
    paths: String,
    /// Where each ends in `paths`.
    ends: Vec<u32>,
    /// Path indices in key order.
    order: Vec<u32>,
}

impl Layout {
    /// The layout of these paths; `None` when one is met twice.
    fn of(paths: String, ends: Vec<u32>) -> Option<Layout> {
        let mut l = Layout {
            paths,
            order: (0..ends.len() as u32).collect(),
            ends,
        };
        let mut order = std::mem::take(&mut l.order);
        order.sort_unstable_by(|&a, &b| l.path(a as usize).cmp(l.path(b as usize)));
        if order
            .windows(2)
            .any(|w| l.path(w[0] as usize) == l.path(w[1] as usize))
        {
            return None;
        }
        l.order = order;
        Some(l)
    }

    /// Path `k`.
    fn path(&self, k: usize) -> &str {
        let start = if k == 0 { 0 } else { self.ends[k - 1] as usize };
        &self.paths[start..self.ends[k] as usize]
    }
}

/// What [`flatten_direct`] has collected: every key path met (objects,
/// arrays, text and nulls with no number, so that a path met twice shows)
/// with its number, and the path being written.
#[derive(Default)]
struct Flat {
    paths: String,
    ends: Vec<u32>,
    values: Vec<Option<f64>>,
    path: String,
}

impl Flat {
    /// Records the value at the current path.
    fn put(&mut self, v: Option<f64>) {
        self.paths.push_str(&self.path);
        self.ends.push(self.paths.len() as u32);
        self.values.push(v);
    }

    /// Enters key `k` of an object (joined with '.' as [`flatten`] does);
    /// returns the length to cut the path back to.
    fn enter(&mut self, k: &str) -> usize {
        let at = self.path.len();
        if !self.path.is_empty() {
            self.path.push('.');
        }
        self.path.push_str(k);
        at
    }
}

/// Why [`flatten_direct`] gave up (see there).
#[derive(Debug)]
struct GiveUp;

impl std::fmt::Display for GiveUp {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("not flattened directly")
    }
}

impl std::error::Error for GiveUp {}

impl ser::Error for GiveUp {
    fn custom<M: std::fmt::Display>(_: M) -> Self {
        GiveUp
    }
}

/// The serializer of [`flatten_direct`]: a value at the current path
/// (`on` false inside arrays, whose contents `flatten` skips).
struct Sink<'f> {
    flat: &'f mut Flat,
    on: bool,
}

impl Sink<'_> {
    fn put(self, v: Option<f64>) -> Result<(), GiveUp> {
        if self.on {
            self.flat.put(v);
        }
        Ok(())
    }

    /// An object here; its fields follow.
    fn object(self) -> Result<Self, GiveUp> {
        if self.on {
            self.flat.put(None);
        }
        Ok(self)
    }

    /// An array here: its contents are not recorded.
    fn array(self) -> Result<Self, GiveUp> {
        if self.on {
            self.flat.put(None);
        }
        Ok(Sink {
            flat: self.flat,
            on: false,
        })
    }

    /// Writes `value` under key `k` of the object here.
    fn field<T: Serialize + ?Sized>(&mut self, k: &str, value: &T) -> Result<(), GiveUp> {
        let at = self.flat.enter(k);
        let r = value.serialize(Sink {
            flat: self.flat,
            on: self.on,
        });
        self.flat.path.truncate(at);
        r
    }

    /// Writes a sequence element (never recorded).
    fn element<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), GiveUp> {
        value.serialize(Sink {
            flat: self.flat,
            on: false,
        })
    }
}

impl<'f> Serializer for Sink<'f> {
    type Ok = ();
    type Error = GiveUp;
    type SerializeSeq = Self;
    type SerializeTuple = Self;
    type SerializeTupleStruct = Self;
    type SerializeTupleVariant = Self;
    type SerializeMap = SinkMap<'f>;
    type SerializeStruct = Self;
    type SerializeStructVariant = SinkVariant<'f>;

    fn serialize_bool(self, v: bool) -> Result<(), GiveUp> {
        self.put(Some(f64::from(u8::from(v))))
    }
    fn serialize_i8(self, v: i8) -> Result<(), GiveUp> {
        self.serialize_i64(i64::from(v))
    }
    fn serialize_i16(self, v: i16) -> Result<(), GiveUp> {
        self.serialize_i64(i64::from(v))
    }
    fn serialize_i32(self, v: i32) -> Result<(), GiveUp> {
        self.serialize_i64(i64::from(v))
    }
    fn serialize_i64(self, v: i64) -> Result<(), GiveUp> {
        // serde_json keeps a non-negative integer as u64, a negative one
        // as i64; either turns into f64 with `as`.
        self.put(Some(v as f64))
    }
    fn serialize_i128(self, v: i128) -> Result<(), GiveUp> {
        if let Ok(u) = u64::try_from(v) {
            self.serialize_u64(u)
        } else if let Ok(i) = i64::try_from(v) {
            self.serialize_i64(i)
        } else {
            Err(GiveUp)
        }
    }
    fn serialize_u8(self, v: u8) -> Result<(), GiveUp> {
        self.serialize_u64(u64::from(v))
    }
    fn serialize_u16(self, v: u16) -> Result<(), GiveUp> {
        self.serialize_u64(u64::from(v))
    }
    fn serialize_u32(self, v: u32) -> Result<(), GiveUp> {
        self.serialize_u64(u64::from(v))
    }
    fn serialize_u64(self, v: u64) -> Result<(), GiveUp> {
        self.put(Some(v as f64))
    }
    fn serialize_u128(self, v: u128) -> Result<(), GiveUp> {
        u64::try_from(v)
            .map_err(|_| GiveUp)
            .and_then(|u| self.serialize_u64(u))
    }
    fn serialize_f32(self, v: f32) -> Result<(), GiveUp> {
        // serde_json: a non-finite number is null.
        self.put(v.is_finite().then_some(f64::from(v)))
    }
    fn serialize_f64(self, v: f64) -> Result<(), GiveUp> {
        self.put(v.is_finite().then_some(v))
    }
    fn serialize_char(self, _: char) -> Result<(), GiveUp> {
        self.put(None)
    }
    fn serialize_str(self, _: &str) -> Result<(), GiveUp> {
        self.put(None)
    }
    fn serialize_bytes(self, _: &[u8]) -> Result<(), GiveUp> {
        self.put(None)
    }
    fn serialize_none(self) -> Result<(), GiveUp> {
        self.put(None)
    }
    fn serialize_some<T: Serialize + ?Sized>(self, value: &T) -> Result<(), GiveUp> {
        value.serialize(self)
    }
    fn serialize_unit(self) -> Result<(), GiveUp> {
        self.put(None)
    }
    fn serialize_unit_struct(self, _: &'static str) -> Result<(), GiveUp> {
        self.put(None)
    }
    fn serialize_unit_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
    ) -> Result<(), GiveUp> {
        self.put(None)
    }
    fn serialize_newtype_struct<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        value: &T,
    ) -> Result<(), GiveUp> {
        value.serialize(self)
    }
    fn serialize_newtype_variant<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
        value: &T,
    ) -> Result<(), GiveUp> {
        let mut s = self.object()?;
        s.field(variant, value)
    }
    fn serialize_seq(self, _: Option<usize>) -> Result<Self, GiveUp> {
        self.array()
    }
    fn serialize_tuple(self, _: usize) -> Result<Self, GiveUp> {
        self.array()
    }
    fn serialize_tuple_struct(self, _: &'static str, _: usize) -> Result<Self, GiveUp> {
        self.array()
    }
    fn serialize_tuple_variant(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
        _: usize,
    ) -> Result<Self, GiveUp> {
        // {variant: [...]}: the variant's path holds an array.
        let mut s = self.object()?;
        s.field(variant, &())?;
        Ok(Sink {
            flat: s.flat,
            on: false,
        })
    }
    fn serialize_map(self, _: Option<usize>) -> Result<SinkMap<'f>, GiveUp> {
        Ok(SinkMap {
            sink: self.object()?,
            key: None,
        })
    }
    fn serialize_struct(self, _: &'static str, _: usize) -> Result<Self, GiveUp> {
        self.object()
    }
    fn serialize_struct_variant(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
        _: usize,
    ) -> Result<SinkVariant<'f>, GiveUp> {
        // {variant: {...}}
        let s = self.object()?;
        let at = s.flat.enter(variant);
        Ok(SinkVariant {
            sink: s.object()?,
            at,
        })
    }
}

impl ser::SerializeSeq for Sink<'_> {
    type Ok = ();
    type Error = GiveUp;
    fn serialize_element<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), GiveUp> {
        self.element(value)
    }
    fn end(self) -> Result<(), GiveUp> {
        Ok(())
    }
}

impl ser::SerializeTuple for Sink<'_> {
    type Ok = ();
    type Error = GiveUp;
    fn serialize_element<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), GiveUp> {
        self.element(value)
    }
    fn end(self) -> Result<(), GiveUp> {
        Ok(())
    }
}

impl ser::SerializeTupleStruct for Sink<'_> {
    type Ok = ();
    type Error = GiveUp;
    fn serialize_field<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), GiveUp> {
        self.element(value)
    }
    fn end(self) -> Result<(), GiveUp> {
        Ok(())
    }
}

impl ser::SerializeTupleVariant for Sink<'_> {
    type Ok = ();
    type Error = GiveUp;
    fn serialize_field<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), GiveUp> {
        self.element(value)
    }
    fn end(self) -> Result<(), GiveUp> {
        Ok(())
    }
}

impl ser::SerializeStruct for Sink<'_> {
    type Ok = ();
    type Error = GiveUp;
    fn serialize_field<T: Serialize + ?Sized>(
        &mut self,
        key: &'static str,
        value: &T,
    ) -> Result<(), GiveUp> {
        self.field(key, value)
    }
    fn end(self) -> Result<(), GiveUp> {
        Ok(())
    }
}

/// A struct variant's fields, under the variant's name: the path is cut
/// back at the end.
struct SinkVariant<'f> {
    sink: Sink<'f>,
    at: usize,
}

impl ser::SerializeStructVariant for SinkVariant<'_> {
    type Ok = ();
    type Error = GiveUp;
    fn serialize_field<T: Serialize + ?Sized>(
        &mut self,
        key: &'static str,
        value: &T,
    ) -> Result<(), GiveUp> {
        self.sink.field(key, value)
    }
    fn end(self) -> Result<(), GiveUp> {
        self.sink.flat.path.truncate(self.at);
        Ok(())
    }
}

/// A map's entries (its keys must be text).
struct SinkMap<'f> {
    sink: Sink<'f>,
    key: Option<String>,
}

impl ser::SerializeMap for SinkMap<'_> {
    type Ok = ();
    type Error = GiveUp;
    fn serialize_key<T: Serialize + ?Sized>(&mut self, key: &T) -> Result<(), GiveUp> {
        self.key = Some(key.serialize(KeyText)?);
        Ok(())
    }
    fn serialize_value<T: Serialize + ?Sized>(&mut self, value: &T) -> Result<(), GiveUp> {
        let key = self.key.take().ok_or(GiveUp)?;
        self.sink.field(&key, value)
    }
    fn end(self) -> Result<(), GiveUp> {
        Ok(())
    }
}

/// A map key as text: strings, characters and unit variants (the keys
/// serde_json writes as they are); anything else gives up.
struct KeyText;

/// The methods of [`KeyText`] that give up.
macro_rules! give_up {
    ($($name:ident($($t:ty),*)),* $(,)?) => {
        $(fn $name(self, $(_: $t),*) -> Result<String, GiveUp> {
            Err(GiveUp)
        })*
    };
}

impl Serializer for KeyText {
    type Ok = String;
    type Error = GiveUp;
    type SerializeSeq = ser::Impossible<String, GiveUp>;
    type SerializeTuple = ser::Impossible<String, GiveUp>;
    type SerializeTupleStruct = ser::Impossible<String, GiveUp>;
    type SerializeTupleVariant = ser::Impossible<String, GiveUp>;
    type SerializeMap = ser::Impossible<String, GiveUp>;
    type SerializeStruct = ser::Impossible<String, GiveUp>;
    type SerializeStructVariant = ser::Impossible<String, GiveUp>;

    fn serialize_str(self, v: &str) -> Result<String, GiveUp> {
        Ok(v.to_string())
    }
    fn serialize_char(self, v: char) -> Result<String, GiveUp> {
        Ok(v.to_string())
    }
    fn serialize_unit_variant(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
    ) -> Result<String, GiveUp> {
        Ok(variant.to_string())
    }
    fn serialize_newtype_struct<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        value: &T,
    ) -> Result<String, GiveUp> {
        value.serialize(self)
    }
    give_up!(
        serialize_bool(bool),
        serialize_i8(i8),
        serialize_i16(i16),
        serialize_i32(i32),
        serialize_i64(i64),
        serialize_u8(u8),
        serialize_u16(u16),
        serialize_u32(u32),
        serialize_u64(u64),
        serialize_f32(f32),
        serialize_f64(f64),
        serialize_bytes(&[u8]),
        serialize_none(),
        serialize_unit(),
        serialize_unit_struct(&'static str),
    );
    fn serialize_some<T: Serialize + ?Sized>(self, _: &T) -> Result<String, GiveUp> {
        Err(GiveUp)
    }
    fn serialize_newtype_variant<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: &T,
    ) -> Result<String, GiveUp> {
        Err(GiveUp)
    }
    fn serialize_seq(self, _: Option<usize>) -> Result<Self::SerializeSeq, GiveUp> {
        Err(GiveUp)
    }
    fn serialize_tuple(self, _: usize) -> Result<Self::SerializeTuple, GiveUp> {
        Err(GiveUp)
    }
    fn serialize_tuple_struct(
        self,
        _: &'static str,
        _: usize,
    ) -> Result<Self::SerializeTupleStruct, GiveUp> {
        Err(GiveUp)
    }
    fn serialize_tuple_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<Self::SerializeTupleVariant, GiveUp> {
        Err(GiveUp)
    }
    fn serialize_map(self, _: Option<usize>) -> Result<Self::SerializeMap, GiveUp> {
        Err(GiveUp)
    }
    fn serialize_struct(self, _: &'static str, _: usize) -> Result<Self::SerializeStruct, GiveUp> {
        Err(GiveUp)
    }
    fn serialize_struct_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<Self::SerializeStructVariant, GiveUp> {
        Err(GiveUp)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde::Serialize;

    /// The old way: `flatten` of `serde_json::to_value`.
    fn via_value<T: Serialize>(v: &T) -> BTreeMap<String, f64> {
        let mut m = BTreeMap::new();
        flatten("", &serde_json::to_value(v).unwrap_or_default(), &mut m);
        m
    }

    #[derive(Serialize)]
    enum Kind {
        Plain,
        Wrapped(f64),
        Pair(f64, f64),
        Shaped { a: f64, b: Option<u8> },
    }

    #[derive(Serialize)]
    struct Inner {
        x: f64,
        flag: bool,
        n: i32,
        big: u64,
        none: Option<f64>,
        nan: f64,
        inf: f32,
        text: &'static str,
        list: Vec<Inner2>,
    }

    #[derive(Serialize)]
    struct Inner2 {
        y: f64,
    }

    #[derive(Serialize)]
    struct Outer {
        top: f64,
        inner: Inner,
        kinds: [Kind; 1],
        plain: Kind,
        wrapped: Kind,
        pair: Kind,
        shaped: Kind,
        after: f32,
        #[serde(flatten)]
        more: BTreeMap<String, f64>,
        tuple: (f64, f64),
        unit: (),
    }

    fn outer() -> Outer {
        Outer {
            top: 1.5,
            inner: Inner {
                x: -0.0,
                flag: true,
                n: -7,
                big: u64::MAX,
                none: None,
                nan: f64::NAN,
                inf: f32::INFINITY,
                text: "t",
                list: vec![Inner2 { y: 2.0 }],
            },
            kinds: [Kind::Wrapped(3.0)],
            plain: Kind::Plain,
            wrapped: Kind::Wrapped(4.25),
            pair: Kind::Pair(1.0, 2.0),
            shaped: Kind::Shaped { a: 5.0, b: Some(6) },
            after: 0.1,
            more: [("m".to_string(), 1e-300), ("n.o".to_string(), 7.0)]
                .into_iter()
                .collect(),
            tuple: (8.0, 9.0),
            unit: (),
        }
    }

    #[test]
    fn direct_flattening_matches_the_json_value() {
        let v = outer();
        let direct = flatten_direct(&v).expect("flattened directly");
        assert_eq!(direct, via_value(&v));
        assert_eq!(direct["shaped.Shaped.a"], 5.0);
        assert_eq!(direct["shaped.Shaped.b"], 6.0);
        assert_eq!(direct["after"], f64::from(0.1f32));
        assert!(!direct.contains_key("inner.nan"));
        assert!(direct["inner.x"].is_sign_negative());
        // Again with the same paths (the layout kept from the first) and
        // other numbers, one of them no longer finite.
        let mut again = outer();
        again.top = f64::NAN;
        again.inner.nan = 3.0;
        let direct = flatten_direct(&again).expect("flattened directly");
        assert_eq!(direct, via_value(&again));
        assert!(!direct.contains_key("top"));
        assert_eq!(direct["inner.nan"], 3.0);
    }

    #[test]
    fn clashing_paths_fall_back_to_the_json_value() {
        // "a.b" written twice: once as a key with a dot, once nested. The
        // JSON value keeps the later in its key order; the direct way
        // gives up rather than guess.
        #[derive(Serialize)]
        struct A {
            b: f64,
        }
        #[derive(Serialize)]
        struct Clash {
            #[serde(rename = "a.b")]
            dotted: f64,
            a: A,
        }
        let v = Clash {
            dotted: 1.0,
            a: A { b: 2.0 },
        };
        assert!(flatten_direct(&v).is_none());
        // Map keys that are not text give up too.
        let m: BTreeMap<u8, f64> = [(1, 1.0)].into_iter().collect();
        assert!(flatten_direct(&m).is_none());
    }

    #[test]
    fn the_starters_metrics_are_those_of_the_json_value() {
        for text in [
            include_str!("../../examples/fin-actuator.toml"),
            include_str!("../../examples/motor-stator.toml"),
            include_str!("../../examples/puck-receive.toml"),
        ] {
            let (d, l) = crate::pipeline::parse_and_build(text).expect("starter builds");
            let a = crate::physics::analyse_with(&d, &l, crate::physics::Detail::Metrics)
                .expect("analysis");
            let old = metrics(&d, &l, &[], &serde_json::to_value(&a).expect("json"));
            let new = metrics_of(&d, &l, &[], &a);
            assert_eq!(
                flatten_direct(&a).map(|m| m.len()),
                Some(via_value(&a).len())
            );
            assert_eq!(old.len(), new.len());
            for ((k0, v0), (k1, v1)) in old.iter().zip(&new) {
                assert_eq!(k0, k1);
                assert_eq!(v0.to_bits(), v1.to_bits(), "{k0}");
            }
        }
    }
}
