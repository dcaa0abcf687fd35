//! `[fin]`: the optional flexible fin carrying the coil or the magnet.

use super::super::model::{Fin, Magnet, Moving};
use super::super::units::Mass;
use super::table::{Ctx, Sign, Table};

/// Damping ratio of the first mode when the design gives none: a flexible
/// polyimide strip in air rings with a few percent of critical damping
/// (common practice, no source).
pub const DEFAULT_DAMPING_RATIO: f64 = 0.03;

/// Reads `[fin]`; absent table, no fin. `free_length` and `width` are
/// required; the fin needs a `[magnet]` to push against.
pub(super) fn read(cx: &mut Ctx, t: &Table, magnet: Option<&Magnet>) -> Option<Fin> {
    if !t.present() {
        return None;
    }
    if magnet.is_none() {
        cx.err(
            String::from("fin"),
            t.span.clone(),
            "a [fin] needs a [magnet]: the fin moves by the force between coil and magnet",
            Some(
                "add a [magnet] table (diameter, thickness, remanence, gap), or remove [fin]"
                    .into(),
            ),
        );
    }
    let free_length = cx.req_length(t, "free_length", Sign::Positive);
    let width = cx.req_length(t, "width", Sign::Positive);
    let load_at = cx.length(t, "load_at", Sign::Positive);
    if let Some(a) = load_at
        && free_length > 0.0
        && a > free_length
    {
        cx.err(
            t.key("load_at"),
            t.span_of("load_at"),
            format!("{a} mm lies beyond free_length ({free_length} mm)"),
            Some("load_at is measured from the clamp and must be at most free_length".into()),
        );
    }
    let moving = match cx.choice(t, "moving") {
        Some(1) => Moving::Magnet,
        _ => Moving::Coil,
    };
    let added_mass = cx
        .quantity::<Mass>(t, "added_mass", Sign::Positive)
        .map_or(0.0, Mass::grams);
    let damping_ratio = match t.get("damping_ratio") {
        None => DEFAULT_DAMPING_RATIO,
        Some(v) => match cx.number(
            t,
            "damping_ratio",
            f64::MIN,
            f64::MAX,
            "a number above 0 and below 1, e.g. 0.03",
        ) {
            Some(z) if z > 0.0 && z < 1.0 => z,
            Some(z) => {
                cx.err(
                    t.key("damping_ratio"),
                    Some(v.span()),
                    format!("{z} is out of range"),
                    Some("allowed: a number above 0 and below 1, e.g. 0.03".into()),
                );
                DEFAULT_DAMPING_RATIO
            }
            None => DEFAULT_DAMPING_RATIO,
        },
    };
    Some(Fin {
        free_length,
        width,
        load_at: load_at.unwrap_or(free_length),
        moving,
        added_mass,
        damping_ratio,
    })
}
