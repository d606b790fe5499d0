//! A plot of a [`Series`]: axes with ticks, units and labels, the curve, and the current point.
//!
//! World coordinates are the data's own units (x and y scaled independently, [`Aspect::Free`]).
//! Ticks fall on round values ([`nice_step_at_least`]); the current operating point is a marker with its
//! value written beside it. An empty series gives a framed panel with its note.

use crate::scene::{Anchor, Aspect, Item, Rect, Role, Scene, nice_step_at_least, significant};
use crate::sweep::Series;

/// Builds the plot of a series.
pub fn plot(series: &Series) -> Scene {
    let mut scene = Scene::new(&series.title, &series.note, Aspect::Free);
    let mut pts: Vec<[f64; 2]> = series.points.clone();
    if let Some(c) = series.current {
        pts.push(c);
    }
    if pts.is_empty() {
        scene.bounds = Rect {
            x0: 0.0,
            y0: 0.0,
            x1: 1.0,
            y1: 1.0,
        };
        scene.text([0.5, 0.5], series.note.clone(), 12.0, Anchor::Middle, Role::Caption);
        return scene;
    }
    let data = Rect::around(pts.iter().copied());
    let (mut y0, mut y1) = (data.y0.min(0.0), data.y1.max(0.0));
    if y1 - y0 < 1e-12 * y0.abs().max(y1.abs()).max(1e-300) || y1 == y0 {
        let c = 0.5 * (y0 + y1);
        let h = if c != 0.0 { 0.05 * c.abs() } else { 1.0 };
        y0 = c - h;
        y1 = c + h;
    }
    let (x0, x1) = if data.width() > 0.0 {
        (data.x0, data.x1)
    } else {
        (data.x0 - 1.0, data.x1 + 1.0)
    };
    let (w, h) = (x1 - x0, y1 - y0);

    // Grid, ticks and tick labels.
    // At most about five labels per axis, so that they stay apart in a narrow panel.
    let xs = nice_step_at_least(w / 5.0);
    let ys = nice_step_at_least(h / 5.0);
    let mut t = (x0 / xs).ceil() * xs;
    while t <= x1 + 1e-9 * w {
        scene.line(vec![[t, y0], [t, y1]], Role::Grid, vec![1.0, 3.0], 0.5, "grid x");
        scene.text(
            [t, y0 - 0.05 * h],
            significant_tick(t, xs),
            10.0,
            Anchor::Middle,
            Role::Caption,
        );
        t += xs;
    }
    let mut t = (y0 / ys).ceil() * ys;
    while t <= y1 + 1e-9 * h {
        scene.line(vec![[x0, t], [x1, t]], Role::Grid, vec![1.0, 3.0], 0.5, "grid y");
        scene.text(
            [x0 - 0.015 * w, t - 0.02 * h],
            significant_tick(t, ys),
            10.0,
            Anchor::End,
            Role::Caption,
        );
        t += ys;
    }
    // Frame and axis labels.
    scene.items.push(Item::Polygon {
        points: vec![[x0, y0], [x1, y0], [x1, y1], [x0, y1]],
        role: Role::Frame,
        tag: "frame".into(),
    });
    scene.text(
        [0.5 * (x0 + x1), y0 - 0.13 * h],
        format!("{} ({})", series.x_label, series.x_unit),
        11.0,
        Anchor::Middle,
        Role::Label,
    );
    scene.text(
        [x0, y1 + 0.04 * h],
        format!("{} ({})", series.y_label, series.y_unit),
        11.0,
        Anchor::Start,
        Role::Label,
    );

    // Curve, split where samples are missing (gaps wider than twice the usual spacing).
    let mut run: Vec<[f64; 2]> = Vec::new();
    let spacing = if series.points.len() > 1 {
        w / (series.points.len() - 1) as f64
    } else {
        w
    };
    for p in &series.points {
        if let Some(last) = run.last()
            && p[0] - last[0] > 2.5 * spacing
        {
            scene.line(std::mem::take(&mut run), Role::Curve, vec![], 1.8, "curve");
        }
        run.push(*p);
    }
    if !run.is_empty() {
        scene.line(run, Role::Curve, vec![], 1.8, "curve");
    }
    if let Some(c) = series.current {
        scene.items.push(Item::Dot {
            center: c,
            radius_px: 5.0,
            role: Role::Marker,
            filled: true,
            tag: "current".into(),
        });
        let right = c[0] < x0 + 0.7 * w;
        let label = format!(
            "{} {} at {} {}",
            significant(c[1], 4),
            series.y_unit,
            significant(c[0], 4),
            series.x_unit
        );
        scene.text(
            [c[0] + if right { 0.02 } else { -0.02 } * w, c[1] + 0.04 * h],
            label,
            11.0,
            if right { Anchor::Start } else { Anchor::End },
            Role::Marker,
        );
    }
    scene.bounds = Rect {
        x0: x0 - 0.1 * w,
        y0: y0 - 0.2 * h,
        x1: x1 + 0.03 * w,
        y1: y1 + 0.1 * h,
    };
    scene
}

fn significant_tick(v: f64, step: f64) -> String {
    let decimals = if step >= 1.0 {
        0
    } else {
        (-step.log10().floor()) as usize
    };
    let v = if v.abs() < 1e-12 * step { 0.0 } else { v };
    format!("{v:.decimals$}")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scenario::Scenario;
    use crate::sweep::{separation_vs_wavelength, walkoff_vs_tilt};

    #[test]
    fn the_current_point_is_marked_at_its_value() {
        let sc = Scenario::from_json_str(include_str!("../examples/demo.json")).unwrap();
        let s = walkoff_vs_tilt(&sc, 0).unwrap();
        let scene = plot(&s);
        assert!(scene.is_finite());
        let Some(Item::Dot { center, .. }) = scene.tagged("current").next() else {
            panic!()
        };
        assert_eq!(*center, s.current.unwrap());
        assert!(scene.texts().iter().any(|t| t == &"cut tilt (°)"));
        assert!(
            scene.texts().iter().any(|t| t.starts_with("6.189 ° at 45")),
            "{:?}",
            scene.texts()
        );
        let scene = plot(&separation_vs_wavelength(&sc, 0));
        assert!(scene.texts().iter().any(|t| t == &"wavelength (nm)"));
    }

    #[test]
    fn empty_and_flat_series_still_draw() {
        let sc = Scenario::from_json_str(r#"{"elements": [{"kind": "rotator", "angle_deg": 5}]}"#).unwrap();
        assert!(plot(&separation_vs_wavelength(&sc, 0)).is_finite());
        let sc = Scenario::from_json_str(
            r#"{"elements": [{"kind": "crystal", "no": 1.5, "ne": 1.6, "thickness_mm": 1, "axis": {"tilt_deg": 0}}]}"#,
        )
        .unwrap();
        let scene = plot(&separation_vs_wavelength(&sc, 0));
        assert!(scene.is_finite(), "a flat zero curve");
    }
}
