//! Linear or switching, against the two calculators it is built from and hand-worked numbers.
//!
//! Accuracy is data. Tolerances, relative:
//!
//! | quantity                                   | tolerance | why                                   |
//! |--------------------------------------------|-----------|---------------------------------------|
//! | linear side vs core::linear's own numbers  | exact     | the same function on the same input   |
//! | hand-worked linear and switching figures   | 1e-11     | a few roundings                       |
//! | dissipations at the crossing load          | 1e-9      | bisection stops at a width of 1e-13   |
//!
//! Every expected value names where it comes from.

use railnote_core::compare::{compare_rails, CompareInput, CompareReport};
use railnote_core::linear::{self, DropoutModel, LinearInput};
use railnote_core::switching::{
    check_switching, CornerLabel, LightLoad, Rectifier, SwitchingInput, Topology,
};

/// The brief's demo rail (invented scenario): the soil-moisture logger's 5.0 V rail at 0.8 A from
/// a 12 V lead-acid battery (10.8–14.4 V), enclosure up to 60 °C. Switching side: the invented
/// synchronous buck of tests/switching.rs; linear side: an invented LDO in a power package.
fn demo() -> CompareInput {
    CompareInput {
        switching: SwitchingInput {
            topology: Topology::Buck,
            rectifier: Rectifier::Synchronous,
            light_load: LightLoad::DiscontinuousAllowed,
            vin_min: 10.8,
            vin_nom: 12.0,
            vin_max: 14.4,
            vout: 5.0,
            iout: 0.8,
            fsw: 500e3,
            inductance: Some(22e-6),
            ripple_ratio_pct: None,
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
            isat: None,
        },
        ta_max: 60.0,
        tj_max: 125.0,
        sw_theta_ja: 40.0,
        vout_tol_pct: None,
        headroom_margin_v: None,
        thermal_margin_c: None,
        ldo_iq: 100e-6,
        ldo_gnd_pct: 1.0,
        ldo_dropout_model: DropoutModel::Resistive,
        ldo_dropout_v: 0.5,
        ldo_dropout_at_a: 1.0,
        ldo_rated_a: 1.0,
        ldo_theta_ja: 25.0,
    }
}

/// The linear check the comparison must run for `input` (the contract's mapping).
fn linear_of(input: &CompareInput) -> LinearInput {
    let s = &input.switching;
    LinearInput {
        vin_min: s.vin_min,
        vin_nom: s.vin_nom,
        vin_max: s.vin_max,
        vout: s.vout,
        vout_tol_pct: input.vout_tol_pct.unwrap_or(0.0),
        iout_max: s.iout,
        iout_typ: s.iout,
        iq: input.ldo_iq,
        gnd_pct: input.ldo_gnd_pct,
        dropout_model: input.ldo_dropout_model,
        dropout_v: input.ldo_dropout_v,
        dropout_at_a: input.ldo_dropout_at_a,
        rated_a: input.ldo_rated_a,
        theta_ja: input.ldo_theta_ja,
        ta_max: input.ta_max,
        tj_max: input.tj_max,
        headroom_margin_v: input.headroom_margin_v.unwrap_or(0.0),
        thermal_margin_c: input.thermal_margin_c.unwrap_or(0.0),
        eff_min_pct: None,
        input_budget_a: None,
    }
}

type Pick = (&'static str, fn(&CompareReport) -> f64);

const LIN_MAX_W: Pick = ("corners[max].linear.dissipation_w", |r| {
    r.corners[2].linear.map_or(f64::NAN, |s| s.dissipation_w)
});
const LIN_MAX_TJ: Pick = ("corners[max].linear.tj_c", |r| {
    r.corners[2].linear.map_or(f64::NAN, |s| s.tj_c)
});
const LIN_NOM_EFF: Pick = ("corners[nom].linear.efficiency_pct", |r| {
    r.corners[1].linear.map_or(f64::NAN, |s| s.efficiency_pct)
});
const LIN_NOM_IIN: Pick = ("corners[nom].linear.input_current_a", |r| {
    r.corners[1].linear.map_or(f64::NAN, |s| s.input_current_a)
});
const SW_NOM_W: Pick = ("corners[nom].switching.dissipation_w", |r| {
    r.corners[1].switching.dissipation_w
});
const SW_NOM_PACKAGE: Pick = ("corners[nom].switching.package_w", |r| {
    r.corners[1].switching.package_w
});
const SW_NOM_TJ: Pick = ("corners[nom].switching.tj_c", |r| {
    r.corners[1].switching.tj_c
});

enum Expect<'a> {
    Values(&'a [(Pick, f64)], f64),
    Refused {
        field: &'static str,
        words: &'static str,
    },
}

/// The only test code that calls the comparison. Values: each picked quantity within the
/// relative tolerance, and every number in the report finite. Refused: the error names
/// `field` and its message contains `words`.
fn check(input: &CompareInput, expected: Expect) -> Option<CompareReport> {
    match (compare_rails(input), expected) {
        (Ok(report), Expect::Values(values, rel_tol)) => {
            for &((name, pick), want) in values {
                let got = pick(&report);
                let err = ((got - want) / want).abs();
                assert!(
                    err <= rel_tol,
                    "{name}: got {got}, want {want} (rel. error {err:e})"
                );
            }
            for c in report.corners.iter() {
                let sides = [Some(c.switching), c.linear];
                for s in sides.iter().flatten() {
                    for v in [
                        s.dissipation_w,
                        s.package_w,
                        s.efficiency_pct,
                        s.tj_c,
                        s.input_current_a,
                    ] {
                        assert!(v.is_finite(), "not finite: {c:?}");
                    }
                }
                assert!(c.crossing_load_a.into_iter().all(f64::is_finite));
            }
            let curves = &report.curves;
            assert_eq!(curves.iout_a.len(), 50);
            assert_eq!(curves.switching_w.len(), 50);
            assert!(curves.switching_w.iter().all(|w| w.is_finite()));
            if let Some(lin) = &curves.linear_w {
                assert_eq!(lin.len(), 50);
                assert!(lin.iter().all(|w| w.is_finite()));
            }
            Some(report)
        }
        (Err(e), Expect::Refused { field, words }) => {
            assert_eq!(e.field, field, "refused on the wrong field: {}", e.message);
            assert!(
                e.message.contains(words),
                "message {:?} does not say {words:?}",
                e.message
            );
            None
        }
        (Ok(_), Expect::Refused { field, .. }) => panic!("expected a refusal on {field}"),
        (Err(e), Expect::Values(..)) => panic!("input refused on {}: {}", e.field, e.message),
    }
}

#[test]
fn demo_rail_worked_by_hand() {
    // Linear side, hand-worked from the linear module's relations:
    //   I_gnd = 100 µA + 1 % × 0.8 A = 8.1 mA
    //   at 14.4 V: P = (14.4 − 5) × 0.8 + 14.4 × 0.0081 = 7.52 + 0.11664 = 7.63664 W
    //              T_j = 60 + 25 × 7.63664 = 250.916 °C (JESD51-2A: T_j = T_a + θJA·P)
    //   at 12 V:   η = 5 × 0.8 / (12 × 0.8081) = 41.2490203357670 %, I_in = 0.8081 A
    // Switching side at 12 V (tests/switching.rs, demo_buck_worked_by_hand): total loss
    //   0.191763823648045 W; in the package all but copper 0.0322940663490893 W, core 0.01 W
    //   and the output capacitor's ESR 5.88132698178569e-5 W: 0.149410943 W;
    //   T_j = 60 + 40 × that = 65.976437... °C.
    let package = 0.191763823648045 - 0.0322940663490893 - 0.01 - 5.88132698178569e-5;
    let report = check(
        &demo(),
        Expect::Values(
            &[
                (LIN_MAX_W, 7.63664),
                (LIN_MAX_TJ, 250.916),
                (LIN_NOM_EFF, 100.0 * 4.0 / (12.0 * 0.8081)),
                (LIN_NOM_IIN, 0.8081),
                (SW_NOM_W, 0.191763823648045),
                (SW_NOM_PACKAGE, package),
                (SW_NOM_TJ, 60.0 + 40.0 * package),
            ],
            1e-11,
        ),
    )
    .unwrap();
    assert!(report.linear_possible && report.linear_impossible.is_none());
    assert_eq!(report.linear_verdict, Some(linear::Status::Fail));
    assert!(report
        .linear_summary
        .as_deref()
        .unwrap()
        .contains("junction"));
    assert_eq!(report.corners[1].label, CornerLabel::Nom);
}

#[test]
fn linear_side_is_the_linear_checks_own_numbers() {
    // The comparison must not recompute the linear rail its own way: each corner's linear
    // side is core::linear's full-load operating point for the same input, bit for bit, and
    // the switching side is core::switching's corner.
    for input in [
        demo(),
        CompareInput {
            vout_tol_pct: Some(2.0),
            ldo_dropout_model: DropoutModel::Classic,
            ..demo()
        },
    ] {
        let report = check(&input, Expect::Values(&[], 0.0)).unwrap();
        let lin = linear::check(&linear_of(&input)).unwrap();
        let sw = check_switching(&input.switching).unwrap();
        for i in 0..3 {
            let side = report.corners[i].linear.unwrap();
            let point = &lin.corners[i].full;
            assert_eq!(side.dissipation_w, point.total_w);
            assert_eq!(side.efficiency_pct, point.efficiency_pct);
            assert_eq!(side.tj_c, point.tj_c);
            assert_eq!(side.input_current_a, point.input_a);
            let s = &report.corners[i].switching;
            assert_eq!(s.dissipation_w, sw.corners[i].losses.total_w);
            assert_eq!(s.efficiency_pct, sw.corners[i].efficiency_pct);
            assert_eq!(s.input_current_a, sw.corners[i].input_current_a);
        }
        assert_eq!(report.linear_verdict, Some(lin.verdict));
        assert_eq!(report.switching_verdict, sw.verdict);
    }
}

#[test]
fn crossing_load_is_where_the_dissipations_are_equal() {
    // A light-load rail: 5 V from 6–7 V, 0.5 A. The switcher's fixed losses (gate drive,
    // switch node, core, controller) beat the linear regulator's small headroom loss at light
    // load, not at full load, so the dissipations cross inside 1 %–120 % of the load. At the
    // crossing, core::linear's and core::switching's own dissipations must agree.
    let mut input = demo();
    input.switching.vin_min = 6.0;
    input.switching.vin_nom = 6.5;
    input.switching.vin_max = 7.0;
    input.switching.iout = 0.5;
    let report = check(&input, Expect::Values(&[], 0.0)).unwrap();
    let lin = linear_of(&input).validate().unwrap();
    let sw = input.switching.validate().unwrap();
    let mut crossings = 0;
    for c in report.corners.iter() {
        let Some(load) = c.crossing_load_a else {
            continue;
        };
        crossings += 1;
        assert!((0.005..=0.6).contains(&load), "crossing {load} A");
        let p_lin = lin.operating_point(c.vin, 5.0, load, 60.0).total_w;
        let p_sw = sw.point(c.label, c.vin, load).losses.total_w;
        assert!(
            ((p_lin - p_sw) / p_sw).abs() < 1e-9,
            "at {load} A: linear {p_lin} W, switching {p_sw} W"
        );
        // Below the crossing the linear one wastes less, above it the switcher.
        let p_lin = lin.operating_point(c.vin, 5.0, load * 0.9, 60.0).total_w;
        let p_sw = sw.point(c.label, c.vin, load * 0.9).losses.total_w;
        assert!(p_lin < p_sw);
    }
    assert_eq!(crossings, 3, "{:?}", report.corners);
    assert!(report
        .tradeoffs
        .iter()
        .any(|t| t.contains("wastes less below")));
}

#[test]
fn no_crossing_in_range_says_none() {
    // The demo rail from the battery: the linear regulator drops 5.8–9.4 V, so it wastes more
    // than the switcher at every load from 1 % up. No sign change: no crossing in range.
    let mut input = demo();
    input.ldo_iq = 5e-3;
    let report = check(&input, Expect::Values(&[], 0.0)).unwrap();
    assert!(report.corners.iter().all(|c| c.crossing_load_a.is_none()));
    assert!(report
        .tradeoffs
        .iter()
        .any(|t| t.contains("do not cross between 1 % and 120 %")
            && t.contains("the switcher wastes less")));
    let lin = report.curves.linear_w.as_ref().unwrap();
    assert!(lin
        .iter()
        .zip(report.curves.switching_w.iter())
        .all(|(l, s)| l > s));
}

#[test]
fn a_linear_regulator_cannot_step_up_or_invert() {
    // A 5 V → 12 V boost and a 5 V → −12 V inverter: the linear side is impossible, said in
    // words as a result, with no linear figures and no crossing.
    let mut boost = demo();
    boost.switching.topology = Topology::Boost;
    boost.switching.vin_min = 4.5;
    boost.switching.vin_nom = 5.0;
    boost.switching.vin_max = 5.5;
    boost.switching.vout = 12.0;
    boost.switching.iout = 0.2;
    let mut inverting = boost.clone();
    inverting.switching.topology = Topology::Inverting;
    for (input, words) in [(boost, "cannot step up"), (inverting, "negative")] {
        let report = check(&input, Expect::Values(&[], 0.0)).unwrap();
        assert!(!report.linear_possible);
        assert!(report.linear_impossible.as_deref().unwrap().contains(words));
        assert!(report.linear_verdict.is_none() && report.linear_summary.is_none());
        assert!(report.corners.iter().all(|c| c.linear.is_none()));
        assert!(report.corners.iter().all(|c| c.crossing_load_a.is_none()));
        assert!(report.curves.linear_w.is_none());
        assert!(report.tradeoffs[0].contains("only the switcher can make this rail"));
    }
}

#[test]
fn trade_offs_are_in_words() {
    // The brief's list of what no number shows (common practice): noise, supply rejection,
    // interference, transient response, parts count, a linear regulator cannot step up.
    let report = check(&demo(), Expect::Values(&[], 0.0)).unwrap();
    let all = report.tradeoffs.join(" ");
    for words in [
        "Noise",
        "Supply rejection",
        "Interference",
        "Transient response",
        "Parts count",
        "only steps down",
    ] {
        assert!(all.contains(words), "no {words:?} in {all}");
    }
}

#[test]
fn bad_inputs_name_the_field() {
    let cases: Vec<(CompareInput, &str, &str)> = vec![
        (
            CompareInput {
                ldo_theta_ja: 0.0,
                ..demo()
            },
            "ldoThetaJa",
            "LDO: θJA must not be below",
        ),
        (
            CompareInput {
                ldo_rated_a: -1.0,
                ..demo()
            },
            "ldoRatedA",
            "rated current must be above",
        ),
        (
            CompareInput {
                sw_theta_ja: f64::NAN,
                ..demo()
            },
            "swThetaJa",
            "finite",
        ),
        (
            CompareInput {
                ta_max: 130.0,
                ..demo()
            },
            "taMax",
            "T_a,max must be below T_j,max (125 °C)",
        ),
        (
            CompareInput {
                vout_tol_pct: Some(50.0),
                ..demo()
            },
            "voutTolPct",
            "tolerance must be between",
        ),
        (
            {
                let mut input = demo();
                input.switching.vout = 12.0;
                input
            },
            "vout",
            "V_out must be below V_in,min (10.8 V) for a buck",
        ),
    ];
    for (input, field, words) in &cases {
        check(input, Expect::Refused { field, words });
    }
}
