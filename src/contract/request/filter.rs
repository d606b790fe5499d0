//! The birefringent-filter request: plates of one crystal between polarizers that pass a band of
//! a given width around a centre wavelength.
//!
//! Two layouts (`layout`): `"stage-doubling"`, N plates of thicknesses d, 2d, 4d, … each behind a
//! polarizer parallel to the first, every plate's axis at 45°; and `"folded"`, N equal half-wave
//! plates with their axes alternately at +45°/N and −45°/N between crossed polarizers. `stages`
//! counts the plates (default 4 for stage-doubling, 6 for folded). Every plate doubles the rays
//! the exact trace of the answer follows, so at most 8 stage-doubling stages (256 rays) and 10
//! folded plates (1 024 rays) are designed; a filter of more would be traced more slowly than a
//! page should wait.
//!
//! The crystal may be biaxial (a catalogue key such as `ktp`, `nx`/`ny`/`nz`, or `x`/`y`/`z`
//! formulas): every plate is then cut along the principal axis `cut` (`"x"`, `"y"` or `"z"`,
//! default the cut of largest birefringence, as a waveplate's) and its slower in-face principal
//! axis stands where a uniaxial plate's optic axis does.

use super::principal::PrincipalCut;
use super::{band, plate_crystal, temperature_field, wavelength_field, whole};
use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::{Error, in_range};
use crate::numfmt::quote_text;
use crate::optics::wavelength::Wavelength;

/// The two filter layouts.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Layout {
    /// Plates d, 2d, 4d, … at 45°, each behind a polarizer parallel to the first.
    StageDoubling,
    /// N equal half-wave plates at ±45°/N, alternately, between crossed polarizers.
    Folded,
}

impl Layout {
    /// The layout's name in the request.
    pub fn name(self) -> &'static str {
        match self {
            Layout::StageDoubling => "stage-doubling",
            Layout::Folded => "folded",
        }
    }

    /// Most plates designed in this layout.
    pub fn max_stages(self) -> usize {
        match self {
            Layout::StageDoubling => 8,
            Layout::Folded => 10,
        }
    }
}

/// A birefringent-filter request.
#[derive(Debug, Clone, PartialEq)]
pub struct FilterRequest {
    /// The crystal of every plate (uniaxial, or biaxial cut along a principal axis).
    pub medium: Medium,
    /// For a biaxial crystal, the principal axis along every plate's normal (`cut`); `None` for
    /// a uniaxial crystal, or to take the cut of largest birefringence.
    pub cut: Option<PrincipalCut>,
    /// The layout.
    pub layout: Layout,
    /// Number of plates.
    pub stages: usize,
    /// Centre wavelength (`wavelength_nm`).
    pub wavelength: Wavelength,
    /// Full width at half maximum of the pass band wanted, nm.
    pub bandwidth_nm: f64,
    /// The band of the answer's transmission curve, nm, when given.
    pub band_nm: Option<(f64, f64)>,
    /// The temperature the filter is designed to work at, °C.
    pub temperature_c: f64,
}

impl FilterRequest {
    /// Reads a request object (`"kind": "birefringent-filter"` checked by the caller).
    ///
    /// # Errors
    /// The path of the first offending field: `layout` unknown, `stages` not a whole number in
    /// the layout's range, `bandwidth_nm` missing or not between 0.001 nm and the centre
    /// wavelength, `cut` unknown or given for a uniaxial crystal, a crystal or band field as
    /// elsewhere.
    pub fn from_json(f: &mut Fields) -> Result<FilterRequest, Error> {
        let crystal = plate_crystal(f)?;
        let layout = match f.string("layout")? {
            None | Some("stage-doubling") => Layout::StageDoubling,
            Some("folded") => Layout::Folded,
            Some(other) => {
                return Err(Error::new(
                    f.path_of("layout"),
                    format!(
                        "unknown layout '{}'; expected \"stage-doubling\" or \"folded\"",
                        quote_text(other)
                    ),
                ));
            }
        };
        let default_stages = match layout {
            Layout::StageDoubling => 4.0,
            Layout::Folded => 6.0,
        };
        let least = if layout == Layout::Folded { 2.0 } else { 1.0 };
        let stages = whole(f, "stages", default_stages, least, layout.max_stages() as f64)? as usize;
        let wavelength = wavelength_field(f)?;
        let bandwidth_nm = in_range(
            &f.path_of("bandwidth_nm"),
            f.required_number("bandwidth_nm")?,
            1e-3,
            wavelength.nm(),
        )?;
        Ok(FilterRequest {
            medium: crystal.medium,
            cut: crystal.cut,
            layout,
            stages,
            wavelength,
            bandwidth_nm,
            band_nm: band(f, "band_nm")?,
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
        for (doc, field) in [
            (r#"{"material": "quartz"}"#, "bandwidth_nm"),
            (r#"{"material": "quartz", "bandwidth_nm": 0}"#, "bandwidth_nm"),
            (
                r#"{"material": "quartz", "bandwidth_nm": 1, "layout": "zigzag"}"#,
                "layout",
            ),
            (r#"{"material": "quartz", "bandwidth_nm": 1, "stages": 9}"#, "stages"),
            (r#"{"material": "quartz", "bandwidth_nm": 1, "stages": 2.5}"#, "stages"),
            (
                r#"{"material": "quartz", "bandwidth_nm": 1, "layout": "folded", "stages": 1}"#,
                "stages",
            ),
            (
                r#"{"material": "quartz", "bandwidth_nm": 1, "layout": "folded", "stages": 11}"#,
                "stages",
            ),
            // A cut is a biaxial crystal's, and only x, y or z.
            (r#"{"material": "quartz", "bandwidth_nm": 1, "cut": "x"}"#, "cut"),
            (r#"{"no": 1.5, "ne": 1.6, "bandwidth_nm": 1, "cut": "z"}"#, "cut"),
            (r#"{"material": "ktp", "bandwidth_nm": 1, "cut": "xz"}"#, "cut"),
            (
                r#"{"nx": 1.5, "ny": 1.6, "nz": 1.7, "bandwidth_nm": 1, "cut": 2}"#,
                "cut",
            ),
            (r#"{"nx": 1.5, "ny": 1.6, "nz": 0.7, "bandwidth_nm": 1}"#, "nz"),
            (
                r#"{"material": "quartz", "bandwidth_nm": 1, "band_nm": [700, 600]}"#,
                "band_nm",
            ),
            (r#"{"material": "quartz", "bandwidth_nm": 1, "colour": 1}"#, "colour"),
        ] {
            let e = first_error(doc, FilterRequest::from_json);
            assert_eq!(e.field, field, "{doc}: {e}");
        }
    }
}
