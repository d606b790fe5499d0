//! Vacuum wavelength, validated once, with the conversions the physics needs.
//!
//! The contract gives wavelengths in nanometres (vacuum). Dispersion formulas take micrometres;
//! phases use the vacuum wavenumber k0 = 2π/λ in rad/mm, the unit of lengths at the interface, so
//! that a phase is simply k0 · (normalized k_z) · L_mm.

use crate::error::{Error, positive};
use std::f64::consts::TAU;

/// A vacuum wavelength that is finite and positive.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Wavelength {
    nm: f64,
}

impl Wavelength {
    /// A wavelength in nanometres.
    ///
    /// # Errors
    /// `wavelength_nm` when the value is not finite or not positive.
    pub fn from_nm(nm: f64) -> Result<Self, Error> {
        Ok(Wavelength {
            nm: positive("wavelength_nm", nm)?,
        })
    }

    /// The wavelength in nanometres.
    pub fn nm(self) -> f64 {
        self.nm
    }

    /// The wavelength in micrometres, the unit of the dispersion formulas.
    pub fn um(self) -> f64 {
        self.nm * 1e-3
    }

    /// The wavelength in millimetres.
    pub fn mm(self) -> f64 {
        self.nm * 1e-6
    }

    /// Vacuum wavenumber k0 = 2π/λ in radians per millimetre.
    pub fn k0_per_mm(self) -> f64 {
        TAU / self.mm()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn conversions() {
        let w = Wavelength::from_nm(632.8).unwrap();
        assert!((w.um() - 0.6328).abs() < 1e-15);
        assert!((w.k0_per_mm() - TAU / 632.8e-6).abs() < 1e-9);
        assert_eq!(Wavelength::from_nm(0.0).unwrap_err().field, "wavelength_nm");
        assert!(Wavelength::from_nm(f64::NAN).is_err());
    }
}
