//! The transmission spectrum of the whole set-up as a plot: the result's `spectrum` (every point
//! a full trace of the scenario at that wavelength, `contract::spectrum`) against wavelength.
//!
//! Nothing is computed here: the points are the result's, so the plot and the numbers a reader
//! exports are the same. The scenario's own wavelength is marked with its traced total power
//! when it lies within the range. Without a `spectrum` in the scenario the plot is empty and its
//! note says none was asked for; points where a formula breaks down (null) are left out and
//! counted in the note. When the result holds the set-up's colour in white light
//! (`spectrum.white_light`), the plot shows it as a swatch below its left corner. The output's
//! polarization is drawn as a dashed second curve against its own right-hand axis from −1 to 1
//! (the transmission keeps the left axis and its own scale), S3/S0 from the result's
//! `spectrum.stokes` (the circular part: +1 right-handed, −1 left-handed, Born & Wolf's
//! handedness as `optics::stokes` uses it); a line below the plot says what the dashes are.

use super::plot::{RightCurve, frame, plot_with};
use super::scene::{Anchor, Item, Priority, Role, Scene};
use super::series::Series;
use crate::contract::result::TraceResult;
use crate::contract::scenario::Scenario;
use crate::numfmt::NO_POWER;

/// The transmission plot of the whole set-up, with the output's S3/S0 as a dashed second curve
/// on a right-hand axis from −1 to 1 ([`CIRCULAR_AXIS`], captioned on a line below the plot) and its white-light colour as a swatch under the plot's
/// left corner when the result has them.
pub fn transmission_plot(sc: &Scenario, result: &TraceResult) -> Scene {
    let series = transmission_vs_wavelength(sc, result);
    let s3 = circular_vs_wavelength(result);
    let mut scene = plot_with(&series, Some(&circular_axis(&s3)));
    let Some(f) = frame(&series) else {
        return scene;
    };
    let (width, height) = (f.width(), f.height());
    if !s3.is_empty() {
        scene.bounds.y0 = f.y0 - 0.4 * height;
        scene.label(
            [0.5 * (f.x0 + f.x1), f.y0 - 0.37 * height],
            String::from("dashed: S3/S0 of the output, +1 right-handed circular, −1 left"),
            10.0,
            Anchor::Middle,
            Role::Caption,
            Priority::Key,
        );
    }
    if let Some(w) = result.spectrum.as_ref().and_then(|s| s.white_light.as_ref()) {
        // Under the frame's left corner, on the line of the x-axis name (which is centred).
        scene.items.push(Item::Swatch {
            from: [f.x0, f.y0 - 0.29 * height],
            to: [f.x0 + 0.07 * width, f.y0 - 0.2 * height],
            colour: w.srgb.clone(),
            tag: "white-light colour".into(),
        });
        scene.label(
            [f.x0 + 0.09 * width, f.y0 - 0.28 * height],
            String::from("white light"),
            10.0,
            Anchor::Start,
            Role::Caption,
            Priority::Detail,
        );
    }
    scene
}

/// The right-hand axis of the transmission plot's S3/S0 curve: −1 at the bottom of the frame,
/// +1 at the top, whatever the transmission's own scale.
const CIRCULAR_AXIS: [f64; 2] = [-1.0, 1.0];

/// The S3/S0 curve `s3` ([`circular_vs_wavelength`]) as the plot draws it, on its own axis.
fn circular_axis(s3: &[[f64; 2]]) -> RightCurve<'_> {
    RightCurve {
        points: s3,
        range: CIRCULAR_AXIS,
        name: "S3/S0",
        tag: "S3/S0 curve",
    }
}

/// The circular part S3/S0 of the forward light against wavelength, from the result's
/// `spectrum.stokes` (+1 right-handed circular, −1 left-handed, 0 linear or unpolarized; the
/// wavelengths that leave no power, [`NO_POWER`], or could not be traced are left out).
pub fn circular_vs_wavelength(result: &TraceResult) -> Vec<[f64; 2]> {
    let Some(spectrum) = &result.spectrum else {
        return Vec::new();
    };
    spectrum
        .wavelength_nm
        .iter()
        .zip(&spectrum.stokes)
        .filter_map(|(&nm, s)| s.filter(|s| s[0] > NO_POWER).map(|s| [nm, s[3] / s[0]]))
        .collect()
}

/// The transmission of the whole set-up against wavelength, from `result.spectrum`.
pub fn transmission_vs_wavelength(sc: &Scenario, result: &TraceResult) -> Series {
    let unit = if sc.air_wavelength_nm.is_some() {
        "nm (air)"
    } else {
        "nm"
    };
    let mut s = Series::new(
        [
            "Transmission against wavelength",
            "wavelength",
            unit,
            "transmission",
            "of the input power",
        ],
        Vec::new(),
        None,
        "no spectrum asked for".into(),
    );
    let (Some(spectrum), Some(range)) = (&result.spectrum, &sc.spectrum) else {
        return s;
    };
    s.points = spectrum
        .wavelength_nm
        .iter()
        .zip(&spectrum.transmission)
        .filter_map(|(&nm, t)| t.map(|t| [nm, t]))
        .collect();
    let own = sc.air_wavelength_nm.unwrap_or(sc.wavelength.nm());
    let (lo, hi) = (range.from_nm.min(range.to_nm), range.from_nm.max(range.to_nm));
    s.current = (lo..=hi).contains(&own).then_some([own, result.total_power]);
    let missing = spectrum.transmission.iter().filter(|t| t.is_none()).count();
    s.note = format!(
        "the whole set-up, {} wavelengths each traced in full{}",
        range.points,
        if missing > 0 {
            format!("; {missing} could not be traced")
        } else {
            String::new()
        }
    );
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::result::trace_scenario;

    #[test]
    fn the_plot_holds_the_results_points_and_marks_the_own_wavelength() {
        let doc = r#"{"version": 2, "wavelength_nm": 600, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
            "elements": [{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 1, "axis": {"tilt_deg": 90, "azimuth_deg": 45}},
                         {"kind": "polarizer", "transmission_axis_deg": 0}],
            "spectrum": {"from_nm": 550, "to_nm": 650, "points": 11}}"#;
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace_scenario(&sc).unwrap();
        let s = transmission_vs_wavelength(&sc, &r);
        assert_eq!(s.points.len(), 11);
        let spectrum = r.spectrum.as_ref().unwrap();
        assert_eq!(
            s.points[3],
            [spectrum.wavelength_nm[3], spectrum.transmission[3].unwrap()]
        );
        // 600 nm is the sixth point: the marker sits on the curve.
        assert_eq!(s.current, Some([600.0, r.total_power]));
        // The spectrum's point by the set-up's matrix, the trace's by its one spot: the same
        // sum in another order (`optics::coincident`).
        assert!((s.points[5][1] - r.total_power).abs() <= 2e-15);
        // Without a spectrum: no points, and the note says how to ask for one.
        let plain = Scenario { spectrum: None, ..sc };
        let s = transmission_vs_wavelength(&plain, &trace_scenario(&plain).unwrap());
        assert!(s.points.is_empty() && s.note == "no spectrum asked for");
    }

    #[test]
    fn the_output_s_circular_part_is_a_dashed_curve_of_the_result_s_stokes() {
        // A quartz plate at 45° alone: the output runs through both handednesses over the range.
        let doc = r#"{"version": 2, "wavelength_nm": 600, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
            "elements": [{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 0.5, "axis": {"tilt_deg": 90, "azimuth_deg": 45}}],
            "spectrum": {"from_nm": 550, "to_nm": 650, "points": 41}}"#;
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace_scenario(&sc).unwrap();
        let s3 = circular_vs_wavelength(&r);
        let stokes = &r.spectrum.as_ref().unwrap().stokes;
        assert_eq!(s3.len(), 41);
        for (p, s) in s3.iter().zip(stokes) {
            let s = s.unwrap();
            assert_eq!(p[1], s[3] / s[0]);
        }
        assert!(s3.iter().any(|p| p[1] > 0.9) && s3.iter().any(|p| p[1] < -0.9));
        let scene = transmission_plot(&sc, &r);
        let Some(Item::Polyline { points, dash, .. }) = scene.tagged("S3/S0 curve").next() else {
            panic!("no S3/S0 curve");
        };
        // On its own axis: −1 at the frame's bottom, +1 at its top, read back through the frame
        // the transmission alone sets (0 to its largest value).
        let f = frame(&transmission_vs_wavelength(&sc, &r)).unwrap();
        assert_eq!(f.y0, 0.0);
        assert_eq!(points.len(), s3.len());
        for (p, want) in points.iter().zip(&s3) {
            let back = -1.0 + 2.0 * (p[1] - f.y0) / f.height();
            assert_eq!(p[0], want[0]);
            assert!(
                (back - want[1]).abs() <= 1e-12,
                "S3/S0 at {} nm: drawn {back}, result {}",
                p[0],
                want[1]
            );
        }
        assert!(!dash.is_empty(), "dashed");
        // The right axis: ticks at −1, −0.5, 0, 0.5 and 1, and its name.
        let texts = scene.texts();
        let ticks = [-1.0, -0.5, 0.5, 1.0].map(|t| crate::numfmt::tick(t, 0.5));
        for t in ticks.iter().map(String::as_str).chain(["S3/S0"]) {
            assert!(texts.contains(&t), "{t} in {texts:?}");
        }
        assert_eq!(scene.tagged("right tick").count(), 5);
        assert!(scene.is_finite());
        let svg = crate::view::svg::to_svg(&scene, 480.0, 300.0, &crate::view::palette::Palette::light());
        assert!(svg.contains("dashed: S3/S0"), "{svg}");
        // Without a spectrum, no second curve.
        let plain = Scenario { spectrum: None, ..sc };
        assert!(
            transmission_plot(&plain, &trace_scenario(&plain).unwrap())
                .tagged("S3/S0 curve")
                .next()
                .is_none()
        );
    }

    #[test]
    fn the_plot_shows_the_white_light_colour_of_the_result() {
        let doc = r#"{"version": 2, "wavelength_nm": 550, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
            "elements": [{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 0.06, "axis": {"tilt_deg": 90, "azimuth_deg": 45}},
                         {"kind": "polarizer", "transmission_axis_deg": 90}],
            "spectrum": {"from_nm": 400, "to_nm": 700, "points": 31}}"#;
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace_scenario(&sc).unwrap();
        let scene = transmission_plot(&sc, &r);
        let Some(Item::Swatch { colour, .. }) = scene.tagged("white-light colour").next() else {
            panic!("no swatch");
        };
        assert_eq!(
            Some(colour),
            r.spectrum
                .as_ref()
                .and_then(|s| s.white_light.as_ref())
                .map(|w| &w.srgb)
        );
        assert!(scene.is_finite());
        let svg = crate::view::svg::to_svg(&scene, 480.0, 300.0, &crate::view::palette::Palette::light());
        assert!(svg.contains(&format!(r#"fill="{colour}""#)), "{svg}");
        let plain = Scenario { spectrum: None, ..sc };
        let scene = transmission_plot(&plain, &trace_scenario(&plain).unwrap());
        assert!(scene.tagged("white-light colour").next().is_none());
    }
}
