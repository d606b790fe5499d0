//! The liquid-crystal voltage request (`"kind": "lc-voltage"`): the voltage at which a cell
//! gives a target retardance at a wavelength, and the thinnest cell whose retardance spans a
//! range.
//!
//! The cell is given by the `lc_cell` element's fields at the top level of the request
//! (`thickness_um`, `lc`, `rubbing_azimuth_deg`, `twist_deg`, `pretilt_deg`; see
//! `contract::lc_cell`), without `voltage_v`, which is what the design finds. Further fields:
//!
//! | field | default | accepted |
//! |---|---|---|
//! | `wavelength_nm` | 632.8 | as every design request |
//! | `retardance_waves` | required | above 0, at most 100 |
//! | `retardance_range_waves` | none | [low, high], 0 ≤ low < high ≤ 100 |
//! | `max_voltage_v` | 20 | above 0, at most 1000 |
//! | `temperature_c` | 20 | as every design request; at or above a catalogued nematic's clearing point an error |
//!
//! A catalogued nematic's constants are its values at one temperature: outside the band where
//! they are used without remark the answer warns (`contract::lc_cell`).

use super::{temperature_field, wavelength_field};
use crate::contract::fields::{Fields, number_list};
use crate::contract::lc_cell::{self, LcCell};
use crate::error::{Error, above};
use crate::optics::wavelength::Wavelength;

/// An lc-voltage request.
#[derive(Debug, Clone, PartialEq)]
pub struct LcVoltageRequest {
    /// The cell (its `voltage_v` unused).
    pub cell: LcCell,
    /// Design wavelength.
    pub wavelength: Wavelength,
    /// The retardance wanted, waves.
    pub retardance_waves: f64,
    /// A retardance range the cell must span between 0 V and `max_voltage_v`, waves.
    pub range_waves: Option<(f64, f64)>,
    /// The highest voltage the drive gives, RMS volts.
    pub max_voltage_v: f64,
    /// The temperature the cell works at, °C.
    pub temperature_c: f64,
    /// The cell's warning at that temperature, if any (`temperature_c: …`).
    pub temperature_warning: Option<String>,
}

impl LcVoltageRequest {
    /// Reads a request object (`"kind": "lc-voltage"` checked by the caller).
    ///
    /// # Errors
    /// The path of the first offending field: the cell's (`thickness_um`, `lc`, `lc.k11_pn`, …),
    /// `voltage_v` (given: the design finds it), `retardance_waves`, `retardance_range_waves`,
    /// `max_voltage_v`, `wavelength_nm`, `temperature_c` (out of range, or at or above a
    /// catalogued nematic's clearing point).
    pub fn from_json(f: &mut Fields) -> Result<LcVoltageRequest, Error> {
        if f.has("voltage_v") {
            return Err(Error::new(
                "voltage_v",
                "is what this design finds; give the retardance_waves wanted instead",
            ));
        }
        let cell = lc_cell::parse(f)?;
        let wavelength = wavelength_field(f)?;
        let retardance_waves = above("retardance_waves", f.required_number("retardance_waves")?, 0.0, 100.0)?;
        let range_waves = match f.get("retardance_range_waves") {
            None => None,
            Some(v) => {
                let path = "retardance_range_waves";
                let xs = number_list(path, v, 2)?;
                let (lo, hi) = (xs[0], xs[1]);
                if !(0.0..hi).contains(&lo) || hi > 100.0 {
                    return Err(Error::new(
                        path,
                        format!("must be [low, high] with 0 ≤ low < high ≤ 100 waves, got [{lo}, {hi}]"),
                    ));
                }
                Some((lo, hi))
            }
        };
        let max_voltage_v = above("max_voltage_v", f.number_or("max_voltage_v", 20.0)?, 0.0, 1000.0)?;
        let temperature_c = temperature_field(f)?;
        let temperature_warning = cell
            .temperature_check(temperature_c)?
            .map(|w| format!("temperature_c: {w}"));
        Ok(LcVoltageRequest {
            cell,
            wavelength,
            retardance_waves,
            range_waves,
            max_voltage_v,
            temperature_c,
            temperature_warning,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::super::first_error;
    use super::*;

    #[test]
    fn lc_voltage_fields_name_themselves() {
        let cell = r#""thickness_um": 5, "lc": "5cb""#;
        for (doc, field) in [
            (format!(r#"{{{cell}}}"#), "retardance_waves"),
            (format!(r#"{{{cell}, "retardance_waves": 0}}"#), "retardance_waves"),
            (
                format!(r#"{{{cell}, "retardance_waves": 0.5, "voltage_v": 2}}"#),
                "voltage_v",
            ),
            (
                format!(r#"{{{cell}, "retardance_waves": 0.5, "max_voltage_v": -1}}"#),
                "max_voltage_v",
            ),
            (
                format!(r#"{{{cell}, "retardance_waves": 0.5, "retardance_range_waves": [0.5, 0.1]}}"#),
                "retardance_range_waves",
            ),
            (r#"{"lc": "5cb", "retardance_waves": 0.5}"#.to_string(), "thickness_um"),
            (
                r#"{"thickness_um": 5, "lc": "x", "retardance_waves": 0.5}"#.to_string(),
                "lc",
            ),
            (
                r#"{"thickness_um": 5, "lc": {"ne": 1.7}, "retardance_waves": 0.5}"#.to_string(),
                "lc.no",
            ),
            (
                format!(r#"{{{cell}, "retardance_waves": 0.5, "temperature_c": 35}}"#),
                "temperature_c",
            ),
        ] {
            assert_eq!(first_error(&doc, LcVoltageRequest::from_json).field, field, "{doc}");
        }
    }
}
