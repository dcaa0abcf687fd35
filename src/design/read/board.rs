//! `[board]`: the outline.

use super::super::model::BoardSettings;
use super::table::{Ctx, Sign, Table};

/// Reads `[board]`.
pub(super) fn read(cx: &mut Ctx, t: &Table) -> BoardSettings {
    let margin = cx.length(t, "margin", Sign::NonNegative).unwrap_or(0.5);
    BoardSettings { margin }
}
