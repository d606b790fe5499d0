//! Tilt tuning: the mount tilt that brings a waveplate to its target retardance.
//!
//! The plate is cut with its optic axis in its faces, at `axis_azimuth_deg` in the plate, and
//! held in a mount tilted by t in the plane at `tilt_azimuth_deg` (the contract's `mount`: the
//! smallest rotation taking z to (sin t cos a, sin t sin a, cos t), about the plate's axis point).
//! The beam stays along z. The retardance is the phase of the e-path less that of the o-path, as
//! the exact trace of the mounted plate gives it ([`crate::optics::trace`]; the two rays leave
//! parallel, so their phase difference at the screen is the plate's retardance), in waves,
//! positive when the e-mode is slower.
//!
//! Tilting about the optic axis (tilt plane across the axis) keeps the e-wave at 90° to the axis
//! and lengthens the path, so |Γ| grows, Γ = k₀L(√(n_e² − sin²t) − √(n_o² − sin²t)) (the
//! textbook retardance of a plate at oblique incidence, Yariv & Yeh, *Optical Waves in
//! Crystals*, §5, from memory); tilting in the plane of the axis turns the e-wave toward the axis
//! and |Γ| falls. Other azimuths lie between.
//!
//! The target is a retardance modulo whole waves (a quarter wave is any m + ¼ of the same
//! sign): the tilt is the smallest in [0, `max_tilt_deg`] at which |Γ| reaches the target plus
//! some whole number of waves, found on a scan of the trace and bisected. A mounted plate lit
//! along z is the unmounted plate lit at polar angle t from the azimuth opposite the tilt (the
//! tests check the two against each other).
//!
//! Temperature: the plate (its thickness made at 20 °C) works at the request's `temperature_c` T
//! ([`crate::design::thermal`]): every trace is at T. The tilt's change per kelvin follows from
//! the tuned condition |Γ(t, T)| = target + m by implicit differentiation,
//! dt/dT = −(∂Γ/∂T)/(∂Γ/∂t), each partial a central difference of the exact trace.
//!
//! Biaxial crystals: the plate is cut along a principal axis (`cut`, as a waveplate's,
//! [`crate::design::principal`]: the cut of largest birefringence unless the request names one),
//! its slower in-face principal axis at `axis_azimuth_deg`, so that untilted it retards by
//! 2π (n_slow − n_fast) L / λ; a plate given by its order is sized with that birefringence at
//! `made_for_nm`. The tilted plate is traced whole as a uniaxial one is (the general mode solver
//! in each face), the retardance being the phase of the s-path less that of the f-path; its
//! thickness grows by the expansion along the cut's axis. The answer names the plate's two
//! in-face principal axes by their letters, the slow one (`slow_principal_axis`, at
//! `axis_azimuth_deg`) and the fast one (`fast_principal_axis`, across it at
//! `fast_axis_azimuth_deg`, folded into (−90°, 90°]), as they stand in the untilted plate: the
//! f- and s-waves at normal incidence are polarized along them (there is no optic axis in the
//! faces to name).

use crate::contract::geometry::{Angles, Contact, Placement};
use crate::contract::request::principal::AXIS_LETTERS;
use crate::contract::request::{PlateSize, TiltRequest};
use crate::design::part::{Part, oriented_crystal, placed};
use crate::design::principal::{BiaxialCut, CutReport, biaxial_cut};
use crate::design::thermal::{Temperature, growth_along_z, indices_at, per_kelvin, principal_at};
use crate::design::waveplate::PlateCut;
use crate::error::Error;
use crate::numfmt::sig;
use crate::optics::material::{Indices, REFERENCE_C};
use crate::optics::wavelength::Wavelength;
use crate::precision::{BISECTION_STEPS, DESIGN_SCAN_INTERVALS, DIFF_STEP_INCIDENCE_DEG};
use serde::Serialize;
use std::f64::consts::TAU;

/// Distance of the screen behind the plate, mm.
const SCREEN_MM: f64 = 10.0;

/// Retardance against tilt.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TiltCurve {
    /// Mount tilts, degrees.
    pub tilt_deg: Vec<f64>,
    /// Retardance at each, waves (signed: positive when the e-mode is slower; a biaxial plate's
    /// s-mode is the slower by its name).
    pub retardance_waves: Vec<f64>,
}

/// The tuned plate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TiltDesign {
    /// The mount tilt, degrees.
    pub tilt_deg: f64,
    /// The plate's thickness, mm.
    pub thickness_mm: f64,
    /// Retardance at normal incidence, waves.
    pub normal_retardance_waves: f64,
    /// Retardance at the tilt, waves (the target plus whole waves).
    pub retardance_waves: f64,
    /// Whole waves of the tuned retardance beyond the target.
    pub order: i64,
    /// dΓ/dt at the tilt, waves per degree.
    pub sensitivity_waves_per_deg: f64,
    /// The plate's thickness at the design temperature, mm.
    pub thickness_at_temperature_mm: f64,
    /// About the design temperature: the tuned tilt's change (`tilt_deg`, degrees per kelvin) and
    /// the retardance's at the fixed tilt (`retardance_waves`, waves per kelvin).
    pub temperature: Temperature,
    /// Retardance against tilt from 0 to the largest tilt searched.
    pub curve: TiltCurve,
    /// For a biaxial crystal, its cut and in-face principal axes.
    #[serde(flatten)]
    pub biaxial: Option<BiaxialTilt>,
    /// The mounted plate, ready to load.
    pub scenario: Part,
}

/// A tilt-tuned biaxial plate's cut and in-face principal axes, flattened into the answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BiaxialTilt {
    /// The cut (`cut`, `cut_note`, `principal_indices`).
    #[serde(flatten)]
    pub cut: CutReport,
    /// The azimuth of the plate's slower in-face principal axis, degrees (the part's `axes`
    /// write the whole orientation).
    pub axis_azimuth_deg: f64,
    /// The slower in-face principal axis (`x`, `y` or `z`), along which the s-wave is polarized
    /// at normal incidence.
    pub slow_principal_axis: String,
    /// The faster in-face principal axis, along which the f-wave is polarized at normal
    /// incidence: the plate's fast axis.
    pub fast_principal_axis: String,
    /// The azimuth of the fast axis in the faces, degrees: the slow axis's plus 90°, folded into
    /// (−90°, 90°].
    pub fast_axis_azimuth_deg: f64,
}

/// How the request's plate is cut: its orientation and its fast and slow indices at the design
/// wavelength and temperature.
struct Cut {
    /// The plate's orientation.
    plate: PlateCut,
    /// A uniaxial plate's n_o, n_e; a biaxial plate's fast and slow in-face indices.
    indices: Indices,
    /// A biaxial plate's cut.
    biaxial: Option<BiaxialCut>,
}

impl TiltRequest {
    /// The plate's cut (a uniaxial plate's optic axis in its faces).
    ///
    /// # Errors
    /// As [`biaxial_cut`] and [`indices_at`].
    fn cut(&self) -> Result<Cut, Error> {
        let (t_c, wl) = (self.temperature_c, self.wavelength);
        Ok(match biaxial_cut(&self.medium, self.cut, wl, t_c)? {
            Some(b) => Cut {
                plate: PlateCut::Principal(b.oriented),
                indices: b.indices,
                biaxial: Some(b),
            },
            None => Cut {
                plate: PlateCut::Axis,
                indices: indices_at(&self.medium, wl, t_c)?,
                biaxial: None,
            },
        })
    }

    /// The plate's thickness, mm, for a plate of `cut`.
    fn thickness(&self, cut: &Cut) -> Result<f64, Error> {
        match self.size {
            PlateSize::Thickness(t) => Ok(t),
            PlateSize::Order { order, made_for_nm } => {
                let wl = Wavelength::from_nm(made_for_nm)?;
                let dn = match &cut.biaxial {
                    None => {
                        let ix = self.medium.indices(wl)?;
                        ix.ne - ix.no
                    }
                    Some(b) => {
                        let n = principal_at(&self.medium, wl, REFERENCE_C)?;
                        n[b.slow_fast.0] - n[b.slow_fast.1]
                    }
                };
                Ok((order as f64 + self.retardance_waves) * made_for_nm * 1e-6 / dn.abs())
            }
        }
    }

    fn part(&self, cut: PlateCut, thickness_mm: f64, tilt_deg: f64) -> Part {
        let placement = Placement {
            mount: Angles {
                tilt_deg,
                azimuth_deg: self.tilt_azimuth_deg,
            },
            ..Placement::default()
        };
        let mut part = Part::new(
            self.wavelength,
            None,
            vec![placed(
                oriented_crystal(self.medium, thickness_mm, cut.at(self.axis_azimuth_deg), 1.0),
                placement,
                Contact::Air,
            )],
        );
        part = part.at_temperature(self.temperature_c);
        // The screen beyond the tilted plate's back face: at the default (the back face's axis
        // point before mounting) part of a tilted face lies past the screen, and a ray leaving
        // there would not reach it.
        part.scenario.screen_mm = SCREEN_MM;
        part
    }
}

/// The azimuth across `azimuth_deg` in a plate's faces: 90° more, folded into (−90°, 90°]
/// (an axis's azimuth is defined modulo 180°).
fn across(azimuth_deg: f64) -> f64 {
    let a = (azimuth_deg + 90.0).rem_euclid(180.0);
    if a > 90.0 { a - 180.0 } else { a }
}

/// Retardance (waves) of a part with one crystal: phase of "e" less that of "o" (uniaxial), of
/// "s" less that of "f" (biaxial).
pub fn traced_retardance_waves(part: &Part) -> Option<f64> {
    let (_, t) = part.traced().ok()?;
    let find = |l: &str| t.paths.iter().find(|p| p.label == l).map(|p| p.phase_rad);
    let (slow, fast) = find("e").zip(find("o")).or_else(|| find("s").zip(find("f")))?;
    Some((slow - fast) / TAU)
}

/// Tunes a plate.
///
/// # Errors
/// `material` without birefringence; `cut` for a biaxial cut without it; `max_tilt_deg` when no
/// tilt up to it reaches the target.
pub fn design(req: &TiltRequest) -> Result<TiltDesign, Error> {
    let cut = req.cut()?;
    let ix = cut.indices;
    if (ix.ne - ix.no).abs() < crate::precision::NO_BIREFRINGENCE {
        return Err(Error::new(
            "material",
            "this crystal is not birefringent: no tilt gives retardance",
        ));
    }
    let l = req.thickness(&cut)?;
    let plate = cut.plate;
    let at = |t: f64| traced_retardance_waves(&req.part(plate, l, t));
    let fail = || Error::new("material", "a mode does not cross the plate");
    // g(t) = |Γ(t)| − target; the tilt is where g is a whole number.
    let g = |t: f64| at(t).map(|r| r.abs() - req.retardance_waves);
    let n = DESIGN_SCAN_INTERVALS;
    let mut curve = TiltCurve {
        tilt_deg: vec![],
        retardance_waves: vec![],
    };
    for k in 0..=n {
        let t = req.max_tilt_deg * k as f64 / n as f64;
        curve.tilt_deg.push(t);
        curve.retardance_waves.push(at(t).ok_or_else(fail)?);
    }
    let mut found = None;
    let g0 = g(0.0).ok_or_else(fail)?;
    if (g0 - g0.round()).abs() < crate::precision::SAME_RETARDANCE_WAVES {
        found = Some((0.0, g0.round()));
    }
    for k in 1..=n {
        if found.is_some() {
            break;
        }
        let (t0, t1) = (curve.tilt_deg[k - 1], curve.tilt_deg[k]);
        let (a, b) = (
            curve.retardance_waves[k - 1].abs() - req.retardance_waves,
            curve.retardance_waves[k].abs() - req.retardance_waves,
        );
        // A whole number between a and b (b itself included).
        let m = if b >= a { b.floor() } else { b.ceil() };
        if (m - a) * (m - b) <= 0.0 && m != a {
            let (mut lo, mut hi) = (t0, t1);
            for _ in 0..BISECTION_STEPS {
                let mid = 0.5 * (lo + hi);
                let v = g(mid).ok_or_else(fail)? - m;
                if (v > 0.0) == (a - m > 0.0) { lo = mid } else { hi = mid }
            }
            found = Some((0.5 * (lo + hi), m));
        }
    }
    let Some((tilt, m)) = found else {
        let (lo, hi) = curve
            .retardance_waves
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), r| {
                (lo.min(r.abs()), hi.max(r.abs()))
            });
        return Err(Error::new(
            "max_tilt_deg",
            format!(
                "no tilt up to {}° brings the plate to {} waves modulo whole waves: its retardance stays between {} and {} waves; a thicker plate, another order or another tilt plane may",
                sig(req.max_tilt_deg, 4),
                sig(req.retardance_waves, 4),
                sig(lo, 6),
                sig(hi, 6)
            ),
        ));
    };
    let h = DIFF_STEP_INCIDENCE_DEG;
    let (up, down) = (at(tilt + h).ok_or_else(fail)?, at((tilt - h).abs()).ok_or_else(fail)?);
    let slope = if tilt >= h {
        (up - down) / (2.0 * h)
    } else {
        (up - at(tilt).ok_or_else(fail)?) / h
    };
    let t_c = req.temperature_c;
    let tuned = req.part(plate, l, tilt);
    let gamma_per_k = per_kelvin(|t| traced_retardance_waves(&tuned.clone().at_temperature(t)), t_c);
    let temperature = Temperature::given(
        t_c,
        vec![
            ("retardance_waves", gamma_per_k),
            ("tilt_deg", gamma_per_k.filter(|_| slope != 0.0).map(|d| -d / slope)),
        ],
    );
    Ok(TiltDesign {
        tilt_deg: tilt,
        thickness_mm: l,
        thickness_at_temperature_mm: l * growth_along_z(&req.medium, &plate.at(req.axis_azimuth_deg).axes(), t_c),
        temperature,
        normal_retardance_waves: curve.retardance_waves[0],
        retardance_waves: at(tilt).ok_or_else(fail)?,
        order: m as i64,
        sensitivity_waves_per_deg: slope,
        curve,
        biaxial: cut.biaxial.as_ref().map(|b| BiaxialTilt {
            cut: b.report(),
            axis_azimuth_deg: req.axis_azimuth_deg,
            slow_principal_axis: AXIS_LETTERS[b.slow_fast.0].to_string(),
            fast_principal_axis: AXIS_LETTERS[b.slow_fast.1].to_string(),
            fast_axis_azimuth_deg: across(req.axis_azimuth_deg),
        }),
        scenario: tuned,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::scenario::Scenario;
    use crate::precision::assert_within;

    fn request(doc: &str) -> TiltRequest {
        crate::contract::request::read_ok(doc, TiltRequest::from_json)
    }

    #[test]
    fn tilting_about_the_axis_follows_the_oblique_plate_formula() {
        // Axis along x, tilt in the y–z plane: the e-wave stays at 90° to the axis.
        // Γ = k₀L(√(n_e² − sin²t) − √(n_o² − sin²t)) (Yariv & Yeh §5, from memory).
        let r = request(
            r#"{"material": "quartz", "retardance_waves": 0.25, "thickness_mm": 0.5, "axis_azimuth_deg": 0, "tilt_azimuth_deg": 90}"#,
        );
        let d = design(&r).unwrap();
        let ix = r.medium.indices(r.wavelength).unwrap();
        let l_over_lambda = 0.5 / (r.wavelength.nm() * 1e-6);
        let closed = |t: f64| {
            let s2 = t.to_radians().sin().powi(2);
            l_over_lambda * ((ix.ne * ix.ne - s2).sqrt() - (ix.no * ix.no - s2).sqrt())
        };
        for (t, g) in d.curve.tilt_deg.iter().zip(&d.curve.retardance_waves) {
            assert_within(*g, closed(*t), 1e-9, "oblique plate, axis across the tilt plane");
        }
        assert_within(
            d.retardance_waves.abs().fract(),
            0.25,
            1e-9,
            "the target modulo whole waves",
        );
        assert_within(d.retardance_waves, closed(d.tilt_deg), 1e-9, "at the tilt");
        assert!(d.sensitivity_waves_per_deg.abs() > 0.0);
        Scenario::from_json(&d.scenario.document()).unwrap();
    }

    #[test]
    fn a_mounted_plate_equals_an_unmounted_plate_at_oblique_incidence() {
        for doc in [
            r#"{"material": "quartz", "retardance_waves": 0.2, "thickness_mm": 0.3, "axis_azimuth_deg": 30, "tilt_azimuth_deg": 0}"#,
            r#"{"material": "mgf2", "retardance_waves": 0.25, "order_number": 4, "made_for_nm": 650, "axis_azimuth_deg": 45, "tilt_azimuth_deg": 10, "max_tilt_deg": 40}"#,
            r#"{"material": "calcite", "retardance_waves": 0.25, "thickness_mm": 0.02, "axis_azimuth_deg": 0, "tilt_azimuth_deg": 0}"#,
        ] {
            let r = request(doc);
            let d = design(&r).unwrap();
            assert_within(d.retardance_waves.abs().fract(), r.retardance_waves, 1e-9, doc);
            // The same plate unmounted (v1 geometry, the plane-parallel tracer), lit at polar t
            // from the azimuth opposite the tilt.
            for (t, g) in d.curve.tilt_deg.iter().zip(&d.curve.retardance_waves).step_by(8) {
                let mut p = r.part(PlateCut::Axis, d.thickness_mm, 0.0);
                p.scenario.beam.polar_deg = *t;
                p.scenario.beam.azimuth_deg = r.tilt_azimuth_deg + 180.0;
                let oblique = traced_retardance_waves(&p).unwrap();
                assert_within(*g, oblique, 1e-9, "a mounted plate against oblique incidence");
            }
        }
    }

    #[test]
    fn a_biaxial_plate_names_its_fast_axis_as_the_traced_f_wave_is_polarized() {
        // Independent method: the exact trace of the untilted plate (the general mode solver)
        // gives the f-wave's D polarization; the answer's fast axis is the in-face principal
        // axis along it, at the answer's azimuth, and the s-wave lies along the slow one. KTP
        // y-cut (n_z > n_x: slow z, fast x) and an LBO x-cut (n_z > n_y: slow z, fast y), at
        // azimuths that fold.
        for (doc, slow, fast, fast_az) in [
            (
                r#"{"material": "ktp", "wavelength_nm": 1064, "retardance_waves": 0.25, "order_number": 9, "made_for_nm": 1050, "tilt_azimuth_deg": 90}"#,
                "z",
                "x",
                90.0,
            ),
            (
                r#"{"material": "lbo", "cut": "x", "wavelength_nm": 532, "retardance_waves": 0.25, "thickness_mm": 1, "axis_azimuth_deg": 30, "tilt_azimuth_deg": 0, "max_tilt_deg": 45}"#,
                "z",
                "y",
                -60.0,
            ),
            (
                r#"{"material": "ktp", "cut": "z", "wavelength_nm": 1064, "retardance_waves": 0.5, "thickness_mm": 0.5, "axis_azimuth_deg": -100, "max_tilt_deg": 60}"#,
                "y",
                "x",
                -10.0,
            ),
        ] {
            let d = design(&request(doc)).unwrap();
            let b = d.biaxial.as_ref().unwrap();
            assert_eq!(
                (b.slow_principal_axis.as_str(), b.fast_principal_axis.as_str()),
                (slow, fast),
                "{doc}"
            );
            let az = b.fast_axis_azimuth_deg;
            assert_within(az, fast_az, 1e-12, doc);
            let r = request(doc);
            let untilted = r.part(r.cut().unwrap().plate, d.thickness_mm, 0.0);
            let traced = crate::contract::result::trace_scenario(&untilted.scenario).unwrap();
            let el = serde_json::to_value(&traced).unwrap()["elements"][0].clone();
            let along = |mode: &str, deg: f64| {
                let p = &el[mode]["d_polarization"];
                let (x, y) = (p[0].as_f64().unwrap(), p[1].as_f64().unwrap());
                (x * deg.to_radians().sin() - y * deg.to_radians().cos()).abs()
            };
            assert!(along("f", az) < 1e-9, "{doc}: f along the fast axis: {}", el["f"]);
            assert!(along("s", az + 90.0) < 1e-9, "{doc}: s across it: {}", el["s"]);
            assert!(el["s"]["index"].as_f64() > el["f"]["index"].as_f64(), "{doc}");
        }
        // A uniaxial plate names none: its optic axis says it.
        let u = design(&request(
            r#"{"material": "quartz", "retardance_waves": 0.25, "thickness_mm": 0.5, "axis_azimuth_deg": 0, "tilt_azimuth_deg": 90}"#,
        ))
        .unwrap();
        assert_eq!(u.biaxial, None);
    }

    #[test]
    fn an_unreachable_target_names_the_tilt_range() {
        let e = design(&request(
            r#"{"material": "quartz", "retardance_waves": 0.25, "thickness_mm": 0.01, "max_tilt_deg": 5}"#,
        ))
        .unwrap_err();
        assert_eq!(e.field, "max_tilt_deg", "{e}");
    }
}
