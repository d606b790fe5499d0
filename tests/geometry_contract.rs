//! The contract's geometry rules (CONVENTIONS.md, version 2, "Geometry of an element"), checked
//! through the public reader: every rule's violation is an error naming the field, and a valid
//! two-wedge splitter survives a round trip through its document.

use doublespar::Scenario;

const PRISM: &str =
    r#"{"kind": "crystal", "material": "calcite", "thickness_mm": 5, "axis": {"tilt_deg": 90, "azimuth_deg": 90}"#;

fn doc(elements: &str) -> String {
    format!(r#"{{"version": 2, "elements": [{elements}]}}"#)
}

/// Every geometry rule of the contract is an error on the field that must change.
#[test]
fn bad_geometry_names_the_field() {
    let cases = [
        // A wedge without an aperture.
        (
            format!(r#"{PRISM}, "faces": {{"back": {{"tilt_deg": 20}}}}}}"#),
            "elements[0].aperture_mm",
        ),
        // Faces that cross inside the aperture: 5 mm thick, 40° back face, 20 mm aperture.
        (
            format!(r#"{PRISM}, "faces": {{"back": {{"tilt_deg": 40}}}}, "aperture_mm": 20}}"#),
            "elements[0].faces",
        ),
        // A face tilted past the limit.
        (
            format!(r#"{PRISM}, "faces": {{"front": {{"tilt_deg": 95}}}}}}"#),
            "elements[0].faces.front.tilt_deg",
        ),
        // Mount on an ideal element.
        (
            r#"{"kind": "rotator", "angle_deg": 5, "mount": {"tilt_deg": 3}}"#.to_string(),
            "elements[0].mount",
        ),
        // Contact on the first element.
        (format!(r#"{PRISM}, "contact": "optical"}}"#), "elements[0].contact"),
        // cement_index without cement.
        (
            format!(r#"{PRISM}}}, {PRISM}, "cement_index": 1.5}}"#),
            "elements[1].cement_index",
        ),
        // An unknown contact.
        (
            format!(r#"{PRISM}}}, {PRISM}, "contact": "glue"}}"#),
            "elements[1].contact",
        ),
        // Optical contact on faces that do not coincide (the second is tilted alone).
        (
            format!(
                r#"{PRISM}}}, {PRISM}, "contact": "optical", "faces": {{"front": {{"tilt_deg": 10}}}}, "aperture_mm": 5}}"#
            ),
            "elements[1].contact",
        ),
        // A cemented contact across a gap.
        (
            format!(r#"{PRISM}}}, {PRISM}, "contact": "cement", "gap_mm": 1}}"#),
            "elements[1].contact",
        ),
        // The second wedge's front face reaches back into the first plate.
        (
            format!(
                r#"{PRISM}, "aperture_mm": 10}}, {PRISM}, "faces": {{"front": {{"tilt_deg": 30}}}}, "aperture_mm": 10}}"#
            ),
            "elements[1].gap_mm",
        ),
    ];
    for (elements, field) in cases {
        let e = Scenario::from_json_str(&doc(&elements)).unwrap_err();
        assert_eq!(e.field, field, "{elements}: {e}");
    }
}

/// A two-wedge splitter is accepted, and written back with its geometry it reads the same.
#[test]
fn geometry_round_trips_through_the_document() {
    let wedge = |front: f64, back: f64, axis: &str| {
        format!(
            r#"{{"kind": "crystal", "material": "calcite", "thickness_mm": 4, "axis": {axis}, "aperture_mm": 8, "faces": {{"front": {{"tilt_deg": {front}}}, "back": {{"tilt_deg": {back}}}}}"#
        )
    };
    let text = doc(&format!(
        r#"{}}}, {}, "contact": "cement", "cement_index": 1.6}}"#,
        wedge(0.0, 20.0, r#"{"tilt_deg": 90, "azimuth_deg": 90}"#),
        wedge(20.0, 0.0, r#"{"tilt_deg": 90, "azimuth_deg": 0}"#)
    ));
    let sc = Scenario::from_json_str(&text).unwrap();
    let again = Scenario::from_json(&sc.to_json()).unwrap();
    assert_eq!(sc, again);
    assert_eq!(sc.to_json()["version"], 2);
    assert_eq!(sc.to_json()["elements"][1]["contact"], "cement");
}

/// A plate mounted at 12° and lit at normal incidence is, in the plate's own frame, the unmounted
/// plate lit at 12° from the opposite azimuth: the same retardance, exactly (an independent path
/// through the code: the mounted one is traced face by face, the other with one shared
/// tangential wave vector). The mounted plate's rays reach a screen at the stack's end although
/// they leave it beyond the last axis point.
#[test]
fn a_mounted_plate_equals_oblique_incidence_on_an_unmounted_one() {
    // Without optical activity, which a version-1 document does not include.
    let plate = r#""kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 0.5, "axis": {"tilt_deg": 90, "azimuth_deg": 30}"#;
    let mounted = Scenario::from_json_str(&format!(
        r#"{{"version": 2, "elements": [{{{plate}, "mount": {{"tilt_deg": 12, "azimuth_deg": 0}}}}]}}"#
    ))
    .unwrap();
    let oblique = Scenario::from_json_str(&format!(
        r#"{{"beam": {{"incidence": {{"polar_deg": 12, "azimuth_deg": 180}}}}, "elements": [{{{plate}}}]}}"#
    ))
    .unwrap();
    let retardance = |sc: &Scenario| {
        let r = doublespar::trace_scenario(sc).unwrap();
        assert!(r.rejected.is_empty(), "{:?}", r.rejected);
        assert_eq!(r.rays.len(), 2);
        match &r.elements[0] {
            doublespar::ElementReport::Crystal { retardance_rad, .. } => retardance_rad.unwrap(),
            _ => panic!("a crystal"),
        }
    };
    let (a, b) = (retardance(&mounted), retardance(&oblique));
    assert!((a - b).abs() <= 1e-12 * b.abs(), "{a} against {b}");
}
