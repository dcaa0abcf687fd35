//! Where each key of a design file is, so that problems found after reading
//! (sizes that do not fit, copper that cannot be built) can point into the
//! text too.

use std::collections::BTreeMap;
use std::ops::Range;
use toml::de::{DeTable, DeValue};

/// Byte spans of the keys of a design file, by dotted key: a table maps to
/// the name in its header (`coil` in `[coil]`), any other key to its value.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct KeySpans {
    spans: BTreeMap<String, Range<usize>>,
}

impl KeySpans {
    /// Every key of a parsed design file, two levels deep.
    pub(crate) fn of(doc: &DeTable<'_>) -> KeySpans {
        let mut spans = BTreeMap::new();
        for (k, v) in doc.iter() {
            let name = k.get_ref().as_ref();
            match v.get_ref() {
                DeValue::Table(table) => {
                    spans.insert(name.to_string(), k.span());
                    for (sk, sv) in table.iter() {
                        spans.insert(format!("{name}.{}", sk.get_ref().as_ref()), sv.span());
                    }
                }
                _ => {
                    spans.insert(name.to_string(), v.span());
                }
            }
        }
        KeySpans { spans }
    }

    /// The span of a dotted key, if the file has it.
    pub fn get(&self, key: &str) -> Option<Range<usize>> {
        self.spans.get(key).cloned()
    }

    /// Whether the file has the dotted key.
    pub fn has(&self, key: &str) -> bool {
        self.spans.contains_key(key)
    }

    /// The span of `table.name`, or of the table's header when the file
    /// does not have the key.
    pub fn key_or_table(&self, table: &str, name: &str) -> Option<Range<usize>> {
        self.get(&format!("{table}.{name}"))
            .or_else(|| self.get(table))
    }
}
