//! tree_doc: the tree document importer, from raw bytes as a pasted or imported file gives them:
//! JSON (the document site/js/tree-doc.js writes) through core's `TreeInput::read`
//! and the tree check, with the tree's invariants.
#![no_main]

use libfuzzer_sys::fuzz_target;
use railnote_fuzz::{calc, value_from_json, value_text};

fuzz_target!(|data: &[u8]| {
    // tree-doc.js refuses anything over 1 MB before parsing; libFuzzer's inputs are far smaller.
    let Ok(json) = serde_json::from_slice::<serde_json::Value>(data) else {
        return;
    };
    let value = value_from_json(&json);
    if std::env::var_os("RAILNOTE_FUZZ_SHOW").is_some() {
        eprintln!("input: {}", value_text(&value));
    }
    calc::tree(&value);
});
