//! The broadband-retarder request: N plates (of one crystal, or each of its own) whose stack
//! holds a target retardance, with a steady fast axis and no rotation, over a band.
//!
//! A plate's crystal may be biaxial (a catalogue key such as `ktp`, `nx`/`ny`/`nz`, or
//! `x`/`y`/`z` formulas), cut along a principal axis (`cut`, `"x"`, `"y"` or `"z"`, default the
//! cut of largest birefringence, as a waveplate's): with `material`, `cut` at the top level cuts
//! every plate; in `materials`, an entry is a catalogue key (a biaxial one cut at its default) or
//! an object of its own, `{"material": "ktp", "cut": "x"}` (or `no`/`ne`, `nx`/`ny`/`nz`,
//! `dispersion`), as a two-plate request's `first`.

use super::{PlateCrystal, band, plate_crystal, plate_object, temperature_field, whole};
use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::{Error, in_range};
use crate::optics::material;

/// Most plates designed (each adds two unknowns to the search).
pub const MAX_PLATES: usize = 7;

/// A broadband-retarder request.
#[derive(Debug, Clone, PartialEq)]
pub struct BroadbandRequest {
    /// The crystal of each plate (with its cut, for a biaxial crystal), in the order the light
    /// meets them.
    pub media: Vec<PlateCrystal>,
    /// Target retardance, waves (0 to ½: beyond, a retarder of 1 − r waves with fast and slow
    /// exchanged is the same part).
    pub retardance_waves: f64,
    /// Target fast axis, degrees from x.
    pub fast_axis_deg: f64,
    /// The band, nm.
    pub band_nm: (f64, f64),
    /// Thickest plate searched, mm; `None`: twice a full-wave plate of its crystal at the band's
    /// centre.
    pub max_thickness_mm: Option<f64>,
    /// Generations of the search.
    pub generations: usize,
    /// Seed of the search.
    pub seed: u64,
    /// Design temperature, °C.
    pub temperature_c: f64,
}

impl BroadbandRequest {
    /// Reads a request object (`"kind": "broadband-retarder"` checked by the caller): either
    /// `material` (or `no`/`ne`, `nx`/`ny`/`nz`, `dispersion`; a biaxial crystal with an optional
    /// `cut`) with `plates` (default 3), or `materials`, one entry per plate: a catalogue key or
    /// an object holding a plate's crystal and cut (see the module header).
    ///
    /// # Errors
    /// The path of the first offending field: `materials[i]` an unknown key or neither a key nor
    /// an object, a field inside `materials[i]` (`materials[1].cut`), `cut` given with
    /// `materials` or for a uniaxial crystal, `plates` or the list's length outside 2 to 7,
    /// `retardance_waves` outside (0, ½], `band_nm` missing, `max_thickness_mm` not above 0,
    /// `generations` outside 10 to 5 000.
    pub fn from_json(f: &mut Fields) -> Result<BroadbandRequest, Error> {
        let media = if f.has("materials") {
            let path = f.path_of("materials");
            let list = f.get("materials").and_then(|v| v.as_array().cloned()).ok_or_else(|| {
                Error::new(
                    &path,
                    "must be a list with one entry per plate: a catalogue key or {\"material\": …, \"cut\": …}",
                )
            })?;
            if !(2..=MAX_PLATES).contains(&list.len()) {
                return Err(Error::new(
                    &path,
                    format!("must name 2 to {MAX_PLATES} plates, got {}", list.len()),
                ));
            }
            let single = ["material", "no", "ne", "nx", "ny", "nz", "dispersion", "plates"];
            if single.iter().any(|k| f.has(k)) {
                return Err(Error::new(
                    &path,
                    "give either \"materials\" or \"material\" with \"plates\", not both",
                ));
            }
            if f.has("cut") {
                return Err(Error::new(
                    f.path_of("cut"),
                    "with \"materials\", give a biaxial plate's cut in its own entry: {\"material\": \"ktp\", \"cut\": \"x\"}",
                ));
            }
            list.iter()
                .enumerate()
                .map(|(i, v)| listed_plate(&format!("{path}[{i}]"), v))
                .collect::<Result<Vec<_>, _>>()?
        } else {
            let plate = plate_crystal(f)?;
            let n = whole(f, "plates", 3.0, 2.0, MAX_PLATES as f64)? as usize;
            vec![plate; n]
        };
        let retardance_waves = in_range(
            &f.path_of("retardance_waves"),
            f.required_number("retardance_waves")?,
            1e-3,
            0.5,
        )?;
        let fast_axis_deg = in_range(
            &f.path_of("fast_axis_deg"),
            f.number_or("fast_axis_deg", 0.0)?,
            -180.0,
            180.0,
        )?;
        let band_nm = band(f, "band_nm")?
            .ok_or_else(|| Error::new(f.path_of("band_nm"), "is required: [shortest, longest] in nm"))?;
        if band_nm.1 <= band_nm.0 {
            return Err(Error::new(
                f.path_of("band_nm"),
                "must span a range: shortest < longest",
            ));
        }
        let max_thickness_mm = match f.number("max_thickness_mm")? {
            None => None,
            Some(v) => Some(in_range(&f.path_of("max_thickness_mm"), v, 1e-4, 100.0)?),
        };
        Ok(BroadbandRequest {
            media,
            retardance_waves,
            fast_axis_deg,
            band_nm,
            max_thickness_mm,
            generations: whole(f, "generations", 1000.0, 10.0, 5000.0)? as usize,
            seed: whole(f, "seed", 1.0, 0.0, 1e15)? as u64,
            temperature_c: temperature_field(f)?,
        })
    }
}

/// One entry of `materials` at `at`: a catalogue key (uniaxial, or biaxial at its default cut) or
/// an object holding the plate's crystal and cut.
///
/// # Errors
/// `at` for an unknown key or an entry that is neither a key nor an object; the path of the
/// first offending member of an object.
fn listed_plate(at: &str, v: &serde_json::Value) -> Result<PlateCrystal, Error> {
    if v.is_object() {
        return plate_object(at, v);
    }
    let key = v
        .as_str()
        .ok_or_else(|| Error::new(at, "must be a catalogue key or {\"material\": …, \"cut\": …}"))?;
    let medium = material::find(key)
        .map(Medium::Catalogue)
        .or_else(|| material::find_biaxial(key).map(Medium::Biaxial))
        .ok_or_else(|| {
            let mut known = material::keys();
            known.extend(material::biaxial_keys());
            Error::new(at, format!("unknown material '{key}'; known: {}", known.join(", ")))
        })?;
    Ok(PlateCrystal { medium, cut: None })
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn bad_requests_name_their_field() {
        let base = r#""retardance_waves": 0.25, "band_nm": [500, 700]"#;
        for (doc, field) in [
            (
                r#"{"material": "quartz", "band_nm": [500, 700]}"#.to_string(),
                "retardance_waves",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 0.75, "band_nm": [500, 700]}"#.to_string(),
                "retardance_waves",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25}"#.to_string(),
                "band_nm",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25, "band_nm": [600, 600]}"#.to_string(),
                "band_nm",
            ),
            (format!(r#"{{"material": "quartz", {base}, "plates": 8}}"#), "plates"),
            (format!(r#"{{"material": "quartz", {base}, "plates": 1}}"#), "plates"),
            (
                format!(r#"{{"materials": ["quartz", "glass"], {base}}}"#),
                "materials[1]",
            ),
            (format!(r#"{{"materials": ["quartz", 7], {base}}}"#), "materials[1]"),
            (
                format!(r#"{{"materials": ["quartz", {{"material": "quartz", "cut": "x"}}], {base}}}"#),
                "materials[1].cut",
            ),
            (
                format!(r#"{{"materials": ["quartz", {{"material": "ktp", "cut": "w"}}], {base}}}"#),
                "materials[1].cut",
            ),
            (
                format!(r#"{{"materials": [{{"material": "ktp", "tilt": 1}}, "quartz"], {base}}}"#),
                "materials[0].tilt",
            ),
            (
                format!(r#"{{"materials": ["ktp", "quartz"], "cut": "x", {base}}}"#),
                "cut",
            ),
            (format!(r#"{{"material": "quartz", "cut": "x", {base}}}"#), "cut"),
            (format!(r#"{{"material": "lbo", "cut": "q", {base}}}"#), "cut"),
            (format!(r#"{{"materials": ["quartz"], {base}}}"#), "materials"),
            (
                format!(r#"{{"materials": ["quartz", "mgf2"], "material": "quartz", {base}}}"#),
                "materials",
            ),
            (
                format!(r#"{{"material": "quartz", {base}, "max_thickness_mm": 0}}"#),
                "max_thickness_mm",
            ),
            (
                format!(r#"{{"material": "quartz", {base}, "generations": 5}}"#),
                "generations",
            ),
            (format!(r#"{{"material": "quartz", {base}, "shape": 1}}"#), "shape"),
        ] {
            let e = first_error(&doc, BroadbandRequest::from_json);
            assert_eq!(e.field, field, "{doc}: {e}");
        }
    }
}
