//! The planned whole trace (`PlannedTrace`) against the general face-by-face tracer
//! (`trace_stack`), which `tests/independent_faces.rs` holds to an independent per-face Berreman
//! solver: generated stacks of two and three uniaxial crystals (wedge angles, faces and axes at
//! random, air gaps, cement films and optical contact, apertures, ideal and uncoated faces, two
//! outside indices), each lit at many random incidences and polarizations (half within 15°, half out to 70°), so that
//! faces near and past their critical angles are met. For every incidence the plan traces, each
//! ray that leaves forward must be there in both, with power, direction and exit point equal to
//! `PLANNED_TRACE_AGREEMENT`; an incidence the plan declines is traced by the general tracer
//! (counted: there must be some, and far fewer than those traced).
//!
//! The planned trace in lanes (`BlockedTrace::trace_each`, blocks of `PLANNED_LANES` incidences
//! side by side) is held to the same general tracer on the same stacks, in runs whose length is
//! not a multiple of the lane count and whose blocks mix lanes traced side by side with lanes
//! sent back to the one-by-one trace; its vector build and its portable build must give the same
//! bits, and so must the one-by-one trace (the same kernel at one lane).

use doublespar::{
    BlockedTrace, Jones, LaneBuild, PLANNED_LANES, PLANNED_TRACE_AGREEMENT, PlannedRay, PlannedTrace, Rng, Scenario,
    Stack, Workload, trace_stack,
};
use nalgebra::Vector3;

/// One crystal of a generated stack, as the scenario document gives it.
struct Crystal {
    no: f64,
    ne: f64,
    axis: (f64, f64),
    thickness: f64,
    gap: f64,
    front: (f64, f64),
    back: (f64, f64),
    aperture: f64,
    /// "" (air), or the contact fields of a cemented or optically contacted crystal.
    contact: String,
}

fn range(r: &mut Rng, lo: f64, hi: f64) -> f64 {
    lo + (hi - lo) * r.uniform()
}

/// A stack of `count` crystals: wedges whose shared faces tilt up to 35°, contacted by air, cement
/// or optically, within apertures of 4–12 mm.
fn generated(r: &mut Rng, count: usize) -> String {
    let mut crystals: Vec<Crystal> = Vec::new();
    let mut face = (range(r, 0.0, 10.0), range(r, -180.0, 180.0));
    for i in 0..count {
        let back = (range(r, 0.0, 35.0), range(r, -180.0, 180.0));
        let no = range(r, 1.45, 1.8);
        let aperture = range(r, 4.0, 12.0);
        // Thick enough that the faces do not meet within the aperture.
        let half = aperture / 2.0;
        let thickness = half * (face.0.to_radians().tan() + back.0.to_radians().tan()) + range(r, 0.5, 4.0);
        let (contact, gap) = match (i, r.uniform()) {
            (0, _) => (String::new(), range(r, 0.0, 2.0)),
            (_, x) if x < 0.35 => (r#", "contact": "optical""#.to_string(), 0.0),
            (_, x) if x < 0.6 => (
                format!(r#", "contact": "cement", "cement_index": {:?}"#, range(r, 1.35, 1.7)),
                0.0,
            ),
            _ => (
                String::new(),
                half * (face.0.to_radians().tan() * 2.0) + range(r, 0.2, 2.0),
            ),
        };
        let front = if contact.is_empty() && i > 0 {
            (range(r, 0.0, 35.0), range(r, -180.0, 180.0))
        } else {
            face
        };
        let gap = if contact.is_empty() && i > 0 {
            gap + half * front.0.to_radians().tan()
        } else {
            gap
        };
        crystals.push(Crystal {
            no,
            ne: no + range(r, -0.2, 0.2),
            axis: (range(r, 0.0, 180.0), range(r, -180.0, 180.0)),
            thickness,
            gap,
            front,
            back,
            aperture,
            contact,
        });
        face = back;
    }
    let elements: Vec<String> = crystals
        .iter()
        .map(|c| {
            format!(
                r#"{{"kind": "crystal", "no": {:?}, "ne": {:?}, "thickness_mm": {:?}, "gap_mm": {:?},
                    "axis": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}}, "aperture_mm": {:?},
                    "faces": {{"front": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}},
                               "back": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}}}}{}}}"#,
                c.no,
                c.ne,
                c.thickness,
                c.gap,
                c.axis.0,
                c.axis.1,
                c.aperture,
                c.front.0,
                c.front.1,
                c.back.0,
                c.back.1,
                c.contact
            )
        })
        .collect();
    let losses = if r.uniform() < 0.5 { "ideal" } else { "uncoated" };
    let outside = if r.uniform() < 0.7 { 1.0 } else { 1.33 };
    format!(
        r#"{{"version": 2, "wavelength_nm": 633, "outside_index": {outside:?}, "interface_losses": "{losses}",
            "screen_mm": {:?}, "beam": {{"incidence": {{"polar_deg": 0, "azimuth_deg": 0}},
            "polarization": {{"kind": "linear", "azimuth_deg": 0}}}}, "elements": [{}]}}"#,
        range(r, 0.0, 20.0),
        elements.join(", ")
    )
}

/// tr(M C Mᴴ) for the input of Stokes vector `s`: a traced path's power.
fn power(m: &doublespar::JonesMatrix, s: &[f64; 4]) -> f64 {
    let j = [
        num_complex::Complex64::new(0.5 * (s[0] + s[1]), 0.0),
        num_complex::Complex64::new(0.5 * s[2], 0.5 * s[3]),
        num_complex::Complex64::new(0.5 * s[2], -0.5 * s[3]),
        num_complex::Complex64::new(0.5 * (s[0] - s[1]), 0.0),
    ];
    let c = doublespar::JonesMatrix::new(j[0], j[1], j[2], j[3]);
    (m * c * m.adjoint()).trace().re
}

/// Sets a random incidence (polar angle up to `max_deg`) and polarization on `stack`.
fn light(r: &mut Rng, stack: &mut Stack, max_deg: f64) {
    let (t, a) = (
        range(r, 0.0, max_deg).to_radians(),
        range(r, -180.0, 180.0).to_radians(),
    );
    stack.input.direction = Vector3::new(t.sin() * a.cos(), t.sin() * a.sin(), t.cos());
    let (x, y) = (range(r, -1.0, 1.0), range(r, -1.0, 1.0));
    let j: Jones = Jones::new(
        num_complex::Complex64::new(x, y),
        num_complex::Complex64::new(range(r, -1.0, 1.0), range(r, -1.0, 1.0)),
    );
    let j = j / num_complex::Complex64::from(j.norm());
    stack.input.jones = Some(j);
    stack.input.stokes = doublespar::jones_stokes(&j);
}

/// What a run of the lanes met.
#[derive(Default, Debug)]
struct LaneTally {
    /// Incidences traced side by side to the end, and sent back to the one-by-one trace.
    in_lanes: usize,
    alone: usize,
    /// Blocks holding both kinds.
    mixed_blocks: usize,
    /// Rays compared bit for bit between the vector and the portable build.
    same_bits: usize,
}

/// Traces `dirs` on `stack` (its own polarization) in lanes, by the widest, the AVX2 and the
/// portable build: all hand on the same rays, bit for bit, as `trace` does one by one (the same
/// kernel at one lane), in the same order, and every incidence traced is held to the general tracer.
fn compare_lanes(doc: &str, stack: &mut Stack, dirs: &[Vector3<f64>], tally: &mut Tally, lanes: &mut LaneTally) {
    let Some(plan) = PlannedTrace::new(stack) else {
        panic!("no plan for a stack of crystals with faces\n{doc}")
    };
    let mut plan = BlockedTrace::new(plan);
    let mut runs: [Vec<(Option<Vec<PlannedRay>>, bool)>; 3] = Default::default();
    for (build, run) in [LaneBuild::Widest, LaneBuild::Avx2, LaneBuild::Portable]
        .into_iter()
        .zip(&mut runs)
    {
        plan.use_lane_build(build);
        let alone = plan.trace_each(dirs, |i, rays, alone| {
            assert_eq!(i, run.len(), "incidences out of order\n{doc}");
            run.push((rays.map(<[_]>::to_vec), alone));
        });
        assert_eq!(run.len(), dirs.len());
        assert_eq!(alone, run.iter().filter(|r| r.1).count());
    }
    let [vector, avx2, portable] = runs;
    assert_eq!(vector, avx2, "the widest and the AVX2 builds\n{doc}");
    for (k, block) in vector.chunks(PLANNED_LANES).enumerate() {
        let alone = block.iter().filter(|r| r.1).count();
        lanes.alone += alone;
        lanes.in_lanes += block.len() - alone;
        lanes.mixed_blocks += usize::from(alone > 0 && alone < block.len());
        for (j, (rays, _)) in block.iter().enumerate() {
            let i = k * PLANNED_LANES + j;
            let u = dirs[i];
            assert_eq!(rays, &portable[i].0, "vector and portable builds at {u:?}\n{doc}");
            let one = plan.plan().trace(u).map(<[_]>::to_vec);
            let (Some(rays), Some(one)) = (rays, one) else {
                assert!(
                    rays.is_none() && plan.plan().trace(u).is_none(),
                    "declined by one trace only at {u:?}\n{doc}"
                );
                tally.declined += 1;
                continue;
            };
            // One kernel at eight lanes and at one: the same rays, bit for bit, in the same order.
            lanes.same_bits += rays.len();
            assert_eq!(rays, &one, "lanes and one by one at {u:?}\n{doc}");
            stack.input.direction = u;
            tally.traced += 1;
            agree_with_general(doc, stack, plan.plan(), rays, tally);
        }
    }
}

#[derive(Default, Debug)]
struct Tally {
    stacks: usize,
    refused: usize,
    traced: usize,
    declined: usize,
    rays: usize,
    worst: f64,
}

/// Compares the plan of `stack` with the general tracer at `samples` incidences.
fn compare(r: &mut Rng, doc: &str, stack: &mut Stack, samples: usize, tally: &mut Tally) {
    for i in 0..samples {
        light(r, stack, if i % 2 == 0 { 70.0 } else { 15.0 });
        compare_here(doc, stack, tally);
    }
}

/// Compares the plan of `stack` with the general tracer at the stack's own incidence.
fn compare_here(doc: &str, stack: &Stack, tally: &mut Tally) {
    // The plan reads the input's polarization when it is made: one plan per polarization.
    let Some(mut plan) = PlannedTrace::new(stack) else {
        panic!("no plan for a stack of crystals with faces\n{doc}")
    };
    let Some(rays) = plan.trace(stack.input.direction).map(<[_]>::to_vec) else {
        tally.declined += 1;
        return;
    };
    tally.traced += 1;
    agree_with_general(doc, stack, &plan, &rays, tally);
}

/// Holds the rays `rays` of `plan` at the stack's own incidence to the general tracer's `general`.
fn agree_with_general(doc: &str, stack: &Stack, plan: &PlannedTrace, rays: &[PlannedRay], tally: &mut Tally) {
    let u = stack.input.direction;
    let general = trace_stack(stack);
    let mut labels: Vec<String> = rays.iter().map(|ray| plan.label(ray.label)).collect();
    let mut expected: Vec<String> = general.paths.iter().map(|p| p.label.clone()).collect();
    labels.sort();
    expected.sort();
    assert_eq!(labels, expected, "rays at {u:?}\n{doc}");
    for ray in rays {
        let label = plan.label(ray.label);
        let Some(p) = general.paths.iter().find(|p| p.label == label) else {
            panic!("no ray {label}")
        };
        let exit = Vector3::from(p.exit_point_mm);
        let diffs = [
            (ray.power - power(&p.matrix, &stack.input.stokes)).abs(),
            (ray.direction - p.direction).amax(),
            (ray.exit_point_mm - exit).amax() / (1.0 + exit.norm()),
        ];
        for (what, d) in ["power", "direction", "exit point"].iter().zip(diffs) {
            assert!(
                d <= PLANNED_TRACE_AGREEMENT,
                "{what} of {label} at {u:?} differs by {d:e}\n{doc}"
            );
            tally.worst = tally.worst.max(d);
        }
        tally.rays += 1;
    }
}

/// Generated stacks of two and three crystals, 60 incidences each: every ray the plan traces
/// agrees with the general tracer; some incidences (beyond critical angles) are declined.
#[test]
fn planned_traces_agree_with_the_general_tracer() {
    let mut r = Rng::new(20_261_203);
    // The lanes' incidences from a source of their own: the stacks stay those of the plan alone.
    let mut lane_rng = Rng::new(3_141_593);
    let mut tally = Tally::default();
    let (mut lane_tally, mut lanes) = (Tally::default(), LaneTally::default());
    for case in 0..240 {
        let doc = generated(&mut r, 2 + case % 2);
        let Ok(scenario) = Scenario::from_json_str(&doc) else {
            tally.refused += 1;
            continue;
        };
        let Ok((mut stack, _)) = scenario.resolve() else {
            tally.refused += 1;
            continue;
        };
        tally.stacks += 1;
        compare(&mut r, &doc, &mut stack, 60, &mut tally);
        // A run of 61 incidences (not a multiple of the lane count), half out to 70°.
        light(&mut lane_rng, &mut stack, 0.0);
        let dirs: Vec<Vector3<f64>> = (0..61)
            .map(|i| {
                let mut lit = stack.clone();
                light(&mut lane_rng, &mut lit, if i % 2 == 0 { 70.0 } else { 15.0 });
                lit.input.direction
            })
            .collect();
        lane_tally.stacks += 1;
        compare_lanes(&doc, &mut stack, &dirs, &mut lane_tally, &mut lanes);
    }
    eprintln!("{tally:?}\nlanes: {lane_tally:?} {lanes:?}");
    assert!(
        lane_tally.stacks == tally.stacks && lane_tally.rays >= 30_000,
        "{lane_tally:?}"
    );
    assert!(
        lanes.in_lanes * 2 > lanes.alone && lanes.mixed_blocks >= 100,
        "{lanes:?}"
    );
    assert!(lane_tally.declined > 0, "{lane_tally:?}");
    assert!(tally.stacks >= 150, "{tally:?}");
    assert!(tally.rays >= 30_000, "{tally:?}");
    assert!(tally.declined > 0 && tally.declined * 4 < tally.traced, "{tally:?}");
}

/// Near critical angles: on generated stacks, the incidence (along a random azimuth) where the plan
/// starts to decline is found by bisection, the edge of its critical margin at some face; the
/// incidences 10⁻⁹..10⁻² rad inside that edge, where a mode beyond a face nearly grazes it, are
/// traced by the plan and agree with the general tracer as everywhere else.
#[test]
fn near_critical_incidences_agree_or_are_declined() {
    let mut r = Rng::new(7_654_321);
    let mut tally = Tally::default();
    let (mut lane_tally, mut lanes) = (Tally::default(), LaneTally::default());
    let mut edges = 0;
    for case in 0..240 {
        let doc = generated(&mut r, 2 + case % 2);
        let Ok((mut stack, _)) = Scenario::from_json_str(&doc).and_then(|s| s.resolve()) else {
            continue;
        };
        let Some(mut plan) = PlannedTrace::new(&stack) else {
            continue;
        };
        let azimuth = range(&mut r, -180.0, 180.0).to_radians();
        let along = |t: f64| Vector3::new(t.sin() * azimuth.cos(), t.sin() * azimuth.sin(), t.cos());
        // The first decline along the azimuth, in steps of 0.5°, then bisected.
        let Some(step) = (1..170).find(|&i| plan.trace(along(f64::from(i) * 0.5f64.to_radians())).is_none()) else {
            continue;
        };
        let (mut lo, mut hi) = (f64::from(step - 1), f64::from(step));
        (lo, hi) = (lo * 0.5f64.to_radians(), hi * 0.5f64.to_radians());
        if plan.trace(along(lo)).is_none() {
            continue;
        }
        for _ in 0..60 {
            let mid = 0.5 * (lo + hi);
            if plan.trace(along(mid)).is_some() {
                lo = mid
            } else {
                hi = mid
            }
        }
        edges += 1;
        for k in 0..8 {
            stack.input.direction = along(lo - 10f64.powi(-9 + k));
            compare_here(&doc, &stack, &mut tally);
        }
        // The same incidences and the edge's far side, side by side in lanes.
        let dirs: Vec<Vector3<f64>> = (0..8)
            .map(|k| along(lo - 10f64.powi(-9 + k)))
            .chain([along(hi), along(hi + 1e-3)])
            .collect();
        compare_lanes(&doc, &mut stack, &dirs, &mut lane_tally, &mut lanes);
    }
    eprintln!("{edges} edges, {tally:?}\nlanes: {lane_tally:?} {lanes:?}");
    assert!(
        lane_tally.rays >= 200 && lanes.in_lanes >= 100,
        "{lane_tally:?} {lanes:?}"
    );
    assert!(edges >= 30 && tally.rays >= 200, "{edges} edges, {tally:?}");
}

/// The benchmark's splitter: no incidence of the workload is declined nor sent back from the
/// lanes, and the whole-trace checksum by the plan, one by one and in lanes, equals the general
/// tracer's (2,001 samples, not a multiple of the lane count) to the agreement's order.
#[test]
fn the_splitter_workload_is_planned_throughout() {
    let doc = include_str!("../scripts/bench/two-wedge-splitter.json");
    let (stack, _) = Scenario::from_json_str(doc).and_then(|s| s.resolve()).unwrap();
    assert_eq!(doublespar::declined_samples(&stack, 2_000), 0);
    assert_eq!(doublespar::samples_traced_alone(&stack, 2_001), 0);
    let general = doublespar::run_workload(&stack, 2_001, Workload::GeneralTrace);
    for work in [Workload::Trace, Workload::LaneTrace] {
        let planned = doublespar::run_workload(&stack, 2_001, work);
        assert!(
            (planned - general).abs() <= PLANNED_TRACE_AGREEMENT * general.abs(),
            "{work:?}: {planned} vs {general}"
        );
    }
}
