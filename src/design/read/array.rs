//! `[array]`: copies of the coil on a ring or a grid, wired into phases.

use super::super::model::{Arrangement, Array, Connection, Rotor};
use super::super::winding;
use super::table::{Ctx, Sign, Table};

/// Most coils on a ring.
const MAX_COUNT: i64 = 96;
/// Most rows or columns of a grid.
const MAX_SIDE: i64 = 32;

/// Keys that belong to one arrangement only.
const RING_KEYS: [&str; 4] = ["count", "inner_diameter", "outer_diameter", "spacing"];
const GRID_KEYS: [&str; 4] = ["rows", "columns", "pitch_x", "pitch_y"];

/// Reads `[array]`; absent table, a single coil. `arrangement` and the
/// sizes of its kind are required; `phases` defaults to 1, `connection` to
/// star. More than one phase needs a rotor (its pole count), and the coil
/// count and pole count must give a balanced winding.
pub(super) fn read(cx: &mut Ctx, t: &Table, rotor: Option<&Rotor>) -> Option<Array> {
    if !t.present() {
        return None;
    }
    let required_int = |cx: &mut Ctx, k: &str, lo: i64, hi: i64| match t.get(k) {
        None => {
            cx.missing(t, k, Some(format!("a whole number from {lo} to {hi}")));
            None
        }
        Some(_) => cx.integer(t, k, lo, hi),
    };
    let arrangement = match t.get("arrangement") {
        None => {
            cx.missing(t, "arrangement", Some("allowed: \"ring\", \"grid\"".into()));
            None
        }
        Some(_) => cx.choice(t, "arrangement"),
    };
    let (own, other, word) = match arrangement {
        Some(0) => (RING_KEYS, GRID_KEYS, "ring"),
        Some(_) => (GRID_KEYS, RING_KEYS, "grid"),
        None => return None,
    };
    for k in other {
        if t.has(k) {
            cx.err(
                t.key(k),
                t.span_of(k),
                format!("not used by arrangement = \"{word}\""),
                Some(format!("a {word} takes {}", own.join(", "))),
            );
        }
    }
    let arrangement = if word == "ring" {
        let count = required_int(cx, "count", 2, MAX_COUNT);
        let inner = cx.req_length(t, "inner_diameter", Sign::NonNegative);
        let outer = cx.req_length(t, "outer_diameter", Sign::Positive);
        let spacing = cx.length(t, "spacing", Sign::NonNegative);
        if t.has("inner_diameter") && t.has("outer_diameter") && outer <= inner {
            cx.err(
                t.key("outer_diameter"),
                t.span_of("outer_diameter"),
                format!("{outer} mm is not larger than inner_diameter ({inner} mm)"),
                Some("the coils fill the annulus between the two diameters".into()),
            );
        }
        Arrangement::Ring {
            count: count? as u32,
            inner_diameter: inner,
            outer_diameter: outer,
            spacing,
        }
    } else {
        let rows = required_int(cx, "rows", 1, MAX_SIDE);
        let columns = required_int(cx, "columns", 1, MAX_SIDE);
        let pitch_x = cx.req_length(t, "pitch_x", Sign::Positive);
        let pitch_y = cx.req_length(t, "pitch_y", Sign::Positive);
        let (rows, columns) = (rows? as u32, columns? as u32);
        if rows * columns < 2 {
            cx.err(
                t.key("columns"),
                t.span_of("columns"),
                "a grid of one coil is the coil alone",
                Some("use 2 or more rows or columns, or remove [array]".into()),
            );
        }
        Arrangement::Grid {
            rows,
            columns,
            pitch_x,
            pitch_y,
        }
    };
    let phases = cx.integer(t, "phases", 1, 3).unwrap_or(1) as u32;
    let connection = match cx.choice(t, "connection") {
        Some(1) => Connection::Delta,
        Some(2) => Connection::Separate,
        _ => Connection::Star,
    };
    let neutral = cx.switch(t, "neutral").unwrap_or(false);
    if neutral && connection != Connection::Star {
        cx.err(
            t.key("neutral"),
            t.span_of("neutral"),
            "only a star connection has a star point",
            Some("remove neutral, or use connection = \"star\"".into()),
        );
    }
    let count = arrangement.count();
    if phases > 1 {
        match rotor {
            None => cx.err(
                "rotor.poles",
                t.span_of("phases"),
                format!("{phases} phases need the rotor's pole count"),
                Some("add [rotor] with poles = ... (even), or use phases = 1".into()),
            ),
            Some(r) => {
                if let Err(e) = winding::pattern(count, phases, Some(r.poles)) {
                    let list = |v: &[u32]| {
                        v.iter()
                            .map(u32::to_string)
                            .collect::<Vec<_>>()
                            .join(" or ")
                    };
                    let (key, span) = if t.has("count") {
                        ("array.count", t.span_of("count"))
                    } else {
                        ("array.phases", t.span_of("phases"))
                    };
                    cx.err(
                        key,
                        span,
                        format!(
                            "{count} coils facing {} poles give no balanced {phases}-phase winding",
                            r.poles
                        ),
                        Some(format!(
                            "with {count} coils use {} poles; with {} poles use {} coils",
                            list(&e.poles),
                            r.poles,
                            list(&e.coils)
                        )),
                    );
                }
            }
        }
    }
    Some(Array {
        arrangement,
        phases,
        connection,
        neutral,
    })
}
