//! `[coil]`: shape, sizes, track, layers, wiring and corners.
//!
//! The sizes are read as given (two of outer diameter, inner diameter and
//! turns); resolving the third needs the geometry and happens later
//! (`crate::pipeline`).

use super::super::model::{CoilRequest, Corner, Shape, TurnsRequest, Wiring};
use super::table::{Ctx, Sign, Table};
use toml::de::DeValue;

/// Most turns per layer coilwright builds.
pub const MAX_TURNS: f64 = 5000.0;

/// Largest outer size accepted, mm.
pub const MAX_SIZE_MM: f64 = 1000.0;

/// What [coil] asked for; `layers` is `None` when missing or bad.
pub(super) struct CoilInput {
    shape: Shape,
    outer_diameter: Option<f64>,
    inner_diameter: Option<f64>,
    turns: Option<TurnsRequest>,
    trace_width: f64,
    clearance: f64,
    pub layers: Option<u8>,
    pub wiring: Wiring,
    corner: Corner,
}

impl CoilInput {
    /// Whether the coil is a sector (its slot still to be given).
    pub fn is_sector(&self) -> bool {
        matches!(self.shape, Shape::Sector { .. })
    }

    /// The gap between turns, mm.
    pub fn clearance(&self) -> f64 {
        self.clearance
    }

    /// Gives a sector its slot of the ring: count, inner and outer
    /// diameter, spacing ([`complete_sector`]).
    pub fn set_slot(&mut self, ring: (u32, f64, f64, f64)) {
        if let Some(s) = complete_sector(self.shape, Some(ring)) {
            self.shape = s;
        }
    }

    /// The request, once reading found no problem.
    pub fn into_request(self) -> CoilRequest {
        CoilRequest {
            shape: self.shape,
            outer_diameter: self.outer_diameter,
            inner_diameter: self.inner_diameter,
            turns: self.turns,
            trace_width: self.trace_width,
            clearance: self.clearance,
            layers: self.layers.unwrap_or(1),
            wiring: self.wiring,
            corner: self.corner,
        }
    }
}

/// Reads `[coil]`; `None` (with a problem recorded) when there is none.
pub(super) fn read(cx: &mut Ctx, t: &Table) -> Option<CoilInput> {
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
    let shape_choice = cx.choice(t, "shape");
    let trace_width = cx.req_length(t, "trace_width", Sign::Positive);
    let clearance = cx.req_length(t, "clearance", Sign::Positive);
    if t.has("shape") && shape_choice.is_none() {
        // An unknown shape (already reported): which size and corner keys
        // belong to it cannot be known, so nothing more is said about them.
        if t.has("layers") {
            cx.integer(t, "layers", 1, 32);
        }
        return None;
    }
    let shape_i = shape_choice.unwrap_or(0);

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
        3 => {
            // The ring's sizes are filled in once [array] is read
            // (`complete_sector`).
            shape = Shape::Sector {
                count: 0,
                inner_radius: 0.0,
                outer_radius: 0.0,
                spacing: 0.0,
                corner_radius: cx
                    .length(t, "corner_radius", Sign::Positive)
                    .unwrap_or(SECTOR_CORNER_PITCHES * (trace_width + clearance)),
            };
        }
        _ => {}
    }
    if shape_i == 3 {
        return read_sector_rest(cx, t, shape, trace_width, clearance);
    }
    if shape_i != 1 && t.has("sides") {
        cx.err(
            t.key("sides"),
            t.span_of("sides"),
            "only used with shape = \"polygon\"",
            Some("remove it, or set shape = \"polygon\"".into()),
        );
    }
    if shape_i != 2 {
        for k in ["width", "height"] {
            if t.has(k) {
                cx.err(
                    t.key(k),
                    t.span_of(k),
                    "only used with shape = \"rectangle\"",
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
            "not used by a rectangle, which takes width and height",
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

    let (layers, wiring) = layers_and_wiring(cx, t);
    let round = cx.choice(t, "corner") == Some(1);
    if shape_i == 0 && t.has("corner") {
        cx.err(
            t.key("corner"),
            t.span_of("corner"),
            "applies to polygons and rectangles, not circles",
            Some("remove it".into()),
        );
    }
    let radius = cx.length(t, "corner_radius", Sign::Positive);
    if t.has("corner_radius") && !round {
        cx.err(
            t.key("corner_radius"),
            t.span_of("corner_radius"),
            "needs corner = \"round\"",
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

/// Default corner radius of a sector's outline: four pitches (common
/// practice, no source: corners round enough to etch well, small enough
/// to keep the slot filled), so the four outermost turns have concentric
/// corners.
pub const SECTOR_CORNER_PITCHES: f64 = 4.0;

/// The rest of `[coil]` for a sector: its size is its slot of the ring, so
/// it takes `turns` (a whole number, or "max") and no diameters; its
/// corners are always round (`corner_radius`, default
/// [`SECTOR_CORNER_PITCHES`] pitches).
/// `layers` and `wiring`: a whole number of layers from 1 to 32, and
/// parallel pairs only on 4, 6, ... layers (an odd count has no pairs; on
/// 2 layers the winding's inner end would have no free layer to come out
/// on). Shared by every shape.
fn layers_and_wiring(cx: &mut Ctx, t: &Table) -> (Option<u8>, Wiring) {
    let layers = if t.has("layers") {
        cx.integer(t, "layers", 1, 32).map(|n| n as u8)
    } else {
        cx.missing(t, "layers", Some("a whole number from 1 to 32".into()));
        None
    };
    let wiring = match cx.choice(t, "wiring") {
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
    } else if wiring == Wiring::ParallelPairs && layers == Some(2) {
        cx.err(
            t.key("wiring"),
            t.span_of("wiring"),
            "parallel-pairs wiring needs 4 or more layers: with 2 layers both carry the winding, \
             so its inner end would be stranded in the centre with no free layer to bring it out",
            Some(
                "use wiring = \"series\" on 2 layers, or 4, 6, ... layers in parallel pairs".into(),
            ),
        );
    }
    (layers, wiring)
}

fn read_sector_rest(
    cx: &mut Ctx,
    t: &Table,
    shape: Shape,
    trace_width: f64,
    clearance: f64,
) -> Option<CoilInput> {
    for k in ["outer_diameter", "inner_diameter"] {
        if t.has(k) {
            cx.err(
                t.key(k),
                t.span_of(k),
                "not used by a sector, which fills its slot of the [array] ring",
                Some("remove it; the ring's inner_diameter and outer_diameter size the sector, turns says how many turns".into()),
            );
        }
    }
    if t.has("corner") {
        cx.err(
            t.key("corner"),
            t.span_of("corner"),
            "a sector's corners are always round",
            Some("remove it; corner_radius sets the outline's corner radius".into()),
        );
    }
    let whole = "a whole number of turns per layer from 1, or \"max\" (a sector's layers end on its outer arc)";
    let turns = match t.get("turns") {
        None => {
            cx.missing(t, "turns", Some(whole.into()));
            None
        }
        Some(v) => match v.get_ref() {
            DeValue::String(s) if s.as_ref() == "max" => Some(TurnsRequest::Max),
            _ => match cx.number(t, "turns", 1.0, MAX_TURNS, whole) {
                Some(n) if n.fract() != 0.0 => {
                    cx.err(
                        t.key("turns"),
                        t.span_of("turns"),
                        format!("{n} is not a whole number: a sector's layers end on its outer arc, facing out of the ring"),
                        Some(format!("use turns = {} or {}, or \"max\"", n.floor(), n.ceil())),
                    );
                    None
                }
                n => n.map(TurnsRequest::Count),
            },
        },
    };
    let (layers, wiring) = layers_and_wiring(cx, t);
    Some(CoilInput {
        shape,
        outer_diameter: None,
        inner_diameter: None,
        turns,
        trace_width,
        clearance,
        layers,
        wiring,
        corner: Corner::Sharp,
    })
}

/// Gives a sector its slot: the ring's count and annulus and the spacing
/// between coils (`spacing`, or the clearance). `None` when there is no
/// ring (the caller reports it).
pub(super) fn complete_sector(shape: Shape, ring: Option<(u32, f64, f64, f64)>) -> Option<Shape> {
    match shape {
        Shape::Sector { corner_radius, .. } => {
            let (count, inner_diameter, outer_diameter, spacing) = ring?;
            Some(Shape::Sector {
                count,
                inner_radius: inner_diameter / 2.0,
                outer_radius: outer_diameter / 2.0,
                spacing,
                corner_radius,
            })
        }
        s => Some(s),
    }
}
