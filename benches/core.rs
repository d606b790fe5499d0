//! Native benchmarks of the core, run by `cargo bench --bench core` (see `scripts/bench.sh`);
//! `cargo bench --bench core -- splitter` runs the two-wedge splitter's whole traces alone.
//!
//! Figures are wall-clock medians over repeated runs on this machine, printed as one JSON line
//! for the comparison script; they are reported, never asserted (speed targets are met in
//! benchmarks, not in timed tests).
//!
//! - `trace`: full traces per second of a three-crystal stack (eight rays), result built.
//! - `walkoff_sweep`: 10⁶ closed-form walk-off values ρ(θ) over the cut tilt and their checksum,
//!   the same work the numpy baseline does with vectorized arrays (`scripts/bench/walkoff_numpy.py`
//!   sums its array too): through the core's dense sweep on two threads and on one, and point by
//!   point through `uniaxial::walkoff` for comparison.
//! - `exact_sweep`: 10⁵ walk-off values from the exact plane-wave modes (oblique incidence).
//! - `monte_carlo`: a 100 000-sample displacer tolerance run.
//! - `splitter_trace`: whole exact traces of the two-wedge splitter
//!   (`scripts/bench/two-wedge-splitter.json`) over 10⁵ incidences, the workload of
//!   [`doublespar::run_workload`], which the numpy baseline (`scripts/bench/splitter_numpy.py`)
//!   computes too, by the planned whole trace (`optics::planned_trace`; the incidences it
//!   declines, none here, by the general tracer; `splitter_trace_declined`), and by the general
//!   tracer alone for comparison (`splitter_general_trace`, one thread), and by the planned trace
//!   in lanes, blocks of incidences side by side (`splitter_lane_trace`; the lanes sent back to
//!   the one-by-one trace: `splitter_lane_trace_alone`); `splitter_split`: the
//!   same samples' split angles by wave-vector chains. Each on one thread and on the machine's
//!   threads (at most 8; `_threads` in the JSON line).
//! - `splitter_monte_carlo`: a 100 000-sample angular-splitter tolerance run.
//! - `mode_solve`: one solve of both forward modes at a face, per call over 10⁵ tangential wave
//!   vectors: the uniaxial closed form (`crystal_modes`), the general 4×4 solver
//!   (`general_modes`) on the same uniaxial crystal, and on a biaxial, optically active one.
//! - `lc_curve`: a 5CB cell's retardance at 200 voltages from 0 to 10 V, 100 sublayers, every
//!   voltage a director solve warm-started from the one before (`optics::lc::curve`).

use doublespar::Indices;
use doublespar::Scenario;
use doublespar::Wavelength;
use doublespar::Workload;
use doublespar::trace_scenario as trace;
use doublespar::walkoff;
use doublespar::{Anisotropic, Travel, Uniaxial, crystal_modes, general_modes, orientation};
use doublespar::{CellLayout, LC_SUBLAYERS, find_nematic, retardance_curve, voltage_grid};
use doublespar::{OpticAxis, plate_optics, tangential};
use std::hint::black_box;
use std::time::Instant;

const STACK: &str = r#"{"wavelength_nm": 632.8, "beam": {"incidence": {"polar_deg": 12, "azimuth_deg": 20}},
  "elements": [
    {"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45, "azimuth_deg": 0}},
    {"kind": "crystal", "material": "yvo4", "thickness_mm": 3, "axis": {"tilt_deg": 45, "azimuth_deg": 45}, "gap_mm": 1},
    {"kind": "crystal", "material": "quartz", "thickness_mm": 2, "axis": {"tilt_deg": 90, "azimuth_deg": 0}, "gap_mm": 1}]}"#;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.total_cmp(b));
    v[v.len() / 2]
}

fn time<F: FnMut() -> f64>(runs: usize, mut f: F) -> (f64, f64) {
    let mut times = Vec::with_capacity(runs);
    let mut check = 0.0;
    for _ in 0..runs {
        let t = Instant::now();
        check = black_box(f());
        times.push(t.elapsed().as_secs_f64());
    }
    (median(times), check)
}

/// The closed-form sweep over `n` tilts in [0, 90°], point by point through
/// `uniaxial::walkoff`: Σ ρ as a checksum.
pub fn walkoff_sweep(ix: Indices, n: usize) -> f64 {
    let step = std::f64::consts::FRAC_PI_2 / (n - 1) as f64;
    (0..n).map(|i| walkoff(ix, i as f64 * step)).sum()
}

/// The same sweep through the core's dense sweep on two threads (this machine's cores).
pub fn walkoff_sweep_dense(ix: Indices, out: &mut [f64]) -> f64 {
    doublespar::walkoff_sweep_parallel(ix, 0.0, std::f64::consts::FRAC_PI_2, out, 2);
    doublespar::checksum(out)
}

/// The n tangential wave vectors of the mode-solve benchmark: |q_t| up to 1.3, any azimuth.
fn tangentials(n: usize) -> Vec<[f64; 2]> {
    (0..n)
        .map(|i| {
            let (r, a) = (1.3 * (i as f64 / n as f64).sqrt(), 2.399963 * i as f64);
            [r * a.cos(), r * a.sin()]
        })
        .collect()
}

/// Σ Re q_z of both forward modes over `qts` by `solve`: the checksum of a mode-solve run.
fn mode_solves(qts: &[[f64; 2]], solve: impl Fn([f64; 2]) -> [doublespar::Mode; 2]) -> f64 {
    qts.iter()
        .map(|&qt| solve(black_box(qt)).iter().map(|m| m.qz().re).sum::<f64>())
        .sum()
}

/// The crystals of the mode-solve benchmark: a calcite-like uniaxial one by both solvers, and a
/// biaxial, optically active one (KTP-like indices, quartz-like chirality).
fn mode_crystals() -> (Uniaxial, Anisotropic, Anisotropic) {
    let (no, ne, tilt, az) = (1.6557, 1.4849, 0.7, 0.3);
    let closed = Uniaxial::new(Indices::new(no, ne).unwrap(), OpticAxis::from_angles(tilt, az));
    let same = Anisotropic::new([no, no, ne], orientation(tilt, az, 0.0), [0.0; 3]).unwrap();
    let general = Anisotropic::new([1.74, 1.75, 1.83], orientation(0.4, 1.1, -0.6), [3.5e-5, 3.5e-5, -2e-5]).unwrap();
    (closed, same, general)
}

/// What `cargo test` runs of this file (it passes no `--bench`): every part once at a small
/// size, so that the benchmark is known to run without the test suite paying for its timings.
fn smoke() {
    let sc = Scenario::from_json_str(STACK).unwrap();
    assert!(trace(&sc).unwrap().total_power > 0.0);
    let ix = Indices::new(1.6556901060179166, 1.484909030214121).unwrap();
    let mut buffer = vec![0.0; 1000];
    assert!((walkoff_sweep_dense(ix, &mut buffer) - walkoff_sweep(ix, 1000)).abs() < 1e-9);
    let (splitter, _) = Scenario::from_json_str(include_str!("../scripts/bench/two-wedge-splitter.json"))
        .unwrap()
        .resolve()
        .unwrap();
    assert!(doublespar::run_workload(&splitter, 100, Workload::Trace).is_finite());
    assert!(doublespar::run_workload(&splitter, 101, Workload::LaneTrace).is_finite());
    assert!(doublespar::run_workload(&splitter, 100, Workload::GeneralTrace).is_finite());
    assert!(doublespar::run_workload(&splitter, 100, Workload::Split) > 0.0);
    for request in [
        r#"{"kind": "displacer", "material": "calcite", "separation_mm": 2, "samples": 100, "seed": 1}"#,
        r#"{"kind": "angular-splitter", "material": "calcite", "split_angle_deg": 10, "samples": 100, "seed": 1}"#,
    ] {
        doublespar::solve_design_str(request).unwrap();
    }
    let (closed, same, _) = mode_crystals();
    let qts = tangentials(100);
    let a = mode_solves(&qts, |qt| crystal_modes(&closed, qt, Travel::Forward));
    let b = mode_solves(&qts, |qt| general_modes(&same, qt, Travel::Forward));
    assert!((a - b).abs() < 1e-9, "closed form {a} vs general {b}");
    let filter = Scenario::from_json_str(include_str!("../scripts/bench/five-stage-filter.json")).unwrap();
    assert_eq!(trace(&filter).unwrap().spectrum.unwrap().transmission.len(), 2000);
    assert_eq!(lc_curve(10).len(), 10);
    println!("benchmark smoke run: every part runs (time it with cargo bench --bench core)");
}

/// A twisted 5CB cell's retardance at `n` voltages from 0 to 10 V (see the header).
fn lc_curve(n: usize) -> Vec<f64> {
    let lc = find_nematic("5cb").unwrap().at(0.633, 25.0);
    let cell = CellLayout {
        thickness_um: 5.0,
        rubbing_rad: 0.0,
        twist_rad: 0.0,
        pretilt_rad: 2f64.to_radians(),
    };
    retardance_curve(&lc, &cell, 0.633, &voltage_grid(10.0, n), LC_SUBLAYERS)
}

/// Incidences of the two-wedge benchmark.
const SPLITTER_SAMPLES: usize = 100_000;

/// The two-wedge splitter of the benchmark, resolved.
fn two_wedge_splitter() -> doublespar::Stack {
    Scenario::from_json_str(include_str!("../scripts/bench/two-wedge-splitter.json"))
        .unwrap()
        .resolve()
        .unwrap()
        .0
}

/// The machine's threads for the splitter rows (at most 8).
fn splitter_threads() -> usize {
    std::thread::available_parallelism().map_or(1, |t| t.get()).min(8)
}

/// The splitter's whole traces: by the planned trace one by one, in lanes, and by the general
/// tracer alone, on one thread and on the machine's threads, with their checksums checked.
struct WholeTraces {
    threads: usize,
    planned: (f64, f64),
    planned_threads: f64,
    lanes: (f64, f64),
    lanes_threads: f64,
    general: (f64, f64),
    declined: usize,
    alone: usize,
}

impl WholeTraces {
    fn run(splitter: &doublespar::Stack) -> WholeTraces {
        let n = SPLITTER_SAMPLES;
        let threads = splitter_threads();
        let on = |work, threads| doublespar::run_workload_on(black_box(splitter), n, work, threads);
        let planned = time(5, || on(Workload::Trace, 1));
        let lanes = time(9, || on(Workload::LaneTrace, 1));
        let general = time(3, || on(Workload::GeneralTrace, 1));
        for (what, (_, sum)) in [("planned", planned), ("lanes", lanes)] {
            assert!(
                (sum - general.1).abs() < 1e-12 * general.1.abs(),
                "{what} {sum} vs general {}",
                general.1
            );
        }
        // The same samples split over the machine's threads: the same sums but for the order of
        // the additions.
        let planned_threads = time(5, || on(Workload::Trace, threads));
        let lanes_threads = time(9, || on(Workload::LaneTrace, threads));
        for (one, many) in [(planned.1, planned_threads.1), (lanes.1, lanes_threads.1)] {
            assert!(
                (one - many).abs() < 1e-9 * one.abs(),
                "one thread {one} vs {threads} threads {many}"
            );
        }
        WholeTraces {
            threads,
            planned,
            planned_threads: planned_threads.0,
            lanes,
            lanes_threads: lanes_threads.0,
            general,
            declined: doublespar::declined_samples(splitter, n),
            alone: doublespar::samples_traced_alone(splitter, n),
        }
    }

    fn print(&self) {
        let threads = self.threads;
        println!(
            "two-wedge splitter, 10^5 whole traces (4 rays each): {:.1} ms on one thread, {:.1} ms on {threads}, {:.0} traces/s on {threads} (checksum {:.12e}; {} samples declined by the plan); by the general tracer alone {:.1} ms on one thread (checksum {:.12e})",
            self.planned.0 * 1e3,
            self.planned_threads * 1e3,
            SPLITTER_SAMPLES as f64 / self.planned_threads,
            self.planned.1,
            self.declined,
            self.general.0 * 1e3,
            self.general.1
        );
        println!(
            "two-wedge splitter, 10^5 whole traces in lanes ({} side by side): {:.1} ms on one thread, {:.1} ms on {threads} (checksum {:.12e}; {} samples traced one by one)",
            doublespar::PLANNED_LANES,
            self.lanes.0 * 1e3,
            self.lanes_threads * 1e3,
            self.lanes.1,
            self.alone
        );
    }

    /// Its fields of the JSON line, without braces.
    fn json_fields(&self) -> String {
        format!(
            "\"splitter_trace_1e5_ms\":{:.4},\"splitter_trace_checksum\":{:e},\"splitter_trace_declined\":{},\"splitter_general_trace_1e5_ms\":{:.4},\"splitter_lane_trace_1e5_ms\":{:.4},\"splitter_lane_trace_threads_1e5_ms\":{:.4},\"splitter_lane_trace_checksum\":{:e},\"splitter_lane_trace_alone\":{},\"splitter_threads\":{},\"splitter_trace_threads_1e5_ms\":{:.4}",
            self.planned.0 * 1e3,
            self.planned.1,
            self.declined,
            self.general.0 * 1e3,
            self.lanes.0 * 1e3,
            self.lanes_threads * 1e3,
            self.lanes.1,
            self.alone,
            self.threads,
            self.planned_threads * 1e3
        )
    }
}

fn main() {
    if !std::env::args().any(|a| a == "--bench") {
        smoke();
        return;
    }
    // `cargo bench --bench core -- splitter`: the two-wedge splitter's whole traces alone.
    if std::env::args().any(|a| a == "splitter") {
        let whole = WholeTraces::run(&two_wedge_splitter());
        whole.print();
        println!("{{\"bench\":\"doublespar-native\",{}}}", whole.json_fields());
        return;
    }
    let sc = Scenario::from_json_str(STACK).unwrap();
    let (t_trace, _) = time(7, || {
        let mut s = 0.0;
        for _ in 0..2000 {
            s += trace(black_box(&sc)).unwrap().total_power;
        }
        s
    });
    let traces_per_s = 2000.0 / t_trace;

    let ix = Indices::new(1.6556901060179166, 1.484909030214121).unwrap();
    let (t_pointwise, sum_pointwise) = time(9, || walkoff_sweep(black_box(ix), 1_000_000));
    let mut buffer = vec![0.0; 1_000_000];
    let (t_sweep, sum) = time(21, || walkoff_sweep_dense(black_box(ix), &mut buffer));
    let (t_single, _) = time(21, || {
        doublespar::walkoff_sweep_into(black_box(ix), 0.0, std::f64::consts::FRAC_PI_2, &mut buffer);
        doublespar::checksum(&buffer)
    });
    assert!(
        (sum - sum_pointwise).abs() < 1e-8,
        "dense {sum} vs pointwise {sum_pointwise}"
    );

    let wl = Wavelength::from_nm(632.8).unwrap();
    let qt = tangential(1.0, 10f64.to_radians(), 30f64.to_radians());
    let (t_exact, _) = time(7, || {
        (0..100_000)
            .filter_map(|i| {
                let tilt = (90.0 * i as f64 / 99_999.0).to_radians();
                plate_optics(ix, OpticAxis::from_angles(tilt, 15f64.to_radians()), 1.0, wl, qt)
            })
            .map(|p| p.walkoff_rad)
            .sum()
    });

    let request = r#"{"kind": "displacer", "material": "calcite", "separation_mm": 2, "samples": 100000, "seed": 1}"#;
    let (t_mc, _) = time(5, || {
        doublespar::solve_design_str(request).unwrap()["monte_carlo"]["std"]
            .as_f64()
            .unwrap()
    });

    let splitter = two_wedge_splitter();
    let n = SPLITTER_SAMPLES;
    let threads = splitter_threads();
    let whole = WholeTraces::run(&splitter);
    let (t_split, split_sum) = time(7, || doublespar::run_workload(black_box(&splitter), n, Workload::Split));
    let (t_split_threads, split_sum_threads) = time(7, || {
        doublespar::run_workload_on(black_box(&splitter), n, Workload::Split, threads)
    });
    assert!(
        (split_sum - split_sum_threads).abs() < 1e-9 * split_sum.abs(),
        "one thread {split_sum} vs {threads} threads {split_sum_threads}"
    );
    let splitter_request =
        r#"{"kind": "angular-splitter", "material": "calcite", "split_angle_deg": 10, "samples": 100000, "seed": 1}"#;
    let (t_splitter_mc, _) = time(7, || {
        doublespar::solve_design_str(splitter_request).unwrap()["split_angle_spread"]["std"]
            .as_f64()
            .unwrap()
    });

    // A 2 000-point spectrum of a five-stage filter (scripts/bench/five-stage-filter.json; its
    // numpy baseline is scripts/bench/spectrum_numpy.py): every point a whole trace.
    let filter = Scenario::from_json_str(include_str!("../scripts/bench/five-stage-filter.json")).unwrap();
    let (t_spectrum, spectrum_sum) = time(7, || {
        let r = trace(black_box(&filter)).unwrap();
        r.spectrum.unwrap().transmission.iter().flatten().sum::<f64>()
    });

    let (t_lc, lc_sum) = time(7, || lc_curve(black_box(200)).iter().sum::<f64>());
    println!(
        "liquid-crystal cell, retardance at 200 voltages (100 sublayers): {:.2} ms (checksum {lc_sum:.12e})",
        t_lc * 1e3
    );

    let (closed, same, general) = mode_crystals();
    let qts = tangentials(100_000);
    let (t_closed, sum_closed) = time(7, || {
        mode_solves(&qts, |qt| crystal_modes(&closed, qt, Travel::Forward))
    });
    let (t_same, sum_same) = time(7, || mode_solves(&qts, |qt| general_modes(&same, qt, Travel::Forward)));
    let (t_general, _) = time(7, || {
        mode_solves(&qts, |qt| general_modes(&general, qt, Travel::Forward))
    });
    assert!(
        (sum_closed - sum_same).abs() < 1e-6,
        "closed form {sum_closed} vs general {sum_same}"
    );
    let per_call_ns = |t: f64| t / qts.len() as f64 * 1e9;
    println!(
        "mode solve (both forward modes at a face), per call: {:.0} ns uniaxial closed form, {:.0} ns general 4x4 solver on the same crystal, {:.0} ns biaxial chiral",
        per_call_ns(t_closed),
        per_call_ns(t_same),
        per_call_ns(t_general)
    );
    whole.print();
    println!(
        "two-wedge splitter, 10^5 split angles by wave-vector chains: {:.2} ms on one thread, {:.2} ms on {threads} (checksum {split_sum:.12e})",
        t_split * 1e3,
        t_split_threads * 1e3
    );
    println!(
        "Monte Carlo angular splitter, 10^5 samples: {:.1} ms",
        t_splitter_mc * 1e3
    );
    println!(
        "trace (3 crystals, 8 rays): {traces_per_s:.0} traces/s ({:.1} µs each)",
        1e6 / traces_per_s
    );
    println!(
        "closed-form walk-off sweep, 10^6 points: {:.2} ms dense on 2 threads, {:.2} ms on one, {:.2} ms point by point (checksum {sum:.12e})",
        t_sweep * 1e3,
        t_single * 1e3,
        t_pointwise * 1e3
    );
    println!("exact-mode walk-off sweep, 10^5 points: {:.2} ms", t_exact * 1e3);
    println!("Monte Carlo displacer, 10^5 samples: {:.1} ms", t_mc * 1e3);
    println!(
        "{{\"bench\":\"doublespar-native\",\"trace_per_s\":{traces_per_s:.1},\"walkoff_sweep_1e6_ms\":{:.4},\"walkoff_sweep_pointwise_1e6_ms\":{:.4},\"walkoff_sweep_one_thread_1e6_ms\":{:.4},\"walkoff_sweep_checksum\":{sum:e},\"exact_sweep_1e5_ms\":{:.4},\"monte_carlo_1e5_ms\":{:.4},{},\"splitter_split_1e5_ms\":{:.4},\"splitter_split_checksum\":{split_sum:e},\"splitter_split_threads_1e5_ms\":{:.4},\"splitter_monte_carlo_1e5_ms\":{:.4},\"mode_solve_closed_ns\":{:.1},\"mode_solve_general_ns\":{:.1},\"mode_solve_biaxial_chiral_ns\":{:.1},\"spectrum_2000_ms\":{:.4},\"spectrum_checksum\":{spectrum_sum:e},\"lc_curve_200_ms\":{:.4},\"lc_curve_checksum\":{lc_sum:e}}}",
        t_sweep * 1e3,
        t_pointwise * 1e3,
        t_single * 1e3,
        t_exact * 1e3,
        t_mc * 1e3,
        whole.json_fields(),
        t_split * 1e3,
        t_split_threads * 1e3,
        t_splitter_mc * 1e3,
        per_call_ns(t_closed),
        per_call_ns(t_same),
        per_call_ns(t_general),
        t_spectrum * 1e3,
        t_lc * 1e3
    );
}
