// The calculation engine: railnote's Rust core compiled to WebAssembly.
//
// The page never computes: parsing, checking and formatting all go through this module's API.
// The wasm is fetched and instantiated once per page (wasm-bindgen's --target web init fetches
// railnote_bg.wasm next to the glue, found through import.meta.url); every widget awaits `ready`.
import init, * as api from '../pkg/railnote.js';

/** Resolves to the API once the wasm is instantiated; rejects with the load error otherwise. */
export const ready = init().then(() => api);

export { api };
