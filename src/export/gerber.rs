//! RS-274X Gerber files with X2 attributes: one per copper layer, the
//! terminal openings of the solder mask (rigid) or coverlay (flex) on both
//! faces, the board profile and a legend with pin marks.
//!
//! Format `%FSLAX46Y46*%` in millimetres: six decimals are exactly the
//! nanometre grid of [`crate::geometry::round::to_nm`], through which every
//! coordinate passes (never the crate's `f64` conversion, which truncates).
//! Arcs are written as true arcs in multi-quadrant mode (`G75`), `G02`/`G03`
//! with I/J = rounded centre minus rounded start point.
//!
//! # File names
//! See [`copper_file_name`] and friends: `fab/<name>-L<n>-copper-<side>.gbr`,
//! `fab/<name>-mask-<side>.gbr` or `fab/<name>-coverlay-<side>.gbr`,
//! `fab/<name>-legend-top.gbr`, `fab/<name>-profile.gbr`, where `<side>` is
//! `top`, `inner` or `bottom` and `<name>` is [`file_stem`] of the design
//! name.

use super::ExportError;
use crate::design::{BoardKind, Design};
use crate::geometry::round::{point_nm, snap_mm, to_nm};
use crate::geometry::{Board, Point, Segment};
use gerber_types::{
    Aperture, ApertureAttribute, ApertureDefinition, ApertureFunction, Circle, Command,
    CommentContent, CoordinateFormat, CoordinateMode, CoordinateNumber, CoordinateOffset,
    Coordinates, DCode, ExtendedCode, ExtendedPosition, FileAttribute, FileFunction, FilePolarity,
    FunctionCode, GCode, GenerationSoftware, GerberCode, InterpolationMode, MCode, Net,
    ObjectAttribute, Operation, Part, Pin, Position, Profile, QuadrantMode, SmdPadType, Unit,
    ZeroOmission,
};

/// Net name of terminal "1" (where the current enters) and of all coil
/// copper: the coil is one conductor, tied to net 2 at terminal "2".
pub const NET_1: &str = crate::geometry::COIL_NETS[0];
/// Net name of terminal "2".
pub const NET_2: &str = crate::geometry::COIL_NETS[1];
/// Reference designator used in pin attributes and in KiCad.
pub const REFDES: &str = "L1";

/// Width of the profile and legend strokes, mm.
const PROFILE_STROKE: f64 = 0.1;
/// Width of the legend strokes, mm.
const LEGEND_STROKE: f64 = 0.15;
/// Capital height of legend text, mm.
pub const LEGEND_TEXT_HEIGHT: f64 = 1.0;

/// Which face of the board.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Side {
    /// Top (component side, layer 1).
    Top,
    /// Bottom (last layer).
    Bottom,
}

/// A design name turned into a safe file-name stem: ASCII letters, digits,
/// '-', '_' and '.' kept, anything else becomes '_'.
pub fn file_stem(name: &str) -> String {
    let s: String = name
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '-' || c == '_' || c == '.' {
                c
            } else {
                '_'
            }
        })
        .collect();
    if s.is_empty() { "coil".into() } else { s }
}

/// Side word of copper layer `layer` (1 = top) out of `layers`.
fn side_word(layer: u8, layers: u8) -> &'static str {
    if layer == 1 {
        "top"
    } else if layer == layers {
        "bottom"
    } else {
        "inner"
    }
}

/// Path of the copper Gerber of `layer` (1 = top) in the output folder.
pub fn copper_file_name(stem: &str, layer: u8, layers: u8) -> String {
    format!(
        "fab/{stem}-L{layer}-copper-{}.gbr",
        side_word(layer, layers)
    )
}

/// Path of the solder mask (rigid) or coverlay (flex) Gerber of one face.
pub fn mask_file_name(stem: &str, kind: BoardKind, side: Side) -> String {
    let what = match kind {
        BoardKind::Rigid => "mask",
        BoardKind::Flex => "coverlay",
    };
    let s = match side {
        Side::Top => "top",
        Side::Bottom => "bottom",
    };
    format!("fab/{stem}-{what}-{s}.gbr")
}

/// Path of the top legend Gerber.
pub fn legend_file_name(stem: &str) -> String {
    format!("fab/{stem}-legend-top.gbr")
}

/// Path of the profile (board outline) Gerber.
pub fn profile_file_name(stem: &str) -> String {
    format!("fab/{stem}-profile.gbr")
}

/// `.FileFunction` value text of copper layer `layer` of `layers`
/// (as written in the job file).
pub fn copper_function(layer: u8, layers: u8) -> String {
    let pos = match side_word(layer, layers) {
        "top" => "Top",
        "bottom" => "Bot",
        _ => "Inr",
    };
    format!("Copper,L{layer},{pos}")
}

fn fmt() -> CoordinateFormat {
    CoordinateFormat::new(ZeroOmission::Leading, CoordinateMode::Absolute, 4, 6)
}

fn coords(p: Point) -> Coordinates {
    let (x, y) = point_nm(p);
    Coordinates::new(CoordinateNumber::new(x), CoordinateNumber::new(y), fmt())
}

/// A Gerber file under construction: apertures are defined on first use and
/// the current point and interpolation mode are tracked so that moves and
/// mode changes are written only when needed.
struct Writer {
    cmds: Vec<Command>,
    apertures: Vec<(String, i64, i32)>,
    current_aperture: Option<i32>,
    current_point: Option<(i64, i64)>,
    mode: Option<InterpolationMode>,
    net: Option<String>,
}

impl Writer {
    fn new(function: FileFunction, same_coordinates: &str, comment: &str) -> Writer {
        let mut w = Writer {
            cmds: Vec::new(),
            apertures: Vec::new(),
            current_aperture: None,
            current_point: None,
            mode: None,
            net: None,
        };
        w.comment(comment);
        w.file_attr(FileAttribute::GenerationSoftware(GenerationSoftware::new(
            "coilwright",
            "coilwright",
            Some(env!("CARGO_PKG_VERSION")),
        )));
        w.file_attr(FileAttribute::Part(Part::Single));
        w.file_attr(FileAttribute::FileFunction(function));
        w.file_attr(FileAttribute::FilePolarity(FilePolarity::Positive));
        // With an identifier: gerbonara 1.5 rejects the bare attribute.
        w.file_attr(FileAttribute::SameCoordinates(Some(
            gerber_types::Ident::Name(same_coordinates.to_string()),
        )));
        w.cmds.push(ExtendedCode::CoordinateFormat(fmt()).into());
        w.cmds.push(ExtendedCode::Unit(Unit::Millimeters).into());
        w.cmds
            .push(FunctionCode::GCode(GCode::QuadrantMode(QuadrantMode::Multi)).into());
        w
    }

    fn comment(&mut self, text: &str) {
        self.cmds.push(
            FunctionCode::GCode(GCode::Comment(CommentContent::String(text.to_string()))).into(),
        );
    }

    fn file_attr(&mut self, a: FileAttribute) {
        self.cmds.push(ExtendedCode::FileAttribute(a).into());
    }

    /// Selects (defining on first use) a circular aperture of `diameter` mm
    /// with the given function label.
    fn aperture(&mut self, function: Option<ApertureFunction>, diameter: f64) {
        let key = format!("{function:?}");
        let d_nm = to_nm(diameter);
        let code = match self
            .apertures
            .iter()
            .find(|(k, d, _)| *k == key && *d == d_nm)
        {
            Some(&(_, _, c)) => c,
            None => {
                let code = 10 + self.apertures.len() as i32;
                if let Some(f) = function.clone() {
                    self.cmds.push(
                        ExtendedCode::ApertureAttribute(ApertureAttribute::ApertureFunction(f))
                            .into(),
                    );
                }
                self.cmds.push(
                    ExtendedCode::ApertureDefinition(ApertureDefinition::new(
                        code,
                        Aperture::Circle(Circle::new(snap_mm(diameter))),
                    ))
                    .into(),
                );
                if function.is_some() {
                    self.cmds.push(
                        ExtendedCode::DeleteAttribute(
                            gerber_types::AttributeDeletionCriterion::SingleApertureAttribute(
                                ".AperFunction".into(),
                            ),
                        )
                        .into(),
                    );
                }
                self.apertures.push((key, d_nm, code));
                code
            }
        };
        if self.current_aperture != Some(code) {
            self.cmds
                .push(FunctionCode::DCode(DCode::SelectAperture(code)).into());
            self.current_aperture = Some(code);
        }
    }

    /// Sets (or clears) the `.N` object attribute for the following objects.
    fn set_net(&mut self, net: Option<&str>) {
        if self.net.as_deref() == net {
            return;
        }
        match net {
            Some(n) => self.cmds.push(
                ExtendedCode::ObjectAttribute(ObjectAttribute::Net(Net::Connected(vec![
                    n.to_string(),
                ])))
                .into(),
            ),
            None => self.cmds.push(
                ExtendedCode::DeleteAttribute(
                    gerber_types::AttributeDeletionCriterion::SingleObjectAttribute(".N".into()),
                )
                .into(),
            ),
        }
        self.net = net.map(str::to_string);
    }

    fn pin(&mut self, pin: Option<&str>) {
        match pin {
            Some(p) => self.cmds.push(
                ExtendedCode::ObjectAttribute(ObjectAttribute::Pin(Pin {
                    refdes: REFDES.into(),
                    name: p.into(),
                    function: None,
                }))
                .into(),
            ),
            None => self.cmds.push(
                ExtendedCode::DeleteAttribute(
                    gerber_types::AttributeDeletionCriterion::SingleObjectAttribute(".P".into()),
                )
                .into(),
            ),
        }
    }

    fn set_mode(&mut self, m: InterpolationMode) {
        if self.mode != Some(m) {
            self.cmds
                .push(FunctionCode::GCode(GCode::InterpolationMode(m)).into());
            self.mode = Some(m);
        }
    }

    fn move_to(&mut self, p: Point) {
        let nm = point_nm(p);
        if self.current_point != Some(nm) {
            self.cmds.push(
                FunctionCode::DCode(DCode::Operation(Operation::Move(Some(coords(p))))).into(),
            );
            self.current_point = Some(nm);
        }
    }

    /// Draws one segment with the selected aperture.
    fn draw(&mut self, s: &Segment) {
        self.move_to(s.start());
        match s {
            Segment::Line(l) => {
                self.set_mode(InterpolationMode::Linear);
                self.cmds.push(
                    FunctionCode::DCode(DCode::Operation(Operation::Interpolate(
                        Some(coords(l.end)),
                        None,
                    )))
                    .into(),
                );
            }
            Segment::Arc(a) => {
                self.set_mode(if a.sweep < 0.0 {
                    InterpolationMode::ClockwiseCircular
                } else {
                    InterpolationMode::CounterclockwiseCircular
                });
                let (sx, sy) = point_nm(a.start);
                let (cx, cy) = point_nm(a.center);
                let off = CoordinateOffset::new(
                    CoordinateNumber::new(cx - sx),
                    CoordinateNumber::new(cy - sy),
                    fmt(),
                );
                self.cmds.push(
                    FunctionCode::DCode(DCode::Operation(Operation::Interpolate(
                        Some(coords(a.end)),
                        Some(off),
                    )))
                    .into(),
                );
            }
        }
        self.current_point = Some(point_nm(s.end()));
    }

    fn flash(&mut self, p: Point) {
        self.cmds
            .push(FunctionCode::DCode(DCode::Operation(Operation::Flash(Some(coords(p))))).into());
        self.current_point = Some(point_nm(p));
    }

    /// A filled region (G36/G37) with the corners `pts` (closed back to the
    /// first), carrying the aperture function `function`: the attribute is
    /// set for the region and removed after it.
    fn region(&mut self, function: ApertureFunction, pts: &[Point]) {
        let Some(&first) = pts.first() else { return };
        self.cmds.push(
            ExtendedCode::ApertureAttribute(ApertureAttribute::ApertureFunction(function)).into(),
        );
        self.cmds
            .push(FunctionCode::GCode(GCode::RegionMode(true)).into());
        self.current_point = None;
        self.move_to(first);
        self.set_mode(InterpolationMode::Linear);
        for &p in pts[1..].iter().chain([first].iter()) {
            self.cmds.push(
                FunctionCode::DCode(DCode::Operation(Operation::Interpolate(
                    Some(coords(p)),
                    None,
                )))
                .into(),
            );
        }
        self.current_point = Some(point_nm(first));
        self.cmds
            .push(FunctionCode::GCode(GCode::RegionMode(false)).into());
        self.cmds.push(
            ExtendedCode::DeleteAttribute(
                gerber_types::AttributeDeletionCriterion::SingleApertureAttribute(
                    ".AperFunction".into(),
                ),
            )
            .into(),
        );
    }

    fn finish(mut self) -> Result<Vec<u8>, ExportError> {
        self.cmds.push(FunctionCode::MCode(MCode::EndOfFile).into());
        let mut out = Vec::new();
        self.cmds
            .serialize(&mut out)
            .map_err(|e| ExportError::Unrepresentable(format!("gerber: {e}")))?;
        Ok(out)
    }
}

/// The copper Gerber of one layer (1 = top): every track of the layer drawn
/// with a round `Conductor` aperture of its width, a `ViaPad` flash for each
/// via that joins this layer and a `ComponentPad` flash for each terminal
/// (terminals are plated through holes with a land on every layer), or an
/// `SMDPad` region on the one layer of a surface pad. Coil
/// copper and terminal "1" carry net [`NET_1`], terminal "2" net [`NET_2`];
/// on an array's board each item carries its bus's net.
pub fn copper(design: &Design, layout: &Board, layer: u8) -> Result<Vec<u8>, ExportError> {
    let pos = if layer == 1 {
        ExtendedPosition::Top
    } else if layer == layout.layers {
        ExtendedPosition::Bottom
    } else {
        ExtendedPosition::Inner
    };
    let mut w = Writer::new(
        FileFunction::Copper {
            layer: layer as i32,
            pos,
            copper_type: None,
        },
        &file_stem(&design.name),
        &format!("{} copper layer {layer} of {}", design.name, layout.layers),
    );
    // An array: each bus's net ([`Board::array_nets`]).
    let nets = layout.array_nets();
    let net_of = |n: &[usize], i: usize| nets.as_ref().map(|a| a.names[n[i] - 1].as_str());
    if nets.is_none() {
        w.set_net(Some(NET_1));
    }
    for (i, t) in layout
        .tracks
        .iter()
        .enumerate()
        .filter(|(_, t)| t.layer == layer)
    {
        if let Some(a) = &nets {
            w.set_net(net_of(&a.track, i));
        }
        w.aperture(Some(ApertureFunction::Conductor), t.width);
        w.draw(&t.segment);
    }
    for (i, v) in layout
        .vias
        .iter()
        .enumerate()
        .filter(|(_, v)| v.joins.contains(&layer))
    {
        if let Some(a) = &nets {
            w.set_net(net_of(&a.via, i));
        }
        w.aperture(Some(ApertureFunction::ViaPad), v.diameter);
        w.flash(v.at);
    }
    // Pin attributes belong to component pads on the outer layers.
    let outer = layer == 1 || layer == layout.layers;
    for (i, p) in layout.pads.iter().enumerate() {
        if p.smd.is_some_and(|s| s.layer != layer) {
            continue;
        }
        match &nets {
            Some(a) => w.set_net(net_of(&a.pad, i)),
            None => w.set_net(Some(if p.name == "2" { NET_2 } else { NET_1 })),
        }
        if p.smd.is_none() {
            w.aperture(Some(ApertureFunction::ComponentPad), p.diameter);
        }
        if outer {
            w.pin(Some(&p.name));
        }
        match &p.smd {
            Some(s) => w.region(
                ApertureFunction::SmdPad(SmdPadType::CopperDefined),
                &s.corners(p.at),
            ),
            None => w.flash(p.at),
        }
        if outer {
            w.pin(None);
        }
    }
    w.finish()
}

/// Solder mask (rigid) or coverlay (flex) openings of one face: a round
/// opening the size of each terminal land (the fab applies its own mask
/// expansion), nothing else, so the coil stays covered. A surface pad is
/// opened on its own face only, as its rectangle.
pub fn mask(design: &Design, layout: &Board, side: Side) -> Result<Vec<u8>, ExportError> {
    let pos = match side {
        Side::Top => Position::Top,
        Side::Bottom => Position::Bottom,
    };
    let what = match design.stackup.kind {
        BoardKind::Rigid => "solder mask",
        BoardKind::Flex => "coverlay",
    };
    let mut w = Writer::new(
        FileFunction::SolderMask { pos, index: None },
        &file_stem(&design.name),
        &format!(
            "{} {what} openings, {pos} (terminal pads only)",
            design.name
        ),
    );
    let face = match side {
        Side::Top => 1,
        Side::Bottom => layout.layers,
    };
    for p in &layout.pads {
        match &p.smd {
            Some(s) if s.layer == face => w.region(
                ApertureFunction::SmdPad(SmdPadType::CopperDefined),
                &s.corners(p.at),
            ),
            Some(_) => {}
            None => {
                w.aperture(Some(ApertureFunction::ComponentPad), p.diameter);
                w.flash(p.at);
            }
        }
    }
    w.finish()
}

/// Path of the stiffener drawing.
pub fn stiffener_file_name(stem: &str) -> String {
    format!("fab/{stem}-stiffener.gbr")
}

/// `.FileFunction` value of the stiffener drawing: Gerber X2 has no
/// stiffener file function that we know of, so the spec's escape,
/// `Other,Stiffener`.
pub const STIFFENER_FUNCTION: &str = "Other,Stiffener";

/// The stiffener behind a tail's fingers: one dark region (its outline
/// as seen from the top; it sits on the face opposite the fingers), its
/// thickness in the file's comment. `None` without a stiffener.
pub fn stiffener(design: &Design, layout: &Board) -> Option<Result<Vec<u8>, ExportError>> {
    let tail = layout.tail.as_ref()?;
    let corners = tail.stiffener?;
    let mut w = Writer::new(
        FileFunction::Other("Stiffener".into()),
        &file_stem(&design.name),
        &format!(
            "{} stiffener behind the tail's fingers, {:.3} mm thick, on the face opposite the fingers (drawing: Gerber X2 has no stiffener file function)",
            design.name, tail.stiffener_thickness
        ),
    );
    w.region(ApertureFunction::Other("Stiffener".into()), &corners);
    Some(w.finish())
}

/// The board profile: the closed outline drawn with a thin `Profile` line.
pub fn profile(design: &Design, layout: &Board) -> Result<Vec<u8>, ExportError> {
    let mut w = Writer::new(
        FileFunction::Profile(Some(Profile::NonPlated)),
        &file_stem(&design.name),
        &format!("{} board profile", design.name),
    );
    w.aperture(Some(ApertureFunction::Profile), PROFILE_STROKE);
    for s in &layout.outline.segments {
        w.draw(s);
    }
    w.finish()
}

/// Top legend: the design name in capitals of [`LEGEND_TEXT_HEIGHT`] mm
/// (smaller when the board is narrow) under the coil centre (printed over the covered winding, clear of the
/// terminal lands), a pin-1 mark (a ring around terminal "1") and a bar
/// under terminal "2".
///
/// The ring and bar are translations of the pad data (centre and diameter),
/// not derived geometry.
pub fn legend(design: &Design, layout: &Board) -> Result<Vec<u8>, ExportError> {
    let mut w = Writer::new(
        FileFunction::Legend {
            pos: Position::Top,
            index: None,
        },
        &file_stem(&design.name),
        &format!("{} legend: name, pin 1 ring, pin 2 bar", design.name),
    );
    w.aperture(None, LEGEND_STROKE);
    // The name sits half-way between the axis and the outline's bottom,
    // unless a terminal land is there (then it goes above).
    let crate::geometry::Rect { min: lo, max: hi } = layout.outline_bounds();
    let clear = |y: f64| {
        layout
            .pads
            .iter()
            .all(|p| (p.at.y - y).abs() > p.diameter / 2.0 + LEGEND_TEXT_HEIGHT)
    };
    let y = [lo.y / 2.0, hi.y / 2.0, lo.y / 4.0, hi.y / 4.0]
        .into_iter()
        .find(|&y| clear(y))
        .unwrap_or(lo.y / 2.0);
    let name = file_stem(&design.name);
    // Each character advances one text height: keep the name within 80 %
    // of the board width.
    let height = LEGEND_TEXT_HEIGHT.min(0.8 * (hi.x - lo.x) / name.chars().count() as f64);
    for s in super::font::text_strokes(&name, Point::new(0.0, y), height) {
        w.draw(&s);
    }
    for p in &layout.pads {
        let r = p.diameter / 2.0 + LEGEND_STROKE;
        if p.name == "1" {
            let east = Point::new(p.at.x + r, p.at.y);
            let west = Point::new(p.at.x - r, p.at.y);
            for (start, end) in [(east, west), (west, east)] {
                w.draw(&Segment::Arc(crate::geometry::Arc {
                    center: p.at,
                    start,
                    end,
                    sweep: std::f64::consts::PI,
                }));
            }
        } else {
            w.draw(&Segment::line(
                Point::new(p.at.x - r, p.at.y - r),
                Point::new(p.at.x + r, p.at.y - r),
            ));
        }
    }
    w.finish()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn file_names_follow_the_scheme() {
        assert_eq!(file_stem("fin actuator/v2"), "fin_actuator_v2");
        assert_eq!(file_stem(""), "coil");
        assert_eq!(copper_file_name("c", 1, 4), "fab/c-L1-copper-top.gbr");
        assert_eq!(copper_file_name("c", 3, 4), "fab/c-L3-copper-inner.gbr");
        assert_eq!(copper_file_name("c", 4, 4), "fab/c-L4-copper-bottom.gbr");
        assert_eq!(copper_function(1, 1), "Copper,L1,Top");
        assert_eq!(copper_function(2, 3), "Copper,L2,Inr");
        assert_eq!(
            mask_file_name("c", BoardKind::Flex, Side::Bottom),
            "fab/c-coverlay-bottom.gbr"
        );
    }

    #[test]
    fn arcs_use_ij_from_the_rounded_centre() {
        // Centre and start off the nanometre grid: I/J is the difference of
        // the rounded values, so the radius at both ends agrees to 1 nm.
        let a = crate::geometry::Arc::from_start(
            Point::new(0.1 + 0.2, 0.0000004),
            Point::new(1.3000006, 0.0),
            std::f64::consts::FRAC_PI_2,
        );
        let mut w = Writer::new(FileFunction::Profile(None), "t", "t");
        w.aperture(None, 0.1);
        w.draw(&Segment::Arc(a));
        let text = String::from_utf8(w.finish().unwrap()).unwrap();
        assert!(text.contains("G03*\n"), "{text}");
        assert!(text.contains("I-1000001J0D01*"), "{text}");
    }

    #[test]
    fn surface_pads_are_regions_on_their_face_only() {
        let mut d = Design::sample();
        d.coil.layers = 2;
        d.stackup.copper = vec![0.035; 2];
        d.stackup.dielectric = vec![0.05];
        d.terminal_place.kind = crate::design::TerminalKind::Smd;
        let b = crate::geometry::build(&d).unwrap();
        let text = |bytes: Vec<u8>| String::from_utf8(bytes).unwrap();
        let top = text(copper(&d, &b, 1).unwrap());
        let bottom = text(copper(&d, &b, 2).unwrap());
        // Two pads on the top: two regions with the SMD pad function and
        // the pin names; none on the bottom.
        assert_eq!(top.matches("G36*").count(), 2, "{top}");
        assert_eq!(top.matches("%TA.AperFunction,SMDPad,CuDef*%").count(), 2);
        assert!(top.contains("%TO.P,L1,1*%") && top.contains("%TO.P,L1,2*%"));
        assert_eq!(bottom.matches("G36*").count(), 0);
        assert!(!bottom.contains("ComponentPad"));
        let mask_top = text(mask(&d, &b, Side::Top).unwrap());
        let mask_bottom = text(mask(&d, &b, Side::Bottom).unwrap());
        assert_eq!(mask_top.matches("G36*").count(), 2);
        assert_eq!(mask_bottom.matches("G36*").count(), 0);
        assert!(!mask_bottom.contains("D03*"));
    }
}
