//! Properties of the divider picker on random dividers (proptest):
//!
//! - the nominal output lies inside its own worst case, and the RSS spread inside the worst-case
//!   half-range (the worst case adds the same terms linearly);
//! - every Monte Carlo sample lies inside the worst case (each term stays within its range), the
//!   histogram holds every sample, and the yield is a percentage;
//! - widening any tolerance never narrows the worst case;
//! - whatever the inputs, the picker answers with a report or a field message, never a panic or
//!   a non-finite number.

use proptest::prelude::*;
use railnote_core::divider::{check_divider, Distribution, DividerInput, Mode, Topology};
use railnote_core::series::Series;

fn input(
    topology: Topology,
    top: f64,
    bottom: f64,
    vref: f64,
    tol: f64,
    tcr: f64,
    pin: (f64, f64),
) -> DividerInput {
    DividerInput {
        mode: Mode::Reverse,
        topology: Some(topology),
        series_top: Some(Series::E24),
        series_bottom: Some(Series::E24),
        tol_top_pct: Some(tol),
        tol_bottom_pct: Some(tol * 0.7),
        tcr_top_ppm: Some(tcr),
        tcr_bottom_ppm: Some(-tcr),
        temp_min: Some(-40.0),
        temp_max: Some(85.0),
        r_min: None,
        r_max: None,
        current_min: None,
        current_max: None,
        window_pct: Some(5.0),
        vout_min: None,
        vout_max: None,
        limit: None,
        pick: None,
        vref: Some(vref),
        vref_tol_pct: Some(tol),
        pin_current_min: Some(pin.0.min(pin.1)),
        pin_current_max: Some(pin.0.max(pin.1)),
        vout_target: None,
        r_top: Some(top),
        r_bottom: Some(bottom),
        mc_samples: Some(500),
        mc_seed: Some(3),
        mc_distribution: Some(Distribution::Uniform),
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

fn topology() -> impl Strategy<Value = Topology> {
    prop_oneof![Just(Topology::Feedback), Just(Topology::Adjust)]
}

proptest! {
    #[test]
    fn nominal_rss_and_samples_lie_inside_the_worst_case(
        topology in topology(),
        top in 10.0f64..1e7,
        bottom in 10.0f64..1e7,
        vref in 0.1f64..5.0,
        tol in 0.0f64..10.0,
        tcr in 0.0f64..1000.0,
        pin in (-1e-5f64..1e-5, -1e-5f64..1e-5),
        uniform in any::<bool>(),
    ) {
        let mut x = input(topology, top, bottom, vref, tol, tcr, pin);
        if !uniform {
            x.mc_distribution = Some(Distribution::Normal);
        }
        let r = check_divider(&x).unwrap();
        let c = &r.candidates[0];
        let slack = 1e-9 * c.vout.abs().max(1.0);
        prop_assert!(c.worst_min <= c.vout + slack && c.vout <= c.worst_max + slack);
        prop_assert!(c.rss <= (c.worst_max - c.worst_min) / 2.0 * (1.0 + 1e-9) + slack);
        let mc = r.monte_carlo.unwrap();
        prop_assert!(mc.min >= c.worst_min - slack && mc.max <= c.worst_max + slack);
        prop_assert_eq!(mc.histogram.counts.iter().sum::<u32>(), mc.samples);
        prop_assert!((0.0..=100.0).contains(&mc.yield_pct));
        for v in [c.vout, c.worst_min, c.worst_max, c.rss, c.power_w, mc.mean, mc.sigma] {
            prop_assert!(v.is_finite());
        }
    }

    #[test]
    fn wider_tolerances_never_narrow_the_worst_case(
        topology in topology(),
        top in 10.0f64..1e7,
        bottom in 10.0f64..1e7,
        tol in 0.0f64..10.0,
        more in 0.0f64..5.0,
    ) {
        let narrow = check_divider(&input(topology, top, bottom, 0.8, tol, 50.0, (0.0, 1e-7))).unwrap();
        let wide = check_divider(&input(topology, top, bottom, 0.8, tol + more, 50.0, (0.0, 1e-7))).unwrap();
        let (n, w) = (&narrow.candidates[0], &wide.candidates[0]);
        prop_assert!(w.worst_min <= n.worst_min * (1.0 + 1e-12));
        prop_assert!(w.worst_max >= n.worst_max * (1.0 - 1e-12));
    }

    #[test]
    fn any_numbers_give_a_report_or_a_field_message(
        mode in prop_oneof![Just(Mode::Feedback), Just(Mode::Reverse), Just(Mode::Threshold)],
        values in proptest::collection::vec(
            prop_oneof![Just(None), (-1e7f64..1e7).prop_map(Some), Just(Some(f64::NAN)), Just(Some(0.0))],
            20,
        ),
        samples in 0u32..3000,
    ) {
        let v = |k: usize| values[k];
        let x = DividerInput {
            mode,
            tol_top_pct: v(0),
            tol_bottom_pct: v(1),
            tcr_top_ppm: v(2),
            r_min: v(3).map(f64::abs),
            r_max: v(4).map(f64::abs),
            current_min: v(5),
            current_max: v(6),
            window_pct: v(7),
            vref: v(8),
            vref_tol_pct: v(9),
            pin_current_min: v(10),
            vout_target: v(11),
            r_top: v(12),
            r_bottom: v(13),
            pin_rise: v(14),
            pin_fall: v(15),
            current_off: v(16),
            v_start: v(17),
            v_stop: v(18),
            temp_max: v(19),
            mc_samples: Some(samples),
            ..input(Topology::Feedback, 1e4, 1e4, 0.8, 1.0, 100.0, (0.0, 0.0))
        };
        match check_divider(&x) {
            Ok(r) => {
                for c in &r.candidates {
                    prop_assert!(c.vout.is_finite() && c.worst_min.is_finite() && c.worst_max.is_finite());
                }
                if let Some(t) = &r.threshold {
                    for c in &t.candidates {
                        prop_assert!(c.start.is_finite() && c.stop_high.is_finite());
                    }
                }
            }
            Err(e) => prop_assert!(!e.field.is_empty() && !e.message.is_empty()),
        }
    }
}
