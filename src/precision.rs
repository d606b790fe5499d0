//! Every numerical tolerance of Doublespar, named and explained in one place.
//!
//! The physics is computed in double precision with closed forms wherever they exist, so most
//! results are good to a few units in the last place; the tolerances below decide *physics*
//! questions (is this wave evanescent, do these two rays coincide) and are deliberately far from
//! rounding noise. Tests use [`assert_close`] so that a failure prints both numbers.

/// How far a point may lie off a plane, or behind it along a ray, and still count as on it: this
/// fraction of the distance scale (1 mm plus the distance to the plane's point). Far above the
/// rounding of a face point computed in a stack of tens of millimetres (~10⁻¹⁵ mm), far below any
/// length that matters. A point on a face meets it where it is, however the ray runs: a grazing
/// ray leaving a face into a vanishing gap toward a coinciding face is not decided by rounding
/// (found by the independent face check, `tests/independent_faces.rs`).
pub const ON_PLANE: f64 = 1e-12;

/// Relative tolerance below which two refractive indices are treated as equal when a direction
/// must be chosen for a degenerate mode pair (wave vector along the optic axis). Only the choice
/// of basis depends on it; the indices and phases never do.
pub const DEGENERATE_DIRECTION: f64 = 1e-12;

/// A root q_z of a general crystal's 4×4 system whose imaginary part exceeds this fraction of
/// 1 + |q_z| is evanescent (`general_modes.rs`); below it the root is real and rounding. The
/// Schur form's rounding of a real root is ~10⁻¹⁶ of it, and ~10⁻⁸ only within 10⁻¹⁶ of a critical
/// angle, where the wave grazes the face either way.
pub const EVANESCENT_ROOT: f64 = 1e-10;

/// Two waves of a general crystal whose q_z differ by at most this fraction of 1 + |q_z| are one
/// degenerate pair (along an optic axis), given the documented basis instead of the split that
/// rounding would choose: a few times the rounding of the 4×4 eigenvalues (~10⁻¹⁶ of ‖Δ‖ ≈ n²).
/// Within it the phase the two waves gather apart over a 10 mm crystal is below 10⁻⁹ rad.
pub const DEGENERATE_MODES: f64 = 1e-14;

/// The largest residual |Δψ − q_z ψ| of a general crystal's forward wave found from the forward
/// factor of its characteristic quartic (`forward_waves.rs`), relative to |ψ| times the largest
/// modulus of an entry of Δ; beyond it the general solver answers. Both leave about 10⁻¹⁵.
/// (Native builds and the design worker's, as the forward waves.)
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
pub const FORWARD_RESIDUAL: f64 = 1e-12;

/// The smallest gap between the forward pair's lower q_z and the backward pair's upper one,
/// relative to the largest modulus of an entry of Δ, for the forward factor (`forward_waves.rs`)
/// to answer. The pair's
/// subspace is the null space of a quadratic in Δ, found to about ε (|Δ|/gap)²: 10⁻¹³ at this
/// gap, which a plate lit from air at any angle of the cone keeps far above (its forward q_z are
/// near n cos θ, the gap near twice that); waves near grazing inside the crystal go to the general
/// solver.
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
pub const FORWARD_SEPARATION: f64 = 0.05;

/// The smallest determinant of the flux form on the forward subspace (an orthonormal basis of
/// it), relative to its squared trace, for the two waves to count as forward: a quarter for two
/// waves of equal flux, near 0 where a wave grazes the face, negative for a forward and a
/// backward wave.
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
pub const FORWARD_DEFINITE: f64 = 1e-8;

/// Sweeps of the Schur and SVD iterations of the general mode solver before they are given up
/// (a 4×4 needs a few dozen); a fallback then keeps the answer finite.
pub const EIGEN_SWEEPS: usize = 10_000;

/// Two output rays belong to one spot when the amplitude overlap |γ| of their Gaussian beams
/// (`beam_overlap.rs`) is at least e^−(this), e⁻²: for rays in one direction, when their points lie at
/// most one beam diameter apart, so that the beam circles the end view draws touch or overlap.
/// Spots are the connected groups of such pairs. Rays two diameters apart (|γ| = e⁻⁸ ≈ 3·10⁻⁴)
/// are separate spots; inside a spot every pair interferes with its own weight γ, so a 20 nm
/// residual in a 10 µm beam recombines with overlap 0.99998. Between separate spots the
/// interference left out is at most 2 e⁻² √(P_i P_j) per pair, and none where the polarizations
/// are orthogonal (as a displacer's are).
pub const SPOT_LINK_EXPONENT: f64 = 2.0;

/// Rays whose points lie closer than this fraction of the beam radius share one site: their mode
/// overlap rounds to exactly 1 in double precision (1 − 5·10⁻¹⁹), so their fields are summed
/// directly, which only saves work.
pub const SITE_FRACTION_OF_RADIUS: f64 = 1e-9;

/// Inside a spot, pairs of beams whose overlap exponent d²/(2w²) exceeds this (|γ| < e⁻⁴⁰ ≈
/// 4·10⁻¹⁸, far below the rounding of the powers they would change) are skipped.
pub const OVERLAP_NEGLIGIBLE_EXPONENT: f64 = 40.0;

/// A cut within this angle (radians) of the maximum-walk-off cut tan θ = n_e/n_o is that cut: the
/// walk-off's first derivative there is zero by symmetry and is reported as exactly 0 instead of
/// rounding noise (about 1e-17). The first-order term it hides is below |ρ''| · 1e-12 ≈ 1e-13
/// degrees per degree, far below what any cut can be polished to.
pub const STATIONARY_CUT_RAD: f64 = 1e-12;

/// The planned whole trace (`optics/planned_trace.rs`) declines an incidence where, at some face,
/// a mode's q_z² (or the extraordinary quadratic's discriminant) is at most this fraction of the
/// size of its terms: evanescent, or so near the critical angle that the general tracer, whose
/// operations it repeats in another order here and there, must decide. Such an incidence is traced
/// by the general tracer. 10⁻⁹ of n² lies within ~10⁻⁵ rad of a critical angle, far above the
/// ~10⁻¹⁶ rounding of the terms. (Native builds and the design worker's, as the planned trace.)
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
pub const PLANNED_CRITICAL_MARGIN: f64 = 1e-9;

/// How closely the planned whole trace agrees with the general tracer on each ray that leaves
/// forward: power and direction components absolutely (both are at most 1), exit points relative
/// to 1 mm plus their distance from the origin. It repeats the general tracer's wave vectors on
/// real numbers; what differs is the rounding of its fields and transmissions (products by
/// reciprocals, a 2×2 inverse for the 4×4 elimination), of the phase factors the general tracer
/// multiplies into each ray (|e^{iφ}| = 1 to ~10⁻¹⁶ per step) and of the order of a power's sum,
/// ~10⁻¹⁴ in all.
pub const PLANNED_TRACE_AGREEMENT: f64 = 1e-12;

/// A power lost at an element that is smaller than this fraction of the power entering it is
/// rounding, and is reported as zero.
pub const POWER_ROUNDING: f64 = 1e-13;

/// `|S3| / S0` below which an ellipse is reported as linear, and the degree of polarization below
/// which a state is reported as unpolarized.
pub const LINEAR_ELLIPTICITY: f64 = 1e-12;

/// Slack allowed on `S1² + S2² + S3² ≤ S0²` when a Stokes vector is given as input (relative to
/// `S0²`), so that a fully polarized state typed with rounded decimals is accepted.
pub const STOKES_PHYSICAL: f64 = 1e-9;

/// `|n_e − n_o|` below which a design refuses a crystal as not birefringent: a displacer would have
/// no walk-off and a wave plate no retardance to work with. Far below any catalogued crystal
/// (the weakest, quartz, has about 0.009) and far above rounding of indices near 1.5.
pub const NO_BIREFRINGENCE: f64 = 1e-12;

/// Walk-off angle (radians) below which a cut is said to give none (a cut along or across the
/// optic axis): a displacer or recombiner built on it would need a crystal longer than any that
/// can be grown.
pub const NO_WALKOFF_RAD: f64 = 1e-9;

/// Two angles in degrees closer than this are the same direction; a stack's plate counts as
/// crossed with the first when its axis is 90° from it within this.
pub const SAME_ANGLE_DEG: f64 = 1e-9;

/// Two design wavelengths (nm) closer than this are one wavelength: an achromat needs two.
pub const SAME_WAVELENGTH_NM: f64 = 1e-9;

/// A 2 × 2 system whose determinant is smaller than this fraction of its largest product term is
/// singular: the two materials' dispersions are proportional and no achromatic pair exists.
pub const SINGULAR_DETERMINANT: f64 = 1e-9;

/// Halvings of a bracket in every bisection of the designs: 2⁻⁶⁰ ≈ 10⁻¹⁸ of the starting
/// bracket, below the rounding of the bracket's ends, so more steps change nothing.
pub const BISECTION_STEPS: usize = 60;

/// Steps of a golden-section search: 0.618⁸⁰ ≈ 2·10⁻¹⁷ of the starting bracket, below rounding.
pub const GOLDEN_SECTION_STEPS: usize = 80;

/// Central-difference step for a derivative with respect to the angle of incidence (degrees):
/// small enough that the second-order error is far below the tolerances it is multiplied by,
/// large enough that the difference is not rounding.
pub const DIFF_STEP_INCIDENCE_DEG: f64 = 1e-3;

/// Central-difference step for a derivative with respect to the wavelength (nm).
pub const DIFF_STEP_WAVELENGTH_NM: f64 = 1e-2;

/// Central-difference step for a derivative with respect to a crystal's length, as a fraction
/// of the length (at least [`DIFF_STEP_LENGTH_FLOOR_MM`] is taken as the length): the phase it
/// moves stays far below π, so the phase difference needs no unwrapping.
pub const DIFF_STEP_LENGTH_REL: f64 = 1e-6;

/// The smallest length (mm) a length step is taken relative to.
pub const DIFF_STEP_LENGTH_FLOOR_MM: f64 = 1e-3;

/// Central-difference step for a derivative with respect to a crystal's axis tilt (degrees),
/// small for the same reason as the length step.
pub const DIFF_STEP_TILT_DEG: f64 = 1e-5;

/// Rays whose directions differ by at most this over k·w (k the wave number, w the beam radius)
/// count as leaving in one direction when spots are grouped: the tilt term k²w²|Δt|²/8 of their
/// overlap is then below 10⁻²⁴, far under rounding, so the cell-based grouping of one direction
/// gives the same spots as the tilted one.
pub const SAME_DIRECTION_TILT: f64 = 1e-12;

/// Intervals of a waveplate's retardance-against-incidence curve, from 0 to the request's
/// largest incidence; the acceptance angle is bisected between two of its samples.
pub const ANGULAR_CURVE_INTERVALS: usize = 200;

/// Intervals of a waveplate's retardance-against-wavelength curve over its band.
pub const BAND_CURVE_INTERVALS: usize = 120;

/// Intervals of an achromatic pair's curve over its band; its largest error is refined between
/// two samples, so the grid only has to hold the error's peaks apart.
pub const ACHROMAT_CURVE_INTERVALS: usize = 160;

/// Decades below the largest mismatch scanned for a recombiner's breaking mismatch (down to
/// 10⁻⁹ of it), and the scan's samples over them (ten per decade); the break is bisected between
/// the last good and the first bad sample.
pub const BREAK_SCAN_DECADES: f64 = 9.0;
/// See [`BREAK_SCAN_DECADES`].
pub const BREAK_SCAN_SAMPLES: usize = 90;

/// Asserts that `actual` is within `allowed` (absolute) of `expected` and finite, printing both
/// values, the difference and `what` (which should name the source of the expected value). The one
/// comparison every test of a number goes through.
///
/// # Panics
/// When the values differ by more than `allowed`; this is meant for tests.
#[track_caller]
pub fn assert_within(actual: f64, expected: f64, allowed: f64, what: &str) {
    let diff = (actual - expected).abs();
    assert!(
        diff <= allowed && actual.is_finite(),
        "{what}: expected {expected:.15e}, got {actual:.15e} (difference {diff:.3e}, allowed {allowed:.3e})"
    );
}

/// Asserts that `actual` is within `rel` (relative to `max(|expected|, floor)`) of `expected`,
/// printing both values and `what` (which should name the source of the expected value).
///
/// # Panics
/// When the values differ by more than the tolerance; this is meant for tests.
#[track_caller]
#[cfg(test)]
pub fn assert_close(actual: f64, expected: f64, rel: f64, floor: f64, what: &str) {
    assert_within(actual, expected, rel * expected.abs().max(floor), what);
}

/// Half-step of the central difference that gives a design's retardance per kelvin, K: exact for
/// the constant and linear thermo-optic forms, and within a relative 1e-6 for the catalogue's
/// curved ones over ±1 K.
pub const TEMPERATURE_STEP_K: f64 = 1.0;

/// Intervals of the scans and curves of the prism designs (splitter, polarizer, tilt tuning):
/// a wedge angle, an incidence or a tilt is scanned on this grid before it is bisected, and the
/// curves of the answers use it (81 points, among the band checks' 481).
pub const DESIGN_SCAN_INTERVALS: usize = 80;

/// Linear input azimuths, spread evenly over 180°, over which a quartz rotator's acceptance takes
/// its worst ellipticity and rotation error (every 5°: the departures vary as sin 2ψ and
/// cos 2ψ, so the worst sampled is within 1 − cos 5° ≈ 0.4 % of the worst).
pub const ROTATOR_INPUT_AZIMUTHS: usize = 36;

/// Margin (degrees) kept below a critical angle or the contract's largest face tilt when a
/// prism design scans its angle: exactly at the critical angle a mode grazes the face.
pub const CRITICAL_MARGIN_DEG: f64 = 1e-6;

/// Step (degrees) inside and outside each edge of a polarizer's field of view at which its
/// transmission and extinction are reported: far beyond the bisection's precision, small against
/// any field of view.
pub const EDGE_STEP_DEG: f64 = 0.1;

/// A retardance (waves) within this of the target modulo whole waves is the target: a tilt
/// tuning that already meets it at normal incidence needs no tilt.
pub const SAME_RETARDANCE_WAVES: f64 = 1e-12;

/// Relative wavelength step of the central difference that gives group indices
/// (`contract::group`): rounding then costs about 10⁻¹¹ in a group index, and the truncation
/// error, of order h²·λ³·d³ξ/dλ³, is below that.
pub const GROUP_STEP_REL: f64 = 2e-5;

/// Angles (degrees) of a traced output below which a design reports 0: a thick plate's phases,
/// k0·n·L ≈ 10⁵ rad, carry rounding of about 10⁻¹¹ rad, so ellipticities and azimuth errors
/// below this are rounding, which differs from one build to another.
pub const TRACED_ANGLE_ROUNDING_DEG: f64 = 1e-8;

/// Sublayers a liquid-crystal cell is cut into (`optics::lc`): the director profile is solved on
/// this many intervals and the light crosses as many uniform slices. The discretization error of
/// both is of order (π/N)²/24 ≈ 4·10⁻⁵ of the Freedericksz threshold and of the retardance.
pub const LC_SUBLAYERS: usize = 100;

/// The director solver (`optics::lc::director`) stops when a full Newton step moves no tilt or
/// azimuth by more than this (radians): a retardance then carries errors near 10⁻¹³ waves.
pub const DIRECTOR_STEP_RAD: f64 = 1e-11;

/// Newton iterations of the director solver before it keeps what it has; a cold start at 20 V
/// needs about 20, a warm start from the neighbouring voltage of a curve 3 to 6.
pub const DIRECTOR_ITERATIONS: usize = 200;

/// Tangential wave vectors closer than this (each component) meet a liquid-crystal cell in the
/// same direction as the input beam and take the Jones matrix found there: rounding in the
/// rays' directions (about 1e-16) stays far below it, and a ray turned by a wedge or a tilted
/// plate (1e-6 and more) far above.
pub const CELL_SAME_DIRECTION: f64 = 1e-13;

/// Smallest distance (in q_z, units of k0) between a liquid-crystal slice's forward and backward
/// waves (o₋ − o₊, e₋ − e₊, e₋ − o₊) for which its exponential is taken in closed form
/// (`optics::lc::slice`): its divided differences divide by these, losing about
/// ε·θ|Δ|²/distance, below 10⁻¹⁴ of the matrix down to here. Closer (light grazing inside the
/// slice) the Taylor series is used.
pub const SLICE_ROOTS_APART: f64 = 0.05;

/// Largest θ·max|q_z| (θ = k0 h) of a liquid-crystal slice's closed-form exponential expanded in
/// powers of Δ (`optics::lc::slice`): the terms then stay within a few times the result, so
/// rounding stays near 10⁻¹⁶; thicker slices are halved and their matrix squared.
pub const SLICE_STEP_PHASE: f64 = 1.5;
