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
//! (n² ≤ 0, a pole, n < 1) the error names the axis's field, e.g. `dispersion.e`. A custom formula
//! carries no thermo-optic data: at any temperature it gives the same indices, with a warning.
//!
//! Sources: the form is that of the catalogue's entries (src/optics/material/dispersion.rs);
//! the coefficients and their citation are the document's.

use crate::contract::fields::{Fields, number_list, type_name};
use crate::error::Error;
use crate::numfmt::{quote, quote_text};
use crate::optics::material::dispersion::{Formula, MAX_TERMS};
use crate::optics::material::{self, Quantity};
use crate::optics::wavelength::Wavelength;
use serde_json::{Value, json};

/// Longest `citation` accepted, in bytes (held inline so that a crystal stays plain data).
pub const MAX_CITATION_BYTES: usize = 300;

/// The name the catalogue's messages give a custom formula, and the element report's `material`.
pub const CUSTOM_DISPERSION: &str = "custom dispersion";

/// The principal formulas of a custom crystal.
// Held inline, not boxed, so that a crystal stays plain `Copy` data (see `Medium`).
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Axes {
    /// `o` and `e` of a uniaxial crystal (the optic axis is the third principal axis).
    Uniaxial([Formula; 2]),
    /// `x`, `y`, `z` on the three principal axes.
    Biaxial([Formula; 3]),
}

/// A crystal's own dispersion: its formulas, their validity range, what they were fitted in and
/// where they come from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CustomDispersion {
    /// Validity range of the formulas, nm, `(low, high)` with 0 < low < high.
    pub range_nm: (f64, f64),
    /// The formulas.
    pub axes: Axes,
    /// Whether the source fitted the formulas to wavelengths in air (`fitted_in`: "air").
    pub fitted_in_air: bool,
    citation: [u8; MAX_CITATION_BYTES],
    citation_len: usize,
}

impl CustomDispersion {
    /// Reads the `dispersion` object found at `path` (e.g. `elements[2].dispersion`).
    ///
    /// # Errors
    /// The exact field: `range_nm` (not two numbers, not positive, reversed), `o`/`e`/`x`/`y`/`z`
    /// (missing, mixed forms) and within a formula `a`, `ir`, `sellmeier[i][j]`, `poles[i][j]`
    /// (not finite, C < 0, more than [`MAX_TERMS`] terms), `fitted_in`, `citation`, or an unknown
    /// member.
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
            return Err(Error::new(
                format!("{range_path}[0]"),
                format!("must be above 0 nm, got {}", quote(r[0])),
            ));
        }
        if r[1] <= r[0] {
            return Err(Error::new(
                &range_path,
                format!(
                    "must be [low, high] with low < high, got [{}, {}]",
                    quote(r[0]),
                    quote(r[1])
                ),
            ));
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
        let mut formula = |name: &'static str| -> Result<Formula, Error> {
            let p = f.path_of(name);
            let v = f.get(name).ok_or_else(|| {
                Error::new(
                    &p,
                    "is required: {\"a\": …, \"sellmeier\": [[B, C], …], \"poles\": [[B, C], …], \"ir\": …}",
                )
            })?;
            read_formula(&p, v)
        };
        let axes = if biaxial {
            Axes::Biaxial([formula("x")?, formula("y")?, formula("z")?])
        } else {
            Axes::Uniaxial([formula("o")?, formula("e")?])
        };
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
        let citation_text = f.string("citation")?.unwrap_or_default();
        if citation_text.len() > MAX_CITATION_BYTES {
            return Err(Error::new(
                f.path_of("citation"),
                format!(
                    "is {} bytes long; at most {MAX_CITATION_BYTES} are accepted",
                    citation_text.len()
                ),
            ));
        }
        let mut citation = [0u8; MAX_CITATION_BYTES];
        citation[..citation_text.len()].copy_from_slice(citation_text.as_bytes());
        f.finish()?;
        Ok(CustomDispersion {
            range_nm: (r[0], r[1]),
            axes,
            fitted_in_air,
            citation,
            citation_len: citation_text.len(),
        })
    }

    /// The `citation` as given, if any.
    pub fn citation(&self) -> Option<&str> {
        let bytes = self.citation.get(..self.citation_len).unwrap_or_default();
        std::str::from_utf8(bytes).ok().filter(|s| !s.is_empty())
    }

    /// `fitted_in` as the document spells it.
    pub fn fitted_in(&self) -> &'static str {
        if self.fitted_in_air { "air" } else { "vacuum" }
    }

    /// The `dispersion` object this was read from, with `fitted_in` written out: reading it again
    /// gives the same crystal.
    pub fn document(&self) -> Value {
        let mut v = json!({"range_nm": [self.range_nm.0, self.range_nm.1], "fitted_in": self.fitted_in()});
        for (name, f) in self.named() {
            v[name] = formula_json(f);
        }
        if let Some(c) = self.citation() {
            v["citation"] = json!(c);
        }
        v
    }

    /// What a crystal's report says of its formulas: `{range_nm, fitted_in, citation}`.
    pub fn describe(&self) -> Value {
        json!({
            "range_nm": [self.range_nm.0, self.range_nm.1],
            "fitted_in": self.fitted_in(),
            "citation": self.citation(),
        })
    }

    /// Whether the formulas are given as `o` and `e`.
    pub fn is_uniaxial_form(&self) -> bool {
        matches!(self.axes, Axes::Uniaxial(_))
    }

    /// Each formula with its field name, in document order.
    fn named(&self) -> Vec<(&'static str, &Formula)> {
        match &self.axes {
            Axes::Uniaxial([o, e]) => vec![("o", o), ("e", e)],
            Axes::Biaxial([x, y, z]) => vec![("x", x), ("y", y), ("z", z)],
        }
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
        let values = match &self.axes {
            Axes::Uniaxial([o, e]) => {
                material::principal_values(name, self.range_nm, [("o", o), ("e", e)], q, wavelength)
                    .map(|([o, e], w)| ([o, o, e], w))
            }
            Axes::Biaxial([x, y, z]) => {
                material::principal_values(name, self.range_nm, [("x", x), ("y", y), ("z", z)], q, wavelength)
            }
        };
        values.map_err(|e| {
            let failing = self
                .named()
                .into_iter()
                .find(|(_, f)| f.quantity(q, wavelength.um()).is_err())
                .map_or("", |(n, _)| n);
            Error::new(format!("dispersion.{failing}"), e.message)
        })
    }

    /// The warning a temperature other than 20 °C brings: the formulas have no thermo-optic data.
    pub fn temperature_warning(&self, temperature_c: f64) -> Option<String> {
        (temperature_c != material::REFERENCE_C).then(|| {
            format!(
                "the custom dispersion formula has no thermo-optic data: at {temperature_c} °C its \
                 indices are those of the formula as given, and the thickness that of the document"
            )
        })
    }
}

/// A formula as its document: `a`, and `sellmeier`, `poles` and `ir` where they are not empty or
/// zero.
fn formula_json(f: &Formula) -> Value {
    let pairs = |t: &[(f64, f64)]| t.iter().map(|&(b, c)| json!([b, c])).collect::<Vec<_>>();
    let mut v = json!({"a": f.a()});
    if !f.sellmeier().is_empty() {
        v["sellmeier"] = json!(pairs(f.sellmeier()));
    }
    if !f.poles().is_empty() {
        v["poles"] = json!(pairs(f.poles()));
    }
    if f.ir() != 0.0 {
        v["ir"] = json!(f.ir());
    }
    v
}

/// One formula object at `path`.
fn read_formula(path: &str, v: &Value) -> Result<Formula, Error> {
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
        if items.len() > MAX_TERMS {
            return Err(Error::new(
                &p,
                format!("holds {} terms; at most {MAX_TERMS} are accepted", items.len()),
            ));
        }
        items
            .iter()
            .enumerate()
            .map(|(i, item)| number_list(&format!("{p}[{i}]"), item, 2).map(|bc| (bc[0], bc[1])))
            .collect()
    };
    let sellmeier = terms("sellmeier")?;
    let poles = terms("poles")?;
    let ir = f.number_or("ir", 0.0)?;
    f.finish()?;
    Formula::new(a, &sellmeier, &poles, ir).map_err(|e| e.within(path))
}
