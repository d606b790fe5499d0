//! The catalogued biaxial crystals and their principal refractive indices n_x(λ), n_y(λ), n_z(λ),
//! with their group indices.
//!
//! A biaxial crystal has three different principal indices on three orthogonal dielectric axes.
//! For every entry here x, y, z are the dielectric axes of the cited formula, named so that
//! n_x < n_y < n_z over the whole validity range (`../shared/CONVENTIONS.md`, "More media"; checked
//! by the tests); how those axes sit on the crystallographic axes a, b, c is stated beside each
//! entry, since it differs from crystal to crystal. The two optic axes lie in the x–z plane.
//!
//! Conventions: as for the uniaxial catalogue, the wavelength handed to each formula is the vacuum
//! wavelength in micrometres, the formula is used as published (fitted to indices measured in
//! air at the stated temperature; no air-to-vacuum correction) and a formula outside its range is
//! evaluated with a warning. An evaluation whose indices come out of order (possible only well
//! outside the range) says so in a warning.
//!
//! Sources: each entry cites its paper beside the coefficients and in
//! [`BiaxialMaterial::citation`]. The coefficients were taken from the transcriptions in the
//! open-source dispersion library ndispers (version 0.20.0, Python); for KTP and LBO they agree
//! with the papers' coefficients as we recall them (from memory); for BiBO the paper was not seen.
//! The tests compare each crystal with index values printed in handbooks and crystal data sheets,
//! named beside each value; tests/reference/ compares every index and group index with that
//! library's own evaluation of the same formulas.

use super::dispersion::{Dispersion, Quantity};
use super::principal_values;
use super::source::FittedIn;
use crate::error::Error;
use crate::optics::wavelength::Wavelength;

/// A catalogued biaxial crystal.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BiaxialMaterial {
    /// Contract key, e.g. `ktp` (see `biaxial_keys`).
    pub key: &'static str,
    /// Human-readable name with formula, e.g. `potassium titanyl phosphate (KTiOPO4)`.
    pub name: &'static str,
    /// Validity range of the formulas, vacuum wavelength in nanometres, `(low, high)`.
    pub range_nm: (f64, f64),
    /// Formulas for n_x, n_y, n_z, in that order (n_x < n_y < n_z).
    pub formulas: [Dispersion; 3],
    /// The temperature the formulas hold at, °C; `None` where the source says only "room
    /// temperature".
    pub temperature_c: Option<f64>,
    /// Authors, title, journal, volume, pages and year of the formula; the axes and temperature.
    pub citation: &'static str,
    /// The source's key, first author and year (e.g. `kato-2002`); one crystal may have several
    /// sources (see `biaxial_sources`), the catalogue entry being its default.
    pub source: &'static str,
    /// The wavelength the formula was fitted in, as far as its source says.
    pub fitted_in: FittedIn,
}

/// The three principal values of a biaxial crystal at one wavelength, and warnings a person should
/// see (wavelength outside the formula's range, indices out of the catalogued order).
#[derive(Debug, Clone, PartialEq)]
pub struct Principal {
    /// n_x, n_y, n_z (or the three group indices), in that order.
    pub principal: [f64; 3],
    /// Sentences naming the material, the wavelength and the problem; empty inside the range.
    pub warnings: Vec<String>,
}

/// The axis names in messages.
const AXES: [&str; 3] = ["n_x", "n_y", "n_z"];

impl BiaxialMaterial {
    /// The principal indices n_x, n_y, n_z at `wavelength`.
    ///
    /// Outside [`BiaxialMaterial::range_nm`] the formulas are extrapolated: the result is `Ok` and
    /// carries a warning naming the material, the wavelength and the range (and a second one
    /// should the extrapolated indices not keep n_x < n_y < n_z).
    ///
    /// # Errors
    /// Field `wavelength_nm` where a formula breaks down (n² ≤ 0, n < 1, or at or next to one of
    /// its resonances), with a message naming the material, the axis and the wavelength.
    pub fn principal(&self, wavelength: Wavelength) -> Result<Principal, Error> {
        let mut p = self.evaluate(Quantity::Phase, wavelength)?;
        let [x, y, z] = p.principal;
        if !(x < y && y < z) {
            p.warnings.push(format!(
                "at {} nm the extrapolated {} formulas give n_x = {x:.6}, n_y = {y:.6}, n_z = \
                 {z:.6}, out of the catalogued order n_x < n_y < n_z",
                wavelength.nm(),
                self.name
            ));
        }
        Ok(p)
    }

    /// The principal group indices n_g = n − λ dn/dλ for light polarized along x, y and z, from
    /// the analytic derivative of each formula (`Dispersion::group_index`).
    ///
    /// The warnings are those of [`BiaxialMaterial::principal`] except the order check (group
    /// indices need not keep the order of the indices).
    ///
    /// # Errors
    /// As [`BiaxialMaterial::principal`]; also where the derivative is not finite (only at
    /// wavelengths so extreme that λ² overflows).
    pub fn group_principal(&self, wavelength: Wavelength) -> Result<Principal, Error> {
        self.evaluate(Quantity::Group, wavelength)
    }

    fn evaluate(&self, q: Quantity, wavelength: Wavelength) -> Result<Principal, Error> {
        let [fx, fy, fz] = &self.formulas;
        let formulas = [(AXES[0], fx), (AXES[1], fy), (AXES[2], fz)];
        let (principal, warnings) = principal_values(self.name, self.range_nm, formulas, q, wavelength)?;
        Ok(Principal { principal, warnings })
    }
}

/// A biaxial crystal as the command line's `materials` listing shows it: `{key, name, kind,
/// range_nm, temperature_c, citation, verified, warnings, temperature}`, `kind` always `biaxial`,
/// `temperature` the temperature data as `Thermal::describe` gives them,
/// `temperature_c` null where the source says only "room temperature", `verified` true (every
/// entry has a journal source) and `warnings` empty.
pub fn describe_biaxial(m: &BiaxialMaterial) -> serde_json::Value {
    let mut d = super::described(m.key, m.name, "biaxial", m.range_nm, m.citation, true);
    d["temperature_c"] = m.temperature_c.into();
    d
}

/// Every catalogued biaxial crystal, in a fixed order.
pub fn biaxial_catalogue() -> &'static [BiaxialMaterial] {
    &BIAXIAL
}

/// The biaxial crystal with contract key `key` (compared without regard to ASCII case, so `"KTP"`
/// finds `ktp`), if catalogued.
pub fn find_biaxial(key: &str) -> Option<&'static BiaxialMaterial> {
    BIAXIAL.iter().find(|m| m.key.eq_ignore_ascii_case(key))
}

/// The biaxial catalogue's contract keys, in catalogue order.
pub fn biaxial_keys() -> Vec<&'static str> {
    BIAXIAL.iter().map(|m| m.key).collect()
}

/// Every published source of the crystal `key` (compared without regard to ASCII case), its
/// catalogue entry (the default) first; empty when `key` is not a biaxial catalogue crystal.
pub fn biaxial_sources(key: &str) -> Vec<&'static BiaxialMaterial> {
    let Some(default) = find_biaxial(key) else {
        return Vec::new();
    };
    let mut all = vec![default];
    all.extend(BIAXIAL_ALTERNATIVES.iter().filter(|m| m.key == default.key));
    all
}

/// Sources other than the catalogue's default: same key, name and axes as their crystal's entry.
static BIAXIAL_ALTERNATIVES: [BiaxialMaterial; 1] = [
    // G. Ghosh, J. Appl. Phys. 78, 6752-6760 (1995), LBO at 20 °C (room-temperature part of his
    // temperature-dependent formula; its thermo-optic part is not used, the crystal's temperature
    // data being Kato's). n² = A + B/(1 − C/λ²) + D/(1 − E/λ²) = A + B λ²/(λ² − C) + D λ²/(λ² − E),
    // C, E in µm²; coefficients as transcribed by ndispers 0.20.0. Same axes as Kato's (x ∥ a,
    // y ∥ c, z ∥ b): the two agree to 1.6e-4 from 0.2 to 1.1 µm (computed here). No fit range
    // published; LBO's transparency range used.
    BiaxialMaterial {
        key: "lbo",
        name: "lithium triborate (LiB3O5)",
        range_nm: (160.0, 2600.0),
        formulas: [
            Dispersion::Sellmeier {
                a: 1.4426279,
                terms: &[(1.0109932, 1.1210197e-2), (1.2363218, 91.0)],
            },
            Dispersion::Sellmeier {
                a: 1.5014015,
                terms: &[(1.0388217, 1.2157100e-2), (1.7567133, 91.0)],
            },
            Dispersion::Sellmeier {
                a: 1.4489240,
                terms: &[(1.1365228, 1.1676746e-2), (1.5830069, 91.0)],
            },
        ],
        temperature_c: Some(20.0),
        citation: "G. Ghosh, \"Temperature dispersion of refractive indices in beta-BaB2O4 and \
                   LiB3O5 crystals for nonlinear optical devices\", Journal of Applied Physics 78, \
                   6752-6760 (1995); x, y, z along a, c, b; 20 °C",
        source: "ghosh-1995",
        // Not stated: the paper was not seen.
        fitted_in: FittedIn::NotStated,
    },
];

static BIAXIAL: [BiaxialMaterial; 3] = [
    // K. Kato, E. Takaoka, Appl. Opt. 41, 5040-5044 (2002), flux-grown KTP, 20 °C (their
    // thermo-optic correction vanishes at 20 °C). n² = A + B/(λ² − C) + D/(λ² − E), B..E in µm².
    // Dielectric axes x ∥ a, y ∥ b, z ∥ c. Range 0.43-3.54 µm (from memory; the transparency
    // range is 0.35-4.5 µm).
    BiaxialMaterial {
        key: "ktp",
        name: "potassium titanyl phosphate (KTiOPO4)",
        range_nm: (430.0, 3540.0),
        formulas: [
            Dispersion::Poles {
                a: 3.29100,
                poles: &[(0.04140, 0.03978), (9.35522, 31.45571)],
                powers: &[],
            },
            Dispersion::Poles {
                a: 3.45018,
                poles: &[(0.04341, 0.04597), (16.98825, 39.43799)],
                powers: &[],
            },
            Dispersion::Poles {
                a: 4.59423,
                poles: &[(0.06206, 0.04763), (110.80672, 86.12171)],
                powers: &[],
            },
        ],
        temperature_c: Some(20.0),
        citation: "K. Kato and E. Takaoka, \"Sellmeier and thermo-optic dispersion formulas for \
                   KTP\", Applied Optics 41, 5040-5044 (2002); x, y, z along a, b, c; 20 °C",
        source: "kato-2002",
        // Not stated: only the title and abstract were seen (a fit to phase-matching data), which
        // do not say.
        fitted_in: FittedIn::NotStated,
    },
    // K. Kato, IEEE J. Quantum Electron. 30, 2950-2952 (1994), 20 °C.
    // n² = A + B/(λ² − C) − D λ² + E λ⁴ − F λ⁶ (E = F = 0 for x). Dielectric axes x ∥ a, y ∥ c,
    // z ∥ b. The paper gives no fit range (the fit is to phase-matching data); the range used is
    // LBO's transparency range 0.16-2.6 µm.
    BiaxialMaterial {
        key: "lbo",
        name: "lithium triborate (LiB3O5)",
        range_nm: (160.0, 2600.0),
        formulas: [
            Dispersion::Poles {
                a: 2.4542,
                poles: &[(0.01125, 0.01135)],
                powers: &[-0.01388],
            },
            Dispersion::Poles {
                a: 2.5390,
                poles: &[(0.01277, 0.01189)],
                powers: &[-0.01849, 4.3025e-5, -2.9131e-5],
            },
            Dispersion::Poles {
                a: 2.5865,
                poles: &[(0.01310, 0.01223)],
                powers: &[-0.01862, 4.5778e-5, -3.2526e-5],
            },
        ],
        temperature_c: Some(20.0),
        citation: "K. Kato, \"Temperature-tuned 90° phase-matching properties of LiB3O5\", IEEE \
                   Journal of Quantum Electronics 30, 2950-2952 (1994); x, y, z along a, c, b; \
                   20 °C; no fit range published, transparency range used",
        source: "kato-1994",
        // Not stated: only the title and abstract were seen (a fit to phase-matching data), which
        // do not say.
        fitted_in: FittedIn::NotStated,
    },
    // K. Miyata, N. Umemura, K. Kato, Opt. Lett. 34, 500-502 (2009), as tabulated in V. Petrov
    // et al., Laser Photonics Rev. 4, 53-98 (2010), Table 2; room temperature.
    // n² = A + B/(λ² − C) − D λ²; valid 0.326-3.083 µm. Monoclinic: y ∥ b (the two-fold axis);
    // x and z lie in the a–c plane, their directions changing slightly with wavelength.
    BiaxialMaterial {
        key: "bibo",
        name: "bismuth triborate (BiB3O6)",
        range_nm: (326.0, 3083.0),
        formulas: [
            Dispersion::PoleAndIr {
                a: 3.0759,
                b: 0.03169,
                c: 0.03323,
                d: 0.01402,
            },
            Dispersion::PoleAndIr {
                a: 3.1698,
                b: 0.03666,
                c: 0.03599,
                d: 0.01819,
            },
            Dispersion::PoleAndIr {
                a: 3.6546,
                b: 0.05116,
                c: 0.03713,
                d: 0.02299,
            },
        ],
        temperature_c: None,
        citation: "K. Miyata, N. Umemura and K. Kato, \"Phase-matched pure χ(3) third-harmonic \
                   generation in noncentrosymmetric BiB3O6\", Optics Letters 34, 500-502 (2009), \
                   as tabulated by V. Petrov et al., Laser & Photonics Reviews 4, 53-98 (2010); \
                   y along the two-fold axis b; room temperature",
        source: "miyata-2009",
        // Not stated: only the title and abstract were seen (a fit to phase-matching data), which
        // do not say.
        fitted_in: FittedIn::NotStated,
    },
];

#[cfg(test)]
mod tests {
    use super::*;

    #[track_caller]
    fn assert_index(actual: f64, expected: f64, tol: f64, what: &str) {
        let diff = (actual - expected).abs();
        assert!(
            actual.is_finite() && diff <= tol,
            "{what}: expected {expected}, got {actual:.7} (difference {diff:.2e}, allowed {tol:.1e})"
        );
    }

    fn at(key: &str, nm: f64) -> Principal {
        let m = find_biaxial(key).unwrap_or_else(|| panic!("{key} is catalogued"));
        m.principal(Wavelength::from_nm(nm).expect("positive"))
            .unwrap_or_else(|e| panic!("{key} at {nm} nm: {e}"))
    }

    const KTP_TRADE: &str = "KTP at 1064 nm: the values printed in crystal suppliers' data \
        sheets and handbooks, common practice (from memory)";
    const LBO_TRADE: &str = "LBO: the values printed in crystal suppliers' data sheets, common \
        practice (from memory)";
    const LIBRARY: &str = "the same formula evaluated by the ndispers library 0.20.0 (Python), \
        an independent implementation (tests/reference/ checks many more wavelengths)";

    /// (key, vacuum wavelength nm, [n_x, n_y, n_z], tolerance, source).
    const PUBLISHED: &[(&str, f64, [f64; 3], f64, &str)] = &[
        // Four-decimal data-sheet values, which come from other formulas than Kato & Takaoka's:
        // they differ by up to 2.3e-4 (n_x); tolerance 3e-4, the observed disagreement.
        ("ktp", 1064.0, [1.7377, 1.7453, 1.8297], 3e-4, KTP_TRADE),
        // LBO data-sheet values differ from Kato's 1994 formula by up to 4.1e-4 at 532 nm and
        // 8.2e-4 at 1064 nm (n_x); tolerance 1e-3, which guards against gross errors only.
        ("lbo", 532.0, [1.5785, 1.6065, 1.6212], 1e-3, LBO_TRADE),
        ("lbo", 1064.0, [1.5656, 1.5905, 1.6055], 1e-3, LBO_TRADE),
        // An independent evaluation of each formula, printed to 6 decimals: half a unit.
        ("ktp", 532.0, [1.777945, 1.788695, 1.888651], 0.5e-6, LIBRARY),
        ("lbo", 800.0, [1.569462, 1.596091, 1.611043], 0.5e-6, LIBRARY),
        ("bibo", 532.0, [1.788518, 1.820179, 1.963708], 0.5e-6, LIBRARY),
        ("bibo", 1064.0, [1.757517, 1.783999, 1.917106], 0.5e-6, LIBRARY),
    ];

    #[test]
    fn formulas_agree_with_published_values() {
        for &(key, nm, want, tol, source) in PUBLISHED {
            let p = at(key, nm);
            assert!(p.warnings.is_empty(), "{key} at {nm} nm: {:?}", p.warnings);
            for (i, axis) in AXES.iter().enumerate() {
                assert_index(p.principal[i], want[i], tol, &format!("{axis}, {source}"));
            }
        }
    }

    #[test]
    fn group_indices_agree_with_an_independent_evaluation() {
        // (key, nm, [n_g,x, n_g,y, n_g,z]) from the ndispers library 0.20.0's symbolic derivative
        // of the same formulas, printed to 6 decimals: tolerance half a unit.
        let table = [
            ("ktp", 800.0, [1.793928, 1.805463, 1.911272]),
            ("ktp", 1064.0, [1.767156, 1.776844, 1.871811]),
            ("lbo", 532.0, [1.608324, 1.640365, 1.656033]),
            ("bibo", 800.0, [1.802385, 1.836450, 1.984262]),
        ];
        for (key, nm, want) in table {
            let m = find_biaxial(key).expect("catalogued");
            let g = m
                .group_principal(Wavelength::from_nm(nm).expect("positive"))
                .expect("in range");
            assert!(g.warnings.is_empty(), "{:?}", g.warnings);
            for ((got, want), axis) in g.principal.into_iter().zip(want).zip(AXES) {
                assert_index(got, want, 0.5e-6, &format!("{key} group {axis} at {nm} nm, {LIBRARY}"));
            }
        }
    }

    #[test]
    fn indices_keep_their_order_over_the_whole_range() {
        for m in biaxial_catalogue() {
            let (lo, hi) = m.range_nm;
            for i in 0..80 {
                let nm = lo + (hi - lo) * f64::from(i) / 79.0;
                let w = Wavelength::from_nm(nm).expect("positive");
                let p = m.principal(w).expect("in range");
                assert!(p.warnings.is_empty(), "{} at {nm} nm: {:?}", m.key, p.warnings);
                let [x, y, z] = p.principal;
                assert!(
                    1.0 < x && x < y && y < z && z < 3.0,
                    "{} at {nm} nm: {x} {y} {z}",
                    m.key
                );
                // Normal dispersion inside the range: each group index exceeds its index.
                let g = m.group_principal(w).expect("in range");
                for ((ng, n), axis) in g.principal.iter().zip(p.principal).zip(AXES) {
                    assert!(*ng > n, "{} {axis} at {nm} nm", m.key);
                }
            }
        }
    }

    #[test]
    fn outside_the_range_warns_and_breakdown_is_an_error_on_the_wavelength() {
        for m in biaxial_catalogue() {
            let (lo, hi) = m.range_nm;
            for nm in [lo * 0.97, hi * 1.03] {
                let p = m
                    .principal(Wavelength::from_nm(nm).expect("positive"))
                    .expect("computable");
                let w = p
                    .warnings
                    .first()
                    .unwrap_or_else(|| panic!("{} at {nm}: no warning", m.key));
                assert!(w.contains(m.name) && w.contains(&format!("{lo}-{hi} nm")), "{w}");
            }
        }
        // KTP's n_x has an infrared pole at λ² = 31.45571 µm² (5.61 µm): refused there, naming
        // the axis; LBO's − λ⁶ terms drive n² below zero far in the infrared.
        let ktp = find_biaxial("ktp").expect("catalogued");
        let err = ktp
            .principal(Wavelength::from_nm(31.45571_f64.sqrt() * 1e3).expect("positive"))
            .expect_err("pole");
        assert_eq!(err.field, "wavelength_nm");
        assert!(
            err.message.contains("n_x index") && err.message.contains("resonance"),
            "{}",
            err.message
        );
        let lbo = find_biaxial("LBO").expect("found in any case");
        let err = lbo
            .group_principal(Wavelength::from_nm(20_000.0).expect("positive"))
            .expect_err("LBO at 20 µm");
        assert!(err.message.contains("group index"), "{}", err.message);
    }

    #[test]
    fn extreme_wavelengths_never_panic_or_give_nan() {
        for m in biaxial_catalogue() {
            for nm in [1e-300, 1e-9, 1.0, 100.0, 1e4, 1e6, 1e9, 1e300, f64::MAX] {
                let w = Wavelength::from_nm(nm).expect("positive");
                for p in [m.principal(w), m.group_principal(w)] {
                    match p {
                        Ok(p) => {
                            assert!(p.principal.iter().all(|n| n.is_finite()), "{} at {nm}", m.key);
                            assert!(!p.warnings.is_empty(), "{} at {nm} nm: no warning", m.key);
                        }
                        Err(e) => assert_eq!(e.field, "wavelength_nm", "{} at {nm}", m.key),
                    }
                }
            }
        }
    }

    #[test]
    fn keys_find_and_describe_agree() {
        assert_eq!(biaxial_keys(), ["ktp", "lbo", "bibo"]);
        for (spelled, key) in [("KTP", "ktp"), ("Lbo", "lbo"), ("BiBO", "bibo")] {
            assert_eq!(find_biaxial(spelled).map(|m| m.key), Some(key));
        }
        assert_eq!(find_biaxial("calcite"), None);
        for m in biaxial_catalogue() {
            let d = describe_biaxial(m);
            assert_eq!(d["kind"], "biaxial");
            assert_eq!(d["key"], m.key);
            assert!(m.citation.len() > 40 && m.range_nm.0 < m.range_nm.1, "{}", m.key);
        }
        assert_eq!(
            describe_biaxial(find_biaxial("bibo").expect("catalogued"))["temperature_c"],
            serde_json::Value::Null
        );
        assert_eq!(
            describe_biaxial(find_biaxial("ktp").expect("catalogued"))["temperature_c"],
            20.0
        );
    }
}
