//! `[magnet]`: the optional permanent magnet.

use super::super::model::Magnet;
use super::super::units::Remanence;
use super::table::{Ctx, Sign, Table};

/// Reads `[magnet]`; absent table, no magnet. All four keys are required.
pub(super) fn read(cx: &mut Ctx, t: &Table) -> Option<Magnet> {
    if !t.present() {
        return None;
    }
    for k in cx.keys_of(t.path) {
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
