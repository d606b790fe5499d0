//! The documents: the scenario contract read field by field (every error named by its JSON
//! path), resolved into a stack for the physics, the result document written from a trace, and
//! the design request documents; a scenario's spectrum (`spectrum`) is traced point by point.

pub mod conoscope;
pub mod custom_dispersion;
pub mod fields;
pub mod geometry;
pub mod group;
pub mod lc_cell;
pub mod request;
pub mod resolve;
pub mod result;
pub mod scenario;
pub mod spectrum;
pub mod white_light;
