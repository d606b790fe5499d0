//! Doublespar: exact double refraction and polarization in stacks of uniaxial crystal plates.
#![warn(missing_docs)]

pub mod beam_overlap;
#[cfg(target_arch = "wasm32")]
pub mod canvas;
pub mod design;
pub mod design_displacer;
pub mod design_recombiner;
pub mod design_waveplate;
pub mod error;
pub mod interface;
pub mod jones;
pub mod json_fields;
pub mod material;
pub mod modes;
pub mod plate;
pub mod precision;
pub mod scenario;
pub mod scene;
pub mod spots;
pub mod statistics;
pub mod stokes;
pub mod svg;
pub mod sweep;
pub mod table;
pub mod trace;
pub mod uniaxial;
pub mod view_end;
pub mod view_plot;
pub mod view_poincare;
pub mod view_side;
pub mod views;
pub mod wavelength;
#[cfg(target_arch = "wasm32")]
pub mod web;
