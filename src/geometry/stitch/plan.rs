//! Phase 1: the layer order and its transitions. Layers are grouped (one
//! layer per group in series, two in parallel pairs); the groups run
//! inward and outward in turn, so the junctions between them alternate
//! between the free centre and the outside of the winding.

use super::GeometryError;
use crate::design::Wiring;

/// How the layers are grouped and which junctions they need.
pub(super) struct Plan {
    /// Layers of each group in current order; a group is one layer (series)
    /// or two (parallel pairs).
    pub groups: Vec<Vec<u8>>,
}

impl Plan {
    pub fn new(layers: u8, wiring: Wiring) -> Result<Plan, GeometryError> {
        if !(1..=32).contains(&layers) {
            return Err(GeometryError::Layers(layers));
        }
        let groups = match wiring {
            Wiring::Series => (1..=layers).map(|l| vec![l]).collect(),
            Wiring::ParallelPairs => {
                if !layers.is_multiple_of(2) {
                    return Err(GeometryError::OddParallel(layers));
                }
                (0..layers / 2)
                    .map(|g| vec![2 * g + 1, 2 * g + 2])
                    .collect()
            }
        };
        Ok(Plan { groups })
    }

    /// Number of nodes in the centre: a via for each inward->outward change,
    /// plus the second terminal when the chain ends in the centre.
    pub fn centre_slots(&self) -> usize {
        self.groups.len().div_ceil(2)
    }

    /// Number of nodes outside: terminal 1, a via for each outward->inward
    /// change, and terminal 2 when the chain ends outside.
    pub fn outer_slots(&self) -> usize {
        let g = self.groups.len();
        1 + (g - 1) / 2 + usize::from(g.is_multiple_of(2))
    }

    /// Whether the second terminal is in the centre.
    pub fn ends_in_centre(&self) -> bool {
        self.groups.len() % 2 == 1
    }
}
