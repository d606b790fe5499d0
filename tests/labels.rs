//! Labels that never collide and numbers people can read, checked natively on the display lists:
//! every view of the presets, of awkward set-ups and of generated stacks of 1 to 12 crystals is
//! laid out at panel sizes from a 240 px embed to a 1600 px page; no two label boxes may overlap,
//! none may leave its panel, and no drawn number may be longer than the formatter's budget.
//! The boxes come from the width model of `label_layout` (measured DejaVu Sans widths with a
//! margin), so "no overlap" here means no overlap of the estimated boxes, which hold the text.

use doublespar::MAX_DRAWN_CHARS;
use doublespar::Scenario;
use doublespar::Scene;
use doublespar::histogram;
use doublespar::trace_scenario as trace;
use doublespar::{Layout, Placement, layout, layout_with, problems};
use doublespar::{Rng, summarize};
use doublespar::{VIEW_NAMES, build_view as build};

/// Panel sizes (CSS px): embeds stacked or side by side, page panels, a print sheet, odd shapes.
const SIZES: [(f64, f64); 10] = [
    (240.0, 144.0),
    (240.0, 240.0),
    (300.0, 600.0),
    (320.0, 200.0),
    (480.0, 256.0),
    (640.0, 360.0),
    (900.0, 420.0),
    (1200.0, 600.0),
    (1600.0, 300.0),
    (1600.0, 900.0),
];

const MARGIN: f64 = 28.0;

fn presets() -> Vec<(String, String)> {
    // Every document of examples/, the page's presets.
    let mut files: Vec<std::path::PathBuf> = std::fs::read_dir("examples")
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "json"))
        .collect();
    files.sort();
    let mut out: Vec<(String, String)> = files
        .iter()
        .map(|p| {
            (
                p.file_stem().unwrap().to_string_lossy().into_owned(),
                std::fs::read_to_string(p).unwrap(),
            )
        })
        .collect();
    // Awkward set-ups: tiny and huge lengths, a blocked beam, circular light, a beam with almost
    // no walk-off, an oblique beam through a long stack, a spectrum whose S3/S0 curve runs
    // through both handednesses on its right-hand axis.
    for (name, doc) in [
        (
            "thin film",
            r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 1e-6, "axis": {"tilt_deg": 45}}]}"#,
        ),
        (
            "huge plate",
            r#"{"beam": {"diameter_mm": 1e-3}, "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 9999, "axis": {"tilt_deg": 45}}]}"#,
        ),
        (
            "blocked",
            r#"{"beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}}, "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45}}, {"kind": "polarizer", "transmission_axis_deg": 90}]}"#,
        ),
        (
            "circular",
            r#"{"beam": {"polarization": {"kind": "circular", "handedness": "right"}}, "elements": [{"kind": "rotator", "angle_deg": 0}]}"#,
        ),
        (
            "liquid-crystal cell before a crystal",
            r#"{"version": 2, "elements": [{"kind": "lc_cell", "thickness_um": 5, "lc": "5cb", "twist_deg": 90, "voltage_v": 2.5}, {"kind": "crystal", "material": "calcite", "thickness_mm": 2, "axis": {"tilt_deg": 45}}, {"kind": "polarizer"}]}"#,
        ),
        (
            "axis almost along the beam",
            r#"{"elements": [{"kind": "crystal", "material": "quartz", "thickness_mm": 3, "axis": {"tilt_deg": 1e-9}}]}"#,
        ),
        (
            "oblique long stack",
            r#"{"beam": {"diameter_mm": 0.05, "incidence": {"polar_deg": 40, "azimuth_deg": 30}}, "elements": [{"kind": "crystal", "material": "yvo4", "thickness_mm": 30, "axis": {"tilt_deg": 45, "azimuth_deg": 10}}, {"kind": "retarder", "retardance_waves": 1234.5678, "fast_axis_deg": 22.5}, {"kind": "crystal", "material": "calcite", "thickness_mm": 0.002, "axis": {"tilt_deg": 80, "azimuth_deg": 70}}]}"#,
        ),
        (
            "spectrum with S3/S0",
            r#"{"version": 2, "wavelength_nm": 600, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}}, "elements": [{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 0.5, "axis": {"tilt_deg": 90, "azimuth_deg": 45}}], "spectrum": {"from_nm": 400, "to_nm": 800, "points": 81}}"#,
        ),
        (
            "unpolarized",
            r#"{"beam": {"polarization": {"kind": "unpolarized"}}, "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 2, "axis": {"tilt_deg": 45}}]}"#,
        ),
    ] {
        out.push((name.to_string(), doc.to_string()));
    }
    out
}

/// A stack of `n` crystals with retarders and rotators between some of them.
fn generated(n: usize, rng: &mut Rng) -> String {
    let materials = doublespar::material_keys();
    let mut elements = Vec::new();
    for i in 0..n {
        let m = materials[(rng.uniform() * materials.len() as f64) as usize % materials.len()];
        let t = 10f64.powf(-1.0 + 2.5 * rng.uniform());
        let tilt = 90.0 * rng.uniform();
        let az = 360.0 * rng.uniform() - 180.0;
        elements.push(format!(
            r#"{{"kind": "crystal", "material": "{m}", "thickness_mm": {t}, "axis": {{"tilt_deg": {tilt}, "azimuth_deg": {az}}}, "gap_mm": {}}}"#,
            rng.uniform() * 3.0
        ));
        if i % 3 == 1 {
            elements.push(format!(
                r#"{{"kind": "retarder", "retardance_waves": {}, "fast_axis_deg": {}}}"#,
                rng.uniform(),
                90.0 * rng.uniform()
            ));
        }
        if i % 4 == 2 {
            elements.push(format!(
                r#"{{"kind": "rotator", "angle_deg": {}}}"#,
                90.0 * rng.uniform()
            ));
        }
    }
    format!(
        r#"{{"wavelength_nm": {}, "beam": {{"diameter_mm": {}, "polarization": {{"kind": "linear", "azimuth_deg": {}}}}}, "elements": [{}]}}"#,
        500.0 + 500.0 * rng.uniform(),
        0.2 + rng.uniform(),
        180.0 * rng.uniform() - 90.0,
        elements.join(", ")
    )
}

/// Runs of number characters in a text (digits with their point, sign, ×10 and exponent).
fn numbers(text: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let is_num = |c: char| c.is_ascii_digit() || ".−×⁰¹²³⁴⁵⁶⁷⁸⁹⁻".contains(c);
    for c in text.chars() {
        if is_num(c) {
            cur.push(c);
        } else if !cur.is_empty() {
            out.push(std::mem::take(&mut cur));
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

/// Every problem of one scene at every size: overlaps, labels off the panel, long numbers.
fn check(what: &str, scene: &Scene) -> Vec<String> {
    let mut out = Vec::new();
    assert!(scene.is_finite(), "{what}: not finite");
    for text in scene.texts() {
        for n in numbers(text) {
            let body = n.trim_start_matches('−');
            if body.chars().count() > MAX_DRAWN_CHARS {
                out.push(format!("{what}: the number {n:?} in {text:?} is too long"));
            }
        }
    }
    for (w, h) in SIZES {
        let lay: Layout = layout(scene, w, h, MARGIN);
        for p in problems(&lay) {
            out.push(format!("{what} at {w}×{h}: {p}"));
        }
        // The title and the caption (the end view's "looking toward the source") always show.
        for t in &lay.left_out {
            let stem = t.trim_end_matches('…');
            if stem.chars().count() >= 8 && (scene.caption.contains(stem) || scene.title.starts_with(stem)) {
                out.push(format!("{what} at {w}×{h}: title or caption line {t:?} left out"));
            }
        }
    }
    out
}

fn all_views(name: &str, doc: &str) -> Vec<(String, Scene)> {
    let sc = Scenario::from_json_str(doc).unwrap_or_else(|e| panic!("{name}: {e}"));
    let r = trace(&sc).unwrap_or_else(|e| panic!("{name}: {e}"));
    VIEW_NAMES
        .iter()
        .map(|v| (format!("{name} / {v}"), build(v, &sc, &r).unwrap()))
        .collect()
}

#[test]
fn presets_and_awkward_set_ups_have_clean_labels_at_every_size() {
    let mut bad = Vec::new();
    for (name, doc) in presets() {
        for (what, scene) in all_views(&name, &doc) {
            bad.extend(check(&what, &scene));
        }
    }
    assert!(bad.is_empty(), "{} problems:\n{}", bad.len(), bad.join("\n"));
}

#[test]
fn generated_stacks_up_to_twelve_crystals_have_clean_labels() {
    let mut rng = Rng::new(10);
    let mut bad = Vec::new();
    for n in [1usize, 2, 3, 5, 8, 12] {
        let doc = generated(n, &mut rng);
        for (what, scene) in all_views(&format!("{n} crystals"), &doc) {
            bad.extend(check(&what, &scene));
        }
    }
    assert!(bad.is_empty(), "{} problems:\n{}", bad.len(), bad.join("\n"));
}

#[test]
fn histograms_have_clean_labels() {
    let mut rng = Rng::new(3);
    let mut bad = Vec::new();
    for (centre, spread, unit) in [
        (2.0, 0.01, "mm"),
        (1.0, 1e-9, "mm"),
        (0.5e-3, 2e-6, "mm"),
        (45.0, 3.0, "°"),
    ] {
        let xs: Vec<f64> = (0..4000).map(|_| centre + spread * rng.normal()).collect();
        let s = summarize(&xs, 40);
        let scene = histogram("Separation spread", "separation", unit, &s, Some(centre));
        bad.extend(check(&format!("histogram {centre} ± {spread} {unit}"), &scene));
    }
    assert!(bad.is_empty(), "{} problems:\n{}", bad.len(), bad.join("\n"));
}

#[test]
fn key_labels_survive_on_a_page_sized_panel() {
    // The separation of the demo must be read on the page and in a 480 px embed alike.
    let doc = std::fs::read_to_string("examples/demo.json").unwrap();
    for (what, scene) in all_views("demo", &doc) {
        for (w, h) in [(480.0, 256.0), (900.0, 420.0), (1600.0, 900.0)] {
            let lay = layout(&scene, w, h, MARGIN);
            if what.ends_with("/ side") || what.ends_with("/ end") {
                assert!(
                    lay.labels.iter().any(|l| l.text.contains("1.36 mm")),
                    "{what} at {w}×{h}: {:?}",
                    lay.left_out
                );
            }
            assert!(lay.labels.iter().any(|l| l.bold), "{what} at {w}×{h}: the title");
        }
    }
}

#[test]
fn without_the_placement_pass_labels_collide() {
    // Planting the old drawing back (every label at its wished place, none left out) must fail
    // the same check: the 12-crystal stack and the small embed sizes crowd their labels.
    let mut rng = Rng::new(10);
    let mut found = 0;
    for n in [5usize, 12] {
        let doc = generated(n, &mut rng);
        for (_, scene) in all_views("stack", &doc) {
            for (w, h) in [(240.0, 144.0), (320.0, 200.0)] {
                if !problems(&layout_with(&scene, w, h, MARGIN, Placement::AsAnchored)).is_empty() {
                    found += 1;
                }
            }
        }
    }
    assert!(found > 0, "the unplaced labels should collide somewhere");
}

#[test]
fn rays_without_power_and_offsets_below_the_resolution_say_so() {
    // A polarizer crossed with the only ray's polarization: the ray carries no power, and the
    // views say "no power" instead of a number.
    let blocked = r#"{"beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}}, "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45}}, {"kind": "polarizer", "transmission_axis_deg": 90}]}"#;
    let views = all_views("blocked", blocked);
    let texts = |name: &str| -> Vec<String> {
        views
            .iter()
            .find(|(w, _)| w.ends_with(name))
            .map(|(_, s)| s.texts().iter().map(|t| t.to_string()).collect())
            .unwrap()
    };
    assert!(
        texts("/ side").iter().any(|t| t.ends_with("(no power)")),
        "{:?}",
        texts("/ side")
    );
    assert!(
        texts("/ end").iter().any(|t| t.ends_with("no power")),
        "{:?}",
        texts("/ end")
    );
    assert!(
        texts("/ poincare").iter().any(|t| t.ends_with("no power")),
        "{:?}",
        texts("/ poincare")
    );
    // A plate a nanometre thick splits the beam by far less than a pixel: the scene keeps the
    // dimension, but no drawing at any size shows its line or its label.
    let thin =
        r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 1e-6, "axis": {"tilt_deg": 45}}]}"#;
    for (what, scene) in all_views("thin", thin) {
        for (w, h) in SIZES {
            let lay = layout(&scene, w, h, MARGIN);
            assert!(lay.dimensions.is_empty(), "{what} at {w}×{h}: {:?}", lay.dimensions);
        }
    }
}

#[test]
fn the_number_check_catches_the_old_unbounded_formatter() {
    // The views' old formatter: fixed decimals from the magnitude, never an exponent. Planted
    // back into a label (a 12 pm separation in mm), the same check as above must fail.
    fn old_significant(v: f64, digits: usize) -> String {
        let mag = v.abs().log10().floor() as i32;
        let decimals = (digits as i32 - 1 - mag).max(0) as usize;
        format!("{v:.decimals$}")
    }
    let mut scene = Scene::new("Side view (x–z)", "", doublespar::Aspect::Equal);
    scene.dimension(
        [0.0, 0.0],
        [0.0, 1.0],
        format!("{} mm", old_significant(1.23e-11, 3)),
        "dimension",
    );
    let found = check("planted", &scene);
    assert!(found.iter().any(|p| p.contains("too long")), "{found:?}");
    // The formatter of today writes the same value within the budget.
    let mut scene = Scene::new("Side view (x–z)", "", doublespar::Aspect::Equal);
    scene.dimension(
        [0.0, 0.0],
        [0.0, 1.0],
        doublespar::length_auto(1.23e-11, 3),
        "dimension",
    );
    assert!(check("today", &scene).is_empty(), "{:?}", check("today", &scene));
}
