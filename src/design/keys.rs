//! The key registry: every key a design file may contain, in one list.
//!
//! Each entry names its table and key, the kind of value it takes and a
//! one-line doc. The reader derives from it which keys each table accepts
//! (the unknown-key check and its did-you-mean), which tables exist and
//! which words a choice accepts; the sweep derives which keys it can vary
//! and how their values are written; a test checks that README's key table
//! lists exactly these keys.
//!
//! The `[rules]` keys that override a rule's limit (`min_clearance`, ...)
//! belong to the rule registry (`rules::RULES`), each rule with its limit;
//! the reader is handed them as [`LimitKey`]s, and [`with_limits`] merges
//! them into one list.

use serde::Serialize;
use std::fmt;

/// What kind of value a key takes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Kind {
    /// A length: a bare number (millimetres) or a string with a unit.
    Length,
    /// A quantity other than a length: a bare number in `unit`, or a string
    /// with a unit.
    Quantity {
        /// The unit of a bare number (`"oz"` for copper weight).
        unit: &'static str,
    },
    /// A plain number without a unit.
    Number,
    /// A whole number.
    Integer,
    /// One of a few words.
    Choice(&'static [&'static str]),
    /// Free text.
    Text,
    /// `true` or `false`.
    Switch,
}

/// One key of a design file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct Key {
    /// Table the key sits in (`coil`); empty for the top level.
    pub table: &'static str,
    /// Key name inside the table (`trace_width`).
    pub name: &'static str,
    /// Kind of value.
    pub kind: Kind,
    /// What it sets, in one line.
    pub doc: &'static str,
}

impl Key {
    /// The dotted path, e.g. `coil.trace_width` (`name` at the top level).
    pub fn path(&self) -> String {
        self.to_string()
    }
}

impl fmt::Display for Key {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.table.is_empty() {
            f.write_str(self.name)
        } else {
            write!(f, "{}.{}", self.table, self.name)
        }
    }
}

/// A rule limit a design may override under `[rules]` (and a rule profile
/// file must set): a smallest length, mm. The rule registry owns these,
/// one per rule that has a limit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct LimitKey {
    /// Key name, e.g. `min_clearance`.
    pub name: &'static str,
    /// Whether zero is a valid value (otherwise it must be above zero).
    pub zero_allowed: bool,
    /// What the limit is, in one line.
    pub doc: &'static str,
}

impl LimitKey {
    /// This limit as a `[rules]` key of the design file.
    pub fn key(&self) -> Key {
        Key {
            table: "rules",
            name: self.name,
            kind: Kind::Length,
            doc: self.doc,
        }
    }
}

const fn key(table: &'static str, name: &'static str, kind: Kind, doc: &'static str) -> Key {
    Key {
        table,
        name,
        kind,
        doc,
    }
}

use Kind::{Choice, Integer, Length, Number, Switch, Text};

/// Every design-file key but the rule limits, table by table in file order.
pub const KEYS: &[Key] = &[
    key(
        "",
        "name",
        Text,
        "used in file names: letters, digits, `-` `_` `.`",
    ),
    // [coil]
    key(
        "coil",
        "shape",
        Choice(&["circle", "polygon", "rectangle", "sector"]),
        "outline of the spiral (sector: fills a slot of the [array] ring)",
    ),
    key("coil", "sides", Integer, "polygon only: 3 to 12"),
    key(
        "coil",
        "width",
        Length,
        "rectangle only: outer copper width",
    ),
    key(
        "coil",
        "height",
        Length,
        "rectangle only: outer copper height",
    ),
    key(
        "coil",
        "outer_diameter",
        Length,
        "circle/polygon: the winding's outer size, to the outer edge of the outermost turn's copper (polygon: across corners); the outer lead ring, vias and pads lie outside it",
    ),
    key(
        "coil",
        "inner_diameter",
        Length,
        "free centre: the circle inside the innermost turn's inner edge (polygon: across flats); the centre vias lie inside it",
    ),
    key(
        "coil",
        "turns",
        Number,
        "turns per layer, may be fractional; \"max\" = as many as fit",
    ),
    key("coil", "trace_width", Length, "copper track width"),
    key(
        "coil",
        "clearance",
        Length,
        "gap between neighbouring turns",
    ),
    key("coil", "layers", Integer, "copper layers, 1 to 32"),
    key(
        "coil",
        "wiring",
        Choice(&["series", "parallel-pairs"]),
        "how the layers are connected",
    ),
    key(
        "coil",
        "corner",
        Choice(&["sharp", "round"]),
        "polygon/rectangle corner style",
    ),
    key(
        "coil",
        "corner_radius",
        Length,
        "innermost corner radius, with corner = \"round\"; sector: the outline's corner radius",
    ),
    // [stackup]
    key(
        "stackup",
        "kind",
        Choice(&["flex", "rigid"]),
        "flexible or rigid board",
    ),
    key(
        "stackup",
        "copper",
        Kind::Quantity { unit: "oz" },
        "copper weight or thickness: one value, or one per layer",
    ),
    key(
        "stackup",
        "dielectric",
        Length,
        "one value, or one per gap between copper layers",
    ),
    key(
        "stackup",
        "dielectric_material",
        Text,
        "dielectric name for the job file",
    ),
    key(
        "stackup",
        "dielectric_constant",
        Number,
        "relative permittivity",
    ),
    key("stackup", "plating", Length, "via barrel plating thickness"),
    key(
        "stackup",
        "cover",
        Length,
        "coverlay (flex) or solder mask (rigid) per face",
    ),
    key(
        "stackup",
        "bend_radius",
        Length,
        "flex only: radius the board is bent to",
    ),
    key(
        "stackup",
        "bend",
        Choice(&["static", "dynamic"]),
        "bent once, or flexing in use",
    ),
    // [via], [terminal], [board]
    key("via", "drill", Length, "finished via hole"),
    key("via", "diameter", Length, "via pad, larger than the drill"),
    key("terminal", "drill", Length, "finished terminal hole"),
    key(
        "terminal",
        "diameter",
        Length,
        "terminal pad, larger than the drill",
    ),
    key(
        "terminal",
        "kind",
        Choice(&["hole", "smd"]),
        "plated through holes, or surface pads on one face",
    ),
    key(
        "terminal",
        "side",
        Choice(&["top", "bottom"]),
        "smd only: the face of the surface pads",
    ),
    key(
        "terminal",
        "pad_width",
        Length,
        "smd only: surface pad size across the lead",
    ),
    key(
        "terminal",
        "pad_length",
        Length,
        "smd only: surface pad size along the lead",
    ),
    key(
        "terminal",
        "angle",
        Number,
        "degrees from +x counter-clockwise where the terminals leave (90 = top)",
    ),
    key(
        "terminal",
        "lead_length",
        Length,
        "brings the outside terminals this far out from the coil",
    ),
    key("board", "margin", Length, "copper to board edge"),
    // [rules]; the limits come from the rule registry.
    key(
        "rules",
        "profile",
        Text,
        "built-in rule profile name, or a path to a profile file",
    ),
    // [magnet]
    key("magnet", "diameter", Length, "magnet diameter"),
    key(
        "magnet",
        "thickness",
        Length,
        "magnet thickness along the axis",
    ),
    key(
        "magnet",
        "remanence",
        Kind::Quantity { unit: "T" },
        "remanence of the magnet material",
    ),
    key("magnet", "gap", Length, "coil surface to magnet face"),
    // [drive]
    key(
        "drive",
        "voltage",
        Kind::Quantity { unit: "V" },
        "voltage source (give voltage or current)",
    ),
    key(
        "drive",
        "current",
        Kind::Quantity { unit: "A" },
        "current source (give voltage or current)",
    ),
    key(
        "drive",
        "ambient",
        Kind::Quantity { unit: "C" },
        "surrounding temperature",
    ),
    key(
        "drive",
        "max_temperature",
        Kind::Quantity { unit: "C" },
        "highest allowed copper temperature",
    ),
    key(
        "drive",
        "frequency",
        Kind::Quantity { unit: "Hz" },
        "frequency of the waveform, and for impedance and Q",
    ),
    key(
        "drive",
        "convection",
        Number,
        "heat transfer coefficient, W/(m^2 K)",
    ),
    key("drive", "emissivity", Number, "surface emissivity, 0 to 1"),
    key(
        "drive",
        "waveform",
        Choice(&["dc", "square", "sine", "pulse"]),
        "shape of the drive over time; the amplitude is voltage or current",
    ),
    key(
        "drive",
        "duty",
        Number,
        "square/pulse: fraction of the period on, above 0 up to 1",
    ),
    key(
        "drive",
        "bipolar",
        Switch,
        "square: polarity reverses each half period (H-bridge) instead of off",
    ),
    key(
        "drive",
        "surroundings",
        Choice(&["still-air", "moving-air", "water"]),
        "what the board gives its heat to",
    ),
    key(
        "drive",
        "air_speed",
        Kind::Quantity { unit: "m/s" },
        "moving-air only: speed of the air along the board",
    ),
    // [fin]
    key(
        "fin",
        "free_length",
        Length,
        "flexible fin: clamp to free end",
    ),
    key("fin", "width", Length, "width of the fin"),
    key(
        "fin",
        "load_at",
        Length,
        "clamp to the coil's centre (default: the free end)",
    ),
    key(
        "fin",
        "moving",
        Choice(&["coil", "magnet"]),
        "which part rides on the fin",
    ),
    key(
        "fin",
        "added_mass",
        Kind::Quantity { unit: "g" },
        "extra mass at the load point",
    ),
    key(
        "fin",
        "damping_ratio",
        Number,
        "damping of the first mode (default 0.03)",
    ),
    // [tail]
    key(
        "tail",
        "length",
        Length,
        "flex only: board edge to the tail's end, along the terminal angle",
    ),
    key("tail", "width", Length, "width of the tail strip"),
    key(
        "tail",
        "fingers",
        Integer,
        "contact fingers at the end, 2 to 64 (the first two carry the coil)",
    ),
    key("tail", "pitch", Length, "finger centre to centre"),
    key(
        "tail",
        "finger_width",
        Length,
        "finger size across the tail",
    ),
    key(
        "tail",
        "finger_length",
        Length,
        "finger size along the tail",
    ),
    key(
        "tail",
        "stiffener",
        Length,
        "thickness of the stiffener behind the fingers (0: none)",
    ),
    // [array]
    key(
        "array",
        "arrangement",
        Choice(&["ring", "grid"]),
        "copies of the coil on a ring about the origin, or on a grid",
    ),
    key("array", "count", Integer, "ring: number of coils, 2 to 96"),
    key(
        "array",
        "inner_diameter",
        Length,
        "ring: inner diameter of the annulus the coils fill",
    ),
    key(
        "array",
        "outer_diameter",
        Length,
        "ring: outer diameter of the annulus the coils fill",
    ),
    key(
        "array",
        "spacing",
        Length,
        "ring: smallest copper gap between neighbouring coils (default: the clearance)",
    ),
    key("array", "rows", Integer, "grid: rows, 1 to 32"),
    key("array", "columns", Integer, "grid: columns, 1 to 32"),
    key("array", "pitch_x", Length, "grid: centre to centre along x"),
    key("array", "pitch_y", Length, "grid: centre to centre along y"),
    key(
        "array",
        "phases",
        Integer,
        "1 (every coil in series), 2 or 3; more than 1 needs [rotor] poles",
    ),
    key(
        "array",
        "connection",
        Choice(&["star", "delta", "separate"]),
        "how the phases meet their pads (separate: two pads per phase)",
    ),
    key(
        "array",
        "neutral",
        Switch,
        "star: bring the star point out to its own pad N",
    ),
    // [rotor]
    key(
        "rotor",
        "poles",
        Integer,
        "magnet poles facing the coils, alternating north and south (even, 2 to 96)",
    ),
    key(
        "rotor",
        "magnet",
        Choice(&["cylinder", "block", "arc"]),
        "shape of the rotor's magnets (default cylinder)",
    ),
    key("rotor", "diameter", Length, "cylinder magnets: diameter"),
    key(
        "rotor",
        "width",
        Length,
        "block magnets: size across the radius",
    ),
    key(
        "rotor",
        "length",
        Length,
        "block magnets: size along the radius",
    ),
    key(
        "rotor",
        "inner_diameter",
        Length,
        "arc magnets: inner diameter of the segments",
    ),
    key(
        "rotor",
        "outer_diameter",
        Length,
        "arc magnets: outer diameter of the segments",
    ),
    key(
        "rotor",
        "angle",
        Number,
        "arc magnets: degrees each segment spans",
    ),
    key(
        "rotor",
        "thickness",
        Length,
        "magnet thickness along the axis",
    ),
    key(
        "rotor",
        "remanence",
        Kind::Quantity { unit: "T" },
        "remanence of the magnet material",
    ),
    key(
        "rotor",
        "gap",
        Length,
        "top copper surface to the magnets' faces",
    ),
    key(
        "rotor",
        "pitch_diameter",
        Length,
        "circle through the magnets' centres (arc magnets: their mean diameter)",
    ),
    key(
        "rotor",
        "discs",
        Integer,
        "1, or 2 with a second disc below the board (doubles and evens the axial field)",
    ),
    key(
        "rotor",
        "torque",
        Kind::Quantity { unit: "N m" },
        "torque the motor must give: the report's phase current and copper loss at it",
    ),
];

/// Every design-file key: [`KEYS`] with `limits` as `[rules]` keys after
/// `profile`, in file order.
pub fn with_limits(limits: &[LimitKey]) -> Vec<Key> {
    let mut out = Vec::with_capacity(KEYS.len() + limits.len());
    for k in KEYS {
        out.push(*k);
        if k.table == "rules" && k.name == "profile" {
            out.extend(limits.iter().map(LimitKey::key));
        }
    }
    out
}

/// The tables, in file order.
pub fn tables() -> impl Iterator<Item = &'static str> {
    KEYS.iter()
        .enumerate()
        .filter(|(i, k)| !k.table.is_empty() && (*i == 0 || KEYS[i - 1].table != k.table))
        .map(|(_, k)| k.table)
}

/// The words a choice key accepts.
///
/// # Panics
/// If `table.name` is not a choice in [`KEYS`] (a reader asking for a key
/// the registry does not list).
pub fn choices(table: &str, name: &str) -> &'static [&'static str] {
    match KEYS.iter().find(|k| k.table == table && k.name == name) {
        Some(Key {
            kind: Choice(words),
            ..
        }) => words,
        _ => panic!("`{table}.{name}` is not a choice in the key registry"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tables_in_file_order() {
        let t: Vec<_> = tables().collect();
        assert_eq!(
            t,
            [
                "coil", "stackup", "via", "terminal", "board", "rules", "magnet", "drive", "fin",
                "tail", "array", "rotor"
            ]
        );
    }

    #[test]
    fn each_table_is_one_run_and_keys_are_unique() {
        let all = with_limits(&[LimitKey {
            name: "min_x",
            zero_allowed: true,
            doc: "x",
        }]);
        let mut seen = std::collections::BTreeSet::new();
        for k in &all {
            assert!(seen.insert(k.path()), "{k} twice");
        }
        let mut runs: Vec<&str> = all.iter().map(|k| k.table).collect();
        runs.dedup();
        let mut sorted = runs.clone();
        sorted.sort();
        sorted.dedup();
        assert_eq!(runs.len(), sorted.len(), "a table is split: {runs:?}");
        let i = all.iter().position(|k| k.name == "min_x").unwrap();
        assert_eq!(all[i - 1].path(), "rules.profile");
        assert_eq!(all[i].path(), "rules.min_x");
    }

    #[test]
    fn choices_come_from_the_registry() {
        assert_eq!(choices("coil", "wiring"), ["series", "parallel-pairs"]);
    }
}
