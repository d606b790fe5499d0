//! The set-up in convergent light, as a picture: `conoscope` (the conoscopic figure: the whole
//! set-up's transmission over a 30° cone, isogyres and isochromes) and `acceptance` (the first
//! crystal's retardance error against direction), both from
//! [`crate::contract::conoscope::conoscope_of`].
//!
//! Drawing: the image plane of the conoscope, r ∝ sin θ (the sine condition), in a unit disc (+x
//! to the right, +y up, as the end view sees the beam arriving toward the viewer); the map is a
//! grey raster of [`PIXELS`] per side, black 0 and white 1 for transmission, black the smallest
//! and white the largest value for a retardance error, each in 64 shades; outside the cone
//! nothing is drawn. Rings mark 10°, 20°, … of polar angle in the outside medium; lines mark the
//! input polarization (P, when linear) and the last polarizer's axis (A). A stack this view cannot
//! solve (faces at an angle, a general crystal) gets an empty disc with a note that says why.
//!
//! The picture is drawn from a map computed elsewhere as well ([`map_view`]): the page computes
//! its maps (256 per side) in a background worker and draws them in its own module; built for
//! WebAssembly, [`conoscope_view`] computes nothing and draws the figure without a map, with a
//! note that it is being computed.

use super::scene::{Anchor, Aspect, Item, Priority, Raster, Rect, Role, Scene};
use crate::contract::conoscope::ConoscopeMap;
use crate::contract::scenario::{ElementKind, Polarization, Scenario};
use crate::error::Error;
use crate::numfmt::sig;
use crate::optics::conoscope::Quantity;

/// Largest polar angle of the drawn cone in the outside medium, degrees.
pub const CONE_DEG: f64 = 30.0;
/// Pixels per side of the map computed here (the command line's; the page's worker computes its
/// own at the size the page asks for).
#[cfg_attr(target_arch = "wasm32", expect(dead_code))]
pub const PIXELS: usize = 128;
/// Where ring labels sit, as a unit direction: 65° from +x, off the usual polarizer directions
/// (0°, 45°, 90°) whose lines would hide them.
const LABEL_DIR: [f64; 2] = [0.422_618_261_740_699_4, 0.906_307_787_036_649_9];
/// Shades of grey in the drawing.
const SHADES: f64 = 63.0;

/// The conoscopic figure of `sc`: its transmission over the cone.
pub fn conoscope_view(sc: &Scenario) -> Scene {
    let quantity = Quantity::Transmission;
    map_view(sc, quantity, computed(sc, quantity).as_ref())
}

/// The acceptance map of `sc`'s first crystal: its retardance error against direction.
pub fn acceptance_view(sc: &Scenario) -> Scene {
    let quantity = Quantity::RetardanceError;
    map_view(sc, quantity, computed(sc, quantity).as_ref())
}

/// The map of `quantity` at [`PIXELS`] per side, computed here.
#[cfg(not(target_arch = "wasm32"))]
fn computed(sc: &Scenario, quantity: Quantity) -> Option<Result<ConoscopeMap, Error>> {
    Some(crate::contract::conoscope::conoscope_of(sc, quantity, CONE_DEG, PIXELS))
}

/// The page leaves the computation to its worker ([`map_view`] draws what it computed).
#[cfg(target_arch = "wasm32")]
fn computed(_: &Scenario, _: Quantity) -> Option<Result<ConoscopeMap, Error>> {
    None
}

/// The view of `quantity` for `sc` drawn from `map` (computed over [`CONE_DEG`] by
/// [`crate::contract::conoscope::conoscope_of`]): its error as a note, and `None` (not computed
/// yet) as a note that it is being computed.
pub fn map_view(sc: &Scenario, quantity: Quantity, map: Option<&Result<ConoscopeMap, Error>>) -> Scene {
    let (title, what) = match quantity {
        Quantity::Transmission => ("Conoscopic figure", "transmission"),
        Quantity::RetardanceError => ("Acceptance of the first crystal", "retardance error"),
    };
    let mut scene = Scene::new(
        title,
        &format!("{what} over a {CONE_DEG}° cone, r ∝ sin θ"),
        Aspect::Equal,
    );
    scene.bounds = Rect {
        x0: -1.25,
        y0: -1.4,
        x1: 1.25,
        y1: 1.15,
    };
    let note = match map {
        Some(Ok(map)) => {
            scene.items.push(raster(map));
            shade_note(map)
        }
        Some(Err(e)) => format!("not drawn: {} ({})", e.message, e.field),
        None => "computing every direction in the background…".to_string(),
    };
    rings(&mut scene, sc.outside_index);
    polarizer_lines(&mut scene, sc);
    scene.label([0.0, -1.3], note, 11.0, Anchor::Middle, Role::Caption, Priority::Normal);
    scene
}

/// The map as a grey raster over the unit disc's square.
fn raster(map: &ConoscopeMap) -> Item {
    let (lo, span) = match map.quantity {
        Quantity::Transmission => (0.0, 1.0),
        Quantity::RetardanceError => (map.min, map.max - map.min),
    };
    let shade = |v: f64| {
        let f = if span > 0.0 {
            ((v - lo) / span).clamp(0.0, 1.0)
        } else {
            0.5
        };
        ((f * SHADES).round() * 255.0 / SHADES).round() as u8
    };
    Item::Raster(Raster {
        from: [-1.0, -1.0],
        to: [1.0, 1.0],
        columns: map.pixels,
        rows: map.pixels,
        grey: map.values.iter().map(|v| v.map(shade)).collect(),
        tag: "map".into(),
    })
}

/// What black and white mean.
fn shade_note(map: &ConoscopeMap) -> String {
    match map.quantity {
        Quantity::Transmission => format!(
            "black 0, white 1 (largest {}); {} × {} directions",
            sig(map.max, 3),
            map.pixels,
            map.pixels
        ),
        Quantity::RetardanceError => format!("black {} waves, white {} waves", sig(map.min, 3), sig(map.max, 3)),
    }
}

/// The cone's edge and rings every 10° of polar angle, labelled.
fn rings(scene: &mut Scene, outside_index: f64) {
    let edge = CONE_DEG.to_radians().sin();
    let mut deg = 10.0;
    while deg <= CONE_DEG + 1e-9 {
        let r = deg.to_radians().sin() / edge;
        let last = deg >= CONE_DEG - 1e-9;
        scene.items.push(Item::Circle {
            center: [0.0, 0.0],
            radius: r,
            role: if last { Role::Frame } else { Role::Grid },
            filled: false,
            tag: format!("ring {deg}°"),
        });
        let at = [r * LABEL_DIR[0], r * LABEL_DIR[1]];
        scene.label(
            at,
            format!("{deg}°"),
            10.0,
            Anchor::Start,
            Role::Caption,
            Priority::Detail,
        );
        deg += 10.0;
    }
    if outside_index != 1.0 {
        scene.label(
            [1.2, 1.05],
            format!("angles in n = {}", sig(outside_index, 4)),
            10.0,
            Anchor::End,
            Role::Caption,
            Priority::Detail,
        );
    }
}

/// Lines through the centre along the input polarization (P) and the last polarizer (A).
fn polarizer_lines(scene: &mut Scene, sc: &Scenario) {
    let input = match sc.beam.polarization {
        Polarization::Linear { azimuth_deg } => Some(azimuth_deg),
        _ => None,
    };
    let analyser = sc.elements.iter().rev().find_map(|e| match e.kind {
        ElementKind::Polarizer { transmission_axis_deg } => Some(transmission_axis_deg),
        _ => None,
    });
    for (deg, name) in [(input, "P"), (analyser, "A")] {
        let Some(deg) = deg else { continue };
        let (c, s) = (deg.to_radians().cos(), deg.to_radians().sin());
        scene.line(
            vec![[-1.08 * c, -1.08 * s], [1.08 * c, 1.08 * s]],
            Role::Element,
            vec![6.0, 4.0],
            1.0,
            format!("polarizer {name}"),
        );
        scene.label(
            [1.16 * c, 1.16 * s],
            name,
            11.0,
            Anchor::Middle,
            Role::Label,
            Priority::Normal,
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_figure_holds_the_map_rings_and_polarizers() {
        let sc = Scenario::from_json_str(
            r#"{"version": 2, "wavelength_nm": 589.3, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
                "elements": [{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 10, "axis": {"tilt_deg": 0, "azimuth_deg": 0}},
                             {"kind": "polarizer", "transmission_axis_deg": 90}]}"#,
        )
        .unwrap();
        let scene = conoscope_view(&sc);
        let Some(Item::Raster(Raster { columns, grey, .. })) = scene.tagged("map").next() else {
            panic!("no map")
        };
        assert_eq!((*columns, grey.len()), (PIXELS, PIXELS * PIXELS));
        assert!(grey[0].is_none(), "the corner is outside the cone");
        // The isogyre: the column just right of the centre is dark all the way.
        assert!(grey[PIXELS * 10 + PIXELS / 2].unwrap() < 10);
        for tag in ["ring 10°", "ring 20°", "ring 30°", "polarizer P", "polarizer A"] {
            assert!(scene.tagged(tag).next().is_some(), "{tag}");
        }
        assert!(scene.is_finite());
        let svg = crate::view::svg::to_svg(&scene, 400.0, 400.0, &crate::view::palette::Palette::light());
        assert!(svg.contains(r#"<image data-tag="map""#), "{svg}");
        let accept = acceptance_view(&sc);
        assert!(accept.texts().iter().any(|t| t.contains("waves")));
    }

    #[test]
    fn a_map_not_computed_yet_is_announced() {
        let sc = Scenario::from_json_str(
            r#"{"version": 2, "elements": [{"kind": "polarizer", "transmission_axis_deg": 90}]}"#,
        )
        .unwrap();
        let scene = map_view(&sc, Quantity::Transmission, None);
        assert!(scene.tagged("map").next().is_none());
        assert!(
            scene.texts().iter().any(|t| t.starts_with("computing")),
            "{:?}",
            scene.texts()
        );
        assert!(scene.tagged("ring 30°").next().is_some());
    }

    #[test]
    fn an_unsolvable_stack_says_why() {
        let sc = Scenario::from_json_str(
            r#"{"version": 2, "elements": [{"kind": "crystal", "material": "quartz", "thickness_mm": 5, "axis": {"tilt_deg": 90, "azimuth_deg": 0}, "faces": {"back": {"tilt_deg": 10}}, "aperture_mm": 10}]}"#,
        )
        .unwrap();
        // A wedge: faces at an angle are not solved in convergent light.
        let scene = conoscope_view(&sc);
        assert!(scene.tagged("map").next().is_none());
        assert!(
            scene.texts().iter().any(|t| t.contains("elements[0]")),
            "{:?}",
            scene.texts()
        );
    }
}
