//! The stack: plain physics data, the one thing the trace reads.
//!
//! A [`Stack`] is what a scenario document becomes once it is resolved
//! (`contract::scenario::Scenario::resolve`): materials evaluated at the wavelength, angles turned
//! into unit vectors, radians and Jones matrices, every limit already checked. Nothing in it is a
//! catalogue key, a degree or a JSON value, so the trace ([`crate::optics::trace`]) cannot fail
//! and design solvers can build and vary stacks directly.
//!
//! Frame and units (CONVENTIONS.md): the lab frame has +z along the stack; lengths are in mm;
//! the beam's axis crosses z = 0 at x = y = 0; each layer is preceded by `gap_mm` of the outside
//! medium (for the first, measured from z = 0). Jones vectors and matrices are on the beam basis
//! (e1, e2) of [`crate::optics::modes::beam_basis`].
//!
//! How the next capabilities slot in, without reshaping these types:
//! - *faces at any angle*: a [`Slab`] gains its two faces (normal, contact), defaulting to the
//!   plane z = const that every slab has today; the trace already solves each face in the frame
//!   of its tangential wave vector;
//! - *biaxial and chiral media*: [`Medium`] gains variants (a dielectric tensor, plus a gyration
//!   vector), each with its own mode solver behind the same two-mode interface;
//! - *stratified layers* (a liquid-crystal cell): [`Element`] gains a variant holding a list of
//!   thin uniform sublayers, traced as one element with its own transfer matrix.

use crate::optics::interface::Losses;
use crate::optics::jones::{Jones, JonesMatrix};
use crate::optics::uniaxial::Uniaxial;
use crate::optics::wavelength::Wavelength;
use nalgebra::Vector3;

/// The medium of a slab.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Medium {
    /// A uniaxial crystal: its two indices at the stack's wavelength and its optic axis.
    Uniaxial(Uniaxial),
}

/// A plate of an anisotropic medium between two faces parallel to the plane z = 0.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Slab {
    /// What the plate is made of.
    pub medium: Medium,
    /// Thickness along z, mm.
    pub thickness_mm: f64,
}

/// One element of the stack.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Element {
    /// A crystal plate, traced mode by mode with exact face couplings.
    Slab(Slab),
    /// An ideal element of zero thickness (retarder, polarizer, rotator): its Jones matrix on
    /// the beam basis.
    Ideal(JonesMatrix),
}

/// An element with the gap of outside medium before it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Layer {
    /// Outside medium before the element, mm (0 or more).
    pub gap_mm: f64,
    /// The element.
    pub element: Element,
}

/// The beam entering the stack.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct InputBeam {
    /// Unit direction of incidence in the outside medium (u_z > 0).
    pub direction: Vector3<f64>,
    /// Beam diameter (1/e² intensity), mm.
    pub diameter_mm: f64,
    /// Unit-power Jones vector on the beam basis, when the light is fully polarized.
    pub jones: Option<Jones>,
    /// Stokes vector on the beam basis, S0 = 1.
    pub stokes: [f64; 4],
}

/// A validated stack, ready to trace.
#[derive(Debug, Clone, PartialEq)]
pub struct Stack {
    /// Vacuum wavelength.
    pub wavelength: Wavelength,
    /// Index of the isotropic medium around and between the elements (1 or more).
    pub outside_index: f64,
    /// Treatment of the crystal faces.
    pub losses: Losses,
    /// The input beam.
    pub input: InputBeam,
    /// The elements in the order the light meets them.
    pub layers: Vec<Layer>,
}

impl Stack {
    /// The tangential wave vector q_t = n (u_x, u_y) shared by every wave in the stack.
    pub fn tangential(&self) -> [f64; 2] {
        let u = self.input.direction;
        [self.outside_index * u.x, self.outside_index * u.y]
    }
}
