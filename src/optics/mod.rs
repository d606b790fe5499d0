//! The physics: exact plane-wave optics of uniaxial crystals and ideal elements, in SI units and
//! radians (lengths in millimetres where a stack is laid out). Knows no JSON, no catalogue
//! document and no view; every layer above builds on it.

pub mod anisotropic;
pub mod beam_overlap;
pub mod chain;
pub mod coincident;
pub mod colorimetry;
pub mod conoscope;
// A general crystal's forward waves alone, for convergent light where the figures are computed
// (natively and in the design worker), not in the page's own module.
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
pub mod forward_waves;
pub mod general_modes;
pub mod general_plate;
pub mod geometry;
pub mod interface;
pub mod jones;
pub mod lc;
pub mod material;
pub mod modes;
pub mod parallel;
pub mod planar;
// The planned trace, one by one and in lanes, natively and in the design worker's WebAssembly
// (its workload and benchmark); the page's own module, which has no room for them, traces every
// sample with the general tracer.
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
pub mod planned_lanes;
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
pub mod planned_trace;
pub mod plate;
pub mod spots;
pub mod spots_tilted;
pub mod stack;
pub mod stokes;
pub mod sweep;
pub mod trace;
pub mod traced;
pub mod uniaxial;
pub mod wavelength;
pub mod workload;
