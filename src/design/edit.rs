//! Editing design-file text key by key while keeping its comments and
//! layout (the sweep's best candidate, the workbench's form).

use super::keys::KEYS;

/// Why an edit of the design text could not be made.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum EditError {
    /// The text is not TOML, so it cannot be edited key by key.
    #[error("the design text is not valid TOML ({0}); fix it in the text first")]
    NotToml(String),
    /// The key is not a design key.
    #[error("'{0}' is not a design key")]
    UnknownKey(String),
    /// The key's table is present but holds a value, not a table.
    #[error("'{0}' is not a table in the design text")]
    NotATable(String),
}

/// Sets `table.key` (`table` empty for the top level) in an edited
/// document, keeping the old value's surrounding whitespace and comment;
/// creates the table if needed. Nothing happens when `table` holds a value
/// rather than a table.
pub fn set_value(
    doc: &mut toml_edit::DocumentMut,
    table: &str,
    key: &str,
    mut value: toml_edit::Value,
) {
    let t: &mut dyn toml_edit::TableLike = if table.is_empty() {
        doc.as_table_mut()
    } else {
        if doc.get(table).is_none() {
            doc.insert(table, toml_edit::Item::Table(toml_edit::Table::new()));
        }
        match doc.get_mut(table).and_then(|t| t.as_table_like_mut()) {
            Some(t) => t,
            None => return,
        }
    };
    if let Some(old) = t.get(key).and_then(|i| i.as_value()) {
        *value.decor_mut() = old.decor().clone();
    }
    t.insert(key, toml_edit::Item::Value(value));
}

/// A value typed into a form as TOML: a whole number as an integer, a
/// finite number as a float, anything else (`"12mm"`, `"circle"`,
/// `"max"`) as a string.
pub fn typed_value(typed: &str) -> toml_edit::Value {
    let t = typed.trim();
    if let Ok(n) = t.parse::<i64>() {
        return toml_edit::Value::from(n);
    }
    match t.parse::<f64>() {
        Ok(f) if f.is_finite() && t.chars().all(|c| c.is_ascii_digit() || "+-.eE".contains(c)) => {
            toml_edit::Value::from(f)
        }
        _ => toml_edit::Value::from(t),
    }
}

/// The design text with the registered key `path` (dotted, e.g.
/// `coil.turns`) set to `typed` ([`typed_value`]), or removed when `typed`
/// is `None` or blank. Comments and layout stay.
///
/// # Errors
/// The text is not TOML, `path` is no design key, or its table holds a
/// value.
pub fn set_key(text: &str, path: &str, typed: Option<&str>) -> Result<String, EditError> {
    let key = KEYS
        .iter()
        .find(|k| k.path() == path)
        .ok_or_else(|| EditError::UnknownKey(path.to_string()))?;
    let mut doc: toml_edit::DocumentMut = text
        .parse()
        .map_err(|e: toml_edit::TomlError| EditError::NotToml(e.message().to_string()))?;
    if !key.table.is_empty()
        && doc
            .get(key.table)
            .is_some_and(|t| t.as_table_like().is_none())
    {
        return Err(EditError::NotATable(key.table.to_string()));
    }
    match typed.map(str::trim).filter(|t| !t.is_empty()) {
        Some(t) => set_value(&mut doc, key.table, key.name, typed_value(t)),
        None => {
            let t: Option<&mut dyn toml_edit::TableLike> = if key.table.is_empty() {
                Some(doc.as_table_mut())
            } else {
                doc.get_mut(key.table).and_then(|t| t.as_table_like_mut())
            };
            if let Some(t) = t {
                t.remove(key.name);
            }
        }
    }
    Ok(doc.to_string())
}

/// The value of the registered key `path` as written in the text (a
/// string without its quotes, a number as written), or `None` when the
/// text is not TOML or does not set it.
pub fn written_value(doc: &toml_edit::DocumentMut, path: &str) -> Option<String> {
    let (table, name) = path.split_once('.').unwrap_or(("", path));
    let item = if table.is_empty() {
        doc.get(name)
    } else {
        doc.get(table)?.as_table_like()?.get(name)
    }?;
    let v = item.as_value()?;
    Some(match v {
        toml_edit::Value::String(s) => s.value().clone(),
        other => {
            let mut bare = other.clone();
            bare.decor_mut().clear();
            bare.to_string()
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const TEXT: &str = "name = \"a\"\n\n[coil]\nturns = 20      # per layer\nlayers = 2\n";

    #[test]
    fn set_keeps_comments_and_types_numbers() {
        let t = set_key(TEXT, "coil.turns", Some("12")).unwrap();
        assert!(t.contains("turns = 12      # per layer"), "{t}");
        let t = set_key(&t, "coil.trace_width", Some("0.15mm")).unwrap();
        assert!(t.contains("trace_width = \"0.15mm\""), "{t}");
        let t = set_key(&t, "coil.clearance", Some("0.1")).unwrap();
        assert!(t.contains("clearance = 0.1"), "{t}");
        let t = set_key(&t, "drive.current", Some("0.2A")).unwrap();
        assert!(t.contains("[drive]\ncurrent = \"0.2A\""), "{t}");
    }

    #[test]
    fn blank_removes_and_unknown_keys_are_refused() {
        let t = set_key(TEXT, "coil.turns", Some("  ")).unwrap();
        assert!(!t.contains("turns"), "{t}");
        assert_eq!(
            set_key(TEXT, "coil.path", Some("/etc")),
            Err(EditError::UnknownKey("coil.path".into()))
        );
        assert!(matches!(
            set_key("coil = 3", "coil.turns", Some("2")),
            Err(EditError::NotATable(_))
        ));
        assert!(matches!(
            set_key("[coil", "coil.turns", Some("2")),
            Err(EditError::NotToml(_))
        ));
    }

    #[test]
    fn typed_values() {
        assert_eq!(typed_value("7").as_integer(), Some(7));
        assert_eq!(typed_value("0.25").as_float(), Some(0.25));
        assert_eq!(typed_value("inf").as_str(), Some("inf"));
        assert_eq!(typed_value("max").as_str(), Some("max"));
    }

    #[test]
    fn written_values_as_in_the_text() {
        let doc: toml_edit::DocumentMut = TEXT.parse().unwrap();
        assert_eq!(written_value(&doc, "name").as_deref(), Some("a"));
        assert_eq!(written_value(&doc, "coil.turns").as_deref(), Some("20"));
        assert_eq!(written_value(&doc, "coil.layers").as_deref(), Some("2"));
        assert_eq!(written_value(&doc, "coil.shape"), None);
    }
}
