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

use crate::design::RuleOverrides;
use serde::Serialize;

/// The rule values a layout is checked against. Lengths in mm.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Profile {
    /// Profile name ("standard", or whatever a file calls itself).
    pub name: String,
    /// Narrowest track, mm.
    pub min_trace_width: f64,
    /// Smallest copper-to-copper gap, mm.
    pub min_clearance: f64,
    /// Smallest finished hole, mm.
    pub min_drill: f64,
    /// Smallest annular ring, (pad diameter - drill) / 2, mm.
    pub min_annular_ring: f64,
    /// Smallest hole-to-hole spacing, edge to edge, mm.
    pub min_hole_spacing: f64,
    /// Smallest copper-to-board-edge distance, mm.
    pub min_edge_clearance: f64,
}

/// Why a profile file cannot be used. Each variant names the key.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ProfileError {
    /// The text is not valid TOML.
    #[error("rule profile is not valid TOML: {0}")]
    Syntax(String),
    /// A key the profile format does not know.
    #[error("unknown key `{0}` in rule profile (known: {known})", known = KEYS.join(", "))]
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

/// Length keys of a profile, in file order (also the lengths a design's
/// `[rules]` table may override).
const LENGTH_KEYS: [&str; 6] = [
    "min_trace_width",
    "min_clearance",
    "min_drill",
    "min_annular_ring",
    "min_hole_spacing",
    "min_edge_clearance",
];

/// Every key a profile file may contain.
const KEYS: [&str; 8] = key_list(["name", "description"]);

/// `first` followed by [`LENGTH_KEYS`], at compile time.
pub(crate) const fn key_list<const A: usize, const N: usize>(
    first: [&'static str; A],
) -> [&'static str; N] {
    assert!(
        A + LENGTH_KEYS.len() == N,
        "N must be A plus the length keys"
    );
    let mut out = [""; N];
    let mut i = 0;
    while i < N {
        out[i] = if i < A { first[i] } else { LENGTH_KEYS[i - A] };
        i += 1;
    }
    out
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
        // The built-in files are tested to parse; a failure here is a bug.
        Self::builtin_text(name).and_then(|t| Profile::from_toml(t).ok())
    }

    /// A built-in profile by name, or an error naming the closest built-in
    /// name. (A design's `[rules] profile` may also be a path; reading the
    /// file is the command line's job, then [`Profile::from_toml`].)
    pub fn named(name: &str) -> Result<Profile, ProfileError> {
        Self::builtin(name).ok_or_else(|| ProfileError::UnknownProfile {
            name: name.to_string(),
            suggestion: Self::builtin_names()
                .map(|n| (strsim::jaro_winkler(n, name), n))
                .filter(|(score, _)| *score > 0.8)
                .max_by(|a, b| a.0.total_cmp(&b.0))
                .map(|(_, n)| n),
        })
    }

    /// Parses a profile file. Every length key is required; unknown keys
    /// are an error naming the key.
    pub fn from_toml(text: &str) -> Result<Profile, ProfileError> {
        let table: toml::Table = text
            .parse()
            .map_err(|e: toml::de::Error| ProfileError::Syntax(e.message().to_string()))?;
        if let Some(k) = table.keys().find(|k| !KEYS.contains(&k.as_str())) {
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
        let mut v = [0.0; 6];
        for (slot, key) in v.iter_mut().zip(LENGTH_KEYS) {
            let value = table.get(key).ok_or(ProfileError::Missing(key))?;
            *slot = length(key, value)?;
        }
        Ok(Profile {
            name,
            min_trace_width: v[0],
            min_clearance: v[1],
            min_drill: v[2],
            min_annular_ring: v[3],
            min_hole_spacing: v[4],
            min_edge_clearance: v[5],
        })
    }

    /// This profile with a design's per-rule overrides applied.
    pub fn with_overrides(&self, o: &RuleOverrides) -> Profile {
        Profile {
            name: self.name.clone(),
            min_trace_width: o.min_trace_width.unwrap_or(self.min_trace_width),
            min_clearance: o.min_clearance.unwrap_or(self.min_clearance),
            min_drill: o.min_drill.unwrap_or(self.min_drill),
            min_annular_ring: o.min_annular_ring.unwrap_or(self.min_annular_ring),
            min_hole_spacing: o.min_hole_spacing.unwrap_or(self.min_hole_spacing),
            min_edge_clearance: o.min_edge_clearance.unwrap_or(self.min_edge_clearance),
        }
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
        let s = Profile::builtin("standard").unwrap();
        assert_eq!((s.min_trace_width, s.min_clearance), (0.1, 0.1));
        let f = Profile::builtin("fine").unwrap();
        assert_eq!((f.min_trace_width, f.min_clearance), (0.075, 0.075));
        let c = Profile::builtin("cautious").unwrap();
        assert_eq!((c.min_trace_width, c.min_clearance), (0.15, 0.15));
        assert!(Profile::builtin("nonesuch").is_none());
    }

    #[test]
    fn unknown_profile_suggests_a_name() {
        let e = Profile::named("standart").unwrap_err();
        assert!(e.to_string().contains("did you mean `standard`"), "{e}");
        let e = Profile::named("zzz").unwrap_err();
        assert!(!e.to_string().contains("did you mean"), "{e}");
        assert_eq!(Profile::named("fine").unwrap().min_clearance, 0.075);
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
        assert!((p.min_clearance - 0.1016).abs() < 1e-12);
        assert!((p.min_drill - 0.25).abs() < 1e-12);
        let o = RuleOverrides {
            min_clearance: Some(0.09),
            ..Default::default()
        };
        let q = p.with_overrides(&o);
        assert_eq!(q.min_clearance, 0.09);
        assert_eq!(q.min_trace_width, p.min_trace_width);
    }
}
