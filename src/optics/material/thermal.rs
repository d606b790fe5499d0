//! Temperature: every catalogue crystal's principal indices at a temperature (thermo-optic data)
//! and its linear thermal expansion along its principal axes.
//!
//! Physics. A principal index at temperature T is the catalogue formula's index plus a shift,
//!
//! ```text
//! n(λ, T) = n(λ) + Δn(λ, T),   Δn(λ, 20 °C) = 0,
//! ```
//!
//! with Δn from the source's own temperature data where the catalogue's source has them (KTP, LBO;
//! YVO4, whose source fitted its formula afresh at several temperatures: the change between two of
//! those fits, linear in temperature) and otherwise from a cited dn/dT: a constant (a linearisation about room temperature), the
//! published wavelength form (LiNbO3: the difference of the Edwards–Lawrence temperature formula
//! between T and 20 °C, added to the catalogue's 21 °C formula; sapphire and rutile: G. Ghosh's
//! model, 2n dn/dT = G R + H R², R = λ²/(λ² − λ_ig²)), or, where a plate's temperature
//! coefficient of retardance has been measured directly (quartz, MgF2), the ordinary index's
//! constant plus the birefringence slope that measurement fixes, proportional to the
//! birefringence (the per-index handbook constants differ by less than their own spread there). The group index shifts by
//! Δn_g = Δn − λ ∂Δn/∂λ, computed analytically for each form. A length along a unit direction d
//! of the crystal's frame grows by the factor 1 + α_d (T − 20 °C) with α_d = Σ α_i (a_i·d)² over
//! the principal axes a_i (a second-rank tensor diagonal on them); for a uniaxial crystal whose
//! optic axis makes θ with d this is α∥ cos²θ + α⊥ sin²θ.
//!
//! Conventions. Temperatures in °C. The document's reference temperature is 20 °C: every
//! catalogue formula is taken to hold there, so 20 °C gives the catalogue's indices bit for bit
//! (Δn is exactly 0 there). The catalogue formulas were fitted at 20 °C (YVO4, sapphire, KTP, LBO),
//! at 19 °C (MgF2), at 21 °C (LiNbO3) or at an unstated room temperature (calcite, quartz, rutile,
//! alpha-BBO, BiBO); the 1 K offsets change an index by about 1e-6, below each formula's accuracy,
//! and are not corrected. Principal values are listed along x, y, z: for a uniaxial crystal x = y
//! is the ordinary and z the extraordinary direction (the optic axis), so `[dn_o, dn_o, dn_e]`
//! and `[α⊥, α⊥, α∥]`; for a biaxial crystal x, y, z are the catalogue's dielectric axes
//! (n_x < n_y < n_z). Outside a formula's temperature range it is still used, with a warning.
//!
//! Sources: each entry cites its data beside the coefficients (the "public-domain database of
//! optical constants" named there is M. N. Polyanskiy, Scientific Data 11, 94 (2024)); "from memory" marks values
//! recalled rather than read from the cited source. The KTP, LBO and LiNbO3 forms and
//! coefficients are those transcribed in the open-source dispersion library ndispers 0.20.0,
//! against which tests/reference/ checks them; the quartz and MgF2 dn_o/dT and the BiBO constants
//! are the handbook values that library's documentation quotes. Ghosh's sapphire and rutile
//! coefficients are those a third party transcribed from his handbook (the table not seen), whose
//! quartz, calcite and MgF2 rows tests/temperature.rs checks against independent measurements.

use super::dispersion::{Breakdown, Dispersion, Quantity};
use super::{BiaxialMaterial, Evaluated, Indices, Material, Principal};
use crate::error::Error;
use crate::optics::wavelength::Wavelength;
use nalgebra::{Matrix3, Vector3};

/// The document's reference temperature, °C: thicknesses are given at it, and every catalogue
/// formula is taken to hold at it.
pub const REFERENCE_C: f64 = 20.0;

/// How a principal index changes with temperature.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ThermoOptic {
    /// A constant dn/dT, 1/K.
    ///
    /// # Formula
    /// Δn = c (T − 20), Δn_g = Δn.
    Constant(f64),
    /// The thermo-optic dispersion of K. Kato and E. Takaoka (KTP), λ in µm.
    ///
    /// # Formula
    /// dn/dT = (a/λ³ + b/λ² + c/λ + d)·10⁻⁵ /K, Δn = dn/dT (T − 20),
    /// Δn_g = (4a/λ³ + 3b/λ² + 2c/λ + d)·10⁻⁵ (T − 20).
    InverseCubic([f64; 4]),
    /// The thermo-optic formula of K. Kato (LBO, 1994), λ in µm.
    ///
    /// # Formula
    /// dn/dT = (g λ + h)(1 + i (T − 20)), Δn = dn/dT (T − 20), Δn_g = h (1 + i (T − 20)) (T − 20).
    LinearWavelength {
        /// Coefficient of λ, 1/(K µm).
        g: f64,
        /// Constant, 1/K.
        h: f64,
        /// Temperature curvature, 1/K.
        i: f64,
    },
    /// An extraordinary index that moves as the ordinary one plus a birefringence slope
    /// proportional to the birefringence itself: the form a measured temperature coefficient of
    /// retardance γ = (1/Γ) dΓ/dT, constant with wavelength, fixes (with α⊥ the expansion across the
    /// axis of the plate measured, relative = γ − α⊥).
    ///
    /// # Formula
    /// Δn_e = (ordinary + relative (n_e − n_o)) (T − 20), with n_e − n_o the 20 °C birefringence;
    /// the group shift is the same with the group birefringence n_g,e − n_g,o in its place (the
    /// λ-derivative of a birefringence proportional term is the same term of the derivative).
    OrdinaryPlusBirefringence {
        /// dn_o/dT, 1/K.
        ordinary: f64,
        /// (1/Δn) dΔn/dT, 1/K.
        relative: f64,
    },
    /// The change between two formulas a source fitted to its own measurements at 20 °C and at
    /// `hot_c`, taken as linear in temperature (YVO4: H. S. Shi et al.'s fits at 20, 50, 80, 110 and
    /// 140 °C, whose indices step evenly).
    ///
    /// # Formula
    /// Δn = (n_hot(λ) − n_20(λ)) (T − 20)/(hot_c − 20), and likewise for the group index.
    FittedPair {
        /// The source's formula at 20 °C.
        at_20: Dispersion,
        /// Its formula at `hot_c`.
        hot: Dispersion,
        /// The temperature of `hot`, °C.
        hot_c: f64,
    },
    /// The temperature-dependent formula of G. J. Edwards and M. Lawrence (congruent LiNbO3):
    /// n² = A1 + (A2 + B1 F)/(λ² − (A3 + B2 F)²) + B3 F − A4 λ², F = (T − 24.5)(T + 570.5).
    ///
    /// # Formula
    /// Δn = n_EL(λ, T) − n_EL(λ, 20 °C), and likewise for the group index.
    EdwardsLawrence {
        /// A1, A2, A3 (µm), A4 (µm⁻²).
        a: [f64; 4],
        /// B1, B2, B3 (per K²).
        b: [f64; 3],
    },
    /// G. Ghosh's thermo-optic model: the change of n² with temperature is a term from thermal
    /// expansion and one from the shift of the excitonic gap, each a power of
    /// R = λ²/(λ² − λ_ig²), λ_ig = hc/E_ig (Handbook of Thermo-Optic Coefficients of Optical
    /// Materials with Applications, Academic Press 1998).
    ///
    /// # Formula
    /// 2n dn/dT = G R + H R² = S, Δn = S (T − 20)/(2n) with n the index at 20 °C;
    /// Δn_g = Δn − λ ∂Δn/∂λ = (T − 20)/(2n) · [S + 2R(R − 1)(G + 2HR) + S (n − n_g)/n], since
    /// λ dR/dλ = −2R(R − 1) and λ dn/dλ = n − n_g.
    Ghosh {
        /// G, 1/K: the thermal-expansion term.
        g: f64,
        /// H, 1/K: the excitonic-gap term.
        h: f64,
        /// E_ig, eV: the isentropic gap.
        gap_ev: f64,
    },
}

/// A principal value at 20 °C, as the temperature laws need it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reference {
    /// The value of the quantity asked for (the index or the group index).
    pub value: f64,
    /// The (phase) index, which [`ThermoOptic::Ghosh`] divides by.
    pub index: f64,
    /// The value less the x value (n_o for a uniaxial crystal), of the quantity asked for: the
    /// birefringence that [`ThermoOptic::OrdinaryPlusBirefringence`] scales.
    pub above_x: f64,
}

impl ThermoOptic {
    /// The shift of the index (`Quantity::Phase`) or of the group index between 20 °C and `t_c`
    /// at `um` micrometres; exactly 0 at 20 °C. `at` is this principal value at 20 °C.
    ///
    /// # Errors
    /// Where the Edwards–Lawrence formula or a fitted pair's formula breaks down (as
    /// [`Dispersion::quantity`]), or the wavelength is at Ghosh's gap wavelength λ_ig.
    pub fn shift(&self, q: Quantity, um: f64, t_c: f64, at: Reference) -> Result<f64, Breakdown> {
        let dt = t_c - REFERENCE_C;
        Ok(match (*self, q) {
            (ThermoOptic::Constant(c), _) => c * dt,
            (ThermoOptic::OrdinaryPlusBirefringence { ordinary, relative }, _) => {
                (ordinary + relative * at.above_x) * dt
            }
            (ThermoOptic::Ghosh { g, h, gap_ev }, q) => {
                // hc in eV µm (CODATA 2018: h, c and e exact).
                let gap_um = 1.239_841_984 / gap_ev;
                let (w, w_ig) = (um * um, gap_um * gap_um);
                if (w - w_ig).abs() <= 1e-6 * w {
                    return Err(Breakdown::Resonance);
                }
                let r = w / (w - w_ig);
                let s = g * r + h * r * r;
                let n = at.index;
                match q {
                    Quantity::Phase => s * dt / (2.0 * n),
                    Quantity::Group => {
                        let n_g = at.value;
                        (s + 2.0 * r * (r - 1.0) * (g + 2.0 * h * r) + s * (n - n_g) / n) * dt / (2.0 * n)
                    }
                }
            }
            (ThermoOptic::InverseCubic([a, b, c, d]), q) => {
                let (l1, l2, l3) = (1.0 / um, 1.0 / (um * um), 1.0 / (um * um * um));
                let k = match q {
                    Quantity::Phase => [1.0, 1.0, 1.0],
                    Quantity::Group => [4.0, 3.0, 2.0],
                };
                (k[0] * a * l3 + k[1] * b * l2 + k[2] * c * l1 + d) * 1e-5 * dt
            }
            (ThermoOptic::LinearWavelength { g, h, i }, q) => {
                let slope = match q {
                    Quantity::Phase => g * um + h,
                    Quantity::Group => h,
                };
                slope * (1.0 + i * dt) * dt
            }
            (ThermoOptic::FittedPair { at_20, hot, hot_c }, q) => {
                (hot.quantity(q, um)? - at_20.quantity(q, um)?) * dt / (hot_c - REFERENCE_C)
            }
            (ThermoOptic::EdwardsLawrence { a, b }, q) => {
                edwards_lawrence(a, b, t_c).quantity(q, um)? - edwards_lawrence(a, b, REFERENCE_C).quantity(q, um)?
            }
        })
    }
}

/// A catalogue crystal's temperature data.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Thermal {
    /// The catalogue key it belongs to.
    pub key: &'static str,
    /// The temperature range of the thermo-optic data, °C, `(low, high)`.
    pub range_c: (f64, f64),
    /// How n_x, n_y, n_z change (uniaxial: n_o, n_o, n_e).
    pub thermo_optic: [ThermoOptic; 3],
    /// Source of the thermo-optic data, with its wavelength and temperature range.
    pub thermo_optic_source: &'static str,
    /// Whether the thermo-optic data rest on a journal or handbook measurement of this crystal;
    /// false where published values and others disagree with nothing at hand to decide (rutile)
    /// or another crystal's data stand in (alpha-BBO), whose source then starts "unverified:".
    pub verified: bool,
    /// Linear expansion coefficients α_x, α_y, α_z along the principal axes, 1/K (uniaxial: α⊥,
    /// α⊥, α∥).
    pub expansion: [f64; 3],
    /// Source of the expansion coefficients.
    pub expansion_source: &'static str,
}

impl Thermal {
    /// The expansion coefficient along the unit vector `d`, given the principal axes as the
    /// columns of `axes` (in the frame of `d`).
    ///
    /// # Formula
    /// α_d = Σ α_i (a_i·d)².
    pub fn expansion_along(&self, axes: &Matrix3<f64>, d: &Vector3<f64>) -> f64 {
        (0..3).map(|i| self.expansion[i] * axes.column(i).dot(d).powi(2)).sum()
    }

    /// The warning for a temperature outside [`Thermal::range_c`], naming the material.
    pub fn range_warning(&self, name: &str, t_c: f64) -> Option<String> {
        let (lo, hi) = self.range_c;
        (!(lo..=hi).contains(&t_c)).then(|| {
            format!(
                "{t_c} °C is outside the {lo}-{hi} °C range of the {name} temperature data; its \
                 indices are extrapolated"
            )
        })
    }

    /// `values` (principal values of `q` at 20 °C along x, y, z) shifted to `t_c` at
    /// `wavelength`; `index` holds the (phase) indices at 20 °C, equal to `values` for
    /// `Quantity::Phase`.
    fn shifted(
        &self,
        (values, index): ([f64; 3], [f64; 3]),
        q: Quantity,
        wavelength: Wavelength,
        t_c: f64,
    ) -> Result<[f64; 3], Error> {
        let mut out = values;
        for (i, (v, law)) in out.iter_mut().zip(&self.thermo_optic).enumerate() {
            let at = Reference {
                value: values[i],
                index: index[i],
                above_x: values[i] - values[0],
            };
            *v += law.shift(q, wavelength.um(), t_c, at).map_err(|why| {
                Error::new(
                    "temperature_c",
                    format!(
                        "the {} temperature formula gives no usable {} at {} nm and {t_c} °C: {}",
                        self.key,
                        q.noun(),
                        wavelength.nm(),
                        why.reason()
                    ),
                )
            })?;
        }
        Ok(out)
    }

    /// The warning a design answer carries when its temperature figures (changes per kelvin,
    /// temperature bands, athermal pairs) rest on unverified thermo-optic data, naming the
    /// crystal by its key and by `name`; `None` for verified data.
    pub fn data_warning(&self, name: &str) -> Option<String> {
        (!self.verified).then(|| {
            format!(
                "unverified temperature data for {}: the {name} thermo-optic coefficients have no \
                 journal measurement of this crystal behind them ({}), so this answer's changes per \
                 kelvin and temperature bands are estimates",
                self.key, self.thermo_optic_source
            )
        })
    }

    /// As [`Thermal`] a JSON object for the materials listing: `{range_c, reference_c,
    /// thermo_optic_source, expansion_per_k, expansion_source}`.
    pub fn describe(&self) -> serde_json::Value {
        serde_json::json!({
            "range_c": [self.range_c.0, self.range_c.1], "reference_c": REFERENCE_C,
            "thermo_optic_source": self.thermo_optic_source,
            "expansion_per_k": self.expansion, "expansion_source": self.expansion_source,
        })
    }
}

/// The temperature data of the catalogue crystal `key` (any case), if catalogued.
pub fn thermal(key: &str) -> Option<&'static Thermal> {
    THERMAL.iter().find(|t| t.key.eq_ignore_ascii_case(key))
}

/// `values` (the 20 °C principal values of `q` along x, y, z of the catalogue crystal `key`,
/// called `name` in messages, with the 20 °C indices beside them) moved to `t_c`, the range
/// warning added to `warnings`. A catalogue key without an entry is an error naming the field
/// (a bug the tests catch, never a panic).
fn at_temperature(
    (key, name): (&str, &str),
    values: ([f64; 3], [f64; 3]),
    warnings: &mut Vec<String>,
    (q, wavelength, t_c): (Quantity, Wavelength, f64),
) -> Result<[f64; 3], Error> {
    let th = thermal(key).ok_or_else(|| Error::new("temperature_c", format!("no temperature data for {key}")))?;
    warnings.extend(th.range_warning(name, t_c));
    th.shifted(values, q, wavelength, t_c)
}

impl Material {
    /// The principal indices at `wavelength` and `temperature_c` (°C): [`Material::indices`]
    /// shifted by the crystal's thermo-optic data, identical to it at 20 °C. Warnings: those of
    /// [`Material::indices`], and one when the temperature is outside the data's range.
    ///
    /// # Errors
    /// As [`Material::indices`]; field `temperature_c` where a temperature formula breaks down.
    pub fn indices_at(&self, wavelength: Wavelength, temperature_c: f64) -> Result<Evaluated, Error> {
        let ev = self.indices(wavelength)?;
        let index = ev.indices;
        self.at(ev, index, Quantity::Phase, wavelength, temperature_c)
    }

    /// The principal group indices at `wavelength` and `temperature_c`, as
    /// [`Material::group_indices`] shifted by Δn − λ ∂Δn/∂λ.
    ///
    /// # Errors
    /// As [`Material::indices_at`].
    pub fn group_indices_at(&self, wavelength: Wavelength, temperature_c: f64) -> Result<Evaluated, Error> {
        let ev = self.group_indices(wavelength)?;
        let index = self.indices(wavelength)?.indices;
        self.at(ev, index, Quantity::Group, wavelength, temperature_c)
    }

    /// `ev` (of `q`, at 20 °C) moved to `t_c`; `index` holds the 20 °C indices.
    fn at(
        &self,
        mut ev: Evaluated,
        index: Indices,
        q: Quantity,
        wavelength: Wavelength,
        t_c: f64,
    ) -> Result<Evaluated, Error> {
        let Indices { no, ne } = ev.indices;
        let [no, _, ne] = at_temperature(
            (self.key, self.name),
            ([no, no, ne], [index.no, index.no, index.ne]),
            &mut ev.warnings,
            (q, wavelength, t_c),
        )?;
        ev.indices = Indices { no, ne };
        Ok(ev)
    }
}

impl BiaxialMaterial {
    /// n_x, n_y, n_z at `wavelength` and `temperature_c` (°C): [`BiaxialMaterial::principal`]
    /// shifted by the crystal's thermo-optic data, identical to it at 20 °C, with a warning
    /// outside the data's temperature range.
    ///
    /// # Errors
    /// As [`BiaxialMaterial::principal`]; field `temperature_c` where a temperature formula
    /// breaks down.
    pub fn principal_at(&self, wavelength: Wavelength, temperature_c: f64) -> Result<Principal, Error> {
        let p = self.principal(wavelength)?;
        let index = p.principal;
        self.at(p, index, Quantity::Phase, wavelength, temperature_c)
    }

    /// The principal group indices at `wavelength` and `temperature_c`.
    ///
    /// # Errors
    /// As [`BiaxialMaterial::principal_at`].
    pub fn group_principal_at(&self, wavelength: Wavelength, temperature_c: f64) -> Result<Principal, Error> {
        let p = self.group_principal(wavelength)?;
        let index = self.principal(wavelength)?.principal;
        self.at(p, index, Quantity::Group, wavelength, temperature_c)
    }

    /// `p` (of `q`, at 20 °C) moved to `t_c`; `index` holds the 20 °C indices.
    fn at(
        &self,
        mut p: Principal,
        index: [f64; 3],
        q: Quantity,
        wavelength: Wavelength,
        t_c: f64,
    ) -> Result<Principal, Error> {
        p.principal = at_temperature(
            (self.key, self.name),
            (p.principal, index),
            &mut p.warnings,
            (q, wavelength, t_c),
        )?;
        Ok(p)
    }
}

static THERMAL: [Thermal; 11] = [
    Thermal {
        key: "calcite",
        // dn_o/dT = +3e-6, dn_e/dT = +13e-6 /K at 500 nm: a crystal supplier's calcite data
        // sheet (found by search); consistent with the handbook values +2.1e-6 and +11.9e-6
        // (G. Ghosh, Handbook of Thermo-Optic Coefficients of Optical Materials, Academic Press
        // 1998, from memory). The supplier's "∥ c" column is taken as the ordinary index, the
        // reading under which calcite's birefringence falls on heating, as it is known to (from
        // memory). Range: room temperature; 0-100 °C assumed for the linearisation.
        range_c: (0.0, 100.0),
        thermo_optic: [
            ThermoOptic::Constant(3e-6),
            ThermoOptic::Constant(3e-6),
            ThermoOptic::Constant(13e-6),
        ],
        thermo_optic_source: "a crystal supplier's calcite data sheet, 500 nm (dn_o/dT 3e-6, dn_e/dT \
                              13e-6 /K); constants, 0-100 °C",
        verified: true,
        // α∥ = 25e-6, α⊥ = −5.8e-6 /K (the same data sheet; handbook values 26e-6 and −5.4e-6,
        // from memory): calcite contracts across its axis on heating.
        expansion: [-5.8e-6, -5.8e-6, 25e-6],
        expansion_source: "a crystal supplier's calcite data sheet: 25e-6 /K along c, -5.8e-6 /K across",
    },
    Thermal {
        key: "quartz",
        // dn_o/dT = −6.2e-6 /K at 546 nm: Tropf et al., Table 20 (as quoted by ndispers 0.20.0);
        // room temperature. The extraordinary index is not given its own handbook constant: the
        // birefringence's slope, the small difference of two nearly equal per-index constants, is
        // taken from a direct measurement of it instead, S. M. Etzel, A. H. Rose and C. M. Wang,
        // "Dispersion of the temperature dependence of the retardance in SiO2 and MgF2", Applied
        // Optics 39, 5796-5800 (2000) (values from its abstract, as published by NIST): on plates,
        // at 633, 788, 1318 and 1539 nm over 24-80 °C, γ = (1/Γ) dΓ/dT = −1.23e-4 /K (combined
        // standard uncertainty 0.02e-4) with little wavelength dependence. With the plate's
        // expansion across the axis, α⊥ = 13.2e-6 /K (below), (1/Δn) dΔn/dT = γ − α⊥ = −1.362e-4 /K,
        // so dn_e/dT = −6.2e-6 − 1.362e-4 Δn(λ) /K: −7.45e-6 /K at 546 nm. Tropf's own dn_e/dT,
        // −7.0e-6 /K, gives a birefringence slope of −0.8e-6 /K against the −1.25e-6 /K measured,
        // and the Toyoda–Yabe constants (J. Phys. D 16, L97 (1983), as quoted by a supplier's
        // handbook: −5.5e-6 and −6.5e-6 /K at 633 nm) −1.0e-6 /K: per-index handbook constants fix
        // that slope no better than ±0.5e-6 /K, the measured γ to ±2 %. tests/temperature.rs checks
        // the slope against an independent formula (Beckers and Dunn's quartz birefringence with
        // temperature). 0-100 °C assumed for the linearisation (the measurement spans 24-80 °C).
        range_c: (0.0, 100.0),
        thermo_optic: [
            ThermoOptic::Constant(-6.2e-6),
            ThermoOptic::Constant(-6.2e-6),
            ThermoOptic::OrdinaryPlusBirefringence {
                ordinary: -6.2e-6,
                relative: -1.23e-4 - 13.2e-6,
            },
        ],
        thermo_optic_source: "dn_o/dT -6.2e-6 /K at 546 nm: W. J. Tropf et al., Handbook of Optics Vol. II ch. 33 \
                              (1995), Table 20; dn_e/dT = dn_o/dT + (gamma - alpha_perp)(n_e - n_o) with the \
                              retardance coefficient gamma = -1.23e-4 /K measured by S. M. Etzel, A. H. Rose and \
                              C. M. Wang, Applied Optics 39, 5796 (2000), 633-1539 nm, 24-80 °C; 0-100 °C assumed",
        verified: true,
        // α∥ = 7.1e-6, α⊥ = 13.2e-6 /K at 323 K: the same supplier's handbook (5th edition,
        // 2023, carried by the public-domain database of optical constants). A critical review
        // of the measurements, J. A. Kosinski, J. G. Gualtieri and A. Ballato, "Thermoelasticity in
        // quartz", ESA SP-340, 397 (1992), recommends first-order coefficients 7.50e-6 along c and
        // 13.65e-6 /K across (its abstract): 3-6 % higher, a change of 0.5e-6 /K in an a-cut
        // plate's retardance coefficient, about 1 % of the gap tests/temperature.rs records.
        // 0-100 °C assumed.
        expansion: [13.2e-6, 13.2e-6, 7.1e-6],
        expansion_source: "a crystal supplier's handbook (5th edition, 2023), at 323 K: 7.1e-6 /K along c, \
                           13.2e-6 /K across; 0-100 °C",
    },
    Thermal {
        key: "yvo4",
        // H. S. Shi, G. Zhang and H. Y. Shen, J. Synthetic Crystals 30, 85-88 (2001), the
        // catalogue's own source, fitted n² = A + B/(λ² − C) − D λ² afresh at 20, 50, 80, 110 and
        // 140 °C over 0.48-1.34 µm (coefficients as transcribed by the public-domain database of
        // optical constants; the paper, in Chinese, was not seen). Their indices step evenly with
        // temperature (n_o at 633 nm by 5.9-6.0e-4 per 30 K), so the change between the 20 and
        // 110 °C fits is taken as linear: dn_o/dT = 19.8e-6 and dn_e/dT = 12.8e-6 /K at 633 nm,
        // 16.7e-6 and 10.5e-6 /K at 1064 nm. The 140 °C extraordinary fit is not used: its B as
        // transcribed, 0.017202, breaks the run of the other fits' 0.1081 to 0.1075 (a misprint of
        // 0.107202, it seems). A second, independent measurement, Y. Sato and T. Taira, Opt.
        // Mater. Express 4, 876 (2014) (interferometric, at 1.06 µm and room temperature; values
        // from its abstract), gives 15.5e-6 (o) and 8.41e-6 /K (e): the per-index values here are
        // 8 % and 25 % higher, the birefringence's slope (−6.2e-6 against −7.1e-6 /K) 13 % smaller
        // in size (tests/temperature.rs). These replace the suppliers' values recalled earlier
        // (8.5e-6 and 3.0e-6 /K), which neither measurement supports. Range: the fits' 20-140 °C.
        range_c: (20.0, 140.0),
        thermo_optic: [SHI_O, SHI_O, SHI_E],
        thermo_optic_source: "H. S. Shi, G. Zhang and H. Y. Shen, Journal of Synthetic Crystals 30, 85-88 (2001): \
                              the change between its 20 and 110 °C dispersion fits, linear in temperature \
                              (dn_o/dT 19.8e-6, dn_e/dT 12.8e-6 /K at 633 nm); 0.48-1.34 µm, 20-140 °C",
        verified: true,
        // α_a = 1.76e-6, α_c = 8.24e-6 /K at room temperature, measured interferometrically along
        // [100] and [001] by Sato and Taira (2014, abstract). Consistent with the dilatometry of
        // "Linear thermal expansion and thermo-optic coefficients of YVO4 crystals in the 80-320 K
        // temperature range", Opt. Mater. Express 2, 1624 (2012) (abstract: its 80 K values, 0.11e-6
        // and 2.43e-6 /K, are 5.3 % and 28 % of those at room temperature, so about 2.1e-6 and
        // 8.7e-6 /K). These replace the suppliers' 4.43e-6 and 11.37e-6 /K used before, which both
        // measurements contradict.
        expansion: [1.76e-6, 1.76e-6, 8.24e-6],
        expansion_source: "Y. Sato and T. Taira, Optical Materials Express 4, 876 (2014), room temperature: \
                           8.24e-6 /K along c, 1.76e-6 /K across",
    },
    Thermal {
        key: "alpha-bbo",
        // No journal thermo-optic data found for alpha-BBO. Used as the nearest estimate, which
        // the catalogue entry's unverified-data warning already covers: beta-BBO's dn_o/dT =
        // −16.6e-6 and dn_e/dT = −9.3e-6 /K, D. Eimerl et al., J. Appl. Phys. 62, 1968-1983
        // (1987), as transcribed by ndispers 0.20.0 (betaBBO_Eimerl1987). An alpha-BBO supplier's
        // data sheet (archived 2008, found by search) prints the same two numbers the other way
        // round (−9.3e-6 ordinary, −16.6e-6 extraordinary): which index carries which is itself
        // unsettled for alpha-BBO. Constants; 0-100 °C assumed.
        range_c: (0.0, 100.0),
        thermo_optic: [
            ThermoOptic::Constant(-16.6e-6),
            ThermoOptic::Constant(-16.6e-6),
            ThermoOptic::Constant(-9.3e-6),
        ],
        thermo_optic_source: "unverified: beta-BBO's dn_o/dT -16.6e-6 and dn_e/dT -9.3e-6 /K (Eimerl et al., \
                              J. Appl. Phys. 62, 1968 (1987)); an alpha-BBO data sheet swaps them; constants, \
                              0-100 °C",
        verified: false,
        // α∥ = 36e-6, α⊥ = 4e-6 /K over 25-900 °C: the same alpha-BBO supplier's data sheet
        // (archived 2008, found by search); no journal value found.
        expansion: [4e-6, 4e-6, 36e-6],
        expansion_source: "an alpha-BBO supplier's data sheet: 36e-6 /K along c, 4e-6 /K across, 25-900 °C",
    },
    Thermal {
        key: "sapphire",
        // G. Ghosh's thermo-optic model (see `ThermoOptic::Ghosh`) with his sapphire coefficients:
        // o: G = −45.2665e-6, H = 83.5457e-6 /K, E_ig = 8.27 eV; e: G = −39.8961e-6,
        // H = 81.9579e-6 /K, E_ig = 8.00 eV (Handbook of Thermo-Optic Coefficients of Optical
        // Materials with Applications, Academic Press 1998, as transcribed in the material table of
        // an open-source spectropolarimeter's optics code; the book's table not seen). At 633 nm
        // they give dn_o/dT = +12.97e-6 and dn_e/dT = +14.31e-6 /K, a birefringence slope of
        // +1.34e-6 /K. The same table's quartz, calcite and MgF2 rows reproduce independent
        // measurements (tests/temperature.rs: Beckers and Dunn's birefringence slopes, Feldman's
        // dn_o/dT as Tropf et al. quote it), which vouches for the transcription. The orientation
        // average agrees in size and sign with the measured slope of polycrystalline alumina
        // (D. C. Harris et al., Opt. Eng. 56, 077103 (2017)), and a crystal supplier prints one
        // dn/dT, 13.4e-6 /K at 546 nm, for no stated index. The values used before, 13.1e-6 and
        // 13.6e-6 /K recalled from memory, differ by 0.1-0.7e-6 /K per index. No measurement of
        // the split between the two indices in the visible, which sets a plate's retardance change,
        // was found besides Ghosh's fit. Range: room temperature; 0-100 °C assumed.
        range_c: (0.0, 100.0),
        thermo_optic: [
            ThermoOptic::Ghosh {
                g: -45.2665e-6,
                h: 83.5457e-6,
                gap_ev: 8.27,
            },
            ThermoOptic::Ghosh {
                g: -45.2665e-6,
                h: 83.5457e-6,
                gap_ev: 8.27,
            },
            ThermoOptic::Ghosh {
                g: -39.8961e-6,
                h: 81.9579e-6,
                gap_ev: 8.00,
            },
        ],
        thermo_optic_source: "G. Ghosh, Handbook of Thermo-Optic Coefficients of Optical Materials with \
                              Applications (Academic Press, 1998): 2n dn/dT = G R + H R^2, R = lambda^2/(lambda^2 \
                              - lambda_ig^2); o: G -45.2665e-6, H 83.5457e-6 /K, E_ig 8.27 eV; e: G -39.8961e-6, \
                              H 81.9579e-6 /K, E_ig 8.00 eV (as transcribed by a third party; the table not seen); \
                              room temperature, 0-100 °C assumed",
        verified: true,
        // α∥ = 6.66e-6, α⊥ = 5.0e-6 /K near room temperature (handbook values, from memory; the
        // supplier's page above prints 5.6e-6 along c and 5.0e-6 /K across: α∥ is uncertain).
        expansion: [5.0e-6, 5.0e-6, 6.66e-6],
        expansion_source: "handbook values near 20 °C, from memory: 6.66e-6 /K along c (a supplier prints 5.6e-6), \
                           5.0e-6 /K across",
    },
    Thermal {
        key: "mgf2",
        // dn_o/dT = +1.12e-6 /K at 633 nm: Tropf et al., Table 20, from A. Feldman et al. (NBS,
        // 1978) (as quoted by ndispers 0.20.0). The same table gives +0.88e-6 at 1.15 µm and
        // +1.19e-6 /K at 3.39 µm (as quoted by ndispers): no steady trend with wavelength, so the
        // 633 nm constant serves at all. The extraordinary index moves as the ordinary plus the
        // birefringence slope measured directly on plates by Etzel, Rose and Wang (Applied Optics
        // 39, 5796 (2000), abstract): γ = −5.37e-5 /K (combined standard uncertainty 0.17e-5) at
        // 633-1539 nm over 24-80 °C, with a small wavelength dependence; with α⊥ = 8.9e-6 /K
        // (below), (1/Δn) dΔn/dT = γ − α⊥ = −6.26e-5 /K, so dn_e/dT = 1.12e-6 − 6.26e-5 Δn(λ) /K:
        // +0.38e-6 /K at 633 nm. Feldman's dn_e/dT, +0.565e-6 /K at 633 nm by G. Ghosh's fit of
        // those data (tests/temperature.rs), gives a birefringence slope of −0.55e-6 /K against the
        // −0.74e-6 /K measured; no second independent measurement of the slope was found (looked
        // for: retardance or birefringence against temperature in the visible and near infrared;
        // found only a measurement at one temperature, "Birefringence of magnesium fluoride in the
        // vacuum ultraviolet and application to a half-waveplate", Appl. Opt. 52, 8205 (2013), at
        // 121.6 nm; thermal models of retarders, D. M. Harrington et al., JATIS 4, 018006 (2018),
        // whose text beyond the abstract was not at hand; and H. H. Li's critical compilation of
        // earlier measurements, J. Phys. Chem. Ref. Data 9, 161 (1980), not a new one). Not used: the temperature-dependent Sellmeier sets of Q. Zheng,
        // X. Wang and D. Thompson, Opt. Mater. Express 13, 2380-2391 (2023), 21-368 °C (as carried
        // by the public-domain database of optical constants); their 21.1 and 186.4 °C sets give
        // dn_o/dT ≈ −7.8e-6 and dn_e/dT ≈ −5.7e-6 /K at 633 nm, opposite in sign to Feldman's, and
        // a birefringence slope of +2.1e-6 /K, the opposite sign to the direct measurement.
        // 0-100 °C assumed for the linearisation.
        range_c: (0.0, 100.0),
        thermo_optic: [
            ThermoOptic::Constant(1.12e-6),
            ThermoOptic::Constant(1.12e-6),
            ThermoOptic::OrdinaryPlusBirefringence {
                ordinary: 1.12e-6,
                relative: -5.37e-5 - 8.9e-6,
            },
        ],
        thermo_optic_source: "dn_o/dT 1.12e-6 /K at 633 nm: W. J. Tropf et al., Handbook of Optics Vol. II ch. 33 \
                              (1995), Table 20, from A. Feldman et al. (1978); dn_e/dT = dn_o/dT + (gamma - \
                              alpha_perp)(n_e - n_o) with the retardance coefficient gamma = -5.37e-5 /K measured by \
                              S. M. Etzel, A. H. Rose and C. M. Wang, Applied Optics 39, 5796 (2000), 633-1539 nm, \
                              24-80 °C; 0-100 °C assumed",
        verified: true,
        // α∥ = 13.7e-6, α⊥ = 8.9e-6 /K (handbook values, from memory).
        expansion: [8.9e-6, 8.9e-6, 13.7e-6],
        expansion_source: "handbook values near 20 °C, from memory: 13.7e-6 /K along c, 8.9e-6 /K across",
    },
    Thermal {
        key: "linbo3",
        // G. J. Edwards and M. Lawrence, Opt. Quantum Electron. 16, 373-375 (1984), Table I
        // (coefficients as transcribed by ndispers 0.20.0, CLN_Edwards1984): 0-500 °C, 0.4-3.4 µm.
        range_c: (0.0, 500.0),
        thermo_optic: [EL_O, EL_O, EL_E],
        thermo_optic_source: "G. J. Edwards and M. Lawrence, \"A temperature-dependent dispersion equation for \
                              congruently grown lithium niobate\", Optical and Quantum Electronics 16, 373-375 \
                              (1984): its change from 20 °C added to the catalogue formula; 0-500 °C, 0.4-3.4 µm",
        verified: true,
        // α_a = 15.4e-6, α_c = 7.5e-6 /K (common handbook values, from memory).
        expansion: [15.4e-6, 15.4e-6, 7.5e-6],
        expansion_source: "handbook values near 20 °C, from memory: 7.5e-6 /K along c, 15.4e-6 /K across",
    },
    Thermal {
        key: "rutile",
        // G. Ghosh's thermo-optic model (see `ThermoOptic::Ghosh`) with his rutile coefficients:
        // o: G = −132.253e-6, H = 64.5269e-6 /K; e: G = −127.565e-6, H = 45.2141e-6 /K; E_ig =
        // 4.10 eV for both (Handbook of Thermo-Optic Coefficients, 1998, as transcribed in the
        // same open-source optics code as sapphire's; the book's table not seen). At 633 nm they
        // give dn_o/dT = −12.2e-6 and dn_e/dT = −15.6e-6 /K. Still flagged unverified: the values
        // some crystal suppliers print, recalled from memory (−7.2e-5 and −10.0e-5 /K, used here
        // before), are about six times larger, and no journal measurement of bulk rutile was at
        // hand to decide between them. Range: room temperature; 0-100 °C assumed.
        range_c: (0.0, 100.0),
        thermo_optic: [
            ThermoOptic::Ghosh {
                g: -132.253e-6,
                h: 64.5269e-6,
                gap_ev: 4.10,
            },
            ThermoOptic::Ghosh {
                g: -132.253e-6,
                h: 64.5269e-6,
                gap_ev: 4.10,
            },
            ThermoOptic::Ghosh {
                g: -127.565e-6,
                h: 45.2141e-6,
                gap_ev: 4.10,
            },
        ],
        thermo_optic_source: "unverified: G. Ghosh, Handbook of Thermo-Optic Coefficients of Optical Materials \
                              with Applications (Academic Press, 1998): 2n dn/dT = G R + H R^2, R = lambda^2/\
                              (lambda^2 - lambda_ig^2); o: G -132.253e-6, H 64.5269e-6 /K; e: G -127.565e-6, \
                              H 45.2141e-6 /K; E_ig 4.10 eV (as transcribed by a third party; the table not seen); \
                              suppliers' values, from memory, are six times larger (dn_o/dT -7.2e-5, dn_e/dT \
                              -10.0e-5 /K) and no journal measurement was found to decide; room temperature, \
                              0-100 °C assumed",
        verified: false,
        // α∥ = 9.19e-6, α⊥ = 7.14e-6 /K near room temperature: R. K. Kirby, J. Res. Natl. Bur.
        // Stand. 71A, 363-369 (1967), "Thermal expansion of rutile from 100 to 700 K" (values
        // from memory).
        expansion: [7.14e-6, 7.14e-6, 9.19e-6],
        expansion_source: "R. K. Kirby, J. Res. NBS 71A (1967), near 20 °C, from memory: 9.19e-6 /K along c, \
                           7.14e-6 /K across",
    },
    Thermal {
        key: "ktp",
        // K. Kato and E. Takaoka, Appl. Opt. 41, 5040-5044 (2002): the catalogue's own source,
        // whose thermo-optic formula is used (coefficients as transcribed by ndispers 0.20.0);
        // 0.43-1.58 µm; temperature range 20-200 °C, from memory.
        range_c: (20.0, 200.0),
        thermo_optic: [
            ThermoOptic::InverseCubic([0.1717, -0.5353, 0.8416, 0.1627]),
            ThermoOptic::InverseCubic([0.1997, -0.4063, 0.5154, 0.5425]),
            ThermoOptic::InverseCubic([0.9221, -2.9220, 3.6677, -0.1897]),
        ],
        thermo_optic_source: "K. Kato and E. Takaoka, Applied Optics 41, 5040-5044 (2002), thermo-optic \
                              dispersion formula; 0.43-1.58 µm; 20-200 °C (from memory)",
        verified: true,
        // α_x = 11e-6, α_y = 9e-6, α_z = 0.6e-6 /K (suppliers' values, from memory; an X-ray
        // study, Sheleg et al., Crystallogr. Rep. 45, 215-218 (2000), finds α_b > α_a, so x and y
        // may be swapped here; α_c near zero agrees).
        expansion: [11e-6, 9e-6, 0.6e-6],
        expansion_source: "crystal suppliers' data, from memory: 11e-6, 9e-6, 0.6e-6 /K along x, y, z",
    },
    Thermal {
        key: "lbo",
        // K. Kato, IEEE J. Quantum Electron. 30, 2950-2952 (1994): the catalogue's own source,
        // whose thermo-optic formula is used (coefficients as transcribed by ndispers 0.20.0);
        // fitted to 90° phase matching from 20 to about 200 °C (from memory).
        range_c: (20.0, 200.0),
        thermo_optic: [
            ThermoOptic::LinearWavelength {
                g: -3.76e-6,
                h: 2.30e-6,
                i: 58.26e-3,
            },
            ThermoOptic::LinearWavelength {
                g: 6.01e-6,
                h: -19.40e-6,
                i: 65.78e-4,
            },
            ThermoOptic::LinearWavelength {
                g: 1.50e-6,
                h: -9.70e-6,
                i: 148.98e-4,
            },
        ],
        thermo_optic_source: "K. Kato, IEEE Journal of Quantum Electronics 30, 2950-2952 (1994), thermo-optic \
                              formula; 20-200 °C (from memory)",
        verified: true,
        // α_x = 10.8e-5, α_y = −8.8e-5, α_z = 3.4e-5 /K (suppliers' values, from memory).
        expansion: [10.8e-5, -8.8e-5, 3.4e-5],
        expansion_source: "crystal suppliers' data, from memory: 10.8e-5, -8.8e-5, 3.4e-5 /K along x, y, z",
    },
    Thermal {
        key: "bibo",
        // V. Petrov et al., Laser Photonics Rev. 4, 53-98 (2010), Table 3, at 1064 nm: +3.5e-6,
        // −5.6e-6, −6.8e-6 /K for n_x, n_y, n_z in index order (as quoted by ndispers 0.20.0).
        range_c: (0.0, 100.0),
        thermo_optic: [
            ThermoOptic::Constant(3.5e-6),
            ThermoOptic::Constant(-5.6e-6),
            ThermoOptic::Constant(-6.8e-6),
        ],
        thermo_optic_source: "V. Petrov et al., Laser & Photonics Reviews 4, 53-98 (2010), Table 3, 1064 nm; \
                              constants, 0-100 °C",
        verified: true,
        // Uncertain, from memory: 4.8e-6, 4.4e-6 and −26.7e-6 /K.
        expansion: [4.8e-6, 4.4e-6, -26.7e-6],
        expansion_source: "from memory, uncertain: 4.8e-6, 4.4e-6, -26.7e-6 /K along x, y, z",
    },
];

/// Shi, Zhang and Shen's (2001) YVO4 fits n² = A + B/(λ² − C) − D λ² for the ordinary index at 20
/// and 110 °C (as transcribed by the public-domain database of optical constants); the 20 °C fit
/// is the catalogue's `shi-2001` formula.
const SHI_O_FITS: (Dispersion, Dispersion) = (
    Dispersion::PoleAndIr {
        a: 3.778790,
        b: 0.070479,
        c: 0.045731,
        d: 0.009701,
    },
    Dispersion::PoleAndIr {
        a: 3.784201,
        b: 0.070662,
        c: 0.047693,
        d: 0.009539,
    },
);
/// The extraordinary index's fits, as [`SHI_O_FITS`].
const SHI_E_FITS: (Dispersion, Dispersion) = (
    Dispersion::PoleAndIr {
        a: 4.607200,
        b: 0.108087,
        c: 0.052495,
        d: 0.014305,
    },
    Dispersion::PoleAndIr {
        a: 4.611804,
        b: 0.107499,
        c: 0.055024,
        d: 0.014498,
    },
);
/// The temperature of the second of Shi et al.'s fits used, °C.
const SHI_HOT_C: f64 = 110.0;
const SHI_O: ThermoOptic = ThermoOptic::FittedPair {
    at_20: SHI_O_FITS.0,
    hot: SHI_O_FITS.1,
    hot_c: SHI_HOT_C,
};
const SHI_E: ThermoOptic = ThermoOptic::FittedPair {
    at_20: SHI_E_FITS.0,
    hot: SHI_E_FITS.1,
    hot_c: SHI_HOT_C,
};

/// Edwards–Lawrence ordinary index: A1..A4 and B1..B3 of their Table I (via ndispers 0.20.0).
pub(super) const EL_O_COEFFICIENTS: ([f64; 4], [f64; 3]) =
    ([4.9048, 0.11775, 0.21802, 0.027153], [2.2314e-8, -2.9671e-8, 2.1429e-8]);
/// Edwards–Lawrence extraordinary index, as [`EL_O_COEFFICIENTS`].
pub(super) const EL_E_COEFFICIENTS: ([f64; 4], [f64; 3]) =
    ([4.5820, 0.09921, 0.21090, 0.021940], [5.2716e-8, -4.9143e-8, 2.2971e-7]);
const EL_O: ThermoOptic = ThermoOptic::EdwardsLawrence {
    a: EL_O_COEFFICIENTS.0,
    b: EL_O_COEFFICIENTS.1,
};
const EL_E: ThermoOptic = ThermoOptic::EdwardsLawrence {
    a: EL_E_COEFFICIENTS.0,
    b: EL_E_COEFFICIENTS.1,
};

/// The Edwards–Lawrence formula (see [`ThermoOptic::EdwardsLawrence`]) at `t_c` °C, written in
/// the catalogue's form n² = a + b/(λ² − c) − d λ²: the LiNbO3 source `edwards-1984` at 20 °C and
/// its temperature shift both evaluate it.
pub(super) const fn edwards_lawrence(a: [f64; 4], b: [f64; 3], t_c: f64) -> Dispersion {
    let f = (t_c - 24.5) * (t_c + 24.5 + 546.0);
    let pole = a[2] + b[1] * f;
    Dispersion::PoleAndIr {
        a: a[0] + b[2] * f,
        b: a[1] + b[0] * f,
        c: pole * pole,
        d: a[3],
    }
}

#[cfg(test)]
mod tests {
    use super::super::{biaxial_catalogue, catalogue, find, find_biaxial};
    use super::*;
    use crate::precision::assert_within;

    fn wl(nm: f64) -> Wavelength {
        Wavelength::from_nm(nm).expect("positive")
    }

    #[test]
    fn every_catalogue_crystal_has_temperature_data_and_20_c_is_the_catalogue_bit_for_bit() {
        // The contract's promise: a document without temperature_c gives today's numbers.
        for m in catalogue() {
            assert!(thermal(m.key).is_some(), "{} has temperature data", m.key);
            for nm in [450.0, 632.8, 1064.0] {
                assert_eq!(
                    m.indices_at(wl(nm), 20.0).unwrap(),
                    m.indices(wl(nm)).unwrap(),
                    "{}",
                    m.key
                );
                assert_eq!(
                    m.group_indices_at(wl(nm), 20.0).unwrap(),
                    m.group_indices(wl(nm)).unwrap(),
                    "{}",
                    m.key
                );
            }
        }
        for m in biaxial_catalogue() {
            assert!(thermal(m.key).is_some(), "{} has temperature data", m.key);
            for nm in [532.0, 1064.0] {
                assert_eq!(m.principal_at(wl(nm), 20.0).unwrap(), m.principal(wl(nm)).unwrap());
                assert_eq!(
                    m.group_principal_at(wl(nm), 20.0).unwrap(),
                    m.group_principal(wl(nm)).unwrap()
                );
            }
        }
        assert_eq!(THERMAL.len(), catalogue().len() + biaxial_catalogue().len());
    }

    #[test]
    fn published_constants_are_reproduced_as_slopes() {
        // Tropf et al. (Handbook of Optics II, ch. 33, Table 20, as quoted by ndispers 0.20.0):
        // quartz dn_o/dT = −6.2e-6 /K at 546 nm; MgF2 below; Petrov et al. 2010, Table 3:
        // BiBO +3.5e-6, −5.6e-6, −6.8e-6 /K at 1064 nm. The slope over ±10 K reproduces them.
        // (key, nm, ordinary?, published dn/dT, allowed, source): the slope over 10-30 °C.
        let rows = [
            ("quartz", 546.1, true, -6.2e-6, 1e-15, "quartz dn_o/dT, Tropf"),
            // Tropf et al., Table 20, from A. Feldman et al. (1978), as quoted by ndispers.
            (
                "mgf2",
                632.8,
                true,
                1.12e-6,
                1e-15,
                "MgF2 dn_o/dT at 633 nm, Tropf/Feldman",
            ),
            // The extraordinary indices move with the directly measured retardance coefficient
            // (Etzel et al. 2000): Tropf's quartz dn_e/dT, −7.0e-6 /K at 546 nm, is met to within
            // the spread of the per-index handbook sets (0.7e-6 /K between Tropf's and
            // Toyoda–Yabe's dn_o/dT); ours is −7.45e-6.
            ("quartz", 546.1, false, -7.0e-6, 0.5e-6, "quartz dn_e/dT, Tropf"),
        ];
        for (key, nm, ordinary, want, allowed, source) in rows {
            let m = find(key).unwrap();
            let n = |t: f64| {
                let ix = m.indices_at(wl(nm), t).unwrap().indices;
                if ordinary { ix.no } else { ix.ne }
            };
            assert_within((n(30.0) - n(10.0)) / 20.0, want, allowed, source);
        }
        let b = find_biaxial("bibo").unwrap();
        let (lo, hi) = (
            b.principal_at(wl(1064.0), 10.0).unwrap(),
            b.principal_at(wl(1064.0), 30.0).unwrap(),
        );
        for (k, want) in [3.5e-6, -5.6e-6, -6.8e-6].into_iter().enumerate() {
            let got = (hi.principal[k] - lo.principal[k]) / 20.0;
            assert_within(got, want, 1e-15, "BiBO dn/dT, Petrov et al. 2010 Table 3");
        }
    }

    #[test]
    fn group_shifts_agree_with_a_central_difference() {
        // Independent method: Δn_g = Δn − λ ∂Δn/∂λ with the derivative from a central difference
        // of the phase shift (step 1e-4 µm), for every wavelength-dependent form.
        for key in ["ktp", "lbo", "linbo3", "yvo4"] {
            let th = thermal(key).unwrap();
            for law in th.thermo_optic {
                for (um, t) in [(0.6, 80.0), (1.064, 150.0), (1.5, -20.0)] {
                    let h = 1e-4;
                    let at = Reference {
                        value: 0.0,
                        index: 1.0,
                        above_x: 0.0,
                    };
                    let s = |x: f64| law.shift(Quantity::Phase, x, t, at).unwrap();
                    let want = s(um) - um * (s(um + h) - s(um - h)) / (2.0 * h);
                    let got = law.shift(Quantity::Group, um, t, at).unwrap();
                    // Truncation error about h² Δn‴ λ/6, a relative 1e-7 here; allowed 1e-6.
                    let what = format!("{key} group shift at {um} µm, {t} °C");
                    crate::precision::assert_close(got, want, 1e-6, 1e-6, &what);
                }
            }
        }
    }

    #[test]
    fn a_birefringence_proportional_shift_moves_the_group_index_by_its_wavelength_derivative() {
        // Independent method: the group index n_g = n − λ dn/dλ at T, its derivative a central
        // difference (step 0.1 nm) of the phase indices at T, against the group indices at T
        // (catalogue group index plus the analytic shift), both as shifts from 20 °C. Truncation λ h² n‴/6 is about 1e-13
        // and rounding about λ·2e-16/2h = 6e-13 with h = 0.1 nm; 1e-11 is allowed, against the
        // 5e-9 a shift scaled by the phase birefringence instead of the group one would leave.
        for key in ["quartz", "mgf2"] {
            let m = find(key).unwrap();
            for (nm, t) in [(633.0, 80.0), (1064.0, -10.0), (1539.0, 60.0)] {
                let h = 0.1;
                // The shifts from 20 °C, so that the catalogue's own group index drops out.
                let ng = |t: f64| {
                    let ne = |x: f64| m.indices_at(wl(x), t).unwrap().indices.ne;
                    ne(nm) - nm * (ne(nm + h) - ne(nm - h)) / (2.0 * h)
                };
                let want = ng(t) - ng(REFERENCE_C);
                let group = |t: f64| m.group_indices_at(wl(nm), t).unwrap().indices.ne;
                let got = group(t) - group(REFERENCE_C);
                assert_within(got, want, 1e-11, &format!("{key} n_g,e at {nm} nm, {t} °C"));
            }
        }
    }

    #[test]
    fn ghosh_s_model_moves_both_group_indices_by_their_wavelength_derivative() {
        // Independent method as above: n_g = n − λ dn/dλ at T from a five-point central
        // difference (step 0.1 nm: truncation λ h⁴ n⁽⁵⁾/30, below 1e-15; the three-point one left
        // 1e-10 at 450 nm, near sapphire's gap) of the phase indices at T, both indices, as
        // shifts from 20 °C. Ghosh's shift divides by the 20 °C index, whose own wavelength
        // dependence the analytic group shift must carry (leaving out its S (n − n_g)/n term
        // would leave 1e-7 here). Rounding about λ·2e-16·1.5/h = 1.4e-12; 1e-11 allowed.
        for key in ["sapphire", "rutile"] {
            let m = find(key).unwrap();
            for (nm, t) in [(450.0, 80.0), (633.0, -10.0), (1064.0, 60.0), (1500.0, 95.0)] {
                let h = 0.1;
                for ordinary in [true, false] {
                    let pick = |ix: Indices| if ordinary { ix.no } else { ix.ne };
                    let ng = |t: f64| {
                        let n = |x: f64| pick(m.indices_at(wl(x), t).unwrap().indices);
                        let slope = (8.0 * (n(nm + h) - n(nm - h)) - (n(nm + 2.0 * h) - n(nm - 2.0 * h))) / (12.0 * h);
                        n(nm) - nm * slope
                    };
                    let want = ng(t) - ng(REFERENCE_C);
                    let group = |t: f64| pick(m.group_indices_at(wl(nm), t).unwrap().indices);
                    let got = group(t) - group(REFERENCE_C);
                    let what = format!("{key} n_g,{} at {nm} nm, {t} °C", if ordinary { "o" } else { "e" });
                    assert_within(got, want, 1e-11, &what);
                }
            }
        }
    }

    #[test]
    fn ghosh_s_model_stops_at_its_gap_wavelength() {
        // R = λ²/(λ² − λ_ig²) has a pole at λ_ig = hc/E_ig (0.3024 µm for rutile's 4.10 eV): an
        // error there, never an infinite index.
        let law = ThermoOptic::Ghosh {
            g: -132.253e-6,
            h: 64.5269e-6,
            gap_ev: 4.10,
        };
        let at = Reference {
            value: 2.6,
            index: 2.6,
            above_x: 0.0,
        };
        let pole = 1.239_841_984 / 4.10;
        assert_eq!(law.shift(Quantity::Phase, pole, 50.0, at), Err(Breakdown::Resonance));
        assert!(
            law.shift(Quantity::Group, pole * 1.01, 50.0, at)
                .is_ok_and(f64::is_finite)
        );
    }

    #[test]
    fn yvo4_follows_its_source_s_own_fits_between_20_and_140_c() {
        // Shi, Zhang and Shen (2001), as transcribed by the public-domain database of optical
        // constants: the fits at 50 and 80 °C (both indices) and 140 °C (ordinary; the
        // extraordinary 140 °C fit's B is misprinted there), which the linear change between the
        // 20 and 110 °C fits must reproduce. Their own steps are even to about 1e-5 (n_o at 633 nm:
        // 6.01, 5.90, 5.90, 5.90e-4 per 30 K), so 2e-5 is allowed.
        let m = find("yvo4").unwrap();
        assert_eq!(
            (m.ordinary, m.extraordinary),
            (SHI_O_FITS.0, SHI_E_FITS.0),
            "the catalogue's fit"
        );
        let pole = |a, b, c, d| Dispersion::PoleAndIr { a, b, c, d };
        let fits = [
            (50.0, true, pole(3.780527, 0.070594, 0.046270, 0.009625)),
            (80.0, true, pole(3.782355, 0.070636, 0.046955, 0.009580)),
            (140.0, true, pole(3.785769, 0.070820, 0.048179, 0.009382)),
            (50.0, false, pole(4.608590, 0.107970, 0.053254, 0.014313)),
            (80.0, false, pole(4.610330, 0.107681, 0.054187, 0.014464)),
        ];
        for (t, ordinary, fit) in fits {
            for nm in [500.0, 632.8, 1064.0, 1300.0] {
                let ix = m.indices_at(wl(nm), t).unwrap().indices;
                let got = if ordinary { ix.no } else { ix.ne };
                let want = fit.quantity(Quantity::Phase, nm / 1e3).unwrap();
                let what = format!(
                    "YVO4 n_{} at {nm} nm, {t} °C: Shi et al.'s fit",
                    if ordinary { "o" } else { "e" }
                );
                assert_within(got, want, 2e-5, &what);
            }
        }
    }

    #[test]
    fn exactly_the_data_marked_unverified_warn() {
        // The flag and the source's own words agree, and the warning names crystal and source.
        for th in &THERMAL {
            assert_eq!(
                th.verified,
                !th.thermo_optic_source.starts_with("unverified"),
                "{}",
                th.key
            );
            match th.data_warning(th.key) {
                Some(w) => assert!(
                    w.starts_with(&format!("unverified temperature data for {}", th.key))
                        && w.contains(th.thermo_optic_source),
                    "{w}"
                ),
                None => assert!(th.verified, "{}", th.key),
            }
        }
        let flagged: Vec<_> = THERMAL.iter().filter(|t| !t.verified).map(|t| t.key).collect();
        assert_eq!(flagged, ["alpha-bbo", "rutile"]);
    }

    #[test]
    fn outside_the_range_a_warning_names_the_temperature() {
        let ev = find("calcite").unwrap().indices_at(wl(632.8), 300.0).unwrap();
        assert!(
            ev.warnings
                .iter()
                .any(|w| w.contains("300 °C") && w.contains("calcite")),
            "{:?}",
            ev.warnings
        );
        assert!(
            find("calcite")
                .unwrap()
                .indices_at(wl(632.8), 60.0)
                .unwrap()
                .warnings
                .is_empty()
        );
    }

    #[test]
    fn expansion_along_a_direction_is_the_tensor_projection() {
        // A uniaxial crystal with its optic axis at θ to d: α∥ cos²θ + α⊥ sin²θ (the contract's
        // formula, CONVENTIONS.md "Temperature").
        let th = thermal("calcite").unwrap();
        for deg in [0.0_f64, 30.0, 45.0, 90.0, 137.0] {
            let r = crate::optics::anisotropic::orientation(deg.to_radians(), 0.7, 0.3);
            let (c, s) = (deg.to_radians().cos(), deg.to_radians().sin());
            let want = 25e-6 * c * c - 5.8e-6 * s * s;
            assert_within(th.expansion_along(&r, &Vector3::z()), want, 1e-20, "calcite α at θ");
        }
    }
}
