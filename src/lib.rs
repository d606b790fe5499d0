//! Doublespar: exact double refraction and polarization in stacks of uniaxial crystal plates.
#![warn(missing_docs)]

pub mod error;
pub mod interface;
pub mod jones;
pub mod json_fields;
pub mod material;
pub mod modes;
pub mod precision;
pub mod scenario;
pub mod stokes;
pub mod table;
pub mod trace;
pub mod uniaxial;
pub mod wavelength;
