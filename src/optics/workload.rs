//! The two-wedge benchmark's workload: one set-up traced over a spread of incidences, exactly as
//! the numpy baseline (`scripts/bench/splitter_numpy.py`) computes it, so that native code,
//! WebAssembly and numpy do the same work and agree on a checksum.
//!
//! Sample i of n lights the stack at polar angle θᵢ = 5°·(i + ½)/n and azimuth
//! φᵢ = (137.50776405°·i) mod 360° (the golden angle: the samples spread evenly around the cone).
//! - *Whole traces* ([`Workload::Trace`]): every ray of [`crate::optics::trace::trace`], fields and
//!   boundary problems included; checksum Σᵢ Σ_rays [P + d_x + 2 d_y + 3 d_z + 0.001 (x + y)],
//!   with P the ray's power, d its direction and (x, y) its exit point in mm.
//! - *Splits* ([`Workload::Split`]): the beams "oe" and "eo" by their wave-vector chains
//!   ([`crate::optics::chain`]), what a tolerance run of a splitter needs; checksum Σᵢ of the angle
//!   between them in degrees (samples where either is missing add nothing).

use crate::optics::chain::chain;
use crate::optics::geometry::direction;
use crate::optics::spots::power_of;
use crate::optics::stack::Stack;
use crate::optics::trace::trace;
use crate::optics::uniaxial::angle_between;

/// What each sample computes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Workload {
    /// The whole trace: every ray with its fields, powers and points.
    Trace,
    /// The angle between rays "oe" and "eo" only.
    Split,
}

/// Runs `n` samples of `work` on `stack` (its incident direction replaced sample by sample) and
/// returns the checksum of the module header.
pub fn run(stack: &Stack, n: usize, work: Workload) -> f64 {
    let mut lit = stack.clone();
    let mut sum = 0.0;
    for i in 0..n {
        let polar = (5.0 * (i as f64 + 0.5) / n as f64).to_radians();
        let azimuth = (137.507_764_05 * i as f64).rem_euclid(360.0).to_radians();
        lit.input.direction = direction(polar, azimuth);
        sum += match work {
            Workload::Trace => trace(&lit)
                .paths
                .iter()
                .map(|p| {
                    let d = p.direction;
                    let [x, y, _] = p.exit_point_mm;
                    power_of(&p.matrix, &lit.input.stokes) + d.x + 2.0 * d.y + 3.0 * d.z + 0.001 * (x + y)
                })
                .sum(),
            Workload::Split => match (chain(&lit, "oe"), chain(&lit, "eo")) {
                (Some(a), Some(b)) => angle_between(&a.direction, &b.direction).to_degrees(),
                _ => 0.0,
            },
        };
    }
    sum
}
