//! Reading a design file (TOML) into a validated [`DesignRequest`].
//!
//! Every value is read with its byte span, so that each problem points at
//! the key or value it is about. Problems are collected rather than
//! stopping at the first, as far as later checks do not depend on earlier
//! values. One reader per table, each in its own file; `table.rs` holds
//! the helpers they share, `known_keys.rs` the unknown-key check.

mod array;
mod board;
mod coil;
mod drive;
mod fin;
mod holes;
mod known_keys;
mod magnet;
mod name;
mod rotor;
mod rules;
mod stackup;
mod table;
mod tail;

pub use coil::{MAX_SIZE_MM, MAX_TURNS};
pub use drive::DEFAULT_CURRENT_A;
pub use fin::DEFAULT_DAMPING_RATIO;

use super::error::{DesignError, DesignErrors};
use super::keys::LimitKey;
use super::model::DesignRequest;
use super::spans::KeySpans;
use table::{Ctx, Table};
use toml::de::DeTable;

/// Reads and validates a design file.
///
/// `limits` are the `[rules]` keys that override rule limits (the rule
/// registry's, `rules::LIMITS`; `crate::pipeline::parse` passes them).
/// Returns every problem found (at least one) with the dotted key and the
/// byte span it is about. Defaults are documented in the README's key
/// reference.
pub fn read(text: &str, limits: &[LimitKey]) -> Result<DesignRequest, DesignErrors> {
    let doc = DeTable::parse(text).map_err(|e| DesignError {
        key: "syntax".into(),
        span: e.span(),
        message: format!("TOML syntax error: {}", e.message().trim()),
        help: Some("see https://toml.io for the file syntax".into()),
    })?;
    let mut cx = Ctx::new(limits);
    let root = Table::root(doc.get_ref());
    cx.check_keys(&root);
    let name = name::read(&mut cx, &root);

    let coil_t = cx.table(&root, "coil");
    let stackup_t = cx.table(&root, "stackup");
    let via_t = cx.table(&root, "via");
    let terminal_t = cx.table(&root, "terminal");
    let board_t = cx.table(&root, "board");
    let rules_t = cx.table(&root, "rules");
    let magnet_t = cx.table(&root, "magnet");
    let drive_t = cx.table(&root, "drive");
    let fin_t = cx.table(&root, "fin");
    let tail_t = cx.table(&root, "tail");
    let array_t = cx.table(&root, "array");
    let rotor_t = cx.table(&root, "rotor");

    let mut coil = coil::read(&mut cx, &coil_t);
    let layers = coil.as_ref().and_then(|c| c.layers);
    // Layers in series, or pairs in parallel: the windings the current
    // passes one after another.
    let groups = coil.as_ref().and_then(|c| {
        c.layers.map(|n| match c.wiring {
            crate::design::Wiring::ParallelPairs => n / 2,
            crate::design::Wiring::Series => n,
        })
    });
    let stackup = stackup::read(&mut cx, &stackup_t, layers);
    let via = holes::read(&mut cx, &via_t, holes::VIA);
    let terminal = holes::read(&mut cx, &terminal_t, holes::TERMINAL);
    let mut terminal_place = holes::read_place(&mut cx, &terminal_t, groups);
    let board = board::read(&mut cx, &board_t);
    let rules = rules::read(&mut cx, &rules_t);
    let magnet = magnet::read(&mut cx, &magnet_t);
    let drive = drive::read(&mut cx, &drive_t);
    let fin = fin::read(&mut cx, &fin_t, magnet.as_ref());
    let tail = tail::read(&mut cx, &tail_t, stackup.kind);
    let rotor = rotor::read(&mut cx, &rotor_t);
    let array = array::read(&mut cx, &array_t, rotor.as_ref());
    if let Some(c) = coil.as_mut().filter(|c| c.is_sector()) {
        sector_slot(
            &mut cx,
            c,
            array.as_ref(),
            (&coil_t, &array_t, &terminal_t),
            &mut terminal_place,
        );
    }
    // A rotor turns over a ring of coils: its magnets need one.
    let ring =
        array.is_some_and(|a| matches!(a.arrangement, super::model::Arrangement::Ring { .. }));
    if rotor.is_some_and(|r| r.magnets.is_some()) && !ring && !array_t.present() {
        cx.err(
            String::from("rotor"),
            rotor_t.span.clone(),
            "a rotor's magnets turn over a ring of coils: this design has one coil",
            Some(
                "add [array] with arrangement = \"ring\", or remove the magnet keys from [rotor]"
                    .into(),
            ),
        );
    } else if rotor.is_some_and(|r| r.magnets.is_some()) && array.is_some() && !ring {
        cx.err(
            String::from("array.arrangement"),
            array_t.span_of("arrangement"),
            "a rotor's magnets turn over a ring of coils, not a grid",
            Some("use arrangement = \"ring\", or remove the magnet keys from [rotor]".into()),
        );
    }

    let Ctx {
        mut errors,
        misspelled,
        ..
    } = cx;
    // A key reported as a typo is absent: that it is missing is not news.
    errors.retain(|e| !misspelled.contains(&e.key));
    if !errors.is_empty() {
        return Err(DesignErrors { errors });
    }
    let Some(coil) = coil else {
        return Err(DesignError {
            key: "coil".into(),
            span: None,
            message: "the design needs a [coil] table".into(),
            help: Some("start from `coilwright init FILE`".into()),
        }
        .into());
    };
    Ok(DesignRequest {
        name,
        coil: coil.into_request(),
        stackup,
        via,
        terminal,
        terminal_place,
        board,
        rules,
        magnet,
        drive,
        fin,
        tail,
        array,
        rotor,
        spans: KeySpans::of(doc.get_ref()),
    })
}

/// A sector fills a slot of the `[array]` ring: gives it the ring's sizes,
/// or says it needs a ring. Its terminals face out of the ring (terminal
/// angle 0, where its layers end and the buses run).
fn sector_slot(
    cx: &mut Ctx,
    c: &mut coil::CoilInput,
    array: Option<&super::model::Array>,
    (coil_t, array_t, terminal_t): (&Table, &Table, &Table),
    place: &mut super::model::TerminalPlace,
) {
    use super::model::Arrangement;
    match array.map(|a| a.arrangement) {
        Some(Arrangement::Ring {
            count,
            inner_diameter,
            outer_diameter,
            spacing,
        }) => c.set_slot((
            count,
            inner_diameter,
            outer_diameter,
            spacing.unwrap_or(c.clearance()),
        )),
        // A bad [array] has been reported already.
        None if array_t.present() => {}
        _ => cx.err(
            coil_t.key("shape"),
            coil_t.span_of("shape"),
            "a sector fills a slot of a ring of coils, and this design has no ring",
            Some("add [array] with arrangement = \"ring\", count, inner_diameter and outer_diameter, or use another shape".into()),
        ),
    }
    if terminal_t.has("angle") && place.angle_deg != 0.0 {
        cx.err(
            terminal_t.key("angle"),
            terminal_t.span_of("angle"),
            "a sector's terminals face out of the ring, where its layers end: the angle is 0",
            Some("remove angle or set angle = 0".into()),
        );
    }
    place.angle_deg = 0.0;
}
