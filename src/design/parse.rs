//! Reading a design file (TOML) into a validated [`Design`].
//!
//! Every value is read with its byte span, so that each problem points at
//! the key or value it is about. Problems are collected rather than
//! stopping at the first, as far as later checks do not depend on earlier
//! values. A [`Design`] returned by [`parse`] has all three sizes resolved
//! and always builds (`geometry::build` succeeds).

use super::error::{DesignError, DesignErrors};
use super::model::*;
use super::units::{
    CopperWeight, Current, Frequency, Length, Quantity, Remanence, Temperature, Voltage,
};
use crate::geometry::{self, FitError, FitInput, GeometryError, TurnsRequest};
use std::ops::Range;
use toml::Spanned;
use toml::de::{DeTable, DeValue};

/// Current used when a design gives neither voltage nor current, A.
pub const DEFAULT_CURRENT_A: f64 = 0.1;

/// Most turns per layer coilwright builds.
pub const MAX_TURNS: f64 = 5000.0;

/// Largest outer size accepted, mm.
pub const MAX_SIZE_MM: f64 = 1000.0;

const ROOT_KEYS: &[&str] = &[
    "name", "coil", "stackup", "via", "terminal", "board", "rules", "magnet", "drive",
];
const TABLES: &[&str] = &[
    "coil", "stackup", "via", "terminal", "board", "rules", "magnet", "drive",
];
const COIL_KEYS: &[&str] = &[
    "shape",
    "sides",
    "width",
    "height",
    "outer_diameter",
    "inner_diameter",
    "turns",
    "trace_width",
    "clearance",
    "layers",
    "wiring",
    "corner",
    "corner_radius",
];
const STACKUP_KEYS: &[&str] = &[
    "kind",
    "copper",
    "dielectric",
    "dielectric_material",
    "dielectric_constant",
    "plating",
    "cover",
    "bend_radius",
    "bend",
];
const HOLE_KEYS: &[&str] = &["drill", "diameter"];
const BOARD_KEYS: &[&str] = &["margin"];
const RULES_KEYS: &[&str] = &crate::rules::key_list::<1, 7>(["profile"]);
const MAGNET_KEYS: &[&str] = &["diameter", "thickness", "remanence", "gap"];
const DRIVE_KEYS: &[&str] = &[
    "voltage",
    "current",
    "ambient",
    "max_temperature",
    "frequency",
    "convection",
    "emissivity",
];

/// Keys allowed in each table (the root is "").
fn keys_of(table: &str) -> &'static [&'static str] {
    match table {
        "" => ROOT_KEYS,
        "coil" => COIL_KEYS,
        "stackup" => STACKUP_KEYS,
        "via" | "terminal" => HOLE_KEYS,
        "board" => BOARD_KEYS,
        "rules" => RULES_KEYS,
        "magnet" => MAGNET_KEYS,
        "drive" => DRIVE_KEYS,
        _ => &[],
    }
}

/// The nearest candidate to `word`, if it is close enough to be a typo.
pub fn nearest<'c>(word: &str, candidates: &[&'c str]) -> Option<&'c str> {
    candidates
        .iter()
        .map(|c| (strsim::damerau_levenshtein(word, c), *c))
        .filter(|(d, c)| *d <= 2.max(c.len() / 3))
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c)
}

/// Whether zero (and what else) is allowed for a value.
#[derive(Clone, Copy, PartialEq)]
enum Sign {
    /// Greater than zero.
    Positive,
    /// Zero or more.
    NonNegative,
    /// Anything finite (temperatures).
    Any,
}

/// A table of the design file, possibly absent.
struct Table<'a, 'i> {
    /// Dotted path ("" for the root).
    path: &'static str,
    /// Entries; `None` when the table is absent (or not a table).
    map: Option<&'a DeTable<'i>>,
    /// Span of the table's header key, if any.
    span: Option<Range<usize>>,
}

impl<'a, 'i> Table<'a, 'i> {
    fn key(&self, k: &str) -> String {
        if self.path.is_empty() {
            k.to_string()
        } else {
            format!("{}.{k}", self.path)
        }
    }

    fn get(&self, k: &str) -> Option<&'a Spanned<DeValue<'i>>> {
        self.map?
            .iter()
            .find(|(key, _)| key.get_ref().as_ref() == k)
            .map(|(_, v)| v)
    }

    fn has(&self, k: &str) -> bool {
        self.get(k).is_some()
    }

    fn span_of(&self, k: &str) -> Option<Range<usize>> {
        self.get(k).map(|v| v.span()).or_else(|| self.span.clone())
    }

    fn present(&self) -> bool {
        self.map.is_some()
    }
}

/// A scalar read from the file: a number or a string.
enum Scalar<'v> {
    Number(f64),
    Text(&'v str),
}

/// Collects problems while reading.
struct Ctx {
    errors: Vec<DesignError>,
}

impl Ctx {
    fn err(
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

    /// Reports keys that the table does not know.
    fn check_keys(&mut self, t: &Table) {
        let Some(map) = t.map else { return };
        let allowed = keys_of(t.path);
        for (k, v) in map.iter() {
            let name = k.get_ref().as_ref();
            if allowed.contains(&name) {
                continue;
            }
            let is_table = matches!(v.get_ref(), DeValue::Table(_));
            let what = if is_table && t.path.is_empty() {
                format!("unknown table [{name}]")
            } else {
                format!("unknown key `{}`", t.key(name))
            };
            let mut help = nearest(name, allowed).map(|n| format!("did you mean `{n}`?"));
            if help.is_none() {
                let home = TABLES
                    .iter()
                    .find(|tab| **tab != t.path && keys_of(tab).contains(&name));
                if let Some(home) = home {
                    help = Some(format!("`{name}` belongs in the [{home}] table"));
                }
            }
            let help = help.or_else(|| {
                Some(format!(
                    "allowed {}: {}",
                    if t.path.is_empty() {
                        "at the top level".to_string()
                    } else {
                        format!("in [{}]", t.path)
                    },
                    allowed.join(", ")
                ))
            });
            self.err(t.key(name), Some(k.span()), what, help);
        }
    }

    /// A sub-table of the root; absent if missing or not a table.
    fn table<'a, 'i>(&mut self, root: &Table<'a, 'i>, name: &'static str) -> Table<'a, 'i> {
        let entry = root
            .map
            .and_then(|m| m.iter().find(|(k, _)| k.get_ref().as_ref() == name));
        match entry {
            None => Table {
                path: name,
                map: None,
                span: None,
            },
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
                        format!("`{name}` must be a table, found {}", other.type_str()),
                        Some(format!("write it as a [{name}] section")),
                    );
                    Table {
                        path: name,
                        map: None,
                        span: None,
                    }
                }
            },
        }
    }

    fn missing(&mut self, t: &Table, k: &str, help: Option<String>) {
        let where_ = if t.path.is_empty() {
            "the design file".to_string()
        } else {
            format!("[{}]", t.path)
        };
        self.err(
            t.key(k),
            t.span.clone(),
            format!("`{}` is required in {where_}", t.key(k)),
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
                        format!(
                            "`{}` must be a finite number, found {}",
                            t.key(k),
                            f.as_str()
                        ),
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
                    format!(
                        "`{}` must be a number or a string, found {}",
                        t.key(k),
                        other.type_str()
                    ),
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
                    format!("`{}`: {}", t.key(k), e.message),
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
                        format!("`{}` must be {need}", t.key(k)),
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
    fn quantity<Q: Quantity>(&mut self, t: &Table, k: &str, sign: Sign) -> Option<Q> {
        let v = t.get(k)?;
        self.quantity_value(t, k, v, sign)
    }

    /// An optional length, mm.
    fn length(&mut self, t: &Table, k: &str, sign: Sign) -> Option<f64> {
        self.quantity::<Length>(t, k, sign).map(Length::mm)
    }

    /// A required length, mm (0 when missing or bad; an error is recorded).
    fn req_length(&mut self, t: &Table, k: &str, sign: Sign) -> f64 {
        if !t.has(k) {
            self.missing(t, k, Some(format!("allowed: {}", Length::ALLOWED)));
            return 0.0;
        }
        self.length(t, k, sign).unwrap_or(0.0)
    }

    /// An optional plain number (no unit) within `lo..=hi`.
    fn number(&mut self, t: &Table, k: &str, lo: f64, hi: f64, allowed: &str) -> Option<f64> {
        let v = t.get(k)?;
        match self.scalar(t, k, v, allowed)? {
            Scalar::Number(x) if (lo..=hi).contains(&x) => Some(x),
            Scalar::Number(x) => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    format!("`{}` is {x}, out of range", t.key(k)),
                    Some(format!("allowed: {allowed}")),
                );
                None
            }
            Scalar::Text(s) => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    format!("`{}` must be a plain number, found \"{s}\"", t.key(k)),
                    Some(format!("allowed: {allowed}")),
                );
                None
            }
        }
    }

    /// An optional integer within `lo..=hi`.
    fn integer(&mut self, t: &Table, k: &str, lo: i64, hi: i64) -> Option<i64> {
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
                            format!("`{}` is {}; it must be {lo} to {hi}", t.key(k), i.as_str()),
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
                    format!(
                        "`{}` must be a whole number, found {}",
                        t.key(k),
                        other.type_str()
                    ),
                    Some(allowed),
                );
                None
            }
        }
    }

    /// An optional string.
    fn string<'a>(&mut self, t: &Table<'a, '_>, k: &str) -> Option<&'a str> {
        let v = t.get(k)?;
        match v.get_ref() {
            DeValue::String(s) => Some(s.as_ref()),
            other => {
                self.err(
                    t.key(k),
                    Some(v.span()),
                    format!(
                        "`{}` must be a string, found {}",
                        t.key(k),
                        other.type_str()
                    ),
                    None,
                );
                None
            }
        }
    }

    /// An optional choice among `names`; returns the index.
    fn choice(&mut self, t: &Table, k: &str, names: &[&str]) -> Option<usize> {
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
        let help = match nearest(s, names) {
            Some(n) => format!("did you mean \"{n}\"? allowed: {list}"),
            None => format!("allowed: {list}"),
        };
        self.err(
            t.key(k),
            Some(v.span()),
            format!("unknown {} \"{s}\"", k.replace('_', " ")),
            Some(help),
        );
        None
    }

    /// One value or an array of `count` values (when `count` is known).
    fn per_layer<Q: Quantity>(
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
                            "`{}` lists {} values but the coil needs {n} ({what})",
                            t.key(k),
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

/// Reads and validates a design file.
///
/// Returns every problem found (at least one) with the dotted key and the
/// byte span it is about. Defaults are documented in the README's key
/// reference.
pub fn parse(text: &str) -> Result<Design, DesignErrors> {
    parse_and_build(text).map(|(design, _)| design)
}

/// Like [`parse`], and also returns the copper that validation built (so
/// callers that need the layout do not build it a second time).
pub fn parse_and_build(text: &str) -> Result<(Design, geometry::Board), DesignErrors> {
    let doc = DeTable::parse(text).map_err(|e| DesignError {
        key: "syntax".into(),
        span: e.span(),
        message: format!("TOML syntax error: {}", e.message().trim()),
        help: Some("see https://toml.io for the file syntax".into()),
    })?;
    let mut cx = Ctx { errors: Vec::new() };
    let root = Table {
        path: "",
        map: Some(doc.get_ref()),
        span: None,
    };
    cx.check_keys(&root);

    // name
    let name = cx.string(&root, "name").unwrap_or("coil").to_string();
    let name_ok = !name.is_empty()
        && name.len() <= 100
        && !name.starts_with('.')
        && name
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || matches!(c, '-' | '_' | '.'));
    if !name_ok && root.has("name") {
        cx.err(
            "name",
            root.span_of("name"),
            format!("name \"{name}\" cannot be used as a file name"),
            Some(
                "use letters, digits, '-', '_' and '.', not starting with '.', at most 100 characters"
                    .into(),
            ),
        );
    }

    let coil_t = cx.table(&root, "coil");
    let stack_t = cx.table(&root, "stackup");
    let via_t = cx.table(&root, "via");
    let term_t = cx.table(&root, "terminal");
    let board_t = cx.table(&root, "board");
    let rules_t = cx.table(&root, "rules");
    let magnet_t = cx.table(&root, "magnet");
    let drive_t = cx.table(&root, "drive");

    // [coil]
    let coil_in = read_coil(&mut cx, &coil_t);
    let layers = coil_in.as_ref().and_then(|c| c.layers);

    // [stackup]
    let stackup = read_stackup(&mut cx, &stack_t, layers);

    // [via], [terminal], [board]
    let via = read_hole(&mut cx, &via_t, 0.2, 0.45);
    let terminal = read_hole(&mut cx, &term_t, 0.4, 0.8);
    let margin = cx
        .length(&board_t, "margin", Sign::NonNegative)
        .unwrap_or(0.5);

    // [rules]
    let rules = read_rules(&mut cx, &rules_t);
    let magnet = read_magnet(&mut cx, &magnet_t);
    let drive = read_drive(&mut cx, &drive_t);

    if !cx.errors.is_empty() {
        return Err(DesignErrors { errors: cx.errors });
    }
    let Some(c) = coil_in else {
        return Err(DesignError {
            key: "coil".into(),
            span: None,
            message: "the design needs a [coil] table".into(),
            help: Some("start from `coilwright init FILE`".into()),
        }
        .into());
    };
    let layers = c.layers.unwrap_or(1);

    // Sizes.
    let min_id = geometry::min_inner_diameter(
        &c.shape,
        layers,
        c.wiring,
        c.clearance,
        c.trace_width,
        via.diameter,
        terminal.diameter,
    );
    let fit = FitInput {
        shape: c.shape,
        corner: c.corner,
        trace_width: c.trace_width,
        clearance: c.clearance,
        outer_diameter: c.outer_diameter,
        inner_diameter: c.inner_diameter,
        turns: c.turns,
        min_inner_diameter: min_id,
    }
    .resolve()
    .map_err(|e| fit_error(e, &coil_t, &c))?;

    let design = Design {
        name,
        coil: Coil {
            shape: c.shape,
            outer_diameter: fit.outer_diameter,
            inner_diameter: fit.inner_diameter,
            turns: fit.turns,
            trace_width: c.trace_width,
            clearance: c.clearance,
            layers,
            wiring: c.wiring,
            corner: c.corner,
        },
        stackup,
        via,
        terminal,
        board: BoardSettings { margin },
        rules,
        magnet,
        drive,
    };
    let layout = match geometry::build(&design) {
        Ok(layout) => layout,
        Err(e) => {
            let (key, help) = match &e {
            GeometryError::Layers(_) => ("coil.layers", None),
            GeometryError::OddParallel(_) => (
                "coil.wiring",
                Some("use an even number of layers or wiring = \"series\"".to_string()),
            ),
            GeometryError::OuterCrowded { .. } => (
                "coil",
                Some(
                    "the vias outside the winding need room: use fewer layers, smaller vias or a larger coil"
                        .to_string(),
                ),
            ),
            GeometryError::Spiral(_) => ("coil", None),
            GeometryError::InnerTooSmall { .. } => (
                "coil.inner_diameter",
                Some("make the free centre larger, or use smaller vias or terminal pads".to_string()),
            ),
        };
            let span = match key {
                "coil.layers" => coil_t.span_of("layers"),
                "coil.wiring" => coil_t.span_of("wiring"),
                "coil.inner_diameter" => coil_t.span_of("inner_diameter").or(coil_t.span.clone()),
                _ => coil_t.span.clone(),
            };
            return Err(DesignError {
                key: key.into(),
                span,
                message: format!("the coil cannot be built: {e}"),
                help,
            }
            .into());
        }
    };
    Ok((design, layout))
}

/// What [coil] asked for, before the sizes are resolved.
struct CoilInput {
    shape: Shape,
    outer_diameter: Option<f64>,
    inner_diameter: Option<f64>,
    turns: Option<TurnsRequest>,
    trace_width: f64,
    clearance: f64,
    layers: Option<u8>,
    wiring: Wiring,
    corner: Corner,
}

fn read_coil(cx: &mut Ctx, t: &Table) -> Option<CoilInput> {
    if !t.present() {
        if t.span.is_none() && cx.errors.iter().all(|e| e.key != "coil") {
            cx.err(
                "coil",
                None,
                "the design needs a [coil] table",
                Some("start from `coilwright init FILE`, or add [coil] with trace_width, clearance, layers and two of outer_diameter, inner_diameter, turns".into()),
            );
        }
        return None;
    }
    let shape_i = cx
        .choice(t, "shape", &["circle", "polygon", "rectangle"])
        .unwrap_or(0);
    let trace_width = cx.req_length(t, "trace_width", Sign::Positive);
    let clearance = cx.req_length(t, "clearance", Sign::Positive);

    // Shape-specific keys.
    let mut shape = Shape::Circle;
    match shape_i {
        1 => {
            if t.has("sides") {
                if let Some(n) = cx.integer(t, "sides", 3, 12) {
                    shape = Shape::Polygon { sides: n as u8 };
                }
            } else {
                cx.missing(t, "sides", Some("a polygon needs sides = 3 to 12".into()));
            }
        }
        2 => {
            let w = cx.req_length(t, "width", Sign::Positive);
            let h = cx.req_length(t, "height", Sign::Positive);
            shape = Shape::Rectangle {
                width: w,
                height: h,
            };
        }
        _ => {}
    }
    if shape_i != 1 && t.has("sides") {
        cx.err(
            t.key("sides"),
            t.span_of("sides"),
            "`coil.sides` is only used with shape = \"polygon\"",
            Some("remove it, or set shape = \"polygon\"".into()),
        );
    }
    if shape_i != 2 {
        for k in ["width", "height"] {
            if t.has(k) {
                cx.err(
                    t.key(k),
                    t.span_of(k),
                    format!("`coil.{k}` is only used with shape = \"rectangle\""),
                    Some("circles and polygons take outer_diameter".into()),
                );
            }
        }
    }

    // Sizes: exactly two of outer_diameter, inner_diameter, turns.
    let od = if shape_i == 2 && t.has("outer_diameter") {
        cx.err(
            t.key("outer_diameter"),
            t.span_of("outer_diameter"),
            "a rectangle takes width and height instead of outer_diameter",
            Some(
                "remove outer_diameter; give width, height and one of inner_diameter or turns"
                    .into(),
            ),
        );
        None
    } else {
        cx.length(t, "outer_diameter", Sign::Positive)
    };
    let id = cx.length(t, "inner_diameter", Sign::Positive);
    let turns = match t.get("turns") {
        None => None,
        Some(v) => match v.get_ref() {
            DeValue::String(s) if s.as_ref() == "max" => Some(TurnsRequest::Max),
            _ => cx
                .number(
                    t,
                    "turns",
                    f64::MIN_POSITIVE,
                    MAX_TURNS,
                    &format!("a number of turns per layer above 0 and at most {MAX_TURNS} (fractions allowed), or \"max\""),
                )
                .map(TurnsRequest::Count),
        },
    };
    let given: Vec<&str> = ["outer_diameter", "inner_diameter", "turns"]
        .into_iter()
        .filter(|k| t.has(k) && !(shape_i == 2 && *k == "outer_diameter"))
        .collect();
    // Point at the size key written last in the file (the likely extra one).
    let last_given = given
        .iter()
        .copied()
        .max_by_key(|k| t.get(k).map_or(0, |v| v.span().start));
    if shape_i == 2 {
        if given.len() != 1 {
            cx.err(
                "coil",
                t.span_of(last_given.unwrap_or("width")),
                format!(
                    "a rectangle takes width and height plus exactly one of inner_diameter or turns; found {}",
                    if given.is_empty() { "neither".to_string() } else { given.join(" and ") }
                ),
                Some("turns may be \"max\" to fit as many as possible".into()),
            );
        }
    } else {
        if given.len() != 2 {
            cx.err(
                "coil",
                t.span_of(last_given.unwrap_or("shape")),
                format!(
                    "give exactly two of outer_diameter, inner_diameter and turns; found {}",
                    if given.is_empty() { "none".to_string() } else { format!("{} ({})", given.len(), given.join(", ")) }
                ),
                Some("the third is computed; turns = \"max\" with outer_diameter fits as many turns as possible".into()),
            );
        }
        if matches!(turns, Some(TurnsRequest::Max)) && !t.has("outer_diameter") {
            cx.err(
                t.key("turns"),
                t.span_of("turns"),
                "turns = \"max\" needs outer_diameter",
                Some("give outer_diameter and turns = \"max\", or a number of turns".into()),
            );
        }
    }

    // Size sanity: keeps the fit and the geometry to sensible amounts of work.
    let outer_size = match shape {
        Shape::Rectangle { width, height } => Some(width.max(height)),
        _ => od,
    };
    if let Some(s) = outer_size
        && s > MAX_SIZE_MM
    {
        let k = if shape_i == 2 {
            "width"
        } else {
            "outer_diameter"
        };
        cx.err(
            t.key(k),
            t.span_of(k),
            format!("{s} mm is larger than the {MAX_SIZE_MM} mm coilwright handles"),
            None,
        );
    } else if let Some(id) = id
        && id > MAX_SIZE_MM
    {
        cx.err(
            t.key("inner_diameter"),
            t.span_of("inner_diameter"),
            format!("{id} mm is larger than the {MAX_SIZE_MM} mm coilwright handles"),
            None,
        );
    } else if let Some(s) = outer_size
        && trace_width > 0.0
        && clearance > 0.0
    {
        let est = s / (2.0 * (trace_width + clearance));
        if est > MAX_TURNS {
            cx.err(
                t.key("trace_width"),
                t.span_of("trace_width"),
                format!(
                    "with this trace width and clearance about {est:.0} turns would fit on a layer; coilwright builds at most {MAX_TURNS}"
                ),
                Some("use a wider trace, a larger clearance or a smaller coil".into()),
            );
        }
    }

    let layers = if t.has("layers") {
        cx.integer(t, "layers", 1, 32).map(|n| n as u8)
    } else {
        cx.missing(t, "layers", Some("a whole number from 1 to 32".into()));
        None
    };
    let wiring = match cx.choice(t, "wiring", &["series", "parallel-pairs"]) {
        Some(1) => Wiring::ParallelPairs,
        _ => Wiring::Series,
    };
    if wiring == Wiring::ParallelPairs
        && let Some(n) = layers
        && !n.is_multiple_of(2)
    {
        cx.err(
            t.key("wiring"),
            t.span_of("wiring"),
            format!("parallel-pairs wiring needs an even number of layers, but layers = {n}"),
            Some("use an even number of layers or wiring = \"series\"".into()),
        );
    }
    let round = cx.choice(t, "corner", &["sharp", "round"]) == Some(1);
    if shape_i == 0 && t.has("corner") {
        cx.err(
            t.key("corner"),
            t.span_of("corner"),
            "`coil.corner` applies to polygons and rectangles, not circles",
            Some("remove it".into()),
        );
    }
    let radius = cx.length(t, "corner_radius", Sign::Positive);
    if t.has("corner_radius") && !round {
        cx.err(
            t.key("corner_radius"),
            t.span_of("corner_radius"),
            "`coil.corner_radius` needs corner = \"round\"",
            Some("add corner = \"round\" or remove corner_radius".into()),
        );
    }
    let corner = if round {
        Corner::Round {
            radius: radius.unwrap_or(trace_width + clearance),
        }
    } else {
        Corner::Sharp
    };
    Some(CoilInput {
        shape,
        outer_diameter: od,
        inner_diameter: id,
        turns,
        trace_width,
        clearance,
        layers,
        wiring,
        corner,
    })
}

fn fit_error(e: FitError, t: &Table, c: &CoilInput) -> DesignErrors {
    let rect = matches!(c.shape, Shape::Rectangle { .. });
    let size_key = if rect { "width" } else { "outer_diameter" };
    let (key, help) = match &e {
        FitError::NeedTwo => ("coil", None),
        FitError::TooManyTurns { max, .. } => (
            "turns",
            Some(format!(
                "use turns = {max:.2} or less, turns = \"max\", a larger outer size or a narrower trace"
            )),
        ),
        FitError::InnerTooSmall { min, .. } => {
            let k = if c.inner_diameter.is_some() {
                "inner_diameter"
            } else {
                size_key
            };
            (
                k,
                Some(format!(
                    "use inner_diameter = \"{min:.3}mm\" or more, or smaller vias ([via] diameter)"
                )),
            )
        }
        FitError::InnerNotInside => (
            if c.inner_diameter.is_some() {
                "inner_diameter"
            } else {
                size_key
            },
            Some("the inner diameter must leave room for at least part of a turn inside the outer size".into()),
        ),
        FitError::CornerTooLarge { max, .. } => (
            "corner_radius",
            Some(format!("use corner_radius below {max:.3} mm")),
        ),
    };
    let (full, span) = if key == "coil" {
        ("coil".to_string(), t.span.clone())
    } else {
        let span = if key == "corner_radius" && !t.has(key) {
            t.span_of("corner")
        } else {
            t.span_of(key)
        };
        (t.key(key), span)
    };
    let message = match &e {
        FitError::InnerTooSmall { given, min } if c.inner_diameter.is_none() => format!(
            "no turn fits: the free centre of {given:.3} mm needed for the centre vias leaves no room (minimum inner diameter is {min:.3} mm)"
        ),
        _ => e.to_string(),
    };
    DesignError {
        key: full,
        span,
        message,
        help,
    }
    .into()
}

fn read_stackup(cx: &mut Ctx, t: &Table, layers: Option<u8>) -> Stackup {
    let kind = match cx.choice(t, "kind", &["flex", "rigid"]) {
        Some(1) => BoardKind::Rigid,
        _ => BoardKind::Flex,
    };
    let flex = kind == BoardKind::Flex;
    let n = layers.map(usize::from);
    let copper = cx
        .per_layer::<CopperWeight>(t, "copper", n, "one per copper layer")
        .unwrap_or_else(|| vec![0.035; n.unwrap_or(1)]);
    if let Some(max) = copper.iter().copied().reduce(f64::max)
        && max > 0.5
    {
        cx.err(
            t.key("copper"),
            t.span_of("copper"),
            format!("copper {max} mm thick is implausible (more than 0.5 mm)"),
            Some("a bare number is millimetres; write weights with oz, e.g. \"1oz\"".into()),
        );
    }
    let default_diel = if flex { 0.05 } else { 0.2 };
    let gaps = n.map(|n| n.saturating_sub(1));
    let dielectric = if n == Some(1)
        && !matches!(
            t.get("dielectric").map(|v| v.get_ref()),
            Some(DeValue::Array(_))
        ) {
        // A single layer has no gap between copper layers.
        let _ = cx.quantity::<Length>(t, "dielectric", Sign::Positive);
        Vec::new()
    } else {
        cx.per_layer::<Length>(t, "dielectric", gaps, "one per gap between copper layers")
            .unwrap_or_else(|| vec![default_diel; gaps.unwrap_or(0)])
    };
    let dielectric_material = match cx.string(t, "dielectric_material") {
        Some("") => {
            cx.err(
                t.key("dielectric_material"),
                t.span_of("dielectric_material"),
                "`stackup.dielectric_material` is empty",
                Some("e.g. \"Polyimide\" or \"FR4\"".into()),
            );
            String::new()
        }
        Some(s) => s.to_string(),
        None => if flex { "Polyimide" } else { "FR4" }.to_string(),
    };
    let dielectric_constant = cx
        .number(
            t,
            "dielectric_constant",
            1.0,
            100.0,
            "relative permittivity, a number from 1 to 100 (e.g. 3.4 polyimide, 4.5 FR4)",
        )
        .unwrap_or(if flex { 3.4 } else { 4.5 });
    let plating = cx.length(t, "plating", Sign::Positive).unwrap_or(0.02);
    let cover =
        cx.length(t, "cover", Sign::NonNegative)
            .unwrap_or(if flex { 0.0375 } else { 0.02 });
    let radius = cx.length(t, "bend_radius", Sign::Positive);
    let bend_kind = match cx.choice(t, "bend", &["static", "dynamic"]) {
        Some(1) => BendKind::Dynamic,
        _ => BendKind::Static,
    };
    if t.has("bend_radius") && !flex {
        cx.err(
            t.key("bend_radius"),
            t.span_of("bend_radius"),
            "`stackup.bend_radius` applies to flexible boards only",
            Some("set kind = \"flex\" or remove bend_radius".into()),
        );
    }
    if t.has("bend") && !t.has("bend_radius") {
        cx.err(
            t.key("bend"),
            t.span_of("bend"),
            "`stackup.bend` needs bend_radius",
            Some("add bend_radius, e.g. \"5mm\"".into()),
        );
    }
    Stackup {
        kind,
        copper,
        dielectric,
        dielectric_material,
        dielectric_constant,
        plating,
        cover,
        bend: radius.map(|radius| Bend {
            radius,
            kind: bend_kind,
        }),
    }
}

fn read_hole(cx: &mut Ctx, t: &Table, drill: f64, diameter: f64) -> HoleSize {
    let d = cx.length(t, "drill", Sign::Positive).unwrap_or(drill);
    let p = cx.length(t, "diameter", Sign::Positive).unwrap_or(diameter);
    if p <= d {
        let k = if t.has("diameter") {
            "diameter"
        } else {
            "drill"
        };
        cx.err(
            t.key(k),
            t.span_of(k),
            format!(
                "[{}] pad diameter {p} mm must exceed the drill {d} mm",
                t.path
            ),
            Some(
                "the pad is the copper ring around the hole: make diameter larger than drill"
                    .into(),
            ),
        );
    }
    HoleSize {
        drill: d,
        diameter: p,
    }
}

fn read_rules(cx: &mut Ctx, t: &Table) -> RulesRequest {
    let profile = match cx.string(t, "profile") {
        Some("") => {
            cx.err(
                t.key("profile"),
                t.span_of("profile"),
                "`rules.profile` is empty",
                Some(
                    "a built-in profile name such as \"standard\", or a path to a profile file"
                        .into(),
                ),
            );
            String::new()
        }
        Some(s) => s.to_string(),
        None => "standard".to_string(),
    };
    let overrides = RuleOverrides {
        min_trace_width: cx.length(t, "min_trace_width", Sign::Positive),
        min_clearance: cx.length(t, "min_clearance", Sign::Positive),
        min_drill: cx.length(t, "min_drill", Sign::Positive),
        min_annular_ring: cx.length(t, "min_annular_ring", Sign::NonNegative),
        min_hole_spacing: cx.length(t, "min_hole_spacing", Sign::NonNegative),
        min_edge_clearance: cx.length(t, "min_edge_clearance", Sign::NonNegative),
    };
    RulesRequest { profile, overrides }
}

fn read_magnet(cx: &mut Ctx, t: &Table) -> Option<Magnet> {
    if !t.present() {
        return None;
    }
    for k in MAGNET_KEYS {
        if !t.has(k) {
            cx.missing(
                t,
                k,
                Some("a [magnet] needs diameter, thickness, remanence and gap".into()),
            );
        }
    }
    let diameter = cx.length(t, "diameter", Sign::Positive);
    let thickness = cx.length(t, "thickness", Sign::Positive);
    let remanence = cx
        .quantity::<Remanence>(t, "remanence", Sign::Positive)
        .map(Remanence::tesla);
    let gap = cx.length(t, "gap", Sign::NonNegative);
    Some(Magnet {
        diameter: diameter?,
        thickness: thickness?,
        remanence: remanence?,
        gap: gap?,
    })
}

fn read_drive(cx: &mut Ctx, t: &Table) -> Drive {
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

#[cfg(test)]
mod tests {
    use super::*;

    const BASE: &str = r#"
name = "t"
[coil]
outer_diameter = "20mm"
turns = 10
trace_width = "0.1mm"
clearance = "0.1mm"
layers = 4
"#;

    fn err(text: &str) -> DesignErrors {
        parse(text).expect_err("should fail")
    }

    fn with(extra_coil: &str) -> String {
        BASE.replace("layers = 4\n", &format!("layers = 4\n{extra_coil}\n"))
    }

    #[test]
    fn minimal_design_gets_defaults() {
        let d = parse(BASE).unwrap();
        assert_eq!(d.name, "t");
        assert_eq!(d.coil.shape, Shape::Circle);
        assert_eq!(d.coil.layers, 4);
        assert_eq!(d.coil.turns, 10.0);
        assert!((d.coil.outer_diameter - 20.0).abs() < 1e-6);
        assert!(d.coil.inner_diameter > 0.0 && d.coil.inner_diameter < 20.0);
        assert_eq!(d.stackup.kind, BoardKind::Flex);
        assert_eq!(d.stackup.copper, vec![0.035; 4]);
        assert_eq!(d.stackup.dielectric, vec![0.05; 3]);
        assert_eq!(d.stackup.dielectric_material, "Polyimide");
        assert_eq!(d.via.drill, 0.2);
        assert_eq!(d.terminal.diameter, 0.8);
        assert_eq!(d.board.margin, 0.5);
        assert_eq!(d.rules.profile, "standard");
        assert_eq!(d.magnet, None);
        assert_eq!(d.drive.source, Source::Current(DEFAULT_CURRENT_A));
        assert_eq!(d.drive.ambient, 25.0);
        assert_eq!(d.drive.max_temperature, 80.0);
        assert_eq!(d.drive.emissivity, 0.9);
        geometry::build(&d).unwrap();
    }

    #[test]
    fn units_and_tables_are_read() {
        let text = format!(
            "{BASE}[stackup]\nkind = \"rigid\"\ncopper = [\"1oz\", \"0.5oz\", \"0.5oz\", \"1oz\"]\ndielectric = \"8mil\"\n\
             [magnet]\ndiameter = 5\nthickness = \"2mm\"\nremanence = \"1.3T\"\ngap = \"500um\"\n\
             [drive]\nvoltage = \"3.3V\"\nambient = \"30C\"\nfrequency = \"100kHz\"\n"
        );
        let d = parse(&text).unwrap();
        assert_eq!(d.stackup.kind, BoardKind::Rigid);
        assert_eq!(d.stackup.copper, vec![0.035, 0.0175, 0.0175, 0.035]);
        assert!((d.stackup.dielectric[0] - 0.2032).abs() < 1e-12);
        assert_eq!(d.stackup.dielectric_material, "FR4");
        let m = d.magnet.unwrap();
        assert_eq!((m.diameter, m.thickness, m.remanence), (5.0, 2.0, 1.3));
        assert!((m.gap - 0.5).abs() < 1e-12);
        assert_eq!(d.drive.source, Source::Voltage(3.3));
        assert_eq!(d.drive.frequency, Some(1e5));
    }

    #[test]
    fn errors_name_key_and_span() {
        let text = BASE.replace("\"0.1mm\"\nclearance", "\"-0.1mm\"\nclearance");
        let e = err(&text);
        let first = e.first();
        assert_eq!(first.key, "coil.trace_width");
        let span = first.span.clone().unwrap();
        assert_eq!(&text[span], "\"-0.1mm\"");
    }

    #[test]
    fn unknown_key_suggests_nearest() {
        let e = err(&BASE.replace("trace_width", "trace_widht"));
        assert!(e.has_key("coil.trace_widht"), "{e}");
        let u = e
            .errors
            .iter()
            .find(|x| x.key == "coil.trace_widht")
            .unwrap();
        assert!(u.help.as_deref().unwrap().contains("trace_width"));
        let e = err(&format!("{BASE}[coill]\nx = 1\n"));
        assert!(e.first().message.contains("unknown table [coill]"), "{e}");
    }

    #[test]
    fn several_errors_are_collected() {
        let text = BASE
            .replace("\"0.1mm\"\nclearance", "0\nclearance")
            .replace("layers = 4", "layers = 40");
        let e = err(&text);
        assert!(
            e.has_key("coil.trace_width") && e.has_key("coil.layers"),
            "{e}"
        );
    }

    #[test]
    fn fit_errors_map_to_keys() {
        let e = err(&BASE.replace("turns = 10", "turns = 100"));
        assert_eq!(e.first().key, "coil.turns");
        assert!(e.first().message.contains("at most"), "{e}");
        let e = err(&BASE.replace("turns = 10", "inner_diameter = \"0.3mm\""));
        assert_eq!(e.first().key, "coil.inner_diameter");
        assert!(e.first().message.contains("minimum"), "{e}");
        let e = err(&with("inner_diameter = \"4mm\""));
        assert_eq!(e.first().key, "coil");
    }

    #[test]
    fn shapes() {
        let poly = with("shape = \"polygon\"\nsides = 6\ncorner = \"round\"");
        let d = parse(&poly).unwrap();
        assert_eq!(d.coil.shape, Shape::Polygon { sides: 6 });
        assert_eq!(d.coil.corner, Corner::Round { radius: 0.2 });
        let e = err(&with("shape = \"polygon\""));
        assert!(e.has_key("coil.sides"));
        let rect = BASE.replace(
            "outer_diameter = \"20mm\"",
            "shape = \"rectangle\"\nwidth = \"30mm\"\nheight = \"12mm\"",
        );
        let d = parse(&rect).unwrap();
        assert!(matches!(d.coil.shape, Shape::Rectangle { .. }));
        let e = err(&with("shape = \"hexagon\""));
        assert_eq!(e.first().key, "coil.shape");
    }

    #[test]
    fn max_turns_fills_the_outer_size() {
        let d = parse(&BASE.replace("turns = 10", "turns = \"max\"")).unwrap();
        assert!(d.coil.turns > 10.0, "{}", d.coil.turns);
        assert!(d.coil.outer_diameter <= 20.0 + 1e-9);
    }

    #[test]
    fn syntax_error_has_a_span() {
        let e = err("name = \"x\"\n[coil\n");
        assert_eq!(e.first().key, "syntax");
        assert!(e.first().span.is_some());
    }

    #[test]
    fn parallel_pairs_need_even_layers() {
        let e = err(&BASE.replace("layers = 4", "layers = 3\nwiring = \"parallel-pairs\""));
        assert_eq!(e.first().key, "coil.wiring");
        parse(&with("wiring = \"parallel-pairs\"")).unwrap();
    }

    #[test]
    fn drive_rules() {
        let e = err(&format!("{BASE}[drive]\nvoltage = 3\ncurrent = 1\n"));
        assert_eq!(e.first().key, "drive.current");
        let e = err(&format!("{BASE}[drive]\nambient = 90\n"));
        assert_eq!(e.first().key, "drive.ambient");
        let e = err(&format!("{BASE}[drive]\nemissivity = 1.5\n"));
        assert_eq!(e.first().key, "drive.emissivity");
    }

    #[test]
    fn rectangle_with_inner_diameter_and_polygon_with_max_turns() {
        let rect = BASE
            .replace(
                "outer_diameter = \"20mm\"",
                "shape = \"rectangle\"\nwidth = 30\nheight = 12",
            )
            .replace("turns = 10", "inner_diameter = \"3mm\"");
        let d = parse(&rect).unwrap();
        assert!((d.coil.inner_diameter - 3.0).abs() < 1e-9);
        assert!(d.coil.turns > 1.0);
        let e = err(&rect.replace("width = 30", "width = 30\nouter_diameter = 30"));
        assert!(e.has_key("coil.outer_diameter"), "{e}");
        let poly = BASE
            .replace("turns = 10", "turns = \"max\"")
            .replace("layers = 4", "layers = 4\nshape = \"polygon\"\nsides = 5");
        let d = parse(&poly).unwrap();
        assert!(d.coil.turns > 10.0);
    }

    #[test]
    fn absurd_sizes_fail_fast_with_a_key() {
        let e = err(&BASE.replace("\"20mm\"", "1e9"));
        assert_eq!(e.first().key, "coil.outer_diameter");
        let e = err(&BASE
            .replace("turns = 10", "turns = \"max\"")
            .replace("\"0.1mm\"", "\"0.5um\""));
        assert!(e.has_key("coil.trace_width"), "{e}");
    }

    #[test]
    fn wrong_types_are_named() {
        let e = err(&BASE.replace("layers = 4", "layers = \"four\""));
        assert_eq!(e.first().key, "coil.layers");
        let e = err(&format!("coil = 3\n{}", BASE.replace("[coil]", "[x]")));
        assert!(e.has_key("coil"), "{e}");
        let e = err(&BASE.replace("name = \"t\"", "name = \"a/b\""));
        assert_eq!(e.first().key, "name");
    }
}
