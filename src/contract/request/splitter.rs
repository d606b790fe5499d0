//! The splitter request: two wedges of one uniaxial crystal with crossed optic axes, contacted
//! (or cemented) along their tilted common face, split symmetrically by a required angle.

use super::{band, parse_medium, temperature_field, wavelength_field, whole};
use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::{Error, above, in_range};
use crate::optics::wavelength::Wavelength;
use serde::Serialize;

/// Monte Carlo samples of a splitter request that names none: each is a full trace.
pub const DEFAULT_SPLITTER_SAMPLES: usize = 2_000;

/// Most Monte Carlo samples a splitter request may ask for.
pub const MAX_SPLITTER_SAMPLES: usize = 200_000;

/// Standard deviations of a splitter's manufacturing and alignment errors.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SplitterTolerances {
    /// Error of the wedge angle (the common face's tilt), degrees.
    pub wedge_deg: f64,
    /// Error of each wedge's optic-axis orientation about the beam, degrees (drawn per wedge).
    pub axis_deg: f64,
    /// Error of the angle of incidence in the plane of the split, degrees.
    pub incidence_deg: f64,
}

impl SplitterTolerances {
    /// The tolerances a request gets when it names none (common practice, approximate): 0.05°
    /// (3′) of wedge angle, 0.5° of axis orientation, 0.1° of incidence.
    pub const DEFAULT: SplitterTolerances = SplitterTolerances {
        wedge_deg: 0.05,
        axis_deg: 0.5,
        incidence_deg: 0.1,
    };
}

/// A splitter request.
#[derive(Debug, Clone, PartialEq)]
pub struct SplitterRequest {
    /// Crystal of both wedges.
    pub medium: Medium,
    /// Design wavelength.
    pub wavelength: Wavelength,
    /// Band of the split curve, nm (default ±10 % about the wavelength).
    pub band_nm: Option<(f64, f64)>,
    /// Required angle between the two beams, degrees.
    pub split_angle_deg: f64,
    /// Clear aperture, mm.
    pub aperture_mm: f64,
    /// Index of a cement layer between the wedges; `None` for optical contact.
    pub cement_index: Option<f64>,
    /// Error standard deviations.
    pub tolerances: SplitterTolerances,
    /// Monte Carlo samples (0 skips the run).
    pub samples: usize,
    /// Random seed.
    pub seed: u64,
    /// The temperature the part is designed to work at, °C (`temperature_c`, default 20):
    /// its indices are taken there and its thickness grown to it; thicknesses are quoted at 20 °C.
    pub temperature_c: f64,
}

impl SplitterRequest {
    /// Reads a request object (`"kind": "angular-splitter"` checked by the caller).
    ///
    /// # Errors
    /// The path of the first offending field.
    pub fn from_json(f: &mut Fields) -> Result<SplitterRequest, Error> {
        let medium = parse_medium(f)?;
        let wavelength = wavelength_field(f)?;
        let band_nm = band(f, "band_nm")?;
        let split_angle_deg = above("split_angle_deg", f.required_number("split_angle_deg")?, 0.0, 90.0)?;
        let aperture_mm = above("aperture_mm", f.number_or("aperture_mm", 10.0)?, 0.0, 1e3)?;
        let cement_index = f
            .number("cement_index")?
            .map(|n| in_range("cement_index", n, 1.0, 3.0))
            .transpose()?;
        let tolerances = match f.get("tolerances") {
            None => SplitterTolerances::DEFAULT,
            Some(v) => {
                let mut t = Fields::new("tolerances", v)?;
                let d = SplitterTolerances::DEFAULT;
                let mut read = |key: &'static str, default: f64, max: f64| {
                    in_range(&format!("tolerances.{key}"), t.number_or(key, default)?, 0.0, max)
                };
                let tol = SplitterTolerances {
                    wedge_deg: read("wedge_deg", d.wedge_deg, 5.0)?,
                    axis_deg: read("axis_deg", d.axis_deg, 10.0)?,
                    incidence_deg: read("incidence_deg", d.incidence_deg, 10.0)?,
                };
                t.finish()?;
                tol
            }
        };
        let samples = whole(
            f,
            "samples",
            DEFAULT_SPLITTER_SAMPLES as f64,
            0.0,
            MAX_SPLITTER_SAMPLES as f64,
        )? as usize;
        let seed = whole(f, "seed", 1.0, 0.0, 9.007_199_254_740_991e15)? as u64;
        Ok(SplitterRequest {
            medium,
            wavelength,
            band_nm,
            split_angle_deg,
            aperture_mm,
            cement_index,
            tolerances,
            samples,
            seed,
            temperature_c: temperature_field(f)?,
        })
    }

    /// The band of the curve: the request's, or ±10 % about the wavelength.
    pub fn band(&self) -> (f64, f64) {
        super::band_or_tenth(self.wavelength, self.band_nm)
    }
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn splitter_fields_name_themselves() {
        for (doc, field) in [
            (r#"{"material": "calcite"}"#, "split_angle_deg"),
            (r#"{"material": "calcite", "split_angle_deg": 0}"#, "split_angle_deg"),
            (
                r#"{"material": "calcite", "split_angle_deg": 10, "cement_index": 0.5}"#,
                "cement_index",
            ),
            (
                r#"{"material": "calcite", "split_angle_deg": 10, "tolerances": {"wedge_deg": -1}}"#,
                "tolerances.wedge_deg",
            ),
            (
                r#"{"material": "calcite", "split_angle_deg": 10, "tolerances": {"tilt_deg": 1}}"#,
                "tolerances.tilt_deg",
            ),
            (
                r#"{"material": "calcite", "split_angle_deg": 10, "samples": 1e7}"#,
                "samples",
            ),
        ] {
            assert_eq!(first_error(doc, SplitterRequest::from_json).field, field, "{doc}");
        }
    }
}
