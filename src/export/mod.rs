//! Exporters: translate a [`Board`] (and the analysis) into files. They
//! never compute geometry; coordinates go through
//! [`crate::geometry::round`].

pub mod couple;
pub mod dxf;
pub mod excellon;
pub mod font;
pub mod gerber;
pub mod job;
pub mod kicad;
pub mod kicad_lib;
pub mod manifest;
pub mod plot;
pub mod report;
pub mod svg;

use crate::design::Design;
use crate::geometry::Board;
use crate::physics::Analysis;

/// One output file, not yet written.
#[derive(Debug, Clone, PartialEq)]
pub struct OutFile {
    /// Path relative to the output folder, with '/' separators.
    pub path: String,
    /// What the file is for (written to the manifest).
    pub role: String,
    /// Contents.
    pub bytes: Vec<u8>,
}

/// Errors while producing output files.
#[derive(Debug, thiserror::Error)]
pub enum ExportError {
    /// An exporter could not represent the layout.
    #[error("{0}")]
    Unrepresentable(String),
}

/// Everything `build` writes, in a fixed order.
///
/// Fab files go to `fab/` (Gerber `.gbr`, Excellon `.drl`, job `.gbrjob`),
/// KiCad files to `kicad/`, DXF drawings to `dxf/`, and `manifest.json` (checksums of all the
/// others) comes last. File names: see [`gerber`], [`excellon`], [`job`],
/// [`kicad`].
pub fn bundle(
    design: &Design,
    layout: &Board,
    analysis: &Analysis,
) -> Result<Vec<OutFile>, ExportError> {
    let mut files = Vec::new();
    fab_files(design, layout, &mut files)?;
    kicad_files(design, layout, &mut files)?;
    dxf_files(design, layout, &mut files)?;
    files.extend(previews(layout, &[]));
    files.extend(report::files(design, layout, analysis)?);
    let m = manifest::manifest(&design.name, &files)?;
    files.push(OutFile {
        path: manifest::FILE_NAME.into(),
        role: "manifest: SHA-256 of every other file".into(),
        bytes: m,
    });
    Ok(files)
}

/// Appends the fab files: copper, mask/coverlay, legend, profile, drill and
/// the job file that lists them.
pub fn fab_files(
    design: &Design,
    layout: &Board,
    files: &mut Vec<OutFile>,
) -> Result<(), ExportError> {
    use crate::design::BoardKind;
    let stem = gerber::file_stem(&design.name);
    let n = layout.layers;
    let mut job_list = Vec::new();
    let mut add =
        |files: &mut Vec<OutFile>, path: String, role: String, function: String, bytes| {
            job_list.push(job::JobEntry {
                path: path.trim_start_matches("fab/").to_string(),
                function,
                polarity: "Positive".into(),
            });
            files.push(OutFile { path, role, bytes });
        };
    for layer in 1..=n {
        add(
            files,
            gerber::copper_file_name(&stem, layer, n),
            format!("gerber: copper layer {layer} of {n}"),
            gerber::copper_function(layer, n),
            gerber::copper(design, layout, layer)?,
        );
    }
    let cover = match design.stackup.kind {
        BoardKind::Rigid => "solder mask",
        BoardKind::Flex => "coverlay",
    };
    for (side, pos) in [(gerber::Side::Top, "Top"), (gerber::Side::Bottom, "Bot")] {
        add(
            files,
            gerber::mask_file_name(&stem, design.stackup.kind, side),
            format!("gerber: {cover} openings, {}", pos.to_lowercase()),
            format!("Soldermask,{pos}"),
            gerber::mask(design, layout, side)?,
        );
    }
    add(
        files,
        gerber::legend_file_name(&stem),
        "gerber: legend, top (pin marks)".into(),
        "Legend,Top".into(),
        gerber::legend(design, layout)?,
    );
    add(
        files,
        gerber::profile_file_name(&stem),
        "gerber: board profile (outline)".into(),
        "Profile,NP".into(),
        gerber::profile(design, layout)?,
    );
    if let Some(b) = gerber::stiffener(design, layout) {
        add(
            files,
            gerber::stiffener_file_name(&stem),
            "gerber: stiffener drawing behind the tail's fingers (Other,Stiffener: X2 has no stiffener function)".into(),
            gerber::STIFFENER_FUNCTION.into(),
            b?,
        );
    }
    add(
        files,
        excellon::plated_file_name(&stem),
        "excellon: plated through holes (vias, terminals)".into(),
        excellon::plated_function(n),
        excellon::plated(layout),
    );
    if let Some(b) = excellon::non_plated(layout) {
        add(
            files,
            excellon::non_plated_file_name(&stem),
            "excellon: non-plated holes".into(),
            format!("NonPlated,1,{n},NPTH"),
            b,
        );
    }
    let j = job::job(design, layout, &job_list)?;
    files.push(OutFile {
        path: job::file_name(&stem),
        role: "gerber job file: stack-up and file list".into(),
        bytes: j,
    });
    Ok(())
}

/// Appends the KiCad footprint, board and project files.
pub fn kicad_files(
    design: &Design,
    layout: &Board,
    files: &mut Vec<OutFile>,
) -> Result<(), ExportError> {
    let stem = gerber::file_stem(&design.name);
    files.push(OutFile {
        path: kicad::footprint_file_name(&stem),
        role: "kicad 6 footprint".into(),
        bytes: kicad::footprint(design, layout)?,
    });
    files.push(OutFile {
        path: kicad::terminals_file_name(&stem),
        role: "kicad 6 footprint: the board's terminal pads alone (the board's coil is tracks)"
            .into(),
        bytes: kicad::terminals_footprint(design, layout)?,
    });
    files.push(OutFile {
        path: kicad::board_file_name(&stem),
        role: "kicad 6 board: coil as tracks and vias".into(),
        bytes: kicad::board(design, layout)?,
    });
    files.push(OutFile {
        path: kicad::project_file_name(&stem),
        role: "kicad 6 project: design rules of the board".into(),
        bytes: kicad::project(design, layout)?,
    });
    files.push(OutFile {
        path: kicad_lib::symbol_file_name(&stem),
        role: "kicad 6 symbol library: the coil's symbol, linked to its footprint".into(),
        bytes: kicad_lib::symbol(design, layout)?,
    });
    files.push(OutFile {
        path: kicad_lib::SYM_TABLE.into(),
        role: "kicad project symbol library table (nickname coilwright)".into(),
        bytes: kicad_lib::symbol_table(design),
    });
    files.push(OutFile {
        path: kicad_lib::FP_TABLE.into(),
        role: "kicad project footprint library table (nickname coilwright)".into(),
        bytes: kicad_lib::footprint_table(design),
    });
    Ok(())
}

/// Appends the DXF drawings: the outline and each copper layer.
pub fn dxf_files(
    design: &Design,
    layout: &Board,
    files: &mut Vec<OutFile>,
) -> Result<(), ExportError> {
    let stem = gerber::file_stem(&design.name);
    files.push(OutFile {
        path: dxf::outline_file_name(&stem),
        role: "dxf: board outline (lines and true arcs, mm)".into(),
        bytes: dxf::outline(design, layout)?,
    });
    for layer in 1..=layout.layers {
        files.push(OutFile {
            path: dxf::copper_file_name(&stem, layer),
            role: format!(
                "dxf: copper layer {layer} of {} (track centre lines with width, lands, holes)",
                layout.layers
            ),
            bytes: dxf::copper(design, layout, layer)?,
        });
    }
    Ok(())
}

/// The SVG previews: `preview/stack.svg` and `preview/layer-N.svg`, with
/// `violations` marked.
pub fn previews(layout: &Board, violations: &[crate::rules::Violation]) -> Vec<OutFile> {
    let mut out = vec![OutFile {
        path: "preview/stack.svg".into(),
        role: "preview of all copper layers stacked".into(),
        bytes: svg::preview(layout, svg::View::Stack, violations).into_bytes(),
    }];
    for l in 1..=layout.layers {
        out.push(OutFile {
            path: format!("preview/layer-{l}.svg"),
            role: format!("preview of copper layer {l}"),
            bytes: svg::preview(layout, svg::View::Layer(l), violations).into_bytes(),
        });
    }
    out
}
