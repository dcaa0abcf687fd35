//! Resolving the coil's sizes: from two of outer diameter, inner diameter
//! and turns, the third, by the fit in `geometry`; a fit that fails becomes
//! a problem at the size key that cannot be met.

use crate::design::{Coil, Corner, DesignError, DesignErrors, DesignRequest, KeySpans, Shape};
use crate::geometry::{self, FitError, FitInput};

/// The coil of `request` with all three sizes.
///
/// A default corner radius (trace width + clearance, used when `corner =
/// "round"` gives no `corner_radius`) that does not fit the innermost side
/// gives way to the largest radius that does, less 10 % (rounded down to
/// the micrometre): a default is never refused. A radius the file gives is
/// kept or refused.
pub(super) fn resolve(request: &DesignRequest, spans: &KeySpans) -> Result<Coil, DesignErrors> {
    let c = &request.coil;
    let min_id = geometry::min_inner_diameter(
        &c.shape,
        c.layers,
        c.wiring,
        c.clearance,
        c.trace_width,
        request.via.diameter,
        request.terminal.diameter,
    );
    let defaulted = matches!(c.corner, Corner::Round { .. }) && !spans.has("coil.corner_radius");
    let mut corner = c.corner;
    let mut tries = 0;
    let fit = loop {
        let fit = FitInput {
            shape: c.shape,
            corner,
            trace_width: c.trace_width,
            clearance: c.clearance,
            outer_diameter: c.outer_diameter,
            inner_diameter: c.inner_diameter,
            turns: c.turns,
            min_inner_diameter: min_id,
        }
        .resolve();
        match fit {
            Err(FitError::CornerTooLarge { max, .. }) if defaulted && tries < 8 && max > 0.0 => {
                tries += 1;
                let radius = (max * 0.9 * 1000.0).floor() / 1000.0;
                corner = if radius > 0.0 {
                    Corner::Round { radius }
                } else {
                    Corner::Sharp
                };
            }
            other => {
                break other
                    .map_err(|e| fit_error(e, spans, c.shape, c.inner_diameter.is_some()))?;
            }
        }
    };
    let mut coil = c.resolved(fit.outer_diameter, fit.inner_diameter, fit.turns);
    coil.corner = corner;
    Ok(coil)
}

/// The problem a failed fit is, at the key to change.
fn fit_error(e: FitError, spans: &KeySpans, shape: Shape, inner_given: bool) -> DesignErrors {
    if let (Shape::Sector { .. }, FitError::InnerNotInside | FitError::InnerTooSmall { .. }) =
        (shape, &e)
    {
        // A sector's size is its slot of the ring: too small a slot.
        return DesignError {
            key: "coil.shape".into(),
            span: spans.key_or_table("coil", "shape"),
            message: "the slot of the [array] ring leaves no room for one turn around the free centre the centre vias need".into(),
            help: Some("use fewer coils or a wider annulus in [array], smaller vias ([via] diameter), or an even number of layers (terminals outside the winding)".into()),
        }
        .into();
    }
    let rect = matches!(shape, Shape::Rectangle { .. });
    let size_key = if rect { "width" } else { "outer_diameter" };
    let (key, help) = match &e {
        FitError::NeedTwo => ("coil", None),
        FitError::TooManyTurns { max, .. } => (
            "turns",
            Some(format!(
                "use turns = {max:.2} or less, turns = \"max\", a larger outer size or a narrower trace"
            )),
        ),
        FitError::InnerTooSmall { min, .. } => {
            let k = if inner_given {
                "inner_diameter"
            } else {
                size_key
            };
            (
                k,
                Some(format!(
                    "use inner_diameter = \"{min:.3}mm\" or more, or smaller vias ([via] diameter)"
                )),
            )
        }
        FitError::InnerNotInside => (
            if inner_given {
                "inner_diameter"
            } else {
                size_key
            },
            Some("the inner diameter must leave room for at least part of a turn inside the outer size".into()),
        ),
        FitError::CornerTooLarge { max, .. } => (
            "corner_radius",
            Some(format!("use corner_radius below {max:.3} mm")),
        ),
    };
    let (full, span) = if key == "coil" {
        ("coil".to_string(), spans.get("coil"))
    } else {
        let span = if key == "corner_radius" && !spans.has("coil.corner_radius") {
            spans.key_or_table("coil", "corner")
        } else {
            spans.key_or_table("coil", key)
        };
        (format!("coil.{key}"), span)
    };
    let message = match &e {
        FitError::InnerTooSmall { given, min } if !inner_given => format!(
            "no turn fits: the free centre of {given:.3} mm needed for the centre vias leaves no room (minimum inner diameter is {min:.3} mm)"
        ),
        _ => e.to_string(),
    };
    DesignError {
        key: full,
        span,
        message,
        help,
    }
    .into()
}
