//! `[stackup]`: board kind, copper and dielectric per layer, cover, bend.

use super::super::model::{Bend, BendKind, BoardKind, Stackup};
use super::super::units::{CopperWeight, Length};
use super::table::{Ctx, Sign, Table};
use toml::de::DeValue;

/// Reads `[stackup]` for a coil of `layers` copper layers (if known).
pub(super) fn read(cx: &mut Ctx, t: &Table, layers: Option<u8>) -> Stackup {
    let kind = match cx.choice(t, "kind") {
        Some(1) => BoardKind::Rigid,
        _ => BoardKind::Flex,
    };
    let flex = kind == BoardKind::Flex;
    let n = layers.map(usize::from);
    let copper = cx
        .per_layer::<CopperWeight>(t, "copper", n, "one per copper layer")
        .unwrap_or_else(|| vec![0.035; n.unwrap_or(1)]);
    if let Some(max) = copper.iter().copied().reduce(f64::max)
        && max > 0.5
    {
        cx.err(
            t.key("copper"),
            t.span_of("copper"),
            format!("copper {max} mm thick is implausible (more than 0.5 mm)"),
            Some("a bare number is millimetres; write weights with oz, e.g. \"1oz\"".into()),
        );
    }
    let default_diel = if flex { 0.05 } else { 0.2 };
    let gaps = n.map(|n| n.saturating_sub(1));
    let dielectric = if n == Some(1)
        && !matches!(
            t.get("dielectric").map(|v| v.get_ref()),
            Some(DeValue::Array(_))
        ) {
        // A single layer has no gap between copper layers.
        let _ = cx.quantity::<Length>(t, "dielectric", Sign::Positive);
        Vec::new()
    } else {
        cx.per_layer::<Length>(t, "dielectric", gaps, "one per gap between copper layers")
            .unwrap_or_else(|| vec![default_diel; gaps.unwrap_or(0)])
    };
    let dielectric_material = match cx.string(t, "dielectric_material") {
        Some("") => {
            cx.err(
                t.key("dielectric_material"),
                t.span_of("dielectric_material"),
                "must not be empty",
                Some("e.g. \"Polyimide\" or \"FR4\"".into()),
            );
            String::new()
        }
        Some(s) => s.to_string(),
        None => if flex { "Polyimide" } else { "FR4" }.to_string(),
    };
    let dielectric_constant = cx
        .number(
            t,
            "dielectric_constant",
            1.0,
            100.0,
            "relative permittivity, a number from 1 to 100 (e.g. 3.4 polyimide, 4.5 FR4)",
        )
        .unwrap_or(if flex { 3.4 } else { 4.5 });
    let plating = cx.length(t, "plating", Sign::Positive).unwrap_or(0.02);
    let cover =
        cx.length(t, "cover", Sign::NonNegative)
            .unwrap_or(if flex { 0.0375 } else { 0.02 });
    let radius = cx.length(t, "bend_radius", Sign::Positive);
    let bend_kind = match cx.choice(t, "bend") {
        Some(1) => BendKind::Dynamic,
        _ => BendKind::Static,
    };
    if t.has("bend_radius") && !flex {
        cx.err(
            t.key("bend_radius"),
            t.span_of("bend_radius"),
            "applies to flexible boards only",
            Some("set kind = \"flex\" or remove bend_radius".into()),
        );
    }
    if t.has("bend") && !t.has("bend_radius") {
        cx.err(
            t.key("bend"),
            t.span_of("bend"),
            "needs bend_radius",
            Some("add bend_radius, e.g. \"5mm\"".into()),
        );
    }
    Stackup {
        kind,
        copper,
        dielectric,
        dielectric_material,
        dielectric_constant,
        plating,
        cover,
        bend: radius.map(|radius| Bend {
            radius,
            kind: bend_kind,
        }),
    }
}
