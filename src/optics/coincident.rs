//! The forward light of a stack whose rays all leave from one point: the set-up's Jones matrix.
//!
//! Physics. In a stack of plane-parallel plates every ray shares the incident tangential wave
//! vector and leaves along the incident direction (`optics::parallel`). Where, in addition, each
//! plate moves its two modes' rays by the same lateral shift (no walk-off between them: a plate
//! at normal incidence with its optic axis in the faces, or along the normal), every path leaves
//! from one point. The spots then hold one site, whose field is the sum of the paths' Jones
//! matrices (`optics::spots`: rays within [`SITE_FRACTION_OF_RADIUS`] of the beam radius add with
//! overlap 1 to the last bit), and that sum is the product of each element's matrix,
//! t_out·diag(e^{i k0 q_z L})·t_in for a plate (`optics::conoscope::set_up_matrix`): one 2×2
//! product per element instead of 2^N paths and their grouping. The forward light's coherency
//! matrix is C_out = M C_in Mᴴ for the input's coherency matrix C_in, its Stokes vector that of
//! C_out (`optics::spots::stokes_of`) and its power S0 = tr C_out. The two agree to rounding (the
//! sum is taken in another order); `tests/spectrum.rs` compares them on filters and on stacks
//! where the rays part, which this module declines.
//!
//! Conventions: as `optics::parallel`; the Stokes vector on the beam basis (e1, e2) of the
//! outgoing direction (`optics::modes::beam_basis`; x̂, ŷ along z), S3 > 0 right-handed, as the
//! spots give theirs. Used by spectra, where every wavelength needs only the forward light.

use crate::optics::conoscope::{conoscope_stack_ok, set_up_matrix};
use crate::optics::modes::Travel;
use crate::optics::spots::{coherency, stokes_of};
use crate::optics::stack::{Element, Medium, Stack};
use crate::precision::SITE_FRACTION_OF_RADIUS;

/// The Stokes vector [S0, S1, S2, S3] of the forward light of `stack` when all its rays leave
/// from one point (see the module's header), by the set-up's matrix: S0 is the total forward
/// power, the same number as tr(M C_in Mᴴ) to the bit; `None` when the stack has faces at an angle or a crystal this
/// product cannot solve, or when some plate parts its two rays by more than the site tolerance
/// (summed over the plates).
pub fn coincident_stokes(stack: &Stack) -> Option<[f64; 4]> {
    conoscope_stack_ok(stack).ok()?;
    // General crystals take the spots' path, as they always have.
    let general = |l: &crate::optics::stack::Layer| matches!(l.element, Element::Slab(s) if matches!(s.medium, Medium::Anisotropic(_)));
    if stack.layers.iter().any(general) {
        return None;
    }
    let qt = stack.tangential();
    let tolerance = SITE_FRACTION_OF_RADIUS * 0.5 * stack.input.diameter_mm;
    let mut spread = 0.0;
    // The parting of a plate's two rays per unit thickness depends on its medium alone, and a
    // filter repeats one medium plate after plate: each medium's modes are solved once.
    let mut last: Option<(Medium, Option<f64>)> = None;
    for layer in &stack.layers {
        let Element::Slab(slab) = layer.element else {
            continue;
        };
        let per_mm = match last {
            Some((medium, per_mm)) if medium == slab.medium => per_mm,
            _ => {
                let [a, b] = slab.medium.modes(qt, Travel::Forward);
                let per_mm = match (a.ray_direction(), b.ray_direction()) {
                    (Some(s), Some(t)) => Some((s.x / s.z - t.x / t.z).hypot(s.y / s.z - t.y / t.z)),
                    _ => None,
                };
                last = Some((slab.medium, per_mm));
                per_mm
            }
        };
        if let Some(per_mm) = per_mm {
            spread += slab.thickness_mm * per_mm;
        }
    }
    (spread <= tolerance).then(|| {
        let m = set_up_matrix(stack, qt);
        stokes_of(&(m * coherency(&stack.input.stokes) * m.adjoint()))
    })
}
