//! The tilt-tuning request: a waveplate cut with its optic axis in the faces, of a given
//! thickness (or of a given order at another wavelength), tilted in its mount until it reaches a
//! target retardance. A biaxial crystal's plate is cut along a principal axis (`cut`, as a
//! waveplate's: [`super::principal`]), its slower in-face principal axis at `axis_azimuth_deg`.

use super::principal::PrincipalCut;
use super::{PlateCrystal, plate_crystal, temperature_field, wavelength_field, whole};
use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::{Error, above, in_range};
use crate::optics::wavelength::Wavelength;

/// How the plate's thickness is given.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PlateSize {
    /// Thickness, mm.
    Thickness(f64),
    /// A plate made to give `order` whole waves plus the target at normal incidence at
    /// `made_for_nm`.
    Order {
        /// Whole waves.
        order: u32,
        /// Wavelength it was made for, nm.
        made_for_nm: f64,
    },
}

/// A tilt-tuning request.
#[derive(Debug, Clone, PartialEq)]
pub struct TiltRequest {
    /// Crystal (uniaxial, or biaxial cut along a principal axis).
    pub medium: Medium,
    /// For a biaxial crystal, the principal axis along the plate normal (`cut`); `None` for a
    /// uniaxial crystal, or to take the cut of largest birefringence.
    pub cut: Option<PrincipalCut>,
    /// Wavelength at which the target is wanted.
    pub wavelength: Wavelength,
    /// The plate's thickness.
    pub size: PlateSize,
    /// Target retardance, waves, modulo whole waves (0.25 for a quarter wave).
    pub retardance_waves: f64,
    /// Azimuth of the optic axis in the plate (a biaxial plate's slower in-face principal axis),
    /// from x toward y, degrees.
    pub axis_azimuth_deg: f64,
    /// Azimuth of the plane in which the mount tilts, degrees.
    pub tilt_azimuth_deg: f64,
    /// Largest mount tilt searched, degrees.
    pub max_tilt_deg: f64,
    /// The temperature the part is designed to work at, °C (`temperature_c`, default 20):
    /// its indices are taken there and its thickness grown to it; thicknesses are quoted at 20 °C.
    pub temperature_c: f64,
}

impl TiltRequest {
    /// Reads a request object (`"kind": "tilt-tuning"` checked by the caller).
    ///
    /// # Errors
    /// `cut` when it is not `"x"`, `"y"` or `"z"` or is given for a uniaxial crystal; the path of the first offending field; `thickness_mm` when both or neither of it and
    /// `order_number` are given; `made_for_nm` without `order_number`.
    pub fn from_json(f: &mut Fields) -> Result<TiltRequest, Error> {
        let PlateCrystal { medium, cut } = plate_crystal(f)?;
        let wavelength = wavelength_field(f)?;
        let retardance_waves = in_range("retardance_waves", f.required_number("retardance_waves")?, 0.0, 1.0)?;
        let size = match (f.has("thickness_mm"), f.has("order_number")) {
            (true, false) => {
                if f.has("made_for_nm") {
                    return Err(Error::new("made_for_nm", "applies only with \"order_number\""));
                }
                PlateSize::Thickness(above("thickness_mm", f.required_number("thickness_mm")?, 0.0, 1e3)?)
            }
            (false, true) => PlateSize::Order {
                order: whole(f, "order_number", 0.0, 0.0, 1e5)? as u32,
                made_for_nm: in_range("made_for_nm", f.number_or("made_for_nm", wavelength.nm())?, 1.0, 1e6)?,
            },
            _ => {
                return Err(Error::new(
                    "thickness_mm",
                    "give either \"thickness_mm\" or \"order_number\" (with \"made_for_nm\")",
                ));
            }
        };
        let axis_azimuth_deg = in_range("axis_azimuth_deg", f.number_or("axis_azimuth_deg", 0.0)?, -360.0, 360.0)?;
        let tilt_azimuth_deg = in_range("tilt_azimuth_deg", f.number_or("tilt_azimuth_deg", 0.0)?, -360.0, 360.0)?;
        let max_tilt_deg = above("max_tilt_deg", f.number_or("max_tilt_deg", 30.0)?, 0.0, 80.0)?;
        Ok(TiltRequest {
            medium,
            cut,
            wavelength,
            size,
            retardance_waves,
            axis_azimuth_deg,
            tilt_azimuth_deg,
            max_tilt_deg,
            temperature_c: temperature_field(f)?,
        })
    }

    /// The wavelength the plate was made for, nm, when it is given by its order.
    pub fn made_for_nm(&self) -> Option<f64> {
        match self.size {
            PlateSize::Order { made_for_nm, .. } => Some(made_for_nm),
            PlateSize::Thickness(_) => None,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn tilt_fields_name_themselves() {
        for (doc, field) in [
            (r#"{"material": "quartz", "retardance_waves": 0.25}"#, "thickness_mm"),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25, "thickness_mm": 1, "order_number": 3}"#,
                "thickness_mm",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25, "thickness_mm": 1, "made_for_nm": 600}"#,
                "made_for_nm",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 1.5, "thickness_mm": 1}"#,
                "retardance_waves",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25, "thickness_mm": 1, "max_tilt_deg": 85}"#,
                "max_tilt_deg",
            ),
            (
                r#"{"material": "ktp", "retardance_waves": 0.25, "thickness_mm": 1, "cut": "q"}"#,
                "cut",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25, "thickness_mm": 1, "cut": "x"}"#,
                "cut",
            ),
        ] {
            assert_eq!(first_error(doc, TiltRequest::from_json).field, field, "{doc}");
        }
    }
}
