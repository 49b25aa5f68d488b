//! railnote-core (work in progress: being written now).
#![no_std]
#![forbid(unsafe_code)]
extern crate alloc;
