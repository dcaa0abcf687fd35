//! `coilwright init [--template NAME] FILE` and `init --list`: write a
//! commented starter design file.

use super::{Exit, Failure, print_out};
use crate::spec::nearest;
use anyhow::{Context, anyhow};
use std::io::Write;
use std::path::Path;

/// A starter design shipped inside the binary.
#[derive(Debug, Clone, Copy)]
pub struct Template {
    /// Name used with `--template`.
    pub name: &'static str,
    /// One-line description for `--list`.
    pub description: &'static str,
    /// The commented design file.
    pub text: &'static str,
}

const TEMPLATES: &[Template] = &[
    Template {
        name: "fin-actuator",
        description: "flexible 2-layer circular coil that flaps the tail fin of a toy fish with a 5 mm magnet",
        text: include_str!("../../templates/designs/fin-actuator.toml"),
    },
    Template {
        name: "motor-stator",
        description: "rigid 4-layer hexagonal coil, one stator winding of a small flat motor",
        text: include_str!("../../templates/designs/motor-stator.toml"),
    },
    Template {
        name: "pickup-coil",
        description: "single-layer circular pickup coil that counts magnet passes for a tachometer",
        text: include_str!("../../templates/designs/pickup-coil.toml"),
    },
    Template {
        name: "haptic-strip",
        description: "flexible 2-layer rectangular coil under a wristband that taps the skin with a magnet",
        text: include_str!("../../templates/designs/haptic-strip.toml"),
    },
];

/// The starter designs, in `--list` order.
pub fn templates() -> &'static [Template] {
    TEMPLATES
}

/// Runs `init`.
pub fn run(template: &str, list: bool, force: bool, file: Option<&Path>) -> Result<Exit, Failure> {
    if list {
        let width = TEMPLATES.iter().map(|t| t.name.len()).max().unwrap_or(0);
        let mut s = String::from("Starter designs (coilwright init --template NAME FILE):\n");
        for t in TEMPLATES {
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
    let Some(t) = TEMPLATES.iter().find(|t| t.name == template) else {
        let names: Vec<&str> = TEMPLATES.iter().map(|t| t.name).collect();
        let hint = nearest(template, &names)
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
