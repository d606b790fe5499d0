//! Dispersion formulas n(λ) of the published forms the catalogue uses, their analytic derivative
//! and the group index n_g = n − λ dn/dλ.
//!
//! Physics. Every form gives n² as a function f of u = λ², with λ the wavelength in micrometres;
//! the index is the positive root n = √f. Its derivative follows from the chain rule,
//! dn/dλ = (df/du)(2λ)/(2n) = λ f′(u)/n, so the group index is
//!
//! ```text
//! n_g = n − λ dn/dλ = n − u f′(u) / n,
//! ```
//!
//! computed here from the analytic u f′(u) of each form (no finite differences), so a group index
//! is exact to rounding wherever the index is. In a transparent region of normal dispersion
//! dn/dλ < 0 and n_g > n. The group velocity of a pulse polarized along a principal axis, in a
//! wave travelling perpendicular to that axis, is c / n_g.
//!
//! Conventions. λ is the wavelength the formula was fitted in (see each catalogue entry); the
//! forms take it in micrometres. Where a formula breaks down (a resonance, n² ≤ 0, n < 1, or a
//! non-finite result) it gives a [`Breakdown`], never a NaN and never a panic.
//!
//! One evaluator. The catalogue's forms ([`Dispersion`], coefficients in static tables) and a
//! document's own coefficients ([`Formula`], held inline) are all evaluated as one general sum,
//! n² = a + Σ b λ²/(λ² − c) + Σ b/(λ² − c) + Σ p_k λ^(2k), so a custom formula with a catalogue
//! crystal's coefficients gives that crystal's indices to the last bit.
//!
//! Sources: the forms are those of the papers cited in the catalogue entries; the group index is
//! the textbook definition (M. Born and E. Wolf, *Principles of Optics*, 7th ed., §1.3.4, from
//! memory).

use crate::error::{Error, finite};

/// Relative closeness, in λ², to a resonance λ² = c of a dispersion formula below which
/// [`Dispersion::index`] gives no index. Within one part in a million of a resonance a single term
/// of size about b·10⁶ dominates n², which is no refractive index of anything; it is reported as a
/// breakdown of the formula instead.
pub(super) const POLE_GUARD: f64 = 1e-6;

/// A dispersion formula for n(λ), λ the vacuum wavelength in micrometres.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Dispersion {
    /// Sellmeier form, one term per resonance.
    ///
    /// # Formula
    /// n² = a + Σ b_i λ² / (λ² − c_i), with each term given as `(b_i, c_i)` and c_i in µm².
    /// Papers that quote resonance *wavelengths* λ_i are entered with c_i = λ_i².
    Sellmeier {
        /// Constant term (1 for the classical form n² − 1 = Σ …).
        a: f64,
        /// The `(b_i, c_i)` pairs, c_i in µm².
        terms: &'static [(f64, f64)],
    },
    /// One ultraviolet pole and a linear infrared correction, the form used for many borate and
    /// vanadate crystals.
    ///
    /// # Formula
    /// n² = a + b / (λ² − c) − d λ², with c in µm², b in µm² and d in µm⁻².
    PoleAndIr {
        /// Constant term.
        a: f64,
        /// Strength of the ultraviolet pole, µm².
        b: f64,
        /// Position of the ultraviolet pole in λ², µm².
        c: f64,
        /// Infrared correction, µm⁻².
        d: f64,
    },
    /// Poles written as b / (λ² − c) and a polynomial in λ², the form of several biaxial
    /// crystals' formulas (two poles for KTP, one pole and powers up to λ⁶ for LBO).
    ///
    /// # Formula
    /// n² = a + Σ b_i / (λ² − c_i) + Σ_k p_k λ^(2k), k = 1, 2, …; `poles` holds `(b_i, c_i)`
    /// (both in µm²) and `powers` holds p_1, p_2, … (p_k in µm^(−2k)), signs included.
    Poles {
        /// Constant term.
        a: f64,
        /// The `(b_i, c_i)` pairs, µm².
        poles: &'static [(f64, f64)],
        /// The coefficients p_1, p_2, … of λ², λ⁴, …, with their signs.
        powers: &'static [f64],
    },
}

/// Why a dispersion formula gives no usable index at a wavelength.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Breakdown {
    /// The wavelength itself is not finite or not positive.
    Wavelength,
    /// λ² lies at, or within a relative 10⁻⁶ of, a resonance of the formula.
    Resonance,
    /// The formula gives n² ≤ 0 or a non-finite n² (the value, which may be NaN or infinite).
    NotReal(f64),
    /// The formula gives a real index below 1 (the value).
    BelowOne(f64),
    /// The index is defined but its wavelength derivative is not finite (only at wavelengths so
    /// extreme that λ² overflows or underflows), so there is no group index.
    NoGroupIndex,
}

impl Breakdown {
    /// The reason in words, for messages: "it is at a resonance of the formula", "it gives
    /// n² = -7.8, not a positive number", "it gives n = 0.83, below 1".
    pub fn reason(&self) -> String {
        match self {
            Breakdown::Wavelength => "the wavelength is not a positive number".into(),
            Breakdown::Resonance => "the wavelength is at a resonance (pole) of the formula".into(),
            Breakdown::NotReal(n2) if n2.is_finite() => {
                format!("it gives n² = {}, not a positive number", crate::numfmt::sig(*n2, 3))
            }
            Breakdown::NotReal(_) => "it gives no finite n²".into(),
            Breakdown::BelowOne(n) => format!("it gives n = {}, below 1", crate::numfmt::sig(*n, 4)),
            Breakdown::NoGroupIndex => "its derivative, and so the group index, is not finite".into(),
        }
    }
}

/// What of a formula is evaluated: the (phase) index n or the group index n − λ dn/dλ.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Quantity {
    /// The refractive (phase) index n.
    Phase,
    /// The group index n_g = n − λ dn/dλ.
    Group,
}

impl Quantity {
    /// The quantity's name in messages: "index" or "group index".
    pub fn noun(self) -> &'static str {
        match self {
            Quantity::Phase => "index",
            Quantity::Group => "group index",
        }
    }
}

impl Dispersion {
    /// n at `um` micrometres, or `None` where the formula breaks down (see [`Dispersion::evaluate`]).
    pub fn index(&self, um: f64) -> Option<f64> {
        self.evaluate(um).ok()
    }

    /// n at `um` micrometres, or why the formula breaks down there.
    ///
    /// # Errors
    /// [`Breakdown::Wavelength`] when `um` is not finite or not positive;
    /// [`Breakdown::Resonance`] when λ² lies within a relative 10⁻⁶ of one of the formula's
    /// resonances; [`Breakdown::NotReal`] when the formula gives n² ≤ 0 or a non-finite n² (which
    /// also covers coefficients that are themselves NaN or infinite); [`Breakdown::BelowOne`] when
    /// it gives a real index below 1. It never panics.
    pub fn evaluate(&self, um: f64) -> Result<f64, Breakdown> {
        self.quantity(Quantity::Phase, um)
    }

    /// The group index n_g = n − λ dn/dλ at `um` micrometres, from the analytic derivative.
    ///
    /// # Formula
    /// n_g = n − u f′(u)/n with n² = f(u), u = λ² (see the module header).
    ///
    /// # Errors
    /// Where [`Dispersion::evaluate`] fails, with the same reason; [`Breakdown::NoGroupIndex`]
    /// where the index exists but the derivative is not finite. It never panics.
    pub fn group_index(&self, um: f64) -> Result<f64, Breakdown> {
        self.quantity(Quantity::Group, um)
    }

    /// The phase or the group index, as `q` says.
    ///
    /// # Errors
    /// As [`Dispersion::evaluate`] or [`Dispersion::group_index`].
    pub fn quantity(&self, q: Quantity, um: f64) -> Result<f64, Breakdown> {
        // Every form is a case of the one general sum; the pole-and-IR form's − d λ² is the
        // power p_1 = −d (exactly: x + (−d)u and x − d u round alike).
        match *self {
            Dispersion::Sellmeier { a, terms } => Terms {
                a,
                sellmeier: terms,
                poles: &[],
                powers: &[],
            }
            .quantity(q, um),
            Dispersion::PoleAndIr { a, b, c, d } => Terms {
                a,
                sellmeier: &[],
                poles: &[(b, c)],
                powers: &[-d],
            }
            .quantity(q, um),
            Dispersion::Poles { a, poles, powers } => Terms {
                a,
                sellmeier: &[],
                poles,
                powers,
            }
            .quantity(q, um),
        }
    }
}

impl Evaluate for Dispersion {
    fn quantity(&self, q: Quantity, um: f64) -> Result<f64, Breakdown> {
        Dispersion::quantity(self, q, um)
    }
}

/// Anything that gives a phase or group index at a wavelength in micrometres: the catalogue's
/// [`Dispersion`] and a document's own [`Formula`], evaluated by the same code.
pub trait Evaluate {
    /// The phase or the group index at `um` micrometres, as `q` says.
    ///
    /// # Errors
    /// As [`Dispersion::quantity`].
    fn quantity(&self, q: Quantity, um: f64) -> Result<f64, Breakdown>;
}

/// Most terms a [`Formula`] holds in each of its lists.
pub const MAX_TERMS: usize = 6;

/// A dispersion formula given by its coefficients at run time (a custom crystal's), in the general
/// form that covers the catalogue's Sellmeier and pole-and-IR forms.
///
/// # Formula
/// n² = a + Σ b_i λ² / (λ² − c_i) + Σ b_j / (λ² − c_j) − d λ², λ in µm, every c in µm²: the
/// `sellmeier` terms (b_i, c_i), the `poles` (b_j, c_j) and the infrared term d (`ir`, µm⁻²).
/// Up to [`MAX_TERMS`] terms in each list, held inline so that the formula is plain `Copy` data.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Formula {
    a: f64,
    sellmeier: [(f64, f64); MAX_TERMS],
    sellmeier_len: usize,
    poles: [(f64, f64); MAX_TERMS],
    poles_len: usize,
    ir: f64,
}

impl Formula {
    /// A formula from its coefficients.
    ///
    /// # Errors
    /// Field `a` or `ir` when not finite; `sellmeier` or `poles` when holding more than
    /// [`MAX_TERMS`] terms; `sellmeier[i][0]` (b) when not finite and `sellmeier[i][1]` (c) when
    /// not finite or negative (c is a squared resonance wavelength), likewise for `poles`.
    pub fn new(a: f64, sellmeier: &[(f64, f64)], poles: &[(f64, f64)], ir: f64) -> Result<Formula, Error> {
        let a = finite("a", a)?;
        let ir = finite("ir", ir)?;
        let list = |name: &str, terms: &[(f64, f64)]| -> Result<[(f64, f64); MAX_TERMS], Error> {
            if terms.len() > MAX_TERMS {
                return Err(Error::new(name, format!("holds more than {MAX_TERMS} terms")));
            }
            let mut out = [(0.0, 0.0); MAX_TERMS];
            for (i, (slot, &(b, c))) in out.iter_mut().zip(terms).enumerate() {
                // c is a resonance wavelength squared, µm².
                let (j, why) = match (b.is_finite(), c.is_finite() && c >= 0.0) {
                    (false, _) => (0, "must be a finite number"),
                    (_, false) => (1, "must be a finite number, 0 or more (a wavelength squared, µm²)"),
                    _ => {
                        *slot = (b, c);
                        continue;
                    }
                };
                return Err(Error::new(format!("{name}[{i}][{j}]"), why));
            }
            Ok(out)
        };
        Ok(Formula {
            a,
            sellmeier: list("sellmeier", sellmeier)?,
            sellmeier_len: sellmeier.len(),
            poles: list("poles", poles)?,
            poles_len: poles.len(),
            ir,
        })
    }

    /// The constant term a.
    pub fn a(&self) -> f64 {
        self.a
    }

    /// The Sellmeier terms (b, c), c in µm².
    pub fn sellmeier(&self) -> &[(f64, f64)] {
        &self.sellmeier[..self.sellmeier_len.min(MAX_TERMS)]
    }

    /// The pole terms (b, c), both in µm².
    pub fn poles(&self) -> &[(f64, f64)] {
        &self.poles[..self.poles_len.min(MAX_TERMS)]
    }

    /// The infrared coefficient d of − d λ², µm⁻².
    pub fn ir(&self) -> f64 {
        self.ir
    }

    /// The phase or the group index at `um` micrometres, as `q` says.
    ///
    /// # Errors
    /// As [`Dispersion::quantity`]; it never panics.
    pub fn quantity(&self, q: Quantity, um: f64) -> Result<f64, Breakdown> {
        Terms {
            a: self.a,
            sellmeier: self.sellmeier(),
            poles: self.poles(),
            powers: &[-self.ir],
        }
        .quantity(q, um)
    }
}

impl Evaluate for Formula {
    fn quantity(&self, q: Quantity, um: f64) -> Result<f64, Breakdown> {
        Formula::quantity(self, q, um)
    }
}

/// The general sum every formula is evaluated as: n² = a + Σ b λ²/(λ² − c) (`sellmeier`)
/// + Σ b/(λ² − c) (`poles`) + Σ_k p_k λ^(2k) (`powers`, k = 1, 2, …).
struct Terms<'a> {
    a: f64,
    sellmeier: &'a [(f64, f64)],
    poles: &'a [(f64, f64)],
    powers: &'a [f64],
}

impl Terms<'_> {
    /// The phase index √f or the group index n − u f′(u)/n (see the module header).
    fn quantity(&self, q: Quantity, um: f64) -> Result<f64, Breakdown> {
        let (n2, slope) = self.square_and_slope(um)?;
        let n = n2.sqrt();
        match q {
            Quantity::Phase => Ok(n),
            Quantity::Group => {
                let ng = n - slope / n;
                if ng.is_finite() {
                    Ok(ng)
                } else {
                    Err(Breakdown::NoGroupIndex)
                }
            }
        }
    }

    /// n² = f(u) and u f′(u) at u = λ², λ = `um`; n² is checked (positive, finite, n ≥ 1), the
    /// slope is not (it may be non-finite only at overflowing λ²).
    fn square_and_slope(&self, um: f64) -> Result<(f64, f64), Breakdown> {
        if !(um.is_finite() && um > 0.0) {
            return Err(Breakdown::Wavelength);
        }
        let u = um * um; // may overflow to +inf or underflow to 0 at the extremes; see below
        let (mut n2, mut slope) = (self.a, 0.0);
        for &(b, c) in self.sellmeier {
            if near_pole(u, c) {
                return Err(Breakdown::Resonance);
            }
            // b u/(u − c) written as b/(1 − x), x = c/u: exact limits b at u = ∞ and 0 at u = 0,
            // where the textbook form would give ∞/∞ or 0/0. Its u·d/du is −b x/(1 − x)², which
            // tends to 0 at both ends (x = ∞ taken as its limit).
            let x = c / u;
            n2 += b / (1.0 - x);
            if x.is_finite() {
                slope -= b * x / ((1.0 - x) * (1.0 - x));
            }
        }
        for &(b, c) in self.poles {
            if near_pole(u, c) {
                return Err(Breakdown::Resonance);
            }
            n2 += b / (u - c);
            slope += pole_slope(b, c, u);
        }
        let mut uk = 1.0;
        for (k, &p) in (1..).zip(self.powers) {
            uk *= u;
            // A zero power stays zero even at λ² = ∞ (0 · ∞ would be NaN).
            if p != 0.0 {
                n2 += p * uk;
                slope += f64::from(k) * p * uk;
            }
        }
        if !(n2.is_finite() && n2 > 0.0) {
            return Err(Breakdown::NotReal(n2));
        }
        let n = n2.sqrt();
        if n < 1.0 {
            return Err(Breakdown::BelowOne(n));
        }
        Ok((n2, slope))
    }
}

/// u · d/du of the pole term b/(u − c): −b u/(u − c)², 0 in the limit u = ∞.
fn pole_slope(b: f64, c: f64, u: f64) -> f64 {
    if u.is_finite() {
        let r = u - c;
        -b * (u / r) / r
    } else {
        0.0
    }
}

/// Whether λ² is at, or within [`POLE_GUARD`] of, the resonance λ² = c.
fn near_pole(l2: f64, c: f64) -> bool {
    (l2 - c).abs() <= POLE_GUARD * c.abs()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every form, with coefficients of the sizes the catalogue holds.
    const FORMS: [Dispersion; 4] = [
        Dispersion::Sellmeier {
            a: 1.0,
            terms: &[(1.43, 0.0053), (0.65, 0.0142), (5.34, 325.0)],
        },
        Dispersion::PoleAndIr {
            a: 3.0759,
            b: 0.03169,
            c: 0.03323,
            d: 0.01402,
        },
        Dispersion::Poles {
            a: 3.291,
            poles: &[(0.0414, 0.03978), (9.35522, 31.45571)],
            powers: &[],
        },
        Dispersion::Poles {
            a: 2.539,
            poles: &[(0.01277, 0.01189)],
            powers: &[-0.01849, 4.3025e-5, -2.9131e-5],
        },
    ];

    #[test]
    fn group_index_agrees_with_a_central_difference() {
        // Independent method: n_g = n − λ dn/dλ with dn/dλ from a central difference of n
        // (step 1e-4 µm; truncation error about h² n‴/6 ≈ 1e-8 here, rounding about
        // 1e-16/1e-4 = 1e-12). Tolerance 1e-7.
        for d in FORMS {
            for i in 0..60 {
                let um = 0.4 + 2.0 * f64::from(i) / 59.0;
                let h = 1e-4;
                let (up, down) = (d.index(um + h), d.index(um - h));
                let (Some(up), Some(down), Some(n)) = (up, down, d.index(um)) else {
                    panic!("{d:?} defined near {um} µm");
                };
                let want = n - um * (up - down) / (2.0 * h);
                let got = d.group_index(um).expect("defined");
                assert!(
                    (got - want).abs() <= 1e-7,
                    "{d:?} at {um} µm: analytic {got}, difference {want}"
                );
            }
        }
    }

    #[test]
    fn the_poles_form_agrees_with_its_textbook_expression() {
        // LBO-like y formula written out by hand at 1.064 µm.
        let u: f64 = 1.064 * 1.064;
        let want = (2.539 + 0.01277 / (u - 0.01189) - 0.01849 * u + 4.3025e-5 * u * u - 2.9131e-5 * u * u * u).sqrt();
        let got = FORMS[3].index(1.064).expect("defined");
        assert!((got - want).abs() <= 1e-15, "{got} against {want}");
    }

    #[test]
    fn group_index_never_panics_at_extreme_wavelengths() {
        for d in FORMS {
            for um in [1e-300, 1e-160, 1e-9, 1e-3, 1.0, 1e3, 1e9, 1e160, 1e300, f64::MAX] {
                match d.group_index(um) {
                    Ok(ng) => assert!(ng.is_finite(), "{d:?} at {um}"),
                    Err(b) => assert!(!b.reason().is_empty()),
                }
            }
            for q in [Quantity::Phase, Quantity::Group] {
                assert_eq!(d.quantity(q, f64::NAN), Err(Breakdown::Wavelength));
                assert_eq!(d.quantity(q, -1.0), Err(Breakdown::Wavelength));
            }
        }
        // A pole of the Poles form is a resonance, as for the other forms.
        let at_pole = 31.45571_f64.sqrt();
        assert_eq!(FORMS[2].group_index(at_pole), Err(Breakdown::Resonance));
        assert_eq!(FORMS[2].evaluate(at_pole), Err(Breakdown::Resonance));
    }
}

#[cfg(test)]
mod formula_tests {
    use super::*;
    use crate::optics::material::{biaxial_catalogue, catalogue};

    /// The catalogue form as a [`Formula`], where the general form holds it (powers beyond λ²
    /// are not part of it).
    fn as_formula(d: &Dispersion) -> Option<Formula> {
        match *d {
            Dispersion::Sellmeier { a, terms } => Formula::new(a, terms, &[], 0.0).ok(),
            Dispersion::PoleAndIr { a, b, c, d } => Formula::new(a, &[], &[(b, c)], d).ok(),
            Dispersion::Poles { a, poles, powers } => match powers {
                [] => Formula::new(a, &[], poles, 0.0).ok(),
                [p] => Formula::new(a, &[], poles, -p).ok(),
                _ => None,
            },
        }
    }

    #[test]
    fn catalogue_formulas_as_owned_coefficients_evaluate_bit_for_bit() {
        // Independent of the shared code path only in how the coefficients are held: the point is
        // that the catalogue's numbers cannot drift when a document re-enters them.
        let formulas = catalogue()
            .iter()
            .flat_map(|m| [m.ordinary, m.extraordinary])
            .chain(biaxial_catalogue().iter().flat_map(|m| m.formulas));
        let mut checked = 0;
        for d in formulas {
            let Some(f) = as_formula(&d) else { continue };
            checked += 1;
            for i in 0..200 {
                let um = 0.15 * 1.02_f64.powi(i);
                for q in [Quantity::Phase, Quantity::Group] {
                    assert_eq!(f.quantity(q, um), d.quantity(q, um), "{d:?} at {um} µm");
                }
            }
        }
        assert!(checked >= 14, "{checked} formulas checked");
    }

    #[test]
    fn bad_coefficients_name_their_field() {
        let cases = [
            (Formula::new(f64::NAN, &[], &[], 0.0), "a"),
            (Formula::new(1.0, &[], &[], f64::INFINITY), "ir"),
            (Formula::new(1.0, &[(1.0, -0.1)], &[], 0.0), "sellmeier[0][1]"),
            (
                Formula::new(1.0, &[(1.0, 0.1), (f64::NAN, 0.1)], &[], 0.0),
                "sellmeier[1][0]",
            ),
            (Formula::new(1.0, &[], &[(1.0, f64::NAN)], 0.0), "poles[0][1]"),
            (Formula::new(1.0, &[], &[(0.1, 1.0); 7], 0.0), "poles"),
        ];
        for (got, field) in cases {
            assert_eq!(got.expect_err(field).field, field);
        }
        let f = Formula::new(2.0, &[(0.5, 0.02)], &[(0.01, 0.03)], 0.001).expect("valid");
        assert_eq!(
            (f.a(), f.sellmeier(), f.poles(), f.ir()),
            (2.0, &[(0.5, 0.02)][..], &[(0.01, 0.03)][..], 0.001)
        );
    }

    proptest::proptest! {
        #![proptest_config(proptest::prelude::ProptestConfig::with_cases(2000))]
        /// Random coefficients (wide magnitudes, negative strengths, poles anywhere) at random
        /// wavelengths: never a panic, and every index given is a finite number (phase ≥ 1).
        #[test]
        fn random_coefficients_give_a_finite_index_or_a_reason(
            a in -1e6f64..1e6,
            s in proptest::collection::vec((-1e6f64..1e6, 0.0f64..1e6), 0..=MAX_TERMS),
            p in proptest::collection::vec((-1e6f64..1e6, 0.0f64..1e6), 0..=MAX_TERMS),
            ir in -1e3f64..1e3,
            um in proptest::prelude::prop_oneof![1e-6f64..1e3, proptest::num::f64::ANY],
        ) {
            let f = Formula::new(a, &s, &p, ir).expect("finite coefficients");
            match f.quantity(Quantity::Phase, um) {
                Ok(n) => proptest::prop_assert!(n.is_finite() && n >= 1.0, "n = {n}"),
                Err(why) => proptest::prop_assert!(!why.reason().is_empty()),
            }
            if let Ok(ng) = f.quantity(Quantity::Group, um) {
                proptest::prop_assert!(ng.is_finite(), "n_g = {ng}");
            }
        }
    }
}
