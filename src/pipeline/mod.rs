//! From a design file to copper that can be built, in three phases:
//! [`design::read`] checks every key and value, `sizes.rs` resolves the
//! third of outer diameter, inner diameter and turns (a fit on the real
//! spiral, in `geometry`), and `copper.rs` builds the [`Board`]. A problem
//! found after reading is turned into a [`DesignError`] at the key and span
//! it is about, so that it reads like any other problem in the file.
//!
//! This module joins the stages that know nothing of each other: the
//! reader gets the `[rules]` limit keys from the rule registry
//! ([`rules::LIMITS`]); the design layer never calls geometry.
//!
//! ```
//! let text = r#"
//! [coil]
//! outer_diameter = "12mm"
//! turns = 15
//! trace_width = "0.1mm"
//! clearance = "4mil"
//! layers = 2
//! "#;
//! let (design, board) = coilwright::pipeline::parse_and_build(text).unwrap();
//! assert!(design.coil.inner_diameter > 0.0);
//! assert_eq!(board.layers, 2);
//!
//! let errors = coilwright::pipeline::parse(&text.replace("15", "150")).unwrap_err();
//! assert_eq!(errors.first().key, "coil.turns");
//! ```
//!
//! [`DesignError`]: crate::design::DesignError

mod copper;
mod sizes;

use crate::design::{self, Design, DesignErrors, Key};
use crate::geometry::Board;
use crate::rules;

/// Reads and validates a design file and resolves its sizes.
///
/// Returns every problem found (at least one) with the dotted key and the
/// byte span it is about. A [`Design`] returned here always builds.
pub fn parse(text: &str) -> Result<Design, DesignErrors> {
    parse_and_build(text).map(|(design, _)| design)
}

/// Like [`parse`], and also returns the copper that validation built (so
/// callers that need the board do not build it a second time).
pub fn parse_and_build(text: &str) -> Result<(Design, Board), DesignErrors> {
    let mut request = design::read(text, rules::LIMITS)?;
    let spans = std::mem::take(&mut request.spans);
    let coil = sizes::resolve(&request, &spans)?;
    let design = request.into_design(coil);
    let board = copper::build(&design, &spans)?;
    Ok((design, board))
}

/// Every key a design file may contain, in file order: the key registry
/// ([`design::keys::KEYS`]) with the rule registry's limits under `[rules]`.
pub fn design_keys() -> Vec<Key> {
    design::keys::with_limits(rules::LIMITS)
}

#[cfg(test)]
mod tests;
