//! What a trace returns: every path that leaves the stack, what each layer did, and every ray
//! that did not leave forward. Built by the two tracers ([`crate::optics::parallel`] for
//! plane-parallel stacks, [`crate::optics::planar`] for faces at any angle) and read by the
//! report ([`crate::contract`]) and the design solvers.
//!
//! Units: lengths in mm, angles in radians, powers as fractions of the input power; Jones
//! matrices map the input Jones vector to the ray's field on its own basis (e1, e2), phases
//! included, referred to the screen's axis point.

use crate::optics::jones::JonesMatrix;
use crate::optics::modes::Mode;
use nalgebra::Vector3;

/// One path through the stack: one mode choice per slab.
#[derive(Debug, Clone, PartialEq)]
pub struct Path {
    /// One letter per slab crossed, "o" or "e", in order.
    pub label: String,
    /// The path's Jones matrix on the beam basis, faces and phases included.
    pub matrix: JonesMatrix,
    /// Accumulated propagation phase Σ k0 q_z L over layers and gaps, radians.
    pub phase_rad: f64,
    /// Where the ray crosses z = 0 and every face after it, [x, y, z] in mm, the screen last.
    pub points_mm: Vec<[f64; 3]>,
    /// Unit direction after the stack.
    pub direction: Vector3<f64>,
    /// Where it leaves the last face it crosses, [x, y, z] in mm.
    pub exit_point_mm: [f64; 3],
    /// Where its straight continuation meets the screen plane, [x, y] in mm.
    pub screen_mm: [f64; 2],
}

impl Path {
    /// The lateral exit point [x, y], mm (of `exit_point_mm`).
    pub fn exit_xy(&self) -> [f64; 2] {
        [self.exit_point_mm[0], self.exit_point_mm[1]]
    }
}

/// Which face of an element.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Side {
    /// The face the light enters by.
    Front,
    /// The face it leaves by.
    Back,
}

/// Why a ray did not go on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RejectReason {
    /// A mode beyond the face is evanescent: the light is reflected.
    TotalInternalReflection,
    /// The ray meets a face outside the element's aperture (or leaves it sideways).
    OutsideAperture,
}

/// A ray that did not leave the stack forward.
#[derive(Debug, Clone, PartialEq)]
pub struct Rejected {
    /// Its path label so far.
    pub label: String,
    /// Index of the element where it stopped.
    pub element: usize,
    /// The face.
    pub face: Side,
    /// Why.
    pub reason: RejectReason,
    /// Its power (fraction of the input).
    pub power: f64,
    /// Where, mm.
    pub point_mm: [f64; 3],
    /// Its direction there (for total internal reflection, the reflected direction).
    pub direction: [f64; 3],
    /// The path it followed up to there, [x, y, z] in mm (the point last).
    pub points_mm: Vec<[f64; 3]>,
}

/// What one layer did.
#[derive(Debug, Clone, PartialEq)]
// One per layer, built once per trace and read in place: boxing the slab's modes would cost an
// allocation per layer for nothing.
#[allow(clippy::large_enum_variant)]
pub enum LayerTrace {
    /// A slab.
    Slab {
        /// Its two forward modes at the stack's tangential wave vector (ordinary, extraordinary).
        modes: [Mode; 2],
        /// Lateral shift [dx, dy] of each mode's ray across the slab, mm (0 when evanescent).
        shifts_mm: [[f64; 2]; 2],
        /// z of the front face, mm.
        z_front_mm: f64,
        /// z of the back face, mm.
        z_back_mm: f64,
        /// Power entering (sum over its input rays, fractions of the input power).
        power_in: f64,
        /// Power leaving forward.
        power_out: f64,
        /// False when a face's boundary conditions were singular: the slab then passes nothing.
        faces_solved: bool,
    },
    /// An ideal element.
    Ideal {
        /// Power entering.
        power_in: f64,
        /// Power leaving.
        power_out: f64,
    },
}

/// The traced stack.
#[derive(Debug, Clone, PartialEq)]
pub struct Trace {
    /// Every path that carries light, in mode-label order ("o" before "e" at each slab).
    pub paths: Vec<Path>,
    /// One entry per layer, in stack order.
    pub layers: Vec<LayerTrace>,
    /// z of the back face of the last element, mm.
    pub exit_z_mm: f64,
    /// Rays that did not leave forward (total internal reflection, outside an aperture).
    pub rejected: Vec<Rejected>,
    /// Per layer, power reflected at its faces and not traced (uncoated faces), in the general
    /// geometry; empty for plane-parallel stacks, whose layers report it themselves.
    pub reflected: Vec<f64>,
}
