//! The broadband-retarder request: N plates (of one crystal, or each of its own) whose stack
//! holds a target retardance, with a steady fast axis and no rotation, over a band.

use super::{band, parse_medium, temperature_field, whole};
use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::{Error, in_range};
use crate::optics::material;

/// Most plates designed (each adds two unknowns to the search).
pub const MAX_PLATES: usize = 7;

/// A broadband-retarder request.
#[derive(Debug, Clone, PartialEq)]
pub struct BroadbandRequest {
    /// The crystal of each plate, in the order the light meets them.
    pub media: Vec<Medium>,
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
    /// `material` (or `no`/`ne`, `dispersion`) with `plates` (default 3), or `materials`, a list
    /// of catalogue keys, one per plate.
    ///
    /// # Errors
    /// The path of the first offending field: `materials[i]` unknown or biaxial, `plates` or the
    /// list's length outside 2 to 7, `retardance_waves` outside (0, ½], `band_nm` missing,
    /// `max_thickness_mm` not above 0, `generations` outside 10 to 5 000.
    pub fn from_json(f: &mut Fields) -> Result<BroadbandRequest, Error> {
        let media = if f.has("materials") {
            let path = f.path_of("materials");
            let list = f
                .get("materials")
                .and_then(|v| v.as_array().cloned())
                .ok_or_else(|| Error::new(&path, "must be a list of catalogue keys, one per plate"))?;
            if !(2..=MAX_PLATES).contains(&list.len()) {
                return Err(Error::new(
                    &path,
                    format!("must name 2 to {MAX_PLATES} plates, got {}", list.len()),
                ));
            }
            if f.has("material") || f.has("no") || f.has("plates") {
                return Err(Error::new(
                    &path,
                    "give either \"materials\" or \"material\" with \"plates\", not both",
                ));
            }
            list.iter()
                .enumerate()
                .map(|(i, v)| {
                    let at = format!("{path}[{i}]");
                    let key = v.as_str().ok_or_else(|| Error::new(&at, "must be a catalogue key"))?;
                    material::find(key).map(Medium::Catalogue).ok_or_else(|| {
                        Error::new(
                            &at,
                            format!(
                                "unknown or biaxial material '{key}'; known: {}",
                                material::keys().join(", ")
                            ),
                        )
                    })
                })
                .collect::<Result<Vec<_>, _>>()?
        } else {
            let medium = parse_medium(f)?;
            let n = whole(f, "plates", 3.0, 2.0, MAX_PLATES as f64)? as usize;
            vec![medium; n]
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
            (format!(r#"{{"materials": ["quartz", "ktp"], {base}}}"#), "materials[1]"),
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
