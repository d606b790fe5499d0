//! One plate of any crystal on its own (biaxial, or uniaxial in any orientation): the numbers a
//! designer sizes it by, without a full trace, as [`crate::optics::plate`] gives them for a
//! uniaxial crystal by its closed form.
//!
//! Physics. For a plate of thickness L whose principal axes are `axes` (columns, lab frame, faces
//! ⊥ z), lit at tangential wave vector q_t, the two forward modes of the 4×4 solver of
//! [`crate::optics::general_modes`] (first and second letter: `f` and `s` for a biaxial crystal)
//! give
//!
//! ```text
//! separation = L · |S₂,t/S₂,z − S₁,t/S₁,z|,   retardance Γ = k0 (q_z,2 − q_z,1) L,
//! ```
//!
//! with S the Poynting vectors: the same arithmetic as the stack trace's report of a plane-parallel
//! crystal (each ray's shift first, then the difference), so the two agree to rounding (tested in
//! tests/biaxial_design.rs). The walk-off reported is the larger of the two modes' angles between
//! wave vector and ray, the one a displacer uses.

use crate::optics::anisotropic::Anisotropic;
use crate::optics::general_modes::general_modes;
use crate::optics::modes::Travel;
use crate::optics::plate::{PlateOptics, plate_of_modes};
use crate::optics::uniaxial::angle_between;
use crate::optics::wavelength::Wavelength;

/// The optics of one plate of `medium` (its axes in the lab frame), or `None` when a mode is
/// evanescent. The result's "e" is the medium's second mode and "o" its first.
pub fn general_plate_optics(
    medium: &Anisotropic,
    thickness_mm: f64,
    wavelength: Wavelength,
    qt: [f64; 2],
) -> Option<PlateOptics> {
    let [first, second] = general_modes(medium, qt, Travel::Forward);
    let mut p = plate_of_modes(&first, &second, thickness_mm, wavelength)?;
    let s1 = first.ray_direction()?;
    p.walkoff_rad = p.walkoff_rad.max(angle_between(&first.wave_vector(), &s1));
    Some(p)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::anisotropic::orientation;
    use crate::optics::material::Indices;
    use crate::optics::plate::plate_optics;
    use crate::optics::uniaxial::OpticAxis;

    /// Independent method: a crystal with two equal principal indices is uniaxial, and the closed
    /// form of [`plate_optics`] gives the same plate (the general solver's letters are then o, e).
    #[test]
    fn a_uniaxial_crystal_matches_the_closed_form() {
        let (no, ne) = (1.6557, 1.4849);
        let (tilt, az) = (41f64.to_radians(), 20f64.to_radians());
        let wl = Wavelength::from_nm(589.0).unwrap();
        let qt = [0.2, -0.1];
        let general = Anisotropic::new([no, no, ne], orientation(tilt, az, 0.0), [0.0; 3]).unwrap();
        let g = general_plate_optics(&general, 2.0, wl, qt).unwrap();
        let c = plate_optics(
            Indices::new(no, ne).unwrap(),
            OpticAxis::from_angles(tilt, az),
            2.0,
            wl,
            qt,
        )
        .unwrap();
        assert!((g.separation_mm - c.separation_mm).abs() < 1e-12, "{g:?} {c:?}");
        assert!(
            (g.retardance_rad - c.retardance_rad).abs() < 1e-9 * c.retardance_rad.abs(),
            "{g:?} {c:?}"
        );
        assert!((g.walkoff_rad - c.walkoff_rad).abs() < 1e-12, "{g:?} {c:?}");
    }
}
