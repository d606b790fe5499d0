//! How a request orients a crystal given by three principal indices (biaxial, CONVENTIONS.md
//! "More media"): a waveplate's `cut`, the principal axis along the plate normal, and a
//! displacer's `plane`, the principal plane that holds the plate normal.
//!
//! Names. `cut` is `"x"`, `"y"` or `"z"`: the principal axis of the crystal's formula (n_x < n_y <
//! n_z for a catalogue crystal) along which light crosses the plate. `plane` is `"xy"`, `"xz"` or
//! `"yz"`: the plane of those two principal axes, which holds the plate normal; the cut angle
//! `cut_tilt_deg` is then measured from the plane's second axis, which plays the part of a uniaxial
//! crystal's optic axis (for `"xz"`, from z). Both are refused for a uniaxial crystal, whose one
//! optic axis the request's other fields place.

use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::Error;

/// The three principal axes' letters, in the order of the principal indices.
pub const AXIS_LETTERS: [char; 3] = ['x', 'y', 'z'];

/// A waveplate's principal axis along the plate normal: 0, 1, 2 for x, y, z.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct PrincipalCut(pub usize);

/// A displacer's principal plane: its first and second axis (0, 1, 2 for x, y, z; first <
/// second). The cut angle is measured from the second.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct PrincipalPlane {
    /// The in-plane axis that lies in the faces at a cut of 0°.
    pub first: usize,
    /// The in-plane axis from which the cut angle is measured.
    pub second: usize,
}

impl PrincipalCut {
    /// The cut's name, `x`, `y` or `z`.
    pub fn name(self) -> String {
        AXIS_LETTERS[self.0].to_string()
    }

    /// The two principal axes in the faces, in index order.
    pub fn in_face(self) -> [usize; 2] {
        match self.0 {
            0 => [1, 2],
            1 => [0, 2],
            _ => [0, 1],
        }
    }
}

impl PrincipalPlane {
    /// The plane's name, e.g. `xz`.
    pub fn name(self) -> String {
        [AXIS_LETTERS[self.first], AXIS_LETTERS[self.second]].iter().collect()
    }

    /// The principal axis normal to the plane.
    pub fn normal(self) -> usize {
        3 - self.first - self.second
    }
}

/// Whether a crystal is given by three principal indices (a biaxial catalogue key, `nx`/`ny`/`nz`
/// or biaxial formulas), which `cut` and `plane` orient.
pub fn is_principal(medium: &Medium) -> bool {
    match medium {
        Medium::Biaxial(_) | Medium::Principal(_) => true,
        Medium::Formula(d) => !d.is_uniaxial_form(),
        Medium::Catalogue(_) | Medium::Custom(_) => false,
    }
}

/// Refuses `name` given for a uniaxial crystal.
fn only_principal(f: &mut Fields, name: &'static str, medium: &Medium) -> Result<bool, Error> {
    if !f.has(name) {
        return Ok(false);
    }
    if !is_principal(medium) {
        return Err(Error::new(
            f.path_of(name),
            "applies to a biaxial crystal (a catalogue biaxial key, \"nx\"/\"ny\"/\"nz\" or biaxial formulas); a uniaxial crystal's optic axis is placed by the request's other fields",
        ));
    }
    Ok(true)
}

/// A waveplate's `cut` (optional; `None` asks for the cut of largest birefringence).
///
/// # Errors
/// `cut` when it is not `"x"`, `"y"` or `"z"`, or is given for a uniaxial crystal.
pub fn read_cut(f: &mut Fields, medium: &Medium) -> Result<Option<PrincipalCut>, Error> {
    let cuts = [("x", PrincipalCut(0)), ("y", PrincipalCut(1)), ("z", PrincipalCut(2))];
    read_choice(f, "cut", medium, &cuts, "the principal axis along the plate normal")
}

/// A displacer's `plane` (optional; `None` asks for the plane of largest walk-off).
///
/// # Errors
/// `plane` when it is not `"xy"`, `"xz"` or `"yz"`, or is given for a uniaxial crystal.
pub fn read_plane(f: &mut Fields, medium: &Medium) -> Result<Option<PrincipalPlane>, Error> {
    let plane = |first, second| PrincipalPlane { first, second };
    let planes = [("xy", plane(0, 1)), ("xz", plane(0, 2)), ("yz", plane(1, 2))];
    read_choice(
        f,
        "plane",
        medium,
        &planes,
        "the principal plane that holds the plate normal",
    )
}

/// One of `choices` by name in the optional field `name`, which only a biaxial crystal takes.
fn read_choice<T: Copy>(
    f: &mut Fields,
    name: &'static str,
    medium: &Medium,
    choices: &[(&str, T)],
    meaning: &str,
) -> Result<Option<T>, Error> {
    if !only_principal(f, name, medium)? {
        return Ok(None);
    }
    let path = f.path_of(name);
    let Some(given) = f.string(name)? else {
        return Ok(None);
    };
    match choices.iter().find(|(k, _)| *k == given) {
        Some((_, v)) => Ok(Some(*v)),
        None => {
            let names: Vec<&str> = choices.iter().map(|(k, _)| *k).collect();
            let (last, rest) = names.split_last().unwrap_or((&"", &[]));
            Err(Error::new(
                path,
                format!(
                    "unknown {name} '{}'; expected {} or {last} ({meaning})",
                    crate::numfmt::quote_text(given),
                    rest.join(", ")
                ),
            ))
        }
    }
}
