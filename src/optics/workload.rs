//! The two-wedge benchmark's workload: one set-up traced over a spread of incidences, exactly as
//! the numpy baseline (`scripts/bench/splitter_numpy.py`) computes it, so that native code,
//! WebAssembly and numpy do the same work and agree on a checksum.
//!
//! Sample i of n lights the stack at polar angle θᵢ = 5°·(i + ½)/n and azimuth
//! φᵢ = (137.50776405°·i) mod 360° (the golden angle: the samples spread evenly around the cone).
//! - *Whole traces* ([`Workload::Trace`]): every ray of [`crate::optics::trace::trace`], fields and
//!   boundary problems included; checksum Σᵢ Σ_rays [P + d_x + 2 d_y + 3 d_z + 0.001 (x + y)],
//!   with P the ray's power, d its direction and (x, y) its exit point in mm. Computed by the
//!   planned whole trace (`optics::planned_trace`: the same rays to rounding), each incidence it
//!   declines by the general tracer (natively and in the design worker's WebAssembly; the page's
//!   module holds no plan and traces every sample by the general tracer); [`Workload::LaneTrace`]
//!   the same sum with the planned trace run on blocks of incidences side by side
//!   ([`BlockedTrace::sum_each`]: the same rays to the bit, summed as they leave the lanes, so the
//!   same checksum; natively and in the design worker's WebAssembly: the page's module holds no
//!   lanes and runs it as `Trace`);
//!   [`Workload::GeneralTrace`] is the same sum by the general tracer alone, the reference they
//!   are measured against.
//! - *Splits* ([`Workload::Split`]): the beams "oe" and "eo" by their wave-vector chains
//!   ([`crate::optics::chain`]), what a tolerance run of a splitter needs; checksum Σᵢ of the angle
//!   between them in degrees (samples where either is missing add nothing).

use crate::optics::chain::ChainPlan;
use crate::optics::geometry::direction;
use crate::optics::planar::PlanarTracer;
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
use crate::optics::planned_lanes::BlockedTrace;
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
use crate::optics::planned_trace::PlannedTrace;
use crate::optics::spots::power_of;
use crate::optics::stack::Stack;
use crate::optics::trace::trace_reusing;
use crate::optics::uniaxial::angle_between;
use nalgebra::Vector3;
use std::ops::Range;

/// What each sample computes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Workload {
    /// The whole trace: every ray with its fields, powers and points, by the planned trace.
    Trace,
    /// The same whole trace by the planned trace in blocks of incidences side by side.
    LaneTrace,
    /// The same whole trace by the general tracer at every sample.
    GeneralTrace,
    /// The angle between rays "oe" and "eo" only.
    Split,
}

/// Runs `n` samples of `work` on `stack` (its incident direction replaced sample by sample) and
/// returns the checksum of the module header, on the calling thread.
pub fn run(stack: &Stack, n: usize, work: Workload) -> f64 {
    run_on(stack, n, work, 1)
}

/// [`run`] on `threads` threads natively (at least one; WebAssembly always runs on the calling
/// thread), the samples split into contiguous parts whose sums are added in order. Every sample
/// is independent: only the order of the checksum's additions differs from one thread's.
pub fn run_on(stack: &Stack, n: usize, work: Workload, threads: usize) -> f64 {
    let threads = if cfg!(target_arch = "wasm32") {
        1
    } else {
        threads.clamp(1, n.max(1))
    };
    if threads == 1 {
        return run_part(stack, n, 0..n, work);
    }
    let per = n.div_ceil(threads);
    std::thread::scope(|scope| {
        let parts: Vec<_> = (0..threads)
            .map(|t| scope.spawn(move || run_part(stack, n, t * per..((t + 1) * per).min(n), work)))
            .collect();
        // A part that panicked adds NaN: the checksum cannot pass for a right one.
        parts.into_iter().map(|h| h.join().unwrap_or(f64::NAN)).sum()
    })
}

/// The incident direction of sample `i` of `n` (module header).
fn incidence(i: usize, n: usize) -> Vector3<f64> {
    let polar = (5.0 * (i as f64 + 0.5) / n as f64).to_radians();
    let azimuth = degrees_in_turn(137.507_764_05 * i as f64).to_radians();
    direction(polar, azimuth)
}

/// `x.rem_euclid(360.0)` for finite x ≥ 0, the same number by arithmetic instead of a call to
/// `fmod` (one per sample, a seventieth of the splitter's whole-trace time in WebAssembly,
/// profiled). Every step is exact: 360 k is (k < 2⁴⁷); x − 360 k is (Sterbenz: 360 k ≤ x < 2·360 k
/// for k ≥ 1); x/360 rounds up to k at most where x is just below 360 k, and then r is that tiny
/// negative remainder, and r + 360 the representable one `fmod` gives.
fn degrees_in_turn(x: f64) -> f64 {
    let r = x - 360.0 * (x / 360.0).floor();
    if r < 0.0 { r + 360.0 } else { r }
}

/// The checksum of samples `part` of `n`.
fn run_part(stack: &Stack, n: usize, part: Range<usize>, work: Workload) -> f64 {
    match work {
        Workload::Trace => planned_part(stack, n, part).0,
        Workload::LaneTrace => lane_part(stack, n, part).0,
        Workload::GeneralTrace => general_part(stack, n, part).0,
        Workload::Split => {
            let plans = (ChainPlan::new(stack, "oe"), ChainPlan::new(stack, "eo"));
            let (Some(oe), Some(eo)) = plans else { return 0.0 };
            part.map(|i| {
                let u = incidence(i, n);
                match (oe.follow(u), eo.follow(u)) {
                    (Some(a), Some(b)) => angle_between(&a.direction, &b.direction).to_degrees(),
                    _ => 0.0,
                }
            })
            .sum()
        }
    }
}

/// The general tracer kept over samples of one stack.
struct GeneralSamples {
    lit: Stack,
    planar: PlanarTracer,
}

impl GeneralSamples {
    fn new(stack: &Stack) -> GeneralSamples {
        GeneralSamples {
            lit: stack.clone(),
            planar: PlanarTracer::default(),
        }
    }

    /// The checksum's terms of one sample lit along `u` (module header).
    fn checksum(&mut self, u: Vector3<f64>) -> f64 {
        self.lit.input.direction = u;
        let stokes = self.lit.input.stokes;
        trace_reusing(&mut self.planar, &self.lit)
            .paths
            .iter()
            .map(|p| {
                let [x, y, _] = p.exit_point_mm;
                ray_term(power_of(&p.matrix, &stokes), &p.direction, x, y)
            })
            .sum()
    }
}

/// One ray's term of the whole-trace checksum (module header).
fn ray_term(power: f64, d: &Vector3<f64>, x: f64, y: f64) -> f64 {
    power + d.x + 2.0 * d.y + 3.0 * d.z + 0.001 * (x + y)
}

/// The whole-trace checksum of samples `part` of `n` by the planned trace, and how many samples
/// it declined (traced by the general tracer instead).
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
fn planned_part(stack: &Stack, n: usize, part: Range<usize>) -> (f64, usize) {
    let Some(mut plan) = PlannedTrace::new(stack) else {
        return general_part(stack, n, part);
    };
    let mut general = GeneralSamples::new(stack);
    let mut declined = 0;
    let sum = part
        .map(|i| {
            let u = incidence(i, n);
            match plan.trace(u) {
                Some(rays) => rays
                    .iter()
                    .map(|r| ray_term(r.power, &r.direction, r.exit_point_mm.x, r.exit_point_mm.y))
                    .sum(),
                None => {
                    declined += 1;
                    general.checksum(u)
                }
            }
        })
        .sum();
    (sum, declined)
}

/// Incidences per call of [`BlockedTrace::sum_each`]: a few thousand bytes of directions.
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
const LANE_CALL: usize = 256;

/// The whole-trace checksum of samples `part` of `n` by the planned trace in lanes, how many
/// samples it declined (traced by the general tracer instead) and how many it traced one by one
/// (declined ones included).
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
fn lane_part(stack: &Stack, n: usize, part: Range<usize>) -> (f64, usize, usize) {
    let Some(plan) = PlannedTrace::new(stack) else {
        let (sum, declined) = general_part(stack, n, part);
        return (sum, declined, declined);
    };
    let mut plan = BlockedTrace::new(plan);
    let mut general = GeneralSamples::new(stack);
    let (mut sum, mut declined, mut alone) = (0.0, 0, 0);
    let mut dirs = Vec::with_capacity(LANE_CALL);
    let mut start = part.start;
    while start < part.end {
        let end = (start + LANE_CALL).min(part.end);
        dirs.clear();
        dirs.extend((start..end).map(|i| incidence(i, n)));
        alone += plan.sum_each(
            &dirs,
            &mut sum,
            |power, d, exit| ray_term(power, d, exit.x, exit.y),
            |k| {
                declined += 1;
                general.checksum(dirs[k])
            },
        );
        start = end;
    }
    (sum, declined, alone)
}

/// The page's WebAssembly holds no lanes: the lanes' workload is the planned one's.
#[cfg(all(target_arch = "wasm32", not(feature = "design-worker")))]
fn lane_part(stack: &Stack, n: usize, part: Range<usize>) -> (f64, usize, usize) {
    let (sum, declined) = planned_part(stack, n, part);
    (sum, declined, declined)
}

/// The page's WebAssembly holds no plan (`optics/mod.rs`): every sample by the general tracer.
#[cfg(all(target_arch = "wasm32", not(feature = "design-worker")))]
fn planned_part(stack: &Stack, n: usize, part: Range<usize>) -> (f64, usize) {
    general_part(stack, n, part)
}

/// The whole-trace checksum of samples `part` of `n` by the general tracer, every sample counted
/// as declined by the plan.
fn general_part(stack: &Stack, n: usize, part: Range<usize>) -> (f64, usize) {
    let mut general = GeneralSamples::new(stack);
    let count = part.len();
    (part.map(|i| general.checksum(incidence(i, n))).sum(), count)
}

/// How many of the `n` whole-trace samples of `stack` the planned trace declines (each then traced
/// by the general tracer): all of them when the stack gets no plan.
pub fn declined_samples(stack: &Stack, n: usize) -> usize {
    planned_part(stack, n, 0..n).1
}

/// How many of the `n` whole-trace samples of `stack` the planned trace in lanes traces one by one
/// (`BlockedTrace::trace_each`: lanes it could not take to their end, declined samples included):
/// all of them when the stack gets no plan.
pub fn samples_traced_alone(stack: &Stack, n: usize) -> usize {
    lane_part(stack, n, 0..n).2
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::geometry::Plane;
    use crate::optics::interface::Losses;
    use crate::optics::jones;
    use crate::optics::material::Indices;
    use crate::optics::stack::{Contact, Element, Faces, InputBeam, Layer, Medium, Slab};
    use crate::optics::uniaxial::{OpticAxis, Uniaxial};
    use crate::optics::wavelength::Wavelength;

    #[test]
    fn the_azimuths_are_the_remainders_fmod_gives() {
        // Every sample's azimuth of a run of 10⁶, and numbers just below and at multiples of 360.
        let mut xs: Vec<f64> = (0..1_000_000).map(|i| 137.507_764_05 * i as f64).collect();
        for k in 1..2000u32 {
            let m = 360.0 * f64::from(k);
            xs.extend([m, m.next_down(), m.next_up(), m.next_down().next_down()]);
        }
        for x in xs {
            assert_eq!(degrees_in_turn(x).to_bits(), x.rem_euclid(360.0).to_bits(), "{x}");
        }
    }

    /// Two calcite-like wedges with crossed axes, contacted on a face tilted by 27°: the
    /// benchmark's kind of splitter.
    fn splitter() -> Stack {
        let calcite = |az: f64| {
            Medium::Uniaxial(Uniaxial::new(
                Indices::new(1.6557, 1.4849).unwrap(),
                OpticAxis::from_angles(90f64.to_radians(), az.to_radians()),
            ))
        };
        let inner = Plane {
            normal: direction(27f64.to_radians(), 0.0),
            point: Vector3::new(0.0, 0.0, 4.5),
        };
        let faces = |front, back, contact| Faces {
            front,
            back,
            aperture: None,
            contact,
        };
        let slab = |medium, gap_mm, faces| Layer {
            gap_mm,
            element: Element::Slab(Slab {
                medium,
                thickness_mm: 3.5,
                faces: Some(faces),
            }),
        };
        let j = jones::linear(45f64.to_radians());
        Stack {
            wavelength: Wavelength::from_nm(632.8).unwrap(),
            outside_index: 1.0,
            losses: Losses::Ideal,
            input: InputBeam {
                direction: Vector3::z(),
                diameter_mm: 1.0,
                jones: Some(j),
                stokes: jones::stokes(&j),
            },
            layers: vec![
                slab(calcite(0.0), 1.0, faces(Plane::across_z(1.0), inner, Contact::Outside)),
                slab(calcite(90.0), 0.0, faces(inner, Plane::across_z(8.0), Contact::Direct)),
            ],
            screen_mm: 0.0,
            cells: Vec::new(),
        }
    }

    /// The samples split over threads (two, three, seven) give the one-thread checksums of both
    /// workloads but for the order of the additions.
    #[test]
    fn threads_sum_what_one_thread_sums() {
        let st = splitter();
        for work in [
            Workload::Trace,
            Workload::LaneTrace,
            Workload::GeneralTrace,
            Workload::Split,
        ] {
            let one = run(&st, 300, work);
            assert!(one.is_finite() && one > 0.0, "{work:?}: {one}");
            for threads in [2, 3, 7] {
                let many = run_on(&st, 300, work, threads);
                assert!(
                    (one - many).abs() <= 1e-12 * one.abs(),
                    "{work:?} on {threads}: {one} vs {many}"
                );
            }
        }
    }
}
