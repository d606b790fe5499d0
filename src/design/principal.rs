//! Biaxial parts: where a principal cut or a principal plane puts a crystal's principal axes in
//! the part, and which cut or plane a request gets when it names none.
//!
//! Conventions (CONVENTIONS.md "More media"). The part's element is written with `axes`
//! {tilt, azimuth, roll}: principal axes R·(x̂, ŷ, ẑ) with R = Rz(azimuth)·Ry(tilt)·Rz(roll).
//!
//! - A waveplate cut along principal axis c (`cut`) has c along the plate normal and the slower of
//!   the two in-face principal axes at the plate's azimuth (0°), the faster at 90°. At normal
//!   incidence the two modes are polarized along the in-face axes with their principal indices
//!   (D along a principal axis is an eigen-polarization of ε), so Γ = 2π (n_slow − n_fast) L / λ
//!   exactly; the default cut is the one of largest |n_a − n_b| (E. Hecht, *Optics*, §8.7 for the
//!   plate; A. Yariv and P. Yeh, *Optical Waves in Crystals* (1984), §4.2 for the principal
//!   eigen-polarizations, from memory).
//! - A displacer in principal plane (a, b) (`plane`) has the plate normal in that plane at the cut
//!   angle θ from b, a in the same lab plane (x z), and the third axis c along y. A wave normal
//!   in the (a, b) plane has one mode polarized along c, index n_c whatever θ (it goes straight),
//!   and one polarized in the plane with 1/n² = cos²θ/n_a² + sin²θ/n_b²: exactly a uniaxial
//!   crystal's e-wave with n_o = n_a, n_e = n_b and optic axis b (Yariv and Yeh §4.3, from
//!   memory), so its walk-off, the cut of largest walk-off tan θ = n_b/n_a and their derivatives
//!   are the uniaxial closed forms with those two indices. The default plane is the one of
//!   largest maximum walk-off, |n_b² − n_a²| / (2 n_a n_b).

use crate::contract::request::principal::{AXIS_LETTERS, is_principal};
use crate::contract::request::{PrincipalCut, PrincipalPlane};
use crate::contract::scenario::Medium;
use crate::design::thermal::principal_at;
use crate::error::Error;
use crate::optics::anisotropic::{Anisotropic, orientation};
use crate::optics::material::Indices;
use crate::optics::wavelength::Wavelength;
use crate::precision::NO_BIREFRINGENCE;
use nalgebra::Matrix3;

/// A principal-axis orientation as the scenario writes it, degrees.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Oriented {
    /// `axes.tilt_deg`.
    pub tilt_deg: f64,
    /// `axes.azimuth_deg`.
    pub azimuth_deg: f64,
    /// `axes.roll_deg`.
    pub roll_deg: f64,
}

impl Oriented {
    /// The rotation R whose columns are the principal axes in the element's frame.
    pub fn axes(self) -> Matrix3<f64> {
        orientation(
            self.tilt_deg.to_radians(),
            self.azimuth_deg.to_radians(),
            self.roll_deg.to_radians(),
        )
    }

    /// The same orientation turned about the plate normal by `deg`.
    pub fn turned(self, deg: f64) -> Oriented {
        Oriented {
            azimuth_deg: self.azimuth_deg + deg,
            ..self
        }
    }

    /// The crystal of principal indices `n` so oriented (no optical activity).
    ///
    /// # Errors
    /// `material` for an index below 1 (which the readers exclude).
    pub fn crystal(self, n: [f64; 3]) -> Result<Anisotropic, Error> {
        Anisotropic::new(n, self.axes(), [0.0; 3]).map_err(|e| Error::new("material", e.message))
    }
}

/// The cut of largest birefringence |n_a − n_b| over the two in-face indices (the first on ties).
pub fn widest_cut(n: [f64; 3]) -> PrincipalCut {
    let spread = |c: PrincipalCut| {
        let [a, b] = c.in_face();
        (n[a] - n[b]).abs()
    };
    [PrincipalCut(0), PrincipalCut(1), PrincipalCut(2)]
        .into_iter()
        .fold(
            PrincipalCut(0),
            |best, c| if spread(c) > spread(best) { c } else { best },
        )
}

/// The in-face principal axes of a cut as (slow, fast) for indices `n`.
pub fn slow_fast(cut: PrincipalCut, n: [f64; 3]) -> (usize, usize) {
    let [a, b] = cut.in_face();
    if n[b] >= n[a] { (b, a) } else { (a, b) }
}

/// The orientation of a plate cut along `cut` with its slow axis (for indices `n`) at azimuth 0.
pub fn cut_orientation(cut: PrincipalCut, n: [f64; 3]) -> Oriented {
    // (tilt, roll) that put `cut` along z, and the in-face axis they leave at azimuth 0.
    let (tilt_deg, roll_deg, at_zero) = match cut.0 {
        0 => (90.0, 0.0, 2),
        1 => (90.0, 90.0, 2),
        _ => (0.0, 0.0, 0),
    };
    let (slow, _) = slow_fast(cut, n);
    Oriented {
        tilt_deg,
        azimuth_deg: if slow == at_zero { 0.0 } else { 90.0 },
        roll_deg,
    }
}

/// The in-plane index ellipse of a principal plane as a uniaxial pair: n_o = n_first, n_e =
/// n_second (see the module header).
///
/// # Errors
/// As [`Indices::new`].
pub fn plane_indices(plane: PrincipalPlane, n: [f64; 3]) -> Result<Indices, Error> {
    Indices::new(n[plane.first], n[plane.second])
}

/// The plane of largest maximum walk-off (the first on ties).
pub fn widest_plane(n: [f64; 3]) -> PrincipalPlane {
    let walk = |p: PrincipalPlane| {
        let (a, b) = (n[p.first], n[p.second]);
        (b * b - a * a).abs() / (2.0 * a * b)
    };
    [(0, 1), (0, 2), (1, 2)]
        .into_iter()
        .map(|(first, second)| PrincipalPlane { first, second })
        .fold(PrincipalPlane { first: 0, second: 1 }, |best, p| {
            if walk(p) > walk(best) { p } else { best }
        })
}

/// The orientation of a displacer in `plane` cut at `theta_deg` from the plane's second axis.
pub fn plane_orientation(plane: PrincipalPlane, theta_deg: f64) -> Oriented {
    let (tilt_deg, azimuth_deg, roll_deg) = match (plane.first, plane.second) {
        // z at θ in the x z plane; y (xz) or x (yz, rolled by 90°) along lab y.
        (0, 2) => (theta_deg, 0.0, 0.0),
        (1, 2) => (theta_deg, 0.0, 90.0),
        // z along lab y; the roll turns y to θ from the normal within the x z plane.
        _ => (90.0, 90.0, theta_deg + 90.0),
    };
    Oriented {
        tilt_deg,
        azimuth_deg,
        roll_deg,
    }
}

/// A biaxial plate's cut as design answers report it, flattened into the answer (left out for a
/// uniaxial crystal): the waveplate's, the tilt-tuned plate's and each biaxial plate's of a
/// two-crystal pair.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct CutReport {
    /// The principal axis along the plate normal (`x`, `y` or `z`).
    pub cut: String,
    /// Why this cut.
    pub cut_note: String,
    /// n_x, n_y, n_z at the design wavelength and temperature.
    pub principal_indices: [f64; 3],
}

/// A biaxial plate's cut as a design takes it (a waveplate's, a tilt-tuned plate's).
pub struct BiaxialCut {
    /// The fast and slow in-face indices, as a uniaxial plate's n_o and n_e (n_e the slower).
    pub indices: Indices,
    /// The plate's principal axes at azimuth 0.
    pub oriented: Oriented,
    /// The principal indices n_x, n_y, n_z at the design wavelength and temperature.
    pub principal: [f64; 3],
    /// The slow and the fast in-face principal axes (0, 1, 2 for x, y, z).
    pub slow_fast: (usize, usize),
    /// The cut's name.
    pub cut: String,
    /// Why this cut.
    pub note: String,
    /// Which in-face axis is fast.
    pub fast_axis: String,
}

impl BiaxialCut {
    /// What a design answer reports of this cut.
    pub fn report(&self) -> CutReport {
        CutReport {
            cut: self.cut.clone(),
            cut_note: self.note.clone(),
            principal_indices: self.principal,
        }
    }
}

/// The cut of a request's plate of `medium` at `wavelength` and `t_c` °C, `cut` as the request
/// gives it (`None`: the cut of largest birefringence); `None` for a uniaxial crystal.
///
/// # Errors
/// As [`principal_at`]; `cut` when the two in-face indices are equal.
pub fn biaxial_cut(
    medium: &Medium,
    cut: Option<PrincipalCut>,
    wavelength: Wavelength,
    t_c: f64,
) -> Result<Option<BiaxialCut>, Error> {
    if !is_principal(medium) {
        return Ok(None);
    }
    let n = principal_at(medium, wavelength, t_c)?;
    let chosen = cut.unwrap_or_else(|| widest_cut(n));
    let (slow, fast) = slow_fast(chosen, n);
    let letter = |k: usize| AXIS_LETTERS[k];
    if n[slow] - n[fast] < NO_BIREFRINGENCE {
        return Err(Error::new(
            "cut",
            format!(
                "n_{} equals n_{}: light along {} sees no birefringence; choose another cut",
                letter(slow),
                letter(fast),
                chosen.name()
            ),
        ));
    }
    let note = match cut {
        Some(_) => format!(
            "{}-cut as requested: light along principal {}, Γ = 2π (n_{} − n_{}) L / λ",
            chosen.name(),
            chosen.name(),
            letter(slow),
            letter(fast)
        ),
        None => format!(
            "{}-cut, the cut of largest birefringence (n_{} − n_{}); \"cut\" chooses another",
            chosen.name(),
            letter(slow),
            letter(fast)
        ),
    };
    Ok(Some(BiaxialCut {
        indices: Indices::new(n[fast], n[slow])?,
        oriented: cut_orientation(chosen, n),
        principal: n,
        slow_fast: (slow, fast),
        cut: chosen.name(),
        note,
        fast_axis: format!(
            "principal {} (across the plate's azimuth; slow: principal {})",
            letter(fast),
            letter(slow)
        ),
    }))
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::Vector3;

    fn parallel(a: Vector3<f64>, b: Vector3<f64>) -> bool {
        a.cross(&b).norm() < 1e-12
    }

    #[test]
    fn a_cut_puts_its_axis_along_the_normal_and_the_slow_axis_at_zero() {
        for n in [[1.74, 1.75, 1.83], [1.9, 1.6, 1.7]] {
            for c in 0..3 {
                let cut = PrincipalCut(c);
                let r = cut_orientation(cut, n).axes();
                assert!(parallel(r.column(c).into(), Vector3::z()), "{n:?} cut {c}");
                let (slow, fast) = slow_fast(cut, n);
                assert!(n[slow] >= n[fast]);
                assert!(parallel(r.column(slow).into(), Vector3::x()), "{n:?} cut {c}");
                assert!(parallel(r.column(fast).into(), Vector3::y()), "{n:?} cut {c}");
            }
        }
    }

    #[test]
    fn a_plane_holds_the_normal_at_the_cut_angle_from_its_second_axis() {
        for (first, second) in [(0, 1), (0, 2), (1, 2)] {
            let plane = PrincipalPlane { first, second };
            for theta in [0.0_f64, 33.0, 90.0, 140.0] {
                let r = plane_orientation(plane, theta).axes();
                let (s, c) = theta.to_radians().sin_cos();
                let b: Vector3<f64> = r.column(second).into();
                assert!((b - Vector3::new(s, 0.0, c)).norm() < 1e-12, "{plane:?} {theta}: {b}");
                assert!(parallel(r.column(plane.normal()).into(), Vector3::y()));
            }
        }
    }

    #[test]
    fn the_defaults_take_the_largest_effect() {
        // n_x < n_y < n_z: the x cut leaves y, z in the faces; n_z − n_x is the largest spread.
        let n = [1.7, 1.71, 1.8];
        assert_eq!(widest_cut(n), PrincipalCut(1));
        assert_eq!(widest_plane(n), PrincipalPlane { first: 0, second: 2 });
    }
}
