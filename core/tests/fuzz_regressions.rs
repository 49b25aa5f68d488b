//! Inputs the fuzz targets (fuzz/, `cargo xtask fuzz`) found, each read from the JSON document
//! the target built (printed with `RAILNOTE_FUZZ_SHOW=1`) through core's own reader
//! (`fields::read_value`, as the wasm API reads it), with the behaviour now expected. The quantity printer's finding is in
//! tests/units.rs (`tiny_values_print_with_a_power_of_ten_and_read_back`).
//!
//! What the finite-output promise rests on (DEVELOPERS.md, "No panic is reachable"): every input
//! is at most 10^6 in its unit and, since these findings, 0 or at least 10^-15 (femto) in size,
//! so no quotient of inputs overflows.

use railnote_core::fields::{read_value, FieldSource, ReadError, Value};
use railnote_core::output::{Out, ToOut};
use railnote_core::tree::{check_tree, RailKind, RailSpec, SourceSpec, TreeInput};
use railnote_core::{linear, thermal, tree};

/// A JSON value as core's plain input tree (what the wasm crate copies a JS object into).
fn value(json: &serde_json::Value) -> Value {
    match json {
        serde_json::Value::Null => Value::Null,
        serde_json::Value::Bool(b) => Value::Bool(*b),
        serde_json::Value::Number(n) => Value::Number(n.as_f64().unwrap_or(f64::NAN)),
        serde_json::Value::String(s) => Value::Text(s.clone()),
        serde_json::Value::Array(items) => Value::List(items.iter().map(value).collect()),
        serde_json::Value::Object(map) => {
            Value::Object(map.iter().map(|(k, v)| (k.clone(), value(v))).collect())
        }
    }
}

/// Read the input as the wasm API does (core's `read_value`: null is absent, unknown keys are
/// refused).
fn read<T>(json: &str, reader: fn(&mut dyn FieldSource) -> Result<T, ReadError>) -> T {
    let doc: serde_json::Value = serde_json::from_str(json).expect("the regression input is JSON");
    read_value(&value(&doc), reader).expect("the input reads")
}

fn assert_refused(result: Result<impl Sized, railnote_core::InputError>, field: &str, words: &str) {
    match result {
        Ok(_) => panic!("accepted; expected a message at {field}"),
        Err(e) => {
            assert_eq!(e.field, field, "{}", e.message);
            assert!(e.message.contains(words), "{field}: {}", e.message);
        }
    }
}

fn has_non_finite(out: &Out) -> bool {
    railnote_core::output::has_non_finite(out)
}

#[test]
fn linear_a_subnormal_dropout_is_refused() {
    // `linear` target: a resistive dropout of 3.1e-322 V made the headroom bound
    // (spare · I_rated / V_do) infinite: limits.maxLoadHeadroomA was inf.
    let input = read(
        r#"{"dropoutAtA": 0.3, "dropoutModel": "resistive", "dropoutV": 3.1e-322, "effMinPct": 60.0, "gndPct": 1.0, "headroomMarginV": 0.3, "inputBudgetA": 0.5, "ioutMax": 0.25, "ioutTyp": 0.03, "iq": 5e-5, "ratedA": 0.3, "taMax": 60.0, "thermalMarginC": 15.0, "thetaJa": 100.0, "tjMax": 125.0, "vinMax": 5.15, "vinMin": 4.85, "vinNom": 5.0, "vout": 3.3, "voutTolPct": 2.0}"#,
        linear::LinearInput::read,
    );
    assert_refused(
        linear::check(&input),
        "dropoutV",
        "must be 0 or at least 1 fV in size",
    );
    // The same rail with a zero dropout (a lossless pass element) is fine and finite.
    let zero = linear::LinearInput {
        dropout_v: 0.0,
        ..input
    };
    let report = linear::check(&zero).expect("a zero dropout is accepted");
    assert!(!has_non_finite(&report.to_out()));
    assert_eq!(report.limits.max_load_headroom_a, None);
}

#[test]
fn thermal_a_subnormal_power_is_refused() {
    // `thermal` target: 2.7e-319 W through a heat-sink chain without θSA made the needed θSA
    // ((T_j − margin − T_a) / P − θJC − θCS) infinite: steady.thetaSaNeededKPerW was inf.
    let input = read(
        r#"{"marginC": 10.0, "path": "chain", "powerRatingW": 2.0, "powerW": 2.72156e-319, "taMax": 60.0, "taMin": -40.0, "thetaCs": 1.0, "thetaJc": 8.0, "tjMax": 125.0}"#,
        thermal::ThermalInput::read,
    );
    assert_refused(
        thermal::check_thermal(&input),
        "powerW",
        "must be 0 or at least 1 fW in size",
    );
}

#[test]
fn tree_a_subnormal_efficiency_is_refused() {
    // `tree` target: a switching rail at 7.5e-317 % made every input current above it
    // infinite (I_in = V_out·I_out / (η·V_in)): corners[0].sourceA.typ was inf.
    let input = read(
        r#"{"loads": [], "rails": [{"efficiencyPct": 7.510165e-317, "kind": "switching", "name": "5V0 buck", "parent": "Battery", "ratedA": 0.8, "vout": 5.0}, {"dropoutV": 0.3, "iq": 5e-5, "kind": "linear", "name": "3V3 LDO", "parent": "5V0 buck", "ratedA": 0.3, "thetaJa": 100.0, "tjMax": 125.0, "vout": 3.3}, {"dropoutV": 0.3, "iq": 5e-5, "kind": "linear", "name": "1V8 LDO", "parent": "3V3 LDO", "vout": 1.8}, {"kind": "switch", "name": "Sensor switch", "parent": "3V3 LDO", "rOn": 0.08}], "sources": [{"capacityWh": 80.0, "currentLimitA": 2.0, "name": "Battery", "vMax": 14.4, "vMin": 10.8, "vNom": 12.0}], "taMax": 60.0, "version": 1.0}"#,
        tree::TreeInput::read,
    );
    assert_refused(
        check_tree(&input),
        "rails.efficiencyPct",
        "efficiency must be 0 or at least",
    );
}

#[test]
fn tree_nested_lossy_rails_overflowing_are_refused() {
    // Bounds on each input cannot keep a tree finite: currents multiply down a chain of rails.
    // 200 switching rails in a row at 1 % (each draws 100 times its output current at equal
    // voltages) need 100^200 = 10^400 times the load current at the source. Validation solves
    // the tree and refuses one whose figures are not finite, naming the rails list.
    let rails = (0..200)
        .map(|k| RailSpec {
            vout: Some(5.0),
            efficiency_pct: Some(1.0),
            ..RailSpec::new(
                &format!("R{k}"),
                &if k == 0 {
                    String::from("Source")
                } else {
                    format!("R{}", k - 1)
                },
                RailKind::Switching,
            )
        })
        .collect::<Vec<_>>();
    let input = TreeInput {
        source: SourceSpec {
            name: "Source".into(),
            v_min: 4.0,
            v_nom: 5.0,
            v_max: 6.0,
            capacity_ah: None,
            capacity_wh: None,
            current_limit_a: None,
        },
        rails: rails.clone(),
        loads: vec![tree::LoadSpec {
            name: "Load".into(),
            rail: "R199".into(),
            typ_a: Some(0.1),
            peak_a: Some(0.1),
            typ_w: None,
            peak_w: None,
            activity_pct: None,
            sleep_a: None,
        }],
        ta_max: 40.0,
    };
    let e = check_tree(&input).expect_err("a chain whose currents overflow");
    assert_eq!(e.field, "rails");
    assert!(
        e.message.contains("past any usable number"),
        "{}",
        e.message
    );
    // The same chain at 90 % stays finite (1.11^200 ≈ 10^9) and computes.
    let mut fine = input;
    for r in &mut fine.rails {
        r.efficiency_pct = Some(90.0);
    }
    let report = check_tree(&fine).expect("a finite chain");
    assert!(!has_non_finite(&report.to_out()));
}
