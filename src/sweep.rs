//! Sweeps of one crystal's behaviour against a parameter, for plots and tables.
//!
//! Each sweep takes one crystal of a scenario, at the scenario's incidence and outside index,
//! and varies one parameter while holding the rest: the e-ray walk-off against the cut tilt (the
//! angle between optic axis and plate normal), and the o–e separation and the retardance against
//! wavelength over the material's validity range. Every point is the exact plane-wave solution of
//! [`crate::modes`], so the plotted curve passes through the traced operating point. Points where
//! a mode is evanescent or the dispersion formula breaks down are left out.

use crate::error::Error;
use crate::json_fields::{Fields, number_list};
use crate::material::Indices;
use crate::plate::plate_optics;
use crate::scenario::{CrystalPlate, ElementKind, Medium, Scenario};
use crate::wavelength::Wavelength;
use serde::Serialize;
use serde_json::Value;
use std::f64::consts::TAU;

/// Wavelength range used for crystals with fixed custom indices, nm.
pub const CUSTOM_RANGE_NM: (f64, f64) = (400.0, 1600.0);
/// Points per wavelength sweep.
pub const WAVELENGTH_POINTS: usize = 121;

/// A sampled curve with its axes and the current operating point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Series {
    /// What is plotted, e.g. "walk-off against cut tilt".
    pub title: String,
    /// Name of the x quantity.
    pub x_label: String,
    /// Unit of x.
    pub x_unit: String,
    /// Name of the y quantity.
    pub y_label: String,
    /// Unit of y.
    pub y_unit: String,
    /// The samples [x, y].
    pub points: Vec<[f64; 2]>,
    /// The scenario's own operating point, when it is defined.
    pub current: Option<[f64; 2]>,
    /// A remark for the reader (no dispersion, evanescent range, …).
    pub note: String,
}

impl Series {
    /// Reads a series written as JSON (the shape it serializes to). Read by hand rather than
    /// derived, which keeps the page's WebAssembly module small.
    ///
    /// # Errors
    /// The path of the first offending field, under `series`.
    pub fn from_json(v: &Value) -> Result<Series, Error> {
        let mut f = Fields::new("series", v)?;
        let text = |f: &mut Fields, name: &'static str| -> Result<String, Error> {
            Ok(f.string(name)?.unwrap_or_default().to_string())
        };
        let (title, x_label, x_unit, y_label, y_unit, note) = (
            text(&mut f, "title")?,
            text(&mut f, "x_label")?,
            text(&mut f, "x_unit")?,
            text(&mut f, "y_label")?,
            text(&mut f, "y_unit")?,
            text(&mut f, "note")?,
        );
        let points = match f.get("points") {
            Some(Value::Array(items)) => items
                .iter()
                .enumerate()
                .map(|(i, p)| number_list(&format!("series.points[{i}]"), p, 2).map(|xy| [xy[0], xy[1]]))
                .collect::<Result<Vec<_>, _>>()?,
            None => Vec::new(),
            Some(_) => return Err(Error::new("series.points", "must be a list of [x, y] pairs")),
        };
        let current = match f.get("current") {
            None => None,
            Some(c) => {
                let xy = number_list("series.current", c, 2)?;
                Some([xy[0], xy[1]])
            }
        };
        f.finish()?;
        Ok(Series {
            title,
            x_label,
            x_unit,
            y_label,
            y_unit,
            points,
            current,
            note,
        })
    }
}

/// Closed-form walk-off ρ (radians, signed as [`crate::uniaxial::walkoff`]) at normal incidence
/// for `out.len()` cut angles evenly spaced from `theta0` to `theta1` (radians), written into
/// `out`: the dense sweep behind walk-off plots and the benchmark.
///
/// Formula: with the double angle φ = 2θ, ρ = atan2(y, x) with y = ½(n_o² − n_e²) sin φ and
/// x = ½(n_e² + n_o²) + ½(n_e² − n_o²) cos φ = n_e² cos²θ + n_o² sin²θ > 0 (Born & Wolf,
/// *Principles of Optics*, §15.3, in double-angle form).
///
/// Method: the samples go in blocks of [`SWEEP_BLOCK`]. Each block starts from an exact anchor
/// φ₀ (one `sin_cos` and one `atan2`); the block's k-th sample has sin and cos of φ₀ + kΔφ by
/// angle addition from a table of sin kΔφ, cos kΔφ computed once per sweep, and its ρ from the
/// atan2 difference identity ρ_k = ρ₀ + atan(u), u = (y_k x₀ − x_k y₀)/(x_k x₀ + y_k y₀) (exact
/// while both points lie in the half-plane x > 0, as they always do here). When |u| ≤
/// [`SWEEP_SERIES_LIMIT`], atan u = u − u³/3 + u⁵/5 to within |u|⁷/7 < 2·10⁻²¹, below the rounding
/// of ρ₀; a block with a larger |u| (a coarse sweep) is computed sample by sample with `atan2`.
/// No sample depends on the one before it, so the loop has no carried chain and vectorizes. The
/// values agree with the direct formula to ~1e-15 (tested).
///
/// Degenerate case: an empty `out` does nothing; one sample is taken at `theta0`.
pub fn walkoff_sweep_into(indices: Indices, theta0: f64, theta1: f64, out: &mut [f64]) {
    let n = out.len();
    if n == 0 {
        return;
    }
    let (no2, ne2) = (indices.no * indices.no, indices.ne * indices.ne);
    let (half_a, mean, half_d) = (0.5 * (no2 - ne2), 0.5 * (ne2 + no2), 0.5 * (ne2 - no2));
    let dphi = if n > 1 {
        2.0 * (theta1 - theta0) / (n - 1) as f64
    } else {
        0.0
    };
    let mut rot_sin = [0.0; SWEEP_BLOCK];
    let mut rot_cos = [1.0; SWEEP_BLOCK];
    for (k, (rs, rc)) in rot_sin.iter_mut().zip(rot_cos.iter_mut()).enumerate() {
        (*rs, *rc) = (dphi * k as f64).sin_cos();
    }
    for (b, block) in out.chunks_mut(SWEEP_BLOCK).enumerate() {
        let phi0 = 2.0 * theta0 + dphi * (b * SWEEP_BLOCK) as f64;
        let (s0, c0) = phi0.sin_cos();
        let (y0, x0) = (half_a * s0, mean + half_d * c0);
        let rho0 = y0.atan2(x0);
        let mut within = true;
        for ((v, &rs), &rc) in block.iter_mut().zip(&rot_sin).zip(&rot_cos) {
            let (s, c) = (s0 * rc + c0 * rs, c0 * rc - s0 * rs);
            let (y, x) = (half_a * s, mean + half_d * c);
            let u = (y * x0 - x * y0) / (x * x0 + y * y0);
            let u2 = u * u;
            *v = rho0 + u * (1.0 - u2 * (1.0 / 3.0 - 0.2 * u2));
            within &= u.abs() <= SWEEP_SERIES_LIMIT;
        }
        if !within {
            for (k, v) in block.iter_mut().enumerate() {
                let (s, c) = (phi0 + dphi * k as f64).sin_cos();
                *v = (half_a * s).atan2(mean + half_d * c);
            }
        }
    }
}

/// Σ `values` in four interleaved partial sums (so the additions vectorize), added at the end:
/// the checksum of a dense sweep in the benchmarks. Differs from a left-to-right sum only by
/// rounding.
pub fn checksum(values: &[f64]) -> f64 {
    let mut lanes = [0.0; 4];
    let mut quads = values.chunks_exact(4);
    for q in &mut quads {
        for (l, v) in lanes.iter_mut().zip(q) {
            *l += v;
        }
    }
    let tail: f64 = quads.remainder().iter().sum();
    (lanes[0] + lanes[1]) + (lanes[2] + lanes[3]) + tail
}

/// Samples per exactly anchored block in [`walkoff_sweep_into`].
pub const SWEEP_BLOCK: usize = 64;

/// Largest |u| for which [`walkoff_sweep_into`] takes atan u from its series.
pub const SWEEP_SERIES_LIMIT: f64 = 1e-3;

/// [`walkoff_sweep_into`] split over `threads` threads (natively; one thread on WebAssembly),
/// each filling its own contiguous part: identical values, shared work.
///
/// Degenerate cases: `threads` is taken as 1 when 0 and as 64 when larger (it is a work split,
/// not an input a user gives); sweeps under 4096 samples run on the calling thread.
pub fn walkoff_sweep_parallel(indices: Indices, theta0: f64, theta1: f64, out: &mut [f64], threads: usize) {
    let n = out.len();
    let threads = if cfg!(target_arch = "wasm32") {
        1
    } else {
        threads.clamp(1, 64)
    };
    if threads == 1 || n < 4096 {
        return walkoff_sweep_into(indices, theta0, theta1, out);
    }
    let step = if n > 1 { (theta1 - theta0) / (n - 1) as f64 } else { 0.0 };
    // Chunk boundaries on anchor multiples, so every thread's anchors fall where one thread's would.
    let per = n.div_ceil(threads).div_ceil(SWEEP_BLOCK) * SWEEP_BLOCK;
    std::thread::scope(|scope| {
        for (k, part) in out.chunks_mut(per).enumerate() {
            let start = k * per;
            let (a, b) = (
                theta0 + step * start as f64,
                theta0 + step * (start + part.len() - 1) as f64,
            );
            scope.spawn(move || walkoff_sweep_into(indices, a, b, part));
        }
    });
}

struct Setting {
    plate: CrystalPlate,
    qt: [f64; 2],
}

fn setting(sc: &Scenario, crystal: usize) -> Option<Setting> {
    let plate = sc
        .elements
        .iter()
        .filter_map(|e| match e.kind {
            ElementKind::Crystal(p) => Some(p),
            _ => None,
        })
        .nth(crystal)?;
    let (p, a) = (sc.beam.polar_deg.to_radians(), sc.beam.azimuth_deg.to_radians());
    let n = sc.outside_index;
    Some(Setting {
        plate,
        qt: [n * p.sin() * a.cos(), n * p.sin() * a.sin()],
    })
}

fn indices_at(plate: &CrystalPlate, wl: Wavelength) -> Option<Indices> {
    match plate.medium {
        Medium::Catalogue(m) => m.indices(wl).ok().map(|e| e.indices),
        Medium::Custom(ix) => Some(ix),
    }
}

/// (walk-off rad, separation mm, retardance rad) of one plate, or None if a mode is evanescent.
fn plate_numbers(ix: Indices, tilt: f64, az: f64, qt: [f64; 2], l: f64, wl: Wavelength) -> Option<(f64, f64, f64)> {
    plate_optics(ix, tilt, az, l, wl, qt).map(|p| (p.walkoff_rad, p.separation_mm, p.retardance_rad))
}

fn no_crystal(title: &str, x_label: &str, x_unit: &str, y_label: &str, y_unit: &str) -> Series {
    Series {
        title: title.into(),
        x_label: x_label.into(),
        x_unit: x_unit.into(),
        y_label: y_label.into(),
        y_unit: y_unit.into(),
        points: vec![],
        current: None,
        note: "no crystal in the stack".into(),
    }
}

/// Walk-off of crystal number `crystal` (counting crystals only, from 0) against its cut tilt,
/// 0–90° (0–180° when the current tilt exceeds 90° or the incidence is oblique), in 1° steps.
///
/// # Errors
/// `wavelength_nm` when the crystal's dispersion formula breaks down at the wavelength.
pub fn walkoff_vs_tilt(sc: &Scenario, crystal: usize) -> Result<Series, Error> {
    let (title, xl, xu, yl, yu) = ("Walk-off against cut tilt", "cut tilt", "°", "walk-off", "°");
    let Some(st) = setting(sc, crystal) else {
        return Ok(no_crystal(title, xl, xu, yl, yu));
    };
    let ix = match st.plate.medium {
        Medium::Catalogue(m) => m.indices(sc.wavelength)?.indices,
        Medium::Custom(ix) => ix,
    };
    let oblique = st.qt[0].hypot(st.qt[1]) > 0.0;
    let top = if st.plate.tilt_deg > 90.0 || oblique { 180 } else { 90 };
    let p = &st.plate;
    let points = (0..=top)
        .filter_map(|t| {
            let t = t as f64;
            plate_numbers(ix, t, p.azimuth_deg, st.qt, p.thickness_mm, sc.wavelength)
                .map(|(w, _, _)| [t, w.to_degrees()])
        })
        .collect();
    let current = plate_numbers(ix, p.tilt_deg, p.azimuth_deg, st.qt, p.thickness_mm, sc.wavelength)
        .map(|(w, _, _)| [p.tilt_deg, w.to_degrees()]);
    let note = format!("at {} nm, axis azimuth {}°", sc.wavelength.nm(), p.azimuth_deg);
    Ok(Series {
        title: title.into(),
        x_label: xl.into(),
        x_unit: xu.into(),
        y_label: yl.into(),
        y_unit: yu.into(),
        points,
        current,
        note,
    })
}

fn wavelength_sweep(
    sc: &Scenario,
    crystal: usize,
    title: &str,
    y_label: &str,
    y_unit: &str,
    pick: fn(f64, f64) -> f64,
) -> Series {
    let Some(st) = setting(sc, crystal) else {
        return no_crystal(title, "wavelength", "nm", y_label, y_unit);
    };
    let p = st.plate;
    let (range, note) = match p.medium {
        Medium::Catalogue(m) => (m.range_nm, format!("{} over its formula's range", m.key)),
        Medium::Custom(_) => (CUSTOM_RANGE_NM, "custom indices: no dispersion".to_string()),
    };
    let value = |nm: f64| -> Option<f64> {
        let wl = Wavelength::from_nm(nm).ok()?;
        let ix = indices_at(&p, wl)?;
        plate_numbers(ix, p.tilt_deg, p.azimuth_deg, st.qt, p.thickness_mm, wl).map(|(_, s, r)| pick(s, r))
    };
    let n = WAVELENGTH_POINTS;
    let points = (0..n)
        .filter_map(|i| {
            let nm = range.0 + (range.1 - range.0) * i as f64 / (n - 1) as f64;
            value(nm).map(|v| [nm, v])
        })
        .collect();
    let current = value(sc.wavelength.nm()).map(|v| [sc.wavelength.nm(), v]);
    Series {
        title: title.into(),
        x_label: "wavelength".into(),
        x_unit: "nm".into(),
        y_label: y_label.into(),
        y_unit: y_unit.into(),
        points,
        current,
        note,
    }
}

/// o–e separation of crystal number `crystal` against wavelength over its material's range
/// ([`CUSTOM_RANGE_NM`] for custom indices), [`WAVELENGTH_POINTS`] samples.
pub fn separation_vs_wavelength(sc: &Scenario, crystal: usize) -> Series {
    wavelength_sweep(
        sc,
        crystal,
        "Separation against wavelength",
        "separation",
        "mm",
        |s, _| s,
    )
}

/// Retardance (waves) of crystal number `crystal` against wavelength, as
/// [`separation_vs_wavelength`].
pub fn retardance_vs_wavelength(sc: &Scenario, crystal: usize) -> Series {
    wavelength_sweep(
        sc,
        crystal,
        "Retardance against wavelength",
        "retardance",
        "waves",
        |_, r| r / TAU,
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::trace::{ElementReport, trace};

    #[test]
    fn sweeps_pass_through_the_traced_point() {
        let sc = Scenario::from_json_str(include_str!("../examples/demo.json")).unwrap();
        let r = trace(&sc).unwrap();
        let ElementReport::Crystal {
            separation_mm,
            retardance_waves,
            e,
            ..
        } = &r.elements[0]
        else {
            panic!()
        };
        let w = walkoff_vs_tilt(&sc, 0).unwrap();
        assert_eq!(w.current.unwrap(), [45.0, e.walkoff_deg.unwrap()]);
        let on_curve = w.points.iter().find(|p| p[0] == 45.0).unwrap();
        assert!((on_curve[1] - e.walkoff_deg.unwrap()).abs() < 1e-12);
        let s = separation_vs_wavelength(&sc, 0);
        assert!((s.current.unwrap()[1] - separation_mm.unwrap()).abs() < 1e-12);
        assert_eq!(s.points.len(), WAVELENGTH_POINTS);
        let g = retardance_vs_wavelength(&sc, 0);
        assert!((g.current.unwrap()[1] - retardance_waves.unwrap()).abs() < 1e-9);
        // Calcite: walk-off is largest near the 42° cut and zero at 0° and 90°.
        let peak = w
            .points
            .iter()
            .cloned()
            .fold([0.0, 0.0], |a, p| if p[1] > a[1] { p } else { a });
        assert!((peak[0] - 42.0).abs() <= 1.0, "{peak:?}");
        assert!(w.points[0][1].abs() < 1e-9 && w.points[90][1].abs() < 1e-9);
    }

    #[test]
    fn series_read_back_what_they_write() {
        let sc = Scenario::from_json_str(include_str!("../examples/demo.json")).unwrap();
        let s = separation_vs_wavelength(&sc, 0);
        assert_eq!(Series::from_json(&serde_json::to_value(&s).unwrap()).unwrap(), s);
        let bad = serde_json::json!({"points": [[1, 2], [3]]});
        assert_eq!(Series::from_json(&bad).unwrap_err().field, "series.points[1]");
    }

    /// Largest |dense − direct| over a sweep, the direct value from `uniaxial::walkoff`.
    fn worst_against_direct(ix: Indices, theta0: f64, theta1: f64, n: usize, threads: usize) -> f64 {
        let mut out = vec![0.0; n];
        walkoff_sweep_parallel(ix, theta0, theta1, &mut out, threads);
        let step = if n > 1 { (theta1 - theta0) / (n - 1) as f64 } else { 0.0 };
        out.iter()
            .enumerate()
            .map(|(i, v)| (v - crate::uniaxial::walkoff(ix, theta0 + step * i as f64)).abs())
            .fold(0.0, f64::max)
    }

    // Independent method: the direct closed form of the walk-off (Born & Wolf, Principles of
    // Optics, §15.3) evaluated point by point through `uniaxial::walkoff`, against the blocked
    // series of the dense sweep.
    #[test]
    fn the_dense_sweep_agrees_with_the_direct_formula() {
        use std::f64::consts::{FRAC_PI_2, PI};
        // Negative (calcite-like) and strongly positive uniaxial indices; dense sweeps take the
        // series path, coarse ones (|u| > the limit) the per-sample atan2 path.
        let crystals = [Indices::new(1.6557, 1.4849).unwrap(), Indices::new(2.0, 3.2).unwrap()];
        for ix in crystals {
            for (theta0, theta1, n) in [
                (0.0, FRAC_PI_2, 1_000_001),
                (-PI, PI, 100_003),
                (0.3, 0.2, 4097),
                (0.0, FRAC_PI_2, 91),
                (1.0, 1.0, 7),
            ] {
                for threads in [1, 2] {
                    let worst = worst_against_direct(ix, theta0, theta1, n, threads);
                    assert!(worst < 2e-15, "{ix:?} {theta0}..{theta1} ×{n} on {threads}: {worst:e}");
                }
            }
        }
        let mut one = [0.0];
        walkoff_sweep_into(crystals[0], 0.3, 0.3, &mut one);
        assert!((one[0] - crate::uniaxial::walkoff(crystals[0], 0.3)).abs() < 1e-15);
        walkoff_sweep_into(crystals[0], 0.3, 0.3, &mut []);
    }

    #[test]
    fn the_checksum_is_the_sum() {
        assert_eq!(checksum(&[]), 0.0);
        assert_eq!(checksum(&[1.5, 2.0, -0.25]), 3.25);
        let v: Vec<f64> = (1..=1001).map(f64::from).collect();
        assert_eq!(checksum(&v), 501_501.0);
    }

    #[test]
    fn a_stack_without_crystals_gives_empty_series() {
        let sc = Scenario::from_json_str(r#"{"elements": [{"kind": "rotator", "angle_deg": 5}]}"#).unwrap();
        assert!(walkoff_vs_tilt(&sc, 0).unwrap().points.is_empty());
        assert_eq!(separation_vs_wavelength(&sc, 0).note, "no crystal in the stack");
    }
}
