//! tree: the calculator's entry point from a structured edit of its demo input (see lib.rs).
#![no_main]

use libfuzzer_sys::fuzz_target;
use railnote_fuzz::{calc, demos, structured_input, Value};
use std::sync::LazyLock;

static DEMOS: LazyLock<Vec<Value>> = LazyLock::new(|| demos(include_str!("../demos/tree.json")));

fuzz_target!(|data: &[u8]| {
    calc::tree(&structured_input(data, &DEMOS));
});
