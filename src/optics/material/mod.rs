//! The crystal catalogue: published dispersion formulas for uniaxial and biaxial crystals, their
//! group indices, and the optical activity of crystalline quartz.
//!
//! One concept per file: [`dispersion`] holds the formula forms, their analytic derivative and the
//! group index; [`uniaxial`] the uniaxial catalogue (n_o, n_e); [`biaxial`] the biaxial catalogue
//! (n_x < n_y < n_z on the formula's dielectric axes); [`activity`] quartz's rotatory power and
//! gyration; [`air`] the index of standard air and the conversion of an air wavelength to
//! vacuum; [`thermal`] the indices at a temperature and the thermal expansion; [`source`] the
//! several published sources of one crystal and their disagreement. This file holds what they share: evaluating a crystal's principal formulas at a
//! wavelength with its range warning and breakdown error, and the list of every key.
//!
//! Conventions: a [`Wavelength`] is the vacuum wavelength, handed to each formula in micrometres
//! (see [`uniaxial`] on air and vacuum). Outside its published range a formula is evaluated with a
//! warning naming the material, the wavelength and the range; where it breaks down the wavelength
//! is refused (field `wavelength_nm`) with the reason.

pub mod activity;
pub mod air;
pub mod biaxial;
pub mod dispersion;
pub mod source;
pub mod thermal;
pub mod uniaxial;

pub use activity::{Activity, OpticalActivity, optical_activity};
pub use air::{AirConversion, STANDARD_AIR_RANGE_NM, air_from_vacuum, standard_air_index, vacuum_from_air};
pub use biaxial::{
    BiaxialMaterial, Principal, biaxial_catalogue, biaxial_keys, biaxial_sources, describe_biaxial, find_biaxial,
};
pub use dispersion::{Dispersion, Quantity};
pub use source::{describe_sources, find_biaxial_source, find_uniaxial_source, source_keys, spread};
pub use thermal::{REFERENCE_C, Thermal, thermal};
pub use uniaxial::{Evaluated, Indices, Material, OpticalSign, catalogue, describe, find, keys, uniaxial_sources};

use crate::error::Error;
use crate::optics::wavelength::Wavelength;

/// What every catalogue crystal's description holds (`uniaxial::describe`,
/// `biaxial::describe_biaxial` add their own): key, name, kind, range, citation, whether the
/// source is a journal's, no warnings, the temperature data, the default `source` and every
/// source as `source::describe_sources` lists it (`sources`).
fn described(
    key: &str,
    name: &str,
    kind: &str,
    range_nm: (f64, f64),
    citation: &str,
    verified: bool,
) -> serde_json::Value {
    serde_json::json!({
        "key": key, "name": name, "kind": kind, "range_nm": [range_nm.0, range_nm.1],
        "citation": citation, "verified": verified, "warnings": Vec::<String>::new(),
        "temperature": thermal(key).map(Thermal::describe),
        "source": source_keys(key).first(), "sources": describe_sources(key),
    })
}

/// Every catalogue key, uniaxial first then biaxial, each part in catalogue order: for messages
/// that list what a crystal element may name once biaxial crystals are accepted there.
pub fn all_keys() -> Vec<&'static str> {
    let mut all = keys();
    all.extend(biaxial_keys());
    all
}

/// The `N` principal formulas of the material called `name` (each with the name of its ray or
/// axis, for messages) evaluated for `q` at `wavelength`, with the out-of-range warning if any.
///
/// # Errors
/// Field `wavelength_nm` where a formula breaks down, naming the material, the ray or axis, the
/// quantity, the wavelength, the reason and the published range.
pub fn principal_values<F: dispersion::Evaluate, const N: usize>(
    name: &str,
    range_nm: (f64, f64),
    formulas: [(&str, &F); N],
    q: Quantity,
    wavelength: Wavelength,
) -> Result<([f64; N], Vec<String>), Error> {
    let (um, nm) = (wavelength.um(), wavelength.nm());
    let (lo, hi) = range_nm;
    let mut values = [0.0; N];
    for (value, (ray, formula)) in values.iter_mut().zip(formulas) {
        *value = formula.quantity(q, um).map_err(|why| {
            Error::new(
                "wavelength_nm",
                format!(
                    "the {name} dispersion formula gives no usable {ray} {} at {nm} nm: {}; its \
                     published range is {lo}-{hi} nm",
                    q.noun(),
                    why.reason()
                ),
            )
        })?;
    }
    let mut warnings = Vec::new();
    if !(lo..=hi).contains(&nm) {
        warnings.push(format!(
            "{nm} nm is outside the {lo}-{hi} nm range of the {name} dispersion formula; its \
             indices are extrapolated"
        ));
    }
    Ok((values, warnings))
}
