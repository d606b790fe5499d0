//! Group indices of each crystal's two modes and the group delay between its two beams: what
//! ultrafast users choose a crystal by.
//!
//! Physics. A plane wave of fixed tangential wave vector enters a slab (the outside medium does
//! not disperse, so q_t = k_t/k0 stays fixed as the frequency changes); inside, each mode's phase
//! across a slab of thickness L_n along the face normal n is φ = k0 ξ L_n with ξ = q·n. The delay
//! of a pulse's envelope is dφ/dω, so
//!
//! ```text
//! τ = (L_n / c) · d(k0 ξ)/dk0 = (L_n / c) · g,      g = ξ − λ dξ/dλ   (q_t fixed),
//! ```
//!
//! and g is the mode's *group index* along the normal: at normal incidence it is the familiar
//! n − λ dn/dλ of the mode's index (for an e-wave, of n(θ) at its fixed angle to the axis). The
//! group delay between the two beams is τ₂ − τ₁ (e minus o, or s minus f: positive when the
//! second mode's envelope arrives later), reported only for parallel faces, where one L_n holds.
//! Sources: A. Yariv and P. Yeh, *Optical Waves in Crystals* (1984), §1.3 (group velocity);
//! C. Rullière (ed.), *Femtosecond Laser Pulses* (2005), ch. 2 (group delay of a plate), from
//! memory.
//!
//! Method: dξ/dλ by a central difference over λ(1 ± h), each side the crystal alone re-resolved at
//! that wavelength (every material's dispersion formula evaluated there) and its modes solved for
//! the incident beam, exactly as the trace solves them. With h = [`GROUP_STEP_REL`] the rounding
//! error of g is about 10⁻¹¹ and the truncation error smaller; the tests hold it to the analytic
//! derivative of the dispersion formulas.

use crate::contract::scenario::Scenario;
use crate::optics::stack::{Contact, Element, Faces, Layer, Slab, Stack};
use crate::optics::trace::trace;
use crate::optics::traced::LayerTrace;
use crate::optics::wavelength::Wavelength;
use crate::precision::{DEGENERATE_DIRECTION, GROUP_STEP_REL};
use nalgebra::Vector3;

/// Speed of light in vacuum, mm per picosecond (exact by the SI definition of the metre).
pub const C_MM_PER_PS: f64 = 0.299_792_458;

/// A crystal's group indices and group delay.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Group {
    /// Group index g = ξ − λ dξ/dλ of each mode (first, second), `None` when the mode is
    /// evanescent at either neighbouring wavelength or the formula breaks down there.
    pub indices: [Option<f64>; 2],
    /// τ₂ − τ₁ in picoseconds, for parallel faces with both modes propagating.
    pub delay_ps: Option<f64>,
}

/// The face normal and the thickness along it of a slab whose faces are parallel; `None` for a
/// wedge.
fn parallel_thickness(slab: &Slab, z_front: f64) -> Option<(Vector3<f64>, f64)> {
    let faces = slab.placed_faces(z_front);
    let n = faces.front.normal;
    ((n - faces.back.normal).norm() <= DEGENERATE_DIRECTION)
        .then(|| (n, n.dot(&(faces.back.point - faces.front.point))))
}

/// ξ = q·n of both modes of `slab` alone in `stack`'s outside medium, lit by its incident beam.
fn normal_components(stack: &Stack, slab: &Slab, z_front: f64, n: &Vector3<f64>) -> [Option<f64>; 2] {
    let single = Stack {
        layers: vec![Layer {
            gap_mm: z_front,
            // Alone in the outside medium: its front face meets the outside, whatever it touches.
            element: Element::Slab(Slab {
                faces: slab.faces.map(|f| Faces {
                    contact: Contact::Outside,
                    ..f
                }),
                ..*slab
            }),
        }],
        screen_mm: 0.0,
        ..stack.clone()
    };
    let traced = trace(&single);
    match traced.layers.first() {
        Some(LayerTrace::Slab { modes, .. }) => modes.map(|m| m.propagating.then(|| m.wave_vector().dot(n))),
        _ => [None, None],
    }
}

/// For each element of `sc` (resolved as `stack`), its group indices and delay when it is a
/// crystal, `None` otherwise.
pub fn groups(sc: &Scenario, stack: &Stack) -> Vec<Option<Group>> {
    let nm = stack.wavelength.nm();
    let side = |sign: f64| {
        let wl = Wavelength::from_nm(nm * (1.0 + sign * GROUP_STEP_REL)).ok()?;
        sc.resolve_at(wl, sc.temperature_c).ok().map(|(s, _)| s)
    };
    let (below, above) = (side(-1.0), side(1.0));
    let mut z = 0.0;
    let mut out = Vec::with_capacity(stack.layers.len());
    for (i, layer) in stack.layers.iter().enumerate() {
        z += layer.gap_mm;
        let Element::Slab(slab) = layer.element else {
            out.push(None);
            continue;
        };
        let (n, l_n) = parallel_thickness(&slab, z).unwrap_or((slab.placed_faces(z).front.normal, f64::NAN));
        let xi_at = |s: &Option<Stack>| match s {
            Some(s) => match s.layers[i].element {
                Element::Slab(other) => normal_components(s, &other, z, &n),
                Element::Ideal(_) | Element::Cell(_) => [None, None],
            },
            None => [None, None],
        };
        let (lo, mid, hi) = (xi_at(&below), normal_components(stack, &slab, z, &n), xi_at(&above));
        let indices: [Option<f64>; 2] = std::array::from_fn(|m| {
            let (a, b, c) = (lo[m]?, mid[m]?, hi[m]?);
            // λ dξ/dλ over λ(1 ± h): (ξ₊ − ξ₋) / (2h).
            Some(b - (c - a) / (2.0 * GROUP_STEP_REL))
        });
        let delay_ps = match indices {
            [Some(g1), Some(g2)] if l_n.is_finite() => Some(l_n * (g2 - g1) / C_MM_PER_PS),
            _ => None,
        };
        out.push(Some(Group { indices, delay_ps }));
        z += slab.thickness_mm;
    }
    out
}
