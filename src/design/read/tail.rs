//! `[tail]`: the optional flex tail with contact fingers at its end.

use super::super::model::{BoardKind, Tail};
use super::table::{Ctx, Sign, Table};

/// Most fingers on a tail (a generous bound on flat flex connectors).
const MAX_FINGERS: i64 = 64;

/// Reads `[tail]`; absent table, no tail. Every key but `stiffener` (0:
/// none) is required. Refused on a rigid stack-up (a rigid board does not
/// bend into a connector), and where the fingers do not fit the width at
/// the pitch.
pub(super) fn read(cx: &mut Ctx, t: &Table, kind: BoardKind) -> Option<Tail> {
    if !t.present() {
        return None;
    }
    if kind == BoardKind::Rigid {
        cx.err(
            String::from("tail"),
            t.span.clone(),
            "a tail is a strip of flexible board: this stack-up is rigid",
            Some("set [stackup] kind = \"flex\", or remove [tail] and use [terminal] pads".into()),
        );
    }
    let length = cx.req_length(t, "length", Sign::Positive);
    let width = cx.req_length(t, "width", Sign::Positive);
    let fingers = match t.get("fingers") {
        None => {
            cx.missing(
                t,
                "fingers",
                Some(format!("a whole number from 2 to {MAX_FINGERS}")),
            );
            None
        }
        Some(_) => cx.integer(t, "fingers", 2, MAX_FINGERS),
    };
    let pitch = cx.req_length(t, "pitch", Sign::Positive);
    let finger_width = cx.req_length(t, "finger_width", Sign::Positive);
    let finger_length = cx.req_length(t, "finger_length", Sign::Positive);
    let stiffener = cx.length(t, "stiffener", Sign::NonNegative).unwrap_or(0.0);
    if pitch > 0.0 && finger_width >= pitch {
        cx.err(
            t.key("finger_width"),
            t.span_of("finger_width"),
            format!("{finger_width} mm leaves no gap between fingers at pitch {pitch} mm"),
            Some(format!(
                "finger_width must be less than pitch ({pitch} mm), minus at least the clearance"
            )),
        );
    }
    let n = fingers.unwrap_or(0) as f64;
    if n > 0.0 && pitch > 0.0 && width > 0.0 && n * pitch > width {
        cx.err(
            t.key("fingers"),
            t.span_of("fingers"),
            format!(
                "{n} fingers at pitch {pitch} mm need a tail {:.3} mm wide; width is {width} mm",
                n * pitch
            ),
            Some(format!(
                "fingers x pitch must be at most width: at most {} fingers fit, or make width at least {:.3} mm",
                (width / pitch + 1e-9).floor(),
                n * pitch
            )),
        );
    }
    if length > 0.0 && finger_length >= length {
        cx.err(
            t.key("finger_length"),
            t.span_of("finger_length"),
            format!("{finger_length} mm fingers do not fit a {length} mm tail"),
            Some(format!(
                "finger_length must be less than length ({length} mm)"
            )),
        );
    }
    Some(Tail {
        length,
        width,
        fingers: fingers.unwrap_or(2) as u32,
        pitch,
        finger_width,
        finger_length,
        stiffener,
    })
}
