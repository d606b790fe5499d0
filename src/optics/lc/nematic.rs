//! A nematic liquid crystal's constants at one wavelength: indices, elastic constants and
//! dielectric permittivities, and the two numbers a cell is chosen by.
//!
//! Conventions: the director n makes the tilt θ with the substrate plane (x–y) and has the
//! azimuth φ from +x toward +y, n = (cos θ cos φ, cos θ sin φ, sin θ). Elastic constants are in
//! piconewtons (pN), lengths in micrometres, so that energies per area come out in pN/µm
//! (10⁻⁶ J/m²) and ε0 = 8.8541878128 pN/V².
//!
//! Formulas:
//! - index of a wave along z: 1/n_eff² = sin²θ/n_o² + cos²θ/n_e² (the director makes 90° − θ
//!   with z; Born & Wolf §15.3);
//! - Freedericksz threshold of a cell of twist φ with zero pretilt (splay-twist-bend with the
//!   field along z): V_th = π √((K11 + (K33 − 2 K22)(φ/π)²)/(ε0 Δε)); for φ = 0 the classic
//!   π √(K11/(ε0 Δε)) (V. Freedericksz and V. Zolina, Trans. Faraday Soc. 29, 919 (1933);
//!   P. G. de Gennes and J. Prost, *The Physics of Liquid Crystals*, 2nd ed. (1993), §3.2; the
//!   twisted form: M. Schadt and W. Helfrich (1971) as given by de Gennes & Prost, from memory).

/// Vacuum permittivity in pN/V² (ε0 = 8.8541878128·10⁻¹² F/m, CODATA 2018), the unit that
/// makes ε0 V²/d an energy per area in pN/µm when d is in micrometres.
pub const EPSILON0_PN_PER_V2: f64 = 8.854_187_812_8;

/// A nematic's constants at one wavelength and temperature.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Nematic {
    /// Ordinary index (light polarized across the director).
    pub no: f64,
    /// Extraordinary index (light polarized along the director).
    pub ne: f64,
    /// Splay elastic constant K11, pN.
    pub k11_pn: f64,
    /// Twist elastic constant K22, pN.
    pub k22_pn: f64,
    /// Bend elastic constant K33, pN.
    pub k33_pn: f64,
    /// Static relative permittivity along the director, ε∥.
    pub eps_parallel: f64,
    /// Static relative permittivity across the director, ε⊥.
    pub eps_perpendicular: f64,
}

impl Nematic {
    /// Dielectric anisotropy Δε = ε∥ − ε⊥ (positive: the director turns toward the field).
    pub fn delta_eps(&self) -> f64 {
        self.eps_parallel - self.eps_perpendicular
    }

    /// The static ε_zz of a director at tilt `theta`: ε⊥ + Δε sin²θ.
    pub fn eps_zz(&self, theta: f64) -> f64 {
        self.eps_perpendicular + self.delta_eps() * theta.sin().powi(2)
    }

    /// Index of a wave along z (normal incidence) polarized in the director's plane, at tilt
    /// `theta`: 1/n_eff² = sin²θ/n_o² + cos²θ/n_e².
    pub fn n_eff(&self, theta: f64) -> f64 {
        let (s, c) = theta.sin_cos();
        1.0 / (s * s / (self.no * self.no) + c * c / (self.ne * self.ne)).sqrt()
    }

    /// The Freedericksz threshold (RMS volts) of a cell of total twist `twist` (radians) and zero
    /// pretilt: π √((K11 + (K33 − 2 K22)(φ/π)²)/(ε0 Δε)). NaN when Δε ≤ 0 or the numerator is
    /// negative (no threshold: the field does not tilt the director up).
    pub fn threshold_v(&self, twist: f64) -> f64 {
        let r = twist / std::f64::consts::PI;
        let k = self.k11_pn + (self.k33_pn - 2.0 * self.k22_pn) * r * r;
        std::f64::consts::PI * (k / (EPSILON0_PN_PER_V2 * self.delta_eps())).sqrt()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::precision::assert_close;

    fn sample() -> Nematic {
        Nematic {
            no: 1.53,
            ne: 1.71,
            k11_pn: 6.4,
            k22_pn: 3.0,
            k33_pn: 10.0,
            eps_parallel: 19.7,
            eps_perpendicular: 6.7,
        }
    }

    /// The effective index runs from n_e in the plane to n_o along z (Born & Wolf §15.3).
    #[test]
    fn effective_index_spans_the_two_indices() {
        let lc = sample();
        assert_close(lc.n_eff(0.0), 1.71, 1e-15, 1.0, "n_eff(0)");
        assert_close(lc.n_eff(std::f64::consts::FRAC_PI_2), 1.53, 1e-15, 1.0, "n_eff(90°)");
    }

    /// A 5CB-like nematic (K11 = 6.4 pN, Δε = 13) switches near 0.74 V, the threshold commonly
    /// quoted for 5CB (common practice; de Gennes & Prost §3.2 for the formula).
    #[test]
    fn threshold_of_a_planar_cell() {
        let lc = sample();
        let expected = std::f64::consts::PI * (6.4e-12_f64 / (8.8541878128e-12 * 13.0)).sqrt();
        assert_close(lc.threshold_v(0.0), expected, 1e-14, 1.0, "V_th");
        assert!((lc.threshold_v(0.0) - 0.74).abs() < 0.01);
        // Twist adds (K33 − 2 K22)/4 for 90°.
        let twisted = std::f64::consts::PI * ((6.4e-12_f64 + 4.0e-12 / 4.0) / (8.8541878128e-12 * 13.0)).sqrt();
        assert_close(
            lc.threshold_v(std::f64::consts::FRAC_PI_2),
            twisted,
            1e-14,
            1.0,
            "V_th 90°",
        );
    }
}
