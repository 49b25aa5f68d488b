//! Native timing of the switching estimate's full sweep, for `cargo xtask bench` (which runs the
//! same batch through the page's WASM in headless Chromium, tests/bench/wasm_switching.mjs, and
//! prints the two side by side with their ratio).
//!
//! `cargo run --release -p railnote-core --example bench_switching -- N` runs N switching checks
//! of the demo buck (invented scenario: the soil-moisture logger's 5.0 V, 0.8 A buck from its 12 V
//! lead-acid battery, 10.8–14.4 V; parts invented), each a full report: the three V_in corners
//! and the efficiency sweep of 3 corners × 50 loads, every point solved for its own conduction
//! mode and losses. The load is nudged per check so no two consecutive checks are identical.
//! Prints one JSON line:
//! `{"runner":"native","n":N,"points":150,"totalNs":…,"nsPerCheck":…,"checksum":…}`. The
//! checksum sums every efficiency of the sweep over the batch; the WASM script computes the same
//! sum from the same inputs, so equal checksums show both ran the same batch.

use railnote_core::switching::{
    check_switching, LightLoad, Rectifier, SwitchingInput, Topology, SWEEP_POINTS,
};
use std::hint::black_box;
use std::time::Instant;

/// The i-th input of the batch; tests/bench/wasm_switching.mjs builds exactly the same sequence.
fn input(i: usize) -> SwitchingInput {
    SwitchingInput {
        topology: Topology::Buck,
        rectifier: Rectifier::Synchronous,
        light_load: LightLoad::DiscontinuousAllowed,
        vin_min: 10.8,
        vin_nom: 12.0,
        vin_max: 14.4,
        vout: 5.0,
        iout: 0.8 + (i % 50) as f64 * 0.001,
        fsw: 500e3,
        inductance: Some(22e-6),
        ripple_ratio_pct: Some(30.0),
        main_rds_on: 0.1,
        rect_rds_on: Some(0.05),
        diode_vf: None,
        rise_time: 10e-9,
        fall_time: 10e-9,
        main_gate_charge: 5e-9,
        rect_gate_charge: Some(5e-9),
        drive_v: 5.0,
        dead_time: Some(20e-9),
        body_diode_vf: Some(0.7),
        coss_charge: None,
        coss: Some(200e-12),
        dcr: 0.05,
        core_loss: 0.01,
        iq: 1e-3,
        cout: 22e-6,
        esr: 0.01,
        min_on_time: 100e-9,
        max_duty_pct: 90.0,
        isat: Some(1.5),
    }
}

fn main() {
    let n: usize = match std::env::args().nth(1).map(|a| a.parse()) {
        None => 2000,
        Some(Ok(n)) if n > 0 => n,
        Some(_) => {
            eprintln!("usage: bench_switching [N > 0]");
            std::process::exit(2);
        }
    };
    // Inputs are built before the clock starts, as the WASM script does.
    let inputs: Vec<SwitchingInput> = (0..n).map(input).collect();
    for x in inputs.iter().take(n / 10 + 1) {
        black_box(check_switching(black_box(x)).ok());
    }
    let mut checksum = 0.0;
    let start = Instant::now();
    for x in &inputs {
        match check_switching(black_box(x)) {
            Ok(report) => {
                let report = black_box(report);
                for curve in &report.sweep {
                    checksum += curve.efficiency_pct.iter().sum::<f64>();
                }
            }
            Err(e) => {
                eprintln!("bench input rejected: {} ({})", e.message, e.field);
                std::process::exit(1);
            }
        }
    }
    let total_ns = start.elapsed().as_nanos();
    println!(
        "{{\"runner\":\"native\",\"n\":{n},\"points\":{},\"totalNs\":{total_ns},\"nsPerCheck\":{:.1},\"checksum\":{checksum:.9}}}",
        3 * SWEEP_POINTS,
        total_ns as f64 / n as f64
    );
}
