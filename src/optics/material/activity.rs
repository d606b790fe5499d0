//! Natural optical activity of a catalogue crystal: crystalline quartz's rotatory power along its
//! optic axis against wavelength, and its gyration tensor in the form the general crystal takes.
//!
//! Physics. Light travelling along the optic axis of an optically active uniaxial crystal splits
//! into two circular waves whose indices differ by Δn = n_L − n_R; a linear polarization turns by
//! ρ = π Δn / λ per unit length (the rotatory power). In the gyration form of the constitutive law
//! the rotation along the axis is set by the axial gyration component: Δn = g33 (dimensionless),
//! so
//!
//! ```text
//! g33 = ρ λ / π        (ρ in rad/mm, λ in mm; g33 dimensionless),
//! ```
//!
//! and with [`crate::optics::anisotropic::Anisotropic::chirality_from_gyration`],
//! κ = ½(tr g) I − g gives κ₁ = κ₂ = g33/2 for g = diag(g11, g11, g33), whose rotatory power
//! along the axis k₀ (κ₁ + κ₂)/2 = (2π/λ)(g33/2) = ρ again (tested below).
//!
//! Dispersion: a one-oscillator Drude-type formula, ρ(λ) = k λ² / (λ² − λ₀²)², with k =
//! 7.186 °·µm²/mm and λ₀ = 0.0926 µm, attributed to S. Chandrasekhar, "Optical rotatory
//! dispersion of crystals", Proc. R. Soc. Lond. A 259, 531-553 (1961), who fitted it to the
//! measurements of T. M. Lowry and W. R. C. Coode-Adams, Phil. Trans. R. Soc. Lond. A 226, 391-466
//! (1927). Form and constants are from memory; they reproduce the handbook values 21.72 °/mm at
//! 589.3 nm and 48.95 °/mm at 404.7 nm to 0.2 % (tests below). Range: the span of those
//! measurements as we recall it, 0.23-1.5 µm (from memory); outside it the formula is evaluated
//! with a warning.
//!
//! Temperature: ρ(λ, T) = ρ(λ) (1 + c (T − 20 °C)), and g with it. A quartz plate's rotation grows
//! by a_t = a_0 (1 + 0.000146 t) (t in °C, 0-100 °C, in angular measure: H. W. Wiley, Principles
//! and Practice of Agricultural Analysis, vol. 3, the saccharimeter's quartz control plates, §79;
//! the edition's year not checked), that is by 1.4557e-4 /K about 20 °C; the plate's own growth
//! along the axis, α∥ = 7.1e-6 /K ([`super::thermal`]), leaves c = 1.38475e-4 /K to the rotatory
//! power. The rate is taken as the same at every wavelength (the control plates are read in
//! sodium or mercury-green light). The value used in sugar analysis today, 1.44e-4 /K for the
//! plate (ICUMSA, common practice, from memory), is 1 % lower.
//!
//! Perpendicular to the axis: quartz's g11 has the opposite sign to g33 and about half its size
//! in published measurements, but we could not confirm a value with its source, so the catalogue
//! takes g11 = 0 and says so ([`OpticalActivity::gyration_ratio`]): the modes then become linear
//! away from the axis a little faster than in the real crystal.
//!
//! Conventions (`../shared/CONVENTIONS.md`, "More media"): ρ > 0 for a right-handed crystal, whose
//! plane of polarization turns clockwise as seen by an observer looking toward the source; a
//! left-handed crystal has −ρ and −g. The wavelength is the vacuum wavelength.

use super::dispersion::POLE_GUARD;
use crate::error::Error;
use crate::optics::wavelength::Wavelength;

/// A crystal's optical activity: a rotatory-dispersion formula along the optic axis and the ratio
/// of its gyration components.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OpticalActivity {
    /// The catalogue key of the crystal, e.g. `quartz`.
    pub key: &'static str,
    /// Strength k of ρ = k λ²/(λ² − λ₀²)², °·µm²/mm.
    pub k_deg_um2_per_mm: f64,
    /// The resonance wavelength λ₀ of that formula, µm.
    pub lambda0_um: f64,
    /// Validity range of the formula, vacuum wavelength in nanometres, `(low, high)`.
    pub range_nm: (f64, f64),
    /// g11 / g33, the gyration perpendicular to the axis over that along it (0: see the module
    /// header).
    pub gyration_ratio: f64,
    /// The source of the formula and of the ratio.
    pub citation: &'static str,
    /// A plate's measured rate of rotation with temperature, a_t = a_0 (1 + r t) with t in °C
    /// from 0 °C, 1/K (see the module header): its own growth along the axis included.
    pub plate_rate_from_0c: f64,
    /// The source of `plate_rate_from_0c`.
    pub temperature_source: &'static str,
}

/// A crystal's optical activity at one wavelength, for a right-handed crystal.
#[derive(Debug, Clone, PartialEq)]
pub struct Activity {
    /// Rotatory power along the optic axis, rad/mm, positive (right-handed crystal).
    pub rotatory_power_rad_per_mm: f64,
    /// The principal gyration [g11, g11, g33] (dimensionless, g33 = ρ λ/π), in the principal frame
    /// of the uniaxial crystal (optic axis third), for
    /// [`crate::optics::anisotropic::Anisotropic::chirality_from_gyration`].
    pub gyration: [f64; 3],
    /// Sentences naming the crystal, the wavelength and the problem; empty inside the range.
    pub warnings: Vec<String>,
}

impl OpticalActivity {
    /// The rotatory power and gyration at `wavelength`, for a right-handed crystal (negate both for
    /// a left-handed one).
    ///
    /// # Formula
    /// ρ = k λ²/(λ² − λ₀²)² (°/mm, λ in µm), converted to rad/mm; g33 = ρ λ/π, g11 = r g33 with
    /// r = [`OpticalActivity::gyration_ratio`].
    ///
    /// # Errors
    /// Field `wavelength_nm` at, or within a relative 10⁻⁶ of, the formula's resonance λ₀, where it
    /// gives no rotatory power.
    pub fn at(&self, wavelength: Wavelength) -> Result<Activity, Error> {
        let (um, nm) = (wavelength.um(), wavelength.nm());
        let (u, u0) = (um * um, self.lambda0_um * self.lambda0_um);
        // k u/(u − u0)² written as k/(u (1 − u0/u)²): its limit 0 at u = ∞ is exact.
        let x = u0 / u;
        let deg = self.k_deg_um2_per_mm / (u * (1.0 - x) * (1.0 - x));
        let (lo, hi) = self.range_nm;
        if (1.0 - x).abs() <= POLE_GUARD || !deg.is_finite() {
            return Err(Error::new(
                "wavelength_nm",
                format!(
                    "the rotatory-dispersion formula of {} gives no rotatory power at {nm} nm: \
                     {}; its range is {lo}-{hi} nm",
                    self.key,
                    if deg.is_finite() {
                        "it is at the formula's resonance"
                    } else {
                        "it is not finite"
                    }
                ),
            ));
        }
        let rho = deg.to_radians();
        let g33 = rho * (um * 1e-3) / std::f64::consts::PI;
        let g11 = self.gyration_ratio * g33;
        let mut warnings = Vec::new();
        if !(lo..=hi).contains(&nm) {
            warnings.push(format!(
                "{nm} nm is outside the {lo}-{hi} nm range of the rotatory-dispersion formula of \
                 {}; its rotatory power is extrapolated",
                self.key
            ));
        }
        Ok(Activity {
            rotatory_power_rad_per_mm: rho,
            gyration: [g11, g11, g33],
            warnings,
        })
    }
}

impl OpticalActivity {
    /// c = (1/ρ) dρ/dT about 20 °C, 1/K: the plate's rate about 20 °C, r/(1 + 20 r), less the
    /// crystal's expansion along its optic axis (the temperature data of `thermal.rs`; every active crystal has
    /// temperature data, tested).
    pub fn relative_per_k(&self) -> f64 {
        let r = self.plate_rate_from_0c;
        let along_axis = super::thermal(self.key).map_or(0.0, |t| t.expansion[2]);
        r / (1.0 + r * super::REFERENCE_C) - along_axis
    }

    /// As [`OpticalActivity::at`] at `t_c` °C: ρ and g scaled by 1 + c (T − 20 °C), identical to
    /// it at 20 °C.
    ///
    /// # Errors
    /// As [`OpticalActivity::at`].
    pub fn at_temperature(&self, wavelength: Wavelength, t_c: f64) -> Result<Activity, Error> {
        let mut a = self.at(wavelength)?;
        let f = 1.0 + self.relative_per_k() * (t_c - super::REFERENCE_C);
        a.rotatory_power_rad_per_mm *= f;
        a.gyration = a.gyration.map(|g| g * f);
        Ok(a)
    }
}

/// The optical activity of the catalogued crystal `key` (any ASCII case), if it is optically
/// active: `quartz` only.
pub fn optical_activity(key: &str) -> Option<&'static OpticalActivity> {
    ACTIVE.iter().find(|a| a.key.eq_ignore_ascii_case(key))
}

static ACTIVE: [OpticalActivity; 1] = [OpticalActivity {
    key: "quartz",
    // S. Chandrasekhar, Proc. R. Soc. Lond. A 259, 531-553 (1961), from memory.
    k_deg_um2_per_mm: 7.186,
    lambda0_um: 0.0926,
    range_nm: (230.0, 1500.0),
    gyration_ratio: 0.0,
    citation: "S. Chandrasekhar, \"Optical rotatory dispersion of crystals\", Proceedings of the \
               Royal Society of London A 259, 531-553 (1961): rho = k lambda^2/(lambda^2 - \
               lambda0^2)^2, k = 7.186 deg um^2/mm, lambda0 = 0.0926 um, fitted to Lowry and \
               Coode-Adams (1927); room temperature; constants from memory. g11 = 0 (not \
               measured here: taken as zero and stated)",
    // Wiley's 0.000146 /K from 0 °C: 1.4557e-4 /K about 20 °C for the plate, of which its own
    // length takes α∥ = 7.1e-6 /K (`OpticalActivity::relative_per_k`).
    plate_rate_from_0c: 0.000146,
    temperature_source: "a quartz plate's rotation a_t = a_0 (1 + 0.000146 t), 0-100 °C: H. W. Wiley, \
                         Principles and Practice of Agricultural Analysis, vol. 3 (quartz control plates), less \
                         the plate's expansion along its axis, 7.1e-6 /K: (1/rho) drho/dT = 1.38475e-4 /K, taken \
                         as the same at every wavelength",
}];

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_rotatory_power_s_rate_is_the_plate_s_less_its_growth() {
        // Every active crystal has temperature data, so its expansion along the axis is known.
        let a = optical_activity("quartz").expect("quartz is active");
        let alpha = super::super::thermal("quartz")
            .expect("quartz has temperature data")
            .expansion[2];
        crate::precision::assert_within(
            a.relative_per_k() + alpha,
            0.000146 / 1.00292,
            1e-18,
            "plate rate at 20 °C",
        );
    }
    use crate::optics::anisotropic::Anisotropic;

    fn quartz(nm: f64) -> Activity {
        optical_activity("Quartz")
            .expect("quartz is active")
            .at(Wavelength::from_nm(nm).expect("positive"))
            .expect("defined")
    }

    #[test]
    fn rotatory_power_agrees_with_handbook_values() {
        // (nm, °/mm, source). Tolerance 0.5 %: the one-oscillator formula is a fit, which misses
        // the measured values by 0.1-0.2 % here.
        let table = [
            (
                589.3,
                21.72,
                "quartz along its axis at the sodium D line, 21.72 °/mm: the handbook value, common practice (from memory)",
            ),
            (
                404.7,
                48.95,
                "quartz at the mercury violet line, 48.95 °/mm: Lowry & Coode-Adams, Phil. Trans. A 226, 391 (1927), as reprinted in handbooks (from memory)",
            ),
            (
                546.1,
                25.54,
                "quartz at the mercury green line, 25.54 °/mm: Lowry & Coode-Adams (1927), as reprinted in handbooks (from memory)",
            ),
        ];
        for (nm, want_deg, source) in table {
            let a = quartz(nm);
            assert!(a.warnings.is_empty(), "{:?}", a.warnings);
            let got = a.rotatory_power_rad_per_mm.to_degrees();
            assert!((got - want_deg).abs() <= 5e-3 * want_deg, "{source}: got {got} °/mm");
        }
    }

    #[test]
    fn gyration_maps_back_to_the_rotatory_power() {
        // g33 = ρλ/π; through κ = ½(tr g)I − g, k₀κ₁ is ρ again (module header).
        for nm in [300.0, 589.3, 1064.0] {
            let a = quartz(nm);
            let [g11, g22, g33] = a.gyration;
            assert_eq!((g11, g22), (0.0, 0.0));
            let lambda_mm = nm * 1e-6;
            let kappa = Anisotropic::chirality_from_gyration(a.gyration);
            let k0 = 2.0 * std::f64::consts::PI / lambda_mm;
            let rho = k0 * 0.5 * (kappa[0] + kappa[1]);
            let want = a.rotatory_power_rad_per_mm;
            assert!((rho - want).abs() <= 1e-12 * want, "{nm} nm: {rho} against {want}");
            assert!((g33 - want * lambda_mm / std::f64::consts::PI).abs() <= 1e-18);
        }
        // The circular birefringence at 589.3 nm, n_L − n_R = g33 ≈ 7.1e-5 (a textbook exercise's
        // answer, 0.71e-4, common practice).
        let g33 = quartz(589.3).gyration[2];
        assert!((g33 - 7.1e-5).abs() < 0.05e-5, "g33 = {g33}");
    }

    #[test]
    fn out_of_range_warns_and_the_resonance_is_refused() {
        assert!(!quartz(2000.0).warnings.is_empty());
        assert!(quartz(1e300).rotatory_power_rad_per_mm >= 0.0);
        let q = optical_activity("quartz").expect("active");
        let err = q
            .at(Wavelength::from_nm(92.6).expect("positive"))
            .expect_err("resonance");
        assert_eq!(err.field, "wavelength_nm");
        for nm in [1e-300, 1e-9, 50.0, f64::MAX] {
            if let Ok(a) = q.at(Wavelength::from_nm(nm).expect("positive")) {
                assert!(
                    a.rotatory_power_rad_per_mm.is_finite() && !a.warnings.is_empty(),
                    "{nm}"
                );
            }
        }
        assert!(optical_activity("calcite").is_none());
    }
}
