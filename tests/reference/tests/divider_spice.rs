//! Core's divider voltages against ngspice's DC operating points of the same circuits.
//!
//! Each candidate core proposes (or is given) is drawn as a netlist: the regulator's reference
//! as an ideal source, the loop that holds the pin at the reference as a voltage-controlled
//! source of gain 10^9, the pin current as a current source. ngspice solves the nodes by itself
//! (modified nodal analysis), sharing no arithmetic with core's closed form.
//!
//! - feedback pin: `Vr ref 0 V_ref`, `E out 0 ref fb 1e9`, R_top out–fb, R_bot fb–0, and the pin
//!   current as `I fb 0` (flowing from the node into the pin);
//! - adjust pin: the loop holds V(out) − V(adj) at V_ref (`Ed d 0 out adj 1` senses the
//!   difference, `E out 0 ref d 1e9` drives the output from the ground side, as the pass element
//!   does from the input), R1 out–adj, R2 adj–0, and the pin current as `I 0 adj` (flowing out of
//!   the ADJ pin into the node);
//! - threshold divider: the input at core's start (or stop) voltage, R_top in–pin, R_bot pin–0,
//!   the pin current while off (or on) as `I pin 0`; the pin must sit at its rising (or falling)
//!   threshold.
//!
//! Tolerance: 0.01 % (1e-4 relative) on every voltage, the figure. ngspice's own error
//! here is near 1e-8 (gain 10^9, 12 printed digits). Run with
//! `cargo test -p railnote-reference --test divider_spice -- --nocapture` to see the table.

use railnote_core::divider::{check_divider, DividerInput, Mode, Topology};
use railnote_core::series::Series;
use railnote_reference::oppoint::operating_point;

const TOLERANCE: f64 = 1e-4;

fn base() -> DividerInput {
    DividerInput {
        mode: Mode::Feedback,
        topology: Some(Topology::Feedback),
        series_top: Some(Series::E24),
        series_bottom: Some(Series::E24),
        tol_top_pct: Some(1.0),
        tol_bottom_pct: Some(1.0),
        tcr_top_ppm: Some(100.0),
        tcr_bottom_ppm: Some(100.0),
        temp_min: Some(-20.0),
        temp_max: Some(60.0),
        r_min: Some(1e3),
        r_max: Some(1e6),
        current_min: Some(10e-6),
        current_max: Some(1e-3),
        window_pct: Some(3.0),
        vout_min: None,
        vout_max: None,
        limit: Some(6),
        pick: None,
        vref: Some(0.8),
        vref_tol_pct: Some(1.0),
        pin_current_min: None,
        pin_current_max: None,
        vout_target: Some(3.3),
        r_top: None,
        r_bottom: None,
        mc_samples: None,
        mc_seed: None,
        mc_distribution: None,
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

fn netlist(topology: Topology, vref: f64, pin: f64, top: f64, bottom: f64) -> String {
    match topology {
        Topology::Feedback => format!(
            "Vr ref 0 DC {vref:e}\nEamp out 0 ref fb 1e9\nRtop out fb {top:e}\n\
             Rbot fb 0 {bottom:e}\nIpin fb 0 DC {pin:e}"
        ),
        Topology::Adjust => format!(
            "Vr ref 0 DC {vref:e}\nEd d 0 out adj 1\nEamp out 0 ref d 1e9\nR1 out adj {top:e}\n\
             R2 adj 0 {bottom:e}\nIadj 0 adj DC {pin:e}"
        ),
    }
}

fn compare(label: &str, core: f64, spice: f64, worst: &mut f64) {
    let err = ((core - spice) / spice).abs();
    *worst = worst.max(err);
    println!("{label:<44} core {core:>14.9} V   ngspice {spice:>14.9} V   rel err {err:.1e}");
    assert!(err <= TOLERANCE, "{label}: core {core}, ngspice {spice}");
}

#[test]
fn feedback_and_adjust_candidates_match_ngspice() {
    let mut worst: f64 = 0.0;
    let mut compared = 0;
    // The demo's rails from an invented 0.8 V reference, with a feedback pin current of each
    // sign; and an adjust-pin regulator (1.25 V, 50 µA out of ADJ: common practice for the
    // classic adjustable part) set to 5 V and 12 V with R1 near 240 Ω.
    let cases = [
        (Topology::Feedback, 0.8, 50e-9, 3.3, (1e3, 1e6)),
        (Topology::Feedback, 0.8, -50e-9, 3.3, (1e3, 1e6)),
        (Topology::Feedback, 0.8, 200e-9, 1.8, (1e3, 1e6)),
        (Topology::Adjust, 1.25, 50e-6, 5.0, (100.0, 10e3)),
        (Topology::Adjust, 1.25, 50e-6, 12.0, (100.0, 10e3)),
    ];
    for (topology, vref, pin, target, (r_min, r_max)) in cases {
        let input = DividerInput {
            topology: Some(topology),
            vref: Some(vref),
            pin_current_min: Some(pin),
            pin_current_max: Some(pin),
            vout_target: Some(target),
            r_min: Some(r_min),
            r_max: Some(r_max),
            current_max: Some(20e-3),
            ..base()
        };
        let report = check_divider(&input).expect("the search finds candidates");
        for c in &report.candidates {
            let v = operating_point(
                "divider",
                &netlist(topology, vref, pin, c.r_top, c.r_bottom),
                &["out"],
            )
            .unwrap();
            let label = format!(
                "{topology:?} {target} V: {} / {} Ω, I_pin {pin:e}",
                c.r_top, c.r_bottom
            );
            compare(&label, c.vout, v[0], &mut worst);
            compared += 1;
        }
    }
    // Reverse mode, values in no series.
    for (topology, vref, pin, top, bottom) in [
        (Topology::Feedback, 0.8, 1e-6, 123_456.0, 45_678.0),
        (Topology::Adjust, 1.25, 100e-6, 237.0, 1_234.0),
    ] {
        let input = DividerInput {
            mode: Mode::Reverse,
            topology: Some(topology),
            vref: Some(vref),
            pin_current_min: Some(pin),
            pin_current_max: Some(pin),
            vout_target: None,
            r_top: Some(top),
            r_bottom: Some(bottom),
            ..base()
        };
        let c = &check_divider(&input).unwrap().candidates[0];
        let v = operating_point(
            "reverse",
            &netlist(topology, vref, pin, top, bottom),
            &["out"],
        )
        .unwrap();
        compare(
            &format!("{topology:?} reverse {top} / {bottom} Ω"),
            c.vout,
            v[0],
            &mut worst,
        );
        compared += 1;
    }
    println!("{compared} dividers, largest relative error {worst:.1e}");
    assert!(compared >= 20);
}

#[test]
fn threshold_divider_pins_sit_at_their_thresholds() {
    // An invented enable pin: rising 1.20 V, falling 1.20 V, 3 µA sunk while off. At core's
    // start voltage (off, 3 µA) the pin must read 1.20 V; at the stop voltage (on, no current)
    // also 1.20 V.
    let input = DividerInput {
        mode: Mode::Threshold,
        pin_rise: Some(1.2),
        pin_fall: Some(1.2),
        current_off: Some(3e-6),
        current_on: Some(0.0),
        v_start: Some(11.5),
        v_stop: Some(10.5),
        window_pct: Some(5.0),
        ..base()
    };
    let report = check_divider(&input).unwrap();
    let mut worst: f64 = 0.0;
    for c in &report.threshold.as_ref().unwrap().candidates[..4] {
        for (what, vin, current) in [("start", c.start, 3e-6), ("stop", c.stop, 0.0)] {
            let net = format!(
                "Vin in 0 DC {vin:e}\nRtop in pin {:e}\nRbot pin 0 {:e}\nIpin pin 0 DC {current:e}",
                c.r_top, c.r_bottom
            );
            let v = operating_point("threshold", &net, &["pin"]).unwrap();
            compare(
                &format!("threshold {what} {} / {} Ω", c.r_top, c.r_bottom),
                1.2,
                v[0],
                &mut worst,
            );
        }
    }
}
