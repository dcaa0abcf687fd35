//! The design file: parsing, units and validation into a [`Design`].

mod design;

pub use design::*;
