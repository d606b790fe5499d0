//! The polarization panel: input and output states on a Poincaré sphere drawn in 2-D.
//!
//! A normalized Stokes vector (S1, S2, S3)/S0 is a point in the unit ball: on the sphere when
//! fully polarized, inside at radius p (the degree of polarization) otherwise. The sphere is drawn
//! in orthographic projection seen from azimuth 35° and elevation 22° (S3 up), so that S1 points
//! to the lower left, S2 to the lower right; the equator (linear states) and the S1–S3 and S2–S3
//! great circles are drawn, solid on the near side and dotted on the far side, and so are the
//! points. Below the sphere the numbers S1, S2, S3 and p are written for the input and every
//! output spot (three decimals, from [`crate::numfmt`]); a spot that carries no power
//! ([`NO_POWER`]) has no state to plot and is listed as such. Conventions: S3 > 0 is right-handed
//! (north pole = right circular).

use crate::contract::result::TraceResult;
use crate::numfmt::{NO_POWER, fixed};
use crate::view::scene::{Anchor, Aspect, Item, Point, Priority, Rect, Role, Scene};
use std::f64::consts::TAU;

const AZ: f64 = 35.0;
const EL: f64 = 22.0;

/// Orthographic projection of a point of the Stokes space: (screen x, screen y, depth toward the
/// viewer).
pub fn project(s: [f64; 3]) -> (f64, f64, f64) {
    let (a, e) = (AZ.to_radians(), EL.to_radians());
    // Viewer direction v = (cos e cos a, cos e sin a, sin e); screen right r = (−sin a, cos a, 0);
    // screen up = v × r.
    let v = [e.cos() * a.cos(), e.cos() * a.sin(), e.sin()];
    let r = [-a.sin(), a.cos(), 0.0];
    let up = [
        v[1] * r[2] - v[2] * r[1],
        v[2] * r[0] - v[0] * r[2],
        v[0] * r[1] - v[1] * r[0],
    ];
    let dot = |p: [f64; 3], q: [f64; 3]| p[0] * q[0] + p[1] * q[1] + p[2] * q[2];
    (dot(s, r), dot(s, up), dot(s, v))
}

fn circle(scene: &mut Scene, f: impl Fn(f64) -> [f64; 3], tag: &str) {
    // Split into near (solid) and far (dotted) runs.
    let n = 96;
    let mut run: Vec<Point> = Vec::new();
    let mut near = None;
    for i in 0..=n {
        let (x, y, d) = project(f(i as f64 / n as f64 * TAU));
        let now = d >= 0.0;
        if near.is_some() && near != Some(now) {
            run.push([x, y]);
            let dash = if near == Some(true) { vec![] } else { vec![2.0, 3.0] };
            scene.line(std::mem::take(&mut run), Role::Grid, dash, 1.0, tag);
        }
        near = Some(now);
        run.push([x, y]);
    }
    let dash = if near == Some(true) { vec![] } else { vec![2.0, 3.0] };
    scene.line(run, Role::Grid, dash, 1.0, tag);
}

fn normalized(s: &[f64; 4]) -> Option<[f64; 3]> {
    (s[0] > 0.0).then(|| [s[1] / s[0], s[2] / s[0], s[3] / s[0]])
}

fn numbers(s: &[f64; 4]) -> String {
    let p = normalized(s).unwrap_or([0.0; 3]);
    let dop = (p[0] * p[0] + p[1] * p[1] + p[2] * p[2]).sqrt();
    format!("S1 {}  S2 {}  S3 {}  p {}", fmt(p[0]), fmt(p[1]), fmt(p[2]), fmt(dop))
}

fn fmt(v: f64) -> String {
    fixed(v, 3, 5e-4)
}

/// Builds the polarization panel of a traced result.
pub fn poincare_view(result: &TraceResult) -> Scene {
    let mut scene = Scene::new(
        "Polarization (Poincaré sphere)",
        "north pole S3 = +1: right circular · normalized Stokes",
        Aspect::Equal,
    );
    // Outline.
    let outline: Vec<Point> = (0..=96)
        .map(|i| {
            let t = i as f64 / 96.0 * TAU;
            [t.cos(), t.sin()]
        })
        .collect();
    scene.line(outline, Role::Frame, vec![], 1.5, "sphere");
    circle(&mut scene, |t| [t.cos(), t.sin(), 0.0], "equator");
    circle(&mut scene, |t| [t.cos(), 0.0, t.sin()], "S1-S3 circle");
    circle(&mut scene, |t| [0.0, t.cos(), t.sin()], "S2-S3 circle");
    for (axis, name) in [
        ([1.2, 0.0, 0.0], "S1"),
        ([0.0, 1.2, 0.0], "S2"),
        ([0.0, 0.0, 1.2], "S3"),
    ] {
        let (x, y, _) = project(axis);
        scene.items.push(Item::Arrow {
            from: [0.0, 0.0],
            to: [x, y],
            role: Role::Frame,
            head_px: 6.0,
            tag: format!("axis {name}"),
        });
        scene.label(
            [x * 1.08, y * 1.08],
            name,
            12.0,
            Anchor::Middle,
            Role::Label,
            Priority::Normal,
        );
    }

    let mut lines: Vec<(String, Role)> = Vec::new();
    if let Some(p) = normalized(&result.input.stokes) {
        let (x, y, d) = project(p);
        scene.items.push(Item::Dot {
            center: [x, y],
            radius_px: 6.0,
            role: Role::InputState,
            filled: d >= 0.0,
            tag: "state input".into(),
        });
        scene.text([x + 0.06, y + 0.06], "in", 11.0, Anchor::Start, Role::InputState);
        lines.push((format!("in: {}", numbers(&result.input.stokes)), Role::InputState));
    }
    for spot in &result.spots {
        let name = if spot.rays.is_empty() {
            "out".to_string()
        } else {
            spot.rays.join("+")
        };
        let p = normalized(&spot.stokes).filter(|_| spot.power >= NO_POWER);
        if let Some(p) = p {
            let (x, y, d) = project(p);
            scene.items.push(Item::Dot {
                center: [x, y],
                radius_px: 4.5,
                role: Role::Marker,
                filled: d >= 0.0,
                tag: format!("state {name}"),
            });
            scene.text([x + 0.05, y - 0.09], name.clone(), 11.0, Anchor::Start, Role::Marker);
            lines.push((format!("{name}: {}", numbers(&spot.stokes)), Role::Label));
        } else {
            lines.push((format!("{name}: no power"), Role::Caption));
        }
    }
    let mut y = -1.35;
    for (text, role) in lines.iter().take(12) {
        scene.label([-1.25, y], text.clone(), 11.0, Anchor::Start, *role, Priority::Detail);
        y -= 0.16;
    }
    if lines.len() > 12 {
        scene.label(
            [-1.25, y],
            format!("… and {} more spots", lines.len() - 12),
            11.0,
            Anchor::Start,
            Role::Caption,
            Priority::Detail,
        );
        y -= 0.16;
    }
    scene.bounds = Rect {
        x0: -1.35,
        y0: y,
        x1: 1.35,
        y1: 1.3,
    };
    scene
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::result::trace_scenario as trace;
    use crate::contract::scenario::Scenario;

    #[test]
    fn states_sit_where_their_stokes_vectors_project() {
        let sc = Scenario::from_json_str(include_str!("../../examples/demo.json")).unwrap();
        let r = trace(&sc).unwrap();
        let scene = poincare_view(&r);
        assert!(scene.is_finite());
        // Input: linear at 45°, S = (0, 1, 0).
        let Some(Item::Dot { center, .. }) = scene.tagged("state input").next() else {
            panic!()
        };
        let (x, y, _) = project([0.0, 1.0, 0.0]);
        assert!((center[0] - x).abs() < 1e-12 && (center[1] - y).abs() < 1e-12);
        // The e-ray leaves polarized along x (S1 = +1), the o-ray along y (S1 = −1).
        let Some(Item::Dot { center, .. }) = scene.tagged("state e").next() else {
            panic!()
        };
        let (x, y, _) = project([1.0, 0.0, 0.0]);
        assert!((center[0] - x).abs() < 1e-12 && (center[1] - y).abs() < 1e-12);
        assert!(
            scene
                .texts()
                .iter()
                .any(|t| t.starts_with("in: S1 0.000  S2 1.000  S3 0.000  p 1.000")),
            "{:?}",
            scene.texts()
        );
    }

    #[test]
    fn the_north_pole_is_up() {
        let (x, y, _) = project([0.0, 0.0, 1.0]);
        assert!(x.abs() < 1e-12 && y > 0.9);
    }
}
