//! Each report's plain-data form ([`ToOut`], what the WASM module sends to pages) must be the
//! same document as its serde form (what native users get with the `serde` feature): the same
//! keys, the same values. Both are written out as JSON values and compared whole, for several
//! reports of every calculator, so a field added to one and not the other fails here.
//!
//! Run with `cargo test -p railnote-core --features serde` (as `cargo xtask test` does).
#![cfg(feature = "serde")]

use railnote_core::compare::{compare_rails, CompareInput};
use railnote_core::divider::{check_divider, Distribution, DividerInput, Mode, Topology};
use railnote_core::linear::{check, DropoutModel, LinearInput};
use railnote_core::output::{Out, ToOut};
use railnote_core::series::Series;
use railnote_core::switching::{
    check_switching, LightLoad, Rectifier, SwitchingInput, Topology as Converter,
};
use railnote_core::thermal::{check_thermal, FosterStage, HeatPath, ProfileStep, ThermalInput};
use railnote_core::tree::{check_tree, LoadSpec, RailKind, RailSpec, SourceSpec, TreeInput};
use serde_json::{Map, Value};

/// Out as a JSON value, numbers as f64 so that 3 and 3.0 compare equal.
fn json_of_out(out: &Out) -> Value {
    match out {
        Out::Null => Value::Null,
        Out::Bool(b) => Value::Bool(*b),
        Out::Number(n) => Value::from(*n),
        Out::Word(w) => Value::from(*w),
        Out::Text(t) => Value::from(t.as_str()),
        Out::List(items) => Value::Array(items.iter().map(json_of_out).collect()),
        Out::Object(fields) => {
            let mut map = Map::new();
            for (k, v) in fields {
                assert!(
                    map.insert((*k).into(), json_of_out(v)).is_none(),
                    "{k} twice"
                );
            }
            Value::Object(map)
        }
    }
}

fn as_f64(value: Value) -> Value {
    match value {
        Value::Number(n) => Value::from(n.as_f64().unwrap()),
        Value::Array(items) => Value::Array(items.into_iter().map(as_f64).collect()),
        Value::Object(map) => Value::Object(map.into_iter().map(|(k, v)| (k, as_f64(v))).collect()),
        other => other,
    }
}

/// The only comparison: the two forms of `report` must be equal.
fn check_same<R: ToOut + serde::Serialize>(what: &str, report: &R) {
    let ours = json_of_out(&report.to_out());
    let serde = as_f64(serde_json::to_value(report).unwrap());
    assert_eq!(ours, serde, "{what}: ToOut and serde differ");
}

fn linear(model: DropoutModel, vin_min: f64, budget: Option<f64>) -> LinearInput {
    LinearInput {
        vin_min,
        vin_nom: 5.0,
        vin_max: 5.15,
        vout: 3.3,
        vout_tol_pct: 2.0,
        iout_max: 0.25,
        iout_typ: 0.03,
        iq: 50e-6,
        gnd_pct: 1.0,
        dropout_model: model,
        dropout_v: 0.3,
        dropout_at_a: 0.3,
        rated_a: 0.3,
        theta_ja: 100.0,
        ta_max: 60.0,
        tj_max: 125.0,
        headroom_margin_v: 0.3,
        thermal_margin_c: 15.0,
        eff_min_pct: Some(60.0),
        input_budget_a: budget,
    }
}

fn thermal(path: HeatPath, profile: Vec<ProfileStep>) -> ThermalInput {
    ThermalInput {
        power_w: 0.49,
        ta_max: 60.0,
        ta_min: -20.0,
        tj_max: 125.0,
        margin_c: 15.0,
        path,
        theta_ja: Some(100.0),
        theta_jc: Some(10.0),
        theta_cs: Some(1.0),
        theta_sa: None,
        power_rating_w: Some(1.0),
        psi_jt: Some(8.0),
        case_top_c: Some(95.0),
        psi_jb: None,
        board_c: None,
        foster: [(2.0, 1e-3), (8.0, 10e-3), (25.0, 0.1), (65.0, 2.0)]
            .into_iter()
            .map(|(r, tau)| FosterStage { r, tau })
            .collect(),
        pulse_power_w: Some(0.49),
        pulse_on_s: Some(0.05),
        pulse_period_s: Some(0.5),
        profile,
        profile_periods: Some(3),
    }
}

fn divider(mode: Mode) -> DividerInput {
    DividerInput {
        mode,
        topology: Some(Topology::Feedback),
        series_top: Some(Series::E24),
        series_bottom: Some(Series::E96),
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
        limit: Some(30),
        pick: Some(2),
        vref: Some(0.8),
        vref_tol_pct: Some(1.0),
        pin_current_min: Some(-50e-9),
        pin_current_max: Some(50e-9),
        vout_target: Some(3.3),
        r_top: Some(75e3),
        r_bottom: Some(24.3e3),
        mc_samples: Some(2000),
        mc_seed: Some(9),
        mc_distribution: Some(Distribution::Uniform),
        pin_rise: Some(1.2),
        pin_fall: Some(1.1),
        pin_tol_pct: Some(1.0),
        current_off: Some(2e-6),
        current_on: Some(0.0),
        current_tol_pct: Some(10.0),
        v_start: Some(11.0),
        v_stop: Some(10.0),
    }
}

#[test]
fn linear_reports_are_the_same_document() {
    for (what, input) in [
        ("demo", linear(DropoutModel::Resistive, 4.85, None)),
        (
            "classic, failing",
            linear(DropoutModel::Classic, 4.85, Some(0.2)),
        ),
        ("constant", linear(DropoutModel::Constant, 4.0, Some(1.0))),
    ] {
        check_same(what, &check(&input).unwrap());
    }
}

#[test]
fn thermal_reports_are_the_same_document() {
    let profile = vec![
        ProfileStep {
            power_w: 1.0,
            duration_s: 0.02,
        },
        ProfileStep {
            power_w: 0.1,
            duration_s: 0.08,
        },
    ];
    for (what, input) in [
        ("θJA, pulse train", thermal(HeatPath::Ja, Vec::new())),
        ("chain with profile", thermal(HeatPath::Chain, profile)),
    ] {
        check_same(what, &check_thermal(&input).unwrap());
    }
}

#[test]
fn divider_reports_are_the_same_document() {
    for mode in [Mode::Feedback, Mode::Reverse, Mode::Threshold] {
        check_same(
            &format!("{mode:?}"),
            &check_divider(&divider(mode)).unwrap(),
        );
    }
    let ratio_only = DividerInput {
        current_off: Some(0.0),
        ..divider(Mode::Threshold)
    };
    check_same(
        "threshold, ratio only",
        &check_divider(&ratio_only).unwrap(),
    );
}

fn converter(topology: Converter, rectifier: Rectifier, vout: f64, iout: f64) -> SwitchingInput {
    SwitchingInput {
        topology,
        rectifier,
        light_load: LightLoad::DiscontinuousAllowed,
        vin_min: 10.8,
        vin_nom: 12.0,
        vin_max: 14.4,
        vout,
        iout,
        fsw: 500e3,
        inductance: None,
        ripple_ratio_pct: Some(30.0),
        main_rds_on: 0.1,
        rect_rds_on: Some(0.05),
        diode_vf: Some(0.4),
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
        isat: Some(1.0),
    }
}

#[test]
fn switching_reports_are_the_same_document() {
    for (what, input) in [
        (
            "buck",
            converter(Converter::Buck, Rectifier::Synchronous, 5.0, 0.8),
        ),
        (
            "buck, light load",
            converter(Converter::Buck, Rectifier::Diode, 5.0, 0.02),
        ),
        (
            "boost",
            converter(Converter::Boost, Rectifier::Diode, 24.0, 0.3),
        ),
        (
            "inverting",
            converter(Converter::Inverting, Rectifier::Synchronous, 5.0, 0.4),
        ),
    ] {
        check_same(what, &check_switching(&input).unwrap());
    }
}

#[test]
fn comparison_reports_are_the_same_document() {
    for (what, switching) in [
        (
            "buck",
            converter(Converter::Buck, Rectifier::Synchronous, 5.0, 0.8),
        ),
        (
            "boost: no linear side",
            converter(Converter::Boost, Rectifier::Diode, 24.0, 0.3),
        ),
    ] {
        let input = CompareInput {
            switching,
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
        };
        check_same(what, &compare_rails(&input).unwrap());
    }
}

#[test]
fn tree_reports_are_the_same_document() {
    let rail = |name: &str, parent: &str, kind, vout| RailSpec {
        vout,
        efficiency_pct: Some(90.0),
        iq: Some(1e-4),
        dropout_v: Some(0.3),
        r_on: Some(0.05),
        theta_ja: Some(80.0),
        tj_max: Some(125.0),
        rated_a: Some(1.0),
        headroom_margin_v: Some(0.5),
        ..RailSpec::new(name, parent, kind)
    };
    let input = TreeInput {
        source: SourceSpec {
            name: String::from("Battery"),
            v_min: 10.8,
            v_nom: 12.0,
            v_max: 14.4,
            capacity_ah: Some(7.0),
            capacity_wh: None,
            current_limit_a: Some(0.05),
        },
        rails: vec![
            rail("5V0", "Battery", RailKind::Switching, Some(5.0)),
            rail("3V3", "5V0", RailKind::Linear, Some(3.3)),
            rail("Radio switch", "3V3", RailKind::Switch, None),
        ],
        loads: vec![LoadSpec {
            name: String::from("Radio"),
            rail: String::from("Radio switch"),
            typ_a: Some(0.03),
            peak_a: Some(0.25),
            typ_w: None,
            peak_w: None,
            activity_pct: Some(10.0),
            sleep_a: Some(2e-6),
        }],
        ta_max: 60.0,
    };
    check_same(
        "logger tree, failing at the source",
        &check_tree(&input).unwrap(),
    );
}
