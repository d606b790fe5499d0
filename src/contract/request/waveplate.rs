//! The waveplate request: a crystal, a target retardance and the order that reaches it, with the
//! band and the cone of incidence over which the plate is reported.

use super::principal::PrincipalCut;
use super::{PlateCrystal, band, plate_crystal, temperature_field, wavelength_field, whole};
use crate::contract::fields::Fields;
use crate::contract::scenario::Medium;
use crate::error::{Error, in_range};
use crate::optics::wavelength::Wavelength;

/// Acceptance error (waves) of a request that names none: the retardance may drift this far
/// over the incidence cone.
pub const DEFAULT_ACCEPTANCE_ERROR_WAVES: f64 = 0.01;

/// How the plate reaches its retardance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Order {
    /// Zero order: the thinnest plate.
    Zero,
    /// Order m: m whole waves more.
    Multiple(u32),
    /// Two plates with crossed axes whose thickness difference is a zero-order plate; the
    /// thinner plate is `base_mm` thick.
    Compound {
        /// Thickness of the thinner plate, mm.
        base_mm: f64,
    },
}

/// A waveplate request.
#[derive(Debug, Clone, PartialEq)]
pub struct WaveplateRequest {
    /// Crystal (uniaxial, or biaxial cut along a principal axis).
    pub medium: Medium,
    /// For a biaxial crystal, the principal axis along the plate normal (`cut`); `None` for a
    /// uniaxial crystal, or to take the cut of largest birefringence.
    pub cut: Option<PrincipalCut>,
    /// Design wavelength.
    pub wavelength: Wavelength,
    /// Target retardance, waves (0.25 for a quarter wave).
    pub retardance_waves: f64,
    /// Order.
    pub order: Order,
    /// Band for the retardance curve, nm.
    pub band_nm: Option<(f64, f64)>,
    /// Largest angle of incidence for the angular curve, degrees.
    pub max_incidence_deg: f64,
    /// Retardance error that defines the acceptance angle, waves.
    pub acceptance_error_waves: f64,
    /// The temperature the part is designed to work at, °C (`temperature_c`, default 20):
    /// its indices are taken there and its thickness grown to it; thicknesses are quoted at 20 °C.
    pub temperature_c: f64,
}

impl WaveplateRequest {
    /// Reads a request object (`"kind": "waveplate"` checked by the caller).
    ///
    /// # Errors
    /// The path of the first offending field.
    pub fn from_json(f: &mut Fields) -> Result<WaveplateRequest, Error> {
        let PlateCrystal { medium, cut } = plate_crystal(f)?;
        let wavelength = wavelength_field(f)?;
        let retardance_waves = in_range("retardance_waves", f.required_number("retardance_waves")?, 1e-6, 1e4)?;
        let order = match f.string("order")? {
            None | Some("zero") => Order::Zero,
            Some("multiple") => Order::Multiple(whole(f, "order_number", 1.0, 0.0, 1e5)? as u32),
            Some("compound") => Order::Compound {
                base_mm: in_range("base_mm", f.number_or("base_mm", 1.0)?, 1e-3, 100.0)?,
            },
            Some(other) => {
                return Err(Error::new(
                    "order",
                    format!("unknown order '{other}'; expected zero, multiple or compound"),
                ));
            }
        };
        Ok(WaveplateRequest {
            medium,
            cut,
            wavelength,
            retardance_waves,
            order,
            band_nm: band(f, "band_nm")?,
            max_incidence_deg: in_range("max_incidence_deg", f.number_or("max_incidence_deg", 10.0)?, 0.01, 80.0)?,
            acceptance_error_waves: in_range(
                "acceptance_error_waves",
                f.number_or("acceptance_error_waves", DEFAULT_ACCEPTANCE_ERROR_WAVES)?,
                1e-9,
                1.0,
            )?,
            temperature_c: temperature_field(f)?,
        })
    }

    /// The band of the retardance curve: `band_nm`, or ±20 % of the wavelength by default.
    pub fn band(&self) -> (f64, f64) {
        let nm = self.wavelength.nm();
        self.band_nm.unwrap_or((0.8 * nm, 1.2 * nm))
    }
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn bad_requests_name_their_field() {
        for (doc, field) in [
            (r#"{"material": "quartz"}"#, "retardance_waves"),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25, "order": "first"}"#,
                "order",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25, "order": "multiple", "order_number": 2.5}"#,
                "order_number",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25, "order": "compound", "base_mm": 0}"#,
                "base_mm",
            ),
            (
                r#"{"material": "quartz", "retardance_waves": 0.25, "acceptance_error_waves": 2}"#,
                "acceptance_error_waves",
            ),
        ] {
            let e = first_error(doc, WaveplateRequest::from_json);
            assert_eq!(e.field, field, "{doc}: {e}");
        }
    }

    #[test]
    fn the_default_band_is_twenty_percent_either_side() {
        let v = serde_json::json!({"material": "quartz", "wavelength_nm": 500, "retardance_waves": 0.25});
        let r = WaveplateRequest::from_json(&mut Fields::new("", &v).unwrap()).unwrap();
        assert_eq!((r.order, r.band()), (Order::Zero, (400.0, 600.0)));
        assert_eq!(r.acceptance_error_waves, DEFAULT_ACCEPTANCE_ERROR_WAVES);
    }
}
