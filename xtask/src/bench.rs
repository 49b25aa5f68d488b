//! `cargo xtask bench` (being written).
use crate::util::Result;
pub fn bench() -> Result {
    Err("bench: not written yet".into())
}
