//! `coilwright init [--template NAME] FILE` and `init --list`: write a
//! commented starter design file.

use super::{Exit, Failure, print_out};
use anyhow::{Context, anyhow};
use coilwright::design::templates;
use coilwright::suggest::closest;
use std::io::Write;
use std::path::Path;

/// Runs `init`.
pub fn run(template: &str, list: bool, force: bool, file: Option<&Path>) -> Result<Exit, Failure> {
    if list {
        let width = templates().iter().map(|t| t.name.len()).max().unwrap_or(0);
        let mut s = String::from("Starter designs (coilwright init --template NAME FILE):\n");
        for t in templates() {
            s.push_str(&format!("  {:<width$}  {}\n", t.name, t.description));
        }
        print_out(&s)?;
        return Ok(Exit::Ok);
    }
    let Some(file) = file else {
        return Err(
            anyhow!("give the design file to create, e.g. `coilwright init my-coil.toml`").into(),
        );
    };
    let Some(t) = templates().iter().find(|t| t.name == template) else {
        let names: Vec<&str> = templates().iter().map(|t| t.name).collect();
        let hint = closest(template, names.iter().copied())
            .or_else(|| names.iter().copied().find(|n| n.starts_with(template)))
            .map(|n| format!("did you mean `{n}`? "))
            .unwrap_or_default();
        return Err(anyhow!(
            "unknown template `{template}`; {hint}available: {} (see `coilwright init --list`)",
            names.join(", ")
        )
        .into());
    };
    let text = with_name(t.text, file);
    let mut options = std::fs::OpenOptions::new();
    options.write(true);
    if force {
        options.create(true).truncate(true);
    } else {
        options.create_new(true);
    }
    let mut f = options.open(file).map_err(|e| {
        if e.kind() == std::io::ErrorKind::AlreadyExists {
            anyhow!("{} exists; pass --force to replace it", file.display())
        } else {
            anyhow::Error::new(e).context(format!("cannot create {}", file.display()))
        }
    })?;
    f.write_all(text.as_bytes())
        .and_then(|_| f.sync_all())
        .with_context(|| format!("cannot write {}", file.display()))?;
    print_out(&format!(
        "wrote {} (template {}); edit it, then run `coilwright check {}`\n",
        file.display(),
        t.name,
        file.display()
    ))?;
    Ok(Exit::Ok)
}

/// The template text with its `name = ...` line set to the file's stem,
/// when the stem is a usable design name.
fn with_name(text: &str, file: &Path) -> String {
    let Some(stem) = file.file_stem().and_then(|s| s.to_str()) else {
        return text.to_string();
    };
    let usable = !stem.is_empty()
        && !stem.starts_with('.')
        && stem
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || matches!(c, '-' | '_' | '.'));
    if !usable {
        return text.to_string();
    }
    let mut done = false;
    text.lines()
        .map(|l| {
            if !done && l.starts_with("name = ") {
                done = true;
                format!("name = \"{stem}\"")
            } else {
                l.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("\n")
        + "\n"
}
