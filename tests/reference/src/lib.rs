//! railnote-reference: cross-checks of railnote-core against references outside the project.
//!
//! The references are programs run beside the tests, never linked in: ngspice (Debian package
//! `ngspice`) in batch mode, and Python with the PyPI package `eseries`. [`spice`] runs a deck and
//! reads its `wrdata` output, and writes the electrical analogue of a Foster network as a SPICE
//! deck; [`converter`] writes a switching converter's power stage (resistive switches, fixed-drop
//! diode) as a deck, runs it to periodic steady state and measures it; [`oppoint`] runs DC
//! operating points of any netlist (the divider tests use it). The integration tests under
//! `tests/` compare those with core. The crate depends on nothing but core, so the references
//! stay away from core's own dependencies.

#![forbid(unsafe_code)]

pub mod converter;
pub mod oppoint;
pub mod spice;
