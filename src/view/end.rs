//! The end view: the output beams as seen looking back toward the source.
//!
//! World coordinates are millimetres in the exit plane, x to the right and y up, as seen by an
//! observer downstream looking toward the source (`../shared/CONVENTIONS.md`); the caption says so.
//! Each spot (rays whose beams overlap, added as fields: `spots.rs`) is a circle of the beam
//! diameter at its centre, with a faint ring around its footprint when its rays leave from
//! visibly different points, holding its polarization ellipse: azimuth from e1 (x) toward e2 (y),
//! semi-axes in the ratio tan |χ|, and an arrowhead giving the sense of rotation — clockwise in
//! this view for right-handed light (Born & Wolf's convention: right-handed turns clockwise for
//! an observer looking toward the source). Linear light is a double-headed line; unpolarized
//! light a dashed ring. Each spot carries its power as text ("no power" below [`NO_POWER`], its
//! circle then grey and its ellipse left out), and its overlap figure when its rays do not
//! coincide (a faint ring marks the footprint of rays that leave from visibly different points);
//! the largest distance between spots is dimensioned (where it is long enough on screen), in the
//! view's one length unit, which the scale bar shares; a cross marks where the undeviated
//! incident beam would be.

use crate::contract::result::TraceResult;
use crate::numfmt::{LengthUnit, NO_POWER, length, length_auto, power, sig};
use crate::optics::spots::Spot;
use crate::optics::stokes::{Handedness, ellipse};
use crate::small_sort::sort_by_less;
use crate::view::scene::{Anchor, Aspect, Item, Point, Priority, Rect, Role, Scene, nice_step};

/// Builds the end view of a traced result for a beam of `diameter_mm`, on the screen
/// `screen_mm` after the last element's back face (0: that face).
pub fn end_view(result: &TraceResult, diameter_mm: f64, screen_mm: f64) -> Scene {
    let where_ = if screen_mm > 0.0 {
        format!(" · on the screen {} after the stack", length_auto(screen_mm, 3))
    } else {
        String::new()
    };
    let mut scene = Scene::new(
        "End view (output)",
        &format!("looking toward the source · x → right, y ↑{where_}"),
        Aspect::Equal,
    );
    let r = 0.5 * diameter_mm;
    let u = result.input.direction;
    let z = result.rays.first().map_or(0.0, |x| x.exit_z_mm) + screen_mm;
    let undeviated: Point = if u[2] > 0.0 {
        [u[0] / u[2] * z, u[1] / u[2] * z]
    } else {
        [0.0, 0.0]
    };

    let mut pts: Vec<Point> = vec![undeviated];
    for spot in &result.spots {
        let (c, e) = (spot.position_mm, r + spot.spread_mm);
        pts.push([c[0] - e, c[1] - e]);
        pts.push([c[0] + e, c[1] + e]);
    }
    let bounds = Rect::around(pts).at_least(4.0 * r, 3.0 * r);

    undeviated_cross(&mut scene, undeviated, 0.25 * r);
    for spot in &result.spots {
        draw_spot(&mut scene, result, spot, r);
    }
    let best = farthest_spots(result);
    let bar = nice_step(bounds.width() / 4.0);
    let unit = LengthUnit::for_values(&[best.0, bar]);
    if best.0 > 0.0 {
        separation(&mut scene, result, best, 1.5 * r, unit);
    }

    // Scale bar under the spots.
    let y = bounds.y0 - 0.6 * r;
    scene.line(
        vec![[bounds.x0, y], [bounds.x0 + bar, y]],
        Role::ScaleBar,
        vec![],
        3.0,
        "scale",
    );
    // The scale is read before any name: placed first.
    scene.label(
        [bounds.x0 + 0.5 * bar, y],
        length(bar, unit, 3),
        11.0,
        Anchor::Middle,
        Role::ScaleBar,
        Priority::Key,
    );
    scene.bounds = Rect {
        x0: bounds.x0,
        y0: y,
        x1: bounds.x1,
        y1: bounds.y1 + 1.8 * r,
    }
    .padded(0.08, 0.08);
    scene
}

/// Draws a cross of half-width `k` where the undeviated beam would be.
fn undeviated_cross(scene: &mut Scene, undeviated: Point, k: f64) {
    scene.line(
        vec![[undeviated[0] - k, undeviated[1]], [undeviated[0] + k, undeviated[1]]],
        Role::Grid,
        vec![],
        1.0,
        "undeviated",
    );
    scene.line(
        vec![[undeviated[0], undeviated[1] - k], [undeviated[0], undeviated[1] + k]],
        Role::Grid,
        vec![],
        1.0,
        "undeviated",
    );
}

/// Draws one spot for beams of radius `r`: its circle, its footprint ring, its rays' exit dots,
/// its polarization and its power.
fn draw_spot(scene: &mut Scene, result: &TraceResult, spot: &Spot, r: f64) {
    let c = spot.position_mm;
    let name = spot.name();
    let dim = spot.power < NO_POWER;
    let role = if dim { Role::Grid } else { Role::Spot };
    let tag = format!("spot {name}");
    scene.items.push(Item::Circle {
        center: c,
        radius: r,
        role,
        filled: false,
        tag: tag.clone(),
    });
    // Rays that leave from visibly different points: the spot's footprint, a faint ring
    // around the farthest of their beams.
    if spot.spread_mm > VISIBLE_FRACTION_OF_RADIUS * r {
        scene.items.push(Item::Circle {
            center: c,
            radius: r + spot.spread_mm,
            role: Role::Grid,
            filled: false,
            tag: format!("footprint {name}"),
        });
    }
    for &i in &spot.ray_index {
        if let Some(ray) = result.rays.get(i) {
            scene.items.push(Item::Dot {
                center: ray.screen_position_mm,
                radius_px: 2.0,
                role: Role::Label,
                filled: true,
                tag: format!("exit {}", ray.label),
            });
        }
    }
    if !dim {
        polarization_glyph(scene, c, 0.8 * r, &spot.stokes, &format!("ellipse {name}"));
    }
    let mut text = if dim {
        format!("{name}: no power")
    } else {
        format!("{name}: P {}", power(spot.power, 4))
    };
    if spot.spread_mm > 0.0 && !dim {
        text.push_str(&format!(" · overlap {}", sig(spot.overlap, 5)));
    }
    scene.text(
        [c[0], c[1] - 1.25 * r - spot.spread_mm],
        text,
        12.0,
        Anchor::Middle,
        Role::Label,
    );
}

/// The two spots farthest apart (they lie on the convex hull): (distance, lower index, higher
/// index); distance 0 for fewer than two spots.
fn farthest_spots(result: &TraceResult) -> (f64, usize, usize) {
    let hull = convex_hull(&result.spots.iter().map(|s| s.position_mm).collect::<Vec<_>>());
    let mut best = (0.0, 0, 0);
    for (x, &i) in hull.iter().enumerate() {
        for &j in &hull[x + 1..] {
            let (a, b) = (result.spots[i].position_mm, result.spots[j].position_mm);
            let d = (a[0] - b[0]).hypot(a[1] - b[1]);
            if d > best.0 {
                best = (d, i.min(j), i.max(j));
            }
        }
    }
    best
}

/// Dimensions the distance between the spots `best` (from [`farthest_spots`]), its line `off`
/// above them, perpendicular to the line joining them.
fn separation(scene: &mut Scene, result: &TraceResult, best: (f64, usize, usize), off: f64, unit: LengthUnit) {
    let (a, b) = (result.spots[best.1].position_mm, result.spots[best.2].position_mm);
    let (dx, dy) = ((b[0] - a[0]) / best.0, (b[1] - a[1]) / best.0);
    let (mut nx, mut ny) = (-dy, dx);
    if ny < 0.0 || (ny == 0.0 && nx < 0.0) {
        nx = -nx;
        ny = -ny;
    }
    scene.dimension(
        [a[0] + nx * off, a[1] + ny * off],
        [b[0] + nx * off, b[1] + ny * off],
        length(best.0, unit, 3),
        "separation",
    );
}

/// Offsets below this fraction of the beam radius are not visible in the end view: a spot whose
/// rays lie closer together than that gets no footprint ring.
const VISIBLE_FRACTION_OF_RADIUS: f64 = 0.01;

/// Indices of the points on the convex hull of `pts` (A. M. Andrew's monotone chain, Inf. Proc.
/// Lett. 9, 216 (1979)); every point when there are three or fewer.
pub fn convex_hull(pts: &[Point]) -> Vec<usize> {
    let mut idx: Vec<usize> = (0..pts.len()).collect();
    if idx.len() <= 3 {
        return idx;
    }
    sort_by_less(&mut idx, |&a, &b| {
        pts[a][0]
            .total_cmp(&pts[b][0])
            .then(pts[a][1].total_cmp(&pts[b][1]))
            .then(a.cmp(&b))
            .is_lt()
    });
    let cross = |o: usize, a: usize, b: usize| {
        (pts[a][0] - pts[o][0]) * (pts[b][1] - pts[o][1]) - (pts[a][1] - pts[o][1]) * (pts[b][0] - pts[o][0])
    };
    let mut hull: Vec<usize> = Vec::new();
    for pass in 0..2 {
        let start = hull.len();
        let order: Vec<usize> = if pass == 0 {
            idx.clone()
        } else {
            idx.iter().rev().copied().collect()
        };
        for &p in &order {
            while hull.len() >= start + 2 && cross(hull[hull.len() - 2], hull[hull.len() - 1], p) <= 0.0 {
                hull.pop();
            }
            hull.push(p);
        }
        hull.pop();
    }
    hull
}

/// Draws the polarization ellipse of Stokes vector `s` at `c`, its major semi-axis `a` long.
pub fn polarization_glyph(scene: &mut Scene, c: Point, a: f64, s: &[f64; 4], tag: &str) {
    let e = ellipse(s);
    let psi = e.azimuth_deg.to_radians();
    let chi = e.ellipticity_deg.to_radians();
    let (cp, sp) = (psi.cos(), psi.sin());
    let at = |t: f64, b: f64| -> Point {
        let (x, y) = (a * t.cos(), b * t.sin());
        [c[0] + x * cp - y * sp, c[1] + x * sp + y * cp]
    };
    match e.handedness {
        Handedness::Unpolarized => {
            let ring: Vec<Point> = (0..=48)
                .map(|i| at(i as f64 / 48.0 * std::f64::consts::TAU, a))
                .collect();
            scene.line(ring, Role::Ellipse, vec![3.0, 3.0], 1.5, tag);
            scene.label(c, "unpolarized", 10.0, Anchor::Middle, Role::Caption, Priority::Detail);
        }
        Handedness::Linear => {
            let (p, q) = (at(0.0, 0.0), at(std::f64::consts::PI, 0.0));
            scene.items.push(Item::Arrow {
                from: c,
                to: p,
                role: Role::Ellipse,
                head_px: 7.0,
                tag: tag.to_string(),
            });
            scene.items.push(Item::Arrow {
                from: c,
                to: q,
                role: Role::Ellipse,
                head_px: 7.0,
                tag: tag.to_string(),
            });
        }
        Handedness::Right | Handedness::Left => {
            let b = a * chi.tan().abs();
            let pts: Vec<Point> = (0..=64)
                .map(|i| at(i as f64 / 64.0 * std::f64::consts::TAU, b))
                .collect();
            scene.line(pts, Role::Ellipse, vec![], 1.8, tag);
            // Parameter t runs counter-clockwise on screen; right-handed light turns clockwise in
            // this view, so its arrow points toward decreasing t.
            let sign = if e.handedness == Handedness::Right { -1.0 } else { 1.0 };
            let t0 = 0.5 * std::f64::consts::PI;
            scene.items.push(Item::Arrow {
                from: at(t0 - sign * 0.35, b),
                to: at(t0, b),
                role: Role::Ellipse,
                head_px: 8.0,
                tag: format!(
                    "{tag} sense {}",
                    if sign < 0.0 { "clockwise" } else { "counter-clockwise" }
                ),
            });
            let hand = if e.handedness == Handedness::Right { "R" } else { "L" };
            scene.label(
                [c[0] + 1.05 * a, c[1] + 0.6 * a],
                hand,
                11.0,
                Anchor::Start,
                Role::Ellipse,
                Priority::Detail,
            );
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::result::trace_scenario as trace;
    use crate::contract::scenario::Scenario;

    fn build(doc: &str) -> (TraceResult, Scene) {
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace(&sc).unwrap();
        let scene = end_view(&r, sc.beam.diameter_mm, sc.screen_mm);
        (r, scene)
    }

    #[test]
    fn spots_sit_at_the_traced_exit_points_with_the_beam_diameter() {
        let (r, scene) = build(include_str!("../../examples/demo.json"));
        assert!(scene.is_finite());
        assert!(scene.caption.contains("looking toward the source"));
        for spot in &r.spots {
            let tag = format!("spot {}", spot.rays.join("+"));
            let Some(Item::Circle { center, radius, .. }) = scene.tagged(&tag).next() else {
                panic!()
            };
            assert_eq!(*center, spot.position_mm);
            assert_eq!(*radius, 0.4, "demo beam diameter 0.8 mm");
        }
        let Some(Item::Dimension { from, to, .. }) = scene.tagged("separation").next() else {
            panic!()
        };
        let span = (to[0] - from[0]).hypot(to[1] - from[1]);
        assert!((span - 1.3554544373106694).abs() < 1e-12, "{span}");
        assert!(scene.texts().iter().any(|t| t.contains("P 0.5")));
    }

    #[test]
    fn a_spread_spot_shows_its_footprint_and_overlap() {
        // Two calcite displacers, the second 0.4 mm longer: "oe" and "eo" leave about 40 µm
        // apart in a 0.2 mm beam, one spot whose footprint ring reaches past the beam circle by
        // its spread, labelled with its overlap.
        let (r, scene) = build(
            r#"{"beam": {"diameter_mm": 0.2, "polarization": {"kind": "linear", "azimuth_deg": 45}}, "elements": [
                {"kind": "crystal", "material": "calcite", "thickness_mm": 2, "axis": {"tilt_deg": 45, "azimuth_deg": 0}},
                {"kind": "retarder", "retardance_waves": 0.5, "fast_axis_deg": 45},
                {"kind": "crystal", "material": "calcite", "thickness_mm": 2.4, "axis": {"tilt_deg": 45, "azimuth_deg": 0}}]}"#,
        );
        let spot = r
            .spots
            .iter()
            .find(|s| s.rays.len() == 2)
            .expect("oe and eo in one spot");
        assert!(spot.spread_mm > 0.01 && spot.overlap < 1.0, "{spot:?}");
        let Some(Item::Circle { center, radius, .. }) = scene.tagged("footprint oe+eo").next() else {
            panic!("no footprint ring")
        };
        assert_eq!(*center, spot.position_mm);
        assert!((radius - (0.1 + spot.spread_mm)).abs() < 1e-12, "{radius}");
        let label = format!("overlap {}", sig(spot.overlap, 5));
        assert!(scene.texts().iter().any(|t| t.contains(&label)), "{:?}", scene.texts());
        // A spot whose rays coincide has neither.
        let (_, demo) = build(include_str!("../../examples/demo.json"));
        assert!(demo.texts().iter().all(|t| !t.contains("overlap")));
    }

    #[test]
    fn the_hull_holds_the_farthest_pair() {
        // Cross-method: the farthest pair over the hull equals the brute-force farthest pair.
        let mut rng = crate::random::Rng::new(11);
        for n in [1usize, 2, 3, 5, 40, 300] {
            let pts: Vec<Point> = (0..n).map(|_| [rng.normal(), 0.3 * rng.normal()]).collect();
            let far = |idx: &[usize]| {
                let mut best = 0.0f64;
                for (x, &i) in idx.iter().enumerate() {
                    for &j in &idx[x + 1..] {
                        best = best.max((pts[i][0] - pts[j][0]).hypot(pts[i][1] - pts[j][1]));
                    }
                }
                best
            };
            let all: Vec<usize> = (0..n).collect();
            assert_eq!(far(&convex_hull(&pts)), far(&all), "{n} points");
        }
        // Collinear and repeated points.
        let line: Vec<Point> = (0..10)
            .map(|i| [i as f64, 2.0 * i as f64])
            .chain([[0.0, 0.0]])
            .collect();
        let h = convex_hull(&line);
        assert!(h.contains(&9) && (h.contains(&0) || h.contains(&10)), "{h:?}");
    }

    #[test]
    fn right_handed_light_turns_clockwise_in_this_view() {
        // Common practice (Born & Wolf convention): right-handed light, S3 > 0, turns clockwise
        // for an observer looking toward the source.
        let (_, scene) = build(
            r#"{"beam": {"polarization": {"kind": "circular", "handedness": "right"}}, "elements": [{"kind": "rotator", "angle_deg": 0}]}"#,
        );
        assert!(
            scene.tagged("ellipse out sense clockwise").next().is_some(),
            "{:?}",
            scene.items
        );
        let Some(Item::Arrow { from, to, .. }) = scene.tagged("ellipse out sense clockwise").next() else {
            panic!()
        };
        // At the top of the circle (t = 90°) clockwise motion runs toward +x.
        assert!(to[0] > from[0], "{from:?} → {to:?}");
    }
}
