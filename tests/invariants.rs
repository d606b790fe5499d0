//! Invariants over generated scenarios: power, unitarity, physical Stokes vectors, rotation
//! covariance, reciprocity, and no panic or NaN for any input, valid or not, grazing and exactly
//! critical faces included.

mod common;
use common::near;
use doublespar::Scenario;
use doublespar::{Anisotropic, StackElement, StackMedium, orientation, report_trace, trace_stack};
use doublespar::{ElementReport, TraceResult, trace_scenario as trace};
use nalgebra::Matrix3;
use proptest::prelude::*;

/// An angle generator that favours the near-degenerate values: exactly 0, 90, 180, and a hair
/// away from them.
fn tilt() -> impl Strategy<Value = f64> {
    prop_oneof![
        3 => 0.0f64..180.0,
        1 => Just(0.0),
        1 => Just(90.0),
        1 => Just(180.0),
        1 => (-1e-6f64..1e-6).prop_map(|d| 90.0 + d),
        1 => 0.0f64..1e-6,
    ]
}

fn polar() -> impl Strategy<Value = f64> {
    prop_oneof![3 => -80.0f64..80.0, 1 => Just(0.0), 1 => 85.0f64..89.9]
}

#[derive(Debug, Clone)]
struct Plate {
    medium: String,
    thickness: f64,
    tilt: f64,
    az: f64,
    gap: f64,
}

fn plate() -> impl Strategy<Value = Plate> {
    let medium = prop_oneof![
        proptest::sample::select(doublespar::material_keys()).prop_map(|k| format!(r#""material": "{k}""#)),
        (1.3f64..2.9, -0.3f64..0.3).prop_map(|(no, d)| format!(r#""no": {no}, "ne": {}"#, (no + d).max(1.0))),
        (1.3f64..2.9, -1e-6f64..1e-6).prop_map(|(no, d)| format!(r#""no": {no}, "ne": {}"#, no + d)),
    ];
    (
        medium,
        0.001f64..50.0,
        tilt(),
        -180.0f64..180.0,
        prop_oneof![Just(0.0), 0.0f64..20.0],
    )
        .prop_map(|(medium, thickness, tilt, az, gap)| Plate {
            medium,
            thickness,
            tilt,
            az,
            gap,
        })
}

#[allow(clippy::too_many_arguments)] // a test helper mirroring the document's fields
fn scenario_doc(
    plates: &[Plate],
    wl: f64,
    n_out: f64,
    polar: f64,
    paz: f64,
    pol: &str,
    losses: &str,
    extra: &str,
) -> String {
    let els: Vec<String> = plates
        .iter()
        .map(|p| {
            format!(
                r#"{{"kind": "crystal", {}, "thickness_mm": {}, "axis": {{"tilt_deg": {}, "azimuth_deg": {}}}, "gap_mm": {}}}"#,
                p.medium, p.thickness, p.tilt, p.az, p.gap
            )
        })
        .collect();
    let mut all = els.join(", ");
    if !extra.is_empty() {
        all = format!("{all}, {extra}");
    }
    format!(
        r#"{{"wavelength_nm": {wl}, "outside_index": {n_out}, "interface_losses": "{losses}",
            "beam": {{"diameter_mm": 1, "incidence": {{"polar_deg": {polar}, "azimuth_deg": {paz}}}, "polarization": {pol}}},
            "elements": [{all}]}}"#
    )
}

fn polarization() -> impl Strategy<Value = String> {
    prop_oneof![
        (-180.0f64..180.0).prop_map(|a| format!(r#"{{"kind": "linear", "azimuth_deg": {a}}}"#)),
        (-90.0f64..90.0, -45.0f64..45.0)
            .prop_map(|(a, c)| format!(r#"{{"kind": "elliptical", "azimuth_deg": {a}, "ellipticity_deg": {c}}}"#)),
        Just(r#"{"kind": "circular", "handedness": "left"}"#.to_string()),
        Just(r#"{"kind": "unpolarized"}"#.to_string()),
        (0.0f64..1.0, -1.0f64..1.0, -1.0f64..1.0, -1.0f64..1.0).prop_map(|(p, a, b, c)| {
            let n = (a * a + b * b + c * c).sqrt().max(1e-9);
            format!(
                r#"{{"kind": "stokes", "stokes": [2, {}, {}, {}]}}"#,
                2.0 * p * a / n,
                2.0 * p * b / n,
                2.0 * p * c / n
            )
        }),
    ]
}

/// Every number in the result is finite, every Stokes vector physical, Jones agrees with Stokes.
fn check_physical(r: &TraceResult) {
    let text = serde_json::to_string(r).unwrap();
    assert!(!text.contains("null") || !text.contains("NaN"));
    for ray in &r.rays {
        let s = ray.stokes;
        assert!(s.iter().all(|x| x.is_finite()), "{s:?}");
        let pol = (s[1] * s[1] + s[2] * s[2] + s[3] * s[3]).sqrt();
        assert!(
            s[0] >= -1e-15 && pol <= s[0] * (1.0 + 1e-9) + 1e-15,
            "unphysical Stokes {s:?}"
        );
        if let Some(j) = ray.jones {
            let jv = doublespar::Jones::new(
                num_complex::Complex64::new(j[0][0], j[0][1]),
                num_complex::Complex64::new(j[1][0], j[1][1]),
            );
            let sj = doublespar::jones_stokes(&jv);
            for k in 0..4 {
                near(
                    sj[k],
                    s[k],
                    1e-12,
                    &format!("Stokes component {k} from Jones {sj:?}, against the traced {s:?}"),
                );
            }
        }
        assert!(ray.exit_position_mm.iter().all(|x| x.is_finite()));
        assert!(ray.phase_rad.is_finite());
    }
}

/// One crystal of a placed-face document (contract version 2).
#[derive(Debug, Clone)]
struct Placed {
    no: f64,
    ne: f64,
    thickness: f64,
    axis: (f64, f64),
    front: (f64, f64),
    back: (f64, f64),
    aperture: f64,
    gap: f64,
    /// `""` (air), `cement` with its index, or `optical`.
    contact: (usize, f64),
    mount: (f64, f64),
}

impl Placed {
    fn json(&self) -> String {
        let contact = match self.contact {
            (1, n) => format!(r#", "contact": "cement", "cement_index": {n:?}"#),
            (2, _) => r#", "contact": "optical""#.to_string(),
            _ => String::new(),
        };
        format!(
            r#"{{"kind": "crystal", "no": {:?}, "ne": {:?}, "thickness_mm": {:?}, "gap_mm": {:?}, "aperture_mm": {:?},
                "axis": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}}, "mount": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}},
                "faces": {{"front": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}}, "back": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}}}}{contact}}}"#,
            self.no,
            self.ne,
            self.thickness,
            self.gap,
            self.aperture,
            self.axis.0,
            self.axis.1,
            self.mount.0,
            self.mount.1,
            self.front.0,
            self.front.1,
            self.back.0,
            self.back.1
        )
    }
}

/// A version-2 document of placed crystals.
fn placed_doc(els: &[Placed], n_out: f64, losses: &str, incidence: (f64, f64), pol: &str) -> String {
    let all: Vec<String> = els.iter().map(Placed::json).collect();
    format!(
        r#"{{"version": 2, "wavelength_nm": 700, "outside_index": {n_out:?}, "interface_losses": "{losses}", "screen_mm": 30,
            "beam": {{"incidence": {{"polar_deg": {:?}, "azimuth_deg": {:?}}}, "polarization": {pol}}},
            "elements": [{}]}}"#,
        incidence.0,
        incidence.1,
        all.join(", ")
    )
}

/// Wedges, tilted plates and contacted pairs with their apertures clear of crossing faces: one or
/// two crystals of generated indices, axes, face normals (up to `max_face` degrees), contacts and
/// mounts (up to `max_mount`).
fn placed_crystals(max_face: f64, max_mount: f64) -> impl Strategy<Value = Vec<Placed>> {
    let one = (
        (1.4f64..2.6, -0.25f64..0.25),
        (0.0f64..180.0, -180.0f64..180.0),
        (0.0..max_face, -180.0f64..180.0, 0.0..max_face, -180.0f64..180.0),
        (1.0f64..6.0, 0.0f64..3.0),
        (0.0..max_mount.max(1e-9), -180.0f64..180.0),
    )
        .prop_map(move |((no, d), axis, (ft, fa, bt, ba), (extra, gap), mount)| {
            let aperture = 20.0;
            let reach = aperture / 2.0 * (ft.to_radians().tan() + bt.to_radians().tan());
            Placed {
                no,
                ne: (no + d).max(1.3),
                thickness: reach + extra,
                axis,
                front: (ft, fa),
                back: (bt, ba),
                aperture,
                gap,
                contact: (0, 1.5),
                mount: if max_mount > 0.0 { mount } else { (0.0, 0.0) },
            }
        });
    (prop::collection::vec(one, 1..3), 0usize..3, 1.35f64..1.9).prop_map(|(mut els, contact, cement)| {
        if els.len() == 2 {
            if contact > 0 {
                // Touching: the second's front face is the first's back face, no mounts.
                els[1].front = els[0].back;
                els[1].gap = 0.0;
                els[1].contact = (contact, cement);
                els[0].mount = (0.0, 0.0);
                els[1].mount = (0.0, 0.0);
            } else {
                // Across an air gap wide enough for both faces and mounts.
                let tilt = |a: (f64, f64)| a.0.to_radians().tan();
                els[1].gap += 4.0
                    * (tilt(els[0].back) + tilt(els[1].front) + 2.0 * tilt(els[0].mount) + 2.0 * tilt(els[1].mount))
                    + 1.0;
            }
            let reach = 10.0 * (els[1].front.0.to_radians().tan() + els[1].back.0.to_radians().tan());
            els[1].thickness = els[1].thickness.max(reach + 1.0);
        }
        els
    })
}

fn rot_z(v: [f64; 3], phi: f64) -> [f64; 3] {
    let (s, c) = phi.to_radians().sin_cos();
    [c * v[0] - s * v[1], s * v[0] + c * v[1], v[2]]
}

fn retardances(r: &TraceResult) -> Vec<(Option<f64>, f64)> {
    r.elements
        .iter()
        .filter_map(|e| match e {
            ElementReport::Crystal {
                retardance_rad,
                split_angle_deg,
                ..
            } => Some((*retardance_rad, *split_angle_deg)),
            _ => None,
        })
        .collect()
}

/// The trace of document `doc` (`None` when the contract refuses it), its crystals replaced in
/// order by the general crystals `media` when any are given: the document's uniaxial crystals
/// stand in for the geometry, the resolved stack takes the general ones.
fn traced(doc: &str, media: &[Anisotropic]) -> Option<TraceResult> {
    let sc = Scenario::from_json_str(doc).ok()?;
    if media.is_empty() {
        return Some(trace(&sc).unwrap());
    }
    let (mut stack, warnings) = sc.resolve().unwrap();
    let slabs = stack.layers.iter_mut().filter_map(|l| match &mut l.element {
        StackElement::Slab(s) => Some(s),
        StackElement::Ideal(_) | StackElement::Cell(_) => None,
    });
    for (slab, m) in slabs.zip(media) {
        slab.medium = StackMedium::Anisotropic(*m);
    }
    Some(report_trace(&sc, &stack, &trace_stack(&stack), warnings))
}

/// The mirror image of a general crystal in a plane z = const (M = diag(1, 1, −1)): ε → MεM with
/// the principal axes M·R·diag(1, 1, −1) (a proper rotation, the same axes up to sign), and the
/// chirality reversed, since a mirror turns a right-handed crystal into a left-handed one.
fn mirrored(m: &Anisotropic) -> Anisotropic {
    let flip = Matrix3::from_diagonal(&nalgebra::Vector3::new(1.0, 1.0, -1.0));
    Anisotropic::new(m.principal, flip * m.axes * flip, m.chirality.map(|k| -k)).unwrap()
}

/// A general crystal: three principal indices 1.4–2.4 on randomly turned axes, half of them
/// optically active (κ up to 5·10⁻⁴, beyond quartz's 4·10⁻⁵).
fn general_medium() -> impl Strategy<Value = Anisotropic> {
    (
        (1.4f64..2.4, 1.4f64..2.4, 1.4f64..2.4),
        (0.0f64..3.2, -3.2f64..3.2, -3.2f64..3.2),
        prop_oneof![
            Just([0.0; 3]),
            (-5e-4f64..5e-4, -5e-4f64..5e-4, -5e-4f64..5e-4).prop_map(|(a, b, c)| [a, b, c])
        ],
    )
        .prop_map(|((a, b, c), (t, az, r), k)| Anisotropic::new([a, b, c], orientation(t, az, r), k).unwrap())
}

/// Rays + rejected + reflected power of a result.
fn accounted(r: &TraceResult) -> f64 {
    let rays: f64 = r.rays.iter().map(|x| x.power).sum();
    let rejected: f64 = r.rejected.iter().map(|x| x.power).sum();
    let reflected: f64 = r
        .elements
        .iter()
        .map(|e| match e {
            ElementReport::Crystal { reflected_power, .. } => *reflected_power,
            _ => 0.0,
        })
        .sum();
    rays + rejected + reflected
}

/// The set-up `els` turned by `phi` degrees about z: every optic axis, face and mount azimuth + φ.
fn turned_set_up(els: &[Placed], phi: f64) -> Vec<Placed> {
    let turn = |a: (f64, f64)| (a.0, a.1 + phi);
    els.iter()
        .map(|e| Placed {
            axis: turn(e.axis),
            front: turn(e.front),
            back: turn(e.back),
            mount: turn(e.mount),
            ..e.clone()
        })
        .collect()
}

/// Rotation covariance (see `placed_faces_turn_with_the_set_up`): `b` is `a`'s set-up turned by
/// `phi` degrees about z.
fn turned_alike(a: &TraceResult, b: &TraceResult, phi: f64) -> Result<(), TestCaseError> {
    let close = |x: f64, y: f64, scale: f64| (x - y).abs() <= 1e-9 * (1.0 + scale);
    prop_assert_eq!(a.rays.len(), b.rays.len());
    let (s2, c2) = (2.0 * phi).to_radians().sin_cos();
    for ra in &a.rays {
        let rb = b
            .rays
            .iter()
            .find(|r| r.label == ra.label)
            .ok_or_else(|| TestCaseError::fail(format!("no turned {}", ra.label)))?;
        prop_assert!(
            close(ra.power, rb.power, 0.0),
            "{}: power {} vs {}",
            ra.label,
            ra.power,
            rb.power
        );
        let st = [
            ra.stokes[0],
            c2 * ra.stokes[1] - s2 * ra.stokes[2],
            s2 * ra.stokes[1] + c2 * ra.stokes[2],
            ra.stokes[3],
        ];
        for k in 0..4 {
            prop_assert!(
                close(rb.stokes[k], st[k], 0.0),
                "{}: Stokes {:?} turned {:?} vs {:?}",
                ra.label,
                ra.stokes,
                st,
                rb.stokes
            );
        }
        let (d, e) = (rot_z(ra.direction, phi), rot_z(ra.exit_point_mm, phi));
        let sc = rot_z([ra.screen_position_mm[0], ra.screen_position_mm[1], 0.0], phi);
        for k in 0..3 {
            prop_assert!(
                close(rb.direction[k], d[k], 0.0),
                "{}: direction {:?} vs {:?}",
                ra.label,
                d,
                rb.direction
            );
            prop_assert!(
                close(rb.exit_point_mm[k], e[k], e[k].abs()),
                "{}: exit {:?} vs {:?}",
                ra.label,
                e,
                rb.exit_point_mm
            );
        }
        for k in 0..2 {
            let reach = sc[0].abs() + sc[1].abs();
            prop_assert!(
                close(rb.screen_position_mm[k], sc[k], reach),
                "{}: screen {:?} vs {:?}",
                ra.label,
                sc,
                rb.screen_position_mm
            );
        }
    }
    // Rejected rays, each turned with its power kept (totally reflected light included, wave
    // by wave).
    for xa in &a.rejected {
        let (p, d) = (rot_z(xa.point_mm, phi), rot_z(xa.direction, phi));
        let same_place = |xb: &&doublespar::RejectedRay| {
            xb.label == xa.label
                && xb.element == xa.element
                && xb.face == xa.face
                && xb.reason == xa.reason
                && (0..3).all(|k| close(xb.point_mm[k], p[k], p[k].abs()))
        };
        let along = |xb: &&doublespar::RejectedRay| (0..3).all(|k| close(xb.direction[k], d[k], 0.0));
        let found = b
            .rejected
            .iter()
            .filter(same_place)
            .any(|xb| along(&xb) && close(xb.power, xa.power, 0.0));
        prop_assert!(found, "rejected {:?} has no turned counterpart in {:?}", xa, b.rejected);
    }
    for ((ga, sa), (gb, sb)) in retardances(a).into_iter().zip(retardances(b)) {
        prop_assert!(close(sa, sb, sa.abs()), "split angle {sa} vs {sb}");
        match (ga, gb) {
            (Some(x), Some(y)) => prop_assert!(close(x, y, x.abs()), "retardance {x} vs {y}"),
            (x, y) => prop_assert_eq!(x.is_some(), y.is_some()),
        }
    }
    Ok(())
}

/// Reciprocity (see `placed_faces_are_reciprocal`) for the set-up `els`, its crystals replaced by
/// `media` when given (then mirrored for the reversed set-up: [`mirrored`]).
fn reciprocal(
    mut els: Vec<Placed>,
    parallel: bool,
    n_out: f64,
    incidence: (f64, f64),
    uncoated: bool,
    media: &[Anisotropic],
) -> Result<(), TestCaseError> {
    let losses = if uncoated { "uncoated" } else { "ideal" };
    if parallel {
        let face = els[0].front;
        for e in &mut els {
            (e.front, e.back) = (face, face);
        }
    }
    let unpolarized = r#"{"kind": "unpolarized"}"#;
    let Some(f) = traced(&placed_doc(&els, n_out, losses, incidence, unpolarized), media) else {
        return Ok(());
    };
    prop_assume!(f.rejected.iter().all(|x| x.reason != "outside aperture"));
    let n = els.len();
    let reversed_media: Vec<Anisotropic> = media.iter().rev().map(mirrored).collect();
    let reversed: Vec<Placed> = (0..n)
        .map(|j| {
            let old = &els[n - 1 - j];
            let (gap, contact) = if j == 0 {
                (1.0, (0, 1.5))
            } else {
                (els[n - j].gap, els[n - j].contact)
            };
            Placed {
                axis: (180.0 - old.axis.0, old.axis.1),
                front: (old.back.0, old.back.1 + 180.0),
                back: (old.front.0, old.front.1 + 180.0),
                gap,
                contact,
                ..old.clone()
            }
        })
        .collect();
    let u_in = f.input.direction;
    for ray in f.rays.iter().filter(|r| r.power > 1e-6) {
        let d = ray.direction;
        let back_in = (d[2].acos().to_degrees(), (-d[1]).atan2(-d[0]).to_degrees());
        let doc = placed_doc(&reversed, n_out, losses, back_in, unpolarized);
        let r = traced(&doc, &reversed_media).ok_or_else(|| TestCaseError::fail(format!("refused: {doc}")))?;
        if r.rejected.iter().any(|x| x.reason == "outside aperture") {
            continue;
        }
        let label: String = ray.label.chars().rev().collect();
        let back = r
            .rays
            .iter()
            .find(|x| x.label == label)
            .ok_or_else(|| TestCaseError::fail(format!("no {label} back in {doc}")))?;
        prop_assert!(
            (back.power - ray.power).abs() <= 1e-9,
            "{}: power {} forward, {} back\n{}",
            ray.label,
            ray.power,
            back.power,
            doc
        );
        let want_dir = [-u_in[0], -u_in[1], u_in[2]];
        for k in 0..3 {
            prop_assert!(
                (back.direction[k] - want_dir[k]).abs() <= 1e-9,
                "{}: back direction {:?}, reversed input {:?}",
                ray.label,
                back.direction,
                want_dir
            );
        }
        if !parallel {
            continue;
        }
        // Displacement across the stack: forward entry → exit, mirrored and reversed.
        let (pf_in, pf_out) = (ray.points_mm[1], ray.exit_point_mm);
        let (pb_in, pb_out) = (back.points_mm[1], back.exit_point_mm);
        let want = [pf_in[0] - pf_out[0], pf_in[1] - pf_out[1], pf_out[2] - pf_in[2]];
        for k in 0..3 {
            let got = pb_out[k] - pb_in[k];
            prop_assert!(
                (got - want[k]).abs() <= 1e-9 * (1.0 + want[k].abs() + pf_out[2]),
                "{}: displacement {k} {} back, {} forward mirrored",
                ray.label,
                got,
                want[k]
            );
        }
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig {
        // 400 cases by default; CI runs them at scale with PROPTEST_CASES (scripts/test.sh).
        cases: std::env::var("PROPTEST_CASES").ok().and_then(|v| v.parse().ok()).unwrap_or(400), ..ProptestConfig::default() })]

    /// Faces at any angle (contract version 2): for generated wedge pairs, tilted and mounted
    /// plates, air, cement and optical contacts, incidences up to grazing, the power of the rays
    /// that leave, the rejected rays and the reflected light add to 1 (nothing absorbs); every
    /// number is finite; a document the contract refuses names its field.
    #[test]
    fn placed_faces_account_for_every_watt(
        (t1, t2, a1, a2) in (0.0f64..60.0, 0.0f64..60.0, -180.0f64..180.0, -180.0f64..180.0),
        (front, back, mount) in (0.0f64..45.0, 0.0f64..45.0, 0.0f64..30.0),
        (contact, uncoated) in (0usize..3, any::<bool>()),
        polar in prop_oneof![3 => -40.0f64..40.0, 1 => Just(0.0), 1 => 80.0f64..89.9],
        paz in -180.0f64..180.0,
        pol in polarization(),
        medium in proptest::sample::select(vec!["calcite", "quartz", "yvo4", "rutile"]),
    ) {
        let contact = ["", r#", "contact": "cement", "cement_index": 1.5"#, r#", "contact": "optical""#][contact];
        let doc = format!(
            r#"{{"version": 2, "wavelength_nm": 700, "interface_losses": "{}", "screen_mm": 20,
                "beam": {{"incidence": {{"polar_deg": {polar}, "azimuth_deg": {paz}}}, "polarization": {pol}}},
                "elements": [
                  {{"kind": "crystal", "material": "{medium}", "thickness_mm": 6, "axis": {{"tilt_deg": {t1}, "azimuth_deg": {a1}}},
                    "aperture_mm": 6, "faces": {{"front": {{"tilt_deg": {front}}}, "back": {{"tilt_deg": {back}, "azimuth_deg": 30}}}}}},
                  {{"kind": "crystal", "material": "{medium}", "thickness_mm": 6, "axis": {{"tilt_deg": {t2}, "azimuth_deg": {a2}}},
                    "aperture_mm": 6, "faces": {{"front": {{"tilt_deg": {back}, "azimuth_deg": 30}}}}{contact}}},
                  {{"kind": "crystal", "material": "{medium}", "thickness_mm": 1, "axis": {{"tilt_deg": 90}}, "gap_mm": 5,
                    "mount": {{"tilt_deg": {mount}, "azimuth_deg": 60}}}}]}}"#,
            if uncoated { "uncoated" } else { "ideal" }
        );
        let s = match Scenario::from_json_str(&doc) {
            Ok(s) => s,
            Err(e) => {
                prop_assert!(e.field.starts_with("elements["), "{}: {}", e.field, e.message);
                return Ok(());
            }
        };
        let Ok(r) = trace(&s) else { return Ok(()) };
        let total = accounted(&r);
        prop_assert!((total - 1.0).abs() < 1e-9, "accounted {total}");
        for ray in &r.rays {
            prop_assert!(ray.power.is_finite() && ray.deviation_deg.is_finite());
            prop_assert!(ray.screen_position_mm.iter().chain(&ray.exit_point_mm).chain(&ray.direction).all(|x| x.is_finite()));
        }
        for x in &r.rejected {
            prop_assert!(x.power.is_finite() && x.power >= 0.0);
            prop_assert!(x.point_mm.iter().chain(&x.direction).all(|v| v.is_finite()));
        }
    }

    /// Rotation covariance about z (faces at any angle): turning a whole placed set-up (face
    /// normals, optic axes, mounts, the plane of incidence and the input polarization) by φ about
    /// z turns every ray's direction, exit point and screen position and every rejected ray's
    /// point and direction by φ, turns (S1, S2) by 2φ, and leaves every power, S3, retardance and
    /// split angle unchanged: space is isotropic, and the contract's bases (the ray basis carried
    /// from x̂, ŷ by the smallest rotation) turn with the set-up. To 1e-9 (lengths relative to
    /// 1 mm plus their size): the turned document is a different floating-point input (every angle
    /// + φ in degrees, then sin and cos), so each number carries input rounding (~1e-16 rad)
    /// magnified by the set-up, most near grazing or critical faces, which the generator reaches.
    #[test]
    fn placed_faces_turn_with_the_set_up(
        els in placed_crystals(30.0, 20.0),
        n_out in prop_oneof![3 => Just(1.0), 1 => 1.0f64..1.8],
        incidence in (prop_oneof![3 => 0.0f64..25.0, 1 => 80.0f64..89.9], -180.0f64..180.0),
        (pol_az, ell) in (-90.0f64..90.0, -45.0f64..45.0),
        uncoated in any::<bool>(),
        phi in -180.0f64..180.0,
    ) {
        let losses = if uncoated { "uncoated" } else { "ideal" };
        let pol = |a: f64| format!(r#"{{"kind": "elliptical", "azimuth_deg": {a:?}, "ellipticity_deg": {ell:?}}}"#);
        let turn = |a: (f64, f64)| (a.0, a.1 + phi);
        let turned = turned_set_up(&els, phi);
        let doc_a = placed_doc(&els, n_out, losses, incidence, &pol(pol_az));
        let doc_b = placed_doc(&turned, n_out, losses, turn(incidence), &pol(pol_az + phi));
        let (a, b) = match (Scenario::from_json_str(&doc_a), Scenario::from_json_str(&doc_b)) {
            (Ok(a), Ok(b)) => (trace(&a).unwrap(), trace(&b).unwrap()),
            (Err(ea), Err(eb)) => {
                prop_assert_eq!(ea.field, eb.field);
                return Ok(());
            }
            (ra, rb) => return Err(TestCaseError::fail(format!("one accepted, one refused: {:?} / {:?}", ra.err(), rb.err()))),
        };
        turned_alike(&a, &b, phi)?;
    }

    /// Reciprocity (Stokes–Helmholtz; Born & Wolf, *Principles of Optics*, §7.6 and Potton,
    /// "Reciprocity in optics", Rep. Prog. Phys. 67, 717 (2004), from memory): in reciprocal,
    /// lossless media the path matrix traced backwards is the transpose of the forward one. So
    /// a ray that leaves along d, sent back along −d through the reversed set-up, leaves along the
    /// reversed incident direction, crosses the stack by the reversed displacement, and its mode
    /// path (labels in reverse order) carries the same power for unpolarized light (½‖M‖², which
    /// the transpose keeps); bare faces and the lossless part of ideal ones are both reciprocal.
    ///
    /// The contract enters every beam at the origin along +z, so the reversed set-up is the
    /// forward one mirrored in a plane z = const (the mirror maps −d onto a forward direction and
    /// keeps a uniaxial crystal a uniaxial crystal: face normals (t, a) → (t, a + 180°), optic
    /// axes (t, a) → (180° − t, a)), with elements, gaps and contacts in reverse order. Its lateral
    /// place cannot be chosen, so the check uses what does not depend on it: direction and power
    /// always (faces without aperture limits), and, where every face shares one normal (tilted
    /// plates and stacks of them, whose paths do not depend on where the ray enters), the
    /// displacement from entry to exit point.
    /// Mounts are left out (a mirrored mount is not a mount of the contract) and so are rays that
    /// meet an aperture, either way. To 1e-9: the reversed input is the forward output's
    /// direction, rounded, and its path crosses up to six faces and 40 mm.
    #[test]
    fn placed_faces_are_reciprocal(
        els in placed_crystals(12.0, 0.0),
        parallel in any::<bool>(),
        n_out in prop_oneof![3 => Just(1.0), 1 => 1.0f64..1.5],
        incidence in (0.0f64..15.0, -180.0f64..180.0),
        uncoated in any::<bool>(),
    ) {
        reciprocal(els, parallel, n_out, incidence, uncoated, &[])?;
    }

    /// General crystals (biaxial, optically active) at placed faces: every watt is accounted to
    /// 1e-12 (rays + rejected + reflected = 1; nothing absorbs) and every number is finite.
    #[test]
    fn general_crystals_account_for_every_watt(
        els in placed_crystals(30.0, 20.0),
        media in prop::collection::vec(general_medium(), 2),
        n_out in prop_oneof![3 => Just(1.0), 1 => 1.0f64..1.8],
        incidence in (prop_oneof![3 => 0.0f64..40.0, 1 => 80.0f64..89.9], -180.0f64..180.0),
        pol in polarization(),
        uncoated in any::<bool>(),
    ) {
        let losses = if uncoated { "uncoated" } else { "ideal" };
        let Some(r) = traced(&placed_doc(&els, n_out, losses, incidence, &pol), &media[..els.len()]) else { return Ok(()) };
        let total = accounted(&r);
        prop_assert!((total - 1.0).abs() < 1e-12, "accounted {total}");
        check_physical(&r);
        for ray in &r.rays {
            prop_assert!(ray.screen_position_mm.iter().chain(&ray.exit_point_mm).chain(&ray.direction).all(|x| x.is_finite()));
        }
    }

    /// Rotation covariance about z for general crystals: the set-up, its crystals' principal axes
    /// (R → Rz(φ)·R) and the input turned together give the turned result (as
    /// `placed_faces_turn_with_the_set_up`).
    #[test]
    fn general_crystals_turn_with_the_set_up(
        els in placed_crystals(30.0, 20.0),
        media in prop::collection::vec(general_medium(), 2),
        incidence in (0.0f64..30.0, -180.0f64..180.0),
        (uncoated, phi) in (any::<bool>(), -180.0f64..180.0),
        (pol_az, ell) in (-90.0f64..90.0, -45.0f64..45.0),
    ) {
        let losses = if uncoated { "uncoated" } else { "ideal" };
        let turned = turned_set_up(&els, phi);
        let pol = |a: f64| format!(r#"{{"kind": "elliptical", "azimuth_deg": {a:?}, "ellipticity_deg": {ell:?}}}"#);
        let turn = |a: (f64, f64)| (a.0, a.1 + phi);
        let rz = orientation(0.0, phi.to_radians(), 0.0);
        let media = &media[..els.len()];
        let turned_media: Vec<Anisotropic> = media.iter().map(|m| m.rotated(&rz)).collect();
        let a = traced(&placed_doc(&els, 1.0, losses, incidence, &pol(pol_az)), media);
        let b = traced(&placed_doc(&turned, 1.0, losses, turn(incidence), &pol(pol_az + phi)), &turned_media);
        if let (Some(a), Some(b)) = (a, b) {
            turned_alike(&a, &b, phi)?;
        }
    }

    /// Reciprocity for general crystals (as `placed_faces_are_reciprocal`): the reversed set-up is
    /// the mirror image, its crystals mirrored too (chirality reversed); chiral media are
    /// reciprocal, so the reversed path carries the same power back along the reversed input.
    #[test]
    fn general_crystals_are_reciprocal(
        els in placed_crystals(12.0, 0.0),
        media in prop::collection::vec(general_medium(), 2),
        parallel in any::<bool>(),
        incidence in (0.0f64..15.0, -180.0f64..180.0),
        uncoated in any::<bool>(),
    ) {
        let n = els.len();
        reciprocal(els, parallel, 1.0, incidence, uncoated, &media[..n])?;
    }

    /// Grazing and exactly critical faces: a crystal whose back face stands exactly at the
    /// critical angle of its o- or e-wave at normal incidence (tilt = asin(n_out / n), the wave's
    /// index along z from 1/n² = cos²θ/n_o² + sin²θ/n_e²), a cemented contact exactly critical,
    /// an entrance face exactly critical from a denser outside medium, and incidence a hair from
    /// grazing: every number is finite and every watt is accounted (rays + rejected + reflected =
    /// 1 to 1e-9), whichever way the rounding decides the critical wave.
    #[test]
    fn grazing_and_exactly_critical_faces_stay_finite(
        (no, d) in (1.45f64..2.5, -0.25f64..0.25),
        (tilt, az) in (0.0f64..180.0, -180.0f64..180.0),
        face_az in -180.0f64..180.0,
        which in 0usize..4,
        e_wave in any::<bool>(),
        uncoated in any::<bool>(),
        pol in polarization(),
    ) {
        let ne = (no + d).max(1.3);
        let t = tilt.to_radians();
        let n_wave = if e_wave { 1.0 / ((t.cos() / no).powi(2) + (t.sin() / ne).powi(2)).sqrt() } else { no };
        let losses = if uncoated { "uncoated" } else { "ideal" };
        let crystal = |front: (f64, f64), back: (f64, f64), thickness: f64| Placed {
            no, ne, thickness, axis: (tilt, az), front, back, aperture: 4.0, gap: 0.0, contact: (0, 1.5), mount: (0.0, 0.0),
        };
        let reach = |deg: f64| 2.0 * deg.to_radians().tan() + 1.0;
        let doc = match which {
            0 => {
                // The back face at the wave's critical angle to the outside medium.
                let beta = (1.0 / n_wave).asin().to_degrees();
                placed_doc(&[crystal((0.0, 0.0), (beta, face_az), reach(beta))], 1.0, losses, (0.0, 0.0), &pol)
            }
            1 => {
                // A cemented contact at the wave's critical angle to the cement.
                let cement = n_wave * 0.9;
                let beta = 0.9f64.asin().to_degrees();
                let mut second = crystal((beta, face_az), (0.0, 0.0), reach(beta));
                second.contact = (1, cement.clamp(1.0, 3.0));
                placed_doc(&[crystal((0.0, 0.0), (beta, face_az), reach(beta)), second], 1.0, losses, (0.0, 0.0), &pol)
            }
            2 => {
                // Incidence exactly at the critical angle of the o-wave, from a denser outside.
                let n_out = (no + 0.5).min(5.0);
                let polar = (no / n_out).asin().to_degrees();
                placed_doc(&[crystal((0.0, 0.0), (0.0, 0.0), 3.0)], n_out, losses, (polar, face_az), &pol)
            }
            _ => {
                // A hair from grazing on a tilted entrance face.
                placed_doc(&[crystal((20.0, face_az), (0.0, 0.0), reach(20.0))], 1.0, losses, (89.999999999, face_az + 180.0), &pol)
            }
        };
        let s = Scenario::from_json_str(&doc).unwrap_or_else(|e| panic!("{e}\n{doc}"));
        let r = trace(&s).unwrap();
        check_physical(&r);
        let total: f64 = r.rays.iter().map(|x| x.power).sum::<f64>()
            + r.rejected.iter().map(|x| x.power).sum::<f64>()
            + r.elements.iter().map(|e| match e { ElementReport::Crystal { reflected_power, .. } => *reflected_power, _ => 0.0 }).sum::<f64>();
        prop_assert!((total - 1.0).abs() <= 1e-9, "accounted {total}\n{doc}");
        for x in &r.rejected {
            prop_assert!(x.power.is_finite() && x.point_mm.iter().chain(&x.direction).all(|v| v.is_finite()));
        }
        for ray in &r.rays {
            prop_assert!(ray.deviation_deg.is_finite() && ray.screen_position_mm.iter().chain(&ray.exit_point_mm).chain(&ray.direction).all(|v| v.is_finite()));
        }
    }

    #[test]
    fn ideal_stacks_conserve_power(
        plates in prop::collection::vec(plate(), 1..4),
        wl in 450.0f64..1500.0,
        n_out in 1.0f64..1.2,
        polar in polar(),
        paz in -180.0f64..180.0,
        pol in polarization(),
    ) {
        let doc = scenario_doc(&plates, wl, n_out, polar, paz, &pol, "ideal", "");
        let s = Scenario::from_json_str(&doc).unwrap();
        let Ok(r) = trace(&s) else { return Ok(()) }; // a formula that breaks down is an error, tested elsewhere
        check_physical(&r);
        let any_evanescent = r.elements.iter().any(|e| matches!(e, ElementReport::Crystal { separation_mm: None, .. }));
        let ray_sum: f64 = r.rays.iter().map(|x| x.power).sum();
        if !any_evanescent {
            prop_assert!((ray_sum - 1.0).abs() < 1e-10, "ray powers sum to {}", ray_sum);
        }
        prop_assert!(ray_sum <= 1.0 + 1e-10);
    }

    #[test]
    fn uncoated_stacks_balance_transmitted_and_reflected(
        plates in prop::collection::vec(plate(), 1..3),
        polar in polar(),
        paz in -180.0f64..180.0,
        pol in polarization(),
    ) {
        let doc = scenario_doc(&plates, 800.0, 1.0, polar, paz, &pol, "uncoated", "");
        let Ok(r) = trace(&Scenario::from_json_str(&doc).unwrap()) else { return Ok(()) };
        check_physical(&r);
        let reflected: f64 = r.elements.iter().map(|e| match e { ElementReport::Crystal { reflected_power, .. } => *reflected_power, _ => 0.0 }).sum();
        let out: f64 = r.rays.iter().map(|x| x.power).sum();
        let evanescent = r.elements.iter().any(|e| matches!(e, ElementReport::Crystal { separation_mm: None, .. }));
        if !evanescent {
            prop_assert!((out + reflected - 1.0).abs() < 1e-10, "out {} + reflected {} ≠ 1", out, reflected);
        }
    }

    #[test]
    fn results_turn_with_the_axis_azimuth(
        plates in prop::collection::vec(plate(), 1..3),
        polar in -60.0f64..60.0,
        pol_az in -90.0f64..90.0,
        alpha in -180.0f64..180.0,
    ) {
        // Turning the whole set-up (axes, plane of incidence, input polarization) about z by α
        // turns every exit point by α and leaves powers and retardances unchanged.
        let pol = |a: f64| format!(r#"{{"kind": "linear", "azimuth_deg": {a}}}"#);
        let base = scenario_doc(&plates, 1000.0, 1.0, polar, 10.0, &pol(pol_az), "ideal", "");
        let turned: Vec<Plate> = plates.iter().map(|p| Plate { az: p.az + alpha, ..p.clone() }).collect();
        let rot = scenario_doc(&turned, 1000.0, 1.0, polar, 10.0 + alpha, &pol(pol_az + alpha), "ideal", "");
        let (Ok(a), Ok(b)) = (trace(&Scenario::from_json_str(&base).unwrap()), trace(&Scenario::from_json_str(&rot).unwrap())) else { return Ok(()) };
        prop_assert_eq!(a.rays.len(), b.rays.len());
        let (s, c) = alpha.to_radians().sin_cos();
        for (ra, rb) in a.rays.iter().zip(b.rays.iter()) {
            prop_assert_eq!(&ra.label, &rb.label);
            let [x, y] = ra.exit_position_mm;
            let scale = 1.0 + x.abs() + y.abs();
            prop_assert!((rb.exit_position_mm[0] - (c * x - s * y)).abs() < 1e-9 * scale);
            prop_assert!((rb.exit_position_mm[1] - (s * x + c * y)).abs() < 1e-9 * scale);
            prop_assert!((ra.power - rb.power).abs() < 1e-9, "power {} vs {}", ra.power, rb.power);
        }
    }

    #[test]
    fn lossless_retarders_are_unitary(g in -20.0f64..20.0, th in -4.0f64..4.0) {
        let m = doublespar::retarder_matrix(g, th);
        prop_assert!((m.adjoint() * m - doublespar::JonesMatrix::identity()).norm() < 1e-13);
    }

    #[test]
    fn any_document_gives_a_result_or_a_named_error(doc in any_json(), ) {
        // No panic and no NaN: whatever comes in, the answer is a result or an error.
        match Scenario::from_json_str(&doc).and_then(|s| trace(&s)) {
            Ok(r) => check_physical(&r),
            Err(e) => prop_assert!(!e.message.is_empty()),
        }
    }

    #[test]
    fn wild_numbers_in_valid_shapes_never_panic(
        wl in prop_oneof![Just(f64::MIN_POSITIVE), Just(1.0), 1.0f64..1e6, Just(1e300), Just(-1.0), Just(0.0)],
        l in prop_oneof![Just(1e-300), 1e-9f64..1e4, Just(1e308), Just(-0.0)],
        tilt in prop_oneof![tilt(), Just(-1.0), Just(1e20)],
        polar in prop_oneof![polar(), Just(89.999999999), Just(-89.999999999), Just(90.0)],
        n in prop_oneof![Just(1.0), 1.0f64..10.0, Just(0.5), Just(11.0)],
        n_out in prop_oneof![Just(1.0), 1.0f64..5.0],
        key in proptest::sample::select(doublespar::material_keys()),
    ) {
        for medium in [format!(r#""material": "{key}""#), format!(r#""no": {n}, "ne": 1.5"#)] {
            let plates = [Plate { medium, thickness: l, tilt, az: 0.0, gap: 0.0 }];
            let doc = scenario_doc(&plates, wl, n_out, polar, 0.0, r#"{"kind": "linear", "azimuth_deg": 45}"#, "uncoated", "");
            match Scenario::from_json_str(&doc).and_then(|s| trace(&s)) {
                Ok(r) => check_physical(&r),
                Err(e) => prop_assert!(!e.message.is_empty()),
            }
        }
    }
}

/// Arbitrary JSON shaped loosely like a scenario, with wrong types, unknown fields and odd values.
fn any_json() -> impl Strategy<Value = String> {
    let leaf = prop_oneof![
        Just("null".to_string()),
        Just("true".to_string()),
        any::<f64>().prop_map(|x| if x.is_finite() {
            format!("{x}")
        } else {
            "1e999".to_string()
        }),
        Just("\"calcite\"".to_string()),
        Just("\"crystal\"".to_string()),
        Just("-0".to_string()),
        Just("1e308".to_string()),
    ];
    let keys = prop_oneof![
        Just("kind"),
        Just("material"),
        Just("thickness_mm"),
        Just("axis"),
        Just("tilt_deg"),
        Just("elements"),
        Just("beam"),
        Just("polarization"),
        Just("wavelength_nm"),
        Just("no"),
        Just("ne"),
        Just("stokes"),
        Just("zzz"),
    ];
    leaf.prop_recursive(4, 40, 6, move |inner| {
        prop_oneof![
            prop::collection::vec(inner.clone(), 0..4).prop_map(|v| format!("[{}]", v.join(","))),
            prop::collection::vec((keys.clone(), inner), 0..5).prop_map(|kv| {
                let body: Vec<String> = kv.iter().map(|(k, v)| format!("\"{k}\": {v}")).collect();
                format!("{{{}}}", body.join(","))
            }),
        ]
    })
}

#[test]
fn the_same_crystal_twice_doubles_the_retardance() {
    // Cross-method: the retardance of two identical plates in contact equals that of one plate of
    // twice the thickness, at oblique incidence too.
    let one = |l: f64| {
        format!(
            r#"{{"kind": "crystal", "no": 1.6557, "ne": 1.4849, "thickness_mm": {l}, "axis": {{"tilt_deg": 63, "azimuth_deg": 25}}}}"#
        )
    };
    let doc1 = format!(
        r#"{{"beam": {{"incidence": {{"polar_deg": 17, "azimuth_deg": 40}}}}, "elements": [{}]}}"#,
        one(4.0)
    );
    let doc2 = format!(
        r#"{{"beam": {{"incidence": {{"polar_deg": 17, "azimuth_deg": 40}}}}, "elements": [{}, {}]}}"#,
        one(2.0),
        one(2.0)
    );
    let r1 = common::run(&doc1);
    let r2 = common::run(&doc2);
    let ee1 = r1.rays.iter().find(|x| x.label == "e").unwrap();
    let ee2 = r2.rays.iter().find(|x| x.label == "ee").unwrap();
    near(ee2.exit_position_mm[0], ee1.exit_position_mm[0], 1e-12, "x of e vs ee");
    near(ee2.exit_position_mm[1], ee1.exit_position_mm[1], 1e-12, "y of e vs ee");
    near(ee2.phase_rad, ee1.phase_rad, 1e-9, "phase of e vs ee");
}

/// Exactly degenerate directions of general crystals, at normal incidence on a plate: along a
/// binormal of a biaxial crystal (the two waves share their wave vector; internal conical
/// refraction) and along the axis of a chiral uniaxial one. Nothing is NaN, every watt is
/// accounted to 1e-12 for any input polarization and both face treatments; and through the chiral
/// plate between ideal faces linear light leaves linear, its azimuth turned by −k0 κ₁ L: the
/// rotation of a dextrorotatory crystal (κ₁ > 0) seen through a whole trace. κ₁ is set from
/// quartz's 21.7°/mm at 589.3 nm (a handbook value, common practice).
#[test]
fn exactly_on_a_binormal_and_along_a_chiral_axis_nothing_is_lost() {
    let k0 = std::f64::consts::TAU / 589.3e-6;
    let kappa1 = 21.7f64.to_radians() / k0;
    let chiral = Anisotropic::new(
        [1.5443, 1.5443, 1.5534],
        Matrix3::identity(),
        [kappa1, kappa1, -0.6 * kappa1],
    )
    .unwrap();
    // A biaxial crystal turned so that its first binormal lies along z.
    let upright = Anisotropic::new([1.83, 1.74, 1.75], Matrix3::identity(), [0.0; 3]).unwrap();
    let b = upright.optic_axes().unwrap()[0];
    let turn = orientation(b.z.acos(), b.y.atan2(b.x), 0.0).transpose();
    let binormal = upright.rotated(&turn);
    assert!((binormal.optic_axes().unwrap()[0] - nalgebra::Vector3::z()).norm() < 1e-15);
    let pols = [
        r#"{"kind": "linear", "azimuth_deg": 0}"#,
        r#"{"kind": "linear", "azimuth_deg": 37}"#,
        r#"{"kind": "circular", "handedness": "left"}"#,
        r#"{"kind": "unpolarized"}"#,
    ];
    let l_mm = 2.5;
    for medium in [binormal, chiral] {
        for losses in ["ideal", "uncoated"] {
            for pol in pols {
                let doc = format!(
                    r#"{{"version": 2, "wavelength_nm": 589.3, "interface_losses": "{losses}", "screen_mm": 10,
                        "beam": {{"polarization": {pol}}},
                        "elements": [{{"kind": "crystal", "no": 1.5, "ne": 1.6, "thickness_mm": {l_mm}, "axis": {{"tilt_deg": 0}}}}]}}"#
                );
                let r = traced(&doc, &[medium]).unwrap();
                check_physical(&r);
                assert!(
                    (accounted(&r) - 1.0).abs() < 1e-12,
                    "{losses} {pol}: accounted {}",
                    accounted(&r)
                );
                if medium == chiral && losses == "ideal" && pol.contains("azimuth_deg\": 0") {
                    assert_eq!(r.spots.len(), 1, "the two circular waves leave as one beam");
                    let s = r.spots[0].stokes;
                    let azimuth = 0.5 * s[2].atan2(s[1]);
                    let want = -21.7f64.to_radians() * l_mm;
                    let turn = (azimuth - want + std::f64::consts::FRAC_PI_2).rem_euclid(std::f64::consts::PI)
                        - std::f64::consts::FRAC_PI_2;
                    near(turn, 0.0, 1e-9, "azimuth −k0 κ₁ L through the whole trace");
                    near(s[3] / s[0], 0.0, 1e-9, "leaves linear");
                }
            }
        }
    }
}
