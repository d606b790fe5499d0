//! Standard air: its refractive index against wavelength, and the conversion of a wavelength
//! measured in air to the vacuum wavelength the physics uses.
//!
//! Physics. A wavelength "in air" is the vacuum wavelength divided by the index of the air it was
//! measured in, λ_air = λ_vac / n_air(λ_vac); spectral tables and many laser data sheets quote
//! air wavelengths (the helium-neon line is 632.8 nm in air, 633.0 nm in vacuum). The index of air
//! is n − 1 ≈ 2.8·10⁻⁴ in the visible, so the two differ by about 0.17 nm there.
//!
//! Formula: the dispersion of standard air (dry, 15 °C, 101 325 Pa, 450 ppm CO₂) of P. E. Ciddor,
//! "Refractive index of air: new equations for the visible and near infrared", Applied Optics 35,
//! 1566-1573 (1996), equation (1):
//!
//! ```text
//! n − 1 = 0.05792105 / (238.0185 − σ²) + 0.00167917 / (57.362 − σ²),   σ = 1/λ_vac in µm⁻¹,
//! ```
//!
//! coefficients from memory. Range: 230-1690 nm (from memory: the near-infrared end is that of the
//! measurements Ciddor fitted; the ultraviolet end is where the formula is commonly quoted as
//! valid). Outside it the formula is evaluated with a warning; at and below λ = 1/√57.362 µm
//! (132 nm), its resonance, it gives no index. Laboratory air at other temperatures, pressures and
//! humidities differs from standard air by up to a few 10⁻⁵ in n, which this conversion does not
//! model.
//!
//! Conventions: the vacuum wavelength is a [`Wavelength`]; an air wavelength is a plain number of
//! nanometres (it is not a vacuum wavelength, so it is not given that type).

use crate::error::{Error, positive};
use crate::optics::wavelength::Wavelength;

/// Validity range of the standard-air formula, vacuum wavelength in nanometres.
pub const STANDARD_AIR_RANGE_NM: (f64, f64) = (230.0, 1690.0);

/// Ciddor's standard-air terms `(b, c)` of b/(c − σ²), c in µm⁻².
const CIDDOR: [(f64, f64); 2] = [(0.05792105, 238.0185), (0.00167917, 57.362)];

/// A wavelength given in air, converted to vacuum.
#[derive(Debug, Clone, PartialEq)]
pub struct AirConversion {
    /// The vacuum wavelength.
    pub vacuum: Wavelength,
    /// The index of standard air at it.
    pub air_index: f64,
    /// Sentences naming the wavelength and the problem; empty inside the formula's range.
    pub warnings: Vec<String>,
}

/// The refractive index of standard air at the vacuum wavelength `vacuum` (Ciddor 1996, see the
/// module header), or `None` at or below 132 nm, where the formula has its resonance.
pub fn standard_air_index(vacuum: Wavelength) -> Option<f64> {
    let sigma2 = 1.0 / (vacuum.um() * vacuum.um());
    let mut n = 1.0;
    for (b, c) in CIDDOR {
        // Past the resonance (σ² ≥ c) the formula gives nothing physical.
        if sigma2 >= c {
            return None;
        }
        n += b / (c - sigma2);
    }
    n.is_finite().then_some(n)
}

/// The vacuum wavelength of light whose wavelength in standard air is `air_nm` nanometres.
///
/// # Formula
/// λ_vac = n_air(λ_vac) λ_air, solved by fixed-point iteration from λ_vac = λ_air. Each step
/// multiplies the error by λ dn/dλ (below 10⁻⁴ in the range), so six steps reach rounding.
///
/// # Errors
/// Field `wavelength_nm` when `air_nm` is not finite and positive, or when the wavelength lies at
/// or below the formula's resonance (about 132 nm).
pub fn vacuum_from_air(air_nm: f64) -> Result<AirConversion, Error> {
    let air_nm = positive("wavelength_nm", air_nm)?;
    let refused = || {
        Error::new(
            "wavelength_nm",
            format!(
                "{air_nm} nm in air: the standard-air formula (Ciddor 1996) gives no index there \
                 (its resonance is at 132 nm); its range is {}-{} nm",
                STANDARD_AIR_RANGE_NM.0, STANDARD_AIR_RANGE_NM.1
            ),
        )
    };
    let mut vacuum = Wavelength::from_nm(air_nm)?;
    let mut air_index = 1.0;
    for _ in 0..6 {
        air_index = standard_air_index(vacuum).ok_or_else(refused)?;
        vacuum = Wavelength::from_nm(air_nm * air_index).map_err(|_| refused())?;
    }
    let (lo, hi) = STANDARD_AIR_RANGE_NM;
    let nm = vacuum.nm();
    let mut warnings = Vec::new();
    if !(lo..=hi).contains(&nm) {
        warnings.push(format!(
            "{air_nm} nm in air ({nm} nm in vacuum) is outside the {lo}-{hi} nm range of the \
             standard-air formula; the conversion is extrapolated"
        ));
    }
    Ok(AirConversion {
        vacuum,
        air_index,
        warnings,
    })
}

/// The wavelength in standard air, nanometres, of light of vacuum wavelength `vacuum`; `None`
/// where [`standard_air_index`] gives no index.
pub fn air_from_vacuum(vacuum: Wavelength) -> Option<f64> {
    standard_air_index(vacuum).map(|n| vacuum.nm() / n)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn air_wavelengths_convert_to_the_published_vacuum_wavelengths() {
        // (air nm, vacuum nm, source). Both printed to 4 decimals (3 for He-Ne); tolerance one
        // unit in the last printed place: the tables convert with a formula of their own (for
        // standard air too), which differs from Ciddor's by about 1e-8 in n (6e-6 nm here).
        let table = [
            (
                588.9950,
                589.1583,
                1e-4,
                "sodium D2 line, air and vacuum wavelengths as listed in NIST's atomic spectra database (from memory)",
            ),
            (
                589.5924,
                589.7558,
                1e-4,
                "sodium D1 line, NIST's atomic spectra database (from memory)",
            ),
            (
                632.816,
                632.991,
                1e-3,
                "helium-neon laser line, 632.816 nm in air and 632.991 nm in vacuum, common practice (from memory)",
            ),
        ];
        for (air, vac, tol, source) in table {
            let c = vacuum_from_air(air).expect("in range");
            assert!(c.warnings.is_empty(), "{:?}", c.warnings);
            let got = c.vacuum.nm();
            assert!((got - vac).abs() <= tol, "{source}: expected {vac}, got {got:.5} nm");
            // And back.
            let back = air_from_vacuum(c.vacuum).expect("defined");
            assert!((back - air).abs() <= 1e-9, "{air} nm back to {back}");
        }
    }

    #[test]
    fn the_index_of_standard_air_is_its_textbook_size() {
        // n − 1 of standard air in the visible, 2.77e-4 to 2.79e-4 between 500 and 650 nm (common
        // practice); the formula's own value at 589.3 nm, written out by hand.
        let n = standard_air_index(Wavelength::from_nm(589.3).expect("positive")).expect("defined");
        let s2 = 1.0 / (0.5893_f64 * 0.5893);
        let want = 1.0 + 0.05792105 / (238.0185 - s2) + 0.00167917 / (57.362 - s2);
        assert!((n - want).abs() <= 1e-16, "{n} against {want}");
        assert!((2.76e-4..2.79e-4).contains(&(n - 1.0)), "n - 1 = {}", n - 1.0);
    }

    #[test]
    fn out_of_range_warns_and_bad_wavelengths_are_refused() {
        assert!(!vacuum_from_air(2000.0).expect("computable").warnings.is_empty());
        assert!(!vacuum_from_air(200.0).expect("computable").warnings.is_empty());
        for bad in [f64::NAN, f64::INFINITY, 0.0, -589.0, 132.0, 100.0, 1e-300] {
            let err = vacuum_from_air(bad).expect_err("refused");
            assert_eq!(err.field, "wavelength_nm", "{bad}");
        }
        // Long wavelengths tend to n = 1 without failing.
        let far = vacuum_from_air(1e300).expect("computable");
        assert!(far.air_index >= 1.0 && far.vacuum.nm().is_finite());
        assert_eq!(air_from_vacuum(Wavelength::from_nm(100.0).expect("positive")), None);
    }
}
