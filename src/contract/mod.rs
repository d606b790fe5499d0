//! The documents: the scenario contract read field by field (every error named by its JSON
//! path) and the result document written from a trace.

pub mod fields;
pub mod scenario;
