//! railnote-reference: cross-checks of railnote-core against references outside the project.
//!
//! The only reference here is ngspice (Debian package `ngspice`), run as a separate program in
//! batch mode. [`spice`] writes the electrical analogue of a Foster network as a SPICE deck, runs
//! a transient analysis and reads the junction node back; the integration tests under `tests/`
//! compare that with core. The crate depends on nothing but core, so the reference stays away
//! from core's own dependencies.

#![forbid(unsafe_code)]

pub mod spice;
