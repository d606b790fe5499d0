//! A cell's retardance against voltage: the director solved at each voltage of a sweep, each
//! solve starting from the previous voltage's profile (continuation), which turns a cold Newton
//! solve of 10–20 steps into 2–6.
//!
//! The retardance is the contract's (1/λ) ∫ (n_eff(θ(z)) − n_o) dz at normal incidence
//! ([`Profile::retardance_waves`]); the voltages are taken in the order given (an ascending sweep
//! gets the most from the warm starts, but any order gives the same values to the solver's
//! tolerance).

use crate::optics::lc::director::{CellLayout, Profile, solve};
use crate::optics::lc::nematic::Nematic;

/// The retardance (waves) at each of `voltages` (RMS volts), on `sublayers` sublayers, at
/// `wavelength_um`.
pub fn retardance_curve(
    lc: &Nematic,
    cell: &CellLayout,
    wavelength_um: f64,
    voltages: &[f64],
    sublayers: usize,
) -> Vec<f64> {
    let mut last: Option<Profile> = None;
    voltages
        .iter()
        .map(|&v| {
            let p = solve(lc, cell, v, sublayers, last.as_ref());
            let r = p.retardance_waves(lc, cell.thickness_um, wavelength_um);
            last = Some(p);
            r
        })
        .collect()
}

/// `n` voltages evenly from 0 to `top` (inclusive); at least two.
pub fn voltage_grid(top: f64, n: usize) -> Vec<f64> {
    let n = n.max(2);
    (0..n).map(|i| top * i as f64 / (n - 1) as f64).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::lc::catalogue::find;
    use crate::precision::{LC_SUBLAYERS, assert_within};

    /// The swept curve equals cold solves at each voltage (to 10⁻⁸ waves), falls monotonically
    /// from (n_eff(pretilt) − n_o) d/λ, and is flat (pretilt 0) below the Freedericksz threshold.
    #[test]
    fn sweep_matches_cold_solves() {
        let lc = find("5cb").unwrap().at(0.633, 25.0);
        let cell = CellLayout {
            thickness_um: 5.0,
            rubbing_rad: 0.0,
            twist_rad: 0.0,
            pretilt_rad: 0.0,
        };
        let vs = voltage_grid(6.0, 31);
        let curve = retardance_curve(&lc, &cell, 0.633, &vs, LC_SUBLAYERS);
        let vth = lc.threshold_v(0.0);
        let top = (lc.ne - lc.no) * 5.0 / 0.633;
        for (i, (&v, &r)) in vs.iter().zip(&curve).enumerate() {
            let cold = solve(&lc, &cell, v, LC_SUBLAYERS, None).retardance_waves(&lc, 5.0, 0.633);
            assert_within(r, cold, 1e-8, &format!("warm against cold at {v} V"));
            if v < 0.99 * vth {
                assert_within(r, top, 1e-12, "flat below threshold");
            }
            if i > 0 {
                assert!(r <= curve[i - 1] + 1e-12, "{v} V: {r} after {}", curve[i - 1]);
            }
        }
    }
}
