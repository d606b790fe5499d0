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
//! - *biaxial and chiral media*: [`Medium::Anisotropic`] holds a general crystal, whose modes the
//!   4×4 solver ([`crate::optics::general_modes`]) finds behind the same two-mode interface
//!   ([`Medium::modes`]); its rays are labelled with its own letters ([`Medium::letters`]);
//! - *stratified layers* (a liquid-crystal cell): [`Element`] gains a variant holding a list of
//!   thin uniform sublayers, traced as one element with its own transfer matrix.

use crate::optics::anisotropic::Anisotropic;
use crate::optics::general_modes::general_modes;
use crate::optics::geometry::Plane;
use crate::optics::interface::Losses;
use crate::optics::jones::{Jones, JonesMatrix};
use crate::optics::lc::director::Profile;
use crate::optics::lc::nematic::Nematic;
use crate::optics::lc::slice::Slices;
use crate::optics::modes::{Mode, Travel, crystal_modes};
use crate::optics::uniaxial::Uniaxial;
use crate::optics::wavelength::Wavelength;
use nalgebra::{Matrix3, Vector3};

/// The medium of a slab.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Medium {
    /// A uniaxial crystal: its two indices at the stack's wavelength and its optic axis.
    Uniaxial(Uniaxial),
    /// A general crystal (biaxial and/or optically active) at the stack's wavelength, traced by
    /// the 4×4 mode solver.
    Anisotropic(Anisotropic),
}

impl Medium {
    /// The letters of its two modes, first mode (`ModeKind::Ordinary`
    /// slot) first: `o`/`e` for a uniaxial crystal, the general crystal's own
    /// ([`Anisotropic::letters`]: `o`/`e` or `f`/`s`).
    pub fn letters(&self) -> [char; 2] {
        match self {
            Medium::Uniaxial(_) => ['o', 'e'],
            Medium::Anisotropic(a) => a.letters().letters(),
        }
    }

    /// The same medium seen in a frame rotated by `r` (every vector v becomes r·v).
    pub fn rotated(&self, r: &Matrix3<f64>) -> Medium {
        match self {
            Medium::Uniaxial(c) => Medium::Uniaxial(Uniaxial::new(c.indices, c.axis.rotated(r))),
            Medium::Anisotropic(a) => Medium::Anisotropic(a.rotated(r)),
        }
    }

    /// Both modes at tangential wave vector `qt` across a face ⊥ z of this frame: the uniaxial
    /// closed form ([`crystal_modes`]) or the general solver ([`general_modes`]).
    pub fn modes(&self, qt: [f64; 2], travel: Travel) -> [Mode; 2] {
        match self {
            Medium::Uniaxial(c) => crystal_modes(c, qt, travel),
            Medium::Anisotropic(a) => general_modes(a, qt, travel),
        }
    }
}

/// How a slab's front face meets what comes before it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Contact {
    /// The outside medium: a gap, or a vanishing film of it.
    Outside,
    /// A vanishing isotropic film of this index (a cement layer).
    Film(f64),
    /// The previous crystal touches this one directly.
    Direct,
}

/// A circular clear aperture, as seen along the element's (mounted) z axis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Aperture {
    /// The element's axis point, mm.
    pub centre: Vector3<f64>,
    /// The element's z axis after mounting (unit).
    pub axis: Vector3<f64>,
    /// Radius, mm.
    pub radius_mm: f64,
}

impl Aperture {
    /// Whether `point` lies inside the aperture (its distance from the axis line at most the
    /// radius, with rounding of 1e-12 of it allowed).
    pub fn holds(&self, point: Vector3<f64>) -> bool {
        let d = point - self.centre;
        let off_axis = d - self.axis * d.dot(&self.axis);
        off_axis.norm() <= self.radius_mm * (1.0 + 1e-12)
    }
}

/// A slab's faces placed in the lab frame, mount included.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Faces {
    /// The front face.
    pub front: Plane,
    /// The back face.
    pub back: Plane,
    /// The clear aperture, if limited.
    pub aperture: Option<Aperture>,
    /// How the front face meets what is before it.
    pub contact: Contact,
}

/// A plate of an anisotropic medium.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Slab {
    /// What the plate is made of.
    pub medium: Medium,
    /// Thickness along the element's z axis through its axis point, mm.
    pub thickness_mm: f64,
    /// Its faces when placed at any angle; `None` for the plate of version 1: both faces
    /// perpendicular to z at the stack's running z, no mount, no aperture, outside medium around.
    pub faces: Option<Faces>,
}

impl Slab {
    /// Its faces as placed: its own when it has them, otherwise version 1's plate whose front
    /// face is the plane z = `z_front` (both faces across z, no aperture, outside medium around).
    pub fn placed_faces(&self, z_front: f64) -> Faces {
        self.faces.unwrap_or(Faces {
            front: Plane::across_z(z_front),
            back: Plane::across_z(z_front + self.thickness_mm),
            aperture: None,
            contact: Contact::Outside,
        })
    }
}

/// One element of the stack.
// A slab is larger than an ideal element's Jones matrix (a general crystal's axes make it ~300
// bytes); a stack holds a handful of elements, so boxing would only cost an allocation per copy.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Element {
    /// A crystal plate, traced mode by mode with exact face couplings.
    Slab(Slab),
    /// An ideal element of zero thickness (retarder, polarizer, rotator): its Jones matrix on
    /// the beam basis.
    Ideal(JonesMatrix),
    /// A liquid-crystal cell: zero thickness in the stack's geometry, traced as an ideal element
    /// whose Jones matrix depends on the ray's direction, its rays gaining the label letter `c`.
    Cell(CellLayer),
}

/// A solved liquid-crystal cell as the stack keeps it: what gives its Jones matrix at any
/// tangential wave vector (`optics::lc::stratified`), for rays that meet it in directions other
/// than the input beam's (behind a wedge or a tilted plate, or over a cone of directions).
#[derive(Debug, Clone, PartialEq)]
pub struct LayeredCell {
    /// The nematic's constants at the wavelength.
    pub nematic: Nematic,
    /// The director profile at the cell's voltage (it does not depend on the light's direction).
    pub profile: Profile,
    /// Thickness of the nematic layer, µm.
    pub thickness_um: f64,
    /// Its slices' permittivities, made once from the profile (`optics::lc::slice`).
    pub slices: Slices,
    /// Vacuum wave number, 1/µm.
    pub k0_per_um: f64,
    /// Treatment of the cell's faces.
    pub losses: Losses,
}

/// A liquid-crystal cell in a stack: its Jones matrix on the beam basis at the input beam's
/// tangential wave vector (every ray of a plane-parallel stack meets it there), and which of the
/// stack's `cells` gives it at any other (`optics::lc::stratified`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CellLayer {
    /// Its Jones matrix at the input beam's tangential wave vector.
    pub at_input: JonesMatrix,
    /// Index of its layered optics in the stack's `cells`.
    pub optics: usize,
}

impl Element {
    /// The Jones matrix of a zero-thickness element and the letter it adds to ray labels
    /// (none for an ideal element, `c` for a cell); `None` for a slab.
    pub fn thin(&self) -> Option<(JonesMatrix, Option<char>)> {
        match *self {
            Element::Slab(_) => None,
            Element::Ideal(jm) => Some((jm, None)),
            Element::Cell(c) => Some((c.at_input, Some('c'))),
        }
    }
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
    /// Distance from the last element's back axis point to the observation plane, mm.
    pub screen_mm: f64,
    /// The layered optics of its liquid-crystal cells, in the order of the layers that name them
    /// (`CellLayer::optics`).
    pub cells: Vec<LayeredCell>,
}

impl Stack {
    /// The tangential wave vector q_t = n (u_x, u_y) shared by every wave in a stack of
    /// plane-parallel plates.
    pub fn tangential(&self) -> [f64; 2] {
        let u = self.input.direction;
        [self.outside_index * u.x, self.outside_index * u.y]
    }

    /// Whether any slab is a general crystal ([`Medium::Anisotropic`]).
    pub fn holds_general_crystal(&self) -> bool {
        self.layers.iter().any(|l| {
            matches!(
                l.element,
                Element::Slab(Slab {
                    medium: Medium::Anisotropic(_),
                    ..
                })
            )
        })
    }

    /// Whether every face is perpendicular to z (no slab has placed faces): the version-1
    /// geometry, traced with one shared tangential wave vector.
    pub fn is_plane_parallel(&self) -> bool {
        self.layers.iter().all(|l| match l.element {
            Element::Slab(s) => s.faces.is_none(),
            Element::Ideal(_) | Element::Cell(_) => true,
        })
    }
}
