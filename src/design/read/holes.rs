//! `[via]` and `[terminal]`: plated holes, drill and pad.

use super::super::model::{Face, HoleSize, TerminalKind, TerminalPlace};
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

/// Reads where the terminals leave the coil and what they are from
/// `[terminal]`; absent keys take [`TerminalPlace::DEFAULT`]. Surface pads
/// need both coil ends outside the winding: an even number of windings in
/// series (`groups`: the layers, or the pairs of parallel-pairs wiring,
/// from `[coil]`, when it was read).
pub(super) fn read_place(cx: &mut Ctx, t: &Table, groups: Option<u8>) -> TerminalPlace {
    let d = TerminalPlace::DEFAULT;
    let kind = match cx.choice(t, "kind") {
        Some(1) => TerminalKind::Smd,
        Some(_) => TerminalKind::Hole,
        None => d.kind,
    };
    let side = match cx.choice(t, "side") {
        Some(1) => Face::Bottom,
        Some(_) => Face::Top,
        None => d.side,
    };
    let pad_width = cx
        .length(t, "pad_width", Sign::Positive)
        .unwrap_or(d.pad_width);
    let pad_length = cx
        .length(t, "pad_length", Sign::Positive)
        .unwrap_or(d.pad_length);
    if kind == TerminalKind::Smd && groups.is_some_and(|n| n % 2 == 1) {
        cx.err(
            t.key("kind"),
            t.span_of("kind"),
            "surface pads need an even number of layers in series (of layer pairs in parallel): \
             with an odd count the winding ends in the coil's centre, which a surface pad cannot \
             leave without a bridge across the turns"
                .to_string(),
            Some(
                "add a layer (the second layer carries the centre end out to the pads), or use \
                 kind = \"hole\""
                    .into(),
            ),
        );
    }
    TerminalPlace {
        kind,
        side,
        pad_width,
        pad_length,
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
