//! Jones calculus: vectors, the ideal elements as matrices, and Stokes parameters of a vector.
//!
//! Conventions (`../shared/CONVENTIONS.md`): time dependence exp(i(k·r − ωt)), so a wave that lags
//! by Γ picks up the factor e^{+iΓ}. Components are on the beam basis (e1, e2) of
//! [`crate::optics::modes::beam_basis`] (x̂, ŷ at normal incidence); angles run from e1 toward e2.
//! Stokes: S0 = |E1|² + |E2|², S1 = |E1|² − |E2|², S2 = 2 Re(E1 E2*), S3 = 2 Im(E1 E2*), so that
//! S3 > 0 is right-handed (Born & Wolf: clockwise as seen looking toward the source).
//! Worked example that pins the signs: linear light at +45° through a quarter-wave retarder with
//! its fast axis along x becomes (1, i)/√2, left-handed, S3 = −S0.
//! Sources: R. C. Jones, J. Opt. Soc. Am. 31, 488 (1941); Born & Wolf §1.4.2, §10.8.

use nalgebra::{Matrix2, Vector2};
use num_complex::Complex64;

/// A Jones vector as the contract writes it: [[re, im], [re, im]].
pub type JonesJson = [[f64; 2]; 2];

/// A Jones vector in the contract's form, [[re, im], [re, im]].
pub fn to_json(j: &Jones) -> JonesJson {
    [[j[0].re, j[0].im], [j[1].re, j[1].im]]
}

/// A Jones vector (E1, E2).
pub type Jones = Vector2<Complex64>;
/// A Jones matrix.
pub type JonesMatrix = Matrix2<Complex64>;

fn c(re: f64) -> Complex64 {
    Complex64::new(re, 0.0)
}

/// Rotation of the field by `angle` (radians, from e1 toward e2).
///
/// Formula: [[cos, −sin], [sin, cos]].
pub fn rotation(angle: f64) -> JonesMatrix {
    let (s, co) = angle.sin_cos();
    JonesMatrix::new(c(co), c(-s), c(s), c(co))
}

/// A linear retarder of retardance `gamma` (radians) whose fast axis lies at `fast_axis`
/// (radians): the slow component lags by Γ.
///
/// Formula: R(θ) · diag(1, e^{iΓ}) · R(−θ).
pub fn retarder(gamma: f64, fast_axis: f64) -> JonesMatrix {
    let d = JonesMatrix::new(c(1.0), c(0.0), c(0.0), Complex64::from_polar(1.0, gamma));
    rotation(fast_axis) * d * rotation(-fast_axis)
}

/// An ideal linear polarizer transmitting along `axis` (radians).
///
/// Formula: R(θ) · diag(1, 0) · R(−θ).
pub fn polarizer(axis: f64) -> JonesMatrix {
    let d = JonesMatrix::new(c(1.0), c(0.0), c(0.0), c(0.0));
    rotation(axis) * d * rotation(-axis)
}

/// An ideal rotator (optically active or Faraday element, for one pass) that turns every
/// polarization by `angle` (radians, from e1 toward e2).
pub fn rotator(angle: f64) -> JonesMatrix {
    rotation(angle)
}

/// Stokes parameters [S0, S1, S2, S3] of a Jones vector.
pub fn stokes(j: &Jones) -> [f64; 4] {
    let (a, b) = (j[0], j[1]);
    let cross = a * b.conj();
    [
        a.norm_sqr() + b.norm_sqr(),
        a.norm_sqr() - b.norm_sqr(),
        2.0 * cross.re,
        2.0 * cross.im,
    ]
}

/// The Jones vector of unit power for linear light at `azimuth` (radians).
pub fn linear(azimuth: f64) -> Jones {
    Jones::new(c(azimuth.cos()), c(azimuth.sin()))
}

/// The Jones vector of unit power for an ellipse of azimuth ψ and ellipticity angle χ
/// (radians; χ > 0 right-handed).
///
/// Formula: R(ψ) · (cos χ, −i sin χ): with S3 = 2 Im(E1 E2*) this gives S3 = sin 2χ.
pub fn elliptical(azimuth: f64, ellipticity: f64) -> Jones {
    let (s, co) = ellipticity.sin_cos();
    rotation(azimuth) * Jones::new(c(co), Complex64::new(0.0, -s))
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::{FRAC_PI_2, FRAC_PI_4, PI};

    fn close(a: [f64; 4], b: [f64; 4], tol: f64) -> bool {
        a.iter().zip(b.iter()).all(|(x, y)| (x - y).abs() < tol)
    }

    #[test]
    fn worked_example_pins_the_signs() {
        // CONVENTIONS.md: +45° linear through a quarter-wave retarder, fast axis along x → (1, i)/√2.
        let out = retarder(FRAC_PI_2, 0.0) * linear(FRAC_PI_4);
        let expect = Jones::new(c(1.0), Complex64::new(0.0, 1.0)) / c(2f64.sqrt());
        assert!((out - expect).norm() < 1e-15, "{out:?}");
        assert!(
            close(stokes(&out), [1.0, 0.0, 0.0, -1.0], 1e-15),
            "left-handed: S3 = −S0"
        );
    }

    #[test]
    fn elliptical_states_have_the_stated_stokes() {
        for (psi, chi) in [(0.3, 0.2), (-1.2, -0.7), (FRAC_PI_2, FRAC_PI_4)] {
            let s = stokes(&elliptical(psi, chi));
            let expect = [
                1.0,
                (2.0 * chi).cos() * (2.0 * psi).cos(),
                (2.0 * chi).cos() * (2.0 * psi).sin(),
                (2.0 * chi).sin(),
            ];
            assert!(close(s, expect, 1e-15), "{s:?} vs {expect:?}");
        }
    }

    #[test]
    fn common_practice_identities() {
        // Common practice: a half-wave plate at θ turns linear polarization by 2θ.
        for th in [0.1, 0.4, -0.9] {
            let out = retarder(PI, th) * linear(0.0);
            assert!(close(stokes(&out), stokes(&linear(2.0 * th)), 1e-14));
        }
        // Common practice: two quarter-wave plates with parallel axes act as one half-wave plate.
        let q = retarder(FRAC_PI_2, 0.37);
        assert!((q * q - retarder(PI, 0.37)).norm() < 1e-15);
        // Common practice: a half-wave plate flips circular handedness.
        let right = elliptical(0.0, FRAC_PI_4);
        assert!(stokes(&right)[3] > 0.99);
        assert!(stokes(&(retarder(PI, 0.8) * right))[3] < -0.99);
        // Retarders and rotators are unitary; a polarizer is a projector.
        for m in [retarder(1.234, 0.5), rotator(0.77)] {
            assert!((m.adjoint() * m - JonesMatrix::identity()).norm() < 1e-15);
        }
        let p = polarizer(0.3);
        assert!((p * p - p).norm() < 1e-15);
    }
}
