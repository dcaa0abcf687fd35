//! Fab rule profiles: the numbers a board maker can build, as TOML.
//!
//! Three profiles are built in (`templates/rules/*.toml`): "standard"
//! (0.1/0.1 mm), "fine" (0.075/0.075 mm) and "cautious" (0.15/0.15 mm).
//! Their values are common practice, no source. A design may name one of
//! them or a file of its own, and override single values under `[rules]`.
//!
//! # Units
//! Millimetres. In a profile file a length is a bare number (mm) or a
//! string with a unit: "0.1mm", "100um", "4mil", "0.004in".

use super::LIMITS;
use crate::design::LimitKey;
use serde::ser::{Serialize, SerializeMap, Serializer};
use std::collections::BTreeMap;

/// The rule values a layout is checked against: a name and one value per
/// limit of the rule registry ([`LIMITS`]). Lengths in mm.
#[derive(Debug, Clone, PartialEq)]
pub struct Profile {
    /// Profile name ("standard", or whatever a file calls itself).
    pub name: String,
    /// One value per limit, in the order of [`LIMITS`], mm.
    values: Vec<f64>,
}

/// Why a profile file cannot be used. Each variant names the key.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ProfileError {
    /// The text is not valid TOML.
    #[error("rule profile is not valid TOML: {0}")]
    Syntax(String),
    /// A key the profile format does not know.
    #[error("unknown key `{0}` in rule profile (known: {known})", known = keys().collect::<Vec<_>>().join(", "))]
    UnknownKey(String),
    /// A required key is absent.
    #[error("rule profile lacks `{0}`")]
    Missing(&'static str),
    /// No built-in profile has this name.
    #[error("no built-in rule profile `{name}`{hint} (built in: standard, fine, cautious)", hint = match suggestion {
        Some(s) => format!("; did you mean `{s}`?"),
        None => String::new(),
    })]
    UnknownProfile {
        /// The name asked for.
        name: String,
        /// The closest built-in name, if one is close.
        suggestion: Option<&'static str>,
    },
    /// A value is not a usable length.
    #[error("`{key}` in rule profile: {reason}")]
    BadValue {
        /// The key.
        key: String,
        /// What is wrong.
        reason: String,
    },
}

/// Every key a profile file may contain, in file order: `name`,
/// `description`, then the limits.
fn keys() -> impl Iterator<Item = &'static str> {
    ["name", "description"]
        .into_iter()
        .chain(LIMITS.iter().map(|l| l.name))
}

/// Built-in profiles: (name, TOML text).
const BUILTIN: [(&str, &str); 3] = [
    (
        "standard",
        include_str!("../../templates/rules/standard.toml"),
    ),
    ("fine", include_str!("../../templates/rules/fine.toml")),
    (
        "cautious",
        include_str!("../../templates/rules/cautious.toml"),
    ),
];

impl Profile {
    /// A profile from a value for every limit of [`LIMITS`] (key, mm), in
    /// any order. Unknown and missing keys are errors naming the key.
    pub fn from_limits<'k>(
        name: impl Into<String>,
        values: impl IntoIterator<Item = (&'k str, f64)>,
    ) -> Result<Profile, ProfileError> {
        let mut slots: Vec<Option<f64>> = vec![None; LIMITS.len()];
        for (key, mm) in values {
            slots[index(key)?] = Some(mm);
        }
        let values = slots
            .into_iter()
            .zip(LIMITS)
            .map(|(v, l)| v.ok_or(ProfileError::Missing(l.name)))
            .collect::<Result<_, _>>()?;
        Ok(Profile {
            name: name.into(),
            values,
        })
    }

    /// The value of a limit by key (`min_clearance`), mm; `None` for a key
    /// that is not a limit.
    pub fn limit(&self, key: &str) -> Option<f64> {
        index(key).ok().map(|i| self.values[i])
    }

    /// Sets the value of a limit by key, mm.
    pub fn set_limit(&mut self, key: &str, mm: f64) -> Result<(), ProfileError> {
        let i = index(key)?;
        self.values[i] = mm;
        Ok(())
    }

    /// Every limit with its value, in the order of [`LIMITS`].
    pub fn limits(&self) -> impl Iterator<Item = (&'static LimitKey, f64)> + '_ {
        LIMITS.iter().zip(self.values.iter().copied())
    }

    /// The value of one of the registry's limits, mm (what a rule reads).
    pub(crate) fn min(&self, limit: &LimitKey) -> f64 {
        self.limit(limit.name)
            .expect("a rule's limit is in the registry, and every profile sets every limit")
    }

    /// Names of the built-in profiles.
    pub fn builtin_names() -> impl Iterator<Item = &'static str> {
        BUILTIN.iter().map(|(n, _)| *n)
    }

    /// The TOML text of a built-in profile (for `init`-style listings).
    pub fn builtin_text(name: &str) -> Option<&'static str> {
        BUILTIN.iter().find(|(n, _)| *n == name).map(|(_, t)| *t)
    }

    /// A built-in profile by name ("standard", "fine", "cautious").
    pub fn builtin(name: &str) -> Option<Profile> {
        // Parsed once in the process (a sweep asks for every candidate).
        // The built-in files are tested to parse; a failure here is a bug.
        static PARSED: std::sync::LazyLock<Vec<(&'static str, Option<Profile>)>> =
            std::sync::LazyLock::new(|| {
                BUILTIN
                    .iter()
                    .map(|(n, t)| (*n, Profile::from_toml(t).ok()))
                    .collect()
            });
        PARSED
            .iter()
            .find(|(n, _)| *n == name)
            .and_then(|(_, p)| p.clone())
    }

    /// A built-in profile by name, or an error naming the closest built-in
    /// name. (A design's `[rules] profile` may also be a path; reading the
    /// file is the command line's job, then [`Profile::from_toml`].)
    pub fn named(name: &str) -> Result<Profile, ProfileError> {
        Self::builtin(name).ok_or_else(|| ProfileError::UnknownProfile {
            name: name.to_string(),
            suggestion: crate::suggest::closest(name, Self::builtin_names()),
        })
    }

    /// Parses a profile file. Every limit key is required; unknown keys
    /// are an error naming the key.
    pub fn from_toml(text: &str) -> Result<Profile, ProfileError> {
        let table: toml::Table = text
            .parse()
            .map_err(|e: toml::de::Error| ProfileError::Syntax(e.message().to_string()))?;
        if let Some(k) = table
            .keys()
            .find(|k| !keys().any(|known| known == k.as_str()))
        {
            return Err(ProfileError::UnknownKey(k.clone()));
        }
        let name = match table.get("name") {
            None => "custom".to_string(),
            Some(toml::Value::String(s)) => s.clone(),
            Some(_) => {
                return Err(ProfileError::BadValue {
                    key: "name".into(),
                    reason: "must be a string".into(),
                });
            }
        };
        let mut values = Vec::with_capacity(LIMITS.len());
        for limit in LIMITS {
            let value = table
                .get(limit.name)
                .ok_or(ProfileError::Missing(limit.name))?;
            values.push(length(limit.name, value)?);
        }
        Ok(Profile { name, values })
    }

    /// This profile with a design's per-rule overrides applied (limit key
    /// to mm, as in `design.rules.overrides`).
    pub fn with_overrides(
        &self,
        overrides: &BTreeMap<String, f64>,
    ) -> Result<Profile, ProfileError> {
        let mut p = self.clone();
        for (key, &mm) in overrides {
            p.set_limit(key, mm)?;
        }
        Ok(p)
    }
}

/// Where a limit key is in [`LIMITS`].
fn index(key: &str) -> Result<usize, ProfileError> {
    LIMITS
        .iter()
        .position(|l| l.name == key)
        .ok_or_else(|| ProfileError::UnknownKey(key.to_string()))
}

impl Serialize for Profile {
    /// As a profile file reads: `name`, then every limit, mm.
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut map = s.serialize_map(Some(1 + self.values.len()))?;
        map.serialize_entry("name", &self.name)?;
        for (limit, mm) in self.limits() {
            map.serialize_entry(limit.name, &mm)?;
        }
        map.end()
    }
}

/// A length value in mm: a bare number or a string with a unit, read as a
/// design file reads lengths ([`crate::design::units::Length`]).
fn length(key: &str, v: &toml::Value) -> Result<f64, ProfileError> {
    use crate::design::units::{Length, Quantity};
    let bad = |reason: String| ProfileError::BadValue {
        key: key.to_string(),
        reason,
    };
    let parsed = match v {
        toml::Value::Float(f) => Length::from_number(*f),
        toml::Value::Integer(i) => Length::from_number(*i as f64),
        toml::Value::String(s) => Length::from_text(s),
        _ => return Err(bad(format!("must be a length: {}", Length::ALLOWED))),
    };
    parsed
        .map(Length::mm)
        .map_err(|e| bad(format!("{e}; allowed: {}", e.allowed)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn builtins_parse_with_their_documented_values() {
        let names: Vec<_> = Profile::builtin_names().collect();
        assert_eq!(names, ["standard", "fine", "cautious"]);
        for n in names {
            let p = Profile::builtin(n).unwrap();
            assert_eq!(p.name, n);
        }
        let widths = |n: &str| {
            let p = Profile::builtin(n).unwrap();
            (p.limit("min_trace_width"), p.limit("min_clearance"))
        };
        assert_eq!(widths("standard"), (Some(0.1), Some(0.1)));
        assert_eq!(widths("fine"), (Some(0.075), Some(0.075)));
        assert_eq!(widths("cautious"), (Some(0.15), Some(0.15)));
        assert!(Profile::builtin("nonesuch").is_none());
    }

    #[test]
    fn unknown_profile_suggests_a_name() {
        let e = Profile::named("standart").unwrap_err();
        assert!(e.to_string().contains("did you mean `standard`"), "{e}");
        let e = Profile::named("zzz").unwrap_err();
        assert!(!e.to_string().contains("did you mean"), "{e}");
        assert_eq!(
            Profile::named("fine").unwrap().limit("min_clearance"),
            Some(0.075)
        );
    }

    #[test]
    fn limits_come_from_the_rule_registry_in_rule_order() {
        let names: Vec<_> = LIMITS.iter().map(|l| l.name).collect();
        assert_eq!(
            names,
            [
                "min_trace_width",
                "min_clearance",
                "min_drill",
                "min_annular_ring",
                "min_hole_spacing",
                "min_edge_clearance"
            ]
        );
        let s = Profile::builtin("standard").unwrap();
        let all: Vec<_> = s.limits().map(|(l, mm)| (l.name, mm)).collect();
        let again = Profile::from_limits("standard", all.iter().copied()).unwrap();
        assert_eq!(again, s);
        let e = Profile::from_limits("x", all[1..].iter().copied()).unwrap_err();
        assert_eq!(e, ProfileError::Missing("min_trace_width"));
        let e = Profile::from_limits("x", [("min_colour", 1.0)]).unwrap_err();
        assert_eq!(e, ProfileError::UnknownKey("min_colour".into()));
        let json = serde_json::to_string(&s).unwrap();
        assert!(
            json.starts_with(r#"{"name":"standard","min_trace_width":0.1,"#),
            "{json}"
        );
    }

    #[test]
    fn unknown_key_is_named() {
        let t = Profile::builtin_text("standard").unwrap().to_string() + "min_via_size = 0.3\n";
        let e = Profile::from_toml(&t).unwrap_err();
        assert_eq!(e, ProfileError::UnknownKey("min_via_size".into()));
        assert!(e.to_string().contains("min_via_size"));
    }

    #[test]
    fn missing_and_bad_values_are_named() {
        let e = Profile::from_toml("min_trace_width = 0.1").unwrap_err();
        assert_eq!(e, ProfileError::Missing("min_clearance"));
        let t = Profile::builtin_text("fine")
            .unwrap()
            .replace("min_drill = 0.15", "min_drill = \"wide\"");
        match Profile::from_toml(&t).unwrap_err() {
            ProfileError::BadValue { key, .. } => assert_eq!(key, "min_drill"),
            e => panic!("{e:?}"),
        }
    }

    #[test]
    fn units_and_overrides() {
        let t = Profile::builtin_text("standard")
            .unwrap()
            .replace("min_clearance = 0.1 ", "min_clearance = \"4mil\"")
            .replace("min_drill = 0.2 ", "min_drill = \"250um\"");
        let p = Profile::from_toml(&t).unwrap();
        assert!((p.limit("min_clearance").unwrap() - 0.1016).abs() < 1e-12);
        assert!((p.limit("min_drill").unwrap() - 0.25).abs() < 1e-12);
        let o = BTreeMap::from([("min_clearance".to_string(), 0.09)]);
        let q = p.with_overrides(&o).unwrap();
        assert_eq!(q.limit("min_clearance"), Some(0.09));
        assert_eq!(q.limit("min_trace_width"), p.limit("min_trace_width"));
        let bad = BTreeMap::from([("min_colour".to_string(), 0.09)]);
        assert!(p.with_overrides(&bad).is_err());
    }
}
