//! railnote-reference: cross-checks of railnote-core against references outside the project.
//!
//! The only reference here is ngspice (Debian package `ngspice`), run as a separate program in
//! batch mode. [`spice`] runs a deck and reads its `wrdata` output, and writes the electrical
//! analogue of a Foster network as a SPICE deck; [`converter`] writes a switching converter's
//! power stage (resistive switches, fixed-drop diode) as a deck, runs it to periodic steady state
//! and measures it. The integration tests under `tests/` compare those with core. The crate depends on nothing but core, so the reference stays away
//! from core's own dependencies.

#![forbid(unsafe_code)]

pub mod converter;
pub mod spice;
