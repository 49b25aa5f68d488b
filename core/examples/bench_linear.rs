//! Native timing of the linear rail check, for `cargo xtask bench` (which runs the same batch in
//! WASM through tests/bench/wasm_linear.mjs and prints the ratio).
//!
//! `cargo run --release -p railnote-core --example bench_linear -- N` runs N checks of the demo
//! rail (soil-moisture logger, 3.3 V from 5.0 V), each with the load and the highest input nudged
//! a little so no two consecutive checks are identical, and prints one JSON line:
//! `{"runner":"native","n":N,"totalNs":…,"nsPerCheck":…,"checksum":…}`. The checksum is the sum of
//! the worst-case junction temperatures; the WASM script computes the same sum from the same
//! inputs, so a matching checksum shows both ran the same batch.

use railnote_core::linear::{check, DropoutModel, LinearInput};
use std::hint::black_box;
use std::time::Instant;

/// The i-th input of the batch; tests/bench/wasm_linear.mjs builds exactly the same sequence.
fn input(i: usize) -> LinearInput {
    LinearInput {
        vin_min: 4.85,
        vin_nom: 5.0,
        vin_max: 5.15 + (i % 7) as f64 * 0.01,
        vout: 3.3,
        vout_tol_pct: 2.0,
        iout_max: 0.25 + (i % 50) as f64 * 0.0005,
        iout_typ: 0.03,
        iq: 50e-6,
        gnd_pct: 1.0,
        dropout_model: DropoutModel::Resistive,
        dropout_v: 0.3,
        dropout_at_a: 0.3,
        rated_a: 0.3,
        theta_ja: 100.0,
        ta_max: 60.0,
        tj_max: 125.0,
        headroom_margin_v: 0.3,
        thermal_margin_c: 15.0,
        eff_min_pct: None,
        input_budget_a: None,
    }
}

fn main() {
    let n: usize = match std::env::args().nth(1).map(|a| a.parse()) {
        None => 20_000,
        Some(Ok(n)) if n > 0 => n,
        Some(_) => {
            eprintln!("usage: bench_linear [N > 0]");
            std::process::exit(2);
        }
    };
    // The inputs are built before the clock starts, as the WASM script does, so both time only
    // the check itself (plus, for WASM, crossing the boundary).
    let inputs: Vec<LinearInput> = (0..n).map(input).collect();
    // Warm-up: caches and branch predictors, as the JIT gets its warm-up on the WASM side.
    for x in inputs.iter().take(n / 10 + 1) {
        black_box(check(black_box(x)).ok());
    }
    let mut checksum = 0.0;
    let start = Instant::now();
    for x in &inputs {
        match check(black_box(x)) {
            Ok(report) => checksum += black_box(report).worst.tj_c,
            Err(e) => {
                eprintln!("bench input rejected: {} ({})", e.message, e.field);
                std::process::exit(1);
            }
        }
    }
    let total_ns = start.elapsed().as_nanos();
    println!(
        "{{\"runner\":\"native\",\"n\":{n},\"totalNs\":{total_ns},\"nsPerCheck\":{:.1},\"checksum\":{checksum:.9}}}",
        total_ns as f64 / n as f64
    );
}
