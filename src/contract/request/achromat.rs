//! The achromat request: two crystals (`first`, `second`) whose plates together hold a target
//! retardance at two wavelengths.

use super::{PlateCrystal, band, temperature_field, two_plates};
use crate::contract::fields::{Fields, number_list};
use crate::error::{Error, in_range};
use crate::precision::SAME_WAVELENGTH_NM;

/// A two-material achromatic request.
#[derive(Debug, Clone, PartialEq)]
pub struct AchromatRequest {
    /// First plate: its crystal and, for a biaxial crystal, its cut.
    pub a: PlateCrystal,
    /// Second plate.
    pub b: PlateCrystal,
    /// Target retardance, waves.
    pub retardance_waves: f64,
    /// The two wavelengths where the target must hold, nm.
    pub wavelengths_nm: (f64, f64),
    /// Band for the curve, nm.
    pub band_nm: Option<(f64, f64)>,
    /// The temperature the part is designed to work at, °C (`temperature_c`, default 20):
    /// its indices are taken there and its thickness grown to it; thicknesses are quoted at 20 °C.
    pub temperature_c: f64,
}

impl AchromatRequest {
    /// Reads a request object (`"kind": "achromat"` checked by the caller): `first` and `second`
    /// hold a `material` (or `no`/`ne`, or `nx`/`ny`/`nz`)
    /// each and, for a biaxial crystal, an optional `cut` (as a waveplate's).
    ///
    /// # Errors
    /// The path of the first offending field.
    pub fn from_json(f: &mut Fields) -> Result<AchromatRequest, Error> {
        let (a, b) = two_plates(f)?;
        let path = f.path_of("wavelengths_nm");
        let w = f
            .get("wavelengths_nm")
            .ok_or_else(|| Error::new(&path, "is required: [λ1, λ2] in nm"))?;
        let w = number_list(&path, w, 2)?;
        let (w1, w2) = (
            in_range("wavelengths_nm[0]", w[0], 1.0, 1e6)?,
            in_range("wavelengths_nm[1]", w[1], 1.0, 1e6)?,
        );
        if (w1 - w2).abs() < SAME_WAVELENGTH_NM {
            return Err(Error::new(path, "the two wavelengths must differ"));
        }
        Ok(AchromatRequest {
            a,
            b,
            retardance_waves: in_range("retardance_waves", f.required_number("retardance_waves")?, 1e-6, 1e4)?,
            wavelengths_nm: (w1, w2),
            band_nm: band(f, "band_nm")?,
            temperature_c: temperature_field(f)?,
        })
    }

    /// The band of the retardance curve: `band_nm`, or from 80 % of the shorter design wavelength
    /// to 120 % of the longer by default.
    pub fn band(&self) -> (f64, f64) {
        let (w1, w2) = self.wavelengths_nm;
        self.band_nm.unwrap_or((w1.min(w2) * 0.8, w1.max(w2) * 1.2))
    }
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn bad_requests_name_their_field_inside_first_and_second() {
        let pair = r#""retardance_waves": 0.25, "wavelengths_nm": [500, 900]"#;
        for (doc, field) in [
            (format!(r#"{{"second": {{"material": "mgf2"}}, {pair}}}"#), "first"),
            (
                format!(r#"{{"first": {{"material": "glass"}}, "second": {{"material": "mgf2"}}, {pair}}}"#),
                "first.material",
            ),
            (
                format!(r#"{{"first": {{"material": "quartz"}}, "second": {{"no": 1.5, "ne": 11}}, {pair}}}"#),
                "second.ne",
            ),
            (
                format!(r#"{{"first": {{"material": "quartz", "tilt": 1}}, "second": {{"material": "mgf2"}}, {pair}}}"#),
                "first.tilt",
            ),
            (
                format!(r#"{{"first": {{"material": "quartz"}}, "second": {{"no": 1.5, "ne": 1.6, "cut": "z"}}, {pair}}}"#),
                "second.cut",
            ),
            (
                format!(r#"{{"first": {{"material": "lbo", "cut": 2}}, "second": {{"material": "mgf2"}}, {pair}}}"#),
                "first.cut",
            ),
            (
                r#"{"first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "wavelengths_nm": [700, 700]}"#.to_string(),
                "wavelengths_nm",
            ),
            (
                r#"{"first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "wavelengths_nm": [700, 0]}"#.to_string(),
                "wavelengths_nm[1]",
            ),
        ] {
            let e = first_error(&doc, AchromatRequest::from_json);
            assert_eq!(e.field, field, "{doc}: {e}");
        }
    }
}
