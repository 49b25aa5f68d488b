//! railnote-core: the calculations behind railnote's power-rail checks.
//!
//! One module per calculator plus the shared pieces:
//!
//! - [`units`]: reading quantities as engineers type them (engineering notation, SI prefixes,
//!   the IEC 60062 RKM code) and writing them back in engineering notation.
//! - [`error`]: the one input error type, naming the field and the reason.
//! - [`fields`]: reading an input from named fields (a JS object, a JSON document).
//! - [`verdict`]: pass / marginal / fail, shared by every calculator.
//! - [`output`]: a report as plain data (numbers, words, lists, objects) for the wasm crate.
//! - [`series`]: the IEC 60063 preferred-number series E3 to E192.
//! - [`linear`]: the linear rail check.
//! - [`divider`]: the divider picker: feedback and threshold dividers from standard values,
//!   with worst case, root-sum-square spread and a seeded Monte Carlo yield.
//! - [`switching`]: the switching estimate: buck, boost and inverting buck-boost, CCM and DCM,
//!   losses, efficiency against load.
//! - [`compare`]: linear or switching: the same rail through both, side by side.
//! - [`tree`]: the rail tree, source to every load, from the leaves up (not yet on a page).
//! - [`thermal`]: the thermal path: steady chain, measured-case estimates, heat-sink need,
//!   derating, Foster-network transients and pulse trains.
//!
//! The crate is `no_std` with `alloc`, does no IO and knows nothing of JavaScript: the `wasm`
//! crate is the only place that does. Every calculator validates its input into a checked type
//! first; computing from that type cannot fail. Maths goes through `libm` so that native and
//! WebAssembly builds give the same numbers.
#![no_std]
#![forbid(unsafe_code)]
#![warn(missing_debug_implementations)]

extern crate alloc;
#[cfg(feature = "std")]
extern crate std;

pub mod compare;
pub mod divider;
pub mod error;
pub mod fields;
pub mod linear;
pub mod output;
pub mod series;
pub mod switching;
pub mod thermal;
pub mod tree;
pub mod units;
pub mod verdict;

pub use error::InputError;
