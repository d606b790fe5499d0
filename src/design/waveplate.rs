//! Waveplate design: thickness for a target retardance, in zero, multiple or compound zero order,
//! its behaviour over wavelength and angle, and a two-material achromatic pair.
//!
//! Physics. A plate with its optic axis in the face (tilt 90°) retards the e-wave against the
//! o-wave by Γ = 2π (n_e − n_o) L / λ at normal incidence, so a target of f waves needs
//!
//! ```text
//! zero order:      L = f λ / |n_e − n_o|
//! order m:         L = (m + f) λ / |n_e − n_o|
//! compound zero:   L₁ − L₂ = f λ / |n_e − n_o|, two plates with crossed axes
//! ```
//!
//! (e.g. E. Hecht, *Optics*, §8.7; the zero-order quarter-wave thickness λ/(4|n_e − n_o|) is the
//! standard result). Away from normal incidence the exact retardance k0 (q_z,e − q_z,o) L of
//! [`crate::optics::plate`] is used; the acceptance angle is the largest angle of incidence, in the worst
//! of the planes containing, diagonal to and across the optic axis, up to which the retardance
//! stays within a given error of its normal-incidence value.
//!
//! Temperature: each plate's indices and thickness at T as the scenario contract takes them
//! (`temperature_c`: the catalogue's thermo-optic data, thickness grown by α⊥ for an axis in the
//! faces), so Γ(T) = 2π Σ ±Δn(T) L (1 + α⊥ (T − 20 °C)) / λ. The design is made for the
//! request's `temperature_c` T₀ ([`crate::design::thermal`]): the thickness gives the target at
//! T₀ and is quoted at 20 °C. Its sensitivity dΓ/dT is a central difference of Γ(T) about T₀, and
//! the temperature band is where |Γ(T) − Γ(T₀)| stays within the acceptance error, each edge
//! bisected on Γ(T) between T₀ and the contract's limit (−200 or 500 °C; Γ is taken monotonic in
//! between, as it is for the catalogue's data). The achromatic pair below is solved at T₀ too.
//!
//! Biaxial crystals: a plate cut along a principal axis (`cut`, [`crate::design::principal`]) has
//! its slower in-face principal axis at azimuth 0 and retards by Γ = 2π (n_slow − n_fast) L / λ
//! at normal incidence, so the thicknesses above hold with |n_e − n_o| replaced by
//! n_slow − n_fast; away from normal incidence (the angular curves) its exact retardance
//! k0 (q_z,s − q_z,f) L comes from the general mode solver
//! ([`crate::optics::general_plate`]), and its thickness grows by the expansion along the cut's
//! axis. Every plate carries its own cut ([`Plate`]), so the two-crystal pairs (the achromat
//! below, [`crate::design::athermal`]) may mix a biaxial plate with a uniaxial one.
//!
//! Achromatic pair: plates of two materials A and B with parallel (or crossed, a negative
//! thickness) axes retard by Γ(λ) = 2π [L_A Δn_A(λ) + L_B Δn_B(λ)] / λ; requiring the target at
//! two wavelengths is a 2×2 linear system for L_A and L_B. The two-material method is described
//! by J. M. Beckers, "Achromatic linear retarders", Appl. Opt. 10, 973 (1971) (citation from
//! memory). A biaxial plate's Δn is n_slow − n_fast of its own cut (`first.cut`, `second.cut`),
//! its slow and fast axes chosen at the first wavelength and kept over the band: the system
//! assumes each plate's birefringence keeps one sign there, which the catalogue's biaxial crystals
//! do; a negative thickness is that plate crossed, its slow axis at 90°.

use crate::contract::request::{AchromatRequest, Order, PrincipalCut, TEMPERATURE_RANGE_C, WaveplateRequest};
use crate::contract::resolve::axis_from_degrees;
use crate::contract::scenario::{Element, Medium, PrincipalIndices};
use crate::design::part::{ModeGroups, Part, oriented_crystal};
use crate::design::principal::{BiaxialCut, CutReport, Oriented, biaxial_cut};
use crate::design::thermal::{PerKelvin, Temperature, growth, growth_along_z, indices_at, per_kelvin, principal_at};
use crate::error::Error;
use crate::optics::general_plate::general_plate_optics;
use crate::optics::material::{Indices, OpticalSign};
use crate::optics::plate::{plate_optics, tangential};
use crate::optics::uniaxial::OpticAxis;
use crate::optics::wavelength::Wavelength;
use crate::precision::{
    ACHROMAT_CURVE_INTERVALS, ANGULAR_CURVE_INTERVALS, BAND_CURVE_INTERVALS, BISECTION_STEPS, GOLDEN_SECTION_STEPS,
    NO_BIREFRINGENCE, SAME_ANGLE_DEG, SINGULAR_DETERMINANT, TEMPERATURE_STEP_K,
};
use serde::Serialize;
use std::f64::consts::TAU;

/// Whether an acceptance angle was found or is only a lower bound.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Bound {
    /// The retardance error reached its limit at this angle (found by bisection).
    Found,
    /// The limit was not reached up to the largest angle computed: the acceptance is at least
    /// this angle (written `≥` in readable output).
    AtLeast,
}

/// Retardance against angle of incidence in one plane.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AngularCurve {
    /// Azimuth of the plane of incidence from the optic axis, degrees.
    pub plane_azimuth_deg: f64,
    /// Samples [incidence °, retardance waves].
    pub curve: Vec<[f64; 2]>,
    /// Largest incidence (°) up to which |Γ − Γ(0)| stays within the error; the curve's end if
    /// it never leaves (then `acceptance_reached` is false: the acceptance is *at least* this).
    pub acceptance_deg: f64,
    /// Whether the error limit was reached within the curve.
    pub acceptance_reached: bool,
    /// `found`, or `at_least` when the limit was not reached (the same fact as
    /// `acceptance_reached`, in the shape every bound of a design answer takes).
    pub acceptance_bound: Bound,
}

/// A plate of a design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PlateSpec {
    /// Catalogue key or "custom".
    pub material: String,
    /// Thickness as made at 20 °C, mm.
    pub thickness_mm: f64,
    /// That thickness at the design temperature, mm (grown by α⊥, the axis in the faces).
    pub thickness_at_temperature_mm: f64,
    /// Optic-axis azimuth in the face, degrees (the axis lies in the face: tilt 90°); for a
    /// biaxial plate, the azimuth of its slow in-face principal axis.
    pub axis_azimuth_deg: f64,
    /// For a biaxial plate of a two-crystal pair, its cut (`cut`, `cut_note`,
    /// `principal_indices`), as a waveplate reports its one cut; left out otherwise.
    #[serde(flatten)]
    pub biaxial: Option<CutReport>,
}

/// How the plates of a design are oriented.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PlateCut {
    /// A uniaxial plate with its optic axis in its faces at the plate's azimuth.
    Axis,
    /// A biaxial plate cut along a principal axis, so oriented at azimuth 0 (its slow axis along
    /// the plate's azimuth); a plate's own azimuth turns it about the normal.
    Principal(Oriented),
}

impl PlateCut {
    /// The principal axes of a plate of this cut at `azimuth_deg`.
    pub fn at(self, azimuth_deg: f64) -> Oriented {
        match self {
            PlateCut::Axis => Oriented {
                tilt_deg: 90.0,
                azimuth_deg,
                roll_deg: 0.0,
            },
            PlateCut::Principal(o) => o.turned(azimuth_deg),
        }
    }
}

/// A plate of a design, each with its own cut: its crystal, thickness as made at 20 °C, azimuth
/// (a uniaxial plate's optic axis, a biaxial plate's slow in-face axis) and cut.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Plate {
    /// The crystal.
    pub medium: Medium,
    /// Thickness as made at 20 °C, mm.
    pub thickness_mm: f64,
    /// Azimuth in the faces, degrees.
    pub azimuth_deg: f64,
    /// How the crystal is cut.
    pub cut: PlateCut,
}

impl Plate {
    /// A plate of `medium` and `cut`, `thickness_mm` thick at azimuth `azimuth_deg`.
    pub fn new(medium: Medium, thickness_mm: f64, azimuth_deg: f64, cut: PlateCut) -> Plate {
        Plate {
            medium,
            thickness_mm,
            azimuth_deg,
            cut,
        }
    }

    /// A plate of a signed thickness: a negative one is the plate crossed (azimuth 90°), its slow
    /// axis across the azimuth-0 plates'.
    pub fn signed(medium: Medium, thickness_mm: f64, cut: PlateCut) -> Plate {
        let crossed = thickness_mm < 0.0;
        Plate::new(medium, thickness_mm.abs(), if crossed { 90.0 } else { 0.0 }, cut)
    }

    /// Its principal axes.
    pub fn oriented(&self) -> Oriented {
        self.cut.at(self.azimuth_deg)
    }

    /// The plate as a scenario element, after no gap.
    pub fn element(&self) -> Element {
        oriented_crystal(self.medium, self.thickness_mm, self.oriented(), 0.0)
    }

    /// The thickness, signed negative for a plate crossed with `first`.
    pub fn signed_thickness(&self, first: &Plate) -> f64 {
        if self.crossed_with(first) {
            -self.thickness_mm
        } else {
            self.thickness_mm
        }
    }

    /// Whether the plate's axis is crossed (turned by 90°) with `first`'s.
    fn crossed_with(&self, first: &Plate) -> bool {
        ((self.azimuth_deg - first.azimuth_deg).abs() - 90.0).abs() < SAME_ANGLE_DEG
    }

    /// The plate's exact retardance (radians) at `wl` and tangential wave vector `qt`, working at
    /// `t_c` °C: its indices at that temperature and its thickness grown by its expansion along z.
    /// A uniaxial plate's is signed (positive when the optic axis is slow); a biaxial plate's is
    /// |Γ|, its slow axis lying at its azimuth whichever letter the slower wave has.
    fn retardance_rad(&self, wl: Wavelength, qt: [f64; 2], t_c: f64) -> Option<f64> {
        let (medium, az) = (&self.medium, self.azimuth_deg);
        match self.cut {
            PlateCut::Axis => {
                let PrincipalIndices::Uniaxial(ix) = medium.principal_at(wl, t_c).ok()?.0 else {
                    return None;
                };
                let l = self.thickness_mm * growth(medium, 90.0, az, t_c);
                Some(plate_optics(ix, axis_from_degrees(90.0, az).ok()?, l, wl, qt)?.retardance_rad)
            }
            PlateCut::Principal(_) => {
                let o = self.oriented();
                let n = principal_at(medium, wl, t_c).ok()?;
                let crystal = o.crystal(n).ok()?;
                let l = self.thickness_mm * growth_along_z(medium, &o.axes(), t_c);
                // Two equal principal indices make a uniaxial crystal, optic axis along the third
                // principal axis: evaluated by the uniaxial closed form, as the trace resolves
                // such a crystal (`contract::resolve`), so that a tensor with n_x = n_y designs
                // the very part its n_o, n_e form does.
                if let Some(k) = crystal.uniaxial_axis() {
                    let ix = Indices::new(n[(k + 1) % 3], n[k]).ok()?;
                    let axis = OpticAxis::from_vector(o.axes().column(k).into()).ok()?;
                    return Some(plate_optics(ix, axis, l, wl, qt)?.retardance_rad.abs());
                }
                Some(general_plate_optics(&crystal, l, wl, qt)?.retardance_rad.abs())
            }
        }
    }
}

/// A plate of a request's crystal: its cut ([`biaxial_cut`] at `wavelength` and `t_c` °C, `None`
/// for a uniaxial crystal) and the cut it is designed with.
///
/// # Errors
/// As [`biaxial_cut`].
pub(super) fn cut_of(
    medium: &Medium,
    cut: Option<PrincipalCut>,
    wavelength: Wavelength,
    t_c: f64,
) -> Result<(Option<BiaxialCut>, PlateCut), Error> {
    let biaxial = biaxial_cut(medium, cut, wavelength, t_c)?;
    let plate = biaxial
        .as_ref()
        .map_or(PlateCut::Axis, |b| PlateCut::Principal(b.oriented));
    Ok((biaxial, plate))
}

/// A solved waveplate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WaveplateDesign {
    /// Design wavelength, nm.
    pub wavelength_nm: f64,
    /// Largest angle of incidence of the angular curves, degrees.
    pub max_incidence_deg: f64,
    /// Retardance error that defines the acceptance angle, waves.
    pub acceptance_error_waves: f64,
    /// Indices at the design wavelength.
    pub no: f64,
    /// Extraordinary principal index.
    pub ne: f64,
    /// n_e − n_o.
    pub birefringence: f64,
    /// "zero", "multiple" or "compound".
    pub order: String,
    /// Order number m (0 for zero and compound).
    pub order_number: u32,
    /// The plates, in the order the light meets them.
    pub plates: Vec<PlateSpec>,
    /// Net thickness acting as retarder (L, or L₁ − L₂), mm.
    pub effective_thickness_mm: f64,
    /// Retardance at the design wavelength and normal incidence, waves (signed: positive when
    /// the optic axis is the slow axis).
    pub retardance_waves: f64,
    /// Which in-face direction is fast: "optic axis" (negative crystals) or "perpendicular to the
    /// optic axis" (positive crystals); for a biaxial plate, the fast principal axis (the slow
    /// one lies at the plate's azimuth).
    pub fast_axis: String,
    /// For a biaxial crystal, its cut (`cut`, `cut_note`, `principal_indices`); its `no` and `ne`
    /// are then the fast and slow in-face principal indices.
    #[serde(flatten)]
    pub biaxial: Option<CutReport>,
    /// Group delay of the polarization along the first plate's optic axis after the one across
    /// it, at the design wavelength and normal incidence, picoseconds (signed like
    /// `retardance_waves`; [`Part::group_delay_ps`]).
    pub group_delay_ps: Option<f64>,
    /// The group index of each mode of the first plate at the design wavelength and temperature,
    /// at normal incidence, under the letters a trace gives the modes (`o`, `e`; `f`, `s` for a
    /// biaxial crystal), as the trace of `scenario` reports them ([`Part::mode_groups`]); a
    /// compound plate's second plate has the same two modes, crossed.
    pub modes: Option<ModeGroups>,
    /// Retardance against wavelength [nm, waves].
    pub wavelength_curve: Vec<[f64; 2]>,
    /// Retardance against angle of incidence, per plane.
    pub angular: Vec<AngularCurve>,
    /// Smallest acceptance angle over the planes, degrees.
    pub acceptance_deg: f64,
    /// `found`, or `at_least` when no plane reached the error limit within
    /// `max_incidence_deg`: the acceptance is then only known to be at least `acceptance_deg`.
    pub acceptance_bound: Bound,
    /// How the retardance changes with temperature about the design temperature.
    pub temperature: TemperatureSensitivity,
    /// A scenario with these plates, ready to load.
    pub scenario: Part,
}

/// A waveplate's retardance against temperature (see the module header).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TemperatureSensitivity {
    /// The design temperature, °C (the request's `temperature_c`; thicknesses are given at
    /// 20 °C).
    pub design_temperature_c: f64,
    /// The half step of the central difference, K.
    pub step_k: f64,
    /// The common form of every design's sensitivities: `retardance_waves`, dΓ/dT in waves per
    /// kelvin ([`crate::design::thermal::Temperature`]).
    pub per_kelvin: PerKelvin,
    /// dΓ/dT at the design temperature, waves per kelvin.
    pub retardance_per_kelvin_waves: f64,
    /// (1/Γ) dΓ/dT, per kelvin.
    pub relative_per_kelvin: f64,
    /// Lowest and highest temperature, °C, between which the retardance stays within
    /// `acceptance_error_waves` of its value at the design temperature.
    pub band_c: [f64; 2],
    /// For each edge, `found`, or `at_least` when the retardance stays within the error up to
    /// the contract's limit (−200 or 500 °C), which is then the edge.
    pub band_bound: [Bound; 2],
}

/// The plates as the answer states them, working at `t_c` °C.
pub(super) fn plate_specs(plates: &[Plate], t_c: f64) -> Vec<PlateSpec> {
    plates
        .iter()
        .map(|p| PlateSpec {
            material: p.medium.key().to_string(),
            thickness_mm: p.thickness_mm,
            thickness_at_temperature_mm: p.thickness_mm * growth_along_z(&p.medium, &p.oriented().axes(), t_c),
            axis_azimuth_deg: p.azimuth_deg,
            biaxial: None,
        })
        .collect()
}

/// A two-crystal pair's plates with each biaxial plate's cut reported.
pub(super) fn with_cuts(mut specs: Vec<PlateSpec>, cuts: [Option<&BiaxialCut>; 2]) -> Vec<PlateSpec> {
    for (spec, cut) in specs.iter_mut().zip(cuts) {
        spec.biaxial = cut.map(BiaxialCut::report);
    }
    specs
}

fn sign_word(ix: Indices) -> &'static str {
    match ix.sign() {
        Some(OpticalSign::Negative) => "optic axis",
        _ => "perpendicular to the optic axis",
    }
}

/// Retardance (radians) of the plates (thicknesses made at 20 °C) at one wavelength and
/// tangential wave vector, working at `t_c` °C: each plate's exact retardance
/// ([`Plate::retardance_rad`], in its own cut), counted negative for plates whose axis is crossed
/// (turned by 90°) with the first's.
pub(super) fn stack_retardance_at(plates: &[Plate], nm: f64, qt: [f64; 2], t_c: f64) -> Option<f64> {
    let wl = Wavelength::from_nm(nm).ok()?;
    let first = plates.first()?;
    plates.iter().try_fold(0.0, |total, p| {
        let retardance = p.retardance_rad(wl, qt, t_c)?;
        Some(if p.crossed_with(first) {
            total - retardance
        } else {
            total + retardance
        })
    })
}

fn angular_curves(plates: &[Plate], (nm, t_c): (f64, f64), max_deg: f64, err_waves: f64) -> Vec<AngularCurve> {
    let axis_az = plates.first().map_or(0.0, |p| p.azimuth_deg);
    [0.0, 45.0, 90.0]
        .iter()
        .map(|&plane| {
            let at = |deg: f64| {
                stack_retardance_at(
                    plates,
                    nm,
                    tangential(1.0, deg.to_radians(), (axis_az + plane).to_radians()),
                    t_c,
                )
                .map(|g| g / TAU)
            };
            let g0 = at(0.0).unwrap_or(0.0);
            let steps = ANGULAR_CURVE_INTERVALS;
            let curve: Vec<[f64; 2]> = (0..=steps)
                .filter_map(|i| {
                    let d = max_deg * i as f64 / steps as f64;
                    at(d).map(|g| [d, g])
                })
                .collect();
            let mut acceptance = max_deg;
            let mut reached = false;
            if let Some(k) = curve.iter().position(|p| (p[1] - g0).abs() > err_waves) {
                // Bisect between the last good sample and the first bad one.
                let (mut lo, mut hi) = (curve[k.saturating_sub(1)][0], curve[k][0]);
                for _ in 0..BISECTION_STEPS {
                    let mid = 0.5 * (lo + hi);
                    match at(mid) {
                        Some(g) if (g - g0).abs() <= err_waves => lo = mid,
                        _ => hi = mid,
                    }
                }
                acceptance = lo;
                reached = true;
            }
            AngularCurve {
                plane_azimuth_deg: plane,
                curve,
                acceptance_deg: acceptance,
                acceptance_reached: reached,
                acceptance_bound: if reached { Bound::Found } else { Bound::AtLeast },
            }
        })
        .collect()
}

/// The retardance's temperature sensitivity and band of `plates` at `nm` about `t_c` °C for an
/// error of `err_waves` (see the module header); `None` where the plates cannot be evaluated.
pub(super) fn temperature_sensitivity(
    plates: &[Plate],
    (nm, t_c): (f64, f64),
    err_waves: f64,
) -> Option<TemperatureSensitivity> {
    let at = |t: f64| stack_retardance_at(plates, nm, [0.0, 0.0], t).map(|g| g / TAU);
    let g0 = at(t_c)?;
    let slope = per_kelvin(at, t_c)?;
    let inside = |t: f64| at(t).is_some_and(|g| (g - g0).abs() <= err_waves);
    let edge = |limit: f64| {
        if inside(limit) {
            return (limit, Bound::AtLeast);
        }
        let (mut good, mut bad) = (t_c, limit);
        for _ in 0..BISECTION_STEPS {
            let mid = 0.5 * (good + bad);
            if inside(mid) {
                good = mid;
            } else {
                bad = mid;
            }
        }
        (good, Bound::Found)
    };
    let ((lo, lo_bound), (hi, hi_bound)) = (edge(TEMPERATURE_RANGE_C.0), edge(TEMPERATURE_RANGE_C.1));
    Some(TemperatureSensitivity {
        design_temperature_c: t_c,
        step_k: TEMPERATURE_STEP_K,
        per_kelvin: PerKelvin(vec![("retardance_waves", slope)]),
        retardance_per_kelvin_waves: slope,
        relative_per_kelvin: slope / g0,
        band_c: [lo, hi],
        band_bound: [lo_bound, hi_bound],
    })
}

/// Solves a waveplate request.
///
/// # Errors
/// `wavelength_nm` if the dispersion formula breaks down; `material` for a crystal without
/// birefringence.
pub fn design(req: &WaveplateRequest) -> Result<WaveplateDesign, Error> {
    let t_c = req.temperature_c;
    let (biaxial, cut) = cut_of(&req.medium, req.cut, req.wavelength, t_c)?;
    let ix = match &biaxial {
        Some(b) => b.indices,
        None => indices_at(&req.medium, req.wavelength, t_c)?,
    };
    let dn = ix.ne - ix.no;
    if dn.abs() < NO_BIREFRINGENCE {
        return Err(Error::new("material", "n_o equals n_e: this crystal cannot retard"));
    }
    // Thicknesses made at 20 °C that reach the target at the working temperature.
    let lam_mm = req.wavelength.mm() / growth_along_z(&req.medium, &cut.at(0.0).axes(), t_c);
    let zero = req.retardance_waves * lam_mm / dn.abs();
    let m = &req.medium;
    let plate = |l: f64, az: f64| Plate::new(*m, l, az, cut);
    let (order, order_number, plates): (&str, u32, Vec<Plate>) = match req.order {
        Order::Zero => ("zero", 0, vec![plate(zero, 0.0)]),
        Order::Multiple(k) => (
            "multiple",
            k,
            vec![plate((k as f64 + req.retardance_waves) * lam_mm / dn.abs(), 0.0)],
        ),
        Order::Compound { base_mm } => ("compound", 0, vec![plate(base_mm + zero, 0.0), plate(base_mm, 90.0)]),
    };
    let nm = req.wavelength.nm();
    let g = stack_retardance_at(&plates, nm, [0.0, 0.0], t_c)
        .ok_or_else(|| Error::new("retardance_waves", "the plate model cannot be evaluated"))?
        / TAU;
    let (lo, hi) = req.band();
    let n = BAND_CURVE_INTERVALS;
    let wavelength_curve = (0..=n)
        .filter_map(|i| {
            let w = lo + (hi - lo) * i as f64 / n as f64;
            stack_retardance_at(&plates, w, [0.0, 0.0], t_c).map(|r| [w, r / TAU])
        })
        .collect();
    let angular = angular_curves(&plates, (nm, t_c), req.max_incidence_deg, req.acceptance_error_waves);
    // The worst plane decides; its bound is the answer's (a plane that never left the limit has
    // the curve's end as its acceptance, never below a plane that did leave it).
    let worst = angular
        .iter()
        .min_by(|a, b| a.acceptance_deg.total_cmp(&b.acceptance_deg))
        .ok_or_else(|| Error::new("max_incidence_deg", "no angular curve could be computed"))?;
    let (acceptance_deg, acceptance_bound) = (worst.acceptance_deg, worst.acceptance_bound);
    let temperature = temperature_sensitivity(&plates, (nm, t_c), req.acceptance_error_waves)
        .ok_or_else(|| Error::new("material", "the crystal's temperature data cannot be evaluated"))?;
    let elements = plates.iter().map(Plate::element).collect();
    let scenario = Part::new(req.wavelength, None, elements).at_temperature(t_c);
    let group_delay_ps = scenario.group_delay_ps();
    let modes = scenario.mode_groups();
    Ok(WaveplateDesign {
        wavelength_nm: nm,
        max_incidence_deg: req.max_incidence_deg,
        acceptance_error_waves: req.acceptance_error_waves,
        no: ix.no,
        ne: ix.ne,
        birefringence: dn,
        order: order.into(),
        order_number,
        plates: plate_specs(&plates, t_c),
        effective_thickness_mm: plates.iter().map(|p| p.signed_thickness(&plates[0])).sum(),
        retardance_waves: g,
        fast_axis: biaxial
            .as_ref()
            .map_or_else(|| sign_word(ix).into(), |b| b.fast_axis.clone()),
        biaxial: biaxial.as_ref().map(BiaxialCut::report),
        group_delay_ps,
        modes,
        wavelength_curve,
        angular,
        acceptance_deg,
        acceptance_bound,
        temperature,
        scenario,
    })
}

/// A solved achromatic pair.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AchromatDesign {
    /// The plates: thickness of each; a crossed plate has its axis at 90°.
    pub plates: Vec<PlateSpec>,
    /// Retardance at the two design wavelengths, waves (the target, to rounding: ~1e-12).
    pub at_design_wavelengths: [[f64; 2]; 2],
    /// Retardance against wavelength [nm, waves].
    pub wavelength_curve: Vec<[f64; 2]>,
    /// The largest departure from the target over the band, waves (refined between the curve's
    /// samples, so it is the maximum, not a lower bound of it).
    pub max_error_waves: f64,
    /// dΓ/dT at each design wavelength about the design temperature, waves per kelvin
    /// (`retardance_first_wavelength_waves`, `retardance_second_wavelength_waves`).
    pub temperature: Temperature,
    /// A scenario with the pair, ready to load.
    pub scenario: Part,
}

/// The largest of `err` over a sampled curve's band, found, not sampled: the largest sample's
/// neighbourhood (one grid step either side) is searched by golden section, so that a maximum
/// between two samples is not under-reported. `target` is subtracted from the curve's values.
fn largest_error(curve: &[[f64; 2]], err: impl Fn(f64) -> Option<f64>, target: f64) -> f64 {
    let Some((k, best)) = curve
        .iter()
        .map(|p| (p[1] - target).abs())
        .enumerate()
        .max_by(|a, b| a.1.total_cmp(&b.1))
    else {
        return 0.0;
    };
    let (mut a, mut b) = (curve[k.saturating_sub(1)][0], curve[(k + 1).min(curve.len() - 1)][0]);
    let r = 0.5 * (5f64.sqrt() - 1.0);
    let mut found = best;
    for _ in 0..GOLDEN_SECTION_STEPS {
        let (c, d) = (b - r * (b - a), a + r * (b - a));
        let (ec, ed) = (err(c).unwrap_or(0.0), err(d).unwrap_or(0.0));
        found = found.max(ec).max(ed);
        if ec > ed {
            b = d;
        } else {
            a = c;
        }
    }
    found
}

/// Solves a two-material achromatic pair.
///
/// # Errors
/// `wavelengths_nm` where a formula breaks down; `second` when the two materials' dispersions
/// are proportional (the system is singular: no achromatic pair exists).
pub fn achromat(req: &AchromatRequest) -> Result<AchromatDesign, Error> {
    let (w1, w2) = req.wavelengths_nm;
    let t_c = req.temperature_c;
    // A formula's failure is the wavelengths' (the request's checks have named which); a cut's
    // is its plate's.
    let on_field = |plate: &'static str| {
        move |e: Error| match e.field.as_str() {
            "temperature_c" => e,
            "cut" => e.within(plate),
            _ => Error::new("wavelengths_nm", e.message),
        }
    };
    // Each plate's cut, chosen at the first design wavelength (its slow and fast axes stay so).
    let wl1 = Wavelength::from_nm(w1)?;
    let (bi_a, cut_a) = cut_of(&req.a.medium, req.a.cut, wl1, t_c).map_err(on_field("first"))?;
    let (bi_b, cut_b) = cut_of(&req.b.medium, req.b.cut, wl1, t_c).map_err(on_field("second"))?;
    // Rows: Δn(λ)/λ for each plate, in waves per mm made at 20 °C.
    let rate = |m: &Medium, cut: &Option<BiaxialCut>, nm: f64, field: &'static str| -> Result<f64, Error> {
        let dn = birefringence_per_mm(m, cut.as_ref(), Wavelength::from_nm(nm)?, t_c).map_err(on_field(field))?;
        Ok(dn / (nm * 1e-6))
    };
    let (ma, mb) = (&req.a.medium, &req.b.medium);
    let (a11, a12, a21, a22) = (
        rate(ma, &bi_a, w1, "first")?,
        rate(mb, &bi_b, w1, "second")?,
        rate(ma, &bi_a, w2, "first")?,
        rate(mb, &bi_b, w2, "second")?,
    );
    let det = a11 * a22 - a12 * a21;
    if det.abs() < SINGULAR_DETERMINANT * (a11 * a22).abs().max((a12 * a21).abs()).max(1e-300) {
        return Err(Error::new(
            "second",
            "the two materials disperse in proportion: no pair of thicknesses is achromatic at both wavelengths",
        ));
    }
    let f = req.retardance_waves;
    let la = (f * a22 - a12 * f) / det;
    let lb = (a11 * f - a21 * f) / det;
    // A negative thickness is a plate crossed (its slow axis, or optic axis, turned by 90°).
    let plates = [Plate::signed(*ma, la, cut_a), Plate::signed(*mb, lb, cut_b)];
    // The pair's retardance at `t` °C, counted along azimuth 0 (the first plate may be the
    // crossed one).
    let along_x = if plates[0].azimuth_deg == 0.0 { 1.0 } else { -1.0 };
    let total_at = |nm: f64, t: f64| stack_retardance_at(&plates, nm, [0.0, 0.0], t).map(|g| along_x * g / TAU);
    let total = |nm: f64| total_at(nm, t_c);
    let g1 = total(w1).ok_or_else(|| Error::new("wavelengths_nm", "cannot evaluate the pair"))?;
    let g2 = total(w2).ok_or_else(|| Error::new("wavelengths_nm", "cannot evaluate the pair"))?;
    let (lo, hi) = req.band();
    let n = ACHROMAT_CURVE_INTERVALS;
    let curve: Vec<[f64; 2]> = (0..=n)
        .filter_map(|i| {
            let w = lo + (hi - lo) * i as f64 / n as f64;
            total(w).map(|g| [w, g])
        })
        .collect();
    let max_error_waves = largest_error(&curve, |w| total(w).map(|g| (g - f).abs()), f);
    let temperature = Temperature::of(
        t_c,
        vec![
            ("retardance_first_wavelength_waves", Box::new(|t| total_at(w1, t))),
            ("retardance_second_wavelength_waves", Box::new(|t| total_at(w2, t))),
        ],
    );
    Ok(AchromatDesign {
        plates: with_cuts(plate_specs(&plates, t_c), [bi_a.as_ref(), bi_b.as_ref()]),
        at_design_wavelengths: [[w1, g1], [w2, g2]],
        wavelength_curve: curve,
        max_error_waves,
        temperature,
        scenario: Part::new(wl1, None, plates.iter().map(Plate::element).collect()).at_temperature(t_c),
    })
}

/// A plate's birefringence at `wl` and `t_c` °C per millimetre made at 20 °C, Δn (1 + α_z ΔT): a
/// uniaxial plate's n_e − n_o (its optic axis in the faces), a biaxial plate's n_slow − n_fast
/// with the slow and fast axes of its cut.
///
/// # Errors
/// As [`principal_at`].
pub(super) fn birefringence_per_mm(
    medium: &Medium,
    cut: Option<&BiaxialCut>,
    wl: Wavelength,
    t_c: f64,
) -> Result<f64, Error> {
    Ok(match cut {
        None => {
            let ix = indices_at(medium, wl, t_c)?;
            (ix.ne - ix.no) * growth(medium, 90.0, 0.0, t_c)
        }
        Some(b) => {
            let n = principal_at(medium, wl, t_c)?;
            let (slow, fast) = b.slow_fast;
            (n[slow] - n[fast]) * growth_along_z(medium, &b.oriented.axes(), t_c)
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::fields::Fields;
    use crate::contract::result::{ElementReport, trace_scenario as trace};
    use crate::contract::scenario::Scenario;
    use crate::optics::material::REFERENCE_C;
    use serde_json::{Value, json};

    fn fields(doc: &str) -> Value {
        serde_json::from_str(doc).unwrap()
    }

    fn wp(doc: &str) -> WaveplateDesign {
        let v = fields(doc);
        let mut f = Fields::new("", &v).unwrap();
        let r = WaveplateRequest::from_json(&mut f).unwrap();
        f.finish().unwrap();
        design(&r).unwrap()
    }

    fn traced_retardance_waves(scenario: &Value) -> f64 {
        let r = trace(&Scenario::from_json(scenario).unwrap()).unwrap();
        r.elements
            .iter()
            .enumerate()
            .map(|(i, e)| match e {
                ElementReport::Crystal { retardance_waves, .. } => {
                    let az = scenario["elements"][i]["axis"]["azimuth_deg"].as_f64().unwrap();
                    if az == 90.0 {
                        -retardance_waves.unwrap()
                    } else {
                        retardance_waves.unwrap()
                    }
                }
                _ => 0.0,
            })
            .sum()
    }

    fn traced_at(scenario: &Value, nm: f64) -> f64 {
        let mut sc = scenario.clone();
        sc["wavelength_nm"] = json!(nm);
        traced_retardance_waves(&sc)
    }

    #[test]
    fn temperature_sensitivity_follows_the_plate_and_bounds_the_band() {
        // A 40th-order quartz quarter-wave plate: dΓ/dT = Γ γ, and the band edges are where the
        // retardance, traced by the whole scenario at that temperature, has moved by the
        // acceptance error. γ against S. M. Etzel, A. H. Rose and C. M. Wang, Appl. Opt. 39,
        // 5796 (2000), −1.23e-4 /K measured: the quartz thermo-optic data are built from it
        // (src/optics/material/thermal.rs; tests/temperature.rs checks them independently), so
        // the design's own model must give it back (observed to 1.2e-10 relative; 1e-9 allowed).
        let d = wp(
            r#"{"material": "quartz", "wavelength_nm": 632.8, "retardance_waves": 0.25, "order": "multiple", "order_number": 40}"#,
        );
        let t = &d.temperature;
        let want = d.retardance_waves * t.relative_per_kelvin;
        assert!((t.retardance_per_kelvin_waves - want).abs() <= 1e-15, "{t:?}");
        assert!((t.relative_per_kelvin + 1.23e-4).abs() <= 1e-9 * 1.23e-4, "{t:?}");
        // Linear estimate of the half-width: error / |dΓ/dT| (about 3.3 K here).
        let half = d.acceptance_error_waves / t.retardance_per_kelvin_waves.abs();
        for (edge, bound) in t.band_c.iter().zip(t.band_bound) {
            assert_eq!(bound, Bound::Found);
            assert!(
                ((edge - REFERENCE_C).abs() - half).abs() <= 0.01 * half,
                "{edge} against ±{half}"
            );
            let mut doc = d.scenario.document();
            doc["temperature_c"] = json!(edge);
            doc["version"] = json!(2);
            let moved = traced_retardance_waves(&doc) - d.retardance_waves;
            assert!(
                (moved.abs() - d.acceptance_error_waves).abs() <= 1e-9,
                "at {edge} °C moved {moved}"
            );
        }
        // A zero-order plate moves 40 times less: its band reaches the contract's lowest
        // temperature and ends hundreds of kelvin above the design's, where the linear estimate
        // puts it (the curvature γ α⊥ ΔT² is 2e-4 of the change there; 1 % allowed).
        let z = wp(r#"{"material": "quartz", "wavelength_nm": 632.8, "retardance_waves": 0.25}"#);
        let zt = &z.temperature;
        assert_eq!(zt.band_bound, [Bound::AtLeast, Bound::Found]);
        assert_eq!(zt.band_c[0], -200.0);
        let reach = z.acceptance_error_waves / zt.retardance_per_kelvin_waves.abs();
        assert!(
            (zt.band_c[1] - REFERENCE_C - reach).abs() <= 0.01 * reach,
            "{zt:?} against +{reach} K"
        );
    }

    #[test]
    fn zero_order_quarter_wave_is_lambda_over_four_delta_n() {
        // Standard result: L = λ / (4 |n_e − n_o|), indices from the cited dispersion formula.
        let d = wp(r#"{"material": "quartz", "wavelength_nm": 632.8, "retardance_waves": 0.25}"#);
        let expect = 632.8e-6 / (4.0 * (d.ne - d.no).abs());
        assert!(
            (d.plates[0].thickness_mm - expect).abs() < 1e-15,
            "{} vs {expect}",
            d.plates[0].thickness_mm
        );
        // Common practice: a zero-order quartz quarter-wave plate at 633 nm is about 17 µm thick.
        assert!((d.plates[0].thickness_mm - 0.0175).abs() < 0.001);
        assert!((traced_retardance_waves(&d.scenario.document()) - 0.25).abs() < 1e-9);
        assert_eq!(d.fast_axis, "perpendicular to the optic axis");
    }

    #[test]
    fn every_order_fed_back_gives_the_target() {
        for (doc, target) in [
            (
                r#"{"material": "mgf2", "wavelength_nm": 1064, "retardance_waves": 0.5, "order": "multiple", "order_number": 7}"#,
                7.5,
            ),
            (
                r#"{"material": "quartz", "wavelength_nm": 532, "retardance_waves": 0.25, "order": "compound", "base_mm": 1.2}"#,
                0.25,
            ),
            (
                r#"{"material": "calcite", "wavelength_nm": 800, "retardance_waves": 0.125}"#,
                -0.125,
            ),
            (
                r#"{"material": "sapphire", "wavelength_nm": 1550, "retardance_waves": 0.5}"#,
                -0.5,
            ),
        ] {
            let d = wp(doc);
            let traced = traced_retardance_waves(&d.scenario.document());
            assert!(
                (traced - target).abs() < 1e-9 * target.abs().max(1.0),
                "{doc}: traced {traced}"
            );
        }
    }

    #[test]
    fn zero_order_plates_accept_wider_angles_than_multiple_order() {
        let z =
            wp(r#"{"material": "quartz", "wavelength_nm": 633, "retardance_waves": 0.25, "max_incidence_deg": 30}"#);
        let m = wp(
            r#"{"material": "quartz", "wavelength_nm": 633, "retardance_waves": 0.25, "order": "multiple", "order_number": 10, "max_incidence_deg": 30}"#,
        );
        assert!(
            z.acceptance_deg > 3.0 * m.acceptance_deg,
            "zero {} vs multiple {}",
            z.acceptance_deg,
            m.acceptance_deg
        );
        // The retardance at normal incidence on the angular curve is the design value.
        assert!((z.angular[0].curve[0][1] - 0.25).abs() < 1e-12);
    }

    #[test]
    fn the_achromatic_pair_hits_the_target_at_both_wavelengths() {
        let v = fields(
            r#"{"first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "wavelengths_nm": [500, 900]}"#,
        );
        let mut f = Fields::new("", &v).unwrap();
        let d = achromat(&AchromatRequest::from_json(&mut f).unwrap()).unwrap();
        for [w, g] in d.at_design_wavelengths {
            assert!((g - 0.25).abs() < 1e-12, "{w} nm: {g}");
        }
        // Fed back into the trace at both wavelengths.
        for w in [500.0, 900.0] {
            let mut sc = d.scenario.document();
            sc["wavelength_nm"] = json!(w);
            let got = traced_retardance_waves(&sc);
            assert!((got - 0.25).abs() < 1e-9, "{w} nm traced {got}");
        }
        // Between the design wavelengths the pair stays flatter than a single zero-order quartz
        // plate: measured 0.027 waves of error against 0.118 over 500–900 nm.
        let single =
            wp(r#"{"material": "quartz", "wavelength_nm": 500, "retardance_waves": 0.25, "band_nm": [500, 900]}"#);
        let spread = |c: &[[f64; 2]]| {
            c.iter()
                .filter(|p| p[0] >= 500.0 && p[0] <= 900.0)
                .map(|p| (p[1] - 0.25).abs())
                .fold(0.0, f64::max)
        };
        let (pair, one) = (spread(&d.wavelength_curve), spread(&single.wavelength_curve));
        assert!(pair < 0.25 * one, "pair {pair} vs single {one}; plates {:?}", d.plates);
        // The reported largest error is the maximum, not a sample of it: a traced scan 20 times
        // finer than the curve finds nothing larger (to 1e-12) and the curve's samples nothing more.
        let (lo, hi) = (400.0, 1080.0);
        let fine = (0..=3_200)
            .map(|i| {
                let w = lo + (hi - lo) * f64::from(i) / 3_200.0;
                (traced_at(&d.scenario.document(), w) - 0.25).abs()
            })
            .fold(0.0, f64::max);
        assert!(
            d.max_error_waves >= fine - 1e-12,
            "{} vs fine scan {fine}",
            d.max_error_waves
        );
        assert!(d.max_error_waves >= spread(&d.wavelength_curve));
    }

    #[test]
    fn what_the_solvers_cannot_make_is_an_error_naming_the_field() {
        // Well-formed requests (their readers' errors are tested with them) that no plate meets.
        let v = fields(r#"{"no": 1.5, "ne": 1.5, "retardance_waves": 0.25}"#);
        let mut f = Fields::new("", &v).unwrap();
        let e = design(&WaveplateRequest::from_json(&mut f).unwrap()).unwrap_err();
        assert_eq!(e.field, "material", "{e}");
        let v = fields(
            r#"{"first": {"material": "quartz"}, "second": {"material": "quartz"}, "retardance_waves": 0.25, "wavelengths_nm": [500, 900]}"#,
        );
        let mut f = Fields::new("", &v).unwrap();
        assert_eq!(
            achromat(&AchromatRequest::from_json(&mut f).unwrap())
                .unwrap_err()
                .field,
            "second"
        );
    }
}
