//! A crystal given by its own dispersion coefficients (`dispersion` of a crystal element) instead
//! of a catalogue key or fixed indices: its document form, checks, echo and evaluation.
//!
//! Physics. Each principal index follows one formula of the published general form
//!
//! ```text
//! n² = A + Σ B λ²/(λ² − C) + Σ B/(λ² − C) − D λ²      (λ in µm, C in µm², D in µm⁻²)
//! ```
//!
//! (`{"a": A, "sellmeier": [[B, C], …], "poles": [[B, C], …], "ir": D}`), which holds the
//! catalogue's Sellmeier and pole-and-IR forms; it is evaluated by the catalogue's own code
//! ([`Formula`]), phase and group index alike. A uniaxial crystal gives `o` and `e`, a biaxial one
//! `x`, `y`, `z` (two equal formulas make it uniaxial, as for custom `nx`/`ny`/`nz`).
//!
//! Conventions. Like the catalogue's formulas, a custom formula is handed the vacuum wavelength:
//! `fitted_in` ("vacuum" by default, or "air") records what the source's λ was and is echoed, but
//! no air-to-vacuum correction is applied (see the catalogue's uniaxial module on why). Outside
//! `range_nm` the formula is extrapolated with the catalogue's warning; where it breaks down
//! (n² ≤ 0, a pole, n < 1) the error names the axis's field, e.g. `dispersion.e`.
//!
//! Temperature. Each formula may carry the source's constant thermo-optic coefficient
//! (`dn_dt_per_k`, 1/K) and the crystal's linear expansion along that principal axis
//! (`expansion_per_k`, 1/K; for `o` the coefficient across the optic axis, α⊥, for `e` along it,
//! α∥). At temperature T the index is n(λ) + dn/dT (T − 20 °C), the formula taken to hold at
//! 20 °C as the catalogue's do, and its group index moves by the same amount (a constant dn/dT
//! has no wavelength derivative). The thickness along the element's z axis grows as a catalogue
//! crystal's, α_z = Σ α_i (a_i·ẑ)². An axis without `dn_dt_per_k` keeps its 20 °C index and one
//! without `expansion_per_k` adds no expansion, each with a warning away from 20 °C. The data are
//! taken to hold at every temperature the document allows: a constant dn/dT is the source's
//! linearisation, and its range is the user's to respect.
//!
//! Sources: the form is that of the catalogue's entries (src/optics/material/dispersion.rs) and
//! the temperature laws those of its constant entries (src/optics/material/thermal.rs); the
//! coefficients and their citation are the document's.

use crate::contract::fields::{Fields, number_list, type_name};
use crate::error::{Error, in_range};
use crate::numfmt::quote_text;
use crate::optics::material::dispersion::Formula;
use crate::optics::material::{self, Quantity};
use crate::optics::wavelength::Wavelength;
use serde_json::{Map, Value};

/// Longest `citation` accepted, in characters (held inline so that a crystal stays plain data).
pub const MAX_CITATION_CHARS: usize = 240;

/// The name the catalogue's messages give a custom formula, and the element report's `material`.
pub const CUSTOM_DISPERSION: &str = "custom dispersion";

/// Largest |dn/dT| a formula may carry, 1/K: ten times that of any catalogued crystal.
pub const MAX_DN_DT_PER_K: f64 = 1e-3;

/// Largest |α| a formula may carry, 1/K: several times that of any catalogued crystal.
pub const MAX_EXPANSION_PER_K: f64 = 2e-4;

/// One principal axis's temperature data as the document gives them (`None`: not given).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct AxisThermal {
    /// dn/dT, 1/K (`dn_dt_per_k`).
    pub dn_dt_per_k: Option<f64>,
    /// Linear expansion along the axis, 1/K (`expansion_per_k`).
    pub expansion_per_k: Option<f64>,
}

/// A crystal's own dispersion: its formulas, their validity range, what they were fitted in and
/// where they come from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CustomDispersion {
    /// Validity range of the formulas, nm, `(low, high)` with 0 < low < high.
    pub range_nm: (f64, f64),
    /// The principal formulas: `[o, o, e]` when given as `o` and `e` (the optic axis is the
    /// third principal axis), else `[x, y, z]`.
    formulas: [Formula; 3],
    /// Whether they were given as `o` and `e`.
    uniaxial_form: bool,
    /// Each principal axis's temperature data, in the order of `formulas`.
    thermal: [AxisThermal; 3],
    /// Whether the source fitted the formulas to wavelengths in air (`fitted_in`: "air").
    pub fitted_in_air: bool,
    // Characters rather than UTF-8 bytes: writing them back needs no validation.
    citation: [char; MAX_CITATION_CHARS],
    citation_len: usize,
}

impl CustomDispersion {
    /// Reads the `dispersion` object found at `path` (e.g. `elements[2].dispersion`).
    ///
    /// # Errors
    /// The exact field: `range_nm` (not two numbers, not positive, reversed), `o`/`e`/`x`/`y`/`z`
    /// (missing, mixed forms) and within a formula `a`, `ir`, `sellmeier[i][j]`, `poles[i][j]`
    /// (not finite, C < 0, more than six terms), `dn_dt_per_k`, `expansion_per_k`, `fitted_in`,
    /// `citation`, or an unknown member.
    pub fn read(path: &str, v: &Value) -> Result<CustomDispersion, Error> {
        let mut f = Fields::new(path, v)?;
        let range_path = f.path_of("range_nm");
        let range = f.get("range_nm").ok_or_else(|| {
            Error::new(
                &range_path,
                "is required: [low, high], the formulas' validity range in nm",
            )
        })?;
        let r = number_list(&range_path, range, 2)?; // finite numbers
        if r[0] <= 0.0 {
            return Err(Error::new(format!("{range_path}[0]"), "must be above 0 nm"));
        }
        if r[1] <= r[0] {
            return Err(Error::new(&range_path, "must be [low, high] with low < high"));
        }
        let uniaxial = f.has("o") || f.has("e");
        let biaxial = f.has("x") || f.has("y") || f.has("z");
        if uniaxial && biaxial {
            let name = ["x", "y", "z"].into_iter().find(|n| f.has(n)).unwrap_or("x");
            return Err(Error::new(
                f.path_of(name),
                "give \"o\" and \"e\" (uniaxial) or \"x\", \"y\" and \"z\" (biaxial), not both",
            ));
        }
        let mut formula = |name: &'static str| -> Result<(Formula, AxisThermal), Error> {
            let p = f.path_of(name);
            let v = f
                .get(name)
                .ok_or_else(|| Error::new(&p, "is required: {\"a\": …, \"sellmeier\": [[B, C], …], …}"))?;
            read_formula(&p, v)
        };
        let read = if biaxial {
            [formula("x")?, formula("y")?, formula("z")?]
        } else {
            let o = formula("o")?;
            [o, o, formula("e")?]
        };
        let formulas = read.map(|(formula, _)| formula);
        let thermal = read.map(|(_, thermal)| thermal);
        for name in ["o", "e", "x", "y", "z"] {
            let _ = f.get(name);
        }
        let fitted_in_air = match f.string("fitted_in")? {
            None | Some("vacuum") => false,
            Some("air") => true,
            Some(other) => {
                return Err(Error::new(
                    f.path_of("fitted_in"),
                    format!("unknown value '{}'; expected \"vacuum\" or \"air\"", quote_text(other)),
                ));
            }
        };
        let citation_path = f.path_of("citation");
        let mut citation = ['\0'; MAX_CITATION_CHARS];
        let mut citation_len = 0;
        for ch in f.string("citation")?.unwrap_or_default().chars() {
            let slot = citation.get_mut(citation_len).ok_or_else(|| {
                Error::new(
                    &citation_path,
                    format!("is longer than {MAX_CITATION_CHARS} characters"),
                )
            })?;
            *slot = ch;
            citation_len += 1;
        }
        f.finish()?;
        Ok(CustomDispersion {
            range_nm: (r[0], r[1]),
            formulas,
            uniaxial_form: !biaxial,
            thermal,
            fitted_in_air,
            citation,
            citation_len,
        })
    }

    /// The `citation` as given, if any.
    pub fn citation(&self) -> Option<String> {
        let chars = self.citation.get(..self.citation_len).unwrap_or_default();
        (!chars.is_empty()).then(|| chars.iter().collect())
    }

    /// `fitted_in` as the document spells it.
    pub fn fitted_in(&self) -> &'static str {
        if self.fitted_in_air { "air" } else { "vacuum" }
    }

    /// The `dispersion` object this was read from, with `fitted_in` written out: reading it again
    /// gives the same crystal.
    pub fn document(&self) -> Value {
        let mut v = Map::new();
        v.insert("range_nm".into(), Value::from(vec![self.range_nm.0, self.range_nm.1]));
        v.insert("fitted_in".into(), self.fitted_in().into());
        for (name, f, t) in self.named() {
            v.insert(name.into(), formula_json(f, t));
        }
        if let Some(c) = self.citation() {
            v.insert("citation".into(), c.into());
        }
        Value::Object(v)
    }

    /// Whether the formulas are given as `o` and `e`.
    pub fn is_uniaxial_form(&self) -> bool {
        self.uniaxial_form
    }

    /// The field names of the principal axes, in the order of the formulas: `o`, `o`, `e` or
    /// `x`, `y`, `z`.
    fn axis_names(&self) -> [&'static str; 3] {
        if self.uniaxial_form {
            ["o", "o", "e"]
        } else {
            ["x", "y", "z"]
        }
    }

    /// Each formula with its field name and temperature data, in document order.
    fn named(&self) -> impl Iterator<Item = (&'static str, &Formula, &AxisThermal)> {
        let names = self.axis_names();
        let skip = usize::from(self.uniaxial_form); // `o` is held twice
        (0..3)
            .filter(move |&i| i != skip || !self.uniaxial_form)
            .map(move |i| (names[i], &self.formulas[i], &self.thermal[i]))
    }

    /// The principal values of `q` at `wavelength`, `[n_o, n_o, n_e]` for the `o`/`e` form and
    /// `[n_x, n_y, n_z]` for the other, with the catalogue's out-of-range warning.
    ///
    /// # Errors
    /// `dispersion.o` (or `e`, `x`, …) where that formula breaks down, naming the wavelength and
    /// the reason.
    pub fn principal(&self, q: Quantity, wavelength: Wavelength) -> Result<([f64; 3], Vec<String>), Error> {
        // Messages read "the custom dispersion formula …", as the catalogue's name theirs.
        let name = "custom";
        let names = self.axis_names();
        let [a, b, c] = &self.formulas;
        let values = material::principal_values(
            name,
            self.range_nm,
            [(names[0], a), (names[1], b), (names[2], c)],
            q,
            wavelength,
        );
        values.map_err(|e| {
            // The first formula that fails is the one the message is about.
            let mut failing = names[2];
            for (n, f) in names.iter().zip(&self.formulas).rev() {
                if f.quantity(q, wavelength.um()).is_err() {
                    failing = n;
                }
            }
            Error::new(format!("dispersion.{failing}"), e.message)
        })
    }

    /// The principal phase indices at `wavelength` and `temperature_c` (°C): those of
    /// [`CustomDispersion::principal`] moved by each axis's dn/dT, identical to them at 20 °C;
    /// with the warnings of the range and of temperature data not given.
    ///
    /// # Errors
    /// As [`CustomDispersion::principal`].
    pub fn principal_at(&self, wavelength: Wavelength, temperature_c: f64) -> Result<([f64; 3], Vec<String>), Error> {
        let (mut p, mut warnings) = self.principal(Quantity::Phase, wavelength)?;
        let dt = temperature_c - material::REFERENCE_C;
        for (v, t) in p.iter_mut().zip(&self.thermal) {
            *v += t.dn_dt_per_k.unwrap_or(0.0) * dt;
        }
        warnings.extend(self.temperature_warnings(temperature_c));
        Ok((p, warnings))
    }

    /// The linear expansion coefficient (1/K) along the element's z axis for principal axes
    /// `axes` (columns, element frame; the `o`/`e` form's optic axis is the third): α_z = Σ α_i
    /// (a_i·ẑ)², an axis without `expansion_per_k` counting 0.
    pub fn expansion_along_z(&self, axes: &nalgebra::Matrix3<f64>) -> f64 {
        (0..3)
            .map(|i| self.thermal[i].expansion_per_k.unwrap_or(0.0) * axes[(2, i)].powi(2))
            .sum()
    }

    /// The warnings a temperature other than 20 °C brings: the axes without dn/dT or expansion.
    pub fn temperature_warnings(&self, temperature_c: f64) -> Vec<String> {
        let mut out = Vec::new();
        if temperature_c == material::REFERENCE_C {
            return out;
        }
        let (no_dn, no_alpha) = self.missing_temperature_data();
        let start = "the custom dispersion formula has no";
        if !no_dn.is_empty() {
            out.push(format!(
                "{start} thermo-optic data (dn_dt_per_k) for {no_dn}: those indices at {temperature_c} °C \
                 are the ones at 20 °C"
            ));
        }
        if !no_alpha.is_empty() {
            out.push(format!(
                "{start} thermal expansion (expansion_per_k) for {no_alpha}: the thickness takes no \
                 expansion along those axes"
            ));
        }
        out
    }

    /// Whether any axis carries a dn/dT: a design's temperature figures then say something.
    pub fn has_thermo_optic_data(&self) -> bool {
        self.thermal.iter().any(|t| t.dn_dt_per_k.is_some())
    }

    /// The warning a design answer carries, whatever its temperature, when its changes per kelvin
    /// and temperature bands leave out data the formula lacks; `None` when every axis has both.
    pub fn design_temperature_warning(&self) -> Option<String> {
        let (no_dn, no_alpha) = self.missing_temperature_data();
        let lacks = match (no_dn.is_empty(), no_alpha.is_empty()) {
            (true, true) => return None,
            (false, true) => format!("dn_dt_per_k for {no_dn}"),
            (true, false) => format!("expansion_per_k for {no_alpha}"),
            (false, false) => format!("dn_dt_per_k for {no_dn} and expansion_per_k for {no_alpha}"),
        };
        Some(format!(
            "the custom dispersion formula has no {lacks}: this answer's changes per kelvin and \
             temperature bands count them as zero"
        ))
    }

    /// The axes without dn/dT and those without expansion, each as a list such as "o, e".
    fn missing_temperature_data(&self) -> (String, String) {
        let (mut no_dn, mut no_alpha) = (String::new(), String::new());
        for (name, _, t) in self.named() {
            for (list, given) in [(&mut no_dn, t.dn_dt_per_k), (&mut no_alpha, t.expansion_per_k)] {
                if given.is_none() {
                    list.push_str(if list.is_empty() { "" } else { ", " });
                    list.push_str(name);
                }
            }
        }
        (no_dn, no_alpha)
    }
}

/// A formula as its document: `a`, and `sellmeier`, `poles` and `ir` where they are not empty or
/// zero, and the temperature data given.
fn formula_json(f: &Formula, t: &AxisThermal) -> Value {
    let mut v = Map::new();
    v.insert("a".into(), f.a().into());
    for (name, terms) in [("sellmeier", f.sellmeier()), ("poles", f.poles())] {
        if !terms.is_empty() {
            let pairs: Vec<Value> = terms.iter().map(|&(b, c)| Value::from(vec![b, c])).collect();
            v.insert(name.into(), pairs.into());
        }
    }
    if f.ir() != 0.0 {
        v.insert("ir".into(), f.ir().into());
    }
    for (name, value) in [("dn_dt_per_k", t.dn_dt_per_k), ("expansion_per_k", t.expansion_per_k)] {
        if let Some(x) = value {
            v.insert(name.into(), x.into());
        }
    }
    Value::Object(v)
}

/// One formula object at `path`, with its temperature data.
fn read_formula(path: &str, v: &Value) -> Result<(Formula, AxisThermal), Error> {
    let mut f = Fields::new(path, v)?;
    let a = f.required_number("a")?;
    let mut terms = |name: &'static str| -> Result<Vec<(f64, f64)>, Error> {
        let p = f.path_of(name);
        let Some(list) = f.get(name) else {
            return Ok(Vec::new());
        };
        let Value::Array(items) = list else {
            return Err(Error::new(
                &p,
                format!("must be a list of [B, C] pairs, got {}", type_name(list)),
            ));
        };
        let mut pairs = Vec::with_capacity(items.len());
        for (i, item) in items.iter().enumerate() {
            let bc = number_list(&format!("{p}[{i}]"), item, 2)?;
            pairs.push((bc[0], bc[1]));
        }
        Ok(pairs)
    };
    let sellmeier = terms("sellmeier")?;
    let poles = terms("poles")?;
    let ir = f.number_or("ir", 0.0)?;
    let mut bounded = |name: &'static str, limit: f64| -> Result<Option<f64>, Error> {
        let p = f.path_of(name);
        f.number(name)?.map(|x| in_range(&p, x, -limit, limit)).transpose()
    };
    let thermal = AxisThermal {
        dn_dt_per_k: bounded("dn_dt_per_k", MAX_DN_DT_PER_K)?,
        expansion_per_k: bounded("expansion_per_k", MAX_EXPANSION_PER_K)?,
    };
    f.finish()?;
    let formula = Formula::new(a, &sellmeier, &poles, ir).map_err(|e| e.within(path))?;
    Ok((formula, thermal))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::material::{Dispersion, find, find_biaxial};
    use serde_json::json;

    /// A catalogue formula as the document's formula object (the forms a custom formula holds).
    fn document_of(d: &Dispersion) -> Value {
        let pairs = |t: &[(f64, f64)]| t.iter().map(|&(b, c)| json!([b, c])).collect::<Vec<_>>();
        match *d {
            Dispersion::Sellmeier { a, terms } => json!({"a": a, "sellmeier": pairs(terms)}),
            Dispersion::PoleAndIr { a, b, c, d } => json!({"a": a, "poles": [[b, c]], "ir": d}),
            Dispersion::Poles { a, poles, .. } => json!({"a": a, "poles": pairs(poles)}),
        }
    }

    #[test]
    fn phase_and_group_indices_are_the_catalogues_for_its_own_coefficients() {
        // Independent of the custom path: the catalogue's evaluation of the same published
        // formulas (calcite, G. Ghosh 1999; YVO4's pole-and-IR form; KTP, K. Kato and
        // E. Takaoka 2002, whose formulas are two poles each). The group index is analytic in
        // both, so equality is exact.
        let calcite = find("calcite").expect("catalogued");
        let yvo4 = find("yvo4").expect("catalogued");
        let ktp = find_biaxial("ktp").expect("catalogued");
        for nm in [450.0, 632.8, 1064.0, 1550.0] {
            let wl = Wavelength::from_nm(nm).expect("valid");
            for m in [calcite, yvo4] {
                let doc = json!({"range_nm": [m.range_nm.0, m.range_nm.1],
                                 "o": document_of(&m.ordinary), "e": document_of(&m.extraordinary)});
                let d = CustomDispersion::read("dispersion", &doc).expect("valid");
                let (phase, _) = d.principal(Quantity::Phase, wl).expect("defined");
                let (group, _) = d.principal(Quantity::Group, wl).expect("defined");
                let (ix, gx) = (
                    m.indices(wl).expect("defined").indices,
                    m.group_indices(wl).expect("defined").indices,
                );
                assert_eq!(phase, [ix.no, ix.no, ix.ne], "{} at {nm} nm", m.key);
                assert_eq!(group, [gx.no, gx.no, gx.ne], "{} group at {nm} nm", m.key);
            }
            let [x, y, z] = ktp.formulas.map(|f| document_of(&f));
            let doc = json!({"range_nm": [ktp.range_nm.0, ktp.range_nm.1], "x": x, "y": y, "z": z});
            let d = CustomDispersion::read("dispersion", &doc).expect("valid");
            assert_eq!(
                d.principal(Quantity::Phase, wl).expect("defined").0,
                ktp.principal(wl).expect("defined").principal
            );
            assert_eq!(
                d.principal(Quantity::Group, wl).expect("defined").0,
                ktp.group_principal(wl).expect("defined").principal
            );
        }
    }
}
