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
//!
//! White light ([`white_light_of`]): the conoscopic figure's colours, the interference colours
//! of the isochromes. Each direction's transmission is taken at each of the colour tables'
//! wavelengths (81, 380 to 780 nm at 5 nm in standard air, each traced at its vacuum wavelength,
//! as a scenario's `spectrum.white_light` is: `contract::white_light`) and weighed by the CIE 1931
//! observer under illuminant D65 into its colour ([`crate::optics::colorimetry::colour_of`]). So
//! a pixel's colour is the white-light colour of the whole trace with the beam at that direction
//! (tested). A retardance above about 20 waves varies faster across the band than 5 nm resolve
//! (its period λ²/Γ falls below two steps), where the figure shows higher-order white only on
//! average; its note states the sampling.

use crate::contract::scenario::Scenario;
use crate::error::Error;
use crate::optics::colorimetry::{self, Colour, POINTS};
use crate::optics::conoscope::{
    Grid, Quantity, conoscope_map, conoscope_stack_ok, first_retardance_at, outside_modes, set_up_matrix_with,
    tangential_of, transmission_at,
};
use crate::optics::spots::power_of;
use crate::optics::stack::Stack;
use std::f64::consts::TAU;

/// The largest polar angle of the cone a map may ask for, degrees.
pub const MAX_CONE_DEG: f64 = 80.0;
/// The largest number of pixels per side.
pub const MAX_PIXELS: usize = 512;
/// The largest number of pixels per side of a set-up holding a liquid-crystal cell: every
/// direction solves the cell's 100 slices again (several directions at a time,
/// `optics::lc::transfer_lanes`: about 8 µs a direction natively for a 90° twisted cell, against
/// about 2 µs for a crystal plate), so a cell's map is computed at most 192 × 192, about the
/// wait of the former 128 × 128 (measured at load below 1: 0.34–0.36 s in the page's worker's
/// build, where 128 × 128 took 0.28–0.29 s before; 0.24 s natively; its note states the
/// directions). A thin cell's figure varies slowly across the cone, so little is lost.
pub const MAX_PIXELS_WITH_CELL: usize = 192;

/// The largest number of pixels per side of a set-up holding a general crystal (biaxial, or
/// quartz with its optical activity): each direction solves the crystal's two forward waves from
/// the forward factor of its characteristic quartic (`optics::forward_waves`, about twice a
/// uniaxial plate's work; before, its four waves by the 4×4 solver's QR iteration took about 12
/// times), so its map is computed at the page's 256 × 256 (measured on a two-core machine at load
/// 2.4–3.3: 61–63 ms for a KTP plate and an active quartz plate in the worker's build under Node,
/// 50–54 ms natively, against 345–367 ms and 301–338 ms before; the aim is about 100 ms).
pub const MAX_PIXELS_GENERAL: usize = 256;

/// The largest number of pixels per side of a white-light figure: each direction is solved at
/// the 81 wavelengths of the colour tables, 81 times a monochromatic figure's work.
pub const MAX_PIXELS_WHITE: usize = 256;
/// The largest number of pixels per side of a white-light figure of a set-up holding a
/// liquid-crystal cell (81 cell solves a direction).
pub const MAX_PIXELS_WHITE_WITH_CELL: usize = 24;
/// The largest number of pixels per side of a white-light figure of a set-up holding a general
/// crystal (81 forward-wave solves a direction: 128 × 128 took 1.06–1.11 s for a KTP plate and an
/// active quartz plate in the worker's build under Node, about the aim of 1 s that a uniaxial
/// plate's 256 × 256 meets, and the page shares it among its workers; 0.83–0.85 s natively on two
/// threads at load 2.2–3.3, 0.42–0.43 s at load 1; 6.6–6.9 s and 5.6–5.9 s before, when 48 × 48
/// was the cap).
pub const MAX_PIXELS_WHITE_GENERAL: usize = 128;

/// The cap on pixels per side for `stack`: `cell` with a liquid-crystal cell, `general` with a
/// general crystal, the smaller with both; none for plates of uniaxial crystals.
fn cap_for(stack: &Stack, cell: usize, general: usize) -> Option<usize> {
    use crate::optics::stack::{Element, Medium};
    let has_general = stack
        .layers
        .iter()
        .any(|l| matches!(l.element, Element::Slab(s) if matches!(s.medium, Medium::Anisotropic(_))));
    let caps = [
        (!stack.cells.is_empty()).then_some(cell),
        has_general.then_some(general),
    ];
    caps.into_iter().flatten().min()
}

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
/// `MAX_PIXELS_WITH_CELL` when the set-up holds a liquid-crystal cell, `MAX_PIXELS_GENERAL` a
/// general crystal; the map says how many).
///
/// # Errors
/// `conoscope.cone_deg` outside (0, 80]; `conoscope.pixels` outside 1 to 512; from
/// [`Scenario::resolve`]; `elements[i]` for an element with faces at an angle (crystals of every
/// kind and liquid-crystal cells are solved at every direction); `elements` for a retardance
/// error without a crystal.
pub fn conoscope_of(sc: &Scenario, quantity: Quantity, cone_deg: f64, pixels: usize) -> Result<ConoscopeMap, Error> {
    check_grid(cone_deg, pixels, MAX_PIXELS)?;
    let stack = resolved(sc)?;
    let grid = grid_of(
        cone_deg,
        pixels,
        cap_for(&stack, MAX_PIXELS_WITH_CELL, MAX_PIXELS_GENERAL),
    );
    let pixels = grid.pixels;
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

/// The grid of a map over `cone_deg` at `pixels` per side, at most `cap` when given (a set-up
/// holding a liquid-crystal cell).
fn grid_of(cone_deg: f64, pixels: usize, cap: Option<usize>) -> Grid {
    Grid {
        cone_rad: cone_deg.to_radians(),
        pixels: cap.map_or(pixels, |cap| pixels.min(cap)),
    }
}

/// Checks a map's cone and its pixels per side (1 to `max_pixels`).
fn check_grid(cone_deg: f64, pixels: usize, max_pixels: usize) -> Result<(), Error> {
    if !(cone_deg > 0.0 && cone_deg <= MAX_CONE_DEG) {
        return Err(Error::new(
            "conoscope.cone_deg",
            format!("the cone must be above 0 and at most {MAX_CONE_DEG}°"),
        ));
    }
    if !(1..=max_pixels).contains(&pixels) {
        return Err(Error::new(
            "conoscope.pixels",
            format!("the map must have 1 to {max_pixels} pixels per side"),
        ));
    }
    Ok(())
}

/// The resolved stack of `sc`, checked to be one that convergent light is solved for.
fn resolved(sc: &Scenario) -> Result<Stack, Error> {
    let (stack, _) = sc.resolve()?;
    conoscope_stack_ok(&stack).map_err(|i| {
        Error::new(
            format!("elements[{i}]"),
            "convergent light is solved for plane-parallel plates, ideal elements and liquid-crystal cells only",
        )
    })?;
    Ok(stack)
}

/// A conoscopic figure in white light: each direction's colour.
#[derive(Debug, Clone, PartialEq)]
pub struct ColourMap {
    /// Largest polar angle in the outside medium, degrees.
    pub cone_deg: f64,
    /// Pixels per side.
    pub pixels: usize,
    /// Colours row-major, row 0 at the top (+y up, +x right); `None` outside the cone.
    pub colours: Vec<Option<Colour>>,
}

impl ColourMap {
    /// The pixels as RGBA bytes, row-major from the top row, transparent outside the cone.
    pub fn rgba(&self) -> Vec<u8> {
        self.colours
            .iter()
            .flat_map(|c| match c {
                Some(c) => [c.srgb[0], c.srgb[1], c.srgb[2], 255],
                None => [0; 4],
            })
            .collect()
    }
}

/// What a white-light figure of `pixels` per side shows and how it was sampled: the note the
/// page prints under it.
pub fn white_light_note(pixels: usize) -> String {
    format!(
        "colour in D65 white light (CIE 1931 2° observer): {POINTS} wavelengths, {}–{} nm in air at {} nm; {pixels} × {pixels} directions",
        colorimetry::FIRST_NM,
        colorimetry::FIRST_NM + colorimetry::STEP_NM * (POINTS - 1) as f64,
        colorimetry::STEP_NM
    )
}

/// `sc` resolved at each wavelength of the colour tables (see the header), checked for
/// convergent light.
fn white_light_stacks(sc: &Scenario) -> Result<Vec<Stack>, Error> {
    colorimetry::wavelengths_nm()
        .map(|air_nm| {
            let at = Scenario {
                wavelength: crate::optics::material::vacuum_from_air(air_nm)?.vacuum,
                air_wavelength_nm: sc.air_wavelength_nm.map(|_| air_nm),
                spectrum: None,
                ..sc.clone()
            };
            resolved(&at)
                .map_err(|e| Error::new(e.field, format!("in white light at {air_nm} nm in air: {}", e.message)))
        })
        .collect()
}

/// The colour of direction (`polar`, `azimuth`) (radians) through the stacks of
/// [`white_light_stacks`].
///
/// The stacks share the scenario's outside medium, so the direction's tangential wave vector and
/// the outside medium's modes are solved once for the whole spectrum.
fn colour_at(stacks: &[Stack], polar: f64, azimuth: f64) -> Colour {
    let mut t = [0.0; POINTS];
    if let Some(first) = stacks.first() {
        let qt = tangential_of(first, polar, azimuth);
        let outside = outside_modes(first.outside_index, qt);
        for (slot, stack) in t.iter_mut().zip(stacks) {
            *slot = if stack.outside_index == first.outside_index {
                power_of(&set_up_matrix_with(stack, qt, &outside), &stack.input.stokes)
            } else {
                transmission_at(stack, polar, azimuth)
            };
        }
    }
    colorimetry::colour_of(&t)
}

/// The conoscopic figure of `sc` in white light over a cone of `cone_deg` at `pixels` per side
/// (at most [`MAX_PIXELS_WHITE_WITH_CELL`] when the set-up holds a liquid-crystal cell,
/// [`MAX_PIXELS_WHITE_GENERAL`] a general crystal; the map says how many). Natively its rows are computed on the machine's threads (at most 8), in
/// contiguous parts as [`white_light_part`] gives them: every direction is independent, so the
/// colours do not depend on the split.
///
/// # Errors
/// `conoscope.cone_deg` outside (0, 80]; `conoscope.pixels` outside 1 to [`MAX_PIXELS_WHITE`];
/// from [`Scenario::resolve`] at any of the tables' wavelengths (the message names it);
/// `elements[i]` for an element convergent light is not solved for.
pub fn white_light_of(sc: &Scenario, cone_deg: f64, pixels: usize) -> Result<ColourMap, Error> {
    let (stacks, grid) = white_light_grid(sc, cone_deg, pixels)?;
    let threads = if cfg!(target_arch = "wasm32") {
        1
    } else {
        std::thread::available_parallelism().map_or(1, |n| n.get()).min(8)
    };
    let colours = if threads == 1 || grid.pixels < 16 {
        colours_of_rows(&stacks, grid, 0..grid.pixels)
    } else {
        std::thread::scope(|scope| {
            let parts: Vec<_> = (0..threads)
                .map(|k| {
                    let stacks = &stacks;
                    scope.spawn(move || colours_of_rows(stacks, grid, part_rows(grid.pixels, k, threads)))
                })
                .collect();
            let mut colours = Vec::with_capacity(grid.pixels * grid.pixels);
            for (k, part) in parts.into_iter().enumerate() {
                // A part's thread cannot panic (the colour of a direction is infallible); were it
                // to, its rows are computed here instead.
                colours.extend(
                    part.join()
                        .unwrap_or_else(|_| colours_of_rows(&stacks, grid, part_rows(grid.pixels, k, threads))),
                );
            }
            colours
        })
    };
    Ok(ColourMap {
        cone_deg,
        pixels: grid.pixels,
        colours,
    })
}

/// The most parts a white-light figure may be split into ([`white_light_part`]).
pub const MAX_PARTS: usize = 16;

/// The rows of part `part` (from 0) of `parts` of a figure of `pixels` rows: from
/// ⌊pixels·part/parts⌋ up to ⌊pixels·(part + 1)/parts⌋, so the parts in order tile the rows (the
/// page's worker parts are put together by the same rule, `www/convergent.js`).
pub fn part_rows(pixels: usize, part: usize, parts: usize) -> std::ops::Range<usize> {
    let parts = parts.max(1);
    pixels * part / parts..pixels * (part + 1) / parts
}

/// Part `part` (from 0) of `parts` of [`white_light_of`]'s figure, so that several workers can
/// share it: the whole figure's size, with the colours of the part's rows (⌊pixels·part/parts⌋
/// up to ⌊pixels·(part + 1)/parts⌋) alone and `None` in every other row. The parts' rows put
/// together are the whole figure, bit for bit (tested).
///
/// # Errors
/// As [`white_light_of`]; `conoscope.parts` outside 1 to 16; `conoscope.part` not below
/// `parts`.
pub fn white_light_part(
    sc: &Scenario,
    cone_deg: f64,
    pixels: usize,
    part: usize,
    parts: usize,
) -> Result<ColourMap, Error> {
    if !(1..=MAX_PARTS).contains(&parts) {
        return Err(Error::new(
            "conoscope.parts",
            format!("a white-light figure is split into 1 to {MAX_PARTS} parts, got {parts}"),
        ));
    }
    if part >= parts {
        return Err(Error::new(
            "conoscope.part",
            format!("the part must be from 0 to {} (parts − 1), got {part}", parts - 1),
        ));
    }
    let (stacks, grid) = white_light_grid(sc, cone_deg, pixels)?;
    let rows = part_rows(grid.pixels, part, parts);
    let mut colours = vec![None; rows.start * grid.pixels];
    colours.extend(colours_of_rows(&stacks, grid, rows));
    colours.resize(grid.pixels * grid.pixels, None);
    Ok(ColourMap {
        cone_deg,
        pixels: grid.pixels,
        colours,
    })
}

/// The stacks of a white-light figure ([`white_light_stacks`]) and its grid, the cap for a
/// set-up with a liquid-crystal cell or a general crystal applied.
fn white_light_grid(sc: &Scenario, cone_deg: f64, pixels: usize) -> Result<(Vec<Stack>, Grid), Error> {
    check_grid(cone_deg, pixels, MAX_PIXELS_WHITE)?;
    let stacks = white_light_stacks(sc)?;
    let cap = stacks
        .iter()
        .filter_map(|s| cap_for(s, MAX_PIXELS_WHITE_WITH_CELL, MAX_PIXELS_WHITE_GENERAL))
        .min();
    let grid = grid_of(cone_deg, pixels, cap);
    Ok((stacks, grid))
}

/// The colours of `rows` of `grid`, row-major, through the white-light stacks.
fn colours_of_rows(stacks: &[Stack], grid: Grid, rows: std::ops::Range<usize>) -> Vec<Option<Colour>> {
    let mut colours = Vec::with_capacity(rows.len() * grid.pixels);
    for row in rows {
        for column in 0..grid.pixels {
            colours.push(grid.direction(column, row).map(|(p, a)| colour_at(stacks, p, a)));
        }
    }
    colours
}

/// The white-light colour of `sc` at one direction (`polar_deg`, `azimuth_deg`) in the outside
/// medium, as [`white_light_of`] computes it for each pixel.
///
/// # Errors
/// As [`white_light_of`], less the grid's.
pub fn white_light_at(sc: &Scenario, polar_deg: f64, azimuth_deg: f64) -> Result<Colour, Error> {
    let stacks = white_light_stacks(sc)?;
    Ok(colour_at(&stacks, polar_deg.to_radians(), azimuth_deg.to_radians()))
}
