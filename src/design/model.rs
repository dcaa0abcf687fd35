//! The validated design: every length in millimetres, every value checked.
//!
//! [`super::read`] turns a design file into a [`DesignRequest`]: every value
//! checked, but the coil's sizes as given (two of outer diameter, inner
//! diameter and turns). Resolving the third needs the geometry, so
//! `crate::pipeline::parse` does it and returns the [`Design`], on which
//! every later stage can rely on all three.

use super::spans::KeySpans;
use serde::Serialize;
use std::collections::BTreeMap;

/// A complete, validated coil design. Lengths are millimetres.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Design {
    /// Design name (used in file names and titles).
    pub name: String,
    /// Winding geometry.
    pub coil: Coil,
    /// Layer stack.
    pub stackup: Stackup,
    /// Vias joining layers.
    pub via: HoleSize,
    /// Terminal pads (plated through holes).
    pub terminal: HoleSize,
    /// Where the terminals leave the coil.
    pub terminal_place: TerminalPlace,
    /// Board outline.
    pub board: BoardSettings,
    /// Fab rules to check against.
    pub rules: RulesRequest,
    /// Optional permanent magnet driven by the coil.
    pub magnet: Option<Magnet>,
    /// Electrical drive and thermal environment.
    pub drive: Drive,
    /// Optional flexible fin carrying the coil or the magnet.
    pub fin: Option<Fin>,
    /// Optional flex tail with connector fingers.
    pub tail: Option<Tail>,
    /// Optional array of copies of the coil on one board (`[array]`).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub array: Option<Array>,
    /// Optional rotor the coils face (`[rotor]`).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub rotor: Option<Rotor>,
}

/// Copies of the coil placed on one board and wired into phases
/// (`[array]`). Lengths in mm.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Array {
    /// Where the copies sit.
    pub arrangement: Arrangement,
    /// Number of phases: 1 (every coil in series), 2 or 3.
    pub phases: u32,
    /// How the phases meet the terminals.
    pub connection: Connection,
    /// Star connection: bring the star point out to its own pad "N".
    pub neutral: bool,
}

/// Where the copies of an array sit.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Arrangement {
    /// `count` coils evenly spaced on a ring about the board's origin,
    /// filling the annulus between `inner_diameter` and `outer_diameter`,
    /// each turned to face outward (coil 0 on +x).
    Ring {
        /// Number of coils.
        count: u32,
        /// Inner diameter of the annulus the coils fill, mm.
        inner_diameter: f64,
        /// Outer diameter of the annulus, mm.
        outer_diameter: f64,
        /// Smallest copper gap between neighbouring coils, mm (`None`: the
        /// coil's clearance).
        spacing: Option<f64>,
    },
    /// `rows` x `columns` coils on a rectangular grid centred on the origin,
    /// row 0 at the bottom, column 0 at the left.
    Grid {
        /// Rows (along y).
        rows: u32,
        /// Columns (along x).
        columns: u32,
        /// Centre-to-centre distance along x, mm.
        pitch_x: f64,
        /// Centre-to-centre distance along y, mm.
        pitch_y: f64,
    },
}

impl Arrangement {
    /// Number of coils.
    pub fn count(&self) -> u32 {
        match *self {
            Arrangement::Ring { count, .. } => count,
            Arrangement::Grid { rows, columns, .. } => rows * columns,
        }
    }
}

/// How the phases of an array meet their terminals.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Connection {
    /// The phase ends meet at a star point; one pad per phase (and "N"
    /// when `neutral`).
    Star,
    /// Each phase's end joins the next phase's start; one pad per corner.
    Delta,
    /// Two pads per phase.
    Separate,
}

/// A strip of the flex board leaving the coil at the terminal angle, with
/// contact fingers at its end for a board-to-flex connector (`[tail]`).
/// Lengths in mm.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Tail {
    /// From the coil board's edge to the tail's end, along its axis, mm.
    pub length: f64,
    /// Width of the strip, mm.
    pub width: f64,
    /// Number of contact fingers (the first two carry the coil).
    pub fingers: u32,
    /// Centre-to-centre spacing of the fingers, mm.
    pub pitch: f64,
    /// Finger size across the tail, mm.
    pub finger_width: f64,
    /// Finger size along the tail, mm.
    pub finger_length: f64,
    /// Thickness of the stiffener behind the fingers, mm (0: none).
    pub stiffener: f64,
}

/// Outline of the spiral.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Shape {
    /// Circular spiral of true arcs.
    Circle,
    /// Regular polygon spiral, 3..=12 sides.
    Polygon {
        /// Number of sides.
        sides: u8,
    },
    /// Rectangular spiral; `width` x `height` is the outer copper size, mm.
    Rectangle {
        /// Outer copper width (x), mm.
        width: f64,
        /// Outer copper height (y), mm.
        height: f64,
    },
    /// Annular sector filling one slot of an `[array]` ring: arcs about the
    /// ring's centre at the annulus's inner and outer radius, two sides
    /// parallel to the slot's bounding rays (each `spacing / 2` inside its
    /// ray, so neighbouring sectors are `spacing` apart all along), four
    /// rounded corners. In the coil's own frame the axis is the middle of
    /// the slot's radial extent, +x points away from the ring's centre
    /// (which lies at `(-(inner_radius + outer_radius) / 2, 0)`). The
    /// outline is the outermost turn's outer copper edge; the sizes come
    /// from `[array]`.
    Sector {
        /// Coils on the ring (slots), >= 2.
        count: u32,
        /// Inner radius of the annulus about the ring's centre, mm.
        inner_radius: f64,
        /// Outer radius of the annulus about the ring's centre, mm.
        outer_radius: f64,
        /// Copper gap between neighbouring sectors, mm.
        spacing: f64,
        /// Radius of the outline's four corners (outer copper edge), mm;
        /// inner turns' corners shrink with the offset down to half a pitch.
        corner_radius: f64,
    },
}

/// Corner style of polygon and rectangle spirals.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Corner {
    /// Straight sides meeting at a point.
    Sharp,
    /// Corners rounded by arcs; `radius` (mm) is the centre-line radius of
    /// the innermost corner; each outer turn's corner grows by the pitch so
    /// that the corners are concentric and the pitch stays exact.
    Round {
        /// Innermost corner radius, mm.
        radius: f64,
    },
}

/// How the layers are connected.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Wiring {
    /// All layers in series.
    Series,
    /// Adjacent layers in parallel pairs, the pairs in series (even layer counts).
    ParallelPairs,
}

impl Wiring {
    /// As people write it: "series", "parallel pairs".
    pub fn words(self) -> &'static str {
        match self {
            Wiring::Series => "series",
            Wiring::ParallelPairs => "parallel pairs",
        }
    }
}

/// Winding geometry. All sizes resolved.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Coil {
    /// Shape of the spiral.
    pub shape: Shape,
    /// Diameter of the smallest circle about the axis that holds all winding
    /// copper, mm (for a rectangle: its diagonal).
    pub outer_diameter: f64,
    /// Diameter of the largest circle about the axis free of winding copper, mm.
    pub inner_diameter: f64,
    /// Turns per layer (may be fractional).
    pub turns: f64,
    /// Track width, mm.
    pub trace_width: f64,
    /// Gap between neighbouring turns, mm.
    pub clearance: f64,
    /// Number of copper layers, 1..=32.
    pub layers: u8,
    /// Series or parallel-pairs.
    pub wiring: Wiring,
    /// Corner style (polygon and rectangle).
    pub corner: Corner,
}

impl Coil {
    /// Centre-to-centre distance of neighbouring turns, mm.
    pub fn pitch(&self) -> f64 {
        self.trace_width + self.clearance
    }

    /// The outer size as people read it: "12.000 mm" for a circle, "14.000
    /// mm across corners" for a polygon, "24.000 x 12.000 mm" (width x
    /// height) for a rectangle, "filling 1/12 of the ring 24.000 to 50.000
    /// mm" for a sector.
    pub fn outer_size_text(&self) -> String {
        match self.shape {
            Shape::Circle => format!("{:.3} mm", self.outer_diameter),
            Shape::Polygon { .. } => format!("{:.3} mm across corners", self.outer_diameter),
            Shape::Rectangle { width, height } => format!("{width:.3} x {height:.3} mm"),
            Shape::Sector {
                count,
                inner_radius,
                outer_radius,
                ..
            } => format!(
                "filling 1/{count} of the ring {:.3} to {:.3} mm",
                2.0 * inner_radius,
                2.0 * outer_radius
            ),
        }
    }

    /// Turns per layer as people read them: to 0.01 turn, without trailing
    /// zeros ("15.25", "17.5", "20").
    pub fn turns_text(&self) -> String {
        turns_text(self.turns)
    }
}

/// Turns as shown to people: rounded to 0.01 turn, without trailing zeros
/// ("15.25", "17.5", "20").
pub fn turns_text(turns: f64) -> String {
    let s = format!("{turns:.2}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// Rigid or flexible board.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum BoardKind {
    /// Flexible (polyimide, coverlay).
    Flex,
    /// Rigid (FR-4, solder mask).
    Rigid,
}

impl BoardKind {
    /// As people write it: "flex", "rigid".
    pub fn words(self) -> &'static str {
        match self {
            BoardKind::Flex => "flex",
            BoardKind::Rigid => "rigid",
        }
    }
}

/// Static (bent once to install) or dynamic (bent repeatedly).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum BendKind {
    /// Bent once, at installation.
    Static,
    /// Bent repeatedly in service.
    Dynamic,
}

/// A requested bend of a flexible board.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Bend {
    /// Bend radius, mm.
    pub radius: f64,
    /// Static or dynamic.
    pub kind: BendKind,
}

/// Layer stack.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Stackup {
    /// Flex or rigid.
    pub kind: BoardKind,
    /// Copper thickness per layer, top first, mm (length = layers).
    pub copper: Vec<f64>,
    /// Dielectric thickness per gap between copper layers, top first, mm
    /// (length = layers - 1).
    pub dielectric: Vec<f64>,
    /// Dielectric material name (for the job file), e.g. "Polyimide", "FR4".
    pub dielectric_material: String,
    /// Relative permittivity of the dielectric.
    pub dielectric_constant: f64,
    /// Via barrel plating thickness, mm.
    pub plating: f64,
    /// Coverlay (flex) or solder mask (rigid) thickness on each outer face, mm.
    pub cover: f64,
    /// Requested bend, flex only.
    pub bend: Option<Bend>,
}

impl BendKind {
    /// Smallest bend radius as a multiple of the finished thickness: 10 for
    /// one and two copper layers, 20 for more, 100 for dynamic bending,
    /// whatever the layer count. Ratios commonly quoted from IPC-2223
    /// (common practice, no single source). The one table of bend ratios.
    pub fn ratio(self, copper_layers: usize) -> f64 {
        match self {
            BendKind::Dynamic => 100.0,
            BendKind::Static if copper_layers <= 2 => 10.0,
            BendKind::Static => 20.0,
        }
    }
}

impl Stackup {
    /// Finished thickness of the board, mm: all copper, all dielectric and
    /// the cover (coverlay or solder mask) on both faces.
    pub fn finished_thickness(&self) -> f64 {
        self.copper.iter().sum::<f64>() + self.dielectric.iter().sum::<f64>() + 2.0 * self.cover
    }

    /// Smallest bend radius of this stack-up, mm: [`BendKind::ratio`] x
    /// [`Stackup::finished_thickness`].
    pub fn min_bend_radius(&self, kind: BendKind) -> f64 {
        kind.ratio(self.copper.len()) * self.finished_thickness()
    }
}

/// Drill and pad size of a plated hole.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct HoleSize {
    /// Finished hole diameter, mm.
    pub drill: f64,
    /// Pad (land) diameter, mm.
    pub diameter: f64,
}

/// What a terminal is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum TerminalKind {
    /// A plated through hole with a round land on every layer.
    Hole,
    /// A rectangular surface pad on one face, no hole.
    Smd,
}

/// A face of the board.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Face {
    /// Layer 1.
    Top,
    /// The last layer.
    Bottom,
}

/// Where the terminals leave the coil and what they are (`[terminal]`
/// `kind`, `side`, `pad_width`, `pad_length`, `angle`, `lead_length`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TerminalPlace {
    /// Plated holes or surface pads.
    pub kind: TerminalKind,
    /// Face of surface pads (unused for holes).
    pub side: Face,
    /// Surface pad size across the lead, mm.
    pub pad_width: f64,
    /// Surface pad size along the lead, mm.
    pub pad_length: f64,
    /// Polar angle of terminal 1 about the coil axis, degrees from +x
    /// counter-clockwise (0 to 360); terminal 2 sits next to it
    /// counter-clockwise when it is outside. 90 (the top) by default.
    pub angle_deg: f64,
    /// How far both outside terminals are brought out beyond their slot
    /// next to the winding, radially, on a lead of track width, mm (0: the
    /// pads sit in their slots).
    pub lead_length: f64,
}

impl TerminalPlace {
    /// Plated holes at the top, no lead; surface pads (when chosen) 1 mm by
    /// 1.5 mm on the top (invented defaults).
    pub const DEFAULT: TerminalPlace = TerminalPlace {
        kind: TerminalKind::Hole,
        side: Face::Top,
        pad_width: 1.0,
        pad_length: 1.5,
        angle_deg: 90.0,
        lead_length: 0.0,
    };

    /// The angle in radians (90 degrees gives exactly pi / 2).
    pub fn angle(&self) -> f64 {
        self.angle_deg / 180.0 * std::f64::consts::PI
    }

    /// Surface pads?
    pub fn is_smd(&self) -> bool {
        self.kind == TerminalKind::Smd
    }
}

impl Design {
    /// Diameter of the circle a terminal's land fills (the land for holes,
    /// the circle about a surface pad's corners), mm: what the slots next
    /// to the winding and the free centre make room for.
    pub fn terminal_land(&self) -> f64 {
        let t = &self.terminal_place;
        if t.is_smd() {
            (t.pad_width * t.pad_width + t.pad_length * t.pad_length).sqrt()
        } else {
            self.terminal.diameter
        }
    }

    /// Copper layer of surface pads (1 = top), `None` for holes. A tail's
    /// fingers are the terminals' surface pads: on the terminal `side`.
    pub fn smd_layer(&self) -> Option<u8> {
        let t = &self.terminal_place;
        (t.is_smd() || self.tail.is_some()).then_some(match t.side {
            Face::Top => 1,
            Face::Bottom => self.coil.layers,
        })
    }

    /// Finished thickness at a tail's fingers, mm, what the connector
    /// specifies: the board with its cover opened on the fingers' face
    /// (copper, dielectric, one cover) plus the stiffener on the other
    /// face (its adhesive counted in the stiffener's thickness); `None`
    /// without a tail.
    pub fn finger_thickness(&self) -> Option<f64> {
        self.tail
            .map(|t| self.stackup.finished_thickness() - self.stackup.cover + t.stiffener)
    }
}

/// Board outline settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct BoardSettings {
    /// Distance from the outermost copper to the board edge, mm.
    pub margin: f64,
}

/// Which fab rule profile to use, and per-design overrides (mm).
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct RulesRequest {
    /// Built-in profile name ("standard", "fine", "cautious") or a path.
    pub profile: String,
    /// Rule limits the design overrides: limit key as in a rule profile
    /// (`min_clearance`) to its value, mm. The keys are the rule registry's
    /// limits (`rules::RULES`); the reader accepts no others.
    pub overrides: BTreeMap<String, f64>,
}

/// The rotor of an axial-flux machine turning over a ring of coils
/// (`[rotor]`): `poles` magnets of alternating polarity, equally spaced on
/// a circle about the board's origin. The pole count alone sets an
/// array's winding pattern; with the magnets' sizes the analysis gives the
/// flux linkage, back-EMF and torque.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Rotor {
    /// Number of magnets (poles), even.
    pub poles: u32,
    /// The magnets, when the design sizes them.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub magnets: Option<RotorMagnets>,
    /// The torque the motor must give, N m (with magnets only): the
    /// report's phase current and copper loss at it.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub torque: Option<f64>,
}

/// The magnets of a [`Rotor`], axially magnetised. Lengths in mm.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RotorMagnets {
    /// The magnets' shape and size.
    pub magnet: RotorMagnet,
    /// Magnet thickness along the axis, mm.
    pub thickness: f64,
    /// Remanence of the magnet material, tesla.
    pub remanence: f64,
    /// Gap from the top copper surface to the magnets' faces, mm (and from
    /// the bottom copper surface to the second disc's, with two discs).
    pub gap: f64,
    /// Diameter of the circle through the magnets' centres, mm.
    pub pitch_diameter: f64,
    /// Rotor discs: 1 above the board, or 2 (a second one below it).
    pub discs: u8,
}

/// The shape of a rotor's magnets, each centred on the pitch circle.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "magnet", rename_all = "snake_case")]
pub enum RotorMagnet {
    /// A round disc magnet.
    Cylinder {
        /// Diameter, mm.
        diameter: f64,
    },
    /// A rectangular block, `length` along the radius and `width` across it.
    Block {
        /// Size across the radius (tangential), mm.
        width: f64,
        /// Size along the radius, mm.
        length: f64,
    },
    /// A segment of a ring: between two radii and over an angle.
    Arc {
        /// Inner diameter of the segment, mm.
        inner_diameter: f64,
        /// Outer diameter of the segment, mm.
        outer_diameter: f64,
        /// Angle the segment spans, degrees.
        angle: f64,
    },
}

/// An axially magnetised cylindrical permanent magnet on the coil axis.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Magnet {
    /// Diameter, mm.
    pub diameter: f64,
    /// Thickness (axial length), mm.
    pub thickness: f64,
    /// Remanence, tesla.
    pub remanence: f64,
    /// Gap from the coil's top copper surface to the magnet face, mm.
    pub gap: f64,
}

/// The electrical source.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", content = "value", rename_all = "snake_case")]
pub enum Source {
    /// Constant voltage, volts.
    Voltage(f64),
    /// Constant current, amperes.
    Current(f64),
}

/// Drive and thermal environment.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Drive {
    /// Voltage or current source.
    pub source: Source,
    /// Ambient temperature, degrees C.
    pub ambient: f64,
    /// Highest allowed copper temperature, degrees C.
    pub max_temperature: f64,
    /// Optional frequency for impedance and Q, Hz.
    pub frequency: Option<f64>,
    /// Optional override of the convection coefficient, W/(m^2 K).
    pub convection: Option<f64>,
    /// Surface emissivity for radiation (0..1).
    pub emissivity: f64,
    /// Shape of the drive over time.
    pub waveform: Waveform,
    /// Fraction of the period the drive is on (square and pulse), 0 < duty <= 1.
    pub duty: f64,
    /// Square wave: the polarity reverses each half period (an H-bridge)
    /// instead of switching off.
    pub bipolar: bool,
    /// What the board gives its heat to.
    pub surroundings: Surroundings,
}

/// The drive's shape over time; the amplitude is the source's voltage or
/// current, the period `1 / drive.frequency`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Waveform {
    /// Constant.
    Dc,
    /// On for `duty` of the period, then off (or reversed, `bipolar`).
    Square,
    /// Sinusoid of the given amplitude (peak).
    Sine,
    /// On for `duty` of the period, then off: a pulse train.
    Pulse,
}

/// What the board gives its heat to.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Surroundings {
    /// Still air: natural convection and radiation.
    StillAir,
    /// Air moving along the board at `air_speed_m_s`.
    MovingAir {
        /// Air speed, m/s.
        air_speed_m_s: f64,
    },
    /// Still water: natural convection in water, no radiation.
    Water,
}

/// Which part rides on the flexible fin.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Moving {
    /// The coil moves; the magnet is fixed.
    Coil,
    /// The magnet moves (glued to the fin); the coil is fixed.
    Magnet,
}

/// The flexible fin: a strip of the board clamped at one end, carrying
/// the coil (or the magnet) at `load_at`. Lengths in mm.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Fin {
    /// Clamp to free end, mm.
    pub free_length: f64,
    /// Width of the strip, mm.
    pub width: f64,
    /// Clamp to the coil's centre, mm (at most `free_length`).
    pub load_at: f64,
    /// Which part rides on the fin.
    pub moving: Moving,
    /// Extra mass at the load point, g.
    pub added_mass: f64,
    /// Damping ratio of the first mode.
    pub damping_ratio: f64,
}

impl Design {
    /// A small valid design (4-layer circular flex coil, 20 mm outside,
    /// 10 turns, 0.1/0.1 mm) for examples and tests. Invented numbers.
    pub fn sample() -> Design {
        let layers = 4u8;
        Design {
            name: "sample-coil".into(),
            coil: Coil {
                shape: Shape::Circle,
                outer_diameter: 20.0,
                inner_diameter: 20.0 - 2.0 * (10.0 * 0.2 + 0.1),
                turns: 10.0,
                trace_width: 0.1,
                clearance: 0.1,
                layers,
                wiring: Wiring::Series,
                corner: Corner::Sharp,
            },
            stackup: Stackup {
                kind: BoardKind::Flex,
                copper: vec![0.035; layers as usize],
                dielectric: vec![0.05; layers as usize - 1],
                dielectric_material: "Polyimide".into(),
                dielectric_constant: 3.4,
                plating: 0.02,
                cover: 0.0375,
                bend: None,
            },
            via: HoleSize {
                drill: 0.2,
                diameter: 0.45,
            },
            terminal: HoleSize {
                drill: 0.4,
                diameter: 0.8,
            },
            terminal_place: TerminalPlace::DEFAULT,
            board: BoardSettings { margin: 0.5 },
            rules: RulesRequest {
                profile: "standard".into(),
                overrides: BTreeMap::new(),
            },
            magnet: Some(Magnet {
                diameter: 5.0,
                thickness: 2.0,
                remanence: 1.3,
                gap: 0.5,
            }),
            drive: Drive {
                source: Source::Voltage(3.3),
                ambient: 25.0,
                max_temperature: 80.0,
                frequency: None,
                convection: None,
                emissivity: 0.9,
                waveform: Waveform::Dc,
                duty: 1.0,
                bipolar: false,
                surroundings: Surroundings::StillAir,
            },
            fin: None,
            tail: None,
            array: None,
            rotor: None,
        }
    }
}

/// How many turns the design file asks for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TurnsRequest {
    /// A given number of turns per layer.
    Count(f64),
    /// As many as fit (rounded down to 0.01 turn).
    Max,
}

/// What `[coil]` asks for: the winding with its sizes not yet resolved.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CoilRequest {
    /// Shape of the spiral (a rectangle carries its outer width and height).
    pub shape: Shape,
    /// Outer diameter, mm, if given (circle and polygon).
    pub outer_diameter: Option<f64>,
    /// Inner (free centre) diameter, mm, if given.
    pub inner_diameter: Option<f64>,
    /// Turns per layer, if given.
    pub turns: Option<TurnsRequest>,
    /// Track width, mm.
    pub trace_width: f64,
    /// Gap between neighbouring turns, mm.
    pub clearance: f64,
    /// Number of copper layers, 1..=32.
    pub layers: u8,
    /// Series or parallel-pairs.
    pub wiring: Wiring,
    /// Corner style (polygon and rectangle).
    pub corner: Corner,
}

impl CoilRequest {
    /// The coil with its three sizes resolved (outer and inner diameter,
    /// mm; turns per layer).
    pub fn resolved(&self, outer_diameter: f64, inner_diameter: f64, turns: f64) -> Coil {
        Coil {
            shape: self.shape,
            outer_diameter,
            inner_diameter,
            turns,
            trace_width: self.trace_width,
            clearance: self.clearance,
            layers: self.layers,
            wiring: self.wiring,
            corner: self.corner,
        }
    }
}

/// A design file read and validated, before the coil's sizes are resolved.
#[derive(Debug, Clone, PartialEq)]
pub struct DesignRequest {
    /// Design name.
    pub name: String,
    /// What `[coil]` asks for.
    pub coil: CoilRequest,
    /// Layer stack.
    pub stackup: Stackup,
    /// Vias joining layers.
    pub via: HoleSize,
    /// Terminal pads.
    pub terminal: HoleSize,
    /// Where the terminals leave the coil.
    pub terminal_place: TerminalPlace,
    /// Board outline.
    pub board: BoardSettings,
    /// Fab rules to check against.
    pub rules: RulesRequest,
    /// Optional permanent magnet.
    pub magnet: Option<Magnet>,
    /// Electrical drive and thermal environment.
    pub drive: Drive,
    /// Optional flexible fin.
    pub fin: Option<Fin>,
    /// Optional flex tail with connector fingers.
    pub tail: Option<Tail>,
    /// Optional array of copies of the coil.
    pub array: Option<Array>,
    /// Optional rotor.
    pub rotor: Option<Rotor>,
    /// Where each key is in the text.
    pub spans: KeySpans,
}

impl DesignRequest {
    /// The design, given its resolved coil (see [`CoilRequest::resolved`]).
    pub fn into_design(self, coil: Coil) -> Design {
        Design {
            name: self.name,
            coil,
            stackup: self.stackup,
            via: self.via,
            terminal: self.terminal,
            terminal_place: self.terminal_place,
            board: self.board,
            rules: self.rules,
            magnet: self.magnet,
            drive: self.drive,
            fin: self.fin,
            tail: self.tail,
            array: self.array,
            rotor: self.rotor,
        }
    }
}
