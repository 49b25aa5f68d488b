//! Properties that hold for every valid rail, tried on random ones (proptest).
//!
//! - conservation of energy: P_in = P_out + P_loss at every operating point;
//! - a linear regulator's efficiency never exceeds V_out / V_in;
//! - T_j rises with V_in, I_out and T_a;
//! - a solved-back limit put back into the check lands on the limit;
//! - the quantity parser agrees with Rust's own correctly rounded float parser, and never
//!   returns a non-finite value or panics on any text.

use proptest::prelude::*;
use railnote_core::linear::{check, DropoutModel, LinearInput, LinearReport};
use railnote_core::units::{parse_quantity, QuantityKind};

fn dropout_model() -> impl Strategy<Value = DropoutModel> {
    prop_oneof![
        Just(DropoutModel::Resistive),
        Just(DropoutModel::Constant),
        Just(DropoutModel::Classic),
    ]
}

prop_compose! {
    /// A rail that passes validation: every field within its allowed range.
    fn valid_rail()(
        vout in 0.5f64..20.0,
        vout_tol_pct in 0.0f64..5.0,
        over in 0.01f64..10.0,
        to_nom in 0.0f64..5.0,
        to_max in 0.0f64..5.0,
        iout_max in 1e-4f64..5.0,
        typ_share in 0.0f64..=1.0,
        iq in 0.0f64..1e-2,
        gnd_pct in 0.0f64..10.0,
        dropout_model in dropout_model(),
        dropout_v in 0.0f64..1.5,
        dropout_at_a in 1e-3f64..5.0,
        rated_a in 1e-3f64..10.0,
        theta_ja in 1.0f64..300.0,
        ta_max in -40.0f64..100.0,
        rise in 1.0f64..100.0,
        headroom_margin_v in 0.0f64..1.0,
        thermal_margin_c in 0.0f64..20.0,
    ) -> LinearInput {
        let vin_min = vout * (1.0 + vout_tol_pct / 100.0) + over;
        LinearInput {
            vin_min,
            vin_nom: vin_min + to_nom,
            vin_max: vin_min + to_nom + to_max,
            vout,
            vout_tol_pct,
            iout_max,
            iout_typ: iout_max * typ_share,
            iq,
            gnd_pct,
            dropout_model,
            dropout_v,
            dropout_at_a,
            rated_a,
            theta_ja,
            ta_max,
            tj_max: ta_max + rise,
            headroom_margin_v,
            thermal_margin_c,
            eff_min_pct: None,
            input_budget_a: None,
        }
    }
}

fn run(input: &LinearInput) -> LinearReport {
    check(input).unwrap_or_else(|e| panic!("a valid rail was refused: {e}"))
}

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * a.abs().max(b.abs()).max(1e-300)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    #[test]
    fn energy_is_conserved(input in valid_rail()) {
        let report = run(&input);
        for corner in &report.corners {
            for p in [&corner.full, &corner.typ] {
                prop_assert!(close(p.input_w, p.output_w + p.total_w, 1e-12),
                    "P_in {} ≠ P_out {} + P_loss {}", p.input_w, p.output_w, p.total_w);
                prop_assert!(close(p.input_a, p.iout_a + p.ground_a, 1e-12));
            }
        }
    }

    #[test]
    fn efficiency_never_beats_the_voltage_ratio(input in valid_rail()) {
        let report = run(&input);
        for corner in &report.corners {
            let bound = 100.0 * input.vout / corner.vin;
            for p in [&corner.full, &corner.typ] {
                prop_assert!(p.efficiency_pct <= bound * (1.0 + 1e-12),
                    "η {} > V_out/V_in {}", p.efficiency_pct, bound);
                prop_assert!(p.efficiency_pct >= 0.0);
            }
        }
    }

    #[test]
    fn junction_temperature_rises_with_vin_load_and_ambient(
        input in valid_rail(),
        more_vin in 0.0f64..5.0,
        more_load in 0.0f64..2.0,
        more_ambient in 0.0f64..1.0,
    ) {
        let base = run(&input).worst.tj_c;
        let higher_vin = LinearInput { vin_max: input.vin_max + more_vin, ..input.clone() };
        prop_assert!(run(&higher_vin).worst.tj_c >= base);
        let higher_load = LinearInput { iout_max: input.iout_max + more_load, ..input.clone() };
        prop_assert!(run(&higher_load).worst.tj_c >= base);
        // Keep T_a below T_j,max: move it up by a share of the room left.
        let room = input.tj_max - input.ta_max;
        let hotter = LinearInput { ta_max: input.ta_max + more_ambient * room * 0.99, ..input.clone() };
        prop_assert!(run(&hotter).worst.tj_c >= base);
    }

    #[test]
    fn solved_back_limits_land_on_the_limit(input in valid_rail()) {
        let report = run(&input);
        let limit_tj = input.tj_max - input.thermal_margin_c;

        // The largest load the heat allows puts T_j exactly at T_j,max − margin.
        // Limits beyond the inputs' own bound (10^6 in any unit) cannot be fed back; a nearly
        // lossless pass element can report such a load.
        let load = report.limits.max_load_thermal_a;
        if load > 1e-6 && load < 1e5 {
            let at_load = LinearInput {
                iout_max: load,
                iout_typ: input.iout_typ.min(load),
                ..input.clone()
            };
            prop_assert!(close(run(&at_load).worst.tj_c, limit_tj, 1e-9),
                "T_j at the largest load: {} vs {}", run(&at_load).worst.tj_c, limit_tj);
        }

        // The hottest ambient does the same.
        let hottest = report.limits.hottest_ambient_c;
        if hottest < input.tj_max && hottest > -273.0 {
            let at_ambient = LinearInput { ta_max: hottest, ..input.clone() };
            prop_assert!(close(run(&at_ambient).worst.tj_c, limit_tj, 1e-9));
        }

        // The highest V_in the heat allows, if it is a valid V_in,max.
        if let Some(v) = report.limits.vin_max_thermal {
            if v >= input.vin_nom && v < 1e5 {
                let at_vin = LinearInput { vin_max: v, ..input.clone() };
                prop_assert!(close(run(&at_vin).worst.tj_c, limit_tj, 1e-9));
            }
        }

        // The lowest V_in with margin leaves exactly the wanted headroom.
        let v = report.limits.vin_min_with_margin;
        if v > input.vout && v <= input.vin_nom {
            let at_vin = LinearInput { vin_min: v, ..input.clone() };
            let headroom = run(&at_vin).worst.headroom_v;
            prop_assert!((headroom - input.headroom_margin_v).abs() < 1e-9 * v.max(1.0),
                "headroom {} vs margin {}", headroom, input.headroom_margin_v);
        }

        // The largest load the headroom allows (resistive model) leaves exactly the margin.
        if let (DropoutModel::Resistive, Some(load)) =
            (input.dropout_model, report.limits.max_load_headroom_a)
        {
            if load > 1e-6 && load < 1e5 && input.dropout_v > 0.0 {
                let at_load = LinearInput {
                    iout_max: load,
                    iout_typ: input.iout_typ.min(load),
                    ..input.clone()
                };
                let headroom = run(&at_load).worst.headroom_v;
                prop_assert!((headroom - input.headroom_margin_v).abs() < 1e-9 * input.vin_min);
            }
        }
    }

    #[test]
    fn report_numbers_are_finite(input in valid_rail()) {
        let r = run(&input);
        let mut all = vec![r.worst.power_w, r.worst.tj_c, r.worst.headroom_v,
            r.limits.max_load_a, r.limits.hottest_ambient_c, r.limits.vin_min_regulating,
            r.window.vin_from, r.window.vin_to, r.window.iout_to];
        for c in &r.corners {
            all.extend([c.vin, c.headroom_v, c.full.efficiency_pct, c.full.tj_c, c.typ.efficiency_pct]);
        }
        for [x, y] in r.window.dropout.iter().chain(&r.window.thermal) {
            all.extend([*x, *y]);
        }
        prop_assert!(all.iter().all(|v| v.is_finite()), "{:?}", all);
        prop_assert!(r.window.vin_from < r.window.vin_to);
    }

    #[test]
    fn parser_agrees_with_std_on_plain_decimals(
        int in 0u64..10_000_000,
        frac in 0u32..1_000_000,
        frac_digits in 0usize..6,
        exp in -22i32..=22,
    ) {
        // Reference: Rust's own str::parse::<f64>, which rounds correctly (core::num::dec2flt).
        let text = if frac_digits == 0 {
            format!("{int}e{exp}")
        } else {
            format!("{int}.{:0width$}e{exp}", frac % 10u32.pow(frac_digits as u32), width = frac_digits)
        };
        let want: f64 = text.parse().unwrap();
        let got = parse_quantity(&text, QuantityKind::Voltage).unwrap();
        // Clinger's fast path (digits below 2^53, power of ten within ±22 once the fraction
        // digits are counted) is exact; beyond it the parser promises a few units in the
        // last place.
        let effective_exp = exp - frac_digits as i32;
        if effective_exp.abs() <= 22 {
            prop_assert_eq!(got, want, "{}", text);
        } else {
            prop_assert!((got - want).abs() <= 4.0 * f64::EPSILON * want.abs(), "{}: {} vs {}", text, got, want);
        }
    }

    #[test]
    fn parser_never_panics_and_never_returns_non_finite(text in any::<String>(), kind in 0usize..12) {
        if let Ok(v) = parse_quantity(&text, QuantityKind::ALL[kind]) {
            prop_assert!(v.is_finite());
        }
    }

    #[test]
    fn parser_on_value_shaped_text(text in "[-+]?[0-9]{0,4}[.]?[0-9]{0,4}([eE][-+]?[0-9]{1,3})? ?[pnuµmkKMGTRVAWFH]?[0-9]{0,2}[VAΩWFHs%]?") {
        for kind in QuantityKind::ALL {
            if let Ok(v) = parse_quantity(&text, kind) {
                prop_assert!(v.is_finite(), "{} → {}", text, v);
            }
        }
    }
}

mod thermal {
    use proptest::prelude::*;
    use railnote_core::thermal::{pulse_train_rise, rise_series, zth, FosterStage, ProfileStep};

    fn network() -> impl Strategy<Value = Vec<FosterStage>> {
        prop::collection::vec(
            (1e-3f64..100.0, 1e-6f64..100.0).prop_map(|(r, tau)| FosterStage { r, tau }),
            1..=8,
        )
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(1000))]

        #[test]
        fn zth_rises_towards_the_sum_of_resistances(net in network(), a in 1e-9f64..1e3, b in 1e-9f64..1e3) {
            let (t1, t2) = if a < b { (a, b) } else { (b, a) };
            let total: f64 = net.iter().map(|s| s.r).sum();
            prop_assert!(zth(&net, t1) <= zth(&net, t2) + 1e-12 * total);
            prop_assert!(zth(&net, t2) <= total * (1.0 + 1e-12));
            prop_assert!(zth(&net, t1) >= 0.0);
        }

        #[test]
        fn pulse_train_is_bounded_by_average_and_steady(
            net in network(), p in 0.0f64..50.0, period in 1e-6f64..100.0, duty in 0.0f64..=1.0,
        ) {
            let on = (period * duty).max(1e-9).min(period);
            let total: f64 = net.iter().map(|s| s.r).sum();
            let (peak, valley) = pulse_train_rise(&net, p, on, period);
            let average = p * on / period * total;
            let slack = 1e-9 * (p * total).max(1e-12);
            prop_assert!(valley <= average + slack, "valley {} > average {}", valley, average);
            prop_assert!(average <= peak + slack, "average {} > peak {}", average, peak);
            prop_assert!(peak <= p * total + slack);
            // One pulse from cold never beats the settled train.
            prop_assert!(p * zth(&net, on) <= peak + slack);
        }

        #[test]
        fn stepping_never_overshoots_the_highest_power(
            net in network(),
            steps in prop::collection::vec((0.0f64..20.0, 1e-6f64..10.0), 1..8),
            periods in 1u32..20,
        ) {
            let profile: Vec<ProfileStep> = steps.iter()
                .map(|&(power_w, duration_s)| ProfileStep { power_w, duration_s }).collect();
            let highest = steps.iter().map(|s| s.0).fold(0.0, f64::max);
            let total: f64 = net.iter().map(|s| s.r).sum();
            for [t, rise] in rise_series(&net, &profile, periods) {
                prop_assert!(rise.is_finite() && t.is_finite());
                prop_assert!(rise >= -1e-12 && rise <= highest * total * (1.0 + 1e-12));
            }
        }
    }
}
