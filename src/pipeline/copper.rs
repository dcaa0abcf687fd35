//! Building the copper of a design whose sizes are resolved; a board that
//! cannot be made becomes a problem at the key to change.

use crate::design::{Design, DesignError, DesignErrors, KeySpans};
use crate::geometry::{self, Board, GeometryError};

/// The board of `design`.
pub(super) fn build(design: &Design, spans: &KeySpans) -> Result<Board, DesignErrors> {
    geometry::build(design).map_err(|e| geometry_error(e, spans))
}

/// The problem a failed build is, at the key to change.
fn geometry_error(e: GeometryError, spans: &KeySpans) -> DesignErrors {
    let (key, help) = match &e {
        GeometryError::Layers(_) => ("coil.layers", None),
        GeometryError::OddParallel(_) => (
            "coil.wiring",
            Some("use an even number of layers or wiring = \"series\"".to_string()),
        ),
        GeometryError::OuterCrowded { .. } => (
            "coil",
            Some(
                "the vias outside the winding need room: use fewer layers, smaller vias or a larger coil"
                    .to_string(),
            ),
        ),
        GeometryError::Spiral(_) => ("coil", None),
        GeometryError::SmdInCentre => (
            "terminal.kind",
            Some("add a layer, or use kind = \"hole\"".to_string()),
        ),
        GeometryError::TailInCentre => (
            "tail",
            Some("use an even number of layers in series (of pairs in parallel)".to_string()),
        ),
        GeometryError::TailShort { .. } => ("tail.length", None),
        GeometryError::LeadTab => (
            "terminal.lead_length",
            Some("turn the terminals (terminal.angle) or make the coil larger".to_string()),
        ),
        GeometryError::InnerTooSmall { .. } => (
            "coil.inner_diameter",
            Some("make the free centre larger, or use smaller vias or terminal pads".to_string()),
        ),
    };
    let span = match key {
        "coil.layers" => spans.key_or_table("coil", "layers"),
        "coil.wiring" => spans.key_or_table("coil", "wiring"),
        "coil.inner_diameter" => spans.key_or_table("coil", "inner_diameter"),
        "tail" => spans.get("tail"),
        "tail.length" => spans.key_or_table("tail", "length"),
        _ => spans.get("coil"),
    };
    DesignError {
        key: key.into(),
        span,
        message: format!("the coil cannot be built: {e}"),
        help,
    }
    .into()
}
