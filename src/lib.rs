//! Doublespar: exact double refraction and polarization in stacks of uniaxial crystal plates.
//!
//! One way through the code, one folder per layer; lower layers never import upper ones:
//!
//! | layer | folder | what it holds |
//! |---|---|---|
//! | foundation | `error.rs`, `numfmt.rs`, `precision.rs`, `random.rs` | the error type, how numbers are written, every tolerance, the seeded generator |
//! | physics | `optics/` | media, modes, faces, Jones/Stokes, the stack and its trace (SI, radians, no JSON) |
//! | documents | `contract/` | the scenario read field by field, resolved into a stack; the result document |
//! | design | `design/` | solvers that size parts, their requests and Monte Carlo statistics |
//! | views | `view/` | scenes (display lists), label placement, plots, tables, SVG |
//! | bindings | `web/` (wasm only) | the page's and the design worker's entry points, the canvas renderer |
//!
//! The modules are private: what other programs (the command line, tests, benchmarks, fuzzing)
//! may use is re-exported here, by name.
#![warn(missing_docs)]

mod contract;
mod design;
mod error;
mod numfmt;
mod optics;
mod precision;
mod random;
mod small_sort;
mod view;
#[cfg(target_arch = "wasm32")]
mod web;

// Foundation.
pub use error::Error;
pub use numfmt::{MAX_DRAWN_CHARS, length_auto, sig_within};
pub use precision::{LC_SUBLAYERS, PLANNED_TRACE_AGREEMENT, assert_within};

// Documents.
pub use contract::conoscope::{
    ColourMap, ConoscopeMap, MAX_PIXELS_GENERAL, MAX_PIXELS_WHITE, MAX_PIXELS_WHITE_GENERAL,
    MAX_PIXELS_WHITE_WITH_CELL, MAX_PIXELS_WITH_CELL, conoscope_at, conoscope_of, white_light_at, white_light_note,
    white_light_of, white_light_part,
};
pub use contract::resolve::axis_from_degrees;
/// A ray that did not leave forward, as the result reports it (the property tests match them).
pub use contract::result::RejectedRay;
pub use contract::result::{ElementReport, TraceResult, report as report_trace, trace_scenario};
pub use contract::scenario::{MAX_DOCUMENT_BYTES, Scenario};
pub use optics::colorimetry::Colour;

// Physics.
pub use optics::anisotropic::{Anisotropic, ModeLetters, orientation};
pub use optics::coincident::coincident_stokes;
pub use optics::conoscope::Quantity as ConoscopeQuantity;
pub use optics::general_modes::general_modes;
pub use optics::jones::{Jones, JonesMatrix, retarder as retarder_matrix, stokes as jones_stokes};
pub use optics::lc::catalogue::{NEMATICS, NematicEntry, find as find_nematic, keys as nematic_keys};
pub use optics::lc::curve::{retardance_curve, voltage_grid};
pub use optics::lc::director::{CellLayout, Profile as DirectorProfile, solve as solve_director};
pub use optics::lc::nematic::Nematic;
pub use optics::lc::stratified::cell_jones;
pub use optics::material::Dispersion;
pub use optics::material::dispersion::Breakdown;
pub use optics::material::{
    Activity, AirConversion, BiaxialMaterial, Indices, OpticalActivity, Principal, REFERENCE_C, STANDARD_AIR_RANGE_NM,
    air_from_vacuum, all_keys as all_material_keys, biaxial_catalogue as biaxial_materials, catalogue as materials,
    describe as describe_material, describe_biaxial, find_biaxial, find_biaxial_source, find_uniaxial_source,
    keys as material_keys, optical_activity, spread as source_spread, standard_air_index, vacuum_from_air,
};
pub use optics::modes::{Mode, Travel, crystal_modes};
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
pub use optics::planned_lanes::{BlockedTrace, LANES as PLANNED_LANES, LaneBuild};
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
pub use optics::planned_trace::{PlannedRay, PlannedTrace};
pub use optics::plate::{plate_optics, tangential};
pub use optics::stack::{Element as StackElement, Medium as StackMedium, Stack};
pub use optics::stokes::Handedness;
pub use optics::sweep::{checksum, walkoff_sweep_into, walkoff_sweep_parallel};
pub use optics::trace::trace as trace_stack;
pub use optics::uniaxial::{OpticAxis, Uniaxial, walkoff};
pub use optics::wavelength::Wavelength;
pub use optics::workload::{
    Workload, declined_samples, run as run_workload, run_on as run_workload_on, samples_traced_alone,
};

// Design.
pub use design::recombiner::{MAX_PHASE_ERROR as RECOMBINER_MAX_PHASE_ERROR, MIN_OVERLAP as RECOMBINER_MIN_OVERLAP};
pub use design::statistics::summarize;
pub use design::{KINDS as DESIGN_KINDS, solve as solve_design, solve_str as solve_design_str};
pub use random::Rng;

// Views.
pub use view::label_layout::{Layout, Placement, layout, layout_with, problems};
pub use view::palette::Palette;
pub use view::plot::histogram;
pub use view::scene::{Aspect, Scene, Viewport};
pub use view::svg::to_svg;
pub use view::table::render as render_table;
pub use view::{VIEW_NAMES, build as build_view};

// Bindings (wasm only; the page calls them through wasm-bindgen, the browser tests by name).
#[cfg(target_arch = "wasm32")]
pub use web::{Session, demo_scenario};
