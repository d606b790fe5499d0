//! The displacer request: a crystal, a required o–e separation, the beam, and the error standard
//! deviations of its tolerance analysis with the Monte Carlo run's size.

use super::principal::{PrincipalPlane, read_plane};
use super::{band, parse_any_crystal, temperature_field, wavelength_field, whole};
use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::{Error, above, in_range};
use crate::optics::wavelength::Wavelength;
use serde::Serialize;

/// Most Monte Carlo samples a request may ask for.
pub const MAX_SAMPLES: usize = 1_000_000;

/// Monte Carlo samples of a request that names none.
pub const DEFAULT_SAMPLES: usize = 100_000;

/// Standard deviations of the manufacturing and alignment errors.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Tolerances {
    /// Cut-angle error, degrees.
    pub tilt_deg: f64,
    /// Angle-of-incidence error in the walk-off plane, degrees.
    pub incidence_deg: f64,
    /// Length error, mm.
    pub thickness_mm: f64,
    /// Wavelength error, nm.
    pub wavelength_nm: f64,
}

impl Tolerances {
    /// The tolerances a request gets when it names none (DEVELOPERS.md, "Design requests"):
    /// 0.1° of cut and of incidence, 0.05 mm of length, 0.5 nm of wavelength.
    pub const DEFAULT: Tolerances = Tolerances {
        tilt_deg: 0.1,
        incidence_deg: 0.1,
        thickness_mm: 0.05,
        wavelength_nm: 0.5,
    };
}

/// What the designer asks for.
#[derive(Debug, Clone, PartialEq)]
pub struct DisplacerRequest {
    /// Crystal (uniaxial, or biaxial cut in a principal plane).
    pub medium: Medium,
    /// For a biaxial crystal, the principal plane that holds the plate normal (`plane`); `None`
    /// for a uniaxial crystal, or to take the plane of largest walk-off.
    pub plane: Option<PrincipalPlane>,
    /// Design wavelength.
    pub wavelength: Wavelength,
    /// Band over which the separation is reported, nm.
    pub band_nm: Option<(f64, f64)>,
    /// Required separation, mm.
    pub separation_mm: f64,
    /// Beam diameter (1/e²), mm.
    pub beam_diameter_mm: f64,
    /// A cut tilt fixed by the designer, degrees; otherwise the cut of maximum walk-off.
    pub cut_tilt_deg: Option<f64>,
    /// Clear aperture = separation + factor × beam diameter.
    pub aperture_factor: f64,
    /// Error standard deviations for the tolerance analysis.
    pub tolerances: Tolerances,
    /// Monte Carlo samples (0 skips the run).
    pub samples: usize,
    /// Random seed.
    pub seed: u64,
    /// Histogram bins.
    pub bins: usize,
    /// The temperature the part is designed to work at, °C (`temperature_c`, default 20):
    /// its indices are taken there and its thickness grown to it; thicknesses are quoted at 20 °C.
    pub temperature_c: f64,
}

impl DisplacerRequest {
    /// Reads a request object (`"kind": "displacer"` already checked by the caller).
    ///
    /// # Errors
    /// The path of the first offending field.
    pub fn from_json(f: &mut Fields) -> Result<DisplacerRequest, Error> {
        let medium = parse_any_crystal(f)?;
        let plane = read_plane(f, &medium)?;
        let wavelength = wavelength_field(f)?;
        let band_nm = band(f, "band_nm")?;
        // Lengths that must not be zero: the range excludes 0, and the message says so.
        let separation_mm = above("separation_mm", f.required_number("separation_mm")?, 0.0, 1e3)?;
        let beam_diameter_mm = above("beam_diameter_mm", f.number_or("beam_diameter_mm", 1.0)?, 0.0, 1e3)?;
        let cut_tilt_deg = f
            .number("cut_tilt_deg")?
            .map(|t| in_range("cut_tilt_deg", t, 0.0, 180.0))
            .transpose()?;
        let aperture_factor = in_range("aperture_factor", f.number_or("aperture_factor", 2.0)?, 1.0, 10.0)?;
        let tolerances = match f.get("tolerances") {
            None => Tolerances::DEFAULT,
            Some(v) => {
                let mut t = Fields::new("tolerances", v)?;
                let d = Tolerances::DEFAULT;
                let mut read = |key: &'static str, default: f64, max: f64| {
                    in_range(&format!("tolerances.{key}"), t.number_or(key, default)?, 0.0, max)
                };
                let tol = Tolerances {
                    tilt_deg: read("tilt_deg", d.tilt_deg, 10.0)?,
                    incidence_deg: read("incidence_deg", d.incidence_deg, 10.0)?,
                    thickness_mm: read("thickness_mm", d.thickness_mm, 10.0)?,
                    wavelength_nm: read("wavelength_nm", d.wavelength_nm, 100.0)?,
                };
                t.finish()?;
                tol
            }
        };
        let samples = whole(f, "samples", DEFAULT_SAMPLES as f64, 0.0, MAX_SAMPLES as f64)? as usize;
        let seed = whole(f, "seed", 1.0, 0.0, 9.007_199_254_740_991e15)? as u64;
        let bins = whole(f, "bins", 40.0, 1.0, 1000.0)? as usize;
        Ok(DisplacerRequest {
            medium,
            plane,
            wavelength,
            band_nm,
            separation_mm,
            beam_diameter_mm,
            cut_tilt_deg,
            aperture_factor,
            tolerances,
            samples,
            seed,
            bins,
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
            (r#"{"material": "calcite"}"#, "separation_mm"),
            (
                r#"{"material": "calcite", "separation_mm": 1, "cut_tilt_deg": 181}"#,
                "cut_tilt_deg",
            ),
            (r#"{"material": "iceland", "separation_mm": 1}"#, "material"),
            (
                r#"{"material": "calcite", "separation_mm": 1, "band_nm": [900, 500]}"#,
                "band_nm",
            ),
            (
                r#"{"material": "calcite", "separation_mm": 1, "samples": 1e9}"#,
                "samples",
            ),
            (
                r#"{"material": "calcite", "separation_mm": 1, "tolerances": {"tilt": 1}}"#,
                "tolerances.tilt",
            ),
            (
                r#"{"material": "calcite", "separation_mm": 1, "tolerances": {"wavelength_nm": 101}}"#,
                "tolerances.wavelength_nm",
            ),
            (r#"{"material": "calcite", "separation_mm": 1, "colour": 2}"#, "colour"),
        ] {
            let e = first_error(doc, DisplacerRequest::from_json);
            assert_eq!(e.field, field, "{doc}: {e}");
        }
    }

    #[test]
    fn defaults_are_the_documented_ones() {
        // DEVELOPERS.md, "Design requests": the displacer's defaults.
        let v = serde_json::json!({"material": "calcite", "separation_mm": 1});
        let mut f = Fields::new("", &v).unwrap();
        let r = DisplacerRequest::from_json(&mut f).unwrap();
        f.finish().unwrap();
        assert_eq!(r.wavelength.nm(), 632.8);
        assert_eq!((r.band_nm, r.cut_tilt_deg), (None, None));
        assert_eq!((r.beam_diameter_mm, r.aperture_factor), (1.0, 2.0));
        assert_eq!(r.tolerances, Tolerances::DEFAULT);
        assert_eq!((r.samples, r.seed, r.bins), (DEFAULT_SAMPLES, 1, 40));
    }
}
