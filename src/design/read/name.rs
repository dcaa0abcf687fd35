//! The top-level `name`.

use super::table::{Ctx, Table};

/// Reads `name` (default "coil"); it must make a file name.
pub(super) fn read(cx: &mut Ctx, root: &Table) -> String {
    let name = cx.string(root, "name").unwrap_or("coil").to_string();
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
            format!("\"{name}\" cannot be used as a file name"),
            Some(
                "use letters, digits, '-', '_' and '.', not starting with '.', at most 100 characters"
                    .into(),
            ),
        );
    }
    name
}
