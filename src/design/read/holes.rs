//! `[via]` and `[terminal]`: plated holes, drill and pad.

use super::super::model::{HoleSize, TerminalPlace};
use super::table::{Ctx, Sign, Table};

/// Default via: 0.2 mm drill, 0.45 mm pad.
pub(super) const VIA: HoleSize = HoleSize {
    drill: 0.2,
    diameter: 0.45,
};

/// Default terminal: 0.4 mm drill, 0.8 mm pad.
pub(super) const TERMINAL: HoleSize = HoleSize {
    drill: 0.4,
    diameter: 0.8,
};

/// Reads a hole table; absent keys take `default`.
pub(super) fn read(cx: &mut Ctx, t: &Table, default: HoleSize) -> HoleSize {
    let d = cx
        .length(t, "drill", Sign::Positive)
        .unwrap_or(default.drill);
    let p = cx
        .length(t, "diameter", Sign::Positive)
        .unwrap_or(default.diameter);
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

/// Reads where the terminals leave the coil from `[terminal]`; absent keys
/// take [`TerminalPlace::DEFAULT`].
pub(super) fn read_place(cx: &mut Ctx, t: &Table) -> TerminalPlace {
    let d = TerminalPlace::DEFAULT;
    TerminalPlace {
        angle_deg: cx
            .number(
                t,
                "angle",
                0.0,
                360.0,
                "degrees from +x counter-clockwise, 0 to 360 (90 is the top)",
            )
            .unwrap_or(d.angle_deg),
        lead_length: cx
            .length(t, "lead_length", Sign::NonNegative)
            .unwrap_or(d.lead_length),
    }
}
