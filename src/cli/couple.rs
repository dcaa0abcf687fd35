//! `coilwright couple A.toml B.toml --gap 3mm [--offset 1mm]
//! [--frequency 6.78MHz] [--same-facing] [--json] [-o DIR] [--force]`:
//! mutual inductance, coupling and best link efficiency of two coils.

use super::out_dir;
use super::pipeline::{self, Loaded};
use super::{Exit, Failure, print_out};
use anyhow::anyhow;
use coilwright::design::units::{Frequency, Length, Quantity};
use coilwright::export::{OutFile, couple as files};
use coilwright::geometry::Board;
use coilwright::physics::conductor::{Conductor, m};
use coilwright::physics::coupling::{self, Coil, CoilCopper, Facing, Placement};
use coilwright::physics::{self, Analysis, Detail};
use std::path::Path;

/// The arguments of `couple`, as given.
pub struct Args<'a> {
    /// Lower coil's design file.
    pub a: &'a Path,
    /// Upper coil's design file.
    pub b: &'a Path,
    /// `--gap`.
    pub gap: &'a str,
    /// `--offset`.
    pub offset: &'a str,
    /// `--frequency`.
    pub frequency: Option<&'a str>,
    /// `--same-facing`.
    pub same_facing: bool,
    /// `--json`.
    pub json: bool,
    /// `-o DIR`.
    pub out: Option<&'a Path>,
    /// `--force`.
    pub force: bool,
}

/// A bad argument: exit 2 with the argument named.
fn bad(arg: &str, value: &str, message: impl std::fmt::Display) -> Failure {
    anyhow!("{arg} {value}: {message}").into()
}

/// A signed length argument, mm: a bare number is millimetres.
fn length(arg: &str, text: &str) -> Result<f64, Failure> {
    let t = text.trim();
    let (neg, body) = match t.strip_prefix('-') {
        Some(rest) => (true, rest),
        None => (false, t.strip_prefix('+').unwrap_or(t)),
    };
    let v = match body.parse::<f64>() {
        Ok(v) => Length::from_number(v),
        Err(_) => Length::from_text(body),
    }
    .map_err(|e| bad(arg, text, format!("{}; give {}", e.message, e.allowed)))?;
    Ok(if neg { -v.mm() } else { v.mm() })
}

/// The frequency argument, Hz: above zero.
fn frequency(text: &str) -> Result<f64, Failure> {
    let t = text.trim();
    let f = match t.parse::<f64>() {
        Ok(v) => Frequency::from_number(v),
        Err(_) => Frequency::from_text(t),
    }
    .map_err(|e| {
        bad(
            "--frequency",
            text,
            format!("{}; give {}", e.message, e.allowed),
        )
    })?
    .hertz();
    if f <= 0.0 {
        return Err(bad(
            "--frequency",
            text,
            "the frequency must be above zero, e.g. --frequency 6.78MHz",
        ));
    }
    Ok(f)
}

/// One coil read, built and analysed at the link's frequency.
struct Side {
    loaded: Loaded,
    copper: CoilCopper,
    analysis: Analysis,
}

fn side(loaded: Loaded, layout: &Board, f: Option<f64>) -> Result<Side, Failure> {
    let mut design = loaded.design.clone();
    if f.is_some() {
        design.drive.frequency = f;
    }
    let analysis = physics::analyse_with(&design, layout, Detail::Metrics)
        .map_err(|e| anyhow!("cannot analyse {}: {e}", loaded.path.display()))?;
    let copper = CoilCopper::new(&design, &Conductor::new(&design, layout));
    Ok(Side {
        loaded,
        copper,
        analysis,
    })
}

/// The copies of the two design files written beside the results, named
/// after the designs: one file when both are the same design.
fn design_copies(a: &Loaded, b: &Loaded) -> Result<Vec<OutFile>, Failure> {
    let copy = |l: &Loaded| OutFile {
        path: format!("{}.toml", l.design.name),
        role: "design file of a coupled coil".into(),
        bytes: l.text.clone().into_bytes(),
    };
    if a.design.name == b.design.name {
        if a.text != b.text {
            return Err(anyhow!(
                "{} and {} are different designs with the same name `{}`: both would be written as {}.toml in the output folder; give one of them another `name`",
                a.path.display(),
                b.path.display(),
                a.design.name,
                a.design.name
            )
            .into());
        }
        return Ok(vec![copy(a)]);
    }
    Ok(vec![copy(a), copy(b)])
}

/// Runs `couple`.
pub fn run(args: Args) -> Result<Exit, Failure> {
    let gap_mm = length("--gap", args.gap)?;
    let offset_mm = length("--offset", args.offset)?;
    let f = args.frequency.map(frequency).transpose()?;
    if let Some(out) = args.out
        && out.exists()
        && !args.force
    {
        return Err(anyhow!(
            "{} exists; pass --force to replace it (nothing was written)",
            out.display()
        )
        .into());
    }
    let facing = if args.same_facing {
        Facing::SameWay
    } else {
        Facing::TopToTop
    };
    let at = Placement {
        gap_m: m(gap_mm),
        offset_m: m(offset_mm),
        facing,
    };
    let (la, layout_a) = pipeline::load_and_build(args.a)?;
    let (lb, layout_b) = pipeline::load_and_build(args.b)?;
    at.check(la.design.stackup.cover, lb.design.stackup.cover)
        .map_err(|e| {
            bad(
                "--gap",
                args.gap,
                format!("{e}; give a larger gap (the copies of one design may be coupled with any gap above their covers)"),
            )
        })?;
    let copies = match args.out {
        Some(_) => Some(design_copies(&la, &lb)?),
        None => None,
    };
    let same = la.text == lb.text;
    let sa = side(la, &layout_a, f)?;
    let sb = if same {
        Side {
            loaded: lb,
            copper: sa.copper.clone(),
            analysis: sa.analysis.clone(),
        }
    } else {
        side(lb, &layout_b, f)?
    };
    let (na, nb) = (sa.loaded.design.name.clone(), sb.loaded.design.name.clone());
    let min_gap = m(sa.loaded.design.stackup.cover + sb.loaded.design.stackup.cover);
    let report = coupling::couple(
        &Coil {
            name: &na,
            copper: &sa.copper,
            analysis: &sa.analysis,
        },
        &Coil {
            name: &nb,
            copper: &sb.copper,
            analysis: &sb.analysis,
        },
        at,
        f,
        min_gap,
    );
    for w in &report.warnings {
        eprintln!("warning: {w}");
    }
    if let (Some(out), Some(copies)) = (args.out, copies) {
        let mut all = files::files(&report)?;
        all.extend(copies);
        out_dir::write(out, &all, args.force)?;
    }
    if args.json {
        print_out(&format!("{}\n", serde_json::to_string_pretty(&report)?))?;
    } else {
        print_out(&files::markdown(&report))?;
    }
    Ok(Exit::Ok)
}
