//! Light through a liquid-crystal cell: the layer as a stack of thin uniform uniaxial slices,
//! crossed exactly by Berreman's 4×4 transfer matrices.
//!
//! Why 4×4. A cell's director turns and tilts across a few micrometres, so at oblique incidence
//! neither the local modes nor a 2×2 Jones product of slices is exact (the slices' modes do not
//! match where the director turns); the 4×4 method carries the four tangential field components,
//! which are continuous at every slice boundary, and is exact for a layered medium at any angle,
//! reflections between slices included (D. W. Berreman, J. Opt. Soc. Am. 62, 502 (1972)). It is
//! the layered counterpart of the per-face solve the crystals use, with the same fields.
//!
//! Physics. With fields ∝ exp(i k0 (q_x x + q_y y)) and ψ = (E_x, E_y, Z0H_x, Z0H_y), Maxwell's
//! equations in a slice of permittivity ε give dψ/dz = i k0 Δ ψ, where (eliminating E_z and H_z)
//!
//! ```text
//! E_z = (q_y H_x − q_x H_y − ε_zx E_x − ε_zy E_y)/ε_zz,   H_z = q_x E_y − q_y E_x,
//! Δψ = (H_y + q_x E_z,  q_y E_z − H_x,  q_x H_z − (εE)_y,  q_y H_z + (εE)_x).
//! ```
//!
//! A slice of thickness h passes ψ on by P = exp(i k0 h Δ), in closed form from the q_z of the
//! slice's four waves (`optics::lc::slice`; exact to rounding, checked against the Taylor series
//! that it replaces), the cell by M = P_N ⋯ P_1. Each
//! slice's ε = n_o² I + (n_e² − n_o²) n nᵀ for its mid-depth director n (Born & Wolf §15.2).
//!
//! Faces. The cell's two faces are treated as a crystal plate's are (`optics::parallel`): each is
//! solved exactly between the outside medium and the first or last slice ([`bare_face`]); with
//! ideal faces only their lossless part is kept, with uncoated ones their full transmission, and
//! light reflected at a face is lost. Between the faces the 4×4 system is solved with the first and
//! last slices' media continued outward (no face reflection), giving the interior transmission
//! T_int on the slices' own modes (o, e). The cell's Jones matrix on the outside beam basis is
//! T_exit · T_int · T_entry; with ideal faces the interior's lossless part is taken too, so the
//! cell is exactly lossless (the interior's own reflection, about 4·10⁻⁶ of the power for a
//! 90° twist over 1.5 µm, is left out as the faces' is). A uniform slab so crossed is the crystal plate exactly.

use crate::optics::interface::{CMatrix2, Losses, bare_face, lossless_part};
use crate::optics::jones::JonesMatrix;
use crate::optics::lc::director::Profile;
use crate::optics::lc::nematic::Nematic;
use crate::optics::lc::slice::{CMatrix4, Slices, slice_medium};
use crate::optics::lc::transfer_lanes::{self, Columns};
use crate::optics::modes::{Mode, Travel, crystal_modes, isotropic_modes};
use crate::optics::stack::{CellLayer, LayeredCell, Stack};
use crate::precision::CELL_SAME_DIRECTION;
use num_complex::Complex64;

/// The 4×4 transfer matrix ψ(d) = M ψ(0) of a cell with this director profile, `thickness_um`
/// thick, at vacuum wavenumber `k0_per_um` and tangential wave vector `qt`, each slice crossed by
/// its closed-form exponential ([`Slices::transfer`]).
#[cfg(test)]
pub fn transfer(lc: &Nematic, profile: &Profile, thickness_um: f64, k0_per_um: f64, qt: [f64; 2]) -> CMatrix4 {
    Slices::new(lc, profile, thickness_um).transfer(k0_per_um, qt)
}

/// [`transfer`] by the Taylor series of each slice's exponential
/// ([`crate::optics::lc::slice::expi`]): the slower reference the closed form is checked against.
#[cfg(test)]
pub fn transfer_by_series(
    lc: &Nematic,
    profile: &Profile,
    thickness_um: f64,
    k0_per_um: f64,
    qt: [f64; 2],
) -> CMatrix4 {
    let n = profile.sublayers();
    let h = thickness_um / n as f64;
    let mut m = CMatrix4::identity();
    for j in 0..n {
        let (t, a) = profile.mid(j);
        let eps = slice_medium(lc, t, a).permittivity();
        let delta = crate::optics::lc::slice::berreman_delta(&eps, qt);
        m = crate::optics::lc::slice::expi(&(delta * (k0_per_um * h))) * m;
    }
    m
}

/// The columns of mode fields (tangential ψ) of two modes.
fn fields(modes: &[Mode; 2]) -> Columns {
    [modes[0].tangential(), modes[1].tangential()]
}

/// Transmission and reflection of a layered medium of transfer `m` between a medium with modes
/// (`fwd_in`, `back_in`) before it and one with forward modes `fwd_out` after it, nothing incident
/// from behind: columns are incident modes, rows outgoing ones. `None` when singular.
pub fn solve_layered(
    m: &CMatrix4,
    fwd_in: &[Mode; 2],
    back_in: &[Mode; 2],
    fwd_out: &[Mode; 2],
) -> Option<(CMatrix2, CMatrix2)> {
    // M (F a + B r) = F_out t  ⇒  [M B | −F_out] (r, t) = −M F a.
    let (f, b, fo) = (fields(fwd_in), fields(back_in), fields(fwd_out));
    let mut sys = CMatrix4::zeros();
    for k in 0..2 {
        let mb = m * nalgebra::Vector4::from(b[k]);
        for row in 0..4 {
            sys[(row, k)] = mb[row];
            sys[(row, k + 2)] = -fo[k][row];
        }
    }
    let lu = sys.lu();
    let mut t = CMatrix2::zeros();
    let mut r = CMatrix2::zeros();
    for k in 0..2 {
        let rhs = -(m * nalgebra::Vector4::from(f[k]));
        let x = lu.solve(&rhs)?;
        if x.iter().any(|z| !(z.re.is_finite() && z.im.is_finite())) {
            return None;
        }
        r[(0, k)] = x[0];
        r[(1, k)] = x[1];
        t[(0, k)] = x[2];
        t[(1, k)] = x[3];
    }
    Some((t, r))
}

/// A stacked cell's Jones matrix on the outside beam basis at tangential wave vector `qt` in an
/// outside medium of index `outside_index` ([`cell_jones`] of its layered optics, its slices
/// kept from the solve).
pub fn layered_jones(cell: &LayeredCell, outside_index: f64, qt: [f64; 2]) -> JonesMatrix {
    jones_of_slices(
        &cell.nematic,
        &cell.profile,
        &cell.slices,
        cell.k0_per_um,
        outside_index,
        qt,
        cell.losses,
    )
}

/// Cell `c` of `stack`: its Jones matrix on the beam basis at tangential wave vector `qt`, the
/// one found at the input beam's where `qt` is that within [`CELL_SAME_DIRECTION`] (so that the
/// rays of a plane-parallel stack keep exactly the matrix they always had), else solved at `qt`.
pub fn cell_jones_at(stack: &Stack, c: &CellLayer, qt: [f64; 2]) -> JonesMatrix {
    cell_jones_by(stack, c, qt, |cell| layered_jones(cell, stack.outside_index, qt))
}

/// As [`cell_jones_at`], the layered optics' matrix at `qt` (where it is needed) given by `solve`
/// (as one solved for many directions at once, [`layered_jones_each`]).
pub fn cell_jones_by(
    stack: &Stack,
    c: &CellLayer,
    qt: [f64; 2],
    solve: impl FnOnce(&LayeredCell) -> JonesMatrix,
) -> JonesMatrix {
    let input = stack.tangential();
    let same = (qt[0] - input[0]).abs() <= CELL_SAME_DIRECTION && (qt[1] - input[1]).abs() <= CELL_SAME_DIRECTION;
    match stack.cells.get(c.optics) {
        Some(cell) if !same => solve(cell),
        _ => c.at_input,
    }
}

/// The cell's Jones matrix on the outside medium's beam basis (e1, e2) at tangential wave vector
/// `qt`, in an outside medium of index `outside_index`, as the module header describes. A zero
/// matrix (nothing passes) when a boundary system is singular, which needs an exactly grazing
/// wave.
pub fn cell_jones(
    lc: &Nematic,
    profile: &Profile,
    thickness_um: f64,
    k0_per_um: f64,
    outside_index: f64,
    qt: [f64; 2],
    losses: Losses,
) -> JonesMatrix {
    let slices = Slices::new(lc, profile, thickness_um);
    jones_of_slices(lc, profile, &slices, k0_per_um, outside_index, qt, losses)
}

/// [`layered_jones`] at each of `qts`, the slices solved several directions at a time
/// ([`transfer_lanes::inverse_each`]; the same numbers as one by one).
pub fn layered_jones_each(cell: &LayeredCell, outside_index: f64, qts: &[[f64; 2]]) -> Vec<JonesMatrix> {
    let faces: Vec<Faces> = qts
        .iter()
        .map(|&qt| Faces::of(&cell.nematic, &cell.profile, outside_index, qt))
        .collect();
    let starts: Vec<Columns> = faces.iter().map(|f| fields(&f.last_f)).collect();
    transfer_lanes::inverse_each(&cell.slices, cell.k0_per_um, qts, &starts)
        .into_iter()
        .zip(faces.iter().zip(qts))
        .map(|(h, (f, &qt))| f.jones(interior(&cell.slices, cell.k0_per_um, qt, f, h), cell.losses))
        .collect()
}

/// [`cell_jones`] of a cell whose `slices` are already made from `lc` and `profile`.
fn jones_of_slices(
    lc: &Nematic,
    profile: &Profile,
    slices: &Slices,
    k0_per_um: f64,
    outside_index: f64,
    qt: [f64; 2],
    losses: Losses,
) -> JonesMatrix {
    let f = Faces::of(lc, profile, outside_index, qt);
    let h = transfer_lanes::inverse(slices, k0_per_um, qt, &fields(&f.last_f));
    f.jones(interior(slices, k0_per_um, qt, &f, h), losses)
}

/// The interior transmission T_int between the first and last slices' media (module header),
/// from `h` = M⁻¹ F_out where the slices' kernel gave it ([`solve_inverse`]), else from the
/// transfer matrix M slice by slice ([`solve_layered`]); `None` when singular.
fn interior(slices: &Slices, k0_per_um: f64, qt: [f64; 2], f: &Faces, h: Option<Columns>) -> Option<CMatrix2> {
    match h {
        Some(h) => solve_inverse(&h, &f.first_f, &f.first_b),
        None => solve_layered(&slices.transfer(k0_per_um, qt), &f.first_f, &f.first_b, &f.last_f).map(|(t, _)| t),
    }
}

/// The transmission T of a layered medium from a medium with modes (`fwd_in`, `back_in`) before
/// it into the forward modes F_out after it, given H = M⁻¹ F_out (M the transfer matrix), nothing
/// incident from behind: F a + B r = H t ([`solve_layered`]'s M (F a + B r) = F_out t, multiplied
/// by M⁻¹). `None` when singular.
pub fn solve_inverse(h: &Columns, fwd_in: &[Mode; 2], back_in: &[Mode; 2]) -> Option<CMatrix2> {
    let (f, b) = (fields(fwd_in), fields(back_in));
    let mut sys = CMatrix4::zeros();
    for k in 0..2 {
        for row in 0..4 {
            sys[(row, k)] = h[k][row];
            sys[(row, k + 2)] = -b[k][row];
        }
    }
    let lu = sys.lu();
    let mut t = CMatrix2::zeros();
    for k in 0..2 {
        let x = lu.solve(&nalgebra::Vector4::from(f[k]))?;
        if x.iter().any(|z| !(z.re.is_finite() && z.im.is_finite())) {
            return None;
        }
        t[(0, k)] = x[0];
        t[(1, k)] = x[1];
    }
    Some(t)
}

/// The waves on either side of a cell's two faces at one tangential wave vector.
struct Faces {
    out_f: [Mode; 2],
    out_b: [Mode; 2],
    first_f: [Mode; 2],
    first_b: [Mode; 2],
    last_f: [Mode; 2],
    last_b: [Mode; 2],
}

impl Faces {
    /// The outside medium's (index `outside_index`) and the first and last slices' waves at `qt`.
    fn of(lc: &Nematic, profile: &Profile, outside_index: f64, qt: [f64; 2]) -> Faces {
        let n = profile.sublayers();
        let (t0, a0) = profile.mid(0);
        let (t1, a1) = profile.mid(n - 1);
        let first = slice_medium(lc, t0, a0);
        let last = slice_medium(lc, t1, a1);
        Faces {
            out_f: isotropic_modes(outside_index, qt, Travel::Forward),
            out_b: isotropic_modes(outside_index, qt, Travel::Backward),
            first_f: crystal_modes(&first, qt, Travel::Forward),
            first_b: crystal_modes(&first, qt, Travel::Backward),
            last_f: crystal_modes(&last, qt, Travel::Forward),
            last_b: crystal_modes(&last, qt, Travel::Backward),
        }
    }

    /// The cell's Jones matrix T_exit · T_int · T_entry given the interior's `interior`.
    fn jones(&self, interior: Option<CMatrix2>, losses: Losses) -> JonesMatrix {
        let parts = bare_face(&self.out_f, &self.out_b, &self.first_f)
            .zip(bare_face(&self.last_f, &self.last_b, &self.out_f))
            .zip(interior);
        let Some(((entry, exit), interior)) = parts else {
            return JonesMatrix::zeros();
        };
        let mut t_exit = exit.t;
        for (k, mode) in self.last_f.iter().enumerate() {
            if !mode.propagating {
                t_exit[(0, k)] = Complex64::ZERO;
                t_exit[(1, k)] = Complex64::ZERO;
            }
        }
        match losses {
            Losses::Ideal => lossless_part(&t_exit) * lossless_part(&interior) * lossless_part(&entry.propagating_t()),
            Losses::Uncoated => t_exit * interior * entry.propagating_t(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::lc::director::{CellLayout, solve};
    use crate::optics::wavelength::Wavelength;
    use crate::precision::{LC_SUBLAYERS, assert_within};
    use std::f64::consts::{FRAC_PI_2, PI, TAU};

    /// 5CB from the catalogue at 633 nm.
    fn lc() -> Nematic {
        crate::optics::lc::catalogue::find("5cb").unwrap().at(0.633, 25.0)
    }

    fn assert_matrix(a: &JonesMatrix, b: &JonesMatrix, tol: f64, what: &str) {
        for i in 0..2 {
            for j in 0..2 {
                assert_within(a[(i, j)].re, b[(i, j)].re, tol, what);
                assert_within(a[(i, j)].im, b[(i, j)].im, tol, what);
            }
        }
    }

    /// The twisted-nematic example's figure (5CB, 2.52 µm, 90° twist, 2° pretilt, at rest, 550 nm,
    /// ideal faces, x-polarized light and a polarizer along y) over a 30° cone at `pixels` per
    /// side: the largest difference of the crossed transmission |J_yx|² and of any entry of the
    /// Jones matrix between the directions solved together ([`layered_jones_each`]) and the
    /// slices' product one by one ([`Slices::transfer`] and [`solve_layered`], as before the
    /// kernel).
    fn example_figure_difference(pixels: usize) -> (f64, f64) {
        let lc = crate::optics::lc::catalogue::find("5cb").unwrap().at(0.55, 25.0);
        let layout = CellLayout {
            thickness_um: 2.52,
            rubbing_rad: 0.0,
            twist_rad: FRAC_PI_2,
            pretilt_rad: 2f64.to_radians(),
        };
        let profile = solve(&lc, &layout, 0.0, LC_SUBLAYERS, None);
        let cell = LayeredCell {
            nematic: lc,
            slices: Slices::new(&lc, &profile, layout.thickness_um),
            profile,
            thickness_um: layout.thickness_um,
            k0_per_um: TAU / 0.55,
            losses: Losses::Ideal,
        };
        let sin_cone = 30f64.to_radians().sin();
        let n = pixels as f64;
        let qts: Vec<[f64; 2]> = (0..pixels * pixels)
            .map(|p| {
                let x = 2.0 * ((p % pixels) as f64 + 0.5) / n - 1.0;
                let y = 1.0 - 2.0 * ((p / pixels) as f64 + 0.5) / n;
                [x * sin_cone, y * sin_cone]
            })
            .filter(|q| q[0].hypot(q[1]) <= sin_cone)
            .collect();
        let together = layered_jones_each(&cell, 1.0, &qts);
        let (mut power, mut entry) = (0.0f64, 0.0f64);
        for (j, &qt) in together.iter().zip(&qts) {
            let f = Faces::of(&cell.nematic, &cell.profile, 1.0, qt);
            let before = f.jones(interior(&cell.slices, cell.k0_per_um, qt, &f, None), cell.losses);
            power = power.max((j[(1, 0)].norm_sqr() - before[(1, 0)].norm_sqr()).abs());
            entry = entry.max((j - before).iter().map(|z| z.norm()).fold(0.0, f64::max));
        }
        (power, entry)
    }

    /// The figure solved by the lane kernel is the figure solved slice by slice, pixel by pixel,
    /// to 10⁻¹² (measured 256 × 256: see `DEVELOPERS.md`).
    #[test]
    fn the_figure_is_the_one_solved_slice_by_slice() {
        let pixels = std::env::var("CELL_FIGURE_PIXELS")
            .ok()
            .and_then(|p| p.parse().ok())
            .unwrap_or(48);
        let (power, entry) = example_figure_difference(pixels);
        eprintln!("{pixels} × {pixels}: transmission within {power:e}, Jones entries within {entry:e}");
        assert!(power <= 1e-12 && entry <= 1e-12, "{power:e} {entry:e}");
    }

    /// A cell below threshold without twist is a uniform uniaxial plate of the same thickness
    /// (its axis at 90° − pretilt from z along the rubbing): its Jones matrix equals the plate's
    /// as the crystal trace builds it (exact faces, phase k0 q_z L per mode, `optics::parallel`)
    /// to 10⁻⁹ at normal and oblique incidence, ideal and uncoated, and its retardance equals
    /// the plate's k0 (q_z,e − q_z,o) L / 2π (as `optics::plate` gives it).
    #[test]
    fn untwisted_cell_below_threshold_is_a_plate() {
        let lc = lc();
        let cell = CellLayout {
            thickness_um: 6.0,
            rubbing_rad: 0.5,
            twist_rad: 0.0,
            pretilt_rad: 2f64.to_radians(),
        };
        let profile = solve(&lc, &cell, 0.0, LC_SUBLAYERS, None);
        let wavelength = Wavelength::from_nm(633.0).unwrap();
        let k0 = TAU / wavelength.um();
        let plate = slice_medium(&lc, cell.pretilt_rad, cell.rubbing_rad);
        for (qt, n_out) in [([0.0, 0.0], 1.0), ([0.31, -0.22], 1.0), ([0.5, 0.4], 1.33)] {
            let fwd = crystal_modes(&plate, qt, Travel::Forward);
            let back = crystal_modes(&plate, qt, Travel::Backward);
            let out_f = isotropic_modes(n_out, qt, Travel::Forward);
            let out_b = isotropic_modes(n_out, qt, Travel::Backward);
            let entry = bare_face(&out_f, &out_b, &fwd).unwrap().propagating_t();
            let exit = bare_face(&fwd, &back, &out_f).unwrap().t;
            let phases = CMatrix2::from_diagonal(&nalgebra::Vector2::new(
                Complex64::from_polar(1.0, k0 * fwd[0].qz().re * cell.thickness_um),
                Complex64::from_polar(1.0, k0 * fwd[1].qz().re * cell.thickness_um),
            ));
            for losses in [Losses::Ideal, Losses::Uncoated] {
                let expected = match losses {
                    Losses::Ideal => lossless_part(&exit) * phases * lossless_part(&entry),
                    Losses::Uncoated => exit * phases * entry,
                };
                let got = cell_jones(&lc, &profile, cell.thickness_um, k0, n_out, qt, losses);
                assert_matrix(&got, &expected, 1e-9, "cell against plate");
            }
        }
        // The plate's retardance k0 (q_z,e − q_z,o) L at normal incidence, from its own modes.
        let [o, e] = crystal_modes(&plate, [0.0, 0.0], Travel::Forward);
        let plate_waves = k0 * (e.qz().re - o.qz().re).abs() * cell.thickness_um / TAU;
        assert_within(
            profile.retardance_waves(&lc, cell.thickness_um, wavelength.um()),
            plate_waves,
            1e-9,
            "retardance against the plate",
        );
    }

    /// A 90° twisted cell between polarizers at normal incidence, light entering along the
    /// rubbing: T∥ = sin²(½π√(1+u²))/(1+u²) between parallel polarizers and 1 − T∥ between
    /// crossed ones, u = 2dΔn/λ (C. H. Gooch and H. A. Tarry, J. Phys. D 8, 1575 (1975)); the
    /// first minimum u = √3 passes nothing (to 10⁻⁶). The closed form is the 2×2 Jones limit:
    /// a Jones product of the same 200 slices meets it to 5·10⁻⁵ (the staircase's (φ/N)² error),
    /// while the exact 4×4 fields couple the two waves at each turn of the director by a factor
    /// of order 1 + (Δn/2n)², which moves the transmission of the thinnest cell (u = 1, 1.5 µm)
    /// by 3.5·10⁻⁴; hence 5·10⁻⁴ for the 4×4 (measured, not a property of the formula).
    #[test]
    fn gooch_tarry_transmission() {
        let lc = lc();
        let wavelength_um = 0.55;
        let dn = lc.ne - lc.no;
        for u in [0.5, 1.0, 3f64.sqrt(), 2.5, 15f64.sqrt(), 5.0] {
            let cell = CellLayout {
                thickness_um: u * wavelength_um / (2.0 * dn),
                rubbing_rad: 0.0,
                twist_rad: FRAC_PI_2,
                pretilt_rad: 0.0,
            };
            let profile = solve(&lc, &cell, 0.0, 200, None);
            let j = cell_jones(
                &lc,
                &profile,
                cell.thickness_um,
                TAU / wavelength_um,
                1.0,
                [0.0, 0.0],
                Losses::Ideal,
            );
            let root = (1.0 + u * u).sqrt();
            let parallel = (0.5 * PI * root).sin().powi(2) / (1.0 + u * u);
            assert_within(j[(0, 0)].norm_sqr(), parallel, 5e-4, &format!("T parallel at u = {u}"));
            assert_within(
                j[(1, 0)].norm_sqr(),
                1.0 - parallel,
                5e-4,
                &format!("T crossed at u = {u}"),
            );
            if u == 3f64.sqrt() {
                assert!(j[(0, 0)].norm_sqr() < 1e-6, "first minimum: {}", j[(0, 0)].norm_sqr());
            }
            // The Jones product of the same slices (each a retarder of k0 Δn h along its director).
            let h = cell.thickness_um / 200.0;
            let mut product = JonesMatrix::identity();
            for k in 0..200 {
                let azimuth = profile.mid(k).1;
                product = crate::optics::jones::retarder(TAU / wavelength_um * dn * h, azimuth + FRAC_PI_2) * product;
            }
            assert_within(
                product[(0, 0)].norm_sqr(),
                parallel,
                5e-5,
                &format!("Jones product at u = {u}"),
            );
        }
    }

    /// A twisted cell switched at 2.2 V (tilt and azimuth varying across it): its transfer
    /// matrix by the closed-form slices equals the product of the slices' Taylor series at
    /// random directions up to 70° in air and in a denser outside medium, to 10⁻¹² of its size.
    #[test]
    fn the_closed_form_transfer_is_the_series_product() {
        let lc = lc();
        let cell = CellLayout {
            thickness_um: 5.0,
            rubbing_rad: 0.3,
            twist_rad: FRAC_PI_2,
            pretilt_rad: 2f64.to_radians(),
        };
        let profile = solve(&lc, &cell, 2.2, LC_SUBLAYERS, None);
        let mut rng = crate::random::Rng::new(9);
        for _ in 0..40 {
            let q = 1.4 * rng.uniform();
            let phi = TAU * rng.uniform();
            let qt = [q * phi.cos(), q * phi.sin()];
            let k0 = TAU / (0.4 + 0.4 * rng.uniform());
            let fast = transfer(&lc, &profile, cell.thickness_um, k0, qt);
            let series = transfer_by_series(&lc, &profile, cell.thickness_um, k0, qt);
            let size = series.iter().map(|z| z.norm()).fold(1.0, f64::max);
            let diff = (fast - series).iter().map(|z| z.norm()).fold(0.0, f64::max);
            assert!(diff <= 1e-12 * size, "qt {qt:?}, k0 {k0}: {diff:e} of {size}");
        }
    }

    /// Power: the exact layered solve between outside media sends out exactly what comes in
    /// (|t|² + |r|² = 1 per incident mode, lossless media), for a switched twisted cell at oblique
    /// incidence; and the cell's ideal Jones matrix is unitary.
    #[test]
    fn power_is_conserved() {
        let lc = lc();
        let cell = CellLayout {
            thickness_um: 4.0,
            rubbing_rad: 0.2,
            twist_rad: 80f64.to_radians(),
            pretilt_rad: 3f64.to_radians(),
        };
        let profile = solve(&lc, &cell, 2.2, LC_SUBLAYERS, None);
        let k0 = TAU / 0.8;
        let qt = [0.35, 0.2];
        let m = transfer(&lc, &profile, cell.thickness_um, k0, qt);
        let out_f = isotropic_modes(1.0, qt, Travel::Forward);
        let out_b = isotropic_modes(1.0, qt, Travel::Backward);
        let (t, r) = solve_layered(&m, &out_f, &out_b, &out_f).unwrap();
        for k in 0..2 {
            let sum = t[(0, k)].norm_sqr() + t[(1, k)].norm_sqr() + r[(0, k)].norm_sqr() + r[(1, k)].norm_sqr();
            assert_within(sum, 1.0, 1e-12, "transmitted plus reflected power");
        }
        let j = cell_jones(&lc, &profile, cell.thickness_um, k0, 1.0, qt, Losses::Ideal);
        assert_matrix(
            &(j.adjoint() * j),
            &JonesMatrix::identity(),
            1e-12,
            "ideal cell unitary",
        );
    }
}
