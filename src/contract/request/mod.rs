//! The design request documents, each read field by field with its field's path in every error,
//! and the readers they share.
//!
//! One request asks a solver for a part, by `kind`: [`DisplacerRequest`], [`WaveplateRequest`],
//! [`AchromatRequest`], [`RecombinerRequest`], [`SplitterRequest`], [`PolarizerRequest`] and
//! [`TiltRequest`] and [`RotatorRequest`], one file each. Each is read from a [`Fields`]
//! whose `kind` the caller has checked, with the defaults of DEVELOPERS.md ("Design requests")
//! filled in; the caller finishes the [`Fields`], so that an unknown field is an error naming it.
//! A reader refuses a value outside its range rather than clamping it, and a count or a seed with
//! a fraction rather than truncating it. What a request asks is checked here; whether a solver
//! can meet it (a crystal without birefringence, a cut without walk-off) is the solver's error.

pub mod achromat;
pub mod athermal;
pub mod basis;
pub mod broadband;
pub mod displacer;
pub mod filter;
pub mod lc;
pub mod polarizer;
pub mod principal;
pub mod recombiner;
pub mod rotator;
pub mod splitter;
pub mod tilt;
pub mod waveplate;

pub use achromat::AchromatRequest;
pub use athermal::AthermalRequest;
pub use basis::WavelengthBasis;
pub use broadband::BroadbandRequest;
pub use displacer::{DisplacerRequest, Tolerances};
pub use filter::{FilterRequest, Layout};
pub use lc::LcVoltageRequest;
pub use polarizer::PolarizerRequest;
pub use principal::{PrincipalCut, PrincipalPlane};
pub use recombiner::{Middle, RecombinerRequest};
pub use rotator::RotatorRequest;
pub use splitter::{SplitterRequest, SplitterTolerances};
pub use tilt::{PlateSize, TiltRequest};
pub use waveplate::{Order, WaveplateRequest};

use crate::contract::custom_dispersion::CustomDispersion;
use crate::contract::fields::{Fields, number_list};
use crate::contract::scenario::Medium;
use crate::error::{Error, in_range};
use crate::numfmt::quote;
use crate::optics::material::{self, Indices};
use crate::optics::wavelength::Wavelength;

/// The crystal of a request: `material` (a catalogue key, with an optional dispersion `source`),
/// `no` and `ne` (indices 1 to 10), or `dispersion` (the crystal's own formulas, `o` and `e`, as
/// in a scenario).
///
/// # Errors
/// `material` when both forms or neither is given, or for an unknown key; `source` for a source
/// the crystal does not have, or with fixed indices; `no` or `ne` out of range.
fn parse_medium(f: &mut Fields) -> Result<Medium, Error> {
    parse_crystal(f, false)
}

/// The crystal of a request whose solver takes biaxial crystals too: as [`parse_medium`], and
/// also a biaxial catalogue key, custom principal indices `nx`, `ny`, `nz` (1 to 10, not all
/// equal) or biaxial formulas (`x`, `y`, `z`).
///
/// # Errors
/// As [`parse_medium`]; `nx`, `ny` or `nz` out of range or missing; `nz` when the three are equal
/// (an isotropic medium); `material` when principal indices are mixed with other forms.
fn parse_any_crystal(f: &mut Fields) -> Result<Medium, Error> {
    parse_crystal(f, true)
}

/// The custom principal indices `nx`, `ny`, `nz` (see [`parse_any_crystal`]).
fn principal_indices(f: &mut Fields) -> Result<Medium, Error> {
    let path = f.path_of("material");
    if f.has("material") || f.has("no") || f.has("ne") {
        return Err(Error::new(
            path,
            "give either \"material\" or \"no\" and \"ne\" or \"nx\", \"ny\" and \"nz\", not several",
        ));
    }
    let mut n = [0.0; 3];
    for (k, name) in ["nx", "ny", "nz"].into_iter().enumerate() {
        let p = f.path_of(name);
        n[k] = in_range(&p, f.required_number(name)?, 1.0, 10.0)?;
    }
    if n[0] == n[1] && n[1] == n[2] {
        return Err(Error::new(
            f.path_of("nz"),
            format!(
                "nx, ny and nz are all {}: an isotropic medium has no birefringence to design with",
                quote(n[0])
            ),
        ));
    }
    Ok(Medium::Principal(n))
}

fn parse_crystal(f: &mut Fields, biaxial: bool) -> Result<Medium, Error> {
    let path = f.path_of("material");
    let dispersion_path = f.path_of("dispersion");
    if (f.has("nx") || f.has("ny") || f.has("nz")) && !f.has("dispersion") {
        if !biaxial {
            return Err(Error::new(
                path,
                "this design takes a uniaxial crystal: give \"material\" or \"no\" and \"ne\", not \"nx\", \"ny\", \"nz\"",
            ));
        }
        return principal_indices(f);
    }
    if let Some(d) = f.get("dispersion") {
        if f.has("material") || f.has("no") || f.has("ne") {
            return Err(Error::new(
                dispersion_path,
                "give either \"dispersion\" or \"material\" or \"no\" and \"ne\", not several",
            ));
        }
        let formula = CustomDispersion::read(&dispersion_path, d)?;
        if !biaxial && !formula.is_uniaxial_form() {
            return Err(Error::new(
                dispersion_path,
                "this design takes a uniaxial crystal: give its formulas as \"o\" and \"e\"",
            ));
        }
        return Ok(Medium::Formula(formula));
    }
    match (f.has("material"), f.has("no") || f.has("ne")) {
        (true, true) => Err(Error::new(
            path,
            "give either \"material\" or \"no\" and \"ne\", not both",
        )),
        (true, false) => {
            let key = f.string("material")?.unwrap_or_default();
            if let Some(b) = material::find_biaxial(key).filter(|_| biaxial) {
                let _ = (f.get("no"), f.get("ne"));
                return crate::contract::scenario::parse_source(f, Medium::Biaxial(b));
            }
            let m = material::find(key).ok_or_else(|| {
                let why = if material::find_biaxial(key).is_some() {
                    format!("'{key}' is a biaxial crystal; this design takes a uniaxial one")
                } else {
                    format!("unknown material '{key}'")
                };
                let mut known = material::keys();
                if biaxial {
                    known.extend(material::biaxial_keys());
                }
                Error::new(&path, format!("{why}; known: {}", known.join(", ")))
            })?;
            let _ = (f.get("no"), f.get("ne"));
            crate::contract::scenario::parse_source(f, Medium::Catalogue(m))
        }
        (false, true) => {
            let (pn, pe) = (f.path_of("no"), f.path_of("ne"));
            let no = in_range(&pn, f.required_number("no")?, 1.0, 10.0)?;
            let ne = in_range(&pe, f.required_number("ne")?, 1.0, 10.0)?;
            let _ = f.get("material");
            Ok(Medium::Custom(Indices::new(no, ne)?))
        }
        (false, false) => Err(Error::new(
            path,
            format!(
                "is required (or give \"no\" and \"ne\"); known materials: {}",
                material::keys().join(", ")
            ),
        )),
    }
}

/// One plate's crystal: a crystal and, for a biaxial crystal, its cut (a plate of a two-plate
/// request, `first` or `second`; every plate of a birefringent filter; a plate of a broadband
/// retarder), read as a waveplate's `material` and `cut`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlateCrystal {
    /// The crystal (uniaxial, or biaxial cut along a principal axis).
    pub medium: Medium,
    /// For a biaxial crystal, the principal axis along the plate normal (`cut`); `None` for a
    /// uniaxial crystal, or to take the cut of largest birefringence.
    pub cut: Option<PrincipalCut>,
}

/// A plate's crystal from the fields of `f`: `material` (or `no`/`ne`, `nx`/`ny`/`nz`,
/// `dispersion`) and, for a biaxial crystal, an optional `cut`.
///
/// # Errors
/// As [`parse_any_crystal`] and [`principal::read_cut`] (`cut` for a uniaxial crystal).
fn plate_crystal(f: &mut Fields) -> Result<PlateCrystal, Error> {
    let medium = parse_any_crystal(f)?;
    let cut = principal::read_cut(f, &medium)?;
    Ok(PlateCrystal { medium, cut })
}

/// A plate's crystal given as an object of its own at `path` (`first`, `materials[2]`), read by
/// [`plate_crystal`] and finished, so that an unknown member is named within `path`.
///
/// # Errors
/// `path` when `v` is not an object; the path of the first offending member inside it.
fn plate_object(path: &str, v: &serde_json::Value) -> Result<PlateCrystal, Error> {
    let mut g = Fields::new(path, v)?;
    let plate = plate_crystal(&mut g)?;
    g.finish()?;
    Ok(plate)
}

/// The plates `first` and `second` of a two-plate request, each an object holding a `material`
/// (or `no`/`ne`, or `nx`/`ny`/`nz`) and, for a biaxial crystal, an optional `cut`.
///
/// # Errors
/// `first` or `second` when missing; the path of the first offending field inside them
/// (`first.cut` for a cut given to a uniaxial crystal).
fn two_plates(f: &mut Fields) -> Result<(PlateCrystal, PlateCrystal), Error> {
    let mut plate = |name: &'static str| -> Result<PlateCrystal, Error> {
        let path = f.path_of(name);
        let v = f
            .get(name)
            .ok_or_else(|| Error::new(&path, "is required: {\"material\": …}"))?;
        plate_object(&path, v)
    };
    Ok((plate("first")?, plate("second")?))
}

/// A whole number field (a count or a seed): refused, not truncated, when it has a fraction.
fn whole(f: &mut Fields, name: &'static str, default: f64, lo: f64, hi: f64) -> Result<f64, Error> {
    let path = f.path_of(name);
    let v = in_range(&path, f.number_or(name, default)?, lo, hi)?;
    if v.fract() != 0.0 {
        return Err(Error::new(path, format!("must be a whole number, got {}", quote(v))));
    }
    Ok(v)
}

/// The request's `wavelength_nm` (default 632.8).
fn wavelength_field(f: &mut Fields) -> Result<Wavelength, Error> {
    Wavelength::from_nm(in_range(
        "wavelength_nm",
        f.number_or("wavelength_nm", 632.8)?,
        1.0,
        1e6,
    )?)
}

/// The request's `temperature_c` (default 20, from −200 to 500 °C, the contract's range): the
/// temperature the part is designed to work at.
///
/// # Errors
/// `temperature_c` when it is not a number or out of range.
fn temperature_field(f: &mut Fields) -> Result<f64, Error> {
    let path = f.path_of("temperature_c");
    in_range(
        &path,
        f.number_or("temperature_c", material::REFERENCE_C)?,
        TEMPERATURE_RANGE_C.0,
        TEMPERATURE_RANGE_C.1,
    )
}

/// The range of a request's `temperature_c`, °C (the scenario contract's).
pub const TEMPERATURE_RANGE_C: (f64, f64) = (-200.0, 500.0);

/// An optional band `[shortest, longest]` in nm, each from 1 to 10⁶.
///
/// # Errors
/// `name[0]` or `name[1]` out of range; `name` when it is not a list of two numbers or its ends
/// are the wrong way round.
fn band(f: &mut Fields, name: &'static str) -> Result<Option<(f64, f64)>, Error> {
    let path = f.path_of(name);
    match f.get(name) {
        None => Ok(None),
        Some(v) => {
            let b = number_list(&path, v, 2)?;
            let lo = in_range(&format!("{path}[0]"), b[0], 1.0, 1e6)?;
            let hi = in_range(&format!("{path}[1]"), b[1], 1.0, 1e6)?;
            if hi < lo {
                return Err(Error::new(
                    path,
                    format!(
                        "must be [shortest, longest] with shortest ≤ longest, got [{}, {}]",
                        quote(lo),
                        quote(hi)
                    ),
                ));
            }
            Ok(Some((lo, hi)))
        }
    }
}

/// The band of a request's curves, nm: `band_nm` when given, or ±10 % around the wavelength.
fn band_or_tenth(wavelength: Wavelength, band_nm: Option<(f64, f64)>) -> (f64, f64) {
    let nm = wavelength.nm();
    band_nm.unwrap_or((0.9 * nm, 1.1 * nm))
}

/// A request document read by `read` and finished, for the tests of the solvers.
///
/// # Panics
/// On any error: meant for tests with valid documents.
#[cfg(test)]
pub fn read_ok<T>(doc: &str, read: fn(&mut Fields) -> Result<T, Error>) -> T {
    let v: serde_json::Value = serde_json::from_str(doc).unwrap();
    let mut f = Fields::new("", &v).unwrap();
    let r = read(&mut f).unwrap_or_else(|e| panic!("{doc}: {e}"));
    f.finish().unwrap_or_else(|e| panic!("{doc}: {e}"));
    r
}

/// The first error a request document gives its reader, for the tests of each kind.
#[cfg(test)]
fn first_error<T>(doc: &str, read: fn(&mut Fields) -> Result<T, Error>) -> Error {
    let v: serde_json::Value = serde_json::from_str(doc).unwrap();
    let mut f = Fields::new("", &v).unwrap();
    match read(&mut f) {
        Ok(_) => f.finish().expect_err(doc),
        Err(e) => e,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shared_readers_name_their_field() {
        // Each shared reader, through the simplest request that uses it.
        for (doc, field, words) in [
            (
                r#"{"material": "calcite", "no": 1.6, "separation_mm": 1}"#,
                "material",
                "not both",
            ),
            (r#"{"separation_mm": 1}"#, "material", "is required"),
            (r#"{"no": 0.5, "ne": 1.5, "separation_mm": 1}"#, "no", "from 1 to 10"),
            (
                r#"{"material": "calcite", "separation_mm": 1, "seed": 1.5}"#,
                "seed",
                "must be a whole number, got 1.5",
            ),
            (
                r#"{"material": "calcite", "separation_mm": 1, "wavelength_nm": 0}"#,
                "wavelength_nm",
                "must be from 1",
            ),
            (
                r#"{"material": "calcite", "separation_mm": 1, "band_nm": [500, 2e6]}"#,
                "band_nm[1]",
                "must be from 1",
            ),
            (
                r#"{"material": "calcite", "separation_mm": 1, "band_nm": [500]}"#,
                "band_nm",
                "",
            ),
            (
                r#"{"material": "calcite", "separation_mm": 1, "temperature_c": 501}"#,
                "temperature_c",
                "must be from \u{2212}200",
            ),
            (
                r#"{"material": "calcite", "separation_mm": 1, "temperature_c": "hot"}"#,
                "temperature_c",
                "",
            ),
        ] {
            let e = first_error(doc, DisplacerRequest::from_json);
            assert_eq!(e.field, field, "{doc}: {e}");
            assert!(e.message.contains(words), "{doc}: {e}");
        }
    }
}
