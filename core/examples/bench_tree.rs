//! Native timing of the rail tree, for `cargo xtask bench` (which runs the same tree through the
//! page's WASM in headless Chromium, tests/bench/wasm_tree.mjs, and prints the ratio).
//!
//! `cargo run --release -p railnote-core --example bench_tree -- N` checks an invented tree of
//! 200 rails and 1000 loads N times: from a 24 V source, 20 switching rails, each feeding 4
//! linear rails and 5 load switches (linear rails at 3.3 V from 5 V, switches of 50 mΩ), and
//! 1000 loads spread over the linear rails and switches, half by current and half by power.
//! The source's nominal voltage is nudged per run. Prints one JSON line:
//! `{"runner":"native","n":N,"rails":200,"loads":1000,"totalNs":…,"nsPerRun":…,"checksum":…}`,
//! the checksum summing the nominal average source power.

use railnote_core::tree::{check_tree, LoadSpec, RailKind, RailSpec, SourceSpec, TreeInput};
use std::hint::black_box;
use std::time::Instant;

/// The i-th tree; tests/bench/wasm_tree.mjs builds the same.
fn tree(i: usize) -> TreeInput {
    let rail = |name: String, parent: String, kind| RailSpec::new(&name, &parent, kind);
    let mut rails = Vec::new();
    let mut leaves = Vec::new();
    for b in 0..20 {
        let buck = format!("B{b}");
        rails.push(RailSpec {
            vout: Some(5.0),
            efficiency_pct: Some(90.0),
            iq: Some(1e-3),
            ..rail(buck.clone(), "Source".into(), RailKind::Switching)
        });
        for k in 0..4 {
            let name = format!("L{b}.{k}");
            rails.push(RailSpec {
                vout: Some(3.3),
                dropout_v: Some(0.3),
                iq: Some(50e-6),
                theta_ja: Some(100.0),
                ..rail(name.clone(), buck.clone(), RailKind::Linear)
            });
            leaves.push(name);
        }
        for k in 0..5 {
            let name = format!("S{b}.{k}");
            rails.push(RailSpec {
                r_on: Some(0.05),
                ..rail(name.clone(), buck.clone(), RailKind::Switch)
            });
            leaves.push(name);
        }
    }
    let loads = (0..1000)
        .map(|k| {
            let by_power = k % 2 == 1;
            let typ = 1e-3 * (1 + k % 7) as f64;
            LoadSpec {
                name: format!("Load {k}"),
                rail: leaves[k % leaves.len()].clone(),
                typ_a: (!by_power).then_some(typ),
                peak_a: (!by_power).then_some(3.0 * typ),
                typ_w: by_power.then_some(typ),
                peak_w: by_power.then_some(3.0 * typ),
                activity_pct: Some(10.0 + (k % 9) as f64 * 10.0),
                sleep_a: Some(1e-6),
            }
        })
        .collect();
    TreeInput {
        source: SourceSpec {
            name: "Source".into(),
            v_min: 20.0,
            v_nom: 24.0 + 0.01 * (i % 7) as f64,
            v_max: 28.0,
            capacity_ah: Some(10.0),
            capacity_wh: None,
            current_limit_a: Some(10.0),
        },
        rails,
        loads,
        ta_max: 50.0,
    }
}

fn main() {
    let n: usize = match std::env::args().nth(1).map(|a| a.parse()) {
        None => 20,
        Some(Ok(n)) if n > 0 => n,
        Some(_) => {
            eprintln!("usage: bench_tree [N > 0]");
            std::process::exit(2);
        }
    };
    let inputs: Vec<TreeInput> = (0..n).map(tree).collect();
    for x in inputs.iter().take(n / 10 + 1) {
        black_box(check_tree(x).expect("bench tree is valid"));
    }
    let mut checksum = 0.0;
    let start = Instant::now();
    for x in &inputs {
        let r = check_tree(black_box(x)).expect("bench tree is valid");
        checksum += r.corners[1].source_w.avg;
    }
    let total = start.elapsed().as_nanos();
    println!(
        "{{\"runner\":\"native\",\"n\":{n},\"rails\":200,\"loads\":1000,\"totalNs\":{total},\"nsPerRun\":{:.1},\"checksum\":{checksum:.9}}}",
        total as f64 / n as f64
    );
}
