//! Convergent light: the transmission of a stack of plane-parallel plates for every direction of a
//! cone (a conoscopic figure, with its isogyres and isochromes), and a plate's retardance against
//! direction (the acceptance map of a retarder).
//!
//! Physics. Each direction of the cone is a plane wave of its own: in a conoscope the set-up is
//! lit by a cone of plane waves and each one is brought to its own point of the image plane (the
//! back focal plane of the viewing lens), so the o and e waves of one direction add *coherently*
//! with no lateral shift between them: the beam's walk-off, which separates a narrow beam's rays,
//! moves an infinite plane wave onto itself. So the whole set-up acts on a direction as the one
//! 2×2 matrix on the beam basis (e1, e2) of [`crate::optics::modes::beam_basis`]
//!
//! ```text
//! M(q_t) = Π_layers  [ T_exit · diag(e^{i k0 q_z,m L}) · T_entry ]  or the thin element's matrix,
//! ```
//!
//! the coherent sum of every path of [`crate::optics::parallel`] (the product of the sums over
//! each slab's two modes is the sum over all mode sequences of the products), with the same face
//! couplings ([`crate::optics::parallel::slab_couplings`]) and the same phases; the common phase
//! of the gaps of outside medium is left out (it does not change a power). The transmitted power
//! for an input Stokes vector S is tr(M C(S) M†) ([`crate::optics::spots::power_of`]).
//!
//! Conventions. Directions are given in the outside medium of index n: polar angle θ from +z,
//! azimuth φ from +x toward +y, q_t = n sin θ (cos φ, sin φ). The input polarization and every
//! ideal element act on the beam basis of each direction (x̂ and ŷ carried by the smallest
//! rotation taking ẑ onto the direction): crossed polarizers stay crossed at every direction, and
//! in the planes φ = 0° and 90° their axes are exactly p and s. The image plane maps a direction
//! to the point (x, y) = (sin θ cos φ, sin θ sin φ) / sin θ_max (the sine condition of an aplanatic
//! viewing lens, r ∝ sin θ), so the figure is the unit disc, +x to the right and +y up; pixel
//! centres outside the disc have no value. Retardance of a plate: Γ = k0 (q_z,2 − q_z,1) L, exact
//! at every direction ([`crate::optics::plate`]); its error is Γ(θ, φ) − Γ(0), in waves.
//!
//! Speed. Nothing is allocated per direction: each direction costs each slab's two mode solves
//! and two face solves. Where every wave propagates and none runs along the optic axis (all but
//! the directions next to an axis or past a critical angle), a slab is solved in real numbers
//! (`planned_trace::parallel_plate`: the modes' fields are then real, so are the faces'
//! couplings; each face by the planned trace's 2×2 flux-form solve), the same matrix to 1e-13 (tested
//! against the complex solution) in a third of the instructions; elsewhere in complex numbers
//! with 4×4 face solves. A general crystal (biaxial, or optically active: elliptical waves near
//! an optic axis) is solved in complex numbers from its two forward waves alone
//! ([`crate::optics::forward_waves`]): a plate between half-spaces of the outside medium needs no
//! backward wave, since the waves of one lossless medium at one tangential wave vector carry no
//! cross flux under F(a, b) = aᴴ J b, forward with backward, and the outside medium's two forward
//! waves are flux-orthonormal as the crystal's are. Taking F of the boundary conditions with the
//! outside forward waves at the entry face and with the crystal's forward waves at the exit face
//! leaves
//!
//! ```text
//! T_entry = G⁻¹,   T_exit = (Gᴴ)⁻¹ = T_entryᴴ,   G_il = F(outside wave i, crystal wave l),
//! ```
//!
//! (for ideal faces their lossless parts, U and Uᴴ), the 4×4 face solves' T to rounding. Where the
//! forward waves are not found that way (a wave evanescent or grazing) the general crystal takes
//! the 4×4 solver of [`crate::optics::general_modes`], all four waves and 4×4 face solves. Its
//! retardance is k0 (q_z,2 − q_z,1) L with its modes in their own order (fast first, so never
//! negative; zero along an optic axis of a biaxial crystal). A stack with faces at an angle is
//! not a plane-parallel stack: [`conoscope_stack_ok`] says so.
//!
//! Sources: Born & Wolf, *Principles of Optics*, §15.4.4 (interference figures of crystal plates
//! in convergent light); the sine condition, Born & Wolf §4.5.

use crate::optics::interface::CMatrix2;
use crate::optics::jones::JonesMatrix;
use crate::optics::lc::stratified::{cell_jones_at, cell_jones_by, layered_jones_each};
use crate::optics::modes::{Mode, Travel, isotropic_modes};
use crate::optics::parallel::slab_couplings;
use crate::optics::spots::power_of;
use crate::optics::stack::{CellLayer, Element, Slab, Stack};
use num_complex::Complex64;
use std::f64::consts::TAU;

/// What a conoscopic map shows at each direction.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Quantity {
    /// The power transmitted by the whole set-up, for the beam's input polarization.
    Transmission,
    /// The retardance of the first crystal minus its retardance at normal incidence, waves.
    RetardanceError,
}

/// The square grid of a conoscopic map: `pixels` × `pixels` pixel centres over the unit disc of
/// the image plane, row 0 at the top, out to the polar angle `cone_rad` in the outside medium.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Grid {
    /// Largest polar angle, radians, in the outside medium (0 to below π/2).
    pub cone_rad: f64,
    /// Pixels per side.
    pub pixels: usize,
}

impl Grid {
    /// The direction (polar, azimuth) seen at pixel (`column`, `row`), or `None` outside the disc.
    pub fn direction(&self, column: usize, row: usize) -> Option<(f64, f64)> {
        let n = self.pixels as f64;
        let x = 2.0 * (column as f64 + 0.5) / n - 1.0;
        let y = 1.0 - 2.0 * (row as f64 + 0.5) / n;
        let r = x.hypot(y);
        if r > 1.0 {
            return None;
        }
        Some(((r * self.cone_rad.sin()).asin(), y.atan2(x)))
    }
}

/// Whether `stack` is a stack of plane-parallel plates whose every direction this module can
/// solve: `Err(index)` names the first element that is not (a slab with faces at an angle).
/// Crystals of every kind are solved (uniaxial by the closed form, biaxial and optically active
/// by the general mode solver), and liquid-crystal cells at every direction (their layered
/// optics).
pub fn conoscope_stack_ok(stack: &Stack) -> Result<(), usize> {
    for (i, layer) in stack.layers.iter().enumerate() {
        let ok = match layer.element {
            Element::Slab(s) => s.faces.is_none(),
            Element::Ideal(_) | Element::Cell(_) => true,
        };
        if !ok {
            return Err(i);
        }
    }
    Ok(())
}

/// The tangential wave vector of the direction (`polar`, `azimuth`) in the outside medium.
pub fn tangential_of(stack: &Stack, polar: f64, azimuth: f64) -> [f64; 2] {
    crate::optics::plate::tangential(stack.outside_index, polar, azimuth)
}

/// The whole set-up's matrix at tangential wave vector `qt` (see the header), the gaps' common
/// phase left out; the zero matrix when a face's boundary conditions are singular.
pub fn set_up_matrix(stack: &Stack, qt: [f64; 2]) -> JonesMatrix {
    set_up_matrix_with(stack, qt, &outside_modes(stack.outside_index, qt))
}

/// The outside medium's forward modes at one tangential wave vector ([`outside_modes`]), and
/// where the planned trace is built, the same waves in real numbers for the plates it solves,
/// solved when a uniaxial plate first asks for them (a general crystal's plate needs the forward
/// modes alone). The backward modes, which only the full complex solution needs, are solved there.
#[derive(Debug, Clone)]
pub struct Outside {
    n_out: f64,
    qt: [f64; 2],
    forward: [Mode; 2],
    #[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
    waves: std::cell::OnceCell<Option<crate::optics::planned_trace::OutsideWaves>>,
}

impl Outside {
    /// The waves in real numbers, `None` where the planned trace does not take them.
    #[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
    fn waves(&self) -> Option<&crate::optics::planned_trace::OutsideWaves> {
        self.waves
            .get_or_init(|| crate::optics::planned_trace::outside_waves(self.n_out, self.qt))
            .as_ref()
    }
}

/// The outside medium's modes at `qt` (index `n_out`): they depend on neither the wavelength
/// nor the stack, so a direction's spectrum solves them once.
pub fn outside_modes(n_out: f64, qt: [f64; 2]) -> Outside {
    Outside {
        n_out,
        qt,
        forward: isotropic_modes(n_out, qt, Travel::Forward),
        #[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
        waves: std::cell::OnceCell::new(),
    }
}

/// As [`set_up_matrix`], with the outside medium's modes at `qt` given ([`outside_modes`] of the
/// stack's outside index).
pub fn set_up_matrix_with(stack: &Stack, qt: [f64; 2], outside: &Outside) -> JonesMatrix {
    set_up_matrix_by(stack, qt, outside, |c| cell_jones_at(stack, c, qt))
}

/// As [`set_up_matrix_with`], each liquid-crystal cell's matrix at `qt` given by `cell`.
fn set_up_matrix_by(
    stack: &Stack,
    qt: [f64; 2],
    outside: &Outside,
    cell: impl Fn(&CellLayer) -> JonesMatrix,
) -> JonesMatrix {
    let mut m = JonesMatrix::identity();
    for layer in &stack.layers {
        match layer.element {
            Element::Slab(slab) => {
                let plate = real_plate(stack, &slab, qt, outside)
                    .or_else(|| general_plate(stack, &slab, qt, outside))
                    .or_else(|| complex_plate(stack, &slab, qt, outside));
                let Some(plate) = plate else {
                    return JonesMatrix::zeros();
                };
                m = plate * m;
            }
            Element::Ideal(jm) => m = jm * m,
            Element::Cell(c) => m = cell(&c) * m,
        }
    }
    m
}

/// A slab's matrix T_exit · diag(e^{i k0 q_z L}) · T_entry in complex numbers, at any direction
/// (evanescent modes carry nothing); `None` when a face's boundary conditions are singular.
fn complex_plate(stack: &Stack, slab: &Slab, qt: [f64; 2], outside: &Outside) -> Option<JonesMatrix> {
    let k0 = stack.wavelength.k0_per_mm();
    let fwd = slab.medium.modes(qt, Travel::Forward);
    let back = slab.medium.modes(qt, Travel::Backward);
    let outside_back = isotropic_modes(outside.n_out, outside.qt, Travel::Backward);
    let (t_in, t_out) = slab_couplings((&outside.forward, &outside_back), (&fwd, &back), stack.losses)?;
    let mut phase = CMatrix2::zeros();
    for (k, mode) in fwd.iter().enumerate() {
        if mode.propagating {
            phase[(k, k)] = Complex64::from_polar(1.0, k0 * mode.qz().re * slab.thickness_mm);
        }
    }
    Some(t_out * phase * t_in)
}

/// A slab's matrix T_exit · diag(e^{i k0 q_z L}) · T_entry from the planned trace's real
/// numbers (`planned_trace::parallel_plate`: the same modes, boundary problems and polar factors,
/// without complex arithmetic on fields that are real), where every wave propagates safely and
/// none runs along the optic axis; `None` elsewhere, where [`set_up_matrix_with`] solves it in
/// complex numbers. The two agree to rounding (tested).
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
fn real_plate(stack: &Stack, slab: &Slab, qt: [f64; 2], outside: &Outside) -> Option<JonesMatrix> {
    use crate::optics::interface::Losses;
    use crate::optics::modes::CrystalSurfaces;
    use crate::optics::planned_trace::parallel_plate;
    use crate::optics::stack::Medium;
    let Medium::Uniaxial(crystal) = slab.medium else {
        return None;
    };
    let surfaces = CrystalSurfaces::of(&crystal);
    let ideal = stack.losses == Losses::Ideal;
    let (t_in, t_out, qz) = parallel_plate(&crystal, &surfaces, outside.waves()?, qt, ideal)?;
    let k0 = stack.wavelength.k0_per_mm();
    let mut m = JonesMatrix::zeros();
    for (k, qz) in qz.iter().enumerate() {
        let phase = Complex64::from_polar(1.0, k0 * qz * slab.thickness_mm);
        for i in 0..2 {
            for j in 0..2 {
                m[(i, j)] += phase * (t_out[(i, k)] * t_in[(k, j)]);
            }
        }
    }
    Some(m)
}

/// Where the planned trace is not built (the page's own WebAssembly), every slab is solved in
/// complex numbers.
#[cfg(all(target_arch = "wasm32", not(feature = "design-worker")))]
fn real_plate(_: &Stack, _: &Slab, _: [f64; 2], _: &Outside) -> Option<JonesMatrix> {
    None
}

/// A general crystal's slab matrix T_exit · diag(e^{i k0 q_z L}) · T_entry from its two forward
/// waves alone ([`crate::optics::forward_waves`]), each face solved by the flux form (see the
/// header): T_entry = G⁻¹ with G_il = F(outside wave i, crystal wave l) and T_exit = T_entryᴴ,
/// their lossless parts for ideal faces; `None` where the forward waves are not found that way
/// (a wave evanescent or near grazing), for [`set_up_matrix_with`] to solve in full. The two
/// agree to rounding (tested).
#[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
fn general_plate(stack: &Stack, slab: &Slab, qt: [f64; 2], outside: &Outside) -> Option<JonesMatrix> {
    use crate::optics::forward_waves::forward_waves;
    use crate::optics::general_modes::flux;
    use crate::optics::interface::{Losses, lossless_part};
    use crate::optics::stack::Medium;
    let Medium::Anisotropic(medium) = slab.medium else {
        return None;
    };
    let [a, b] = &outside.forward;
    if !(a.propagating && b.propagating) {
        return None;
    }
    let waves = forward_waves(&medium, qt)?;
    let outside_psi = [a.tangential(), b.tangential()];
    let g = |i: usize, l: usize| flux(&outside_psi[i], &waves.psi[l]);
    let det = g(0, 0) * g(1, 1) - g(0, 1) * g(1, 0);
    (det.norm_sqr() > 0.0 && det.re.is_finite() && det.im.is_finite()).then_some(())?;
    let t_in = CMatrix2::new(g(1, 1), -g(0, 1), -g(1, 0), g(0, 0)) / det;
    let t_in = match stack.losses {
        Losses::Ideal => lossless_part(&t_in),
        Losses::Uncoated => t_in,
    };
    let k0 = stack.wavelength.k0_per_mm();
    let mut m = JonesMatrix::zeros();
    for (k, qz) in waves.qz.iter().enumerate() {
        let phase = Complex64::from_polar(1.0, k0 * qz * slab.thickness_mm);
        for i in 0..2 {
            for j in 0..2 {
                m[(i, j)] += phase * (t_in[(k, i)].conj() * t_in[(k, j)]);
            }
        }
    }
    Some(m)
}

/// Where the forward waves alone are not built (the page's own WebAssembly), a general crystal
/// is solved in full.
#[cfg(all(target_arch = "wasm32", not(feature = "design-worker")))]
fn general_plate(_: &Stack, _: &Slab, _: [f64; 2], _: &Outside) -> Option<JonesMatrix> {
    None
}

/// The two forward waves' q_z of `medium` at `qt` in its slots (first letter first), `None`
/// when one is evanescent: from the forward factor for a general crystal where it answers
/// ([`crate::optics::forward_waves::forward_qz_in_slots`]), from the full mode solve elsewhere.
fn forward_qz(medium: &crate::optics::stack::Medium, qt: [f64; 2]) -> Option<[f64; 2]> {
    #[cfg(any(not(target_arch = "wasm32"), feature = "design-worker"))]
    if let crate::optics::stack::Medium::Anisotropic(a) = medium
        && let Some(qz) = crate::optics::forward_waves::forward_qz_in_slots(a, qt)
    {
        return Some(qz);
    }
    let [a, b] = medium.modes(qt, Travel::Forward);
    (a.propagating && b.propagating).then(|| [a.qz().re, b.qz().re])
}

/// The power the whole set-up transmits at direction (`polar`, `azimuth`) for the input beam's
/// polarization (input power 1).
pub fn transmission_at(stack: &Stack, polar: f64, azimuth: f64) -> f64 {
    power_of(
        &set_up_matrix(stack, tangential_of(stack, polar, azimuth)),
        &stack.input.stokes,
    )
}

/// The retardance of the first slab at direction (`polar`, `azimuth`), radians:
/// k0 (q_z,2 − q_z,1) L; `None` without a slab or when a mode is evanescent.
pub fn first_retardance_at(stack: &Stack, polar: f64, azimuth: f64) -> Option<f64> {
    let slab = stack.layers.iter().find_map(|l| match l.element {
        Element::Slab(s) => Some(s),
        Element::Ideal(_) | Element::Cell(_) => None,
    })?;
    let [a, b] = forward_qz(&slab.medium, tangential_of(stack, polar, azimuth))?;
    Some(stack.wavelength.k0_per_mm() * (b - a) * slab.thickness_mm)
}

/// The map of `quantity` over `grid`, row-major (row 0 at the top), `None` outside the disc and
/// where the quantity is undefined (no slab, an evanescent mode).
pub fn conoscope_map(stack: &Stack, grid: Grid, quantity: Quantity) -> Vec<Option<f64>> {
    // The rows of cells solved together where the slices' lane kernel is built (not in the
    // page's size-tuned module, which computes no figure).
    let lanes = cfg!(any(not(target_arch = "wasm32"), feature = "design-worker"));
    if lanes && quantity == Quantity::Transmission && !stack.cells.is_empty() {
        return (0..grid.pixels).flat_map(|row| cells_row(stack, grid, row)).collect();
    }
    let normal = first_retardance_at(stack, 0.0, 0.0);
    let mut out = Vec::with_capacity(grid.pixels * grid.pixels);
    for row in 0..grid.pixels {
        for column in 0..grid.pixels {
            out.push(grid.direction(column, row).and_then(|(p, a)| match quantity {
                Quantity::Transmission => Some(transmission_at(stack, p, a)),
                Quantity::RetardanceError => Some((first_retardance_at(stack, p, a)? - normal?) / TAU),
            }));
        }
    }
    out
}

/// One row of the transmission map of a stack holding liquid-crystal cells: each cell's matrix
/// at the row's directions solved together ([`layered_jones_each`], the same numbers as
/// [`transmission_at`] gives one by one).
fn cells_row(stack: &Stack, grid: Grid, row: usize) -> Vec<Option<f64>> {
    let directions: Vec<Option<[f64; 2]>> = (0..grid.pixels)
        .map(|column| grid.direction(column, row).map(|(p, a)| tangential_of(stack, p, a)))
        .collect();
    let qts: Vec<[f64; 2]> = directions.iter().flatten().copied().collect();
    let cells: Vec<Vec<JonesMatrix>> = stack
        .cells
        .iter()
        .map(|cell| layered_jones_each(cell, stack.outside_index, &qts))
        .collect();
    let mut next = 0;
    directions
        .iter()
        .map(|qt| {
            let qt = (*qt)?;
            let k = next;
            next += 1;
            let m = set_up_matrix_by(stack, qt, &outside_modes(stack.outside_index, qt), |c| {
                cell_jones_by(stack, c, qt, |_| cells[c.optics][k])
            });
            Some(power_of(&m, &stack.input.stokes))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    use crate::optics::interface::Losses;
    use crate::optics::material::Indices;
    use crate::optics::stack::{InputBeam, Layer, Medium, Slab};
    use crate::optics::trace::trace;
    use crate::optics::uniaxial::{OpticAxis, Uniaxial};
    use crate::optics::wavelength::Wavelength;
    use nalgebra::Vector3;

    /// The product of the slabs' two-mode sums equals the trace's sum over every path, matrix
    /// element by matrix element, up to the gaps' common phase (none here).
    #[test]
    fn the_product_is_the_coherent_sum_of_the_traced_paths() {
        let slab = |no, ne, tilt: f64, az: f64, l| Layer {
            gap_mm: 0.0,
            element: Element::Slab(Slab {
                medium: Medium::Uniaxial(Uniaxial::new(
                    Indices::new(no, ne).unwrap(),
                    OpticAxis::from_angles(tilt.to_radians(), az.to_radians()),
                )),
                thickness_mm: l,
                faces: None,
            }),
        };
        for (p, a) in [(0.0f64, 0.0f64), (17.0, 40.0), (33.0, -120.0)] {
            let (p, a) = (p.to_radians(), a.to_radians());
            let stack = Stack {
                wavelength: Wavelength::from_nm(700.0).unwrap(),
                outside_index: 1.0,
                losses: Losses::Uncoated,
                input: InputBeam {
                    direction: Vector3::new(p.sin() * a.cos(), p.sin() * a.sin(), p.cos()),
                    diameter_mm: 1.0,
                    jones: None,
                    stokes: [1.0, 0.0, 0.0, 0.0],
                },
                layers: vec![slab(1.658, 1.486, 30.0, 10.0, 0.7), slab(1.544, 1.553, 90.0, 70.0, 2.0)],
                screen_mm: 0.0,
                cells: Vec::new(),
            };
            let sum: JonesMatrix = trace(&stack).paths.iter().map(|path| path.matrix).sum();
            let product = set_up_matrix(&stack, stack.tangential());
            assert!((sum - product).norm() < 1e-13, "{sum} {product}");
        }
    }

    /// A stack of no elements at `nm`, in an outside medium of index `outside`: what a slab's
    /// matrix reads of a stack.
    fn bare_stack(nm: f64, outside: f64, losses: Losses) -> Stack {
        Stack {
            wavelength: Wavelength::from_nm(nm).unwrap(),
            outside_index: outside,
            losses,
            input: InputBeam {
                direction: Vector3::z(),
                diameter_mm: 1.0,
                jones: None,
                stokes: [1.0, 0.0, 0.0, 0.0],
            },
            layers: Vec::new(),
            screen_mm: 0.0,
            cells: Vec::new(),
        }
    }

    /// A plate of `medium` 0.01 to 5 mm thick and a stack of no elements around it at 400 to
    /// 800 nm, in an outside medium of index 1.33 when `immersed` (else air), with ideal or bare
    /// faces: the cross-checks' generated cases.
    fn random_plate(rng: &mut crate::random::Rng, medium: Medium, immersed: bool, ideal: bool) -> (Slab, Stack) {
        let slab = Slab {
            medium,
            thickness_mm: 0.01 + rng.uniform() * 5.0,
            faces: None,
        };
        let stack = bare_stack(
            400.0 + rng.uniform() * 400.0,
            if immersed { 1.33 } else { 1.0 },
            if ideal { Losses::Ideal } else { Losses::Uncoated },
        );
        (slab, stack)
    }

    /// Independent method: the real-number plate of the planned trace against the complex
    /// modes and 4×4 face solves of the trace, over random crystals, directions up to 60° in
    /// air and both face treatments; and the complex one taking over where a wave runs along
    /// the optic axis.
    #[test]
    fn the_real_plate_agrees_with_the_complex_solution() {
        let mut rng = crate::random::Rng::new(14);
        let mut compared = 0;
        for case in 0..4000 {
            let no = 1.4 + rng.uniform() * 1.2;
            let ne = no + (rng.uniform() - 0.5) * 0.6;
            let crystal = Uniaxial::new(
                Indices::new(no, ne).unwrap(),
                OpticAxis::from_angles(rng.uniform() * std::f64::consts::PI, rng.uniform() * TAU),
            );
            let (slab, stack) = random_plate(&mut rng, Medium::Uniaxial(crystal), case % 3 == 0, case % 2 == 0);
            let qt = tangential_of(&stack, rng.uniform() * 60f64.to_radians(), rng.uniform() * TAU);
            let outside = outside_modes(stack.outside_index, qt);
            let complex = complex_plate(&stack, &slab, qt, &outside).unwrap();
            if let Some(real) = real_plate(&stack, &slab, qt, &outside) {
                assert!((real - complex).norm() < 1e-13, "{real} {complex}");
                compared += 1;
            }
        }
        assert!(compared > 3900, "{compared} of 4000 solved in real numbers");
        // Along the optic axis of a c-cut plate the complex solution alone answers.
        let slab = Slab {
            medium: Medium::Uniaxial(Uniaxial::new(
                Indices::new(1.54, 1.55).unwrap(),
                OpticAxis::from_angles(0.0, 0.0),
            )),
            thickness_mm: 1.0,
            faces: None,
        };
        let stack = bare_stack(600.0, 1.0, Losses::Ideal);
        assert!(real_plate(&stack, &slab, [0.0, 0.0], &outside_modes(1.0, [0.0, 0.0])).is_none());
    }

    /// Independent method: a general crystal's plate from its forward waves alone, each face by
    /// the flux form, against the full solution (the general solver's forward and backward
    /// waves, its shifted QR iteration, and 4×4 face solves), over generated crystals (biaxial,
    /// uniaxial given as principal indices, chiral, on and near optic axes), directions up to 80°
    /// in air and in an outside medium of index 1.33, both face treatments: to 1e-13 plus
    /// 4·10⁻¹⁵ (a few units in the last place of q_z, the two solvers' rounding) times the phase
    /// k0 L it builds (up to 8·10⁴ here; the worst seen is 1.7·10⁻¹⁵); nearly every case is
    /// answered the fast way.
    #[test]
    fn the_general_plate_agrees_with_the_full_solution() {
        use crate::optics::anisotropic::{Anisotropic, orientation};
        let mut rng = crate::random::Rng::new(0x6e_9e7a);
        let (mut compared, mut worst) = (0, 0.0f64);
        let cases = 4000;
        for case in 0..cases {
            let principal = if case % 5 == 0 {
                let no = 1.4 + rng.uniform();
                [no, no, 1.4 + rng.uniform()]
            } else {
                [0; 3].map(|_| 1.4 + rng.uniform())
            };
            let chirality = if case % 3 == 0 {
                [0; 3].map(|_| 1e-4 * rng.normal())
            } else {
                [0.0; 3]
            };
            let medium = Anisotropic::new(
                principal,
                orientation(
                    rng.uniform() * std::f64::consts::PI,
                    rng.uniform() * TAU,
                    rng.uniform() * TAU,
                ),
                chirality,
            )
            .unwrap();
            let (slab, stack) = random_plate(&mut rng, Medium::Anisotropic(medium), case % 4 == 0, case % 2 == 0);
            // Now and then along an optic axis inside the crystal (where the medium has one and
            // the outside medium can reach it).
            let qt = match (case % 6, medium.optic_axes()) {
                (0, Some([axis, _])) if medium.indices_along(axis).0 * axis.xy().norm() < stack.outside_index => {
                    let n = medium.indices_along(axis).0;
                    let s = axis.z.signum();
                    [s * n * axis.x, s * n * axis.y]
                }
                _ => tangential_of(&stack, rng.uniform() * 80f64.to_radians(), rng.uniform() * TAU),
            };
            let outside = outside_modes(stack.outside_index, qt);
            let full = complex_plate(&stack, &slab, qt, &outside).unwrap();
            if let Some(fast) = general_plate(&stack, &slab, qt, &outside) {
                let k0l = stack.wavelength.k0_per_mm() * slab.thickness_mm;
                let d = (fast - full).norm();
                let allowed = 1e-13 + 4e-15 * k0l;
                worst = worst.max(d / allowed);
                assert!(d < allowed, "case {case}: {fast} {full} ({d:.1e})");
                compared += 1;
            }
        }
        eprintln!("{compared} of {cases} answered from the forward waves; worst {worst:.2} of the tolerance");
        assert!(
            compared > cases * 98 / 100,
            "{compared} of {cases} answered from the forward waves"
        );
    }

    #[test]
    fn the_grid_maps_the_disc_by_the_sine_of_the_angle() {
        let g = Grid {
            cone_rad: 30f64.to_radians(),
            pixels: 4,
        };
        assert!(g.direction(0, 0).is_none(), "a corner lies outside the disc");
        let (p, a) = g.direction(2, 1).unwrap();
        // Centre (0.25, 0.25): r = √2/4, sin θ = r sin 30°.
        assert!((p.sin() - 0.5 * 2f64.sqrt() / 4.0).abs() < 1e-15);
        assert!((a - 45f64.to_radians()).abs() < 1e-15);
        let (_, a) = g.direction(1, 2).unwrap();
        assert!((a + 135f64.to_radians()).abs() < 1e-15);
    }
}
