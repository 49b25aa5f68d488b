//! Native timing of the divider picker, for `cargo xtask bench` (which runs the same two jobs
//! through the page's WASM in headless Chromium, tests/bench/wasm_divider.mjs, and prints the two
//! side by side with their ratio).
//!
//! `cargo run --release -p railnote-core --example bench_divider -- N` runs each job N times:
//! - `search`: an exhaustive E192/E192 feedback search over 1 kΩ–1 MΩ for 3.3 V from 0.8 V, every
//!   divider current allowed (1 nA–1 A), the best 200 returned, no Monte Carlo;
//! - `montecarlo`: 100 000 Monte Carlo samples of one given divider (75 k/24 k), normal.
//! The target (search) and the seed (Monte Carlo) change with the run index so no two runs are
//! identical. Prints one JSON line per job:
//! `{"runner":"native","job":…,"n":N,"searched":…,"totalNs":…,"nsPerRun":…,"checksum":…}`; the
//! checksum sums the best candidate's V_out (search) or the Monte Carlo mean (montecarlo).

use railnote_core::divider::{check_divider, Distribution, DividerInput, Mode, Topology};
use railnote_core::series::Series;
use std::hint::black_box;
use std::time::Instant;

/// The inputs; tests/bench/wasm_divider.mjs builds exactly the same.
fn input(job: &str, i: usize) -> DividerInput {
    let search = job == "search";
    DividerInput {
        mode: if search {
            Mode::Feedback
        } else {
            Mode::Reverse
        },
        topology: Some(Topology::Feedback),
        series_top: Some(Series::E192),
        series_bottom: Some(Series::E192),
        tol_top_pct: Some(1.0),
        tol_bottom_pct: Some(1.0),
        tcr_top_ppm: Some(100.0),
        tcr_bottom_ppm: Some(100.0),
        temp_min: Some(-20.0),
        temp_max: Some(60.0),
        r_min: Some(1e3),
        r_max: Some(1e6),
        current_min: Some(1e-9),
        current_max: Some(1.0),
        window_pct: Some(3.0),
        vout_min: None,
        vout_max: None,
        limit: Some(200),
        pick: None,
        vref: Some(0.8),
        vref_tol_pct: Some(1.0),
        pin_current_min: Some(-50e-9),
        pin_current_max: Some(50e-9),
        vout_target: Some(3.3 + 0.001 * (i % 7) as f64),
        r_top: if search { None } else { Some(75e3) },
        r_bottom: if search { None } else { Some(24e3) },
        mc_samples: if search { None } else { Some(100_000) },
        mc_seed: Some(i as u32 + 1),
        mc_distribution: Some(Distribution::Normal),
        pin_rise: None,
        pin_fall: None,
        pin_tol_pct: None,
        current_off: None,
        current_on: None,
        current_tol_pct: None,
        v_start: None,
        v_stop: None,
    }
}

fn main() {
    let n: usize = match std::env::args().nth(1).map(|a| a.parse()) {
        None => 20,
        Some(Ok(n)) if n > 0 => n,
        Some(_) => {
            eprintln!("usage: bench_divider [N > 0]");
            std::process::exit(2);
        }
    };
    for job in ["search", "montecarlo"] {
        let inputs: Vec<DividerInput> = (0..n).map(|i| input(job, i)).collect();
        // Warm-up, as the WASM side does.
        for x in inputs.iter().take(n / 10 + 1) {
            black_box(check_divider(x).expect("bench input is valid"));
        }
        let mut checksum = 0.0;
        let mut searched = 0;
        let start = Instant::now();
        for x in &inputs {
            let r = check_divider(black_box(x)).expect("bench input is valid");
            searched = r.searched;
            checksum += match &r.monte_carlo {
                Some(mc) => mc.mean,
                None => r.candidates[0].vout,
            };
        }
        let total = start.elapsed().as_nanos();
        println!(
            "{{\"runner\":\"native\",\"job\":\"{job}\",\"n\":{n},\"searched\":{searched},\"totalNs\":{total},\"nsPerRun\":{:.1},\"checksum\":{checksum:.9}}}",
            total as f64 / n as f64
        );
    }
}
