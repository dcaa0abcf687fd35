//! The stages in one place: design file -> [`Design`] -> [`Board`] ->
//! violations -> analysis. Every command goes through these functions.

use super::Failure;
use anyhow::Context;
use coilwright::design::{self, Design};
use coilwright::geometry::Board;
use coilwright::physics::{self, Analysis};
use coilwright::rules::{self, Severity, Violation};
use std::path::{Path, PathBuf};

/// A design file read and validated.
#[derive(Debug)]
pub struct Loaded {
    /// Path as given.
    pub path: PathBuf,
    /// Text of the file.
    pub text: String,
    /// The validated design.
    pub design: Design,
}

/// A design with its copper and the rule check.
#[derive(Debug)]
pub struct Checked {
    /// The design file.
    pub loaded: Loaded,
    /// Copper on every layer.
    pub layout: Board,
    /// Rule violations (errors and warnings).
    pub violations: Vec<Violation>,
}

impl Checked {
    /// Whether any violation blocks export.
    pub fn has_errors(&self) -> bool {
        self.violations
            .iter()
            .any(|v| v.severity == Severity::Error)
    }
}

/// Reads and validates a design file.
pub fn load(path: &Path) -> Result<Loaded, Failure> {
    load_and_build(path).map(|(loaded, _)| loaded)
}

/// Reads and validates a design file, keeping the copper that validation
/// built.
pub(crate) fn load_and_build(path: &Path) -> Result<(Loaded, Board), Failure> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("cannot read design file {}", path.display()))?;
    build_text(path, text)
}

/// Validates and builds design text that belongs to the design file
/// `path` (a rule profile path is relative to it; nothing is read here).
fn build_text(path: &Path, text: String) -> Result<(Loaded, Board), Failure> {
    match coilwright::pipeline::parse_and_build(&text) {
        Ok((design, layout)) => Ok((
            Loaded {
                path: path.to_path_buf(),
                text,
                design,
            },
            layout,
        )),
        Err(errors) => Err(Failure::Spec {
            path: path.to_path_buf(),
            text,
            errors,
        }),
    }
}

/// The one place the rule check is called: resolves the design's rule
/// profile (a built-in name or a path relative to the design file) and
/// checks the layout.
pub fn violations(loaded: &Loaded, layout: &Board) -> Result<Vec<Violation>, Failure> {
    let profile = profile(loaded)?;
    Ok(rules::check(&loaded.design, layout, &profile))
}

/// Where the design's rule profile file is (relative to the design file),
/// or `None` for a built-in name: a value ending in `.toml` or containing
/// a path separator is a path.
pub fn profile_path(loaded: &Loaded) -> Option<PathBuf> {
    let name = &loaded.design.rules.profile;
    let looks_like_path = name.ends_with(".toml") || name.contains('/') || name.contains('\\');
    looks_like_path.then(|| {
        loaded
            .path
            .parent()
            .map(|d| d.join(name))
            .unwrap_or_else(|| PathBuf::from(name))
    })
}

/// The design's rule profile with its overrides: a built-in name, or a TOML
/// file (a value ending in `.toml` or containing a path separator) found
/// relative to the design file.
pub fn profile(loaded: &Loaded) -> Result<rules::Profile, Failure> {
    let name = &loaded.design.rules.profile;
    let fail = |message: String, help: Option<String>| profile_error(loaded, message, help);
    let base = if let Some(path) = profile_path(loaded) {
        let text = std::fs::read_to_string(&path).map_err(|e| {
            fail(
                format!("cannot read rule profile {}: {e}", path.display()),
                Some("give a built-in profile (standard, fine, cautious) or a path to a TOML profile relative to the design file".into()),
            )
        })?;
        rules::Profile::from_toml(&text)
            .map_err(|e| fail(format!("{}: {e}", path.display()), None))?
    } else {
        rules::Profile::named(name).map_err(|e| {
            fail(
                e.to_string(),
                Some(format!(
                    "built-in profiles: {}; or a path to a TOML profile",
                    rules::Profile::builtin_names()
                        .collect::<Vec<_>>()
                        .join(", ")
                )),
            )
        })?
    };
    base.with_overrides(&loaded.design.rules.overrides)
        .map_err(|e| fail(e.to_string(), None))
}

/// Loads, builds and checks a design file.
pub fn check(path: &Path) -> Result<Checked, Failure> {
    let (loaded, layout) = load_and_build(path)?;
    checked(loaded, layout)
}

/// Builds and checks design text as if it were the design file `path`
/// (the workbench's edits, which are not on disk). A rule profile named
/// by a path is read only when it is `profile_file`, the one the design
/// file on the command line names: no other path comes from the page.
pub fn check_text(
    path: &Path,
    text: String,
    profile_file: Option<&str>,
) -> Result<Checked, Failure> {
    let (loaded, layout) = build_text(path, text)?;
    only_profile_file(&loaded, profile_file)?;
    checked(loaded, layout)
}

/// Validates design text as if it were the design file `path`, with
/// [`check_text`]'s rule for a profile path.
pub fn load_text(path: &Path, text: String, profile_file: Option<&str>) -> Result<Loaded, Failure> {
    let (loaded, _) = build_text(path, text)?;
    only_profile_file(&loaded, profile_file)?;
    Ok(loaded)
}

/// Refuses a rule profile path other than `allowed` (a design error at
/// `rules.profile`).
fn only_profile_file(loaded: &Loaded, allowed: Option<&str>) -> Result<(), Failure> {
    if profile_path(loaded).is_some() && Some(loaded.design.rules.profile.as_str()) != allowed {
        let builtin = rules::Profile::builtin_names()
            .collect::<Vec<_>>()
            .join(", ");
        return Err(profile_error(
            loaded,
            "the workbench reads no file named in the page: a profile path is taken only as the design file on the command line gives it".into(),
            Some(format!("choose a built-in profile ({builtin}), or edit the design file and restart the workbench")),
        ));
    }
    Ok(())
}

/// A design error at `rules.profile`, pointing at its value.
fn profile_error(loaded: &Loaded, message: String, help: Option<String>) -> Failure {
    let name = &loaded.design.rules.profile;
    let needle = format!("\"{name}\"");
    let span = loaded.text.find(&needle).map(|i| i..i + needle.len());
    Failure::Spec {
        path: loaded.path.clone(),
        text: loaded.text.clone(),
        errors: design::DesignError {
            key: "rules.profile".into(),
            span,
            message,
            help,
        }
        .into(),
    }
}

fn checked(loaded: Loaded, layout: Board) -> Result<Checked, Failure> {
    let violations = violations(&loaded, &layout)?;
    Ok(Checked {
        loaded,
        layout,
        violations,
    })
}

/// What `check` needs of the analysis: the design's limits and every
/// caution ([`physics::Detail::Limits`]).
pub fn limits(checked: &Checked) -> Result<Analysis, Failure> {
    physics::analyse_with(
        &checked.loaded.design,
        &checked.layout,
        physics::Detail::Limits,
    )
    .with_context(|| format!("cannot analyse {}", checked.loaded.path.display()))
    .map_err(Failure::from)
}

/// The engineering analysis of a checked design.
pub fn analysis(checked: &Checked) -> Result<Analysis, Failure> {
    physics::analyse(&checked.loaded.design, &checked.layout)
        .with_context(|| format!("cannot analyse {}", checked.loaded.path.display()))
        .map_err(Failure::from)
}
