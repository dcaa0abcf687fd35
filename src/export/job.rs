//! The Gerber job file (`.gbrjob`, JSON): general specifications, design
//! rules, the list of fab files with their functions and the material
//! stack-up, following the Gerber Job Format (Ucamco).
//!
//! No creation date is written so that the output is reproducible.
//! `GeneralSpecs.BoardKind` (`Flex` or `Rigid`) is our own key: the stack-up
//! also tells it by its cover type (`Coverlay` or `SolderMask`) and the
//! dielectric material.

use super::ExportError;
use crate::design::{BoardKind, Design};
use crate::geometry::Board;
use crate::geometry::round::{nm_to_mm, to_nm};
use serde_json::{Value, json};

/// Path of the job file in the output folder.
pub fn file_name(stem: &str) -> String {
    format!("fab/{stem}.gbrjob")
}

/// A fab file listed in the job file.
#[derive(Debug, Clone, PartialEq)]
pub struct JobEntry {
    /// Path relative to the job file's folder.
    pub path: String,
    /// `.FileFunction` value, e.g. `Copper,L1,Top`.
    pub function: String,
    /// `Positive` or `Negative`.
    pub polarity: String,
}

/// A length in mm rounded to the nanometre grid (as every other output).
fn mm(x: f64) -> f64 {
    nm_to_mm(to_nm(x))
}

/// The job file for the given fab files.
pub fn job(design: &Design, layout: &Board, files: &[JobEntry]) -> Result<Vec<u8>, ExportError> {
    let s = &design.stackup;
    let crate::geometry::Rect { min: lo, max: hi } = layout.outline_bounds();
    let flex = s.kind == BoardKind::Flex;
    let cover_type = if flex { "Coverlay" } else { "SolderMask" };
    let cover_material = if flex {
        "Polyimide coverlay"
    } else {
        "Liquid photoimageable"
    };

    let mut stack: Vec<Value> = Vec::new();
    stack.push(json!({
        "Type": "Legend", "Name": "Top legend", "Color": "White"
    }));
    stack.push(json!({
        "Type": cover_type, "Name": format!("Top {}", cover_type.to_lowercase()),
        "Thickness": mm(s.cover), "Material": cover_material
    }));
    for (i, cu) in s.copper.iter().enumerate() {
        stack.push(json!({
            "Type": "Copper", "Name": format!("L{}", i + 1), "Thickness": mm(*cu)
        }));
        if let Some(d) = s.dielectric.get(i) {
            stack.push(json!({
                "Type": "Dielectric",
                "Name": format!("L{}-L{}", i + 1, i + 2),
                "Thickness": mm(*d),
                "Material": s.dielectric_material,
                "DielectricConstant": s.dielectric_constant,
            }));
        }
    }
    stack.push(json!({
        "Type": cover_type, "Name": format!("Bottom {}", cover_type.to_lowercase()),
        "Thickness": mm(s.cover), "Material": cover_material
    }));

    let files: Vec<Value> = files
        .iter()
        .map(|f| {
            json!({
                "Path": f.path, "FileFunction": f.function, "FilePolarity": f.polarity
            })
        })
        .collect();

    let v = json!({
        "Header": {
            "GenerationSoftware": {
                "Vendor": "coilwright",
                "Application": "coilwright",
                "Version": env!("CARGO_PKG_VERSION"),
            },
        },
        "GeneralSpecs": {
            "ProjectId": { "Name": design.name, "Revision": "1" },
            "Size": { "X": mm(hi.x - lo.x), "Y": mm(hi.y - lo.y) },
            "LayerNumber": layout.layers,
            "BoardThickness": mm(design.stackup.finished_thickness()),
            "BoardKind": if flex { "Flex" } else { "Rigid" },
        },
        "DesignRules": [{
            "Layers": "All",
            "PadToPad": mm(layout.clearance),
            "PadToTrack": mm(layout.clearance),
            "TrackToTrack": mm(layout.clearance),
            "MinLineWidth": mm(layout.trace_width),
        }],
        "FilesAttributes": files,
        "MaterialStackup": stack,
    });
    serde_json::to_vec_pretty(&v)
        .map_err(|e| ExportError::Unrepresentable(format!("job file: {e}")))
}
