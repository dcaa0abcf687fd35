//! Building the copper of a design whose sizes are resolved; a board that
//! cannot be made becomes a problem at the key to change.

use crate::design::{Design, DesignError, DesignErrors, KeySpans};
use crate::geometry::array::ArrayError;
use crate::geometry::{self, Board, GeometryError};

/// The board of `design`.
pub(super) fn build(design: &Design, spans: &KeySpans) -> Result<Board, DesignErrors> {
    geometry::build_all(design).map_err(|e| geometry_error(e, spans))
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
        GeometryError::Array(a) => array_key(a),
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
    // At the key itself, or its table when the file leaves it out.
    let span = match key.split_once('.') {
        Some((table, k)) => spans.key_or_table(table, k),
        None => spans.get(key),
    };
    DesignError {
        key: key.into(),
        span,
        message: match e {
            GeometryError::Array(a) => format!("the array cannot be built: {a}"),
            e => format!("the coil cannot be built: {e}"),
        },
        help,
    }
    .into()
}

/// The key an array problem is about, and what to do.
fn array_key(e: &ArrayError) -> (&'static str, Option<String>) {
    match e {
        ArrayError::Annulus { .. } => (
            "array.outer_diameter",
            Some("widen the annulus, or make the coil smaller".into()),
        ),
        ArrayError::Overlap { .. } => (
            "array.count",
            Some("use fewer or smaller coils, a larger ring, or a smaller spacing".into()),
        ),
        ArrayError::BusLayers { .. } => (
            "coil.layers",
            Some("use 4 or more layers in series (6 or more in parallel pairs)".into()),
        ),
        ArrayError::GridPitch { axis, .. } => (
            if *axis == "pitch_x" {
                "array.pitch_x"
            } else {
                "array.pitch_y"
            },
            Some("widen the pitch, or make the coil smaller".into()),
        ),
        ArrayError::GridChannel { .. } => (
            "array.pitch_y",
            Some("widen pitch_y so the buses fit between the rows".into()),
        ),
        ArrayError::GridPhases { .. } => (
            "array.phases",
            Some("use phases = 1 on a grid, or a ring".into()),
        ),
        ArrayError::Tail => ("tail", Some("remove [tail]".into())),
        ArrayError::Unbalanced => ("array.count", None),
    }
}
