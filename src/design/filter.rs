//! Birefringent filters: the plate thickness of a stage-doubling or a folded filter for a pass
//! band of a given width at a given centre wavelength, with its transmission curve traced.
//!
//! Physics. A plate of retardance Γ(λ) = 2π·w(λ)·d (w the crystal's birefringence in waves per
//! millimetre at λ and the design temperature, its thermal growth included; d the thickness at
//! 20 °C) at 45° between parallel polarizers transmits cos²(Γ/2) (Born & Wolf, Principles of
//! Optics, §15.4.4, from memory). The stage-doubling filter stacks N such stages of thickness d,
//! 2d, 4d, …, each behind a polarizer parallel to the first: T = Π cos²(2ᵏΓ/2), which peaks where
//! the thinnest plate is a whole number m of waves, and whose pass band narrows as 2⁻ᴺ while its
//! free spectral range stays that of the thinnest plate (B. Lyot 1933, the product formula). The
//! folded filter puts N equal plates of m + ½ waves at the centre wavelength, their axes
//! alternately at +ρ and −ρ with ρ = 45°/N, between crossed polarizers; at the centre the plates
//! act as half-wave plates that fold the polarization by 2ρ each, so the light leaves turned by
//! 90° and passes (I. Šolc 1953; Yariv & Yeh, Optical Waves in Crystals, §5.3, from memory).
//! The design model is the exact Jones product at normal incidence with ideal faces (what the
//! whole trace of the answer gives there too, checked in tests/filter_design.rs); the answer's
//! curve is the whole trace's spectrum of the answer's own scenario.
//!
//! Method. The pass band's width (full width at half maximum, FWHM) falls as 1/q for a thinnest
//! plate of q waves (q = m, or m + ½ folded). The solver measures the FWHM of the lowest order
//! (half-maximum points found by stepping out from the centre and bisecting to 1e-12 nm),
//! estimates the order for the width asked, and takes whichever of that order and its neighbours
//! gives the width closest to the request (by ratio). Orders are whole, so the width met is the
//! nearest of a discrete set; the answer states it and the width asked.
//!
//! Biaxial crystals: every plate is cut along the request's principal axis (`cut`,
//! [`crate::design::principal`], chosen at the centre wavelength and the design temperature;
//! default the cut of largest birefringence). At normal incidence such a plate is a linear
//! retarder with Γ = 2π (n_slow − n_fast) L / λ about its slower in-face principal axis, which
//! takes the place a uniaxial plate's optic axis has (the azimuths below), so the design is the
//! same with the in-face birefringence; the scenario orients each plate by `axes`.
//!
//! Conventions: azimuths from x toward y, degrees; the input is linear along the first
//! polarizer (x), so the peak transmission is 1 with ideal faces (½ for unpolarized light).

use super::part::{Part, oriented_crystal};
use super::principal::{BiaxialCut, CutReport};
use super::waveplate::{Plate, PlateCut, cut_of, stack_retardance_at};
use crate::contract::geometry::Contact;
use crate::contract::request::{FilterRequest, Layout};
use crate::contract::result::trace_scenario;
use crate::contract::scenario::{Element, ElementKind, Medium, Polarization};
use crate::contract::spectrum::SpectrumRange;
use crate::error::Error;
use crate::optics::material;
use num_complex::Complex64;
use serde::Serialize;
use std::f64::consts::TAU;

/// Points of the answer's transmission curve.
const CURVE_POINTS: usize = 161;
/// The longest filter designed: the sum of its plates, mm.
const MAX_TOTAL_MM: f64 = 500.0;
/// Gap between successive elements of the answer's scenario, mm.
const GAP_MM: f64 = 1.0;
/// Temperature step for the centre's shift, K.
const STEP_K: f64 = 5.0;

/// One plate of a filter.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FilterPlate {
    /// Thickness at 20 °C, mm.
    pub thickness_mm: f64,
    /// Optic-axis azimuth (the axis lies in the faces), degrees; for a biaxial plate, the
    /// azimuth of its slower in-face principal axis.
    pub axis_azimuth_deg: f64,
    /// Retardance at the centre wavelength, waves.
    pub retardance_waves: f64,
}

/// A solved birefringent filter.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FilterDesign {
    /// "stage-doubling" or "folded".
    pub layout: &'static str,
    /// Centre wavelength, nm.
    pub wavelength_nm: f64,
    /// The pass band's width asked (FWHM), nm.
    pub bandwidth_nm: f64,
    /// The pass band's width met (FWHM), nm.
    pub fwhm_nm: f64,
    /// The thinnest plate's order: its retardance is this many waves (stage-doubling) or this
    /// many and a half (folded) at the centre.
    pub order: u32,
    /// The nearest transmission peaks of the same height on either side of the centre, nm
    /// (shorter, longer; `null` where none is within the crystal's formula).
    pub neighbour_peaks_nm: [Option<f64>; 2],
    /// The pass band's width (FWHM) the thinnest plate's order one lower and one higher would
    /// give, nm (`null` below the lowest order): the widths next to the one met.
    pub neighbour_orders_fwhm_nm: [Option<f64>; 2],
    /// Transmission at the centre wavelength of light polarized along the first polarizer,
    /// from the whole trace.
    pub peak_transmission: f64,
    /// How far the centre wavelength moves per kelvin, nm/K (`null` without thermal data).
    pub centre_shift_nm_per_k: Option<f64>,
    /// The plates in order.
    pub plates: Vec<FilterPlate>,
    /// For a biaxial crystal, the plates' cut (`cut`, `cut_note`, `principal_indices` at the
    /// centre wavelength and the design temperature), as a waveplate reports its cut; left out
    /// for a uniaxial crystal.
    #[serde(flatten)]
    pub biaxial: Option<CutReport>,
    /// The polarizers' transmission axes in order, degrees.
    pub polarizers_deg: Vec<f64>,
    /// Sum of the plates' thicknesses, mm.
    pub total_thickness_mm: f64,
    /// Transmission against wavelength over the band [nm, T], every point a whole trace.
    pub curve: Vec<[f64; 2]>,
    /// What the solver assumed or could not meet.
    pub notes: Vec<String>,
    /// The filter, ready to load.
    pub scenario: Part,
}

/// The filter's geometry for a thinnest plate of `d` mm: the plates (thickness, azimuth) and
/// the polarizers' axes.
fn layout_of(layout: Layout, stages: usize, d: f64) -> (Vec<(f64, f64)>, Vec<f64>) {
    match layout {
        Layout::StageDoubling => (
            (0..stages).map(|k| (d * (1u64 << k) as f64, 45.0)).collect(),
            vec![0.0; stages + 1],
        ),
        Layout::Folded => {
            let rho = 45.0 / stages as f64;
            let plates = (0..stages).map(|k| (d, if k % 2 == 0 { rho } else { -rho })).collect();
            (plates, vec![0.0, 90.0])
        }
    }
}

/// Transmission of light polarized along x through `plates` [(retardance rad, azimuth deg)]
/// in the layout's order, by the Jones product (normal incidence, ideal faces).
fn jones_transmission(layout: Layout, plates: &[(f64, f64)]) -> f64 {
    let mut e = [Complex64::new(1.0, 0.0), Complex64::new(0.0, 0.0)];
    for &(gamma, az) in plates {
        let (s, c) = az.to_radians().sin_cos();
        // Into the plate's axes, retard the component along the axis, and back.
        let (a, b) = (c * e[0] + s * e[1], -s * e[0] + c * e[1]);
        let a = a * Complex64::from_polar(1.0, gamma);
        e = [c * a - s * b, s * a + c * b];
        if layout == Layout::StageDoubling {
            e[1] = Complex64::new(0.0, 0.0); // the polarizer after each stage, along x
        }
    }
    match layout {
        Layout::StageDoubling => e[0].norm_sqr(),
        Layout::Folded => e[1].norm_sqr(), // the crossed exit polarizer, along y
    }
}

/// The filter model of one request: the crystal's birefringence and the layout.
struct Model<'a> {
    req: &'a FilterRequest,
    /// How every plate is cut: a uniaxial plate's axis in its faces, or a biaxial plate's
    /// principal cut.
    cut: PlateCut,
}

impl Model<'_> {
    /// The crystal's birefringence in waves per millimetre (of 20 °C thickness) at `nm` and `t_c`.
    fn waves_per_mm(&self, nm: f64, t_c: f64) -> Option<f64> {
        stack_retardance_at(&[Plate::new(self.req.medium, 1.0, 45.0, self.cut)], nm, [0.0, 0.0], t_c)
            .map(|g| g.abs() / TAU)
    }

    /// Transmission at `nm` of the filter whose thinnest plate is `d` mm.
    fn transmission(&self, d: f64, nm: f64) -> Option<f64> {
        let w = self.waves_per_mm(nm, self.req.temperature_c)?;
        let (plates, _) = layout_of(self.req.layout, self.req.stages, d);
        let retardances: Vec<(f64, f64)> = plates.iter().map(|&(t, az)| (TAU * w * t, az)).collect();
        Some(jones_transmission(self.req.layout, &retardances))
    }

    /// The thinnest plate's retardance in waves at the centre for order `m`.
    fn waves_of(&self, m: u32) -> f64 {
        match self.req.layout {
            Layout::StageDoubling => f64::from(m),
            Layout::Folded => f64::from(m) + 0.5,
        }
    }

    /// The full width at half maximum of the pass band around the centre of the filter whose
    /// thinnest plate is `d` mm and `q` waves there.
    fn fwhm(&self, d: f64, q: f64) -> Option<f64> {
        let nm0 = self.req.wavelength.nm();
        let peak = self.transmission(d, nm0)?;
        let narrowing = match self.req.layout {
            Layout::StageDoubling => (1u64 << self.req.stages) as f64,
            Layout::Folded => self.req.stages as f64,
        };
        // A step well inside the pass band: the free spectral range over the narrowing.
        let step = nm0 / q / narrowing / 40.0;
        let edge = |dir: f64| -> Option<f64> {
            let mut inside = nm0;
            for _ in 0..4000 {
                let next = inside + dir * step;
                if self.transmission(d, next)? < 0.5 * peak {
                    let (mut a, mut b) = (inside, next);
                    for _ in 0..80 {
                        let mid = 0.5 * (a + b);
                        if self.transmission(d, mid)? < 0.5 * peak {
                            b = mid;
                        } else {
                            a = mid;
                        }
                        if (b - a).abs() < 1e-12 {
                            break;
                        }
                    }
                    return Some(0.5 * (a + b));
                }
                inside = next;
            }
            None
        };
        Some(edge(1.0)? - edge(-1.0)?)
    }

    /// The wavelength nearest `start` nm where the plate of `d` mm is `q` waves thick at `t_c`,
    /// searched toward shorter wavelengths when `shorter`.
    fn where_waves(&self, d: f64, q: f64, start: f64, shorter: bool, t_c: f64) -> Option<f64> {
        let f = |nm: f64| self.waves_per_mm(nm, t_c).map(|w| w * d - q);
        let f0 = f(start)?;
        let step = start / (4.0 * q.max(0.5)) * if shorter { -1.0 } else { 1.0 };
        let mut a = start;
        for _ in 0..400 {
            let b = a + step;
            if b <= 1.0 {
                return None;
            }
            let fb = f(b)?;
            if fb.signum() != f0.signum() || fb == 0.0 {
                let (mut lo, mut hi) = (a, b);
                for _ in 0..100 {
                    let mid = 0.5 * (lo + hi);
                    if f(mid)?.signum() == f0.signum() {
                        lo = mid;
                    } else {
                        hi = mid;
                    }
                }
                return Some(0.5 * (lo + hi));
            }
            a = b;
        }
        None
    }
}

/// Solves a birefringent-filter request.
///
/// # Errors
/// `material` where the crystal has no birefringence at the centre wavelength or its formula
/// fails near it; `cut` for a biaxial cut whose two in-face indices are equal; `bandwidth_nm`
/// wider than the lowest order gives, or so narrow that the plates would exceed 500 mm in all.
pub fn design(req: &FilterRequest) -> Result<FilterDesign, Error> {
    let nm0 = req.wavelength.nm();
    let t0 = req.temperature_c;
    let (biaxial, cut) = cut_of(&req.medium, req.cut, req.wavelength, t0).map_err(|e| match e.field.as_str() {
        "cut" => e,
        _ => Error::new("material", e.message),
    })?;
    let model = Model { req, cut };
    let w0 = model.waves_per_mm(nm0, t0).filter(|w| *w > 0.0).ok_or_else(|| {
        let field = if matches!(req.medium, Medium::Custom(_)) {
            "ne"
        } else {
            "material"
        };
        Error::new(
            field,
            "this crystal has no birefringence at the centre wavelength: no filter",
        )
    })?;
    let thickness = |m: u32| model.waves_of(m) / w0;
    let lowest = u32::from(req.layout == Layout::StageDoubling);
    let width_of = |m: u32| {
        model
            .fwhm(thickness(m), model.waves_of(m))
            .ok_or_else(|| Error::new("material", "the crystal's formula fails near the centre wavelength"))
    };
    let widest = width_of(lowest)?;
    if req.bandwidth_nm > widest * 1.000_001 {
        return Err(Error::new(
            "bandwidth_nm",
            format!(
                "{} nm is wider than this filter can pass: {} {} of this crystal give at most {:.4} nm at {} nm \
                 (the thinnest plate at its lowest order); ask fewer stages or a narrower band",
                req.bandwidth_nm,
                req.stages,
                if req.layout == Layout::Folded {
                    "plates"
                } else {
                    "stages"
                },
                widest,
                nm0
            ),
        ));
    }
    // Width falls as 1/q: the order for the width asked, then the best of it and its neighbours.
    let q_lowest = model.waves_of(lowest);
    let q_wanted = q_lowest * widest / req.bandwidth_nm;
    let guess = match req.layout {
        Layout::StageDoubling => q_wanted.round().max(1.0),
        Layout::Folded => (q_wanted - 0.5).round().max(0.0),
    };
    let total_of = |m: u32| {
        let (plates, _) = layout_of(req.layout, req.stages, thickness(m));
        plates.iter().map(|p| p.0).sum::<f64>()
    };
    if guess > f64::from(u32::MAX / 2) || total_of(guess as u32) > MAX_TOTAL_MM * 1.5 {
        return Err(Error::new(
            "bandwidth_nm",
            format!(
                "{} nm would need plates longer than {MAX_TOTAL_MM} mm in all; ask a wider band or more stages",
                req.bandwidth_nm
            ),
        ));
    }
    let guess = guess as u32;
    let mut best: Option<(u32, f64)> = None;
    for m in [guess.saturating_sub(1), guess, guess + 1] {
        if m < lowest || total_of(m) > MAX_TOTAL_MM {
            continue;
        }
        let w = width_of(m)?;
        let miss = (w / req.bandwidth_nm).ln().abs();
        if best.is_none_or(|(_, b)| miss < (b / req.bandwidth_nm).ln().abs()) {
            best = Some((m, w));
        }
    }
    let Some((order, fwhm_nm)) = best else {
        return Err(Error::new(
            "bandwidth_nm",
            format!(
                "{} nm would need plates longer than {MAX_TOTAL_MM} mm in all",
                req.bandwidth_nm
            ),
        ));
    };
    let d = thickness(order);
    let q = model.waves_of(order);
    let (plates, polarizers_deg) = layout_of(req.layout, req.stages, d);
    let scenario = filter_part(req, cut, &plates, &polarizers_deg);
    let (lo, hi) = req.band_nm.unwrap_or_else(|| {
        // Out to the neighbouring peaks and a little beyond, so that the curve shows the
        // free spectral range.
        let half = 1.25 * nm0 / q.max(0.5);
        ((nm0 - half).max(1.0), nm0 + half)
    });
    let mut traced = scenario.clone();
    traced.scenario.spectrum = Some(SpectrumRange {
        from_nm: lo,
        to_nm: hi,
        points: CURVE_POINTS,
    });
    let result = trace_scenario(&traced.scenario)?;
    let curve = result.spectrum.as_ref().map_or_else(Vec::new, |s| {
        s.wavelength_nm
            .iter()
            .zip(&s.transmission)
            .filter_map(|(&nm, t)| t.map(|t| [nm, t]))
            .collect()
    });
    let neighbour_peaks_nm = [
        model.where_waves(d, q + 1.0, nm0, true, t0),
        (q > 1.0)
            .then(|| model.where_waves(d, q - 1.0, nm0, false, t0))
            .flatten(),
    ];
    let key = match req.medium {
        Medium::Catalogue(m) => Some(m.key),
        Medium::Biaxial(m) => Some(m.key),
        _ => None,
    };
    // Crystals with temperature data: the catalogue's, or formulas carrying their own dn/dT.
    let thermal = key.and_then(material::thermal).is_some()
        || matches!(req.medium, Medium::Formula(f) if f.has_thermo_optic_data());
    let centre_shift_nm_per_k = thermal
        .then(|| {
            let at = |t: f64| model.where_waves(d, q, nm0, model.waves_per_mm(nm0, t)? * d < q, t);
            Some((at(t0 + STEP_K)? - at(t0 - STEP_K)?) / (2.0 * STEP_K))
        })
        .flatten();
    let neighbour_orders_fwhm_nm = [
        (order > lowest).then(|| width_of(order - 1).ok()).flatten(),
        width_of(order + 1).ok(),
    ];
    let next: Vec<String> = neighbour_orders_fwhm_nm
        .iter()
        .flatten()
        .map(|w| format!("{w:.4} nm"))
        .collect();
    let mut notes = vec![format!(
        "orders are whole, so the pass band is {:.4} nm for the {:.4} nm asked (the next orders give {})",
        fwhm_nm,
        req.bandwidth_nm,
        next.join(" and ")
    )];
    if req.layout == Layout::StageDoubling {
        notes.push("every polarizer is parallel to the first; unpolarized light loses half at the first".into());
    } else {
        notes.push(
            "the exit polarizer is crossed with the entrance one; unpolarized light loses half at the first".into(),
        );
    }
    Ok(FilterDesign {
        layout: req.layout.name(),
        wavelength_nm: nm0,
        bandwidth_nm: req.bandwidth_nm,
        fwhm_nm,
        order,
        neighbour_peaks_nm,
        neighbour_orders_fwhm_nm,
        peak_transmission: result.total_power,
        centre_shift_nm_per_k,
        plates: plates
            .iter()
            .map(|&(t, az)| FilterPlate {
                thickness_mm: t,
                axis_azimuth_deg: az,
                retardance_waves: w0 * t,
            })
            .collect(),
        biaxial: biaxial.as_ref().map(BiaxialCut::report),
        polarizers_deg,
        total_thickness_mm: plates.iter().map(|p| p.0).sum(),
        curve,
        notes,
        scenario,
    })
}

/// The answer's set-up: polarizers and plates in order, 1 mm apart, lit along the first
/// polarizer; each plate cut as `cut` at its azimuth (a uniaxial plate's optic axis, a biaxial
/// plate's slower in-face axis there).
fn filter_part(req: &FilterRequest, cut: PlateCut, plates: &[(f64, f64)], polarizers_deg: &[f64]) -> Part {
    let polarizer = |deg: f64| Element {
        gap_mm: GAP_MM,
        kind: ElementKind::Polarizer {
            transmission_axis_deg: deg,
        },
        contact: Contact::Air,
    };
    let plate = |&(t, az): &(f64, f64)| oriented_crystal(req.medium, t, cut.at(az), GAP_MM);
    let mut elements = vec![polarizer(polarizers_deg[0])];
    match req.layout {
        Layout::StageDoubling => {
            for (p, &deg) in plates.iter().zip(&polarizers_deg[1..]) {
                elements.push(plate(p));
                elements.push(polarizer(deg));
            }
        }
        Layout::Folded => {
            elements.extend(plates.iter().map(plate));
            elements.push(polarizer(polarizers_deg[1]));
        }
    }
    let mut part = Part::new(req.wavelength, None, elements).at_temperature(req.temperature_c);
    part.scenario.beam.polarization = Polarization::Linear { azimuth_deg: 0.0 };
    part
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_jones_model_gives_the_product_formula_and_the_folded_closed_form() {
        // Stage-doubling: Π cos²(2ᵏΓ/2) (the product formula).
        for g in [0.3, 1.7, 2.9, 5.0] {
            let plates: Vec<(f64, f64)> = (0..4).map(|k| (g * f64::from(1 << k), 45.0)).collect();
            let want: f64 = (0..4).map(|k| (g * f64::from(1 << k) / 2.0).cos().powi(2)).product();
            assert!((jones_transmission(Layout::StageDoubling, &plates) - want).abs() < 1e-14);
        }
        // Folded, N plates at ±ρ, ρ = π/4N, between crossed polarizers: T = [tan 2ρ cos χ
        // sin Nχ / sin χ]², cos χ = cos 2ρ sin(Γ/2) (Yariv & Yeh, Optical Waves in Crystals,
        // §5.3, from memory).
        for n in [2usize, 5, 8] {
            let rho = std::f64::consts::FRAC_PI_4 / n as f64;
            for g in [0.4, 2.0, std::f64::consts::PI, 4.4] {
                let plates: Vec<(f64, f64)> = (0..n)
                    .map(|k| (g, if k % 2 == 0 { rho } else { -rho }.to_degrees()))
                    .collect();
                let chi = ((2.0 * rho).cos() * (g / 2.0).sin()).acos();
                let want = ((2.0 * rho).tan() * chi.cos() * (n as f64 * chi).sin() / chi.sin()).powi(2);
                let got = jones_transmission(Layout::Folded, &plates);
                assert!((got - want).abs() < 1e-12, "N {n}, Γ {g}: {got} against {want}");
            }
        }
    }
}
