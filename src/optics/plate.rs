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
use crate::optics::modes::{Travel, crystal_modes};
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

/// The tangential wave vector of a beam from a medium of index `n` at polar angle `polar_deg`
/// and azimuth `azimuth_deg`.
pub fn tangential(n: f64, polar_deg: f64, azimuth_deg: f64) -> [f64; 2] {
    let (p, a) = (polar_deg.to_radians(), azimuth_deg.to_radians());
    [n * p.sin() * a.cos(), n * p.sin() * a.sin()]
}

/// The optics of one plate, or `None` when an angle is out of range or a mode is evanescent.
pub fn plate_optics(
    indices: Indices,
    tilt_deg: f64,
    azimuth_deg: f64,
    thickness_mm: f64,
    wavelength: Wavelength,
    qt: [f64; 2],
) -> Option<PlateOptics> {
    let axis = OpticAxis::from_degrees(tilt_deg, azimuth_deg).ok()?;
    let [o, e] = crystal_modes(&Uniaxial::new(indices, axis), qt, Travel::Forward);
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
    use crate::contract::scenario::Scenario;
    use crate::optics::trace::{ElementReport, trace};

    #[test]
    fn agrees_with_the_stack_trace() {
        let doc = r#"{"wavelength_nm": 800, "outside_index": 1.2,
            "beam": {"incidence": {"polar_deg": 23, "azimuth_deg": -40}},
            "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 7, "axis": {"tilt_deg": 52, "azimuth_deg": 15}}]}"#;
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace(&sc).unwrap();
        let ElementReport::Crystal {
            no,
            ne,
            separation_mm,
            separation_vector_mm,
            retardance_rad,
            e,
            ..
        } = &r.elements[0]
        else {
            panic!()
        };
        let p = plate_optics(
            Indices::new(*no, *ne).unwrap(),
            52.0,
            15.0,
            7.0,
            sc.wavelength,
            tangential(1.2, 23.0, -40.0),
        )
        .unwrap();
        assert_eq!(p.separation_mm, separation_mm.unwrap());
        assert_eq!(p.separation_vector_mm, separation_vector_mm.unwrap());
        assert_eq!(p.retardance_rad, retardance_rad.unwrap());
        assert!((p.walkoff_rad.to_degrees() - e.walkoff_deg.unwrap()).abs() < 1e-12);
    }
}
