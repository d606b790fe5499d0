//! The trace of a stack of plane-parallel plates: every ray through every element, with its Jones
//! matrix, phase and position.
//!
//! Physics. All faces are parallel, so every wave in the stack shares the incident tangential
//! wave vector q_t = n_out (u_x, u_y) and every ray leaves into the outside medium along the
//! incident direction u. Each slab splits each ray into its two modes. A *path* (one sequence of
//! mode choices, labelled "oe…") is linear in the input field, so it is carried as a 2×2 Jones
//! matrix on the beam basis (e1, e2) that includes every face coupling and the propagation phase
//! e^{i k0 q_z L} of every layer and gap. Hence, for any input, partially polarized or not, the
//! output Stokes vector of a path is Mueller(M)·S_in; rays whose beams overlap on the exit plane
//! add as fields ([`crate::optics::spots`]).
//!
//! Positions: a ray in a crystal follows its mode's Poynting vector S, so it moves laterally by
//! L·S_t/S_z across a plate of thickness L; in a gap of the outside medium by g·u_t/u_z. Phases:
//! Σ k0 Re(q_z) L over layers and gaps, the plane-wave phase at a fixed lateral point, so that
//! paths that meet at one point compare correctly. Retardance of a plate: Γ = k0 (q_z,e − q_z,o) L,
//! exact at oblique incidence.
//!
//! The trace cannot fail: [`trace_parallel`] takes a resolved [`Stack`] (every limit checked) and
//! returns a [`Trace`]. A face whose boundary conditions are singular (which validated input never gives)
//! passes no light and says so in [`LayerTrace::Slab::faces_solved`].

use crate::optics::interface::{CMatrix2, Losses, bare_face, lossless_part};
use crate::optics::jones::JonesMatrix;
use crate::optics::modes::{Mode, Travel, isotropic_modes};
use crate::optics::spots::power_of;
use crate::optics::stack::{Element, Stack};
use crate::optics::traced::{LayerTrace, Path, Trace};
use num_complex::Complex64;

/// Traces a stack of plane-parallel plates: every wave shares the incident tangential wave vector.
pub fn trace_parallel(stack: &Stack) -> Trace {
    let n_out = stack.outside_index;
    let k0 = stack.wavelength.k0_per_mm();
    let u = stack.input.direction;
    let qt = stack.tangential();
    let outside_fwd = isotropic_modes(n_out, qt, Travel::Forward);
    let outside_back = isotropic_modes(n_out, qt, Travel::Backward);
    let qz_out = n_out * u.z;
    let s_in = &stack.input.stokes;
    let power = |paths: &[Path]| -> f64 { paths.iter().map(|p| power_of(&p.matrix, s_in)).sum() };

    let mut layers = Vec::with_capacity(stack.layers.len());
    let mut paths = vec![Path {
        label: String::new(),
        matrix: JonesMatrix::identity(),
        phase_rad: 0.0,
        points_mm: vec![[0.0, 0.0, 0.0]],
        direction: u,
        exit_point_mm: [0.0; 3],
        screen_mm: [0.0; 2],
    }];
    let mut z = 0.0;

    for layer in &stack.layers {
        // Gap of outside medium before the element.
        if layer.gap_mm > 0.0 {
            let g = layer.gap_mm;
            let ph = k0 * qz_out * g;
            let f = Complex64::from_polar(1.0, ph);
            for path in &mut paths {
                path.exit_point_mm[0] += g * u.x / u.z;
                path.exit_point_mm[1] += g * u.y / u.z;
                path.phase_rad += ph;
                path.matrix *= f;
                path.points_mm
                    .push([path.exit_point_mm[0], path.exit_point_mm[1], z + g]);
            }
            z += g;
        }
        let power_in = power(&paths);
        match layer.element {
            Element::Slab(slab) => {
                let fwd = slab.medium.modes(qt, Travel::Forward);
                let back = slab.medium.modes(qt, Travel::Backward);
                let l = slab.thickness_mm;
                let mut shifts = [[0.0; 2]; 2];
                for (m, mode) in fwd.iter().enumerate() {
                    if let Some(s) = mode.ray_direction() {
                        shifts[m] = [l * s.x / s.z, l * s.y / s.z];
                    }
                }
                let couplings = slab_couplings((&outside_fwd, &outside_back), (&fwd, &back), stack.losses);
                paths = match couplings {
                    Some(t) => split(&paths, (&fwd, slab.medium.letters()), &shifts, t, (k0, l), z + l),
                    None => Vec::new(),
                };
                layers.push(LayerTrace::Slab {
                    modes: fwd,
                    shifts_mm: shifts,
                    z_front_mm: z,
                    z_back_mm: z + l,
                    power_in,
                    power_out: power(&paths),
                    faces_solved: couplings.is_some(),
                });
                z += l;
            }
            Element::Ideal(_) | Element::Cell(_) => {
                let Some((jm, letter)) = layer.element.thin() else {
                    continue;
                };
                for path in &mut paths {
                    path.matrix = jm * path.matrix;
                    if let Some(c) = letter {
                        path.label.push(c);
                    }
                }
                layers.push(LayerTrace::Ideal {
                    power_in,
                    power_out: power(&paths),
                });
            }
        }
    }
    for path in &mut paths {
        path.exit_point_mm[2] = z;
        path.screen_mm = path.exit_xy();
    }
    if stack.screen_mm > 0.0 {
        // The screen as one more gap of the outside medium.
        let g = stack.screen_mm;
        let ph = k0 * qz_out * g;
        let f = Complex64::from_polar(1.0, ph);
        for path in &mut paths {
            let [x, y] = path.exit_xy();
            path.screen_mm = [x + g * u.x / u.z, y + g * u.y / u.z];
            path.phase_rad += ph;
            path.matrix *= f;
            path.points_mm.push([path.screen_mm[0], path.screen_mm[1], z + g]);
        }
    }
    Trace {
        paths,
        layers,
        exit_z_mm: z,
        rejected: Vec::new(),
        reflected: Vec::new(),
    }
}

/// The entry and exit couplings of a slab between two half-spaces of the outside medium, as
/// the trace uses them: the entry face's transmission into the propagating modes and the exit
/// face's transmission out of them (an evanescent mode carries nothing out), each reduced to its
/// lossless part for ideal faces; `None` when a face's boundary conditions are singular.
pub fn slab_couplings(
    (outside_fwd, outside_back): (&[Mode; 2], &[Mode; 2]),
    (fwd, back): (&[Mode; 2], &[Mode; 2]),
    losses: Losses,
) -> Option<(CMatrix2, CMatrix2)> {
    bare_face(outside_fwd, outside_back, fwd)
        .zip(bare_face(fwd, back, outside_fwd))
        .map(|(entry, exit)| {
            let mut t_exit = exit.t;
            for (m, mode) in fwd.iter().enumerate() {
                if !mode.propagating {
                    t_exit[(0, m)] = Complex64::ZERO;
                    t_exit[(1, m)] = Complex64::ZERO;
                }
            }
            match losses {
                Losses::Ideal => (lossless_part(&entry.propagating_t()), lossless_part(&t_exit)),
                Losses::Uncoated => (entry.propagating_t(), t_exit),
            }
        })
}

/// Each path split into the slab's propagating modes: entry coupling row, phase k0 q_z L, exit
/// coupling column; positions moved by each mode's shift to `z_back`.
fn split(
    paths: &[Path],
    (fwd, letters): (&[Mode; 2], [char; 2]),
    shifts: &[[f64; 2]; 2],
    (t_in, t_out): (CMatrix2, CMatrix2),
    (k0, l): (f64, f64),
    z_back: f64,
) -> Vec<Path> {
    let mut next = Vec::with_capacity(paths.len() * 2);
    for path in paths {
        for (m, mode) in fwd.iter().enumerate() {
            if !mode.propagating {
                continue;
            }
            let ph = k0 * mode.qz().re * l;
            let col = t_out.column(m).into_owned();
            let row = t_in.row(m).into_owned();
            let step: JonesMatrix = col * row * Complex64::from_polar(1.0, ph);
            let mut label = path.label.clone();
            label.push(letters[m]);
            let exit_mm = [
                path.exit_point_mm[0] + shifts[m][0],
                path.exit_point_mm[1] + shifts[m][1],
            ];
            let mut points_mm = path.points_mm.clone();
            points_mm.push([exit_mm[0], exit_mm[1], z_back]);
            next.push(Path {
                label,
                matrix: step * path.matrix,
                exit_point_mm: [exit_mm[0], exit_mm[1], z_back],
                phase_rad: path.phase_rad + ph,
                points_mm,
                ..*path
            });
        }
    }
    next
}
