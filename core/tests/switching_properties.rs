//! Properties of the switching estimate and the comparison for every valid converter, tried on
//! random ones (proptest):
//!
//! - conservation of energy: P_in = P_out + ΣP_loss (to 1e-9 relative) at every corner and
//!   every point of the sweep, and the listed losses add up to the total;
//! - efficiency is above 0 and below 100 % whenever anything is lost;
//! - losses rise with the main switch's on-resistance and with the inductor's DCR (the term each
//!   multiplies always; the total where the ripple is a modest share of the current), and the
//!   switching terms (transitions, gate drive, dead time, switch-node capacitance) with f_sw;
//! - every number in a report is finite, also for inputs anywhere inside the validation bounds,
//!   and an input that is refused names a field and gives a message.

use proptest::prelude::*;
use railnote_core::compare::{compare_rails, CompareInput};
use railnote_core::linear::DropoutModel;
use railnote_core::switching::{
    check_switching, Corner, LightLoad, Losses, Mode, Rectifier, SwitchingInput, SwitchingReport,
    Topology, ValidSwitching,
};

fn topology() -> impl Strategy<Value = Topology> {
    prop_oneof![
        Just(Topology::Buck),
        Just(Topology::Boost),
        Just(Topology::Inverting)
    ]
}

fn rectifier() -> impl Strategy<Value = Rectifier> {
    prop_oneof![Just(Rectifier::Synchronous), Just(Rectifier::Diode)]
}

fn light_load() -> impl Strategy<Value = LightLoad> {
    prop_oneof![
        Just(LightLoad::ForcedContinuous),
        Just(LightLoad::DiscontinuousAllowed)
    ]
}

/// A log-uniform value between `low` and `high`.
fn log_range(low: f64, high: f64) -> impl Strategy<Value = f64> {
    (low.ln()..high.ln()).prop_map(f64::exp)
}

prop_compose! {
    /// A board-level converter that passes validation: duties at most about 0.9, transitions
    /// well inside the period.
    fn valid_converter()(
        topology in topology(),
        rectifier in rectifier(),
        light_load in light_load(),
        vin_min in 1.0f64..48.0,
        spread in 1.0f64..1.5,
        ratio in 0.05f64..0.9,
        step_up in 1.05f64..3.0,
        invert in 0.1f64..5.0,
        iout in log_range(1e-3, 5.0),
        fsw in log_range(50e3, 3e6),
        inductance in log_range(1e-6, 1e-3),
        propose in proptest::bool::weighted(0.2),
        ripple_ratio_pct in 10.0f64..60.0,
        main_rds_on in 0.0f64..0.5,
        rect_rds_on in 0.0f64..0.5,
        diode_vf in 0.2f64..0.8,
        rise_time in 0.0f64..20e-9,
        fall_time in 0.0f64..20e-9,
        main_gate_charge in 0.0f64..50e-9,
        rect_gate_charge in 0.0f64..50e-9,
        drive_v in 0.0f64..12.0,
        dead_time in 0.0f64..50e-9,
        body_diode_vf in 0.3f64..1.0,
        coss in 0.0f64..1e-9,
        as_charge in proptest::bool::ANY,
        dcr in 0.0f64..0.5,
        core_loss in 0.0f64..0.1,
        iq in 0.0f64..5e-3,
        cout in log_range(1e-6, 1e-3),
        esr in 0.0f64..0.1,
        min_on_time in 0.0f64..200e-9,
    ) -> SwitchingInput {
        let vin_max = vin_min * spread;
        let vout = match topology {
            Topology::Buck => vin_min * ratio,
            Topology::Boost => vin_max * step_up,
            Topology::Inverting => vin_min * invert,
        };
        SwitchingInput {
            topology,
            rectifier,
            light_load,
            vin_min,
            vin_nom: 0.5 * (vin_min + vin_max),
            vin_max,
            vout,
            iout,
            fsw,
            inductance: (!propose).then_some(inductance),
            ripple_ratio_pct: Some(ripple_ratio_pct),
            main_rds_on,
            rect_rds_on: Some(rect_rds_on),
            diode_vf: Some(diode_vf),
            rise_time,
            fall_time,
            main_gate_charge,
            rect_gate_charge: Some(rect_gate_charge),
            drive_v,
            dead_time: Some(dead_time),
            body_diode_vf: Some(body_diode_vf),
            coss_charge: as_charge.then_some(coss * vin_max),
            coss: (!as_charge).then_some(coss),
            dcr,
            core_loss,
            iq,
            cout,
            esr,
            min_on_time,
            max_duty_pct: 95.0,
            isat: None,
        }
    }
}

/// A corner the model has a consistent operating point for: not pinned at the duty ceiling,
/// and, where the rectifier lets the current stop, not continuous with a negative valley (the
/// report warns of that case: the drops are too large for the first-order relations).
fn consistent(valid: &ValidSwitching, c: &Corner) -> bool {
    !c.duty_limited && (!valid.may_stop() || c.inductor_valley_a >= 0.0)
}

fn run(input: &SwitchingInput) -> SwitchingReport {
    check_switching(input).unwrap_or_else(|e| panic!("a valid converter was refused: {e}"))
}

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * a.abs().max(b.abs()).max(1e-300)
}

fn parts(l: &Losses) -> [f64; 12] {
    [
        l.main_conduction_w,
        l.main_switching_w,
        l.main_gate_w,
        l.rect_conduction_w,
        l.rect_gate_w,
        l.dead_time_w,
        l.output_cap_w,
        l.diode_w,
        l.inductor_copper_w,
        l.inductor_core_w,
        l.controller_w,
        l.output_esr_w,
    ]
}

/// The transition, gate, dead-time and switch-node terms: the ones f_sw multiplies.
fn switching_terms(l: &Losses) -> f64 {
    l.main_switching_w + l.main_gate_w + l.rect_gate_w + l.dead_time_w + l.output_cap_w
}

fn corner_numbers(c: &Corner) -> Vec<f64> {
    let mut v = vec![
        c.vin,
        c.iout,
        c.duty_ideal,
        c.duty,
        c.freewheel_duty,
        c.idle_duty,
        c.on_time_s,
        c.ripple_a,
        c.ripple_ratio_pct,
        c.inductor_avg_a,
        c.inductor_peak_a,
        c.inductor_valley_a,
        c.inductor_rms_a,
        c.main_avg_a,
        c.main_rms_a,
        c.rect_avg_a,
        c.rect_rms_a,
        c.boundary_load_a,
        c.output_ripple_v,
        c.output_ripple_cap_v,
        c.output_ripple_esr_v,
        c.output_w,
        c.input_w,
        c.efficiency_pct,
        c.input_current_a,
        c.l_for_ratio_h.unwrap_or(0.0),
        c.losses.total_w,
    ];
    v.extend(parts(&c.losses));
    v
}

/// Every number in a report is finite.
fn all_finite(report: &SwitchingReport) -> Result<(), TestCaseError> {
    prop_assert!(report.inductance_h.is_finite() && report.peak_current_a.is_finite());
    for c in &report.corners {
        for v in corner_numbers(c) {
            prop_assert!(v.is_finite(), "not finite in {:?}", c);
        }
    }
    for curve in &report.sweep {
        for v in curve
            .iout_a
            .iter()
            .chain(&curve.efficiency_pct)
            .chain(&curve.loss_w)
        {
            prop_assert!(v.is_finite());
        }
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(1000))]

    #[test]
    fn energy_is_conserved(input in valid_converter()) {
        let report = run(&input);
        let valid = input.validate().unwrap();
        let mut points: Vec<Corner> = report.corners.to_vec();
        for curve in &report.sweep {
            for &i in &curve.iout_a {
                points.push(valid.point(curve.label, curve.vin, i));
            }
        }
        for p in &points {
            let sum: f64 = parts(&p.losses).iter().sum();
            prop_assert!(close(p.losses.total_w, sum, 1e-12), "Σ parts {} ≠ total {}", sum, p.losses.total_w);
            prop_assert!(close(p.output_w, input.vout * p.iout, 1e-12));
            prop_assert!(close(p.input_w, p.output_w + sum, 1e-9),
                "P_in {} ≠ P_out {} + ΣP_loss {}", p.input_w, p.output_w, sum);
            prop_assert!(close(p.input_current_a * p.vin, p.input_w, 1e-12));
            prop_assert!(parts(&p.losses).iter().all(|&w| w >= 0.0), "a negative loss: {:?}", p.losses);
        }
        // The sweep's efficiency is the same relation.
        for curve in &report.sweep {
            for (k, &e) in curve.efficiency_pct.iter().enumerate() {
                let p = valid.point(curve.label, curve.vin, curve.iout_a[k]);
                prop_assert!(close(e, 100.0 * p.output_w / p.input_w, 1e-12));
            }
        }
    }

    #[test]
    fn efficiency_is_below_one(input in valid_converter()) {
        let report = run(&input);
        for c in &report.corners {
            prop_assert!(c.efficiency_pct > 0.0 && c.efficiency_pct <= 100.0);
            if c.losses.total_w > 0.0 {
                prop_assert!(c.efficiency_pct < 100.0, "η = {} with {} W lost", c.efficiency_pct, c.losses.total_w);
            }
        }
        for curve in &report.sweep {
            prop_assert!(curve.efficiency_pct.iter().all(|&e| e > 0.0 && e <= 100.0));
        }
    }

    #[test]
    fn losses_rise_with_on_resistance_and_dcr(
        input in valid_converter(),
        more in 0.001f64..0.5,
    ) {
        let base = run(&input);
        let rds = run(&SwitchingInput { main_rds_on: input.main_rds_on + more, ..input.clone() });
        let dcr = run(&SwitchingInput { dcr: input.dcr + more, ..input.clone() });
        let valid = input.validate().unwrap();
        for k in 0..3 {
            let (b, r, d) = (&base.corners[k], &rds.corners[k], &dcr.corners[k]);
            if [b, r, d].iter().any(|c| !consistent(&valid, c)) {
                continue;
            }
            // The loss each resistance multiplies always rises with it.
            prop_assert!(r.losses.main_conduction_w > b.losses.main_conduction_w);
            prop_assert!(d.losses.inductor_copper_w > b.losses.inductor_copper_w);
            // The total rises too where the ripple is a modest share of the current (CCM,
            // ripple ratio up to 60 %, the practical range). Outside it the estimate, like the
            // circuit, may lose slightly less: a larger drop lengthens the on-time, which
            // lowers the ripple (in DCM the peak) current that the other losses depend on.
            let modest = |c: &Corner| c.mode == Mode::Continuous && c.ripple_ratio_pct <= 60.0;
            if modest(b) && modest(r) && modest(d) {
                prop_assert!(r.losses.total_w >= b.losses.total_w * (1.0 - 1e-12),
                    "R_DS(on) +{}: {} W → {} W", more, b.losses.total_w, r.losses.total_w);
                prop_assert!(d.losses.total_w >= b.losses.total_w * (1.0 - 1e-12),
                    "DCR +{}: {} W → {} W", more, b.losses.total_w, d.losses.total_w);
            }
        }
    }

    #[test]
    fn switching_losses_rise_with_frequency(
        input in valid_converter(),
        factor in 1.01f64..3.0,
    ) {
        // Keep the transitions inside the faster period (the generator leaves room for 3 MHz).
        prop_assume!(input.inductance.is_some());
        let faster = SwitchingInput { fsw: (input.fsw * factor).min(9e6), ..input.clone() };
        let (base, fast) = (run(&input), run(&faster));
        let valid = input.validate().unwrap();
        for k in 0..3 {
            let (b, f) = (&base.corners[k], &fast.corners[k]);
            if !consistent(&valid, b) || !consistent(&valid, f) {
                continue;
            }
            prop_assert!(switching_terms(&f.losses) >= switching_terms(&b.losses) * (1.0 - 1e-12),
                "f_sw ×{}: {} W → {} W", factor, switching_terms(&b.losses), switching_terms(&f.losses));
            if input.main_gate_charge * input.drive_v > 0.0 {
                prop_assert!(f.losses.main_gate_w > b.losses.main_gate_w);
            }
        }
    }

    #[test]
    fn every_output_is_finite(input in valid_converter()) {
        all_finite(&run(&input))?;
    }
}

prop_compose! {
    /// Any input inside or just outside the validation bounds, each value log-uniform over many
    /// decades: either it is refused with a named field, or every output is finite.
    fn wild_converter()(
        base in valid_converter(),
        vin_min in log_range(1e-4, 2e6),
        spread in log_range(1.0, 1e3),
        vout in log_range(1e-4, 2e6),
        iout in log_range(1e-7, 2e6),
        fsw in log_range(0.5, 2e8),
        inductance in log_range(1e-10, 2e6),
        resist in log_range(1e-9, 2e6),
        time in log_range(1e-15, 10.0),
        cout in log_range(1e-10, 2e6),
        ripple in log_range(0.5, 300.0),
        max_duty in log_range(0.5, 150.0),
    ) -> SwitchingInput {
        SwitchingInput {
            vin_min,
            vin_nom: vin_min * spread.sqrt(),
            vin_max: vin_min * spread,
            vout,
            iout,
            fsw,
            inductance: base.inductance.map(|_| inductance),
            ripple_ratio_pct: Some(ripple),
            main_rds_on: resist,
            rect_rds_on: Some(resist),
            dcr: resist,
            esr: resist,
            rise_time: time,
            min_on_time: time,
            cout,
            max_duty_pct: max_duty,
            ..base
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(3000))]

    #[test]
    fn no_input_gives_a_non_finite_output(input in wild_converter()) {
        match check_switching(&input) {
            Ok(report) => all_finite(&report)?,
            Err(e) => prop_assert!(!e.field.is_empty() && !e.message.is_empty()),
        }
    }

    #[test]
    fn the_comparison_is_finite_too(input in wild_converter(), theta in log_range(1e-3, 1e3)) {
        let compare = CompareInput {
            switching: input,
            ta_max: 60.0,
            tj_max: 125.0,
            sw_theta_ja: theta,
            vout_tol_pct: None,
            headroom_margin_v: None,
            thermal_margin_c: None,
            ldo_iq: 1e-4,
            ldo_gnd_pct: 1.0,
            ldo_dropout_model: DropoutModel::Resistive,
            ldo_dropout_v: 0.3,
            ldo_dropout_at_a: 0.5,
            ldo_rated_a: 1.0,
            ldo_theta_ja: theta,
        };
        match compare_rails(&compare) {
            Ok(report) => {
                for c in &report.corners {
                    for side in [Some(c.switching), c.linear].iter().flatten() {
                        for v in [side.dissipation_w, side.package_w, side.efficiency_pct, side.tj_c, side.input_current_a] {
                            prop_assert!(v.is_finite(), "{:?}", c);
                        }
                    }
                    prop_assert!(c.crossing_load_a.into_iter().all(f64::is_finite));
                }
                let curves = &report.curves;
                prop_assert!(curves.switching_w.iter().all(|w| w.is_finite()));
                prop_assert!(curves.linear_w.iter().flatten().all(|w| w.is_finite()));
            }
            Err(e) => prop_assert!(!e.field.is_empty() && !e.message.is_empty()),
        }
    }
}
