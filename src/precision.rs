//! Every numerical tolerance of Doublespar, named and explained in one place.
//!
//! The physics is computed in double precision with closed forms wherever they exist, so most
//! results are good to a few units in the last place; the tolerances below decide *physics*
//! questions (is this wave evanescent, do these two rays coincide) and are deliberately far from
//! rounding noise. Tests use [`assert_close`] so that a failure prints both numbers.

/// Relative tolerance below which two refractive indices are treated as equal when a direction
/// must be chosen for a degenerate mode pair (wave vector along the optic axis). Only the choice
/// of basis depends on it; the indices and phases never do.
pub const DEGENERATE_DIRECTION: f64 = 1e-12;

/// Largest `|Im k_z| / k0` still treated as a propagating wave. The closed-form root is real or
/// not; this only absorbs rounding at the exact critical angle.
pub const EVANESCENT_IM: f64 = 1e-13;

/// Two output rays belong to one spot when their exit points lie closer than this fraction of the
/// beam diameter (their directions are always equal after parallel plates). A thousandth of the beam
/// diameter is far below any separation a displacer is built for, and far above rounding.
pub const SPOT_FRACTION_OF_DIAMETER: f64 = 1e-3;

/// A cut within this angle (radians) of the maximum-walk-off cut tan θ = n_e/n_o is that cut: the
/// walk-off's first derivative there is zero by symmetry and is reported as exactly 0 instead of
/// rounding noise (about 1e-17). The first-order term it hides is below |ρ''| · 1e-12 ≈ 1e-13
/// degrees per degree, far below what any cut can be polished to.
pub const STATIONARY_CUT_RAD: f64 = 1e-12;

/// A power lost at an element that is smaller than this fraction of the power entering it is
/// rounding, and is reported as zero.
pub const POWER_ROUNDING: f64 = 1e-13;

/// `|S3| / S0` below which an ellipse is reported as linear, and the degree of polarization below
/// which a state is reported as unpolarized.
pub const LINEAR_ELLIPTICITY: f64 = 1e-12;

/// Slack allowed on `S1² + S2² + S3² ≤ S0²` when a Stokes vector is given as input (relative to
/// `S0²`), so that a fully polarized state typed with rounded decimals is accepted.
pub const STOKES_PHYSICAL: f64 = 1e-9;

/// Asserts that `actual` is within `rel` (relative to `max(|expected|, floor)`) of `expected`,
/// printing both values and `what` (which should name the source of the expected value).
///
/// # Panics
/// When the values differ by more than the tolerance; this is meant for tests.
#[track_caller]
pub fn assert_close(actual: f64, expected: f64, rel: f64, floor: f64, what: &str) {
    let scale = expected.abs().max(floor);
    let diff = (actual - expected).abs();
    assert!(
        diff <= rel * scale && actual.is_finite(),
        "{what}: expected {expected:.15e}, got {actual:.15e} (difference {diff:.3e}, allowed {:.3e})",
        rel * scale
    );
}
