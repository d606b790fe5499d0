//! Liquid-crystal cells: a nematic layer between two rubbed substrates, its director profile at
//! a voltage and the light that crosses it.
//!
//! One file per concept: the material's constants ([`nematic`]), the banded solve the director
//! solver needs ([`banded`]), the director profile from the Oseen–Frank and electric energy
//! ([`director`]), one uniform slice crossed exactly in closed form ([`slice`]), the slices' product at several
//! directions side by side ([`transfer_lanes`]), the light through
//! the stratified layer by Berreman's 4×4 method ([`stratified`]), the retardance against voltage by continuation ([`curve`]), and the
//! catalogue of published nematics ([`catalogue`]).

pub mod banded;
pub mod catalogue;
pub mod curve;
pub mod director;
pub mod nematic;
pub mod slice;
pub mod stratified;
pub mod transfer_lanes;
