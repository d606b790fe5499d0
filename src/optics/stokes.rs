//! Stokes vectors, Mueller matrices and polarization-ellipse parameters.
//!
//! Partially polarized and unpolarized light is carried as a Stokes vector S = (S0, S1, S2, S3)
//! with S0 ≥ √(S1² + S2² + S3²); a deterministic optical path acts on it through the Mueller
//! matrix of its Jones matrix,
//!
//! ```text
//! M = A (J ⊗ J*) A⁻¹,   with S = A (C11, C12, C21, C22) for the coherency matrix C = ⟨E Eᴴ⟩,
//! A = [[1,0,0,1], [1,0,0,−1], [0,1,1,0], [0,−i,i,0]].
//! ```
//!
//! (Sign conventions as in [`crate::optics::jones`]: S3 = 2 Im(E1 E2*), right-handed for S3 > 0.)
//! Ellipse: azimuth ψ = ½ atan2(S2, S1) in (−90°, 90°], ellipticity angle
//! χ = ½ asin(S3 / √(S1² + S2² + S3²)), for the polarized part. Degree of polarization
//! p = √(S1² + S2² + S3²)/S0. Sources: Born & Wolf §10.8.3; R. A. Chipman, W. S. T. Lam,
//! G. Young, *Polarized Light and Optical Systems* (2018), ch. 6–7.

use crate::optics::jones::JonesMatrix;
use crate::precision::LINEAR_ELLIPTICITY;
use nalgebra::{Matrix4, Vector4};
use num_complex::Complex64;
use serde::Serialize;

/// A Mueller matrix.
pub type Mueller = Matrix4<f64>;

/// The Mueller matrix of a Jones matrix, in the conventions above.
pub fn mueller(j: &JonesMatrix) -> Mueller {
    let i = Complex64::i();
    let one = Complex64::ONE;
    let z = Complex64::ZERO;
    let a = Matrix4::new(one, z, z, one, one, z, z, -one, z, one, one, z, z, -i, i, z);
    // A⁻¹ = ½ Aᴴ (A/√2 is unitary).
    let a_inv = a.adjoint() * Complex64::from(0.5);
    let jc = j.map(|v| v.conj());
    let kron = j.kronecker(&jc);
    let mut kron4 = Matrix4::<Complex64>::zeros();
    kron4.copy_from(&kron);
    (a * kron4 * a_inv).map(|v| v.re)
}

/// Degree of polarization √(S1² + S2² + S3²)/S0 (0 for S0 = 0).
pub fn degree_of_polarization(s: &[f64; 4]) -> f64 {
    let p = (s[1] * s[1] + s[2] * s[2] + s[3] * s[3]).sqrt();
    if s[0] > 0.0 { (p / s[0]).min(1.0) } else { 0.0 }
}

/// Applies a Mueller matrix to a Stokes vector.
pub fn apply(m: &Mueller, s: &[f64; 4]) -> [f64; 4] {
    let v = m * Vector4::from(*s);
    [v[0], v[1], v[2], v[3]]
}

/// Handedness of a polarization state.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Handedness {
    /// S3 > 0: clockwise as seen looking toward the source.
    Right,
    /// S3 < 0.
    Left,
    /// |S3| negligible: a linear state.
    Linear,
    /// Degree of polarization negligible (or no power): no ellipse is defined.
    Unpolarized,
}

/// The polarization ellipse of the polarized part of a state.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Ellipse {
    /// Azimuth of the major axis in (−90°, 90°], from e1 toward e2.
    pub azimuth_deg: f64,
    /// Ellipticity angle χ in [−45°, 45°], tan χ = ±b/a, positive for right-handed.
    pub ellipticity_deg: f64,
    /// Right, left, linear or unpolarized.
    pub handedness: Handedness,
}

/// The ellipse of a Stokes vector.
///
/// Degenerate cases: S0 = 0 or a degree of polarization below
/// [`LINEAR_ELLIPTICITY`] gives azimuth 0, ellipticity 0, [`Handedness::Unpolarized`].
pub fn ellipse(s: &[f64; 4]) -> Ellipse {
    let p = (s[1] * s[1] + s[2] * s[2] + s[3] * s[3]).sqrt();
    if s[0].is_nan() || s[0] <= 0.0 || p <= LINEAR_ELLIPTICITY * s[0] {
        return Ellipse {
            azimuth_deg: 0.0,
            ellipticity_deg: 0.0,
            handedness: Handedness::Unpolarized,
        };
    }
    let mut psi = 0.5 * s[2].atan2(s[1]).to_degrees();
    if psi <= -90.0 {
        psi += 180.0;
    }
    let chi = 0.5 * (s[3] / p).clamp(-1.0, 1.0).asin().to_degrees();
    let handedness = if s[3].abs() <= LINEAR_ELLIPTICITY * s[0] {
        Handedness::Linear
    } else if s[3] > 0.0 {
        Handedness::Right
    } else {
        Handedness::Left
    };
    // Exactly circular: the azimuth is undefined; report 0 rather than a rounding artefact.
    if s[1].hypot(s[2]) <= LINEAR_ELLIPTICITY * s[0] {
        psi = 0.0;
    }
    Ellipse {
        azimuth_deg: psi + 0.0,
        ellipticity_deg: chi,
        handedness,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::jones::{self, Jones};

    #[test]
    fn mueller_agrees_with_jones_on_pure_states() {
        // Cross-method check: Stokes of (J·E) equals M(J)·Stokes(E).
        let mats = [
            jones::retarder(0.8, 0.3),
            jones::polarizer(-0.4),
            jones::rotator(1.1),
            jones::retarder(2.0, 1.0) * jones::polarizer(0.2),
        ];
        let states = [
            jones::linear(0.2),
            jones::elliptical(-0.5, 0.3),
            Jones::new(Complex64::new(0.3, 0.1), Complex64::new(-0.2, 0.9)),
        ];
        for m in &mats {
            let mm = mueller(m);
            for e in &states {
                let direct = jones::stokes(&(m * e));
                let via = apply(&mm, &jones::stokes(e));
                for k in 0..4 {
                    assert!((direct[k] - via[k]).abs() < 1e-14, "{direct:?} vs {via:?}");
                }
            }
        }
    }

    #[test]
    fn unpolarized_light_through_a_polarizer_keeps_half() {
        let out = apply(&mueller(&jones::polarizer(0.7)), &[1.0, 0.0, 0.0, 0.0]);
        assert!((out[0] - 0.5).abs() < 1e-15);
        assert!((degree_of_polarization(&out) - 1.0).abs() < 1e-14);
        assert_eq!(ellipse(&[1.0, 0.0, 0.0, 0.0]).handedness, Handedness::Unpolarized);
    }

    #[test]
    fn ellipse_ranges_and_edges() {
        let e = ellipse(&[1.0, -1.0, 0.0, 0.0]);
        assert_eq!(e.azimuth_deg, 90.0);
        let e = ellipse(&[1.0, -1.0, -0.0, 0.0]);
        assert_eq!(e.azimuth_deg, 90.0, "−0 must not give −90°");
        let e = ellipse(&[1.0, 0.0, 0.0, 1.0]);
        assert_eq!(e.handedness, Handedness::Right);
        assert!((e.ellipticity_deg - 45.0).abs() < 1e-12);
        let e = ellipse(&[2.0, 0.0, 1.0, 0.0]);
        assert!((e.azimuth_deg - 45.0).abs() < 1e-12);
        assert_eq!(e.handedness, Handedness::Linear);
        assert_eq!(ellipse(&[0.0; 4]).handedness, Handedness::Unpolarized);
    }
}
