//! SVG export, checked with an independent XML parser (roxmltree): the command line's
//! `doublespar draw` output is well-formed XML, and its key geometry — the exit points and the
//! separation dimension — equals the traced result mapped into the SVG's own pixel coordinates.

use doublespar::Scenario;
use doublespar::Viewport;
use doublespar::assert_within;
use doublespar::{ElementReport, trace_scenario as trace};
use std::process::Command;

const W: f64 = 900.0;
const H: f64 = 420.0;

fn draw(view: &str, file: &str) -> String {
    let out = Command::new(env!("CARGO_BIN_EXE_doublespar"))
        .args(["draw", view, file, "--size", "900x420"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", String::from_utf8_lossy(&out.stdout));
    String::from_utf8(out.stdout).unwrap()
}

fn points(attr: &str) -> Vec<[f64; 2]> {
    attr.split_whitespace()
        .map(|p| {
            let (x, y) = p.split_once(',').unwrap();
            [x.parse().unwrap(), y.parse().unwrap()]
        })
        .collect()
}

#[track_caller]
fn near(a: [f64; 2], b: [f64; 2], what: &str) {
    // The SVG writes coordinates with three decimals.
    for (axis, (got, want)) in ["x", "y"].into_iter().zip(a.into_iter().zip(b)) {
        assert_within(got, want, 6e-4, &format!("{what}, {axis} in the svg"));
    }
}

#[test]
fn every_view_of_every_example_is_well_formed_xml() {
    for file in [
        "examples/demo.json",
        "examples/recombiner.json",
        "examples/quarter-wave.json",
    ] {
        for view in doublespar::VIEW_NAMES {
            let svg = draw(view, file);
            let doc = roxmltree::Document::parse(&svg).unwrap_or_else(|e| panic!("{file} {view}: {e}"));
            assert_eq!(doc.root_element().tag_name().name(), "svg");
            assert!(doc.descendants().count() > 10, "{file} {view}");
        }
    }
}

#[test]
fn exit_points_and_separation_match_the_trace_in_svg_coordinates() {
    let file = "examples/demo.json";
    let sc = Scenario::from_json_str(&std::fs::read_to_string(file).unwrap()).unwrap();
    let r = trace(&sc).unwrap();
    let ElementReport::Crystal { separation_mm, .. } = r.elements[0] else {
        panic!()
    };

    // Side view: the map is the one the SVG writer uses (28 px margin).
    let scene = doublespar::build_view("side", &sc, &r).unwrap();
    let vp = Viewport::fit(&scene, W, H, 28.0);
    let svg = draw("side", file);
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let tagged = |tag: &str| {
        doc.descendants()
            .find(|n| n.attribute("data-tag") == Some(tag))
            .unwrap_or_else(|| panic!("no {tag}"))
    };
    for ray in &r.rays {
        let line = tagged(&format!("ray {}", ray.label));
        let first = points(line.attribute("points").unwrap())[0];
        near(
            first,
            vp.map([ray.exit_z_mm, ray.exit_position_mm[0]]),
            &format!("side view exit of {}", ray.label),
        );
    }
    let dim = points(tagged("dimension").attribute("points").unwrap());
    let span_px = (dim[1][1] - dim[0][1]).abs();
    assert_within(
        span_px,
        separation_mm.unwrap() * vp.sy,
        1e-3,
        "dimension in px, from the traced separation",
    );

    // End view: spot centres at the exit points, and the separation dimension.
    let scene = doublespar::build_view("end", &sc, &r).unwrap();
    let vp = Viewport::fit(&scene, W, H, 28.0);
    let svg = draw("end", file);
    let doc = roxmltree::Document::parse(&svg).unwrap();
    for spot in &r.spots {
        let tag = format!("spot {}", spot.rays.join("+"));
        let el = doc
            .descendants()
            .find(|n| n.attribute("data-tag") == Some(tag.as_str()))
            .unwrap();
        let c = [
            el.attribute("cx").unwrap().parse().unwrap(),
            el.attribute("cy").unwrap().parse().unwrap(),
        ];
        near(c, vp.map(spot.position_mm), &tag);
        let rx: f64 = el.attribute("rx").unwrap().parse().unwrap();
        assert_within(
            rx,
            0.5 * sc.beam.diameter_mm * vp.sx,
            1e-3,
            "spot radius in px, from the beam diameter",
        );
    }
    let sep = doc
        .descendants()
        .find(|n| n.attribute("data-tag") == Some("separation"))
        .unwrap();
    let p = points(sep.attribute("points").unwrap());
    let span_px = (p[1][0] - p[0][0]).hypot(p[1][1] - p[0][1]);
    assert_within(
        span_px,
        separation_mm.unwrap() * vp.sx,
        1e-3,
        "end-view separation in px, from the traced separation",
    );
}
