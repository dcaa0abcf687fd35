//! The starter designs shipped with coilwright (`coilwright init --template
//! NAME`): the commented design files in `examples/`, each a sound design
//! of its own invented scenario (it passes its own rule check and stays
//! within its own limits: tested).

/// A starter design shipped with the library and the binary.
#[derive(Debug, Clone, Copy)]
pub struct Template {
    /// Name used with `--template`.
    pub name: &'static str,
    /// One-line description for `--list`.
    pub description: &'static str,
    /// The commented design file.
    pub text: &'static str,
}

const TEMPLATES: &[Template] = &[
    Template {
        name: "fin-actuator",
        description: "flexible 2-layer circular coil that flaps the tail fin of a toy fish with a 5 mm magnet",
        text: include_str!("../../examples/fin-actuator.toml"),
    },
    Template {
        name: "fin-tail",
        description: "the fin actuator with a flex tail of four 1 mm-pitch connector fingers and a stiffener",
        text: include_str!("../../examples/fin-tail.toml"),
    },
    Template {
        name: "motor-stator",
        description: "rigid 4-layer hexagonal coil, one stator winding of a small flat motor",
        text: include_str!("../../examples/motor-stator.toml"),
    },
    Template {
        name: "fan-stator",
        description: "whole stator of a flat fan motor: nine round 4-layer coils in a ring, three phases in star with buses, facing a 6-pole rotor",
        text: include_str!("../../examples/fan-stator.toml"),
    },
    Template {
        name: "gimbal-stator",
        description: "stator of a slim gimbal motor: twelve 4-layer sector coils filling a ring, three phases in star with buses, facing a 14-pole rotor",
        text: include_str!("../../examples/gimbal-stator.toml"),
    },
    Template {
        name: "pickup-coil",
        description: "single-layer circular pickup coil that counts magnet passes for a tachometer",
        text: include_str!("../../examples/pickup-coil.toml"),
    },
    Template {
        name: "haptic-strip",
        description: "flexible 2-layer rectangular coil under a wristband that taps the skin with a magnet",
        text: include_str!("../../examples/haptic-strip.toml"),
    },
    Template {
        name: "octagon-charger",
        description: "rigid 4-layer octagonal receive coil of a small wireless charging puck, layers in parallel pairs",
        text: include_str!("../../examples/octagon-charger.toml"),
    },
    Template {
        name: "wearable-buzzer",
        description: "rigid 2-layer rounded-rectangle voice coil that buzzes a 6 mm magnet in a badge",
        text: include_str!("../../examples/wearable-buzzer.toml"),
    },
    Template {
        name: "chime-speaker",
        description: "flexible 4-layer circular coil used as a small speaker: a 1 kHz on/off square wave moves a membrane under a 6 mm magnet",
        text: include_str!("../../examples/chime-speaker.toml"),
    },
    Template {
        name: "bath-paddle",
        description: "rigid 2-layer circular coil in water that kicks a bath-toy paddle with 0.4 s pulses of 1.2 A",
        text: include_str!("../../examples/bath-paddle.toml"),
    },
    Template {
        name: "puck-transmit",
        description: "rigid 2-layer circular transmit coil of a 6.78 MHz charging puck for a garden sensor (pairs with puck-receive)",
        text: include_str!("../../examples/puck-transmit.toml"),
    },
    Template {
        name: "puck-receive",
        description: "rigid 2-layer circular receive coil in the garden sensor's stake, charged by puck-transmit",
        text: include_str!("../../examples/puck-receive.toml"),
    },
    Template {
        name: "toy-tag-reader",
        description: "rigid 2-layer circular receive coil of a toy's tag reader at 6.78 MHz: Q, self-resonance and |Z| at its frequency",
        text: include_str!("../../examples/toy-tag-reader.toml"),
    },
];

/// The starter designs, in `--list` order.
pub fn templates() -> &'static [Template] {
    TEMPLATES
}
