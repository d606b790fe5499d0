//! The documents: the scenario contract read field by field (every error named by its JSON
//! path), resolved into a stack for the physics, and the result document written from a trace.

pub mod fields;
pub mod resolve;
pub mod result;
pub mod scenario;
