// The calculation engine: railnote's Rust core compiled to WebAssembly.
//
// The page never computes: parsing, checking and formatting all go through this module's API.
// The wasm is fetched and instantiated once per page (wasm-bindgen's --target web init fetches
// railnote_bg.wasm next to the glue, found through import.meta.url); every widget awaits `ready`.
// In a single-file build (`cargo xtask dist`, xtask/src/single.rs) the script declares
// RAILNOTE_INLINE_WASM, the module's bytes, before this module, and init instantiates from them.
import init, * as api from '../pkg/railnote.js';

/* global RAILNOTE_INLINE_WASM */
const inline = typeof RAILNOTE_INLINE_WASM === 'undefined' ? undefined : { module_or_path: RAILNOTE_INLINE_WASM };

/** Resolves to the API once the wasm is instantiated; rejects with the load error otherwise. */
export const ready = init(inline).then(() => api);

export { api };
