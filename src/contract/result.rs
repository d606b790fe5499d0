//! The result document of a trace, built in one place from a [`Trace`].
//!
//! [`report`] turns the physics of [`crate::optics::trace`] into the contract's result
//! (`TraceResult`: the input state, every ray, every element's report, the spots, warnings):
//! output Stokes vectors Mueller(M)·S_in and Jones vectors M·J_in of each path, mode reports in
//! degrees, separations and retardances of each crystal, powers lost at faces and polarizers, and
//! the spots where beams overlap on the exit plane ([`crate::optics::spots`]: each pair weighted
//! by the overlap of its two Gaussian beams, so that for rays that leave from one point the
//! spot's matrix is Σ M over its paths and its Stokes vector Mueller(Σ M)·S_in). Powers are
//! fractions of the input power; angles are in degrees, lengths in mm (CONVENTIONS.md).
//!
//! [`trace_scenario`] is the whole way through: resolve the document into a stack, trace it,
//! report it.

use crate::contract::group::{Group, groups};
use crate::contract::resolve::Warning;
use crate::contract::scenario::{ElementKind, Medium as ScenarioMedium, Scenario};
use crate::contract::spectrum::MAX_RAY_TRACES;
use crate::contract::spectrum::{Spectrum, spectrum};
use crate::contract::white_light::white_light;
use crate::error::Error;
use crate::optics::beam_overlap::GaussianBeam;
use crate::optics::colorimetry;
use crate::optics::interface::Losses;
use crate::optics::jones::to_json;
use crate::optics::material::Indices;
use crate::optics::modes::{Mode, ModeKind, beam_basis};
use crate::optics::planar::alone;
pub use crate::optics::spots::Spot;
use crate::optics::spots::{Exit, group_spots};
use crate::optics::spots_tilted::{ScreenRay, group_tilted};
use crate::optics::stack::{Element, Medium, Stack};
use crate::optics::stokes::{self, Ellipse};
use crate::optics::trace::trace;
use crate::optics::traced::{LayerTrace, RejectReason, Rejected, Side, Trace};
use crate::optics::uniaxial::{angle_between, max_walkoff_cut};
use crate::optics::wavelength::Wavelength;
use crate::precision::POWER_ROUNDING;
use crate::precision::{DEGENERATE_DIRECTION, SAME_DIRECTION_TILT};
use nalgebra::Vector3;
use serde::Serialize;
use std::f64::consts::TAU;

pub use crate::optics::jones::JonesJson;

/// One output ray.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Ray {
    /// One letter per crystal crossed, "o" or "e", in order.
    pub label: String,
    /// Power as a fraction of the input power.
    pub power: f64,
    /// Lateral exit point [x, y] on the back face of the last element, mm.
    pub exit_position_mm: [f64; 2],
    /// z of that face, mm.
    pub exit_z_mm: f64,
    /// Unit direction of the ray after the stack.
    pub direction: [f64; 3],
    /// Where it leaves the last face it crosses, [x, y, z] in mm.
    pub exit_point_mm: [f64; 3],
    /// Where its straight continuation meets the screen plane, [x, y] in mm.
    pub screen_position_mm: [f64; 2],
    /// Angle between its direction and the incident beam's, degrees.
    pub deviation_deg: f64,
    /// Stokes vector [S0, S1, S2, S3] on the beam basis.
    pub stokes: [f64; 4],
    /// Degree of polarization.
    pub degree_of_polarization: f64,
    /// Polarization ellipse.
    pub ellipse: Ellipse,
    /// Jones vector on the beam basis, including the path's phase (fully polarized input only).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub jones: Option<JonesJson>,
    /// Accumulated propagation phase Σ k0 q_z L over layers and gaps, radians.
    pub phase_rad: f64,
    /// Where the ray crosses z = 0 and every face after it, [x, y, z] in mm: the polyline it
    /// follows through the stack (the last point is the exit point). Never empty in a trace;
    /// left out of the JSON when emptied (the page's bindings do, for speed).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub points_mm: Vec<[f64; 3]>,
}

/// Whether a mode carries power into the crystal.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum ModeStatus {
    /// The mode propagates.
    Propagating,
    /// The mode is evanescent (total internal reflection): no ray.
    Evanescent,
}

/// One mode of one crystal, at the stack's tangential wave vector.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ModeReport {
    /// Propagating or evanescent.
    pub status: ModeStatus,
    /// |k|/k0 (null if evanescent).
    pub index: Option<f64>,
    /// Angle between wave vector and ray, degrees (null if evanescent).
    pub walkoff_deg: Option<f64>,
    /// Unit vector, perpendicular to the wave vector, toward which the ray leans (null without
    /// walk-off).
    pub walkoff_direction: Option<[f64; 3]>,
    /// Angle between the wave vector and the optic axis, degrees.
    pub angle_to_axis_deg: Option<f64>,
    /// Normal component of k/k0 (real part for an evanescent mode).
    pub qz: f64,
    /// Decay constant Im(k_z)/k0 of an evanescent mode (0 when propagating).
    pub decay: f64,
    /// Unit wave vector.
    pub wave_vector: Option<[f64; 3]>,
    /// Unit ray (Poynting) direction.
    pub ray_direction: Option<[f64; 3]>,
    /// Unit displacement vector D (its sign is a convention).
    pub d_polarization: Option<[f64; 3]>,
    /// Unit electric field E.
    pub e_polarization: Option<[f64; 3]>,
    /// Lateral shift [dx, dy] of this mode's ray across the plate, mm.
    pub lateral_shift_mm: Option<[f64; 2]>,
    /// Ellipticity angle of the mode's electric field, degrees, on the basis of its wave vector
    /// (positive right-handed): reported for the modes of a general crystal, which are elliptical
    /// near an optically active crystal's axis (left out for the uniaxial closed form's linear
    /// modes).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ellipticity_deg: Option<f64>,
    /// Group index along the face normal, g = ξ − λ dξ/dλ at fixed tangential wave vector
    /// (n − λ dn/dλ at normal incidence; [`crate::contract::group`]); null if evanescent.
    pub group_index: Option<f64>,
}

/// The disagreement of a crystal's published dispersion sources at the traced wavelength (see
/// `material::source`): largest minus smallest value over the sources whose range holds it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SourceSpread {
    /// The sources compared, the default first when among them.
    pub sources: Vec<&'static str>,
    /// Spread of each principal index, in the order n_o, n_e or n_x, n_y, n_z.
    pub indices: Vec<f64>,
    /// Spread of the birefringence n_e − n_o (uniaxial) or n_z − n_x (biaxial).
    pub birefringence: f64,
}

impl SourceSpread {
    /// The spread of `medium`'s sources at `wavelength`; `None` for fixed indices or a crystal
    /// with fewer than two sources there.
    pub fn of(medium: &ScenarioMedium, wavelength: Wavelength) -> Option<SourceSpread> {
        medium.source()?;
        let s = crate::optics::material::spread(medium.key(), wavelength)?;
        Some(SourceSpread {
            sources: s.sources,
            indices: s.principal,
            birefringence: s.birefringence,
        })
    }
}

/// A crystal's two modes: the first (o, or f: fast) and the second (e, or s: slow).
#[derive(Debug, Clone, PartialEq)]
pub struct ModePair {
    /// Their letters, first mode first.
    pub letters: [char; 2],
    /// The first mode (o or f).
    pub first: ModeReport,
    /// The second mode (e or s).
    pub second: ModeReport,
}

impl Serialize for ModePair {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeMap;
        let mut map = s.serialize_map(Some(2))?;
        map.serialize_entry(&self.letters[0].to_string(), &self.first)?;
        map.serialize_entry(&self.letters[1].to_string(), &self.second)?;
        map.end()
    }
}

/// What one element did.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "lowercase")]
// One report per element, built once per trace: the size difference between variants costs
// nothing worth a Box and would complicate the pattern matches that read the reports.
#[allow(clippy::large_enum_variant)]
pub enum ElementReport {
    /// A crystal plate.
    Crystal {
        /// Catalogue key, "custom" (fixed indices) or "custom dispersion" (the document's formulas).
        material: String,
        /// The dispersion source of a catalogue crystal, e.g. `ghosh-1999` (`materials` lists
        /// each source with its citation, range and the wavelength it was fitted in).
        #[serde(skip_serializing_if = "Option::is_none")]
        source: Option<&'static str>,
        /// How far the crystal's published sources disagree at this wavelength; present when two
        /// or more of them hold it.
        #[serde(skip_serializing_if = "Option::is_none")]
        source_spread: Option<SourceSpread>,
        /// For "custom dispersion": the formulas as the document gives them, with their range,
        /// `fitted_in` and `citation`.
        #[serde(skip_serializing_if = "Option::is_none")]
        dispersion: Option<serde_json::Value>,
        /// Ordinary index at the wavelength (uniaxial crystals).
        #[serde(skip_serializing_if = "Option::is_none")]
        no: Option<f64>,
        /// Extraordinary principal index at the wavelength (uniaxial crystals).
        #[serde(skip_serializing_if = "Option::is_none")]
        ne: Option<f64>,
        /// Principal indices n_x, n_y, n_z at the wavelength (biaxial crystals).
        #[serde(skip_serializing_if = "Option::is_none")]
        nx: Option<f64>,
        /// See `nx`.
        #[serde(skip_serializing_if = "Option::is_none")]
        ny: Option<f64>,
        /// See `nx`.
        #[serde(skip_serializing_if = "Option::is_none")]
        nz: Option<f64>,
        /// The two optic axes (binormals) of a biaxial crystal, unit vectors in the lab frame,
        /// the first with a positive component along its x principal axis.
        #[serde(skip_serializing_if = "Option::is_none")]
        optic_axes: Option<[[f64; 3]; 2]>,
        /// The angle 2V between them, degrees.
        #[serde(skip_serializing_if = "Option::is_none")]
        optic_axis_angle_deg: Option<f64>,
        /// `right` or `left` for an optically active crystal whose activity is traced.
        #[serde(skip_serializing_if = "Option::is_none")]
        handedness: Option<&'static str>,
        /// Its rotatory power along the optic axis, degrees per mm, positive when the plane of
        /// polarization turns clockwise as seen looking toward the source (right-handed).
        #[serde(skip_serializing_if = "Option::is_none")]
        rotatory_power_deg_per_mm: Option<f64>,
        /// Thickness, mm, at 20 °C (as the document gives it).
        thickness_mm: f64,
        /// The scenario's temperature, °C.
        temperature_c: f64,
        /// Thickness at that temperature, mm: `thickness_mm` times 1 + α_z (T − 20 °C), α_z the
        /// crystal's expansion coefficient along the element's z axis.
        thickness_at_temperature_mm: f64,
        /// z of the front face, mm.
        z_front_mm: f64,
        /// z of the back face, mm.
        z_back_mm: f64,
        /// Its two modes, written under their letters: `o` and `e` (uniaxial) or `f` and `s`
        /// (biaxial).
        #[serde(flatten)]
        modes: ModePair,
        /// Distance between the exit points of the o- and e-ray of one input ray, mm.
        separation_mm: Option<f64>,
        /// e-ray exit point minus o-ray exit point [dx, dy], mm.
        separation_vector_mm: Option<[f64; 2]>,
        /// k0 (q_z,e − q_z,o) L, radians: positive when the e-mode is slower.
        retardance_rad: Option<f64>,
        /// Group delay of the second mode's pulse after the first's across the plate (e after o),
        /// picoseconds; null for a wedge or when a mode is evanescent.
        group_delay_ps: Option<f64>,
        /// The same in waves.
        retardance_waves: Option<f64>,
        /// Angle between the o- and e-ray directions after the crystal alone in the outside
        /// medium, lit by the incident beam, degrees (0 for plane-parallel faces).
        split_angle_deg: f64,
        /// Cut angle (between optic axis and plate normal) of maximum walk-off at normal incidence
        /// for this material at this wavelength, degrees: tan θ = n_e/n_o (uniaxial crystals).
        #[serde(skip_serializing_if = "Option::is_none")]
        max_walkoff_cut_deg: Option<f64>,
        /// That maximum walk-off, degrees: tan ρ = |n_e² − n_o²| / (2 n_o n_e).
        #[serde(skip_serializing_if = "Option::is_none")]
        max_walkoff_deg: Option<f64>,
        /// Power entering this plate (sum over its input rays).
        power_in: f64,
        /// Power reflected at its two faces and lost (0 for ideal faces).
        reflected_power: f64,
    },
    /// An ideal retarder.
    Retarder {
        /// Retardance, radians.
        retardance_rad: f64,
        /// Power entering.
        power_in: f64,
    },
    /// An ideal polarizer.
    Polarizer {
        /// Power entering.
        power_in: f64,
        /// Power absorbed.
        absorbed_power: f64,
    },
    /// An ideal rotator.
    Rotator {
        /// Rotation, degrees.
        angle_deg: f64,
        /// Power entering.
        power_in: f64,
    },
    /// A liquid-crystal cell.
    #[serde(rename = "lc_cell")]
    Cell {
        /// Retardance at normal incidence, waves: (1/λ) ∫ (n_eff(z) − n_o) dz.
        retardance_waves: f64,
        /// Freedericksz threshold π √((K11 + (K33 − 2 K22)(φ/π)²)/(ε0 Δε)), RMS volts.
        threshold_voltage_v: f64,
        /// The nematic's indices at the wavelength.
        no: f64,
        /// Extraordinary index at the wavelength.
        ne: f64,
        /// The director across the cell.
        director_profile: DirectorReport,
        /// Power entering.
        power_in: f64,
        /// Power leaving forward.
        power_out: f64,
    },
}

/// A cell's director profile at its nodes, entrance to exit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DirectorReport {
    /// Depth from the entrance face, µm.
    pub z_um: Vec<f64>,
    /// Tilt of the director from the faces, degrees.
    pub tilt_deg: Vec<f64>,
    /// Azimuth gained since the entrance face, degrees.
    pub twist_deg: Vec<f64>,
}

/// The input state, as the trace understood it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InputState {
    /// Stokes vector, S0 = 1.
    pub stokes: [f64; 4],
    /// Degree of polarization.
    pub degree_of_polarization: f64,
    /// Ellipse.
    pub ellipse: Ellipse,
    /// Unit-power Jones vector, when fully polarized.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub jones: Option<JonesJson>,
    /// Unit direction of incidence.
    pub direction: [f64; 3],
    /// The Jones basis vectors e1, e2 in the lab frame (x̂, ŷ at normal incidence).
    pub jones_basis: [[f64; 3]; 2],
}

/// The traced result of a scenario.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TraceResult {
    /// Contract version.
    pub version: u32,
    /// Vacuum wavelength, nm.
    pub wavelength_nm: f64,
    /// The wavelength in standard air as the scenario gave it (`"wavelength_in": "air"`), nm;
    /// `wavelength_nm` is then its vacuum equivalent.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub air_wavelength_nm: Option<f64>,
    /// The index of standard air used for that conversion (Ciddor 1996).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub air_index: Option<f64>,
    /// The input beam's state.
    pub input: InputState,
    /// Every output ray.
    pub rays: Vec<Ray>,
    /// Per element, in stack order.
    pub elements: Vec<ElementReport>,
    /// Rays that did not leave forward: total internal reflection, outside an aperture.
    pub rejected: Vec<RejectedRay>,
    /// Output rays grouped where their beams overlap on the screen.
    pub spots: Vec<Spot>,
    /// Sum of the spots' powers.
    pub total_power: f64,
    /// Things the reader must know (validity ranges, evanescent modes, untraced reflections).
    pub warnings: Vec<String>,
    /// The forward transmission against wavelength, when the scenario asks for a `spectrum`.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub spectrum: Option<Spectrum>,
}

/// A ray that did not leave the stack forward (CONVENTIONS.md, version 2, `rejected`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RejectedRay {
    /// Its path label up to where it stopped.
    pub label: String,
    /// Index of the element.
    pub element: usize,
    /// "front" or "back".
    pub face: &'static str,
    /// "total internal reflection" or "outside aperture".
    pub reason: &'static str,
    /// Its power, a fraction of the input power.
    pub power: f64,
    /// Where, [x, y, z] in mm.
    pub point_mm: [f64; 3],
    /// Its direction there (for total internal reflection, the reflected direction).
    pub direction: [f64; 3],
    /// The path it followed up to there, [x, y, z] in mm (the point last).
    pub points_mm: Vec<[f64; 3]>,
}

fn rejected_ray(r: &Rejected) -> RejectedRay {
    RejectedRay {
        label: r.label.clone(),
        element: r.element,
        face: match r.face {
            Side::Front => "front",
            Side::Back => "back",
        },
        reason: match r.reason {
            RejectReason::TotalInternalReflection => "total internal reflection",
            RejectReason::OutsideAperture => "outside aperture",
        },
        power: r.power,
        point_mm: r.point_mm,
        direction: r.direction,
        points_mm: r.points_mm.clone(),
    }
}

/// One warning per element, face and reason that rejected rays, with their count and power.
fn rejection_notes(rejected: &[RejectedRay]) -> Vec<String> {
    let mut groups: Vec<(usize, &str, &str, usize, f64)> = Vec::new();
    for r in rejected {
        match groups
            .iter_mut()
            .find(|g| (g.0, g.1, g.2) == (r.element, r.face, r.reason))
        {
            Some(g) => {
                g.3 += 1;
                g.4 += r.power;
            }
            None => groups.push((r.element, r.face, r.reason, 1, r.power)),
        }
    }
    groups
        .into_iter()
        .map(|(element, face, reason, n, power)| {
            let rays = if n == 1 { "1 ray".to_string() } else { format!("{n} rays") };
            format!(
                "elements[{element}]: {rays} rejected at the {face} face ({reason}), carrying {} of the input power; see rejected",
                crate::numfmt::power(power, 4)
            )
        })
        .collect()
}

fn arr3(v: Vector3<f64>) -> [f64; 3] {
    [v.x, v.y, v.z]
}

/// Power lost between `before` and `after`, with rounding below [`POWER_ROUNDING`] of `before`
/// reported as exactly zero (an ideal face loses nothing; 1e-16 would only be noise).
fn lost_power(before: f64, after: f64) -> f64 {
    let lost = before - after;
    if lost <= POWER_ROUNDING * before.abs().max(f64::MIN_POSITIVE) {
        0.0
    } else {
        lost
    }
}

/// The optic axis a report measures angles from: a uniaxial crystal's (general or not); none for a
/// biaxial one.
fn report_axis(medium: &Medium) -> Option<Vector3<f64>> {
    match medium {
        Medium::Uniaxial(c) => Some(c.axis.unit()),
        Medium::Anisotropic(a) => a.uniaxial_axis().map(|k| a.axes.column(k).into()),
    }
}

/// Ellipticity angle (degrees, positive right-handed) of a complex field E seen along `khat`, on
/// the beam basis of `khat` (CONVENTIONS.md: S3 = 2 Im(E1 E2*), sin 2χ = S3/S0).
fn ellipticity_deg(e: &crate::optics::modes::CVector3, khat: &Vector3<f64>) -> f64 {
    let (b1, b2) = beam_basis(*khat);
    let dot = |b: &Vector3<f64>| e[0] * b.x + e[1] * b.y + e[2] * b.z;
    let (e1, e2) = (dot(&b1), dot(&b2));
    let s0 = e1.norm_sqr() + e2.norm_sqr();
    let s3 = 2.0 * (e1 * e2.conj()).im;
    if s0 > 0.0 {
        0.5 * (s3 / s0).clamp(-1.0, 1.0).asin().to_degrees()
    } else {
        0.0
    }
}

/// What a crystal report says of its medium's principal indices and axes.
struct CrystalIndices {
    /// n_o, n_e of a uniaxial crystal.
    uniaxial: Option<Indices>,
    /// n_x, n_y, n_z of a biaxial one, along its principal axes.
    biaxial: Option<[f64; 3]>,
    /// Its two optic axes (lab frame).
    optic_axes: Option<[Vector3<f64>; 2]>,
    /// Rotatory power along the optic axis divided by k0 ((κ₁ + κ₂)/2 of the chiral form), signed.
    rotatory_kappa: Option<f64>,
}

impl CrystalIndices {
    fn of(medium: &Medium) -> CrystalIndices {
        match medium {
            Medium::Uniaxial(c) => CrystalIndices {
                uniaxial: Some(c.indices),
                biaxial: None,
                optic_axes: None,
                rotatory_kappa: None,
            },
            Medium::Anisotropic(a) => match a.uniaxial_axis() {
                Some(k) => CrystalIndices {
                    uniaxial: Indices::new(a.principal[(k + 1) % 3], a.principal[k]).ok(),
                    biaxial: None,
                    optic_axes: None,
                    // Along the axis a₃ the rotation is k0 (κ₁ + κ₂)/2 (anisotropic.rs).
                    rotatory_kappa: a
                        .is_chiral()
                        .then(|| 0.5 * (a.chirality[(k + 1) % 3] + a.chirality[(k + 2) % 3])),
                },
                None => CrystalIndices {
                    uniaxial: None,
                    biaxial: Some(a.principal),
                    optic_axes: a.optic_axes(),
                    rotatory_kappa: None,
                },
            },
        }
    }
}

fn mode_report(mode: &Mode, medium: &Medium, thickness_mm: f64) -> ModeReport {
    let unit = |v: Vector3<f64>| {
        let n = v.norm();
        (n > 0.0).then(|| arr3(v / n))
    };
    if !mode.propagating {
        return ModeReport {
            status: ModeStatus::Evanescent,
            index: None,
            walkoff_deg: None,
            walkoff_direction: None,
            angle_to_axis_deg: None,
            qz: mode.qz().re,
            decay: mode.qz().im.abs(),
            wave_vector: None,
            ray_direction: None,
            d_polarization: None,
            e_polarization: None,
            lateral_shift_mm: None,
            ellipticity_deg: None,
            group_index: None,
        };
    }
    let k = mode.wave_vector();
    let s = mode.ray_direction().unwrap_or(k / k.norm());
    let khat = k / k.norm();
    let lean = s - khat * s.dot(&khat);
    let general = matches!(medium, Medium::Anisotropic(_));
    // The uniaxial o-wave's ray is its wave vector exactly; say so rather than report rounding.
    let walkoff = if mode.kind == ModeKind::Ordinary && !general {
        0.0
    } else {
        angle_between(&k, &s)
    };
    ModeReport {
        status: ModeStatus::Propagating,
        index: Some(mode.index()),
        walkoff_deg: Some(walkoff.to_degrees()),
        walkoff_direction: if lean.norm() > 1e-15 && walkoff > 0.0 {
            unit(lean)
        } else {
            None
        },
        angle_to_axis_deg: report_axis(medium).map(|c| angle_between(&k, &c).to_degrees()),
        qz: mode.qz().re,
        decay: 0.0,
        wave_vector: Some(arr3(khat)),
        ray_direction: Some(arr3(s)),
        d_polarization: unit(mode.d.map(|z| z.re)),
        e_polarization: unit(mode.e.map(|z| z.re)),
        lateral_shift_mm: Some([thickness_mm * s.x / s.z, thickness_mm * s.y / s.z]),
        ellipticity_deg: general.then(|| ellipticity_deg(&mode.e, &khat)),
        group_index: None,
    }
}

/// Resolves, traces and reports a scenario: the whole way from document to result, with the
/// scenario's `spectrum` traced point by point when it asks for one.
///
/// # Errors
/// From [`Scenario::resolve`]: `wavelength_nm` when a material's dispersion formula breaks down
/// at the wavelength (the message names the element); `spectrum.points` when the spectrum would
/// trace more than a million rays (`contract::spectrum::MAX_RAY_TRACES`).
pub fn trace_scenario(sc: &Scenario) -> Result<TraceResult, Error> {
    let (stack, warnings) = sc.resolve()?;
    let traced = trace(&stack);
    let mut result = report(sc, &stack, &traced, warnings);
    if let Some(range) = &sc.spectrum {
        let rays = traced.paths.len() + result.rejected.len();
        crate::contract::spectrum::check_work(range, rays)?;
        let (mut s, warning) = spectrum(range, |nm| stokes_at(sc, nm));
        result.warnings.extend(warning);
        if rays.saturating_mul(colorimetry::POINTS) > MAX_RAY_TRACES {
            result.warnings.push(format!(
                "spectrum: no colour in white light: this set-up follows {rays} rays at each wavelength, \
                 too many to trace at the {} wavelengths of the colour tables",
                colorimetry::POINTS
            ));
        } else {
            match white_light(|air_nm| transmission_at_air(sc, air_nm)) {
                Ok(w) => s.white_light = Some(w),
                Err(warning) => result.warnings.push(warning),
            }
        }
        result.spectrum = Some(s);
    }
    Ok(result)
}

/// The spots of a traced stack: its paths grouped where their beams overlap on the screen, each
/// with the overlap-weighted coherent sum of its fields ([`group_spots`], [`group_tilted`]).
pub fn spots(stack: &Stack, traced: &Trace) -> Vec<Spot> {
    let k0 = stack.wavelength.k0_per_mm();
    let beam = GaussianBeam::new(stack.input.diameter_mm, k0 * stack.outside_index);
    let input = &stack.input;
    // One direction for all (plane-parallel plates, tilted plates): the cell-based grouping;
    // rays that fan out (wedges): the pairwise grouping with the tilted overlap.
    let u = traced.paths.first().map_or(input.direction, |p| p.direction);
    let tilt_negligible = SAME_DIRECTION_TILT / (beam.k_per_mm * beam.radius_mm).max(f64::MIN_POSITIVE);
    if traced.paths.iter().all(|p| (p.direction - u).norm() <= tilt_negligible) {
        let exits: Vec<Exit> = traced
            .paths
            .iter()
            .map(|p| Exit {
                label: &p.label,
                pos: p.screen_mm,
                m: p.matrix,
            })
            .collect();
        return group_spots(&exits, &input.stokes, input.jones.as_ref(), &beam, arr3(u));
    }
    let rays: Vec<ScreenRay> = traced
        .paths
        .iter()
        .map(|p| ScreenRay {
            label: &p.label,
            pos: p.screen_mm,
            dir: p.direction,
            m: p.matrix,
        })
        .collect();
    group_tilted(&rays, &input.stokes, input.jones.as_ref(), &beam)
}

/// The result document of `traced`, the trace of `stack` resolved from `sc` with `warnings`.
pub fn report(sc: &Scenario, stack: &Stack, traced: &Trace, warnings: Vec<Warning>) -> TraceResult {
    let k0 = stack.wavelength.k0_per_mm();
    let u = stack.input.direction;
    let (e1, e2) = beam_basis(u);
    let (j_in, s_in) = (stack.input.jones, stack.input.stokes);
    let mut notes: Vec<String> = Vec::new();
    let mut reports = Vec::with_capacity(traced.layers.len());
    let groups = groups(sc, stack);
    let parts = sc.elements.iter().zip(&stack.layers).zip(&traced.layers);
    for (idx, ((el, layer), lt)) in parts.enumerate() {
        notes.extend(warnings.iter().filter(|w| w.element == idx).map(|w| w.text.clone()));
        match (el.kind, layer.element, lt) {
            (
                ElementKind::Crystal(plate),
                Element::Slab(slab),
                LayerTrace::Slab {
                    modes,
                    shifts_mm: shifts,
                    z_front_mm,
                    z_back_mm,
                    power_in,
                    power_out,
                    faces_solved,
                },
            ) => {
                let (medium, l) = (slab.medium, slab.thickness_mm);
                let names = match medium.letters() {
                    ['f', _] => ["fast", "slow"],
                    _ => ["ordinary", "extraordinary"],
                };
                for (mode, name_m) in modes.iter().zip(names) {
                    if !mode.propagating {
                        notes.push(format!(
                            "elements[{idx}]: the {name_m} mode is evanescent at this incidence (total internal reflection); it carries no ray"
                        ));
                    }
                }
                if !faces_solved {
                    notes.push(format!(
                        "elements[{idx}]: the faces cannot be solved at this incidence; no light passes"
                    ));
                }
                let both = modes[0].propagating && modes[1].propagating;
                let (sep_vec, split_angle_deg, retardance) = match (slab.faces, medium) {
                    (None, Medium::Uniaxial(_)) => (
                        [shifts[1][0] - shifts[0][0], shifts[1][1] - shifts[0][1]],
                        0.0,
                        Some(k0 * (modes[1].qz().re - modes[0].qz().re) * l),
                    ),
                    _ => {
                        let faces = slab.placed_faces(*z_front_mm);
                        let [first, second] = alone(stack, &slab, *z_front_mm);
                        let (sep, split) = match (first, second) {
                            (Some((p1, u1)), Some((p2, u2))) => {
                                ([p2.x - p1.x, p2.y - p1.y], angle_between(&u1, &u2).to_degrees())
                            }
                            _ => ([0.0; 2], 0.0),
                        };
                        // Parallel faces: Γ = k0 (ξ₂ − ξ₁) L_n with ξ the normal components and
                        // L_n the thickness along the normal; a wedge has no one retardance.
                        let n = faces.front.normal;
                        let parallel = (n - faces.back.normal).norm() <= DEGENERATE_DIRECTION;
                        let l_n = n.dot(&(faces.back.point - faces.front.point));
                        let xi = |m: &Mode| m.wave_vector().dot(&n);
                        (sep, split, parallel.then(|| k0 * (xi(&modes[1]) - xi(&modes[0])) * l_n))
                    }
                };
                let group = groups[idx].unwrap_or(Group {
                    indices: [None, None],
                    delay_ps: None,
                });
                let with_group = |mut r: ModeReport, g: Option<f64>| {
                    r.group_index = g.filter(|_| r.status == ModeStatus::Propagating);
                    r
                };
                let principal = CrystalIndices::of(&medium);
                reports.push(ElementReport::Crystal {
                    material: plate.medium.key().to_string(),
                    source: plate.medium.source(),
                    source_spread: SourceSpread::of(&plate.medium, stack.wavelength),
                    dispersion: match plate.medium {
                        crate::contract::scenario::Medium::Formula(d) => Some(d.document()),
                        _ => None,
                    },
                    no: principal.uniaxial.map(|ix| ix.no),
                    ne: principal.uniaxial.map(|ix| ix.ne),
                    nx: principal.biaxial.map(|p| p[0]),
                    ny: principal.biaxial.map(|p| p[1]),
                    nz: principal.biaxial.map(|p| p[2]),
                    optic_axes: principal.optic_axes.map(|[u, v]| [arr3(u), arr3(v)]),
                    optic_axis_angle_deg: principal.optic_axes.map(|[u, v]| angle_between(&u, &v).to_degrees()),
                    handedness: principal
                        .rotatory_kappa
                        .map(|r| if r >= 0.0 { "right" } else { "left" }),
                    rotatory_power_deg_per_mm: principal.rotatory_kappa.map(|r| (r * k0).to_degrees()),
                    thickness_mm: plate.thickness_mm,
                    temperature_c: sc.temperature_c,
                    thickness_at_temperature_mm: l,
                    z_front_mm: *z_front_mm,
                    z_back_mm: *z_back_mm,
                    modes: ModePair {
                        letters: medium.letters(),
                        first: with_group(mode_report(&modes[0], &medium, l), group.indices[0]),
                        second: with_group(mode_report(&modes[1], &medium, l), group.indices[1]),
                    },
                    separation_mm: both.then(|| sep_vec[0].hypot(sep_vec[1])),
                    separation_vector_mm: both.then_some(sep_vec),
                    retardance_rad: retardance.filter(|_| both),
                    retardance_waves: retardance.filter(|_| both).map(|g| g / TAU),
                    group_delay_ps: group.delay_ps.filter(|_| both),
                    split_angle_deg,
                    max_walkoff_cut_deg: principal.uniaxial.map(|ix| max_walkoff_cut(ix).0.to_degrees()),
                    max_walkoff_deg: principal.uniaxial.map(|ix| max_walkoff_cut(ix).1.abs().to_degrees()),
                    power_in: *power_in,
                    // Face by face, the tracer books reflections apart from rejected rays.
                    reflected_power: match traced.reflected.get(idx) {
                        Some(r) => lost_power(*power_in, *power_in - r),
                        None => lost_power(*power_in, *power_out),
                    },
                });
            }
            (kind, _, lt) => {
                let (power_in, power_out) = match *lt {
                    LayerTrace::Ideal { power_in, power_out }
                    | LayerTrace::Slab {
                        power_in, power_out, ..
                    } => (power_in, power_out),
                };
                reports.push(match kind {
                    ElementKind::Retarder { retardance_waves, .. } => ElementReport::Retarder {
                        retardance_rad: retardance_waves * TAU,
                        power_in,
                    },
                    ElementKind::Polarizer { .. } => ElementReport::Polarizer {
                        power_in,
                        absorbed_power: lost_power(power_in, power_out),
                    },
                    ElementKind::Rotator { angle_deg } => ElementReport::Rotator { angle_deg, power_in },
                    ElementKind::Cell(cell) => {
                        let solved = cell.solve(sc.wavelength, sc.temperature_c);
                        let p = &solved.profile;
                        let n = p.sublayers();
                        ElementReport::Cell {
                            retardance_waves: solved.retardance_waves,
                            threshold_voltage_v: solved.threshold_voltage_v,
                            no: solved.nematic.no,
                            ne: solved.nematic.ne,
                            director_profile: DirectorReport {
                                z_um: (0..=n).map(|j| cell.thickness_um * j as f64 / n as f64).collect(),
                                tilt_deg: p.tilt.iter().map(|t| t.to_degrees()).collect(),
                                twist_deg: p.azimuth.iter().map(|a| (a - p.azimuth[0]).to_degrees()).collect(),
                            },
                            power_in,
                            power_out,
                        }
                    }
                    // A crystal always resolves to a slab; kept total rather than unreachable.
                    ElementKind::Crystal(_) => ElementReport::Polarizer {
                        power_in,
                        absorbed_power: lost_power(power_in, power_out),
                    },
                });
            }
        }
    }
    if stack.losses == Losses::Uncoated {
        notes.push("interface_losses is \"uncoated\": light reflected at the crystal faces is lost from the trace; reflected ghost rays are not traced".to_string());
    }

    let direction = arr3(u);
    let z = traced.exit_z_mm;
    let rays: Vec<Ray> = traced
        .paths
        .iter()
        .map(|p| {
            let s = stokes::apply(&stokes::mueller(&p.matrix), &s_in);
            Ray {
                label: p.label.clone(),
                power: s[0],
                exit_position_mm: p.exit_xy(),
                exit_z_mm: z,
                direction: arr3(p.direction),
                exit_point_mm: p.exit_point_mm,
                screen_position_mm: p.screen_mm,
                deviation_deg: angle_between(&p.direction, &u).to_degrees(),
                stokes: s,
                degree_of_polarization: stokes::degree_of_polarization(&s),
                ellipse: stokes::ellipse(&s),
                jones: j_in.map(|j| to_json(&(p.matrix * j))),
                phase_rad: p.phase_rad,
                points_mm: p.points_mm.clone(),
            }
        })
        .collect();

    let rejected: Vec<RejectedRay> = traced.rejected.iter().map(rejected_ray).collect();
    notes.extend(rejection_notes(&rejected));
    let air = sc
        .air_wavelength_nm
        .and_then(|nm| crate::optics::material::vacuum_from_air(nm).ok());
    if let Some(a) = &air {
        notes.extend(a.warnings.iter().cloned());
    }
    let spots = spots(stack, traced);
    let total_power = spots.iter().map(|s| s.power).sum();
    let input = InputState {
        stokes: s_in,
        degree_of_polarization: stokes::degree_of_polarization(&s_in),
        ellipse: stokes::ellipse(&s_in),
        jones: j_in.map(|j| to_json(&j)),
        direction,
        jones_basis: [arr3(e1), arr3(e2)],
    };
    TraceResult {
        version: 2,
        wavelength_nm: stack.wavelength.nm(),
        air_wavelength_nm: sc.air_wavelength_nm,
        air_index: air.map(|a| a.air_index),
        input,
        rays,
        elements: reports,
        rejected,
        spots,
        total_power,
        warnings: notes,
        spectrum: None,
    }
}

/// The Stokes vector of the forward light of `sc` traced at `nm`, in its wavelength basis
/// (vacuum, or standard air converted to vacuum as the scenario's own wavelength is).
fn stokes_at(sc: &Scenario, nm: f64) -> Result<[f64; 4], Error> {
    let wavelength = match sc.air_wavelength_nm {
        Some(_) => crate::optics::material::vacuum_from_air(nm)?.vacuum,
        None => Wavelength::from_nm(nm)?,
    };
    forward_stokes(sc, wavelength)
}

/// The forward transmission of `sc` at `air_nm` nanometres in standard air, whatever the
/// scenario's own wavelength basis (the CIE colour tables' wavelengths are in air).
fn transmission_at_air(sc: &Scenario, air_nm: f64) -> Result<f64, Error> {
    Ok(forward_stokes(sc, crate::optics::material::vacuum_from_air(air_nm)?.vacuum)?[0])
}

/// The Stokes vector of the forward light of `sc` traced again at the vacuum `wavelength` (the
/// stack depends on the vacuum wavelength alone, whatever basis the document gave its own in):
/// the sum of its spots' Stokes vectors, each on its spot's beam basis (spots at different places
/// add as powers; each spot's own vector is already the coherent sum of its rays), so that S0 is
/// the sum the result's `total_power` takes.
fn forward_stokes(sc: &Scenario, wavelength: Wavelength) -> Result<[f64; 4], Error> {
    let (stack, _) = sc.resolve_at(wavelength, sc.temperature_c)?;
    // Where every ray leaves from one point, their one spot's light is the set-up's matrix's.
    if let Some(stokes) = crate::optics::coincident::coincident_stokes(&stack) {
        return Ok(stokes);
    }
    let traced = trace(&stack);
    let spots = spots(&stack, &traced);
    Ok(std::array::from_fn(|k| spots.iter().map(|s| s.stokes[k]).sum()))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::precision::assert_close;
    use num_complex::Complex64;
    use std::f64::consts::PI;

    fn run(doc: &str) -> TraceResult {
        trace_scenario(&Scenario::from_json_str(doc).unwrap()).unwrap()
    }

    /// Two calcite displacers (axis tilt 45°, walk-off in x) with a half-wave plate at 45°
    /// between them, the second longer by `mismatch_mm`: "oe" and "eo" leave tan ρ · mismatch
    /// apart; `after` is appended to the elements.
    fn pair(diameter_mm: f64, mismatch_mm: f64, after: &str) -> TraceResult {
        run(&format!(
            r#"{{"wavelength_nm": 632.8, "beam": {{"diameter_mm": {diameter_mm}, "polarization": {{"kind": "linear", "azimuth_deg": 45}}}},
               "elements": [{{"kind": "crystal", "material": "calcite", "thickness_mm": 2, "axis": {{"tilt_deg": 45, "azimuth_deg": 0}}}},
                            {{"kind": "retarder", "retardance_waves": 0.5, "fast_axis_deg": 45}},
                            {{"kind": "crystal", "material": "calcite", "thickness_mm": {}, "axis": {{"tilt_deg": 45, "azimuth_deg": 0}}}}{after}]}}"#,
            2.0 + mismatch_mm
        ))
    }

    fn offset(r: &TraceResult, a: &str, b: &str) -> f64 {
        let p = |l: &str| r.rays.iter().find(|x| x.label == l).unwrap().exit_position_mm;
        let (p, q) = (p(a), p(b));
        (p[0] - q[0]).hypot(p[1] - q[1])
    }

    fn spot_of<'a>(r: &'a TraceResult, label: &str) -> &'a Spot {
        r.spots.iter().find(|s| s.rays.iter().any(|x| x == label)).unwrap()
    }

    #[test]
    fn twenty_nanometres_in_a_ten_micrometre_beam_recombine() {
        // The convention's own example (CONVENTIONS.md, version 2, spots). The old rule (exit
        // points within 10⁻³ of the beam diameter, 10 nm here) split this pair into two spots.
        let tan_rho = {
            let r = pair(0.01, 1.0, "");
            offset(&r, "oe", "eo")
        };
        let r = pair(0.01, 2e-5 / tan_rho, "");
        let d = offset(&r, "oe", "eo");
        assert_close(d, 2e-5, 1e-6, 0.0, "residual tan ρ ΔL");
        let s = spot_of(&r, "oe");
        assert!(s.rays.iter().any(|x| x == "eo"), "{:?}", r.spots);
        // Joyce & DeLoach (from memory): two equal beams offset by d couple exp(−d²/w²).
        assert_close(
            s.overlap,
            (-(2e-5f64 / 5e-3).powi(2)).exp(),
            1e-12,
            0.0,
            "overlap exp(−d²/w²)",
        );
        assert!(s.overlap > 0.9999);
        // Orthogonal polarizations: no interference in the power, which is the whole beam.
        assert_close(s.power, 1.0, 1e-12, 0.0, "power of the recombined spot");
    }

    #[test]
    fn two_beam_diameters_apart_are_separate_spots() {
        // A single displacer: o and e leave s apart; a beam of diameter s/2 puts them two
        // diameters apart (overlap e⁻⁸ in amplitude): two spots, each with its own ray.
        let doc = |dia: f64| {
            format!(
                r#"{{"beam": {{"diameter_mm": {dia}, "polarization": {{"kind": "linear", "azimuth_deg": 45}}}},
                    "elements": [{{"kind": "crystal", "material": "calcite", "thickness_mm": 2, "axis": {{"tilt_deg": 45, "azimuth_deg": 0}}}}]}}"#
            )
        };
        let s = {
            let r = run(&doc(1.0));
            offset(&r, "o", "e")
        };
        let r = run(&doc(0.5 * s));
        assert_eq!(r.spots.len(), 2, "{:?}", r.spots);
        for spot in &r.spots {
            assert_eq!(spot.rays.len(), 1);
            assert_eq!(spot.overlap, 1.0);
            assert_close(spot.power, 0.5, 1e-12, 0.0, "half the beam in each mode");
        }
        // A beam of diameter 2s puts them half a diameter apart (d = w): one spot whose beams
        // overlap to exp(−1) in power and e^(−1/2) in amplitude; orthogonal, equal beams
        // integrate to a degree of polarization |γ| (C = ½ [[1, γ], [γ, 1]] up to the phase):
        // the two fields overlap only partly.
        let r = run(&doc(2.0 * s));
        assert_eq!(r.spots.len(), 1, "{:?}", r.spots);
        let spot = &r.spots[0];
        assert_close(spot.overlap, (-1f64).exp(), 1e-12, 0.0, "exp(−d²/w²), d = w");
        assert_close(spot.power, 1.0, 1e-12, 0.0, "orthogonal beams: powers add");
        assert_close(
            spot.degree_of_polarization,
            (-0.5f64).exp(),
            1e-9,
            0.0,
            "degree of polarization |γ| = exp(−d²/(2w²))",
        );
        assert_close(
            spot.spread_mm,
            0.5 * s,
            1e-12,
            0.0,
            "centre halfway between equal beams",
        );
    }

    #[test]
    fn interfering_spots_match_a_direct_integral_of_the_fields() {
        // Independent method: the power and Stokes vector of a spot whose two beams interfere
        // (a polarizer at 45° after a mismatched pair makes their polarizations equal), against
        // ∫ E Eᴴ of E = Σ J_i g_i(r) summed on a grid from the rays' own Jones vectors and points.
        let r = pair(0.2, 0.4, r#", {"kind": "polarizer", "transmission_axis_deg": 45}"#);
        let spot = spot_of(&r, "oe");
        assert!(spot.rays.iter().any(|x| x == "eo"), "{:?}", r.spots);
        let rays: Vec<&Ray> = spot.ray_index.iter().map(|&i| &r.rays[i]).collect();
        let w = 0.1;
        let n = 400;
        let (cx, cy) = (spot.position_mm[0], spot.position_mm[1]);
        let half = 7.0 * w;
        let h = 2.0 * half / n as f64;
        let mut c = [[Complex64::ZERO; 2]; 2];
        for a in 0..n {
            let x = cx - half + (a as f64 + 0.5) * h;
            for b in 0..n {
                let y = cy - half + (b as f64 + 0.5) * h;
                let mut e = [Complex64::ZERO; 2];
                for ray in &rays {
                    let p = ray.exit_position_mm;
                    let g = (2.0 / (PI * w * w)).sqrt() * (-((x - p[0]).powi(2) + (y - p[1]).powi(2)) / (w * w)).exp();
                    let j = ray.jones.unwrap();
                    e[0] += Complex64::new(j[0][0], j[0][1]) * g;
                    e[1] += Complex64::new(j[1][0], j[1][1]) * g;
                }
                for (u, row) in c.iter_mut().enumerate() {
                    for (v, cell) in row.iter_mut().enumerate() {
                        *cell += e[u] * e[v].conj() * h * h;
                    }
                }
            }
        }
        let s = [
            c[0][0].re + c[1][1].re,
            c[0][0].re - c[1][1].re,
            2.0 * c[0][1].re,
            2.0 * c[0][1].im,
        ];
        for (k, (&got, &want)) in spot.stokes.iter().zip(&s).enumerate() {
            assert_close(got, want, 1e-9, 1e-3, &format!("S{k}: spot vs ∫ E Eᴴ on a grid"));
        }
        // The interference is really there: not the sum of the rays' powers.
        let sum: f64 = rays.iter().map(|x| x.power).sum();
        assert!((spot.power - sum).abs() > 1e-3, "{} vs {sum}", spot.power);
    }
}
