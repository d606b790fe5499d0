//! The colour a set-up shows in white light: its transmission traced at the CIE tables'
//! wavelengths and weighed by the standard observer under illuminant D65.
//!
//! Physics. The scenario is traced in full at each of the 81 wavelengths of the CIE 1931 tables
//! (380 to 780 nm at 5 nm, wavelengths in standard air, each traced at its vacuum wavelength
//! whatever the scenario's own wavelength basis), its forward transmission taken as a spectrum's
//! is (the spots' total power, coinciding rays adding as fields), and the colour computed by
//! [`crate::optics::colorimetry`]. Between polarizers this is the interference colour of the
//! plates; with the scenario's own input polarization, not unpolarized light, unless the beam is
//! given unpolarized.
//!
//! Conventions. Reported with a scenario's `spectrum` as `spectrum.white_light`:
//! {`illuminant` "D65", `observer` "CIE 1931 2°", `xyz` [X, Y, Z] (a perfect transmitter has
//! Y = 1, so Y is the luminous transmittance), `chromaticity` [x, y] (null for black), `srgb`
//! "#rrggbb", `outside_srgb`}; `null` with a warning when a wavelength of the tables cannot be
//! traced.
//!
//! Sources: those of [`crate::optics::colorimetry`] (CIE 015:2018; IEC 61966-2-1:1999).

use crate::error::Error;
use crate::optics::colorimetry::{self, POINTS};
use serde::Serialize;

/// The colour of a set-up in white light, as reported.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WhiteLight {
    /// The illuminant, "D65".
    pub illuminant: &'static str,
    /// The observer, "CIE 1931 2°".
    pub observer: &'static str,
    /// Tristimulus values X, Y, Z; Y is the luminous transmittance.
    pub xyz: [f64; 3],
    /// Chromaticity x, y; `null` for black.
    pub chromaticity: Option<[f64; 2]>,
    /// The sRGB colour, "#rrggbb", clipped to the gamut.
    pub srgb: String,
    /// Whether the colour lies outside the sRGB gamut (clipped by more than half a step).
    pub outside_srgb: bool,
}

/// The white-light colour of a scenario whose forward transmission at an air wavelength (nm)
/// `transmission_at_air` gives, or a warning naming the first wavelength that could not be
/// traced.
pub fn white_light(transmission_at_air: impl Fn(f64) -> Result<f64, Error>) -> Result<WhiteLight, String> {
    let mut t = [0.0; POINTS];
    for (slot, nm) in t.iter_mut().zip(colorimetry::wavelengths_nm()) {
        *slot = transmission_at_air(nm).map_err(|e| {
            format!(
                "spectrum: no colour in white light: the set-up cannot be traced at {nm} nm (in air): {}",
                e.message
            )
        })?;
    }
    let c = colorimetry::colour_of(&t);
    Ok(WhiteLight {
        illuminant: "D65",
        observer: "CIE 1931 2°",
        xyz: c.xyz,
        chromaticity: c.chromaticity,
        srgb: colorimetry::hex(c.srgb),
        outside_srgb: c.outside_srgb,
    })
}
