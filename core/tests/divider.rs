//! The divider picker against hand-worked dividers, the relations that define it, brute force
//! and statistics. ngspice operating points and the `eseries` tables are in tests/reference.
//!
//! Tolerances:
//! - closed-form voltages (hand-worked, Kirchhoff): 1e-12 relative;
//! - corner worst case against a brute-force grid: 1e-12 relative (the extremes are corners);
//! - Monte Carlo σ against the analytic RSS: 2 % (200 000 samples give a 0.16 % standard error
//!   on σ; the rest is the first-order linearisation of 1/R);
//! - Monte Carlo mean against the nominal: 4 standard errors.

use railnote_core::divider::{
    check_divider, CheckId, CurrentFit, Distribution, DividerInput, DividerReport, End, Mode,
    Topology,
};
use railnote_core::series::Series;
use railnote_core::verdict::Status;
use railnote_core::InputError;

/// The only test code that calls the divider picker.
fn check(input: &DividerInput) -> Result<DividerReport, InputError> {
    let report = check_divider(input);
    if let Ok(r) = &report {
        // Whatever the inputs, every number that reaches a page is finite.
        for c in &r.candidates {
            for v in [
                c.vout,
                c.error_pct,
                c.worst_min,
                c.worst_max,
                c.rss,
                c.power_w,
            ] {
                assert!(v.is_finite(), "{c:?}");
            }
        }
    }
    report
}

fn near(got: f64, want: f64, rel: f64, what: &str) {
    let err = if want == 0.0 {
        got.abs()
    } else {
        ((got - want) / want).abs()
    };
    assert!(
        err <= rel,
        "{what}: got {got}, want {want} (rel err {err:e})"
    );
}

/// The demo's 3.3 V rail from an invented 0.8 V-class reference: ±1 %, feedback pin current
/// within ±50 nA, E24 1 % 100 ppm/K resistors, −20…60 °C, ±3 % window, 10 µA–1 mA.
fn demo() -> DividerInput {
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
        limit: None,
        pick: None,
        vref: Some(0.8),
        vref_tol_pct: Some(1.0),
        pin_current_min: Some(-50e-9),
        pin_current_max: Some(50e-9),
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

fn reverse(top: f64, bottom: f64) -> DividerInput {
    DividerInput {
        mode: Mode::Reverse,
        r_top: Some(top),
        r_bottom: Some(bottom),
        ..demo()
    }
}

/// The brief's relation, written out again here: V = V_x·(1 + R_set/R_sense) + I·R_set.
fn level(v: f64, i: f64, set: f64, sense: f64) -> f64 {
    v * (1.0 + set / sense) + i * set
}

#[test]
fn hand_worked_feedback_dividers() {
    // Hand-worked (Kirchhoff at the feedback node): 0.8 V·(1 + 75 k/24 k) = 0.8 V·4.125 = 3.3 V
    // exactly; 0.8 V·(1 + 12.5 k/10 k) = 1.8 V; with I_fb = +50 nA (both ends of the range)
    // 75 kΩ adds 3.75 mV.
    let cases: &[(f64, f64, f64, f64, f64)] = &[
        // top, bottom, pin current, expected V_out, expected sense current
        (75e3, 24e3, 0.0, 3.3, 0.8 / 24e3),
        (12.5e3, 10e3, 0.0, 1.8, 0.8 / 10e3),
        (75e3, 24e3, 50e-9, 3.30375, 0.8 / 24e3),
        (75e3, 24e3, -50e-9, 3.29625, 0.8 / 24e3),
    ];
    for &(top, bottom, i, vout, sense) in cases {
        let r = check(&DividerInput {
            pin_current_min: Some(i),
            pin_current_max: Some(i),
            ..reverse(top, bottom)
        })
        .unwrap();
        let c = &r.candidates[0];
        near(c.vout, vout, 1e-12, "V_out");
        near(c.sense_current, sense, 1e-12, "sense current");
        near(c.set_current, sense + i, 1e-12, "set current");
        // Dissipation: V_ref·I_sense in R_bot plus (V_out − V_ref)·I_set in R_top.
        near(
            c.power_w,
            0.8 * sense + (vout - 0.8) * (sense + i),
            1e-12,
            "power",
        );
    }
}

#[test]
fn hand_worked_adjust_pin_divider() {
    // Common practice: the classic adjustable three-terminal regulator has a 1.25 V reference
    // between OUT and ADJ, R1 = 240 Ω across it, and an adjust-pin current of about 50 µA.
    // V_out = 1.25·(1 + 720/240) + 50 µA·720 Ω = 5.0 V + 36 mV (hand-worked).
    let r = check(&DividerInput {
        topology: Some(Topology::Adjust),
        vref: Some(1.25),
        pin_current_min: Some(50e-6),
        pin_current_max: Some(50e-6),
        vout_target: Some(5.0),
        ..reverse(240.0, 720.0)
    })
    .unwrap();
    let c = &r.candidates[0];
    near(c.vout, 5.036, 1e-12, "V_out");
    near(c.sense_current, 1.25 / 240.0, 1e-12, "R1 current");
    near(c.set_current, 1.25 / 240.0 + 50e-6, 1e-12, "R2 current");
}

#[test]
fn worst_case_equals_brute_force_over_the_tolerance_box() {
    // Brute force: every combination of 5 points across each of the four ranges (V_ref,
    // R_top, R_bot, pin current), 625 evaluations of the relation; the extremes must equal the
    // reported corners, and nothing inside the box may go beyond them.
    for (topology, top, bottom, i_min, i_max) in [
        (Topology::Feedback, 75e3, 24e3, -50e-9, 50e-9),
        (Topology::Feedback, 910e3, 300e3, -2e-6, 1e-6),
        (Topology::Adjust, 240.0, 720.0, 20e-6, 100e-6),
    ] {
        let input = DividerInput {
            topology: Some(topology),
            vref: Some(if topology == Topology::Adjust {
                1.25
            } else {
                0.8
            }),
            pin_current_min: Some(i_min),
            pin_current_max: Some(i_max),
            vout_target: None,
            ..reverse(top, bottom)
        };
        let r = check(&input).unwrap();
        let c = &r.candidates[0];
        let d = r.detail.as_ref().unwrap();
        let vref = input.vref.unwrap();
        // Half-ranges: 1 % reference; 1 % + 100 ppm/K · 45 K (60 °C − 25 °C is 35 K, 25 °C −
        // (−20 °C) is 45 K) for each resistor.
        let r_half = 0.01 + 100e-6 * 45.0;
        near(d.delta_t, 45.0, 1e-12, "ΔT");
        let steps = |lo: f64, hi: f64| (0..5).map(move |k| lo + (hi - lo) * f64::from(k) / 4.0);
        let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
        for v in steps(vref * 0.99, vref * 1.01) {
            for t in steps(top * (1.0 - r_half), top * (1.0 + r_half)) {
                for b in steps(bottom * (1.0 - r_half), bottom * (1.0 + r_half)) {
                    for i in steps(i_min, i_max) {
                        let x = match topology {
                            Topology::Feedback => level(v, i, t, b),
                            Topology::Adjust => level(v, i, b, t),
                        };
                        lo = lo.min(x);
                        hi = hi.max(x);
                    }
                }
            }
        }
        near(c.worst_min, lo, 1e-12, "worst min");
        near(c.worst_max, hi, 1e-12, "worst max");
        // The corners in words: the output is lowest with V_ref low and the resistor that
        // carries the reference high.
        assert_eq!(d.min_corner.vref, End::Low);
        assert_eq!(d.max_corner.vref, End::High);
        let (sense_low, sense_high) = match topology {
            Topology::Feedback => (d.min_corner.r_bottom, d.max_corner.r_bottom),
            Topology::Adjust => (d.min_corner.r_top, d.max_corner.r_top),
        };
        assert_eq!((sense_low, sense_high), (End::High, End::Low));
    }
}

#[test]
fn monte_carlo_agrees_with_the_rss_spread() {
    // A normal term with σ = h/3 truncated at ±3σ has σ = (h/3)·0.986578 (variance of a
    // standard normal truncated to ±3: 1 − 6φ(3)/(2Φ(3) − 1) = 0.973337; from memory, and
    // re-derived from φ(3) = 0.0044318, Φ(3) = 0.99865). A uniform term over ±h has σ = h/√3.
    let samples = 200_000u32;
    for (distribution, factor) in [
        (Distribution::Normal, 0.986578 / 3.0),
        (Distribution::Uniform, 1.0 / 3f64.sqrt()),
    ] {
        let r = check(&DividerInput {
            mc_samples: Some(samples),
            mc_seed: Some(11),
            mc_distribution: Some(distribution),
            ..reverse(75e3, 24e3)
        })
        .unwrap();
        let c = &r.candidates[0];
        let mc = r.monte_carlo.as_ref().unwrap();
        near(mc.sigma, c.rss * factor, 0.02, "σ against RSS");
        let standard_error = mc.sigma / f64::from(samples).sqrt();
        assert!(
            (mc.mean - c.vout).abs() <= 4.0 * standard_error,
            "mean {} against nominal {} (se {standard_error})",
            mc.mean,
            c.vout
        );
        // Every sample lies within the worst case, so the histogram holds them all.
        assert!(mc.min >= c.worst_min && mc.max <= c.worst_max);
        assert_eq!(mc.histogram.counts.iter().sum::<u32>(), samples);
        assert!(mc.histogram.lo <= c.worst_min && mc.histogram.hi >= c.worst_max);
    }
}

#[test]
fn monte_carlo_is_reproducible_from_its_seed() {
    let run = |seed| {
        check(&DividerInput {
            mc_samples: Some(10_000),
            mc_seed: Some(seed),
            ..reverse(75e3, 24e3)
        })
        .unwrap()
        .monte_carlo
        .unwrap()
    };
    assert_eq!(run(5), run(5));
    assert_ne!(run(5).mean, run(6).mean);
}

#[test]
fn yield_rises_as_tolerances_tighten() {
    // With a ±1.5 % window, 5 % parts fall out often, 1 % parts sometimes, 0.1 % parts rarely.
    let yield_at = |tol: f64, ref_tol: f64| {
        let r = check(&DividerInput {
            tol_top_pct: Some(tol),
            tol_bottom_pct: Some(tol),
            vref_tol_pct: Some(ref_tol),
            window_pct: Some(1.5),
            mc_samples: Some(50_000),
            mc_seed: Some(3),
            ..reverse(75e3, 24e3)
        })
        .unwrap();
        r.monte_carlo.unwrap().yield_pct
    };
    let loose = yield_at(5.0, 1.0);
    let usual = yield_at(1.0, 1.0);
    let tight = yield_at(0.1, 0.5);
    assert!(loose < usual && usual < tight, "{loose} {usual} {tight}");
    assert!(tight > 99.0, "{tight}");
}

#[test]
fn the_search_finds_what_all_pairs_would() {
    // The binary search per R_sense value must find the same best error as trying every pair
    // (all-pairs brute force, E96 over 1 k–1 MΩ: 289² = 83 521 pairs), and look at far fewer.
    let input = DividerInput {
        series_top: Some(Series::E96),
        series_bottom: Some(Series::E96),
        pin_current_min: Some(0.0),
        pin_current_max: Some(0.0),
        ..demo()
    };
    let r = check(&input).unwrap();
    let values = Series::E96.values_in(1e3, 1e6);
    let mut best = f64::INFINITY;
    for &t in &values {
        for &b in &values {
            let current = 0.8 / b;
            if (10e-6..=1e-3).contains(&current) {
                best = best.min((level(0.8, 0.0, t, b) - 3.3).abs() / 3.3 * 100.0);
            }
        }
    }
    near(r.candidates[0].error_pct.abs(), best, 1e-9, "best error");
    assert!(r.searched <= 2 * values.len() as u32, "{}", r.searched);
    // Ranked by |error| first.
    for pair in r.candidates.windows(2) {
        assert!(pair[0].error_pct.abs() <= pair[1].error_pct.abs());
    }
}

#[test]
fn ties_go_to_the_current_nearest_the_middle_of_the_range() {
    // 75 k/24 k and 7.5 k/2.4 k both give 3.3 V exactly; 33 µA is nearer (on a log scale) to
    // the middle of 10 µA–1 mA (100 µA) than 333 µA is, so 75 k/24 k ranks first.
    let r = check(&DividerInput {
        pin_current_min: Some(0.0),
        pin_current_max: Some(0.0),
        ..demo()
    })
    .unwrap();
    let (first, second) = (&r.candidates[0], &r.candidates[1]);
    assert_eq!((first.r_top, first.r_bottom), (75e3, 24e3));
    assert_eq!((second.r_top, second.r_bottom), (7.5e3, 2.4e3));
    assert_eq!(first.current_fit, CurrentFit::In);
    assert_eq!(first.series_top, Some(Series::E24));
}

#[test]
fn the_demo_rails_verdicts() {
    // 1 % parts and a 1 % reference spread ±3.3 % in the worst case: marginal against ±3 %,
    // RSS inside. A 0.5 % reference and 0.1 % 25 ppm/K parts fit (hand-worked from the
    // half-ranges: 0.5 % + 2·(0.1 % + 0.1125 %)·(1 − 0.8/3.3) + 50 nA·75 kΩ/3.3 V ≈ 0.94 %).
    let r = check(&demo()).unwrap();
    assert_eq!(r.verdict, Status::Marginal);
    let window = r.checks.iter().find(|c| c.id == CheckId::Window).unwrap();
    assert_eq!(window.status, Status::Marginal);
    let r = check(&DividerInput {
        vref_tol_pct: Some(0.5),
        tol_top_pct: Some(0.1),
        tol_bottom_pct: Some(0.1),
        tcr_top_ppm: Some(25.0),
        tcr_bottom_ppm: Some(25.0),
        ..demo()
    })
    .unwrap();
    assert_eq!(r.verdict, Status::Pass, "{}", r.summary);
    let c = &r.candidates[0];
    assert!(c.fits_window && c.worst_max / c.vout - 1.0 < 0.0095);
    // The 1.8 V rail from the same reference.
    let r = check(&DividerInput {
        vout_target: Some(1.8),
        ..demo()
    })
    .unwrap();
    assert!(r.candidates[0].error_pct.abs() < 0.5);
}

#[test]
fn threshold_dividers() {
    // An invented enable pin: rising 1.20 V, falling 1.10 V, no pin current. Only the ratio is
    // free: start = 1.2·(1 + R_top/R_bot) (Kirchhoff), stop = start·1.1/1.2.
    let base = DividerInput {
        mode: Mode::Threshold,
        pin_rise: Some(1.2),
        pin_fall: Some(1.1),
        pin_tol_pct: Some(1.0),
        current_off: Some(0.0),
        current_on: Some(0.0),
        v_start: Some(11.0),
        v_stop: Some(10.0),
        window_pct: Some(5.0),
        ..demo()
    };
    let r = check(&base).unwrap();
    let t = r.threshold.as_ref().unwrap();
    assert_eq!(t.ideal_top, None);
    let c = &t.candidates[0];
    near(c.start, 1.2 * (1.0 + c.r_top / c.r_bottom), 1e-12, "start");
    near(c.stop, c.start * 1.1 / 1.2, 1e-12, "stop");
    near(
        c.current_at_start,
        c.start / (c.r_top + c.r_bottom),
        1e-12,
        "current",
    );
    // With a 3 µA current sunk while off (a switched hysteresis current), both voltages are
    // set: the ideal resistors must meet them exactly.
    let r = check(&DividerInput {
        pin_fall: Some(1.2),
        current_off: Some(3e-6),
        v_start: Some(11.5),
        v_stop: Some(10.5),
        ..base.clone()
    })
    .unwrap();
    let t = r.threshold.as_ref().unwrap();
    let (top, bottom) = (t.ideal_top.unwrap(), t.ideal_bottom.unwrap());
    near(
        1.2 * (1.0 + top / bottom) + 3e-6 * top,
        11.5,
        1e-12,
        "ideal start",
    );
    near(1.2 * (1.0 + top / bottom), 10.5, 1e-12, "ideal stop");
    // The hysteresis 1 V comes from the current alone: R_top = 1 V / 3 µA.
    near(top, 1.0 / 3e-6, 1e-12, "ideal R_top");
    for c in &t.candidates {
        assert!(c.start_low <= c.start && c.start <= c.start_high);
        assert!(c.stop_low <= c.stop && c.stop <= c.stop_high);
    }
    assert!(r.checks.iter().any(|c| c.id == CheckId::Hysteresis));
}

#[test]
fn bad_inputs_name_their_field() {
    let cases: Vec<(DividerInput, &str, &str)> = vec![
        (
            DividerInput {
                vout_target: Some(0.5),
                ..demo()
            },
            "voutTarget",
            "above V_ref",
        ),
        (
            DividerInput {
                window_pct: Some(0.0),
                ..demo()
            },
            "windowPct",
            "empty",
        ),
        (
            DividerInput {
                vout_min: Some(3.4),
                vout_max: Some(3.2),
                ..demo()
            },
            "voutMax",
            "empty",
        ),
        (
            DividerInput {
                series_top: Some(Series::E3),
                series_bottom: Some(Series::E3),
                window_pct: Some(0.5),
                ..demo()
            },
            "windowPct",
            "finer series",
        ),
        (
            DividerInput {
                r_min: Some(1.05e3),
                r_max: Some(1.08e3),
                ..demo()
            },
            "rMin",
            "No E24 value",
        ),
        (
            DividerInput {
                current_min: Some(0.5),
                current_max: Some(1.0),
                ..demo()
            },
            "currentMin",
            "widen",
        ),
        (
            DividerInput {
                tol_top_pct: Some(60.0),
                ..demo()
            },
            "tolTopPct",
            "between 0 % and 20 %",
        ),
        (
            DividerInput {
                tcr_bottom_ppm: Some(5000.0),
                temp_max: Some(125.0),
                ..demo()
            },
            "tcrBottomPpm",
            "below 50 %",
        ),
        (
            DividerInput {
                mc_samples: Some(2_000_000),
                ..demo()
            },
            "mcSamples",
            "at most",
        ),
        (
            DividerInput {
                vref: None,
                ..demo()
            },
            "vref",
            "needed",
        ),
        (
            DividerInput {
                r_top: Some(f64::NAN),
                ..reverse(1.0, 1.0)
            },
            "rTop",
            "between",
        ),
        (
            DividerInput {
                mode: Mode::Threshold,
                pin_rise: Some(1.2),
                pin_fall: Some(1.1),
                v_start: Some(10.0),
                v_stop: Some(11.0),
                ..demo()
            },
            "vStop",
            "below the start",
        ),
        (
            // Both resistors are pinned by the two voltages; E3 values land far from them.
            DividerInput {
                mode: Mode::Threshold,
                series_top: Some(Series::E3),
                series_bottom: Some(Series::E3),
                pin_rise: Some(1.2),
                pin_fall: Some(1.2),
                current_off: Some(3e-6),
                current_on: Some(0.0),
                v_start: Some(11.5),
                v_stop: Some(10.5),
                window_pct: Some(1.0),
                ..demo()
            },
            "windowPct",
            "both the start and the stop",
        ),
    ];
    for (input, field, words) in cases {
        let e = check(&input).expect_err(field);
        assert_eq!(e.field, field, "{}", e.message);
        assert!(e.message.contains(words), "{field}: {}", e.message);
    }
}
