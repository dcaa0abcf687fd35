//! The stages in one place: design file -> [`Design`] -> [`Layout`] ->
//! violations -> analysis. Every command goes through these functions.

use super::Failure;
use crate::geometry::{self, Layout};
use crate::physics::{self, Analysis};
use crate::rules::{self, Severity, Violation};
use crate::spec::{self, Design};
use anyhow::Context;
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
    pub layout: Layout,
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
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("cannot read design file {}", path.display()))?;
    match spec::parse(&text) {
        Ok(design) => Ok(Loaded {
            path: path.to_path_buf(),
            text,
            design,
        }),
        Err(errors) => Err(Failure::Spec {
            path: path.to_path_buf(),
            text,
            errors,
        }),
    }
}

/// Builds the copper of a loaded design.
pub fn layout(loaded: &Loaded) -> Result<Layout, Failure> {
    // `spec::parse` already built it once, so this only fails on a bug.
    geometry::build(&loaded.design)
        .with_context(|| format!("cannot build the coil of {}", loaded.path.display()))
        .map_err(Failure::from)
}

/// The one place the rule check is called: resolves the design's rule
/// profile (a built-in name or a path relative to the design file) and
/// checks the layout.
pub fn violations(loaded: &Loaded, layout: &Layout) -> Result<Vec<Violation>, Failure> {
    Ok(rules::check(&loaded.design, layout))
}

/// Loads, builds and checks a design file.
pub fn check(path: &Path) -> Result<Checked, Failure> {
    let loaded = load(path)?;
    let layout = layout(&loaded)?;
    let violations = violations(&loaded, &layout)?;
    Ok(Checked {
        loaded,
        layout,
        violations,
    })
}

/// The engineering analysis of a checked design.
pub fn analysis(checked: &Checked) -> Analysis {
    physics::analyse(&checked.loaded.design, &checked.layout)
}
