//! Beam displacer design: from a required o–e separation to the cut, the length and the
//! tolerances.
//!
//! Physics. At normal incidence the e-ray of a plate cut at θ (optic axis to plate normal) walks
//! off by ρ(θ) with tan ρ = (n_o² − n_e²) sin θ cos θ / (n_e² cos²θ + n_o² sin²θ), so a plate of
//! length L separates the rays by s = L tan|ρ|. |ρ| is largest at tan θ = n_e/n_o, where
//! tan ρ_max = |n_e² − n_o²|/(2 n_o n_e) and dρ/dθ = 0: a cut-angle error then changes the
//! separation only to second order, which is why this cut is the tolerant choice (Born & Wolf
//! §15.3; Yariv & Yeh, *Optical Waves in Crystals*, §4.3).
//!
//! The two output beams, Gaussian of 1/e² radius w = D/2 and offset s, overlap with the power
//! coupling η = exp(−s²/w²) (W. B. Joyce and B. C. DeLoach, "Alignment of Gaussian beams",
//! Appl. Opt. 23, 4187 (1984)); η is reported as the crosstalk between the two outputs. The clear
//! aperture is s + f·D for an aperture factor f (default 2, common practice: a circular stop of
//! radius f·D/2 around each beam clips exp(−2f²) of its power, 3.4·10⁻⁴ at f = 2).
//!
//! Biaxial crystals: a plate cut in a principal plane (`plane`, [`crate::design::principal`])
//! has its mode polarized normal to the plane going straight (index n_c whatever the cut) and its
//! in-plane mode walking off exactly as the e-wave above with n_o = n_a, n_e = n_b (the plane's
//! first and second principal indices) and θ measured from b; so the cut, the walk-off and their
//! derivatives are the formulas above with those two indices, and the exact plate model is the
//! general mode solver's ([`crate::optics::general_plate`]), the crystal oriented by `axes`. The
//! answer's `no` and `ne` are then n_a and n_b, and `straight_index` is n_c.
//!
//! Tolerances: the separation's sensitivity to cut tilt, to incidence angle (in the walk-off
//! plane), to length and to wavelength is the central difference of the exact plate model of
//! [`crate::optics::plate`]; a Monte Carlo run draws all four errors from normal distributions of the
//! given standard deviations and traces each sample exactly.

use crate::contract::request::principal::{AXIS_LETTERS, is_principal};
use crate::contract::request::{DisplacerRequest, PrincipalPlane, Tolerances};
use crate::contract::resolve::axis_from_degrees;
use crate::contract::scenario::Medium;
use crate::design::part::{ModeGroups, Part, crystal, oriented_crystal};
use crate::design::principal::{plane_indices, plane_orientation, widest_plane};
use crate::design::statistics::{Summary, summarize};
use crate::design::thermal::{Temperature, growth, growth_along_z, indices_at, principal_at};
use crate::error::Error;
use crate::optics::general_plate::general_plate_optics;
use crate::optics::material::Indices;
use crate::optics::plate::{PlateOptics, plate_optics, tangential};
use crate::optics::uniaxial::{max_walkoff_cut, walkoff};
use crate::optics::wavelength::Wavelength;
use crate::precision::{DIFF_STEP_INCIDENCE_DEG, DIFF_STEP_WAVELENGTH_NM, NO_BIREFRINGENCE, NO_WALKOFF_RAD};
use crate::random::Rng;
use serde::Serialize;

/// Separation of the outputs over a band.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BandSeparation {
    /// Smallest separation, mm, and where.
    pub min_mm: f64,
    /// Wavelength of the smallest separation, nm.
    pub min_at_nm: f64,
    /// Largest separation, mm.
    pub max_mm: f64,
    /// Wavelength of the largest separation, nm.
    pub max_at_nm: f64,
    /// Samples [wavelength nm, separation mm].
    pub curve: Vec<[f64; 2]>,
}

/// Sensitivity of the separation to each error (linearized), and the resulting spread.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Sensitivities {
    /// ∂s/∂(cut tilt), mm per degree: exactly 0 at the maximum-walk-off cut.
    pub tilt_mm_per_deg: f64,
    /// The second-order coefficient ½ ∂²s/∂θ², mm per degree²: a cut error Δθ changes the
    /// separation by `tilt_mm_per_deg`·Δθ + this·Δθ².
    pub tilt_second_order_mm_per_deg2: f64,
    /// ∂s/∂(incidence in the walk-off plane), mm per degree.
    pub incidence_mm_per_deg: f64,
    /// ∂s/∂L, mm per mm (= tan ρ).
    pub thickness_mm_per_mm: f64,
    /// ∂s/∂λ, mm per nm.
    pub wavelength_mm_per_nm: f64,
    /// √Σ(∂s/∂xᵢ · σᵢ)², mm: the linearized standard deviation of the separation.
    pub linear_std_mm: f64,
}

/// A solved displacer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DisplacerDesign {
    /// Catalogue key or "custom".
    pub material: String,
    /// For a biaxial crystal, the principal plane that holds the plate normal (`xy`, `xz` or
    /// `yz`); `no` and `ne` are then its first and second axis's principal indices, the in-plane
    /// mode's index ellipse, and the cut is measured from the second axis.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub plane: Option<String>,
    /// For a biaxial crystal, n_x, n_y, n_z at the design wavelength and temperature.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub principal_indices: Option<[f64; 3]>,
    /// For a biaxial crystal, the index of the mode polarized normal to the plane, which goes
    /// straight.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub straight_index: Option<f64>,
    /// Indices at the design wavelength.
    pub no: f64,
    /// Extraordinary principal index.
    pub ne: f64,
    /// Design wavelength, nm.
    pub wavelength_nm: f64,
    /// Cut tilt of the design (angle between optic axis and plate normal), degrees.
    pub cut_tilt_deg: f64,
    /// Cut tilt of maximum walk-off for this material and wavelength, degrees.
    pub max_walkoff_cut_deg: f64,
    /// Walk-off at the design cut, degrees.
    pub walkoff_deg: f64,
    /// d|ρ|/dθ at the design cut, degrees per degree: exactly 0 at the maximum-walk-off cut,
    /// where it vanishes by symmetry.
    pub walkoff_slope: f64,
    /// The second-order coefficient ½ d²|ρ|/dθ², degrees per degree²: a cut error Δθ changes the
    /// walk-off by `walkoff_slope`·Δθ + this·Δθ².
    pub walkoff_second_order_per_deg2: f64,
    /// Why the cut is what it is.
    pub cut_note: String,
    /// Plate length made at 20 °C, mm (the contract's thickness).
    pub length_mm: f64,
    /// Plate length at the design temperature, mm: the length that gives the separation there.
    pub length_at_temperature_mm: f64,
    /// The separation the exact trace gives for that length, mm.
    pub separation_mm: f64,
    /// Direction of the e-ray's displacement for an optic axis at azimuth 0: "+x" or "-x" (for a
    /// biaxial plate, the in-plane mode's, the plane's second axis tilted toward +x).
    pub displacement_direction: String,
    /// Separation over the band (the design wavelength alone if no band is given).
    pub band: BandSeparation,
    /// Clear aperture needed, mm.
    pub clear_aperture_mm: f64,
    /// Fraction of each beam's power clipped by a stop of radius aperture_factor·D/2.
    pub clipping_per_beam: f64,
    /// Separation / beam diameter.
    pub clearance_ratio: f64,
    /// Power overlap of the two output beams, exp(−s²/w²).
    pub crosstalk: f64,
    /// o–e phase at the exit, k0 (q_z,e − q_z,o) L, radians (for a biaxial plate s–f,
    /// k0 (q_z,s − q_z,f) L).
    pub exit_phase_rad: f64,
    /// The same reduced to (−π, π].
    pub exit_phase_mod_2pi_rad: f64,
    /// Group delay of the e-beam's pulse after the o-beam's across the plate, picoseconds
    /// (negative when the e-pulse leads; [`Part::group_delay_ps`]).
    pub group_delay_ps: Option<f64>,
    /// The group index of each mode at the design wavelength and temperature, at normal
    /// incidence, under the letters a trace gives the modes (`o`, `e`; `f`, `s` for a biaxial
    /// crystal), as the trace of `scenario` reports them ([`Part::mode_groups`]).
    pub modes: Option<ModeGroups>,
    /// Linearized sensitivities.
    pub sensitivities: Sensitivities,
    /// The error standard deviations used.
    pub tolerances: Tolerances,
    /// The separation's change per kelvin about the design temperature (`separation_um`).
    pub temperature: Temperature,
    /// Monte Carlo summary of the separation (absent when samples = 0).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub monte_carlo: Option<Summary>,
    /// A scenario with this plate, ready to load.
    pub scenario: Part,
}

/// Monte Carlo samples are drawn in chunks of this many, chunk k from its own generator seeded
/// with (seed, k), so that a caller running chunk by chunk (the page's worker, with progress)
/// gets exactly the samples of one run.
pub const MC_CHUNK: usize = 10_000;

/// The separations (mm) of Monte Carlo chunk `chunk` of a request, for a plate of cut `tilt_deg`
/// and length `length_mm` at 20 °C (the design's), working at the request's temperature; the last
/// chunk holds the remainder of `samples`.
/// Samples whose model cannot be evaluated (an evanescent mode) are left out.
pub fn monte_carlo_chunk(req: &DisplacerRequest, tilt_deg: f64, length_mm: f64, chunk: usize) -> Vec<f64> {
    let start = chunk.saturating_mul(MC_CHUNK);
    let n = req.samples.saturating_sub(start).min(MC_CHUNK);
    let mut rng = Rng::new(req.seed.wrapping_mul(0x0100_0000_01B3).wrapping_add(chunk as u64));
    let (t, nm) = (req.tolerances, req.wavelength.nm());
    let plane = plane_of(req).ok().flatten();
    (0..n)
        .filter_map(|_| {
            let (a, b, c, d) = (rng.normal(), rng.normal(), rng.normal(), rng.normal());
            separation(
                &req.medium,
                plane,
                req.temperature_c,
                tilt_deg + t.tilt_deg * a,
                t.incidence_deg * b,
                length_mm + t.thickness_mm * c,
                nm + t.wavelength_nm * d,
            )
        })
        .collect()
}

/// Separation (mm) of a plate made `l` mm long at 20 °C, working at `t_c` °C (its indices there,
/// its length grown along z), at normal-incidence-plus-errors: the model the tolerances and the
/// temperature sensitivity perturb.
fn separation(
    medium: &Medium,
    plane: Option<PrincipalPlane>,
    t_c: f64,
    tilt_deg: f64,
    polar_deg: f64,
    l: f64,
    nm: f64,
) -> Option<f64> {
    let wl = Wavelength::from_nm(nm).ok()?;
    let qt = tangential(1.0, polar_deg.to_radians(), 0.0);
    match plane {
        None => {
            let ix = indices_at(medium, wl, t_c).ok()?;
            let axis = axis_from_degrees(tilt_deg, 0.0).ok()?;
            let l = l * growth(medium, tilt_deg, 0.0, t_c);
            plate_optics(ix, axis, l, wl, qt).map(|p| p.separation_mm)
        }
        Some(p) => principal_plate(medium, p, t_c, tilt_deg, l, wl, qt).map(|p| p.separation_mm),
    }
}

/// The exact optics of a plate made `l` mm long at 20 °C in principal plane `plane`, cut at
/// `tilt_deg`, working at `t_c` °C.
fn principal_plate(
    medium: &Medium,
    plane: PrincipalPlane,
    t_c: f64,
    tilt_deg: f64,
    l: f64,
    wl: Wavelength,
    qt: [f64; 2],
) -> Option<PlateOptics> {
    let o = plane_orientation(plane, tilt_deg);
    let crystal = o.crystal(principal_at(medium, wl, t_c).ok()?).ok()?;
    general_plate_optics(&crystal, l * growth_along_z(medium, &o.axes(), t_c), wl, qt)
}

/// A request's principal plane: the one it names, or the plane of largest walk-off at the design
/// wavelength and temperature; `None` for a uniaxial crystal.
///
/// # Errors
/// As [`principal_at`].
pub fn plane_of(req: &DisplacerRequest) -> Result<Option<PrincipalPlane>, Error> {
    if !is_principal(&req.medium) {
        return Ok(None);
    }
    if req.plane.is_some() {
        return Ok(req.plane);
    }
    Ok(Some(widest_plane(principal_at(
        &req.medium,
        req.wavelength,
        req.temperature_c,
    )?)))
}

/// d²(tan ρ)/dθ² for the walk-off of [`walkoff`] at normal incidence.
///
/// Formula: with a = n_o² − n_e², b = n_e² cos²θ + n_o² sin²θ and N = n_e² cos²θ − n_o² sin²θ
/// (so that d(tan ρ)/dθ = a N / b², see [`dtan_walkoff`]), N' = −(n_o² + n_e²) sin 2θ and
/// b' = a sin 2θ give d²(tan ρ)/dθ² = a (N' b − 2 N b') / b³.
pub fn d2tan_walkoff(ix: Indices, theta: f64) -> f64 {
    let (no2, ne2) = (ix.no * ix.no, ix.ne * ix.ne);
    let (s, c) = theta.sin_cos();
    let (a, b, n) = (no2 - ne2, ne2 * c * c + no2 * s * s, ne2 * c * c - no2 * s * s);
    let s2 = (2.0 * theta).sin();
    a * (-(no2 + ne2) * s2 * b - 2.0 * n * a * s2) / (b * b * b)
}

/// The first and second derivatives of the walk-off magnitude |ρ(θ)| with respect to the cut θ,
/// both in radians (so the first is also degrees per degree), at normal incidence.
///
/// Formula: ρ = atan T with T = tan ρ, so ρ' = T'/(1 + T²) and
/// ρ'' = T''/(1 + T²) − 2 T T'²/(1 + T²)²; |ρ| takes the sign of T. At the maximum-walk-off cut
/// tan θ = n_e/n_o (and at its mirror image π − θ) the first derivative vanishes by symmetry and is
/// returned as exactly 0 (the cut is recognised within [`crate::precision::STATIONARY_CUT_RAD`]); the second there reduces to
/// |ρ|'' = −2 |n_o² − n_e²| / (n_o n_e) = −4 tan ρ_max.
pub fn walkoff_derivatives(ix: Indices, theta: f64) -> (f64, f64) {
    let t = walkoff(ix, theta).tan();
    let sign = t.signum();
    let (d1, d2) = (dtan_walkoff(ix, theta), d2tan_walkoff(ix, theta));
    let q = 1.0 + t * t;
    // |ρ(θ)| = |ρ(π − θ)|: the cut mirrored about 90° is stationary too.
    let tm = max_walkoff_cut(ix).0;
    let off = (theta - tm).abs().min((theta - (std::f64::consts::PI - tm)).abs());
    let first = if off <= crate::precision::STATIONARY_CUT_RAD {
        0.0
    } else {
        sign * d1 / q
    };
    (first, sign * (d2 / q - 2.0 * t * d1 * d1 / (q * q)))
}

/// d(tan ρ)/dθ for the walk-off of [`walkoff`] at normal incidence.
///
/// Formula: with a = n_o² − n_e², b = n_e² cos²θ + n_o² sin²θ, tan ρ = a sin θ cos θ / b, so
/// d(tan ρ)/dθ = a (cos 2θ · b − sin θ cos θ · a · sin 2θ) / b² = a (n_e² cos²θ − n_o² sin²θ) / b²,
/// whose numerator vanishes at tan θ = n_e/n_o.
pub fn dtan_walkoff(ix: Indices, theta: f64) -> f64 {
    let (no2, ne2) = (ix.no * ix.no, ix.ne * ix.ne);
    let (s, c) = theta.sin_cos();
    let b = ne2 * c * c + no2 * s * s;
    (no2 - ne2) * (ne2 * c * c - no2 * s * s) / (b * b)
}

fn central(f: impl Fn(f64) -> Option<f64>, x: f64, h: f64) -> Option<f64> {
    Some((f(x + h)? - f(x - h)?) / (2.0 * h))
}

/// Solves a displacer request.
///
/// # Errors
/// `wavelength_nm` if the dispersion formula breaks down; `cut_tilt_deg` when the fixed cut gives
/// no walk-off; `separation_mm` when the model cannot be evaluated around the design.
pub fn design(req: &DisplacerRequest) -> Result<DisplacerDesign, Error> {
    let t_c = req.temperature_c;
    let plane = plane_of(req)?;
    let principal = match plane {
        Some(_) => Some(principal_at(&req.medium, req.wavelength, t_c)?),
        None => None,
    };
    let ix = match (plane, principal) {
        (Some(p), Some(n)) => plane_indices(p, n)?,
        _ => indices_at(&req.medium, req.wavelength, t_c)?,
    };
    if (ix.no - ix.ne).abs() < NO_BIREFRINGENCE {
        return Err(match plane {
            Some(p) => Error::new(
                "plane",
                format!(
                    "n_{} equals n_{}: the {} plane has no walk-off; choose another plane",
                    AXIS_LETTERS[p.first],
                    AXIS_LETTERS[p.second],
                    p.name()
                ),
            ),
            None => Error::new(
                "material",
                "n_o equals n_e: this crystal has no walk-off to displace a beam with",
            ),
        });
    }
    let (theta_m, _) = max_walkoff_cut(ix);
    let max_cut_deg = theta_m.to_degrees();
    let tilt = req.cut_tilt_deg.unwrap_or(max_cut_deg);
    let rho = walkoff(ix, tilt.to_radians());
    if rho.abs() < NO_WALKOFF_RAD {
        return Err(Error::new(
            "cut_tilt_deg",
            format!(
                "a cut at {tilt}° gives no walk-off; choose a tilt between 0° and 90° (or leave it out for the cut of maximum walk-off, {max_cut_deg:.3}°)"
            ),
        ));
    }
    // The length the separation needs at the working temperature, and the length to make at 20 °C.
    let length_at_temperature_mm = req.separation_mm / rho.tan().abs();
    let grown = match plane {
        Some(p) => growth_along_z(&req.medium, &plane_orientation(p, tilt).axes(), t_c),
        None => growth(&req.medium, tilt, 0.0, t_c),
    };
    let length_mm = length_at_temperature_mm / grown;
    let nm = req.wavelength.nm();
    let optics = match plane {
        Some(p) => principal_plate(&req.medium, p, t_c, tilt, length_mm, req.wavelength, [0.0, 0.0]),
        None => axis_from_degrees(tilt, 0.0)
            .ok()
            .and_then(|axis| plate_optics(ix, axis, length_at_temperature_mm, req.wavelength, [0.0, 0.0])),
    }
    .ok_or_else(|| Error::new("separation_mm", "the plate model cannot be evaluated at the design"))?;
    // The walking mode's displacement: e minus o, or for a biaxial plate the in-plane mode's,
    // which is the first (fast) one when its index is below the straight mode's.
    let (walking_sign, straight_index) = match (plane, principal) {
        (Some(p), Some(n)) => {
            let (s, c) = tilt.to_radians().sin_cos();
            let in_plane = 1.0 / (c * c / (ix.no * ix.no) + s * s / (ix.ne * ix.ne)).sqrt();
            let straight = n[p.normal()];
            (if in_plane < straight { -1.0 } else { 1.0 }, Some(straight))
        }
        _ => (1.0, None),
    };
    // d|ρ|/dθ is dimensionless (rad/rad = °/°); the second derivative per degree² is the one per
    // radian² times π/180 (ρ in degrees: × 180/π; θ in degrees: × (π/180)²).
    let (slope, curvature_rad) = walkoff_derivatives(ix, tilt.to_radians());
    let deg = std::f64::consts::PI / 180.0;
    let slope_2 = 0.5 * curvature_rad * deg;
    let ratio = match plane {
        Some(p) => format!("n_{}/n_{}", AXIS_LETTERS[p.second], AXIS_LETTERS[p.first]),
        None => "n_e/n_o".to_string(),
    };
    let cut_note = if slope == 0.0 {
        format!(
            "cut of maximum walk-off, tan θ = {ratio}: there dρ/dθ = 0, so a cut-angle error Δθ changes the walk-off only to second order, by {} °/°² × Δθ²",
            crate::numfmt::sig(slope_2, 3)
        )
    } else {
        format!(
            "cut fixed by the request; the maximum-walk-off cut would be {max_cut_deg:.4}° (dρ/dθ = 0 there, here {} °/°)",
            crate::numfmt::sig(slope, 3)
        )
    };
    let cut_note = match (plane, req.plane) {
        (Some(p), None) => format!(
            "{cut_note}; the {} plane is the principal plane of largest walk-off (\"plane\" chooses another)",
            p.name()
        ),
        (Some(p), Some(_)) => format!("{cut_note}; the {} plane as requested", p.name()),
        (None, _) => cut_note,
    };

    // Band.
    let (lo, hi) = req.band_nm.unwrap_or((nm, nm));
    let n = if hi > lo { 81 } else { 1 };
    let curve: Vec<[f64; 2]> = (0..n)
        .filter_map(|i| {
            let w = if n > 1 {
                lo + (hi - lo) * i as f64 / (n - 1) as f64
            } else {
                lo
            };
            separation(&req.medium, plane, t_c, tilt, 0.0, length_mm, w).map(|s| [w, s])
        })
        .collect();
    let (mut min, mut max) = ([nm, optics.separation_mm], [nm, optics.separation_mm]);
    for p in &curve {
        if p[1] < min[1] {
            min = *p;
        }
        if p[1] > max[1] {
            max = *p;
        }
    }
    if req.band_nm.is_some() && curve.len() < n {
        return Err(Error::new(
            "band_nm",
            format!("the dispersion formula cannot be evaluated over the whole band [{lo}, {hi}] nm"),
        ));
    }

    // Sensitivities (central differences of the exact model).
    let bad = || {
        Error::new(
            "separation_mm",
            "the sensitivities cannot be evaluated around the design",
        )
    };
    let m = &req.medium;
    // Tilt and length: the closed form at normal incidence, s = L |tan ρ(θ)|, differentiated
    // (exactly zero at the maximum-walk-off cut, where a difference quotient would only show
    // rounding). Incidence and wavelength: central differences of the exact model.
    // With s = L tan|ρ|: ds/dθ = L (1 + tan²ρ) |ρ|' and d²s/dθ² = L (1 + tan²ρ)(|ρ|'' + 2 tan|ρ| |ρ|'²).
    let sec2 = 1.0 + rho.tan().powi(2);
    let s_tilt = length_at_temperature_mm * sec2 * slope * deg;
    let s_tilt_2 =
        0.5 * length_at_temperature_mm * sec2 * (curvature_rad + 2.0 * rho.tan().abs() * slope * slope) * deg * deg;
    let s_inc = central(
        |p| separation(m, plane, t_c, tilt, p, length_mm, nm),
        0.0,
        DIFF_STEP_INCIDENCE_DEG,
    )
    .ok_or_else(bad)?;
    // Per millimetre made at 20 °C, which grows to `grown` mm at the working temperature.
    let s_len = rho.tan().abs() * grown;
    let s_wl = central(
        |w| separation(m, plane, t_c, tilt, 0.0, length_mm, w),
        nm,
        DIFF_STEP_WAVELENGTH_NM,
    )
    .ok_or_else(bad)?;
    let temperature = Temperature::of(
        t_c,
        vec![(
            "separation_um",
            Box::new(|t| separation(m, plane, t, tilt, 0.0, length_mm, nm).map(|s| s * 1e3)),
        )],
    );
    let t = req.tolerances;
    let linear_std_mm = ((s_tilt * t.tilt_deg).powi(2)
        + (s_inc * t.incidence_deg).powi(2)
        + (s_len * t.thickness_mm).powi(2)
        + (s_wl * t.wavelength_nm).powi(2))
    .sqrt();

    let monte_carlo = (req.samples > 0).then(|| {
        let chunks = req.samples.div_ceil(MC_CHUNK);
        let samples: Vec<f64> = (0..chunks)
            .flat_map(|k| monte_carlo_chunk(req, tilt, length_mm, k))
            .collect();
        summarize(&samples, req.bins)
    });

    let w = 0.5 * req.beam_diameter_mm;
    let s = optics.separation_mm;
    let phase = optics.retardance_rad;
    let reduced = phase - std::f64::consts::TAU * (phase / std::f64::consts::TAU).round();
    let scenario = Part::new(
        req.wavelength,
        Some(req.beam_diameter_mm),
        vec![match plane {
            Some(p) => oriented_crystal(*m, length_mm, plane_orientation(p, tilt), 0.0),
            None => crystal(*m, length_mm, tilt, 0.0, 0.0),
        }],
    )
    .at_temperature(t_c);
    let group_delay_ps = scenario.group_delay_ps();
    let modes = scenario.mode_groups();
    Ok(DisplacerDesign {
        material: m.key().to_string(),
        no: ix.no,
        ne: ix.ne,
        wavelength_nm: nm,
        cut_tilt_deg: tilt,
        max_walkoff_cut_deg: max_cut_deg,
        walkoff_deg: rho.abs().to_degrees(),
        walkoff_slope: slope,
        walkoff_second_order_per_deg2: slope_2,
        cut_note,
        length_mm,
        length_at_temperature_mm,
        separation_mm: s,
        plane: plane.map(PrincipalPlane::name),
        principal_indices: principal,
        straight_index,
        displacement_direction: if walking_sign * optics.separation_vector_mm[0] >= 0.0 {
            "+x".into()
        } else {
            "-x".into()
        },
        band: BandSeparation {
            min_mm: min[1],
            min_at_nm: min[0],
            max_mm: max[1],
            max_at_nm: max[0],
            curve,
        },
        clear_aperture_mm: s + req.aperture_factor * req.beam_diameter_mm,
        clipping_per_beam: (-2.0 * req.aperture_factor * req.aperture_factor).exp(),
        clearance_ratio: s / req.beam_diameter_mm,
        crosstalk: (-(s * s) / (w * w)).exp(),
        exit_phase_rad: phase,
        exit_phase_mod_2pi_rad: if reduced <= -std::f64::consts::PI {
            reduced + std::f64::consts::TAU
        } else {
            reduced
        },
        group_delay_ps,
        modes,
        sensitivities: Sensitivities {
            tilt_mm_per_deg: s_tilt,
            tilt_second_order_mm_per_deg2: s_tilt_2,
            incidence_mm_per_deg: s_inc,
            thickness_mm_per_mm: s_len,
            wavelength_mm_per_nm: s_wl,
            linear_std_mm,
        },
        tolerances: t,
        temperature,
        monte_carlo,
        scenario,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::fields::Fields;
    use crate::contract::result::{ElementReport, trace_scenario as trace};
    use crate::contract::scenario::Scenario;
    use crate::optics::material::REFERENCE_C;
    use crate::precision::assert_close;
    use serde_json::Value;

    fn request(doc: &str) -> DisplacerRequest {
        let v: Value = serde_json::from_str(doc).unwrap();
        let mut f = Fields::new("", &v).unwrap();
        let r = DisplacerRequest::from_json(&mut f).unwrap();
        f.finish().unwrap();
        r
    }

    #[test]
    fn the_design_fed_back_into_the_trace_gives_the_separation() {
        for (mat, sep) in [("calcite", 2.0), ("yvo4", 1.0), ("alpha-bbo", 0.5), ("quartz", 0.05)] {
            let d = design(&request(&format!(
                r#"{{"material": "{mat}", "separation_mm": {sep}, "samples": 0}}"#
            )))
            .unwrap();
            let sc = Scenario::from_json(&d.scenario.document()).unwrap();
            let r = trace(&sc).unwrap();
            let ElementReport::Crystal { separation_mm, .. } = r.elements[0] else {
                panic!()
            };
            let got = separation_mm.unwrap();
            assert!((got - sep).abs() <= 1e-9 * sep, "{mat}: traced {got}, required {sep}");
        }
    }

    #[test]
    fn the_maximum_walkoff_cut_is_stationary() {
        // Standard result (Born & Wolf §15.3): tan θ = n_e/n_o and tan ρ_max = |n_e² − n_o²|/(2 n_o n_e).
        let d = design(&request(r#"{"material": "calcite", "separation_mm": 1, "samples": 0}"#)).unwrap();
        assert!((d.cut_tilt_deg.to_radians().tan() - d.ne / d.no).abs() < 1e-14);
        let expect = ((d.ne * d.ne - d.no * d.no).abs() / (2.0 * d.no * d.ne))
            .atan()
            .to_degrees();
        assert!((d.walkoff_deg - expect).abs() < 1e-12, "{} vs {expect}", d.walkoff_deg);
        // Zero by symmetry, reported as exactly zero (not rounding noise of about 1e-17).
        assert_eq!(d.walkoff_slope, 0.0);
        assert_eq!(d.sensitivities.tilt_mm_per_deg, 0.0);
        // Second order, closed form derived from the same formula: |ρ|'' = −4 tan ρ_max per rad²,
        // so the coefficient of Δθ² (degrees) is −2 tan ρ_max · π/180 °/°².
        let deg = std::f64::consts::PI / 180.0;
        let tan_max = (d.ne * d.ne - d.no * d.no).abs() / (2.0 * d.no * d.ne);
        assert_close(
            d.walkoff_second_order_per_deg2,
            -2.0 * tan_max * deg,
            1e-12,
            0.0,
            "½ d²|ρ|/dθ² at the maximum-walk-off cut, closed form −2 tan ρ_max (derived from Born & Wolf §15.3's tan ρ)",
        );
        // Independent route: a second difference of the walk-off itself, in degrees.
        let ix = Indices::new(d.no, d.ne).unwrap();
        let rho_deg = |t: f64| walkoff(ix, t.to_radians()).abs().to_degrees();
        let (t0, h) = (d.cut_tilt_deg, 0.01);
        let fd = (rho_deg(t0 + h) - 2.0 * rho_deg(t0) + rho_deg(t0 - h)) / (h * h);
        assert_close(
            d.walkoff_second_order_per_deg2,
            0.5 * fd,
            1e-5,
            0.0,
            "second difference of |ρ(θ)|",
        );
        // The separation's second-order coefficient against a second difference of the exact
        // plate model (an independent route: ray tracing, not the closed form).
        let sep = |t: f64| {
            separation(
                &Medium::Custom(ix),
                None,
                REFERENCE_C,
                t,
                0.0,
                d.length_mm,
                d.wavelength_nm,
            )
            .unwrap()
        };
        let fd = (sep(t0 + h) - 2.0 * sep(t0) + sep(t0 - h)) / (h * h);
        assert_close(
            d.sensitivities.tilt_second_order_mm_per_deg2,
            0.5 * fd,
            1e-5,
            0.0,
            "second difference of the traced separation",
        );
        assert!(d.cut_note.contains("second order"), "{}", d.cut_note);
        // A cut typed in as the printed maximum-walk-off cut is the same cut.
        let again = design(&request(&format!(
            r#"{{"material": "calcite", "separation_mm": 1, "samples": 0, "cut_tilt_deg": {}}}"#,
            d.cut_tilt_deg
        )))
        .unwrap();
        assert_eq!(again.walkoff_slope, 0.0);
        // So is its mirror image about 90° (|ρ(θ)| = |ρ(180° − θ)|), with the same curvature.
        let mirror = design(&request(&format!(
            r#"{{"material": "calcite", "separation_mm": 1, "samples": 0, "cut_tilt_deg": {}}}"#,
            180.0 - d.cut_tilt_deg
        )))
        .unwrap();
        assert_eq!(mirror.walkoff_slope, 0.0);
        assert_close(
            mirror.walkoff_second_order_per_deg2,
            d.walkoff_second_order_per_deg2,
            1e-9,
            0.0,
            "mirrored cut",
        );
    }

    #[test]
    fn the_walkoff_slope_is_in_degrees_per_degree() {
        // Calcite, 632.8 nm, cut 30°: differentiating tan ρ = (n_o² − n_e²) sin θ cos θ /
        // (n_e² cos²θ + n_o² sin²θ) (Born & Wolf §15.3; Yariv & Yeh ch. 4, from memory) gives
        // dρ/dθ = (d tan ρ/dθ) / (1 + tan²ρ) ≈ 0.0940 rad/rad = 0.0940 °/°. A slope in rad/deg
        // would be 57.3 times smaller (0.00164).
        let d = design(&request(
            r#"{"material": "calcite", "wavelength_nm": 632.8, "separation_mm": 1, "cut_tilt_deg": 30, "samples": 0}"#,
        ))
        .unwrap();
        let (no, ne, th) = (d.no, d.ne, 30f64.to_radians());
        let (a, b) = (
            no * no - ne * ne,
            ne * ne * th.cos().powi(2) + no * no * th.sin().powi(2),
        );
        let tan_rho = a * th.sin() * th.cos() / b;
        let dtan = a * (ne * ne * th.cos().powi(2) - no * no * th.sin().powi(2)) / (b * b);
        let closed = dtan / (1.0 + tan_rho * tan_rho);
        assert_close(d.walkoff_slope, closed, 1e-12, 0.0, "dρ/dθ, differentiated closed form");
        assert!((d.walkoff_slope - 0.0940).abs() < 5e-5, "{}", d.walkoff_slope);
        // Independent route: a central difference of the walk-off in degrees over degrees.
        let ix = Indices::new(no, ne).unwrap();
        let rho_deg = |t: f64| walkoff(ix, t.to_radians()).abs().to_degrees();
        let fd = (rho_deg(30.001) - rho_deg(29.999)) / 0.002;
        assert_close(d.walkoff_slope, fd, 1e-7, 0.0, "central difference of |ρ| in °/°");
        // The note quotes the same number.
        assert!(d.cut_note.contains("0.0940 °/°"), "{}", d.cut_note);
        // Second order off the stationary cut, against a second difference.
        let h = 0.01;
        let fd2 = (rho_deg(30.0 + h) - 2.0 * rho_deg(30.0) + rho_deg(30.0 - h)) / (h * h);
        assert_close(
            d.walkoff_second_order_per_deg2,
            0.5 * fd2,
            1e-5,
            0.0,
            "second difference of |ρ|",
        );
    }

    #[test]
    fn linearized_sensitivities_match_the_analytic_derivatives() {
        // Independent route: at normal incidence s = L tan ρ(θ); differentiate the closed form.
        let d = design(&request(
            r#"{"material": "calcite", "separation_mm": 1.5, "cut_tilt_deg": 30, "samples": 0}"#,
        ))
        .unwrap();
        let (no, ne, th, l) = (d.no, d.ne, d.cut_tilt_deg.to_radians(), d.length_mm);
        let (a, b) = (
            no * no - ne * ne,
            ne * ne * th.cos().powi(2) + no * no * th.sin().powi(2),
        );
        let tan_rho = a * th.sin() * th.cos() / b;
        let dtan = a * ((2.0 * th).cos() * b - th.sin() * th.cos() * (no * no - ne * ne) * (2.0 * th).sin()) / (b * b);
        let ds_dtheta = l * dtan * std::f64::consts::PI / 180.0;
        assert!(
            (d.sensitivities.tilt_mm_per_deg.abs() - ds_dtheta.abs()).abs() < 1e-7 * ds_dtheta.abs(),
            "{} vs {ds_dtheta}",
            d.sensitivities.tilt_mm_per_deg
        );
        assert!(
            (d.sensitivities.thickness_mm_per_mm - tan_rho.abs()).abs() < 1e-8,
            "{} vs {tan_rho}",
            d.sensitivities.thickness_mm_per_mm
        );
    }

    #[test]
    fn monte_carlo_agrees_with_the_linearization_for_small_errors() {
        let d = design(&request(r#"{"material": "yvo4", "wavelength_nm": 1064, "separation_mm": 1, "cut_tilt_deg": 40,
            "tolerances": {"tilt_deg": 0.05, "incidence_deg": 0.05, "thickness_mm": 0.01, "wavelength_nm": 0.2}, "samples": 40000, "seed": 3}"#)).unwrap();
        let mc = d.monte_carlo.as_ref().unwrap();
        assert_eq!(mc.n, 40_000);
        let lin = d.sensitivities.linear_std_mm;
        // 40 000 samples estimate a standard deviation to about 1/√(2n) ≈ 0.35 %.
        assert!((mc.std - lin).abs() < 0.01 * lin, "MC std {} vs linear {lin}", mc.std);
        assert!(
            (mc.mean - d.separation_mm).abs() < 0.02 * lin,
            "MC mean {} vs nominal {}",
            mc.mean,
            d.separation_mm
        );
        assert!(mc.p5 < mc.mean && mc.mean < mc.p95);
    }

    #[test]
    fn chunked_runs_reproduce_the_whole_run() {
        let r = request(r#"{"material": "calcite", "separation_mm": 1, "samples": 12500, "seed": 9}"#);
        let d = design(&r).unwrap();
        let all: Vec<f64> = (0..2)
            .flat_map(|k| monte_carlo_chunk(&r, d.cut_tilt_deg, d.length_mm, k))
            .collect();
        assert_eq!(all.len(), 12_500);
        assert_eq!(summarize(&all, r.bins), d.monte_carlo.unwrap());
        assert!(monte_carlo_chunk(&r, d.cut_tilt_deg, d.length_mm, 2).is_empty());
    }

    #[test]
    fn overlap_aperture_and_band() {
        let d = design(&request(r#"{"material": "calcite", "separation_mm": 1, "beam_diameter_mm": 1, "band_nm": [500, 900], "samples": 0}"#)).unwrap();
        // s = D: η = exp(−s²/w²) = exp(−4) (Joyce & DeLoach 1984).
        assert!((d.crosstalk - (-4f64).exp()).abs() < 1e-12);
        assert!((d.clear_aperture_mm - 3.0).abs() < 1e-12);
        assert!((d.clearance_ratio - 1.0).abs() < 1e-12);
        // Calcite's birefringence falls with wavelength: the separation is largest at the blue end.
        assert_eq!(d.band.max_at_nm, 500.0);
        assert_eq!(d.band.min_at_nm, 900.0);
        assert!(d.band.min_mm < 1.0 && d.band.max_mm > 1.0);
    }

    #[test]
    fn a_cut_without_walkoff_is_an_error_on_the_cut() {
        // At 90° the optic axis lies in the face: no walk-off, nothing to displace. The request
        // is well formed (its reader's errors are tested with it); the solver refuses it.
        let r = request(r#"{"material": "calcite", "separation_mm": 1, "cut_tilt_deg": 90}"#);
        assert_eq!(design(&r).unwrap_err().field, "cut_tilt_deg");
    }
}
