//! The trace of a resolved stack: one entry point, two exact methods. Plane-parallel stacks (the
//! version-1 geometry) are traced with one shared tangential wave vector
//! ([`crate::optics::parallel`]); stacks with faces at any angle, and every stack holding a
//! general crystal, face by face ([`crate::optics::planar`]). The two agree to rounding on plane-parallel stacks (tested), and
//! neither can fail: the stack was checked when it was resolved.

use crate::optics::parallel::trace_parallel;
use crate::optics::planar::PlanarTracer;
use crate::optics::stack::Stack;
pub use crate::optics::traced::Trace;

/// Traces a resolved stack.
pub fn trace(stack: &Stack) -> Trace {
    trace_reusing(&mut PlanarTracer::default(), stack)
}

/// Traces a resolved stack as [`trace`] does, face by face with `planar`, which keeps what it
/// found of the faces for the next trace (many incidences or samples of one stack).
pub fn trace_reusing(planar: &mut PlanarTracer, stack: &Stack) -> Trace {
    if stack.is_plane_parallel() && !stack.holds_general_crystal() {
        trace_parallel(stack)
    } else {
        planar.trace(stack)
    }
}
