//! `[rotor]`: the rotor the coils of an `[array]` face (its pole count).

use super::super::model::Rotor;
use super::table::{Ctx, Table};

/// Most magnet poles on a rotor.
pub(super) const MAX_POLES: i64 = 96;

/// Reads `[rotor]`; absent table, no rotor. `poles` is required and even.
pub(super) fn read(cx: &mut Ctx, t: &Table) -> Option<Rotor> {
    if !t.present() {
        return None;
    }
    let poles = match t.get("poles") {
        None => {
            cx.missing(
                t,
                "poles",
                Some(format!("an even whole number from 2 to {MAX_POLES}")),
            );
            None
        }
        Some(_) => cx.integer(t, "poles", 2, MAX_POLES),
    }?;
    if poles % 2 != 0 {
        cx.err(
            t.key("poles"),
            t.span_of("poles"),
            format!("{poles} poles: magnets alternate north and south, so the count is even"),
            Some(format!("use {} or {}", poles - 1, poles + 1)),
        );
        return None;
    }
    Some(Rotor {
        poles: poles as u32,
    })
}
