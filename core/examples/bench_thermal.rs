//! Native timing of a long junction-temperature series, for `cargo xtask bench` (which runs the
//! same batch through the page's WASM in headless Chromium, tests/bench/wasm_thermal.mjs, and
//! prints the two side by side with their ratio).
//!
//! `cargo run --release -p railnote-core --example bench_thermal -- N` runs N thermal checks of an
//! invented eight-stage Foster network (the most core takes) driven by a 50-step power profile
//! repeated 200 times: a 10 000-step T_j(t) series each, plus the rest of the report (steady
//! state, derating, Z_th curve, the series sampled to at most 4000 points). The first step's
//! power is nudged per check so that no two consecutive checks are identical. Prints one JSON
//! line: `{"runner":"native","n":N,"steps":10000,"totalNs":…,"nsPerCheck":…,"checksum":…}`. The
//! checksum sums seriesPeakC and the last series temperature over the batch; the WASM script
//! computes the same sum from the same inputs, so equal checksums show both ran the same batch.

use railnote_core::thermal::{check_thermal, FosterStage, HeatPath, ProfileStep, ThermalInput};
use std::hint::black_box;
use std::time::Instant;

/// Steps of the power profile and its repeats: 50 × 200 = 10 000 steps of the series.
const PROFILE_STEPS: usize = 50;
const PERIODS: u32 = 200;

/// The i-th input of the batch; tests/bench/wasm_thermal.mjs builds exactly the same sequence.
fn input(i: usize) -> ThermalInput {
    // Invented network, time constants from 20 µs to 2 s, Σ R = 60 K/W.
    let foster = [
        (0.3, 20e-6),
        (0.7, 200e-6),
        (1.5, 1e-3),
        (3.0, 5e-3),
        (6.0, 20e-3),
        (12.0, 100e-3),
        (16.5, 0.5),
        (20.0, 2.0),
    ]
    .into_iter()
    .map(|(r, tau)| FosterStage { r, tau })
    .collect();
    // A bursty load: power in tenths of a watt from 0.1 W to 1.0 W, steps of 1 ms to 5 ms.
    let profile = (0..PROFILE_STEPS)
        .map(|k| ProfileStep {
            power_w: if k == 0 {
                1.0 + (i % 7) as f64 * 0.01
            } else {
                0.1 * ((k * 7) % 10 + 1) as f64
            },
            duration_s: 1e-3 * (k % 5 + 1) as f64,
        })
        .collect();
    ThermalInput {
        power_w: 0.5,
        ta_max: 60.0,
        ta_min: -20.0,
        tj_max: 125.0,
        margin_c: 15.0,
        path: HeatPath::Ja,
        theta_ja: Some(60.0),
        theta_jc: None,
        theta_cs: None,
        theta_sa: None,
        power_rating_w: None,
        psi_jt: None,
        case_top_c: None,
        psi_jb: None,
        board_c: None,
        foster,
        pulse_power_w: None,
        pulse_on_s: None,
        pulse_period_s: None,
        profile,
        profile_periods: Some(PERIODS),
    }
}

fn main() {
    let n: usize = match std::env::args().nth(1).map(|a| a.parse()) {
        None => 200,
        Some(Ok(n)) if n > 0 => n,
        Some(_) => {
            eprintln!("usage: bench_thermal [N > 0]");
            std::process::exit(2);
        }
    };
    // Inputs are built before the clock starts, as the WASM script does.
    let inputs: Vec<ThermalInput> = (0..n).map(input).collect();
    for x in inputs.iter().take(n / 10 + 1) {
        black_box(check_thermal(black_box(x)).ok());
    }
    let mut checksum = 0.0;
    let start = Instant::now();
    for x in &inputs {
        match check_thermal(black_box(x)) {
            Ok(report) => {
                let report = black_box(report);
                let t = report
                    .transient
                    .as_ref()
                    .expect("a Foster network is given");
                checksum += t.series_peak_c + t.series.last().map_or(0.0, |p| p[1]);
            }
            Err(e) => {
                eprintln!("bench input rejected: {} ({})", e.message, e.field);
                std::process::exit(1);
            }
        }
    }
    let total_ns = start.elapsed().as_nanos();
    println!(
        "{{\"runner\":\"native\",\"n\":{n},\"steps\":{},\"totalNs\":{total_ns},\"nsPerCheck\":{:.1},\"checksum\":{checksum:.9}}}",
        PROFILE_STEPS * PERIODS as usize,
        total_ns as f64 / n as f64
    );
}
