//! Dense sweeps of the closed-form walk-off against the cut angle: the fast path behind walk-off
//! plots and the benchmarks, checked against the direct formula point by point.

use crate::optics::material::Indices;

/// Closed-form walk-off ρ (radians, signed as [`crate::optics::uniaxial::walkoff`]) at normal incidence
/// for `out.len()` cut angles evenly spaced from `theta0` to `theta1` (radians), written into
/// `out`: the dense sweep behind walk-off plots and the benchmark.
///
/// Formula: with the double angle φ = 2θ, ρ = atan2(y, x) with y = ½(n_o² − n_e²) sin φ and
/// x = ½(n_e² + n_o²) + ½(n_e² − n_o²) cos φ = n_e² cos²θ + n_o² sin²θ > 0 (Born & Wolf,
/// *Principles of Optics*, §15.3, in double-angle form).
///
/// Method: the samples go in blocks of `SWEEP_BLOCK`. Each block starts from an exact anchor
/// φ₀ (one `sin_cos` and one `atan2`); the block's k-th sample has sin and cos of φ₀ + kΔφ by
/// angle addition from a table of sin kΔφ, cos kΔφ computed once per sweep, and its ρ from the
/// atan2 difference identity ρ_k = ρ₀ + atan(u), u = (y_k x₀ − x_k y₀)/(x_k x₀ + y_k y₀) (exact
/// while both points lie in the half-plane x > 0, as they always do here). When |u| ≤
/// `SWEEP_SERIES_LIMIT`, atan u = u − u³/3 + u⁵/5 to within |u|⁷/7 < 2·10⁻²¹, below the rounding
/// of ρ₀; a block with a larger |u| (a coarse sweep) is computed sample by sample with `atan2`.
/// No sample depends on the one before it, so the loop has no carried chain and vectorizes. The
/// values agree with the direct formula to ~1e-15 (tested).
///
/// Degenerate case: an empty `out` does nothing; one sample is taken at `theta0`.
pub fn walkoff_sweep_into(indices: Indices, theta0: f64, theta1: f64, out: &mut [f64]) {
    let n = out.len();
    if n == 0 {
        return;
    }
    let (no2, ne2) = (indices.no * indices.no, indices.ne * indices.ne);
    let (half_a, mean, half_d) = (0.5 * (no2 - ne2), 0.5 * (ne2 + no2), 0.5 * (ne2 - no2));
    let dphi = if n > 1 {
        2.0 * (theta1 - theta0) / (n - 1) as f64
    } else {
        0.0
    };
    let mut rot_sin = [0.0; SWEEP_BLOCK];
    let mut rot_cos = [1.0; SWEEP_BLOCK];
    for (k, (rs, rc)) in rot_sin.iter_mut().zip(rot_cos.iter_mut()).enumerate() {
        (*rs, *rc) = (dphi * k as f64).sin_cos();
    }
    for (b, block) in out.chunks_mut(SWEEP_BLOCK).enumerate() {
        let phi0 = 2.0 * theta0 + dphi * (b * SWEEP_BLOCK) as f64;
        let (s0, c0) = phi0.sin_cos();
        let (y0, x0) = (half_a * s0, mean + half_d * c0);
        let rho0 = y0.atan2(x0);
        let mut within = true;
        for ((v, &rs), &rc) in block.iter_mut().zip(&rot_sin).zip(&rot_cos) {
            let (s, c) = (s0 * rc + c0 * rs, c0 * rc - s0 * rs);
            let (y, x) = (half_a * s, mean + half_d * c);
            let u = (y * x0 - x * y0) / (x * x0 + y * y0);
            let u2 = u * u;
            *v = rho0 + u * (1.0 - u2 * (1.0 / 3.0 - 0.2 * u2));
            within &= u.abs() <= SWEEP_SERIES_LIMIT;
        }
        if !within {
            for (k, v) in block.iter_mut().enumerate() {
                let (s, c) = (phi0 + dphi * k as f64).sin_cos();
                *v = (half_a * s).atan2(mean + half_d * c);
            }
        }
    }
}

/// Σ `values` in four interleaved partial sums (so the additions vectorize), added at the end:
/// the checksum of a dense sweep in the benchmarks. Differs from a left-to-right sum only by
/// rounding.
pub fn checksum(values: &[f64]) -> f64 {
    let mut lanes = [0.0; 4];
    let mut quads = values.chunks_exact(4);
    for q in &mut quads {
        for (l, v) in lanes.iter_mut().zip(q) {
            *l += v;
        }
    }
    let tail: f64 = quads.remainder().iter().sum();
    (lanes[0] + lanes[1]) + (lanes[2] + lanes[3]) + tail
}

/// Samples per exactly anchored block in [`walkoff_sweep_into`].
pub const SWEEP_BLOCK: usize = 64;

/// Largest |u| for which [`walkoff_sweep_into`] takes atan u from its series.
pub const SWEEP_SERIES_LIMIT: f64 = 1e-3;

/// [`walkoff_sweep_into`] split over `threads` threads (natively; one thread on WebAssembly),
/// each filling its own contiguous part: identical values, shared work.
///
/// Degenerate cases: `threads` is taken as 1 when 0 and as 64 when larger (it is a work split,
/// not an input a user gives); sweeps under 4096 samples run on the calling thread.
pub fn walkoff_sweep_parallel(indices: Indices, theta0: f64, theta1: f64, out: &mut [f64], threads: usize) {
    let n = out.len();
    let threads = if cfg!(target_arch = "wasm32") {
        1
    } else {
        threads.clamp(1, 64)
    };
    if threads == 1 || n < 4096 {
        return walkoff_sweep_into(indices, theta0, theta1, out);
    }
    let step = if n > 1 { (theta1 - theta0) / (n - 1) as f64 } else { 0.0 };
    // Chunk boundaries on anchor multiples, so every thread's anchors fall where one thread's would.
    let per = n.div_ceil(threads).div_ceil(SWEEP_BLOCK) * SWEEP_BLOCK;
    std::thread::scope(|scope| {
        for (k, part) in out.chunks_mut(per).enumerate() {
            let start = k * per;
            let (a, b) = (
                theta0 + step * start as f64,
                theta0 + step * (start + part.len() - 1) as f64,
            );
            scope.spawn(move || walkoff_sweep_into(indices, a, b, part));
        }
    });
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Largest |dense − direct| over a sweep, the direct value from `uniaxial::walkoff`.
    fn worst_against_direct(ix: Indices, theta0: f64, theta1: f64, n: usize, threads: usize) -> f64 {
        let mut out = vec![0.0; n];
        walkoff_sweep_parallel(ix, theta0, theta1, &mut out, threads);
        let step = if n > 1 { (theta1 - theta0) / (n - 1) as f64 } else { 0.0 };
        out.iter()
            .enumerate()
            .map(|(i, v)| (v - crate::optics::uniaxial::walkoff(ix, theta0 + step * i as f64)).abs())
            .fold(0.0, f64::max)
    }

    // Independent method: the direct closed form of the walk-off (Born & Wolf, Principles of
    // Optics, §15.3) evaluated point by point through `uniaxial::walkoff`, against the blocked
    // series of the dense sweep.
    #[test]
    fn the_dense_sweep_agrees_with_the_direct_formula() {
        use std::f64::consts::{FRAC_PI_2, PI};
        // Negative (calcite-like) and strongly positive uniaxial indices; dense sweeps take the
        // series path, coarse ones (|u| > the limit) the per-sample atan2 path.
        let crystals = [Indices::new(1.6557, 1.4849).unwrap(), Indices::new(2.0, 3.2).unwrap()];
        for ix in crystals {
            for (theta0, theta1, n) in [
                (0.0, FRAC_PI_2, 1_000_001),
                (-PI, PI, 100_003),
                (0.3, 0.2, 4097),
                (0.0, FRAC_PI_2, 91),
                (1.0, 1.0, 7),
            ] {
                for threads in [1, 2] {
                    let worst = worst_against_direct(ix, theta0, theta1, n, threads);
                    assert!(worst < 2e-15, "{ix:?} {theta0}..{theta1} ×{n} on {threads}: {worst:e}");
                }
            }
        }
        let mut one = [0.0];
        walkoff_sweep_into(crystals[0], 0.3, 0.3, &mut one);
        assert!((one[0] - crate::optics::uniaxial::walkoff(crystals[0], 0.3)).abs() < 1e-15);
        walkoff_sweep_into(crystals[0], 0.3, 0.3, &mut []);
    }

    #[test]
    fn the_checksum_is_the_sum() {
        assert_eq!(checksum(&[]), 0.0);
        assert_eq!(checksum(&[1.5, 2.0, -0.25]), 3.25);
        let v: Vec<f64> = (1..=1001).map(f64::from).collect();
        assert_eq!(checksum(&v), 501_501.0);
    }
}
