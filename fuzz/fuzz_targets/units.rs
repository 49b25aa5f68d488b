//! units: the quantity parser for every kind, and format → parse round trips.
#![no_main]

use libfuzzer_sys::fuzz_target;
use railnote_fuzz::units;

fuzz_target!(|data: &[u8]| {
    units::check(data);
});
