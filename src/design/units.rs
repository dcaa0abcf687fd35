//! Physical quantities as written in a design file.
//!
//! Newtypes used only at the boundary, where unit mistakes happen: a value
//! in the design file is a bare number (in the quantity's default unit) or
//! a string with a unit, such as `"0.1mm"`, `"4mil"`, `"1oz"`, `"25C"`,
//! `"3.3V"`, `"0.5A"`, `"1.3T"` or `"100kHz"`. Each newtype converts once,
//! here, into the unit the rest of the program uses (millimetres, degrees
//! Celsius, volts, amperes, tesla, hertz).
//!
//! Every parser rejects NaN, infinities and unknown units; quantities that
//! cannot be negative reject negative values. Whether zero is allowed
//! depends on the key and is checked by the design-file parser.

use std::fmt;

/// Millimetres per inch (exact, by definition of the international inch).
const MM_PER_INCH: f64 = 25.4;

/// Nominal copper thickness of 1 oz/ft^2 copper foil, mm.
///
/// 35 um is the nominal value in common use (IPC-4562 lists 1 oz foil as
/// 34.3 um nominal; boards and fabs quote 35 um). Common practice.
pub const MM_PER_OZ_COPPER: f64 = 0.035;

/// Why a value could not be read as a quantity.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{message}")]
pub struct UnitError {
    /// What is wrong with the value.
    pub message: String,
    /// What would be accepted, e.g. `a number (mm) or "0.1mm", "4mil", ...`.
    pub allowed: &'static str,
}

impl UnitError {
    fn new(message: impl Into<String>, allowed: &'static str) -> UnitError {
        UnitError {
            message: message.into(),
            allowed,
        }
    }
}

/// A quantity that a design file may give as a bare number or as a string
/// with a unit.
pub trait Quantity: Sized + Copy {
    /// Name of the quantity for messages, e.g. "length".
    const WHAT: &'static str;
    /// What a user may write, for help texts.
    const ALLOWED: &'static str;
    /// Reads a bare number in the quantity's default unit.
    fn from_number(value: f64) -> Result<Self, UnitError>;
    /// Reads a string with a unit.
    fn from_text(text: &str) -> Result<Self, UnitError>;
    /// The value in the unit it is stored in (mm, C, V, A, T, Hz).
    fn value(self) -> f64;
}

/// Splits `"12.5 mm"` into `(12.5, "mm")`. Rejects NaN and infinities.
fn split_number(text: &str, allowed: &'static str) -> Result<(f64, String), UnitError> {
    let t = text.trim();
    let bytes = t.as_bytes();
    let mut end = 0;
    while end < bytes.len() {
        let c = bytes[end];
        let is_exp = (c == b'e' || c == b'E')
            && end > 0
            && bytes[..end].iter().any(u8::is_ascii_digit)
            && match bytes.get(end + 1) {
                Some(d) if d.is_ascii_digit() => true,
                Some(b'+' | b'-') => bytes.get(end + 2).is_some_and(u8::is_ascii_digit),
                _ => false,
            };
        if c.is_ascii_digit() || c == b'.' || c == b'_' || (end == 0 && (c == b'+' || c == b'-')) {
            end += 1;
        } else if is_exp {
            end += 2;
        } else {
            break;
        }
    }
    let lower = t.to_ascii_lowercase();
    let (num, unit) = t.split_at(end);
    if num.is_empty() || !num.bytes().any(|b| b.is_ascii_digit()) {
        let word = lower.trim_start_matches(['+', '-']);
        if word.starts_with("nan") || word.starts_with("inf") {
            return Err(UnitError::new(
                format!("`{t}` is not a finite number"),
                allowed,
            ));
        }
        return Err(UnitError::new(
            format!("`{t}` does not start with a number"),
            allowed,
        ));
    }
    let value: f64 = num
        .replace('_', "")
        .parse()
        .map_err(|_| UnitError::new(format!("`{num}` is not a number"), allowed))?;
    if !value.is_finite() {
        return Err(UnitError::new(
            format!("`{t}` is not a finite number"),
            allowed,
        ));
    }
    Ok((value, unit.trim().to_string()))
}

fn finite(value: f64, allowed: &'static str) -> Result<f64, UnitError> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(UnitError::new(
            format!("{value} is not a finite number"),
            allowed,
        ))
    }
}

fn non_negative(value: f64, what: &str, allowed: &'static str) -> Result<f64, UnitError> {
    let v = finite(value, allowed)?;
    if v < 0.0 {
        Err(UnitError::new(
            format!("a {what} cannot be negative (got {v})"),
            allowed,
        ))
    } else {
        Ok(v)
    }
}

fn unknown_unit(unit: &str, what: &str, allowed: &'static str) -> UnitError {
    if unit.is_empty() {
        UnitError::new(
            format!("the {what} has no unit; write it as a bare number or add a unit"),
            allowed,
        )
    } else {
        UnitError::new(format!("unknown {what} unit `{unit}`"), allowed)
    }
}

macro_rules! impl_traits {
    ($t:ident) => {
        impl std::str::FromStr for $t {
            type Err = UnitError;
            fn from_str(s: &str) -> Result<Self, UnitError> {
                <$t as Quantity>::from_text(s)
            }
        }
    };
}

/// A length, stored in millimetres.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Length(f64);

impl Length {
    /// The length in millimetres.
    pub fn mm(self) -> f64 {
        self.0
    }
}

impl Quantity for Length {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "length";
    const ALLOWED: &'static str = "a bare number in millimetres, or a string with mm, um, mil or in, e.g. 0.1, \"0.1mm\", \"35um\", \"4mil\", \"0.02in\"";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        Ok(Length(non_negative(value, Self::WHAT, Self::ALLOWED)?))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        let (v, unit) = split_number(text, Self::ALLOWED)?;
        let scale = match unit.to_ascii_lowercase().as_str() {
            "mm" => 1.0,
            "um" | "µm" | "μm" => 1e-3,
            "mil" | "mils" | "thou" => MM_PER_INCH / 1000.0,
            "in" | "inch" | "\"" => MM_PER_INCH,
            _ => return Err(unknown_unit(&unit, Self::WHAT, Self::ALLOWED)),
        };
        Self::from_number(v * scale)
    }
}
impl_traits!(Length);

/// A copper thickness, stored in millimetres; written as a weight in
/// ounces per square foot (1 oz = 35 um nominal) or as a length.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct CopperWeight(f64);

impl CopperWeight {
    /// The copper thickness in millimetres.
    pub fn thickness_mm(self) -> f64 {
        self.0
    }
}

impl Quantity for CopperWeight {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "copper weight";
    const ALLOWED: &'static str = "a weight in oz (1 oz = 35 um), e.g. \"1oz\", \"0.5oz\", \"2 oz\", or a thickness, e.g. \"35um\", 0.035 (mm)";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        Ok(CopperWeight(non_negative(
            value,
            Self::WHAT,
            Self::ALLOWED,
        )?))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        let (v, unit) = split_number(text, Self::ALLOWED)?;
        if unit.eq_ignore_ascii_case("oz") {
            return Self::from_number(v * MM_PER_OZ_COPPER);
        }
        match Length::from_text(text) {
            Ok(l) => Ok(CopperWeight(l.mm())),
            Err(e) => Err(UnitError::new(
                if unit.is_empty() {
                    e.message
                } else {
                    format!("unknown copper weight unit `{unit}`")
                },
                Self::ALLOWED,
            )),
        }
    }
}
impl_traits!(CopperWeight);

/// A temperature, stored in degrees Celsius.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Temperature(f64);

impl Temperature {
    /// The temperature in degrees Celsius.
    pub fn celsius(self) -> f64 {
        self.0
    }
}

impl Quantity for Temperature {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "temperature";
    const ALLOWED: &'static str =
        "degrees Celsius as a bare number or with C, e.g. 25, \"25C\", \"-10C\"";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        let v = finite(value, Self::ALLOWED)?;
        if v < -273.15 {
            return Err(UnitError::new(
                format!("{v} C is below absolute zero"),
                Self::ALLOWED,
            ));
        }
        Ok(Temperature(v))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        let (v, unit) = split_number(text, Self::ALLOWED)?;
        match unit.as_str() {
            "C" | "c" | "°C" | "degC" => Self::from_number(v),
            _ => Err(unknown_unit(&unit, Self::WHAT, Self::ALLOWED)),
        }
    }
}
impl_traits!(Temperature);

/// Reads `value unit` where unit is the base unit with an optional SI
/// prefix from `prefixes` (symbol, factor).
fn prefixed(
    text: &str,
    base: &str,
    prefixes: &[(&str, f64)],
    what: &str,
    allowed: &'static str,
) -> Result<f64, UnitError> {
    let (v, unit) = split_number(text, allowed)?;
    for (p, f) in prefixes {
        if unit == format!("{p}{base}") {
            return non_negative(v * f, what, allowed);
        }
    }
    Err(unknown_unit(&unit, what, allowed))
}

/// A voltage, stored in volts.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Voltage(f64);

impl Voltage {
    /// The voltage in volts.
    pub fn volts(self) -> f64 {
        self.0
    }
}

impl Quantity for Voltage {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "voltage";
    const ALLOWED: &'static str =
        "volts as a bare number or with V or mV, e.g. \"3.3V\", \"500mV\"";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        Ok(Voltage(non_negative(value, Self::WHAT, Self::ALLOWED)?))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        prefixed(
            text,
            "V",
            &[("", 1.0), ("m", 1e-3), ("k", 1e3)],
            Self::WHAT,
            Self::ALLOWED,
        )
        .map(Voltage)
    }
}
impl_traits!(Voltage);

/// A current, stored in amperes.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Current(f64);

impl Current {
    /// The current in amperes.
    pub fn amperes(self) -> f64 {
        self.0
    }
}

impl Quantity for Current {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "current";
    const ALLOWED: &'static str =
        "amperes as a bare number or with A or mA, e.g. \"0.5A\", \"150mA\"";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        Ok(Current(non_negative(value, Self::WHAT, Self::ALLOWED)?))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        prefixed(
            text,
            "A",
            &[("", 1.0), ("m", 1e-3)],
            Self::WHAT,
            Self::ALLOWED,
        )
        .map(Current)
    }
}
impl_traits!(Current);

/// Remanent flux density of a permanent magnet, stored in tesla.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Remanence(f64);

impl Remanence {
    /// The remanence in tesla.
    pub fn tesla(self) -> f64 {
        self.0
    }
}

impl Quantity for Remanence {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "remanence";
    const ALLOWED: &'static str =
        "tesla as a bare number or with T or mT, e.g. \"1.3T\", \"1250mT\"";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        Ok(Remanence(non_negative(value, Self::WHAT, Self::ALLOWED)?))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        prefixed(
            text,
            "T",
            &[("", 1.0), ("m", 1e-3)],
            Self::WHAT,
            Self::ALLOWED,
        )
        .map(Remanence)
    }
}
impl_traits!(Remanence);

/// A frequency, stored in hertz.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Frequency(f64);

impl Frequency {
    /// The frequency in hertz.
    pub fn hertz(self) -> f64 {
        self.0
    }
}

impl Quantity for Frequency {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "frequency";
    const ALLOWED: &'static str =
        "hertz as a bare number or with Hz, kHz, MHz, e.g. 50, \"100kHz\", \"1MHz\"";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        Ok(Frequency(non_negative(value, Self::WHAT, Self::ALLOWED)?))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        let (_, unit) = split_number(text, Self::ALLOWED)?;
        if unit == "mHz" {
            return Err(UnitError::new(
                "`mHz` would be millihertz; write MHz for megahertz",
                Self::ALLOWED,
            ));
        }
        // "mHz" (millihertz) is almost always a typo for MHz: refuse it.
        let unit_fixed = match unit.as_str() {
            "hz" | "HZ" => "Hz",
            "khz" | "KHz" | "KHZ" => "kHz",
            "Mhz" | "MHZ" => "MHz",
            "Ghz" | "GHZ" => "GHz",
            other => other,
        };
        let normalised = text.trim().replacen(unit.as_str(), unit_fixed, 1);
        prefixed(
            &normalised,
            "Hz",
            &[("", 1.0), ("k", 1e3), ("M", 1e6), ("G", 1e9)],
            Self::WHAT,
            Self::ALLOWED,
        )
        .map(Frequency)
    }
}
impl_traits!(Frequency);

/// A mass, stored in grams.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Mass(f64);

impl Mass {
    /// The mass in grams.
    pub fn grams(self) -> f64 {
        self.0
    }
}

impl Quantity for Mass {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "mass";
    const ALLOWED: &'static str = "grams as a bare number or with g or mg, e.g. \"0.1g\", \"50mg\"";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        Ok(Mass(non_negative(value, Self::WHAT, Self::ALLOWED)?))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        prefixed(
            text,
            "g",
            &[("", 1.0), ("m", 1e-3), ("k", 1e3)],
            Self::WHAT,
            Self::ALLOWED,
        )
        .map(Mass)
    }
}
impl_traits!(Mass);

/// A speed, stored in metres per second.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Speed(f64);

impl Speed {
    /// The speed in metres per second.
    pub fn metres_per_second(self) -> f64 {
        self.0
    }
}

impl Quantity for Speed {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "speed";
    const ALLOWED: &'static str =
        "metres per second as a bare number or with m/s, e.g. 2, \"1.5m/s\"";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        Ok(Speed(non_negative(value, Self::WHAT, Self::ALLOWED)?))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        prefixed(text, "m/s", &[("", 1.0)], Self::WHAT, Self::ALLOWED).map(Speed)
    }
}
impl_traits!(Speed);

/// A torque, stored in newton metres.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Torque(f64);

impl Torque {
    /// The torque in newton metres.
    pub fn newton_metres(self) -> f64 {
        self.0
    }
}

impl Quantity for Torque {
    fn value(self) -> f64 {
        self.0
    }
    const WHAT: &'static str = "torque";
    const ALLOWED: &'static str =
        "newton metres as a bare number or with Nm or mNm, e.g. 0.002, \"2mNm\"";
    fn from_number(value: f64) -> Result<Self, UnitError> {
        Ok(Torque(non_negative(value, Self::WHAT, Self::ALLOWED)?))
    }
    fn from_text(text: &str) -> Result<Self, UnitError> {
        prefixed(
            text,
            "Nm",
            &[("", 1.0), ("m", 1e-3), ("u", 1e-6)],
            Self::WHAT,
            Self::ALLOWED,
        )
        .map(Torque)
    }
}
impl_traits!(Torque);

impl fmt::Display for Length {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} mm", self.0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn near(a: f64, b: f64) {
        assert!((a - b).abs() < 1e-12, "{a} != {b}");
    }

    #[test]
    fn masses_and_speeds() {
        near("0.1g".parse::<Mass>().unwrap().grams(), 0.1);
        near("50mg".parse::<Mass>().unwrap().grams(), 0.05);
        near(Mass::from_number(2.0).unwrap().grams(), 2.0);
        near("1.5m/s".parse::<Speed>().unwrap().metres_per_second(), 1.5);
        assert!("3kn".parse::<Speed>().is_err());
        assert!("-1g".parse::<Mass>().is_err());
    }

    #[test]
    fn lengths_in_every_unit() {
        near("0.1mm".parse::<Length>().unwrap().mm(), 0.1);
        near("35um".parse::<Length>().unwrap().mm(), 0.035);
        near("35 µm".parse::<Length>().unwrap().mm(), 0.035);
        near("4mil".parse::<Length>().unwrap().mm(), 0.1016);
        near("0.02in".parse::<Length>().unwrap().mm(), 0.508);
        near("1e-1mm".parse::<Length>().unwrap().mm(), 0.1);
        near("  2 MM ".parse::<Length>().unwrap().mm(), 2.0);
        near(Length::from_number(3.0).unwrap().mm(), 3.0);
        near("0mm".parse::<Length>().unwrap().mm(), 0.0);
    }

    #[test]
    fn bad_lengths_say_what_is_allowed() {
        for bad in ["3furlong", "-1mm", "nan", "infmm", "mm", "", "1", "1.2.3mm"] {
            let e = bad.parse::<Length>().unwrap_err();
            assert!(e.allowed.contains("mil"), "{bad}: {e:?}");
        }
        assert!(
            "3furlong"
                .parse::<Length>()
                .unwrap_err()
                .message
                .contains("furlong")
        );
        assert!(Length::from_number(f64::NAN).is_err());
        assert!(Length::from_number(f64::INFINITY).is_err());
        assert!(Length::from_number(-0.5).is_err());
    }

    #[test]
    fn copper_weight_in_ounces_or_length() {
        near("1oz".parse::<CopperWeight>().unwrap().thickness_mm(), 0.035);
        near(
            "0.5oz".parse::<CopperWeight>().unwrap().thickness_mm(),
            0.0175,
        );
        near("2 oz".parse::<CopperWeight>().unwrap().thickness_mm(), 0.07);
        near(
            "18um".parse::<CopperWeight>().unwrap().thickness_mm(),
            0.018,
        );
        assert!("1lb".parse::<CopperWeight>().is_err());
        assert!("-1oz".parse::<CopperWeight>().is_err());
    }

    #[test]
    fn temperatures() {
        near("25C".parse::<Temperature>().unwrap().celsius(), 25.0);
        near("-10 °C".parse::<Temperature>().unwrap().celsius(), -10.0);
        assert!("300K".parse::<Temperature>().is_err());
        assert!(Temperature::from_number(-300.0).is_err());
    }

    #[test]
    fn electrical_and_magnetic() {
        near("3.3V".parse::<Voltage>().unwrap().volts(), 3.3);
        near("500mV".parse::<Voltage>().unwrap().volts(), 0.5);
        near("0.5A".parse::<Current>().unwrap().amperes(), 0.5);
        near("150mA".parse::<Current>().unwrap().amperes(), 0.15);
        near("1.3T".parse::<Remanence>().unwrap().tesla(), 1.3);
        near("1250mT".parse::<Remanence>().unwrap().tesla(), 1.25);
        assert!("3.3A".parse::<Voltage>().is_err());
        assert!("-1V".parse::<Voltage>().is_err());
    }

    #[test]
    fn frequencies() {
        near("100kHz".parse::<Frequency>().unwrap().hertz(), 1e5);
        near("1MHz".parse::<Frequency>().unwrap().hertz(), 1e6);
        near("1 Mhz".parse::<Frequency>().unwrap().hertz(), 1e6);
        near("50Hz".parse::<Frequency>().unwrap().hertz(), 50.0);
        near(Frequency::from_number(60.0).unwrap().hertz(), 60.0);
        assert!("1mHz".parse::<Frequency>().is_err());
        assert!("1rpm".parse::<Frequency>().is_err());
    }
}
