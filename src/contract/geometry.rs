//! The geometry of an element (contract version 2): faces at any angle, a clear aperture, a
//! mount and the contact with the element before; read field by field, checked against each
//! other, and placed in the lab frame for the trace.
//!
//! Conventions (CONVENTIONS.md, "Geometry of an element"): element i's axis point is
//! (0, 0, z_i); a face normal (sin t cos a, sin t sin a, cos t) points downstream; the front face
//! passes through the axis point and the back face through (0, 0, z_i + thickness); a mount is the
//! smallest rotation taking ẑ onto its direction, about the axis point, applied to faces, optic
//! axis and aperture alike. Fields at their defaults (faces 0°, no aperture, no mount, air
//! contact) give version 1's plane-parallel plate exactly.
//!
//! Checks, each an error on the field that must change:
//! - a crystal whose faces are not parallel needs `aperture_mm`;
//! - its faces must not meet or cross inside the aperture (`faces`);
//! - `contact` "cement" or "optical" needs gap 0, a crystal before, and that crystal's back face
//!   in the same plane as this front face (`contact`); `cement_index` only with "cement";
//! - consecutive elements must not overlap inside their apertures (`gap_mm`).
//!
//! The rules are tested through the public reader in `tests/geometry_contract.rs`.

use crate::contract::fields::{Fields, ranged};
use crate::error::Error;
use crate::numfmt::quote_text;
use crate::optics::geometry::{Plane, direction, face_frame};
use crate::optics::stack::{Aperture, Contact as PhysicsContact, Faces};
use nalgebra::{Matrix3, Vector3};
use serde_json::{Value, json};

/// Largest tilt of a face normal or a mount from z, degrees.
pub const MAX_FACE_TILT_DEG: f64 = 89.0;
/// Default index of a cement layer (the contract's default, CONVENTIONS.md version 2).
pub const DEFAULT_CEMENT_INDEX: f64 = 1.55;
/// Two planes closer than this (mm, and in their normals) count as one.
const SAME_PLANE: f64 = 1e-9;

/// A direction by its polar angle from +z and azimuth from +x, degrees.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Angles {
    /// Polar angle from +z, degrees.
    pub tilt_deg: f64,
    /// Azimuth from +x toward +y, degrees.
    pub azimuth_deg: f64,
}

impl Angles {
    fn unit(&self) -> Vector3<f64> {
        direction(self.tilt_deg.to_radians(), self.azimuth_deg.to_radians())
    }

    fn read(f: &mut Fields, name: &'static str) -> Result<Option<Angles>, Error> {
        let path = f.path_of(name);
        let Some(v) = f.get(name) else { return Ok(None) };
        let mut a = Fields::new(&path, v)?;
        let tilt_deg = ranged(&mut a, "tilt_deg", Some(0.0), 0.0, MAX_FACE_TILT_DEG)?;
        let azimuth_deg = ranged(&mut a, "azimuth_deg", Some(0.0), -360.0, 360.0)?;
        a.finish()?;
        Ok(Some(Angles { tilt_deg, azimuth_deg }))
    }

    fn json(&self) -> Value {
        json!({"tilt_deg": self.tilt_deg, "azimuth_deg": self.azimuth_deg})
    }
}

/// Where a crystal's faces lie and how it is held.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Placement {
    /// Front face normal, in the element frame.
    pub front: Angles,
    /// Back face normal, in the element frame.
    pub back: Angles,
    /// Clear diameter, mm (unlimited when `None`).
    pub aperture_mm: Option<f64>,
    /// Mount direction.
    pub mount: Angles,
}

/// How an element meets the one before it.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub enum Contact {
    /// A gap, or a vanishing film, of the outside medium.
    #[default]
    Air,
    /// A vanishing cement film of this index.
    Cement(f64),
    /// The two crystals touch.
    Optical,
}

impl Placement {
    /// Whether this is version 1's plate (every field at its default).
    pub fn is_default(&self) -> bool {
        *self == Placement::default()
    }

    /// Reads `faces`, `aperture_mm` and `mount` of a crystal.
    ///
    /// # Errors
    /// The path of the first offending field.
    pub fn read(f: &mut Fields) -> Result<Placement, Error> {
        let mut p = Placement::default();
        let faces_path = f.path_of("faces");
        if let Some(v) = f.get("faces") {
            let mut g = Fields::new(&faces_path, v)?;
            p.front = Angles::read(&mut g, "front")?.unwrap_or_default();
            p.back = Angles::read(&mut g, "back")?.unwrap_or_default();
            g.finish()?;
        }
        p.aperture_mm = match f.has("aperture_mm") {
            true => Some(crate::error::above(
                &f.path_of("aperture_mm"),
                f.required_number("aperture_mm")?,
                0.0,
                1e4,
            )?),
            false => None,
        };
        p.mount = Angles::read(f, "mount")?.unwrap_or_default();
        Ok(p)
    }

    /// Writes the fields that differ from their defaults into a crystal's document.
    pub fn write(&self, v: &mut Value) {
        let d = Placement::default();
        if (self.front, self.back) != (d.front, d.back) {
            v["faces"] = json!({"front": self.front.json(), "back": self.back.json()});
        }
        if let Some(a) = self.aperture_mm {
            v["aperture_mm"] = json!(a);
        }
        if self.mount != d.mount {
            v["mount"] = self.mount.json();
        }
    }

    /// The mount rotation.
    fn rotation(&self) -> Matrix3<f64> {
        face_frame(self.mount.unit())
    }

    /// The crystal's faces and aperture in the lab frame, its front axis point at z, and the
    /// mount rotation (which also turns its optic axis).
    pub fn place(&self, z: f64, thickness_mm: f64, contact: Contact) -> (Faces, Matrix3<f64>) {
        let r = self.rotation();
        let at = Vector3::new(0.0, 0.0, z);
        let faces = Faces {
            front: Plane {
                normal: r * self.front.unit(),
                point: at,
            },
            back: Plane {
                normal: r * self.back.unit(),
                point: at + r * Vector3::new(0.0, 0.0, thickness_mm),
            },
            aperture: self.aperture_mm.map(|d| Aperture {
                centre: at,
                axis: r * Vector3::z(),
                radius_mm: 0.5 * d,
            }),
            contact: match contact {
                Contact::Air => PhysicsContact::Outside,
                Contact::Cement(n) => PhysicsContact::Film(n),
                Contact::Optical => PhysicsContact::Direct,
            },
        };
        (faces, r)
    }
}

impl Contact {
    /// Reads `contact` and `cement_index` of element `index` with gap `gap_mm`.
    ///
    /// # Errors
    /// `contact` on the first element or with a gap; `cement_index` out of range or without
    /// cement; an unknown contact.
    pub fn read(f: &mut Fields, index: usize, gap_mm: f64) -> Result<Contact, Error> {
        let path = f.path_of("contact");
        let contact = match f.string("contact")? {
            None | Some("air") => Contact::Air,
            Some("cement") => Contact::Cement(ranged(f, "cement_index", Some(DEFAULT_CEMENT_INDEX), 1.0, 3.0)?),
            Some("optical") => Contact::Optical,
            Some(other) => {
                return Err(Error::new(
                    path,
                    format!(
                        "unknown contact '{}'; expected \"air\", \"cement\" or \"optical\"",
                        quote_text(other)
                    ),
                ));
            }
        };
        if !matches!(contact, Contact::Cement(_)) && f.has("cement_index") {
            return Err(Error::new(
                f.path_of("cement_index"),
                "applies only with \"contact\": \"cement\"",
            ));
        }
        if contact != Contact::Air {
            if index == 0 {
                return Err(Error::new(path, "the first element has nothing before it to touch"));
            }
            if gap_mm > 0.0 {
                return Err(Error::new(path, "a cemented or optical contact needs gap_mm 0"));
            }
        }
        Ok(contact)
    }

    /// The contact's document fields, when not the default.
    pub fn write(&self, v: &mut Value) {
        match *self {
            Contact::Air => {}
            Contact::Cement(n) => {
                v["contact"] = json!("cement");
                v["cement_index"] = json!(n);
            }
            Contact::Optical => v["contact"] = json!("optical"),
        }
    }
}

/// What the checks need of one element: its gap, its contact, and for a crystal its thickness
/// and placement.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Piece {
    /// Gap of outside medium before it, mm.
    pub gap_mm: f64,
    /// How it meets the element before.
    pub contact: Contact,
    /// Thickness (mm) and placement of a crystal; `None` for an ideal element.
    pub crystal: Option<(f64, Placement)>,
}

/// An element's two bounding planes and aperture radius in the lab frame (a thin element is one
/// plane across z; radius `None` when unlimited).
fn bounds(piece: &Piece, z: f64) -> (Plane, Plane, Option<f64>) {
    match piece.crystal {
        Some((thickness_mm, placement)) => {
            let (faces, _) = placement.place(z, thickness_mm, piece.contact);
            (faces.front, faces.back, faces.aperture.map(|a| a.radius_mm))
        }
        None => (Plane::across_z(z), Plane::across_z(z), None),
    }
}

/// The least distance, along `axis`, from plane `a` to plane `b` over the disk of radius
/// `radius` about `centre` perpendicular to `axis` (positive when `b` lies beyond `a`
/// everywhere). The distance is linear across the disk, so its least value is at the rim.
fn least_gap(a: &Plane, b: &Plane, centre: Vector3<f64>, axis: Vector3<f64>, radius: f64) -> f64 {
    let along = |p: &Plane| p.normal.dot(&(p.point - centre)) / p.normal.dot(&axis);
    let slope = |p: &Plane| p.normal / p.normal.dot(&axis);
    let g = slope(b) - slope(a);
    let g_perp = g - axis * g.dot(&axis);
    along(b) - along(a) - radius * g_perp.norm()
}

fn same_plane(a: &Plane, b: &Plane) -> bool {
    (a.normal - b.normal).norm() <= SAME_PLANE && a.normal.dot(&(b.point - a.point)).abs() <= SAME_PLANE
}

/// Checks the elements' geometry against each other (module header).
///
/// # Errors
/// The field of the first element that must change.
pub fn check(pieces: &[Piece]) -> Result<(), Error> {
    let mut z = 0.0;
    let mut prev: Option<(Plane, Option<f64>, bool)> = None;
    for (i, el) in pieces.iter().enumerate() {
        z += el.gap_mm;
        let path = |name: &str| format!("elements[{i}].{name}");
        if let Some((thickness_mm, p)) = el.crystal {
            let parallel = p.front == p.back;
            match p.aperture_mm {
                None if !parallel => {
                    return Err(Error::new(
                        path("aperture_mm"),
                        "is required: a crystal whose faces are not parallel needs a clear aperture",
                    ));
                }
                Some(d) => {
                    let front = Plane {
                        normal: p.front.unit(),
                        point: Vector3::zeros(),
                    };
                    let back = Plane {
                        normal: p.back.unit(),
                        point: Vector3::new(0.0, 0.0, thickness_mm),
                    };
                    if least_gap(&front, &back, Vector3::zeros(), Vector3::z(), 0.5 * d) <= 0.0 {
                        return Err(Error::new(
                            path("faces"),
                            "the faces meet inside the aperture: make the crystal thicker, the wedge shallower or the aperture smaller",
                        ));
                    }
                }
                None => {}
            }
        }
        let (front, back, radius) = bounds(el, z);
        let touches = matches!(el.contact, Contact::Cement(_) | Contact::Optical);
        if let Some((prev_back, prev_radius, prev_crystal)) = prev {
            if touches && !(prev_crystal && same_plane(&prev_back, &front)) {
                return Err(Error::new(
                    path("contact"),
                    "a cemented or optical contact needs a crystal before this one whose back face lies in this front face's plane",
                ));
            }
            let r = match (radius, prev_radius) {
                (Some(a), Some(b)) => a.min(b),
                (Some(a), None) | (None, Some(a)) => a,
                (None, None) => 0.0,
            };
            if least_gap(&prev_back, &front, Vector3::new(0.0, 0.0, z), Vector3::z(), r) < -SAME_PLANE {
                return Err(Error::new(
                    path("gap_mm"),
                    "this element would overlap the one before it inside their apertures: give a larger gap",
                ));
            }
        }
        if let Some((thickness_mm, _)) = el.crystal {
            z += thickness_mm;
        }
        prev = Some((back, radius, el.crystal.is_some()));
    }
    Ok(())
}

/// Whether a placement field was given on an element that is not a crystal: the error naming it.
///
/// # Errors
/// `faces`, `aperture_mm` or `mount` on an ideal element.
pub fn refuse_on_ideal(f: &Fields) -> Result<(), Error> {
    for name in ["faces", "aperture_mm", "mount"] {
        if f.has(name) {
            return Err(Error::new(
                f.path_of(name),
                "applies to crystals only: an ideal element is thin and acts in each ray's own basis",
            ));
        }
    }
    Ok(())
}
