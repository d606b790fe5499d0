//! One crystal plate on its own: the numbers a designer sizes it by, without a full trace.
//!
//! For a plate of thickness L with its optic axis at (tilt, azimuth), lit at tangential wave
//! vector q_t from the outside medium, the exact plane-wave modes of [`crate::optics::modes`] give
//!
//! ```text
//! walk-off ρ = ∠(k_e, S_e),   separation = L · |S_e,t/S_e,z − S_o,t/S_o,z|,
//! retardance Γ = k0 (q_z,e − q_z,o) L.
//! ```
//!
//! These are the same numbers the stack trace reports for a crystal (tested), computed with no
//! allocation, so that sweeps and Monte Carlo tolerance runs can afford hundreds of thousands.

use crate::optics::material::Indices;
use crate::optics::modes::{Mode, Travel, crystal_modes};
use crate::optics::uniaxial::{OpticAxis, Uniaxial, angle_between};
use crate::optics::wavelength::Wavelength;

/// What one plate does to one input ray.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlateOptics {
    /// Walk-off of the e-ray from its wave vector, radians.
    pub walkoff_rad: f64,
    /// Distance between the o- and e-ray exit points, mm.
    pub separation_mm: f64,
    /// e-ray exit point minus o-ray exit point, [dx, dy] in mm.
    pub separation_vector_mm: [f64; 2],
    /// Retardance k0 (q_z,e − q_z,o) L, radians (positive when the e-wave is slower).
    pub retardance_rad: f64,
}

/// The tangential wave vector of a beam from a medium of index `n` at polar angle `polar` and
/// azimuth `azimuth`, radians.
pub fn tangential(n: f64, polar: f64, azimuth: f64) -> [f64; 2] {
    [n * polar.sin() * azimuth.cos(), n * polar.sin() * azimuth.sin()]
}

/// The optics of one plate, or `None` when a mode is evanescent.
pub fn plate_optics(
    indices: Indices,
    axis: OpticAxis,
    thickness_mm: f64,
    wavelength: Wavelength,
    qt: [f64; 2],
) -> Option<PlateOptics> {
    let [o, e] = crystal_modes(&Uniaxial::new(indices, axis), qt, Travel::Forward);
    plate_of_modes(&o, &e, thickness_mm, wavelength)
}

/// The optics of a plate whose two forward modes are `o` and `e` (for any crystal: the second
/// mode plays the e-wave's part), or `None` when a mode is evanescent; the walk-off is the second
/// mode's.
pub fn plate_of_modes(o: &Mode, e: &Mode, thickness_mm: f64, wavelength: Wavelength) -> Option<PlateOptics> {
    let (so, se) = (o.ray_direction()?, e.ray_direction()?);
    // Each ray's shift first, then the difference: the same arithmetic as the stack trace.
    let dx = thickness_mm * se.x / se.z - thickness_mm * so.x / so.z;
    let dy = thickness_mm * se.y / se.z - thickness_mm * so.y / so.z;
    Some(PlateOptics {
        walkoff_rad: angle_between(&e.wave_vector(), &se),
        separation_mm: dx.hypot(dy),
        separation_vector_mm: [dx, dy],
        retardance_rad: wavelength.k0_per_mm() * (e.qz().re - o.qz().re) * thickness_mm,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::interface::Losses;
    use crate::optics::stack::{Element, InputBeam, Layer, Medium, Slab, Stack};
    use crate::optics::trace::trace;
    use crate::optics::traced::LayerTrace;
    use nalgebra::Vector3;

    /// Independent path through the code: the stack trace of a one-slab stack at oblique
    /// incidence from a medium of index 1.2 gives the same shifts and phases, bit for bit.
    #[test]
    fn agrees_with_the_stack_trace() {
        let indices = Indices::new(1.6487, 1.4802).unwrap();
        let axis = OpticAxis::from_angles(52f64.to_radians(), 15f64.to_radians());
        let (p, a) = (23f64.to_radians(), (-40f64).to_radians());
        let wavelength = Wavelength::from_nm(800.0).unwrap();
        let stack = Stack {
            wavelength,
            outside_index: 1.2,
            losses: Losses::Ideal,
            input: InputBeam {
                direction: Vector3::new(p.sin() * a.cos(), p.sin() * a.sin(), p.cos()),
                diameter_mm: 1.0,
                jones: None,
                stokes: [1.0, 0.0, 0.0, 0.0],
            },
            layers: vec![Layer {
                gap_mm: 0.0,
                element: Element::Slab(Slab {
                    medium: Medium::Uniaxial(Uniaxial::new(indices, axis)),
                    thickness_mm: 7.0,
                    faces: None,
                }),
            }],
            screen_mm: 0.0,
            cells: Vec::new(),
        };
        let traced = trace(&stack);
        let LayerTrace::Slab { modes, shifts_mm, .. } = &traced.layers[0] else {
            panic!("a slab")
        };
        let plate = plate_optics(indices, axis, 7.0, wavelength, tangential(1.2, p, a)).unwrap();
        let sep = [shifts_mm[1][0] - shifts_mm[0][0], shifts_mm[1][1] - shifts_mm[0][1]];
        assert_eq!(plate.separation_vector_mm, sep);
        assert_eq!(plate.separation_mm, sep[0].hypot(sep[1]));
        let k0 = wavelength.k0_per_mm();
        assert_eq!(plate.retardance_rad, k0 * (modes[1].qz().re - modes[0].qz().re) * 7.0);
        assert!(plate.walkoff_rad > 0.0);
    }
}
