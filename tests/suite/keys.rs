//! The design-file keys README documents are exactly the keys the reader
//! accepts: the key registry with the rule registry's limits
//! (`coilwright::pipeline::design_keys`).

use std::collections::BTreeSet;

/// The keys README's key table lists: rows like `**[coil]**` open a table;
/// every backticked word in the first column of any other row is a key of
/// the current table (`width`, `height` counts for both).
fn readme_keys(readme: &str) -> BTreeSet<String> {
    let section = readme
        .split("## Design file reference")
        .nth(1)
        .expect("README has a design file reference");
    let mut keys = BTreeSet::new();
    let mut table = String::new();
    let mut in_table = false;
    for line in section.lines() {
        let line = line.trim();
        if !line.starts_with('|') {
            if in_table {
                break;
            }
            continue;
        }
        in_table = true;
        let first = line.trim_start_matches('|').split('|').next().unwrap_or("");
        let first = first.trim();
        if first == "key" || first.starts_with("---") {
            continue;
        }
        if let Some(name) = first
            .strip_prefix("**[")
            .and_then(|s| s.strip_suffix("]**"))
        {
            table = name.to_string();
            continue;
        }
        for (i, word) in first.split('`').enumerate() {
            if i % 2 == 1 {
                keys.insert(if table.is_empty() {
                    word.to_string()
                } else {
                    format!("{table}.{word}")
                });
            }
        }
    }
    keys
}

#[test]
fn readme_key_table_lists_exactly_the_registered_keys() {
    let readme = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/README.md"))
        .expect("README.md");
    let documented = readme_keys(&readme);
    let registered: BTreeSet<String> = coilwright::pipeline::design_keys()
        .iter()
        .map(|k| k.path())
        .collect();
    let missing: Vec<_> = registered.difference(&documented).collect();
    let extra: Vec<_> = documented.difference(&registered).collect();
    assert!(
        missing.is_empty() && extra.is_empty(),
        "README's key table and the key registry differ:\n  not in README: {missing:?}\n  not a key: {extra:?}"
    );
}

#[test]
fn the_table_parser_reads_tables_and_several_keys_per_row() {
    let text = "## Design file reference\n\n| key | meaning | default |\n|---|---|---|\n\
                | `name` | n | x |\n| **[drive]** | | |\n| `voltage` or `current` | s | |\n\
                | | note | |\n\nAfter.\n| `nope` | | |\n";
    let keys: Vec<String> = readme_keys(text).into_iter().collect();
    assert_eq!(keys, ["drive.current", "drive.voltage", "name"]);
}
