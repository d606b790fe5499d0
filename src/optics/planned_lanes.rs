//! The planned whole trace in blocks: [`LANES`] incidences of one plan traced side by side by
//! the planned trace's kernel at that lane width ([`crate::optics::planned_trace`]: each number
//! held as one f64 per incidence, so that the compiler turns every operation into one vector
//! instruction), the incidences a block cannot finish handed to the one-by-one trace, which is
//! the same kernel at one lane.
//!
//! What is left to the one-by-one trace. A lane is marked and traced again by
//! [`PlannedTrace::trace`] (which may in turn decline it to the general tracer) when anything
//! would make the trace leave its straight path: a mode evanescent or within the critical margin
//! of it, a wave along an optic axis, a singular boundary problem, and also a ray that misses a
//! plane, an aperture or the screen (one by one, that ray is dropped and the others kept; a block
//! keeps only incidences where every ray goes through, so that its rays are the same in every
//! lane). So the blocks give the rays of the one-by-one trace for the incidences they keep, in
//! the same order and with the same bits. [`BlockedTrace::trace_each`] hands on each incidence's
//! rays as a list; [`BlockedTrace::sum_each`] sums a term of them straight from the block's
//! numbers, in the same order, for a workload that needs only the sum (the benchmark's checksum).
//!
//! Builds. Rust does not fuse a product and a sum unless asked (no `mul_add` in the kernel), and
//! IEEE division and square root are correctly rounded on every instruction set: the kernel
//! compiled for AVX2 or AVX-512 ([`trace_lanes`] picks one at run time) and the portable build
//! give the same bits. Eight lanes rather than four: one AVX-512 register per number took about a
//! tenth less time than one AVX2 register on this kind of processor, and sixteen (two registers)
//! no less.
//!
//! In the design worker's WebAssembly (built with its 128-bit SIMD, two f64 per register) a block
//! is four lanes. At eight, LLVM turns the kernel's lane loops into f64x2 instructions all the
//! same (four per operation), but the engine's code for them keeps a number in four of its sixteen
//! vector registers and spends a third of the crossings' time moving values to and from the stack
//! (profiled under Node with `perf`); at four the spills are fewer and the blocks took about a tenth
//! less time (10⁵ splitter traces, least CPU time of 11–15 interleaved runs at load 2.6–3.5: 80–89
//! ms against 92–99 ms; two lanes 103 ms, one by one 135 ms), and the module grows by 35 KB
//! instead of 59 KB. Latest, with the kernel's arithmetic, comparisons and choices written out as
//! f64x2 pairs there (`planned_trace`'s `pairs`), the flights moved on in place and the checksum
//! summed straight from the blocks ([`BlockedTrace::sum_each`]): least CPU time of 11 runs, in
//! interleaved sets at load 1.4–3, 52–55 ms in blocks of four against 64–70 ms before; eight
//! lanes took 62–64 ms and two 69–73 ms with the pairs, so four stays.

#[cfg(target_arch = "x86_64")]
use crate::optics::planned_trace::{AVX2, AVX512};
use crate::optics::planned_trace::{LaneBuffers, PORTABLE, PlannedRay, PlannedTrace, lane_rays, trace_block};
use nalgebra::Vector3;

/// Incidences per block: eight f64 fill one AVX-512 register (two AVX2 registers); four in
/// WebAssembly (module header).
pub const LANES: usize = if cfg!(target_arch = "wasm32") { 4 } else { 8 };

/// [`trace_block`] compiled for AVX2.
///
/// # Safety
/// The processor must have AVX2 and FMA.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn trace_block_avx2(plan: &PlannedTrace, buffers: &mut LaneBuffers<LANES>, dirs: &[Vector3<f64>; LANES]) {
    trace_block::<AVX2, LANES>(plan, buffers, dirs, false)
}

/// [`trace_block`] compiled for AVX-512.
///
/// # Safety
/// The processor must have AVX-512 F, DQ and VL.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx512dq,avx512vl,avx2,fma")]
unsafe fn trace_block_avx512(plan: &PlannedTrace, buffers: &mut LaneBuffers<LANES>, dirs: &[Vector3<f64>; LANES]) {
    trace_block::<AVX512, LANES>(plan, buffers, dirs, false)
}

/// Which build of the lane kernel traces the blocks: all give the same bits (module header).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LaneBuild {
    /// The widest the processor runs: AVX-512, else AVX2 with FMA, else the portable one.
    Widest,
    /// AVX2 with FMA where the processor has them, else the portable one.
    Avx2,
    /// The target's baseline instructions.
    Portable,
}

/// A planned trace with the buffers its blocks reuse: traces many incidences, [`LANES`] side by
/// side, and hands a lane the block cannot finish to [`PlannedTrace::trace`].
pub struct BlockedTrace {
    plan: PlannedTrace,
    lanes: LaneBuffers<LANES>,
    build: LaneBuild,
    rays: Vec<PlannedRay>,
}

impl BlockedTrace {
    /// Blocks of `plan`'s trace, by the widest build this processor has.
    pub fn new(plan: PlannedTrace) -> BlockedTrace {
        BlockedTrace {
            plan,
            lanes: LaneBuffers::default(),
            build: LaneBuild::Widest,
            rays: Vec::new(),
        }
    }

    /// The plan, to trace one incidence alone.
    pub fn plan(&mut self) -> &mut PlannedTrace {
        &mut self.plan
    }

    /// Which build of the lane kernel [`BlockedTrace::trace_each`] uses ([`LaneBuild::Widest`]
    /// unless set): all give the same bits (module header); tests compare them.
    pub fn use_lane_build(&mut self, build: LaneBuild) {
        self.build = build;
    }

    /// Traces every incidence of `dirs` (unit directions, u_z > 0) and hands each one's rays to
    /// `each` in order, with its index: what [`PlannedTrace::trace`] gives for it, `None` where
    /// the plan declines it (the caller then traces it with the general tracer). Incidences go
    /// through in blocks of [`LANES`] side by side; a lane the block cannot take to its end is
    /// traced again by [`PlannedTrace::trace`] alone (`each`'s third argument true). Returns how
    /// many were traced so, declined ones included.
    pub fn trace_each(
        &mut self,
        dirs: &[Vector3<f64>],
        mut each: impl FnMut(usize, Option<&[PlannedRay]>, bool),
    ) -> usize {
        let mut alone = 0;
        for (b, chunk) in dirs.chunks(LANES).enumerate() {
            // A short last block repeats its last incidence; the repeats are not handed on.
            let block: [Vector3<f64>; LANES] = std::array::from_fn(|i| chunk[i.min(chunk.len() - 1)]);
            trace_lanes(&self.plan, &mut self.lanes, &block, self.build);
            for (i, &u) in chunk.iter().enumerate() {
                if self.lanes.rays.ok[i] {
                    lane_rays(&self.lanes.rays, i, &mut self.rays);
                    each(b * LANES + i, Some(&self.rays), false);
                } else {
                    alone += 1;
                    each(b * LANES + i, self.plan.trace(u), true);
                }
            }
        }
        alone
    }

    /// What [`BlockedTrace::trace_each`] gives, summed: adds to `total`, incidence by incidence
    /// in order, the sum of `term(power, direction, exit point)` over its rays in order, or
    /// `declined(index)` where the plan declines it. The same additions in the same order as
    /// summing what `trace_each` hands on, so the same bits, without listing any lane's rays.
    /// Returns how many were traced one by one, declined ones included.
    pub fn sum_each(
        &mut self,
        dirs: &[Vector3<f64>],
        total: &mut f64,
        term: impl Fn(f64, &Vector3<f64>, &Vector3<f64>) -> f64,
        mut declined: impl FnMut(usize) -> f64,
    ) -> usize {
        let mut alone = 0;
        for (b, chunk) in dirs.chunks(LANES).enumerate() {
            let block: [Vector3<f64>; LANES] = std::array::from_fn(|i| chunk[i.min(chunk.len() - 1)]);
            trace_lanes(&self.plan, &mut self.lanes, &block, self.build);
            let rays = &self.lanes.rays;
            for (i, &u) in chunk.iter().enumerate() {
                // (An iterator's sum starts from −0, which adds nothing to the first term.)
                let mut sum = -0.0;
                if rays.ok[i] {
                    for r in (0..rays.count).filter(|&r| rays.alive[r][i]) {
                        sum += term(rays.power[r][i], &rays.direction[r][i], &rays.exit[r][i]);
                    }
                } else {
                    alone += 1;
                    match self.plan.trace(u) {
                        Some(one) => {
                            for r in one {
                                sum += term(r.power, &r.direction, &r.exit_point_mm);
                            }
                        }
                        None => sum = declined(b * LANES + i),
                    }
                }
                *total += sum;
            }
        }
        alone
    }
}

/// Traces one block of [`LANES`] incidences by `build`; `buffers.rays.ok` marks the lanes taken
/// to their end.
pub(crate) fn trace_lanes(
    plan: &PlannedTrace,
    buffers: &mut LaneBuffers<LANES>,
    dirs: &[Vector3<f64>; LANES],
    build: LaneBuild,
) {
    #[cfg(target_arch = "x86_64")]
    {
        use std::arch::is_x86_feature_detected as has;
        let avx2 = build != LaneBuild::Portable && has!("avx2") && has!("fma");
        if build == LaneBuild::Widest && avx2 && has!("avx512f") && has!("avx512dq") && has!("avx512vl") {
            // SAFETY: the processor has just been found to have every instruction set that
            // `trace_block_avx512` is compiled for, its one requirement.
            return unsafe { trace_block_avx512(plan, buffers, dirs) };
        }
        if avx2 {
            // SAFETY: as above, for `trace_block_avx2`.
            return unsafe { trace_block_avx2(plan, buffers, dirs) };
        }
    }
    let _ = build;
    trace_block::<PORTABLE, LANES>(plan, buffers, dirs, false)
}
