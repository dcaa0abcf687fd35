//! `[rotor]`: the optional rotor of magnets turning over a ring of coils.

use super::super::model::{Rotor, RotorMagnet, RotorMagnets};
use super::super::units::{Remanence, Torque};
use super::table::{Ctx, Sign, Table};

/// Most magnet poles on a rotor.
pub(super) const MAX_POLES: i64 = 96;

/// Reads `[rotor]`; absent table, no rotor. `poles` is required. The
/// magnets are optional, but any of their keys asks for `thickness`,
/// `remanence`, `gap`, the sizes of the chosen magnet shape and
/// `pitch_diameter` (not for arc magnets: their mean diameter).
/// Neighbouring magnets must not overlap.
pub(super) fn read(cx: &mut Ctx, t: &Table) -> Option<Rotor> {
    if !t.present() {
        return None;
    }
    let poles = match cx.integer(t, "poles", 2, MAX_POLES) {
        Some(p) if p % 2 == 1 => {
            cx.err(
                t.key("poles"),
                t.span_of("poles"),
                format!("{p} poles: magnets alternate north and south, so the count is even"),
                Some(format!("use {} or {}", p - 1, p + 1)),
            );
            None
        }
        Some(p) => Some(p as u32),
        None => {
            if !t.has("poles") {
                cx.missing(t, "poles", Some("an even number of magnets, e.g. 8".into()));
            }
            None
        }
    };
    let sized = MAGNET_KEYS.iter().any(|k| t.has(k));
    let magnets = if sized { magnets(cx, t, poles) } else { None };
    let torque = cx
        .quantity::<Torque>(t, "torque", Sign::Positive)
        .map(Torque::newton_metres);
    if t.has("torque") && !sized {
        cx.err(
            t.key("torque"),
            t.span_of("torque"),
            "a torque needs the rotor's magnets to be turned into a current".to_string(),
            Some(
                "size the magnets (magnet, thickness, remanence, gap ...) or leave torque out"
                    .into(),
            ),
        );
    }
    let rotor = Rotor {
        poles: poles?,
        magnets,
        torque,
    };
    Some(rotor)
}

/// The keys that size the magnets: any of them asks for all that the
/// shape needs.
const MAGNET_KEYS: [&str; 12] = [
    "magnet",
    "diameter",
    "width",
    "length",
    "inner_diameter",
    "outer_diameter",
    "angle",
    "thickness",
    "remanence",
    "gap",
    "pitch_diameter",
    "discs",
];

/// Reads the magnets' keys of `[rotor]`.
fn magnets(cx: &mut Ctx, t: &Table, poles: Option<u32>) -> Option<RotorMagnets> {
    let thickness = cx.req_length(t, "thickness", Sign::Positive);
    let remanence = cx
        .quantity::<Remanence>(t, "remanence", Sign::Positive)
        .map(Remanence::tesla);
    if !t.has("remanence") {
        cx.missing(
            t,
            "remanence",
            Some("e.g. \"1.2T\" for sintered NdFeB".into()),
        );
    }
    let gap = cx.req_length(t, "gap", Sign::Positive);
    let discs = match cx.integer(t, "discs", 1, 2) {
        Some(d) => d as u8,
        None => 1,
    };
    let shape = cx.choice(t, "magnet").unwrap_or(0);
    let magnet = match shape {
        1 => RotorMagnet::Block {
            width: cx.req_length(t, "width", Sign::Positive),
            length: cx.req_length(t, "length", Sign::Positive),
        },
        2 => {
            let inner_diameter = cx.req_length(t, "inner_diameter", Sign::NonNegative);
            let outer_diameter = cx.req_length(t, "outer_diameter", Sign::Positive);
            if outer_diameter <= inner_diameter && outer_diameter > 0.0 {
                cx.err(
                    t.key("outer_diameter"),
                    t.span_of("outer_diameter"),
                    format!(
                        "{outer_diameter} mm is not above inner_diameter ({inner_diameter} mm)"
                    ),
                    Some("the segments lie between inner_diameter and outer_diameter".into()),
                );
            }
            let angle = match t.get("angle") {
                None => {
                    cx.missing(
                        t,
                        "angle",
                        Some("degrees each segment spans, e.g. 36".into()),
                    );
                    0.0
                }
                Some(_) => cx
                    .number(t, "angle", 0.0, 360.0, "degrees above 0, e.g. 36")
                    .unwrap_or(0.0),
            };
            RotorMagnet::Arc {
                inner_diameter,
                outer_diameter,
                angle,
            }
        }
        _ => RotorMagnet::Cylinder {
            diameter: cx.req_length(t, "diameter", Sign::Positive),
        },
    };
    // Keys of the other shapes are mistakes, not options.
    let own: &[&str] = match magnet {
        RotorMagnet::Cylinder { .. } => &["diameter"],
        RotorMagnet::Block { .. } => &["width", "length"],
        RotorMagnet::Arc { .. } => &["inner_diameter", "outer_diameter", "angle"],
    };
    // The size keys of every shape (MAGNET_KEYS after `magnet`, before
    // `thickness`).
    for &k in &MAGNET_KEYS[1..7] {
        if t.has(k) && !own.contains(&k) {
            cx.err(
                t.key(k),
                t.span_of(k),
                format!(
                    "{k} does not size {} magnets",
                    ["cylinder", "block", "arc"][shape]
                ),
                Some(format!(
                    "{} magnets take {}",
                    ["cylinder", "block", "arc"][shape],
                    own.join(", ")
                )),
            );
        }
    }
    let pitch_diameter = match (magnet, t.has("pitch_diameter")) {
        (
            RotorMagnet::Arc {
                inner_diameter,
                outer_diameter,
                ..
            },
            false,
        ) => (inner_diameter + outer_diameter) / 2.0,
        _ => cx.req_length(t, "pitch_diameter", Sign::Positive),
    };
    let magnets = RotorMagnets {
        magnet,
        thickness,
        remanence: remanence?,
        gap,
        pitch_diameter,
        discs,
    };
    if let Some((key, message, help)) = overlap(&magnets, poles?) {
        cx.err(t.key(key), t.span_of(key), message, Some(help));
    }
    Some(magnets)
}

/// Whether neighbouring magnets overlap (or an arc magnet spans more than
/// its share of the circle): the key to blame, what is wrong, what fits.
fn overlap(r: &RotorMagnets, poles: u32) -> Option<(&'static str, String, String)> {
    let share = 360.0 / poles as f64;
    let rp = r.pitch_diameter / 2.0;
    let half = (share / 2.0).to_radians();
    match r.magnet {
        RotorMagnet::Cylinder { diameter } => {
            // Centre to centre of neighbours: the chord 2 rp sin(pi/poles).
            let room = 2.0 * rp * half.sin();
            (diameter > room).then(|| {
                (
                    "diameter",
                    format!(
                        "{diameter} mm magnets overlap their neighbours by {:.3} mm on a {} mm pitch circle",
                        diameter - room,
                        r.pitch_diameter
                    ),
                    format!("at most {room:.3} mm for {} poles", poles),
                )
            })
        }
        RotorMagnet::Block { width, length } => {
            // The inner corners come closest: half-width within the
            // wedge's half-width at the inner face.
            let inner = rp - length / 2.0;
            let room = 2.0 * inner * half.tan();
            (inner <= 0.0 || width > room).then(|| {
                (
                    "width",
                    format!(
                        "{width} mm blocks overlap their neighbours at their inner faces ({inner:.3} mm from the axis)"
                    ),
                    format!("at most {:.3} mm for {} poles", room.max(0.0), poles),
                )
            })
        }
        RotorMagnet::Arc { angle, .. } => (angle > share).then(|| {
            (
                "angle",
                format!("{angle} degree segments overlap: each pole has {share:.3} degrees"),
                format!("at most {share:.3} degrees for {} poles", poles),
            )
        }),
    }
}
