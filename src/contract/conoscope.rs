//! A scenario in convergent light: its conoscopic figure (the whole set-up's transmission over a
//! cone of directions) or its first crystal's acceptance map (retardance error against
//! direction), from the exact plane-wave solution at every direction ([`crate::optics::conoscope`]).
//!
//! The map is computed on demand for a view, not kept in the trace result: it is a picture of
//! the set-up (65,536 numbers at 256 × 256) that the page redraws as the scenario changes, and the
//! numbers of any one direction are those of a trace with the beam at that incidence (tested).
//! The scenario's beam incidence is not used: every direction of the cone is lit; its
//! polarization is. Cone and pixels are checked here, with errors naming `conoscope.cone_deg`
//! and `conoscope.pixels`.

use crate::contract::scenario::Scenario;
use crate::error::Error;
use crate::optics::conoscope::{
    Grid, Quantity, conoscope_map, conoscope_stack_ok, first_retardance_at, transmission_at,
};
use crate::optics::stack::Stack;
use std::f64::consts::TAU;

/// The largest polar angle of the cone a map may ask for, degrees.
pub const MAX_CONE_DEG: f64 = 80.0;
/// The largest number of pixels per side.
pub const MAX_PIXELS: usize = 512;
/// The largest number of pixels per side of a set-up holding a liquid-crystal cell: every
/// direction solves the cell's 100 slices again (each by its closed-form exponential,
/// `optics::lc::slice`: about 15 µs a direction natively for a 90° twisted cell, against about a
/// microsecond for a crystal plate), so a cell's map is computed at most 128 × 128 (about 0.3 s
/// natively, about half a second in the page's worker; its note states the directions). A thin
/// cell's figure varies slowly across the cone, so little is lost.
pub const MAX_PIXELS_WITH_CELL: usize = 128;

/// A computed conoscopic map.
#[derive(Debug, Clone, PartialEq)]
pub struct ConoscopeMap {
    /// What each value is.
    pub quantity: Quantity,
    /// Largest polar angle in the outside medium, degrees.
    pub cone_deg: f64,
    /// Pixels per side.
    pub pixels: usize,
    /// Values row-major, row 0 at the top (+y up, +x right); `None` outside the cone.
    pub values: Vec<Option<f64>>,
    /// Smallest value inside the cone.
    pub min: f64,
    /// Largest value inside the cone.
    pub max: f64,
}

/// The map of `quantity` for `sc` over a cone of `cone_deg` at `pixels` per side (at most
/// `MAX_PIXELS_WITH_CELL` when the set-up holds a liquid-crystal cell; the map says how many).
///
/// # Errors
/// `conoscope.cone_deg` outside (0, 80]; `conoscope.pixels` outside 1 to 512; from
/// [`Scenario::resolve`]; `elements[i]` for an element with faces at an angle, a general crystal
/// (liquid-crystal cells are solved at every direction); `elements` for a retardance error
/// without a crystal.
pub fn conoscope_of(sc: &Scenario, quantity: Quantity, cone_deg: f64, pixels: usize) -> Result<ConoscopeMap, Error> {
    if !(cone_deg > 0.0 && cone_deg <= MAX_CONE_DEG) {
        return Err(Error::new(
            "conoscope.cone_deg",
            format!("the cone must be above 0 and at most {MAX_CONE_DEG}°"),
        ));
    }
    if !(1..=MAX_PIXELS).contains(&pixels) {
        return Err(Error::new(
            "conoscope.pixels",
            format!("the map must have 1 to {MAX_PIXELS} pixels per side"),
        ));
    }
    let stack = resolved(sc)?;
    let pixels = if stack.cells.is_empty() {
        pixels
    } else {
        pixels.min(MAX_PIXELS_WITH_CELL)
    };
    let grid = Grid {
        cone_rad: cone_deg.to_radians(),
        pixels,
    };
    let values = conoscope_map(&stack, grid, quantity);
    let (min, max) = values
        .iter()
        .flatten()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &v| {
            (lo.min(v), hi.max(v))
        });
    if !min.is_finite() {
        return Err(Error::new(
            "elements",
            "a retardance error needs a crystal whose two waves propagate over the cone",
        ));
    }
    Ok(ConoscopeMap {
        quantity,
        cone_deg,
        pixels,
        values,
        min,
        max,
    })
}

/// The value of `quantity` for `sc` at one direction (`polar_deg`, `azimuth_deg`) in the outside
/// medium, as [`conoscope_of`] computes it for each pixel; `None` where it is undefined (an
/// evanescent mode).
///
/// # Errors
/// As [`conoscope_of`], less the grid's.
pub fn conoscope_at(sc: &Scenario, quantity: Quantity, polar_deg: f64, azimuth_deg: f64) -> Result<Option<f64>, Error> {
    let stack = resolved(sc)?;
    let (p, a) = (polar_deg.to_radians(), azimuth_deg.to_radians());
    Ok(match quantity {
        Quantity::Transmission => Some(transmission_at(&stack, p, a)),
        Quantity::RetardanceError => first_retardance_at(&stack, p, a)
            .zip(first_retardance_at(&stack, 0.0, 0.0))
            .map(|(g, g0)| (g - g0) / TAU),
    })
}

/// The resolved stack of `sc`, checked to be one that convergent light is solved for.
fn resolved(sc: &Scenario) -> Result<Stack, Error> {
    let (stack, _) = sc.resolve()?;
    conoscope_stack_ok(&stack).map_err(|i| {
        Error::new(
            format!("elements[{i}]"),
            "convergent light is solved for plane-parallel plates of uniaxial crystals and ideal elements only",
        )
    })?;
    Ok(stack)
}
