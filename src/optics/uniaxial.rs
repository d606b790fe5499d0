//! A uniaxial crystal: principal indices, optic axis, and the closed-form bulk optics.
//!
//! Physics. In a uniaxial crystal with optic axis c (unit vector) the ordinary wave sees n_o in
//! every direction and the extraordinary wave sees
//!
//! ```text
//! 1/n(θ)² = cos²θ/n_o² + sin²θ/n_e²,     θ = angle between the wave vector and c.
//! ```
//!
//! In normalized wave-vector form (q = k/k0) the e-wave's normal surface is q·A·q = 1 with
//! `A = I/n_e² + c cᵀ (1/n_o² − 1/n_e²)`, and its ray (Poynting) direction is the surface normal
//! A·q. The walk-off ρ between wave vector and ray obeys tan(θ + ρ) = (n_o²/n_e²) tan θ, i.e.
//!
//! ```text
//! tan ρ = (n_o² − n_e²) sin θ cos θ / (n_e² cos²θ + n_o² sin²θ),
//! ```
//!
//! positive when the ray lies further from the optic axis than the wave vector (negative crystals).
//! It is largest at tan θ = n_e/n_o, where tan ρ_max = |n_e² − n_o²| / (2 n_o n_e).
//! Sources: M. Born and E. Wolf, *Principles of Optics*, 7th ed., §15.3 (normal and ray surfaces);
//! A. Yariv and P. Yeh, *Optical Waves in Crystals* (1984), ch. 4 (walk-off).
//!
//! Conventions (`../shared/CONVENTIONS.md`): `tilt_deg` is the polar angle of c from +z (the plate
//! normal), `azimuth_deg` the angle of its projection from +x toward +y, so
//! c = (sin t cos a, sin t sin a, cos t).

use crate::error::{Error, finite};
use crate::optics::material::Indices;
use nalgebra::{Matrix3, Vector3};

/// The optic axis, a unit vector in the lab frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OpticAxis {
    c: Vector3<f64>,
}

impl OpticAxis {
    /// The axis from its polar angle `tilt` from +z and the azimuth `azimuth` of its projection
    /// from +x toward +y, radians.
    ///
    /// Formula: c = (sin t cos a, sin t sin a, cos t).
    pub fn from_angles(tilt: f64, azimuth: f64) -> Self {
        OpticAxis {
            c: Vector3::new(tilt.sin() * azimuth.cos(), tilt.sin() * azimuth.sin(), tilt.cos()),
        }
    }

    /// The axis along an arbitrary non-zero vector.
    ///
    /// # Errors
    /// `axis` when a component is not finite or the vector is zero.
    pub fn from_vector(v: Vector3<f64>) -> Result<Self, Error> {
        for x in v.iter() {
            finite("axis", *x)?;
        }
        let n = v.norm();
        if !(n > 0.0 && n.is_finite()) {
            return Err(Error::new("axis", "the optic axis must be a non-zero vector"));
        }
        Ok(OpticAxis { c: v / n })
    }

    /// The unit vector c.
    pub fn unit(&self) -> Vector3<f64> {
        self.c
    }

    /// The axis seen in a frame rotated by the rotation matrix `r` (c becomes r·c).
    pub fn rotated(&self, r: &Matrix3<f64>) -> OpticAxis {
        OpticAxis { c: r * self.c }
    }
}

/// A uniaxial medium: its principal indices at one wavelength and its optic axis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Uniaxial {
    /// Principal indices n_o, n_e.
    pub indices: Indices,
    /// Optic axis.
    pub axis: OpticAxis,
}

impl Uniaxial {
    /// A crystal with these indices and this axis.
    pub fn new(indices: Indices, axis: OpticAxis) -> Self {
        Uniaxial { indices, axis }
    }

    /// A crystal from plain numbers, for tests: indices and the axis angles in degrees.
    ///
    /// # Errors
    /// `no` or `ne` when out of range (see [`Indices::new`]).
    #[cfg(test)]
    pub fn from_numbers(no: f64, ne: f64, tilt_deg: f64, azimuth_deg: f64) -> Result<Self, Error> {
        Ok(Uniaxial::new(
            Indices::new(no, ne)?,
            OpticAxis::from_angles(tilt_deg.to_radians(), azimuth_deg.to_radians()),
        ))
    }

    /// Relative permittivity tensor ε = n_o² I + (n_e² − n_o²) c cᵀ.
    pub fn permittivity(&self) -> Matrix3<f64> {
        let Indices { no, ne } = self.indices;
        let c = self.axis.c;
        Matrix3::identity() * (no * no) + c * c.transpose() * (ne * ne - no * no)
    }

    /// Inverse permittivity ε⁻¹ = I/n_o² + (1/n_e² − 1/n_o²) c cᵀ (maps D to E, both relative).
    pub fn inverse_permittivity(&self) -> Matrix3<f64> {
        let Indices { no, ne } = self.indices;
        let c = self.axis.c;
        Matrix3::identity() / (no * no) + c * c.transpose() * (1.0 / (ne * ne) - 1.0 / (no * no))
    }

    /// The e-wave's normal-surface matrix A = I/n_e² + (1/n_o² − 1/n_e²) c cᵀ: the e-wave has
    /// q·A·q = 1 and its ray along A·q.
    pub fn extraordinary_surface(&self) -> Matrix3<f64> {
        let Indices { no, ne } = self.indices;
        let c = self.axis.c;
        Matrix3::identity() / (ne * ne) + c * c.transpose() * (1.0 / (no * no) - 1.0 / (ne * ne))
    }
}

/// Extraordinary index n(θ) for a wave vector at angle `theta` (radians) from the optic axis.
///
/// Formula: n(θ) = n_o n_e / √(n_e² cos²θ + n_o² sin²θ).
#[cfg(test)]
pub fn extraordinary_index(indices: Indices, theta: f64) -> f64 {
    let Indices { no, ne } = indices;
    let (s, c) = theta.sin_cos();
    no * ne / (ne * ne * c * c + no * no * s * s).sqrt()
}

/// Walk-off angle ρ (radians) of the e-ray from its wave vector, for a wave vector at `theta`
/// from the optic axis; positive when the ray lies further from the axis (negative crystals).
///
/// Formula: tan ρ = (n_o² − n_e²) sin θ cos θ / (n_e² cos²θ + n_o² sin²θ).
pub fn walkoff(indices: Indices, theta: f64) -> f64 {
    let Indices { no, ne } = indices;
    let (s, c) = theta.sin_cos();
    ((no * no - ne * ne) * s * c).atan2(ne * ne * c * c + no * no * s * s)
}

/// The cut of maximum walk-off at normal incidence: the angle θ between wave vector and optic
/// axis (radians) where |ρ| is largest, and that ρ (signed as in [`walkoff`]).
///
/// Formula: tan θ = n_e/n_o, tan ρ_max = (n_o² − n_e²)/(2 n_o n_e). There dρ/dθ = 0, which is why
/// this cut is the one least sensitive to cut-angle error.
pub fn max_walkoff_cut(indices: Indices) -> (f64, f64) {
    let Indices { no, ne } = indices;
    (ne.atan2(no), (no * no - ne * ne).atan2(2.0 * no * ne))
}

/// Angle (radians, in [0, π]) between two non-zero vectors, accurate also when it is tiny.
///
/// Formula: atan2(|a × b|, a·b). Returns 0 when either vector is zero.
pub fn angle_between(a: &Vector3<f64>, b: &Vector3<f64>) -> f64 {
    a.cross(b).norm().atan2(a.dot(b))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::precision::assert_close;

    fn calcite() -> Indices {
        // Illustrative indices near calcite's at 633 nm; only the identities are tested here.
        Indices::new(1.6557, 1.4849).unwrap()
    }

    #[test]
    fn index_limits_along_and_across_the_axis() {
        let ix = calcite();
        assert_close(extraordinary_index(ix, 0.0), ix.no, 1e-15, 1.0, "n(0) = n_o");
        assert_close(
            extraordinary_index(ix, std::f64::consts::FRAC_PI_2),
            ix.ne,
            1e-15,
            1.0,
            "n(90°) = n_e",
        );
    }

    #[test]
    fn walkoff_matches_the_ray_surface_normal() {
        // Independent route: angle between q and A·q for a wave vector at θ from the axis.
        let ix = calcite();
        for k in 0..=90 {
            let theta = (k as f64).to_radians();
            let axis = OpticAxis::from_angles(0.0, 0.0);
            let crystal = Uniaxial::new(ix, axis);
            let q = Vector3::new(theta.sin(), 0.0, theta.cos()) * extraordinary_index(ix, theta);
            let s = crystal.extraordinary_surface() * q;
            assert_close(q.dot(&(crystal.extraordinary_surface() * q)), 1.0, 1e-14, 1.0, "q·A·q");
            let rho = angle_between(&q, &s);
            assert_close(rho, walkoff(ix, theta).abs(), 1e-12, 1e-3, "walk-off vs A·q");
        }
    }

    #[test]
    fn max_walkoff_is_a_stationary_point() {
        let ix = calcite();
        let (theta, rho) = max_walkoff_cut(ix);
        assert_close(theta.tan(), ix.ne / ix.no, 1e-14, 1.0, "tan θ = n_e/n_o");
        let h = 1e-5;
        let slope = (walkoff(ix, theta + h) - walkoff(ix, theta - h)) / (2.0 * h);
        assert!(slope.abs() < 1e-9, "dρ/dθ at the maximum = {slope}");
        assert_close(walkoff(ix, theta), rho, 1e-14, 1e-3, "ρ at the maximum");
        // Common practice: calcite's maximum walk-off is about 6.2° near a 45° cut.
        assert!(
            (rho.to_degrees() - 6.2).abs() < 0.1,
            "calcite ρ_max = {}",
            rho.to_degrees()
        );
        // The wave normal sits at 41.9° from the axis and the ray at 48.1°: they straddle 45°.
        assert!((theta.to_degrees() - 45.0).abs() < 3.5);
        assert!((theta.to_degrees() + rho.to_degrees() - 45.0).abs() < 3.5);
    }

    #[test]
    fn axes_from_angles_and_vectors() {
        assert!(OpticAxis::from_vector(Vector3::zeros()).is_err());
        let c = OpticAxis::from_angles(std::f64::consts::FRAC_PI_2, std::f64::consts::FRAC_PI_2).unit();
        assert!((c - Vector3::y()).norm() < 1e-15);
    }
}
