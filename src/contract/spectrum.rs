//! Spectra: the forward transmission and polarization of a scenario against wavelength, every
//! point traced in full.
//!
//! Physics. At each wavelength of the range the whole scenario is resolved again (every crystal's
//! indices from its dispersion formula at that wavelength and the scenario's temperature) and
//! traced; the transmission is the power that leaves forward as the result's `total_power`
//! gives it, the sum over the spots, where rays whose beams overlap add as fields weighted by
//! their overlap. So a plate between parallel polarizers gives cos²(πΔn·d/λ) from the coherent
//! sum of its o- and e-rays, not the ½ that adding their powers would give. The output
//! polarization is the Stokes vector of all the forward light: the sum of the spots' Stokes
//! vectors (each spot's own already the coherent sum of its rays; separate spots add
//! incoherently), or, where every ray leaves from one point, that of M C_in Mᴴ for the set-up's
//! Jones matrix M (`optics::coincident`). Its S0 is the transmission, the same number to the bit.
//! Light that leaves in two spots of orthogonal polarization (a displacer) so reads as partly
//! polarized or unpolarized, as a detector that takes in both spots sees it.
//!
//! Conventions. `spectrum` {`from_nm`, `to_nm`, `points`} (`../shared/CONVENTIONS.md`, "Spectra"):
//! `points` wavelengths evenly spaced from `from_nm` to `to_nm` inclusive, in the scenario's own
//! wavelength basis (vacuum, or standard air with `"wavelength_in": "air"`, each then converted
//! to vacuum as the scenario's wavelength is). The scenario's `wavelength_nm` is not part of the
//! range. A wavelength where a formula breaks down gives `null` and one warning naming the first
//! such wavelength and the reason; out-of-range formulas are extrapolated as in a single trace,
//! their warnings left to the trace at the scenario's own wavelength. The result's `spectrum`
//! holds, beside `wavelength_nm` and `transmission`, `stokes` [[S0, S1, S2, S3] | null, …]
//! (absolute, in units of the input power like `total_power`) and `degree_of_polarization`
//! (√(S1² + S2² + S3²)/S0, 0 where nothing is transmitted), on the Jones basis the result's rays
//! and spots use: the beam basis (e1, e2) of the outgoing direction, x̂ and ŷ for light along z
//! (`optics::modes::beam_basis`), with S1 = |E1|² − |E2|², S2 = 2 Re(E1 E2*),
//! S3 = 2 Im(E1 E2*), S3 > 0 right-handed (Born & Wolf: clockwise as seen looking toward the
//! source; `../shared/CONVENTIONS.md`, "Handedness"). Spots that leave in different directions
//! (after wedges) add each on its own direction's basis. Natively, a long range is
//! traced on the machine's threads, in contiguous parts: each point is independent, so the
//! values do not depend on the split.
//!
//! Sources: none beyond the trace's; the checks compare with the textbook transmission of a
//! plate between polarizers and of a stage-doubling filter (product formula), and the output
//! Stokes vector of a plate at 45° and of a displacer with an independent Jones computation, in
//! tests/spectrum.rs.

use crate::contract::fields::{Fields, ranged};
use crate::contract::white_light::WhiteLight;
use crate::error::Error;
use crate::optics::stokes::degree_of_polarization;
use serde::Serialize;
use serde_json::{Value, json};

/// Most points a spectrum may ask for.
pub const MAX_POINTS: usize = 20_000;

/// Most rays a spectrum may trace in all (points times the rays of one trace): about a second or
/// two natively, a few in the page, so that no set-up's spectrum stalls the page for minutes.
pub const MAX_RAY_TRACES: usize = 1_000_000;

/// Refuses a spectrum of `range` for a set-up whose trace follows `rays_per_trace` rays when the
/// whole spectrum would trace more than [`MAX_RAY_TRACES`] rays.
///
/// # Errors
/// `spectrum.points`, naming the rays per trace and the most points the set-up allows.
pub fn check_work(range: &SpectrumRange, rays_per_trace: usize) -> Result<(), Error> {
    let rays = rays_per_trace.max(1);
    if range.points.saturating_mul(rays) <= MAX_RAY_TRACES {
        return Ok(());
    }
    Err(Error::new(
        "spectrum.points",
        format!(
            "this set-up follows {rays} rays at each wavelength, so {} points would trace {} rays; \
             at most {MAX_RAY_TRACES} are traced for a spectrum: choose at most {} points",
            range.points,
            range.points.saturating_mul(rays),
            (MAX_RAY_TRACES / rays).max(1)
        ),
    ))
}

/// The range a scenario's `spectrum` asks for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SpectrumRange {
    /// First wavelength, nm (in the scenario's wavelength basis).
    pub from_nm: f64,
    /// Last wavelength, nm.
    pub to_nm: f64,
    /// Number of wavelengths, 2 to [`MAX_POINTS`].
    pub points: usize,
}

impl SpectrumRange {
    /// Reads `spectrum` {`from_nm`, `to_nm`, `points`} from the object `v` at `path`.
    ///
    /// # Errors
    /// `spectrum.from_nm` or `spectrum.to_nm` outside 1 nm to 1 mm, or equal to each other;
    /// `spectrum.points` not a whole number from 2 to 20 000; an unknown field inside.
    pub fn from_json(path: &str, v: &Value) -> Result<SpectrumRange, Error> {
        let mut f = Fields::new(path, v)?;
        let from_nm = ranged(&mut f, "from_nm", None, 1.0, 1e6)?;
        let to_nm = ranged(&mut f, "to_nm", None, 1.0, 1e6)?;
        let points_path = f.path_of("points");
        let points = ranged(&mut f, "points", None, 2.0, MAX_POINTS as f64)?;
        if points.fract() != 0.0 {
            return Err(Error::new(points_path, format!("must be a whole number, got {points}")));
        }
        if from_nm == to_nm {
            return Err(Error::new(
                f.path_of("to_nm"),
                format!("must differ from from_nm ({from_nm} nm): a spectrum spans a range"),
            ));
        }
        f.finish()?;
        Ok(SpectrumRange {
            from_nm,
            to_nm,
            points: points as usize,
        })
    }

    /// The range as its document.
    pub fn to_json(self) -> Value {
        json!({"from_nm": self.from_nm, "to_nm": self.to_nm, "points": self.points})
    }

    /// The wavelengths of the range, nm, evenly spaced, both ends included exactly.
    pub fn wavelengths_nm(&self) -> Vec<f64> {
        let last = (self.points - 1) as f64;
        (0..self.points)
            .map(|i| match i {
                0 => self.from_nm,
                i if i + 1 == self.points => self.to_nm,
                i => self.from_nm + (self.to_nm - self.from_nm) * (i as f64 / last),
            })
            .collect()
    }
}

/// A scenario's spectrum: wavelengths and the forward transmission and polarization at each.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Spectrum {
    /// The wavelengths, nm, in the scenario's wavelength basis.
    pub wavelength_nm: Vec<f64>,
    /// Forward transmission (total power of the spots) at each; `null` where a formula breaks down.
    pub transmission: Vec<Option<f64>>,
    /// Stokes vector [S0, S1, S2, S3] of the forward light at each (S0 the transmission), on the
    /// outgoing beam basis (x̂, ŷ along z), S3 > 0 right-handed; `null` as `transmission`.
    pub stokes: Vec<Option<[f64; 4]>>,
    /// Degree of polarization of the forward light at each, 0 to 1; `null` as `transmission`.
    pub degree_of_polarization: Vec<Option<f64>>,
    /// The colour the set-up shows in white light (`contract::white_light`); `null` when a
    /// wavelength of the colour tables cannot be traced.
    pub white_light: Option<WhiteLight>,
}

/// The spectrum over `range` of a scenario whose forward light's Stokes vector at a wavelength
/// (nm, in its wavelength basis) `stokes_at` gives, with a warning when some wavelengths cannot
/// be traced.
pub fn spectrum(
    range: &SpectrumRange,
    stokes_at: impl Fn(f64) -> Result<[f64; 4], Error> + Sync,
) -> (Spectrum, Option<String>) {
    let wavelength_nm = range.wavelengths_nm();
    let traced = traced_in_parallel(&wavelength_nm, &stokes_at);
    let mut first_failure: Option<(f64, Error)> = None;
    let mut failures = 0usize;
    let stokes: Vec<Option<[f64; 4]>> = wavelength_nm
        .iter()
        .zip(traced)
        .map(|(&nm, s)| match s {
            Ok(s) => Some(s),
            Err(e) => {
                failures += 1;
                first_failure.get_or_insert((nm, e));
                None
            }
        })
        .collect();
    let warning = first_failure.map(|(nm, e)| {
        format!(
            "spectrum: {failures} of {} wavelengths could not be traced (null), the first at {nm} nm: {}",
            range.points, e.message
        )
    });
    (
        Spectrum {
            wavelength_nm,
            transmission: stokes.iter().map(|s| s.map(|s| s[0])).collect(),
            degree_of_polarization: stokes.iter().map(|s| s.as_ref().map(degree_of_polarization)).collect(),
            stokes,
            white_light: None,
        },
        warning,
    )
}

/// Spectra of at least this many points are split over the machine's threads (natively; one
/// thread on WebAssembly). Every point is independent, so the values are the same either way.
pub const PARALLEL_MIN_POINTS: usize = 64;

/// `stokes_at` at every wavelength, in order: on contiguous parts of the list, one per
/// available thread (at most 8), natively; on the calling thread on WebAssembly or for short
/// lists.
fn traced_in_parallel(
    wavelength_nm: &[f64],
    stokes_at: &(impl Fn(f64) -> Result<[f64; 4], Error> + Sync),
) -> Vec<Result<[f64; 4], Error>> {
    let threads = if cfg!(target_arch = "wasm32") {
        1
    } else {
        std::thread::available_parallelism().map_or(1, |n| n.get()).min(8)
    };
    if threads == 1 || wavelength_nm.len() < PARALLEL_MIN_POINTS {
        return wavelength_nm.iter().map(|&nm| stokes_at(nm)).collect();
    }
    let per = wavelength_nm.len().div_ceil(threads);
    std::thread::scope(|scope| {
        let parts: Vec<_> = wavelength_nm
            .chunks(per)
            .map(|part| scope.spawn(move || part.iter().map(|&nm| stokes_at(nm)).collect::<Vec<_>>()))
            .collect();
        parts
            .into_iter()
            .flat_map(|h| {
                h.join()
                    .unwrap_or_else(|_| vec![Err(Error::new("spectrum", "a wavelength could not be traced")); per])
            })
            .take(wavelength_nm.len())
            .collect()
    })
}
