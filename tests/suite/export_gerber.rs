//! The fab and KiCad files read back: every Gerber parsed with the
//! gerber_parser crate (an independent reader of RS-274X), its draws, arcs,
//! flashes and extents compared with the layout; drill hits and manifest
//! checked; golden snapshots (insta) of a small design's files.

use coilwright::design::{BoardKind, Corner, Design, Shape, Wiring};
use coilwright::export::{self, OutFile};
use coilwright::geometry::{self, Board, Segment, round::to_nm};
use gerber_parser::gerber_types::{
    Command, CoordinateNumber, DCode, ExtendedCode, FunctionCode, GCode, InterpolationMode,
    Operation,
};
use std::io::BufReader;

fn designs() -> Vec<Design> {
    let mut out = vec![Design::sample()];
    for (layers, shape, corner, wiring) in [
        (
            1u8,
            Shape::Polygon { sides: 6 },
            Corner::Sharp,
            Wiring::Series,
        ),
        (
            3,
            Shape::Rectangle {
                width: 16.0,
                height: 10.0,
            },
            Corner::Round { radius: 0.3 },
            Wiring::Series,
        ),
        (6, Shape::Circle, Corner::Sharp, Wiring::ParallelPairs),
        (
            8,
            Shape::Polygon { sides: 5 },
            Corner::Round { radius: 0.3 },
            Wiring::Series,
        ),
    ] {
        let mut d = Design::sample();
        d.name = format!("readback-{layers}");
        d.coil.layers = layers;
        d.coil.shape = shape;
        d.coil.corner = corner;
        d.coil.wiring = wiring;
        d.coil.turns = 6.5;
        d.coil.inner_diameter = 5.0;
        d.stackup.copper = vec![0.035; layers as usize];
        d.stackup.dielectric = vec![0.05; layers as usize - 1];
        d.stackup.kind = if layers % 2 == 0 {
            BoardKind::Rigid
        } else {
            BoardKind::Flex
        };
        out.push(d);
    }
    out
}

fn bundle(d: &Design) -> (Board, Vec<OutFile>) {
    let l = geometry::build(d).unwrap();
    let a = coilwright::physics::analyse(d, &l).expect("analysis");
    let files = export::bundle(d, &l, &a).unwrap();
    (l, files)
}

fn file<'a>(files: &'a [OutFile], path: &str) -> &'a OutFile {
    files.iter().find(|f| f.path == path).unwrap_or_else(|| {
        panic!(
            "no {path} in {:?}",
            files.iter().map(|f| &f.path).collect::<Vec<_>>()
        )
    })
}

fn nm(c: Option<CoordinateNumber>) -> Option<i64> {
    c.map(|c| (f64::from(c) * 1e6).round() as i64)
}

/// What a Gerber file draws, as read by gerber_parser.
#[derive(Default, Debug)]
struct Read {
    lines: usize,
    arcs: usize,
    flashes: usize,
    lo: (i64, i64),
    hi: (i64, i64),
    worst_radius_mismatch_nm: i64,
}

fn read(bytes: &[u8]) -> Read {
    let doc = gerber_parser::parse(BufReader::new(bytes)).unwrap_or_else(|(_, e)| panic!("{e:?}"));
    let errors = doc.errors();
    assert!(errors.is_empty(), "gerber_parser errors: {errors:?}");
    let mut r = Read {
        lo: (i64::MAX, i64::MAX),
        hi: (i64::MIN, i64::MIN),
        ..Read::default()
    };
    let mut cur = (0i64, 0i64);
    let mut mode = InterpolationMode::Linear;
    let grow = |p: (i64, i64), r: &mut Read| {
        r.lo = (r.lo.0.min(p.0), r.lo.1.min(p.1));
        r.hi = (r.hi.0.max(p.0), r.hi.1.max(p.1));
    };
    let mut format_seen = false;
    for c in doc.commands() {
        match c {
            Command::ExtendedCode(ExtendedCode::CoordinateFormat(f)) => {
                assert_eq!((f.integer, f.decimal), (4, 6));
                format_seen = true;
            }
            Command::FunctionCode(FunctionCode::GCode(GCode::InterpolationMode(m))) => mode = *m,
            Command::FunctionCode(FunctionCode::DCode(DCode::Operation(op))) => {
                let to =
                    |c: &Option<gerber_parser::gerber_types::Coordinates>, cur: (i64, i64)| match c
                    {
                        Some(c) => (nm(c.x).unwrap_or(cur.0), nm(c.y).unwrap_or(cur.1)),
                        None => cur,
                    };
                match op {
                    Operation::Move(c) => cur = to(c, cur),
                    Operation::Flash(c) => {
                        cur = to(c, cur);
                        r.flashes += 1;
                        grow(cur, &mut r);
                    }
                    Operation::Interpolate(c, off) => {
                        let end = to(c, cur);
                        grow(cur, &mut r);
                        grow(end, &mut r);
                        if mode == InterpolationMode::Linear {
                            r.lines += 1;
                        } else {
                            r.arcs += 1;
                            let off = off.as_ref().expect("arc without I/J");
                            let (i, j) = (nm(off.x).unwrap_or(0), nm(off.y).unwrap_or(0));
                            let centre = (cur.0 + i, cur.1 + j);
                            let r0 = ((i as f64).hypot(j as f64)).round() as i64;
                            let r1 = (((end.0 - centre.0) as f64).hypot((end.1 - centre.1) as f64))
                                .round() as i64;
                            r.worst_radius_mismatch_nm =
                                r.worst_radius_mismatch_nm.max((r0 - r1).abs());
                        }
                        cur = end;
                    }
                }
            }
            _ => {}
        }
    }
    assert!(format_seen, "no %FS command");
    r
}

#[test]
fn copper_layers_read_back_like_the_layout() {
    for d in designs() {
        let (l, files) = bundle(&d);
        let stem = export::gerber::file_stem(&d.name);
        for layer in 1..=l.layers {
            let f = file(
                &files,
                &export::gerber::copper_file_name(&stem, layer, l.layers),
            );
            let got = read(&f.bytes);
            let tracks: Vec<_> = l.tracks_on(layer).collect();
            let lines = tracks
                .iter()
                .filter(|t| matches!(t.segment, Segment::Line(_)))
                .count();
            let arcs = tracks.len() - lines;
            let flashes = l.vias.iter().filter(|v| v.joins.contains(&layer)).count() + l.pads.len();
            assert_eq!(
                (got.lines, got.arcs, got.flashes),
                (lines, arcs, flashes),
                "{} layer {layer}: draws/arcs/flashes",
                d.name
            );
            // Extents of the centre lines and flash centres (arcs by their
            // end points, as the reader has them), to the nanometre.
            let mut lo = (i64::MAX, i64::MAX);
            let mut hi = (i64::MIN, i64::MIN);
            let mut grow = |p: geometry::Point| {
                let p = (to_nm(p.x), to_nm(p.y));
                lo = (lo.0.min(p.0), lo.1.min(p.1));
                hi = (hi.0.max(p.0), hi.1.max(p.1));
            };
            for t in &tracks {
                grow(t.segment.start());
                grow(t.segment.end());
            }
            for v in l.vias.iter().filter(|v| v.joins.contains(&layer)) {
                grow(v.at);
            }
            for p in &l.pads {
                grow(p.at);
            }
            assert_eq!(
                (got.lo, got.hi),
                (lo, hi),
                "{} layer {layer}: extents",
                d.name
            );
            assert!(
                got.worst_radius_mismatch_nm <= 2,
                "{} layer {layer}: arc radius differs by {} nm between its ends",
                d.name,
                got.worst_radius_mismatch_nm
            );
        }
    }
}

#[test]
fn other_gerbers_parse_and_hold_what_they_should() {
    for d in designs() {
        let (l, files) = bundle(&d);
        let stem = export::gerber::file_stem(&d.name);
        for side in [export::gerber::Side::Top, export::gerber::Side::Bottom] {
            let m = read(
                &file(
                    &files,
                    &export::gerber::mask_file_name(&stem, d.stackup.kind, side),
                )
                .bytes,
            );
            assert_eq!(
                (m.lines, m.arcs, m.flashes),
                (0, 0, l.pads.len()),
                "mask openings"
            );
        }
        let p = read(&file(&files, &export::gerber::profile_file_name(&stem)).bytes);
        let lines = l
            .outline
            .segments
            .iter()
            .filter(|s| matches!(s, Segment::Line(_)))
            .count();
        assert_eq!(
            (p.lines, p.arcs, p.flashes),
            (lines, l.outline.segments.len() - lines, 0)
        );
        let coilwright::geometry::Rect { min: lo, max: hi } = l.outline_bounds();
        // Outline arcs bulge past their end points; lines reach the bounds.
        assert!(p.lo.0 >= to_nm(lo.x) && p.hi.0 <= to_nm(hi.x));
        assert!(p.lo.1 >= to_nm(lo.y) && p.hi.1 <= to_nm(hi.y));
        let g = read(&file(&files, &export::gerber::legend_file_name(&stem)).bytes);
        assert_eq!(g.flashes, 0);
        assert!(g.arcs + g.lines > 0);
    }
}

#[test]
fn drill_file_has_every_hole_at_the_same_nanometres() {
    for d in designs() {
        let (l, files) = bundle(&d);
        let stem = export::gerber::file_stem(&d.name);
        let text = String::from_utf8(
            file(&files, &export::excellon::plated_file_name(&stem))
                .bytes
                .clone(),
        )
        .unwrap();
        assert!(text.starts_with("M48\n") && text.trim_end().ends_with("M30"));
        assert!(text.contains("\nMETRIC\n"));
        let hits: Vec<(i64, i64)> = text
            .lines()
            .filter(|s| s.starts_with('X'))
            .map(|s| {
                let (x, y) = s[1..].split_once('Y').unwrap();
                let p = |v: &str| (v.parse::<f64>().unwrap() * 1e6).round() as i64;
                (p(x), p(y))
            })
            .collect();
        let mut want: Vec<(i64, i64)> = l
            .vias
            .iter()
            .map(|v| v.at)
            .chain(l.pads.iter().map(|p| p.at))
            .map(|p| (to_nm(p.x), to_nm(p.y)))
            .collect();
        let mut got = hits.clone();
        got.sort();
        want.sort();
        assert_eq!(got, want, "{}", d.name);
        assert!(!files.iter().any(|f| f.path.ends_with("nonplated.drl")));
    }
}

#[test]
fn manifest_lists_every_other_file_with_its_checksum() {
    let (_, files) = bundle(&Design::sample());
    let m = files.last().unwrap();
    assert_eq!(m.path, "manifest.json");
    let v: serde_json::Value = serde_json::from_slice(&m.bytes).unwrap();
    let list = v["files"].as_array().unwrap();
    assert_eq!(list.len(), files.len() - 1);
    for (e, f) in list.iter().zip(&files) {
        assert_eq!(e["path"], f.path.as_str());
        assert_eq!(e["sha256"], export::manifest::sha256_hex(&f.bytes).as_str());
        assert_eq!(e["role"], f.role.as_str());
    }
}

#[test]
fn output_is_deterministic() {
    for d in designs() {
        assert_eq!(bundle(&d).1, bundle(&d).1);
    }
}

/// A small design whose files are kept as golden snapshots.
fn small() -> Design {
    let mut d = Design::sample();
    d.name = "golden-tab".into();
    d.coil.layers = 2;
    d.coil.turns = 2.5;
    d.coil.inner_diameter = 4.0;
    d.stackup.copper = vec![0.035; 2];
    d.stackup.dielectric = vec![0.05];
    d
}

#[test]
fn golden_files_of_a_small_design() {
    let (_, files) = bundle(&small());
    let version = env!("CARGO_PKG_VERSION");
    // The report and plots carry floating-point results in full precision
    // (checked against references in tests/suite/physics_*.rs); the golden files
    // are the fab, KiCad and preview outputs. The DXF files are mostly the
    // dxf crate's header and tables: their bytes are pinned by the digests
    // (tests/suite/outputs.rs), their content by src/export/dxf.rs's unit
    // tests and the ezdxf interop check.
    for f in files.iter().filter(|f| {
        !f.path.starts_with("report.")
            && !f.path.starts_with("plots/")
            && !f.path.starts_with("dxf/")
    }) {
        let mut text = String::from_utf8(f.bytes.clone())
            .unwrap()
            .replace(version, "[version]");
        if f.path == "manifest.json" {
            // Checksums cover files that name the version: checked above.
            text = text
                .lines()
                .map(|l| {
                    if l.contains("\"sha256\"") {
                        "      \"sha256\": \"[sha256]\","
                    } else if l.contains("\"bytes\"") {
                        // Report sizes follow floating-point formatting.
                        "      \"bytes\": \"[bytes]\","
                    } else {
                        l
                    }
                })
                .collect::<Vec<_>>()
                .join("\n");
        }
        let name = f.path.replace(['/', '.'], "_");
        insta::assert_snapshot!(name, text);
    }
}

#[test]
fn job_file_lists_the_fab_files_and_the_stackup() {
    for d in designs() {
        let (l, files) = bundle(&d);
        let stem = export::gerber::file_stem(&d.name);
        let job: serde_json::Value =
            serde_json::from_slice(&file(&files, &export::job::file_name(&stem)).bytes).unwrap();
        let listed: Vec<String> = job["FilesAttributes"]
            .as_array()
            .unwrap()
            .iter()
            .map(|f| format!("fab/{}", f["Path"].as_str().unwrap()))
            .collect();
        let fab: Vec<&str> = files
            .iter()
            .map(|f| f.path.as_str())
            .filter(|p| p.starts_with("fab/") && !p.ends_with(".gbrjob"))
            .collect();
        assert_eq!(listed, fab, "{}", d.name);
        let stack = job["MaterialStackup"].as_array().unwrap();
        let copper: Vec<f64> = stack
            .iter()
            .filter(|m| m["Type"] == "Copper")
            .map(|m| m["Thickness"].as_f64().unwrap())
            .collect();
        let dielectric: Vec<f64> = stack
            .iter()
            .filter(|m| m["Type"] == "Dielectric")
            .map(|m| m["Thickness"].as_f64().unwrap())
            .collect();
        assert_eq!(copper, d.stackup.copper);
        assert_eq!(dielectric, d.stackup.dielectric);
        assert_eq!(job["GeneralSpecs"]["LayerNumber"], l.layers);
        let total: f64 =
            copper.iter().sum::<f64>() + dielectric.iter().sum::<f64>() + 2.0 * d.stackup.cover;
        let t = job["GeneralSpecs"]["BoardThickness"].as_f64().unwrap();
        assert!((t - total).abs() < 1e-6, "{t} vs {total}");
    }
}

/// The drill file's header comments are our own wording (issue: header
/// lines must not copy another program's drill export); plating is stated
/// by the X2 file function.
#[test]
fn drill_header_is_our_own_wording() {
    let l = geometry::build(&small()).unwrap();
    let text = String::from_utf8(export::excellon::plated(&l)).unwrap();
    assert!(text.contains("; #@! TF.FileFunction,Plated,1,2,PTH"));
    assert!(!text.contains("FORMAT={"), "{text}");
    assert!(!text.contains(";TYPE="), "{text}");
    assert!(text.starts_with("M48\n; coilwright drill data for golden-tab: plated holes"));
}

/// The footprint carries its reference designator on the legend
/// (silkscreen) layer as KiCad users expect, and describes the coil with
/// turns rounded to 0.01.
#[test]
fn footprint_reference_on_silkscreen_and_rounded_turns() {
    let mut d = small();
    d.coil.turns = 15.24550251162513;
    let l = geometry::build(&d).unwrap();
    let text = String::from_utf8(export::kicad::footprint(&d, &l).unwrap()).unwrap();
    assert!(text.contains(r#"(fp_text reference "L1""#));
    let refline = text
        .lines()
        .find(|l| l.contains("fp_text reference"))
        .unwrap();
    assert!(refline.contains(r#"(layer "F.SilkS")"#), "{refline}");
    assert!(text.contains("15.25 turns per layer"), "{text}");
    assert!(!text.contains("15.2455"));
}
