//! The unknown-key check: every key of a table must be one the key
//! registry lists for it. A typo gets a did-you-mean, a key written in the
//! wrong table is sent to its home, and every such problem says which keys
//! the table accepts.

use super::super::keys;
use super::table::{Ctx, Table};
use crate::suggest::closest;
use toml::de::DeValue;

impl Ctx<'_> {
    /// Reports keys that the table does not know.
    pub(super) fn check_keys(&mut self, t: &Table) {
        let Some(map) = t.map else { return };
        let allowed = self.keys_of(t.path);
        for (k, v) in map.iter() {
            let name = k.get_ref().as_ref();
            if allowed.contains(&name) {
                continue;
            }
            let is_table = matches!(v.get_ref(), DeValue::Table(_));
            let what = if is_table && t.path.is_empty() {
                "unknown table"
            } else {
                "unknown key"
            };
            let typo_of = closest(name, allowed.iter().copied());
            let hint = match typo_of {
                Some(n) => {
                    if !t.has(n) {
                        self.misspelled.push(t.key(n));
                    }
                    Some(format!("did you mean `{n}`? "))
                }
                None => keys::tables()
                    .find(|tab| *tab != t.path && self.keys_of(tab).contains(&name))
                    .map(|home| format!("`{name}` is a key of the [{home}] table; ")),
            };
            let accepted = format!(
                "allowed {}: {}",
                if t.path.is_empty() {
                    "at the top level".to_string()
                } else {
                    format!("in [{}]", t.path)
                },
                allowed.join(", ")
            );
            // What this table accepts comes first; a key of another table
            // is named after it.
            let help = match (hint, typo_of) {
                (Some(h), Some(_)) => h + &accepted,
                (Some(h), None) => format!("{accepted}; {}", h.trim_end_matches("; ")),
                (None, _) => accepted,
            };
            self.err(t.key(name), Some(k.span()), what, Some(help));
        }
    }
}
