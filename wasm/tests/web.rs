//! The bindings as JavaScript sees them, run in headless Chromium by wasm-bindgen-test.
//!
//! These check what only the boundary can get wrong: names and shapes of the objects that
//! cross it, `null` for absent values, and errors that are real JS `Error`s carrying `field`.
//! The numbers themselves are core's and are checked against outside sources in core's tests.
#![cfg(target_arch = "wasm32")]

use js_sys::{Array, Error, Object, Reflect, JSON};
use railnote_wasm::{check_linear, format_quantity, parse_quantity, quantity_kinds};
use wasm_bindgen::{JsCast, JsValue};
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

/// The brief's demo rail (invented scenario: 3.3 V LDO fed from the logger's 5 V buck).
fn demo_rail() -> JsValue {
    JSON::parse(
        r#"{"vinMin":4.85,"vinNom":5.0,"vinMax":5.15,"vout":3.3,"voutTolPct":2,
            "ioutMax":0.25,"ioutTyp":0.03,"iq":50e-6,"gndPct":1,"dropoutModel":"resistive",
            "dropoutV":0.3,"dropoutAtA":0.3,"ratedA":0.3,"thetaJa":100,"taMax":60,"tjMax":125,
            "headroomMarginV":0.3,"thermalMarginC":15}"#,
    )
    .expect("the demo rail is valid JSON")
}

fn get(value: &JsValue, path: &str) -> JsValue {
    path.split('.').fold(value.clone(), |v, key| {
        Reflect::get(&v, &key.into()).unwrap_or(JsValue::UNDEFINED)
    })
}

fn set(value: &JsValue, key: &str, to: JsValue) {
    Reflect::set(value, &key.into(), &to).expect("set a key on a plain object");
}

/// The error a call threw: a JS Error with `message` and `field`.
#[track_caller]
fn thrown(result: Result<JsValue, JsValue>) -> (String, String) {
    let error = match result {
        Ok(v) => panic!(
            "the call should throw but returned {:?}",
            JSON::stringify(&v)
        ),
        Err(e) => e,
    };
    let error: Error = error.dyn_into().expect("a real JS Error is thrown");
    let field = get(&error, "field")
        .as_string()
        .expect("the error names a field");
    (field, error.message().into())
}

#[wasm_bindgen_test]
fn check_linear_returns_a_plain_report() {
    let report = check_linear(demo_rail()).expect("the demo rail computes");
    assert_eq!(get(&report, "verdict").as_string().as_deref(), Some("pass"));
    assert!(Array::is_array(&get(&report, "corners")));
    assert_eq!(Array::from(&get(&report, "corners")).length(), 3);
    let first_corner = get(&report, "corners").dyn_into::<Array>().unwrap().get(0);
    assert!(first_corner.is_object());
    // The report is a plain object (JSON-compatible), not a Map.
    assert!(report.is_object() && !report.is_instance_of::<js_sys::Map>());
    let tj = get(&report, "worst.tjC")
        .as_f64()
        .expect("worst.tjC is a number");
    // 60 °C + 100 K/W × 0.4921325 W (worked out in core's tests).
    assert!((tj - 109.21325).abs() < 1e-9, "tjC = {tj}");
    // Absent optional results arrive as null, with the key present.
    let limits = get(&report, "limits");
    assert!(Reflect::has(&limits, &"maxLoadHeadroomA".into()).unwrap());
    assert!(get(&report, "window.thermal").is_instance_of::<Array>());
    let json = JSON::stringify(&report).unwrap().as_string().unwrap();
    assert!(!json.contains("NaN") && !json.contains("Infinity"));
}

#[wasm_bindgen_test]
fn optional_inputs_may_be_missing_null_or_given() {
    let input = demo_rail();
    set(&input, "effMinPct", JsValue::NULL);
    assert!(check_linear(input.clone()).is_ok());
    set(&input, "effMinPct", 90.0.into());
    let report = check_linear(input).expect("computes with an efficiency requirement");
    assert_eq!(get(&report, "verdict").as_string().as_deref(), Some("fail"));
    assert_eq!(get(&report, "suggestSwitching").as_bool(), Some(true));
}

#[wasm_bindgen_test]
fn bad_inputs_throw_errors_that_name_the_field() {
    let input = demo_rail();
    set(&input, "vinMin", 6.0.into());
    let (field, message) = thrown(check_linear(input));
    assert_eq!(field, "vinNom");
    assert!(message.contains("V_in,nom"), "{message}");

    let input = demo_rail();
    set(&input, "thetaJa", (-5.0).into());
    assert_eq!(thrown(check_linear(input)).0, "thetaJa");

    let input = demo_rail();
    set(&input, "tjMax", f64::NAN.into());
    let (field, message) = thrown(check_linear(input));
    assert_eq!(field, "tjMax");
    assert!(message.contains("finite"), "{message}");

    let input = demo_rail();
    set(&input, "ioutMax", "250 mA".into());
    assert_eq!(thrown(check_linear(input)).0, "ioutMax");

    let input = demo_rail();
    Reflect::delete_property(input.unchecked_ref::<Object>(), &"vout".into()).unwrap();
    assert_eq!(thrown(check_linear(input)).0, "vout");

    // A misspelt key is refused, not ignored.
    let input = demo_rail();
    set(&input, "effMinPc", 1.0.into());
    let (field, message) = thrown(check_linear(input));
    assert_eq!(field, "effMinPc");
    assert!(message.contains("effMinPct"), "{message}");

    let input = demo_rail();
    set(&input, "dropoutModel", "quantum".into());
    assert_eq!(thrown(check_linear(input)).0, "dropoutModel");

    for not_an_object in [JsValue::NULL, JsValue::UNDEFINED, 42.0.into(), "{}".into()] {
        let (_, message) = thrown(check_linear(not_an_object));
        assert!(!message.is_empty());
    }
}

#[wasm_bindgen_test]
fn quantities_cross_both_ways() {
    assert_eq!(parse_quantity("4k7", "resistance").unwrap(), 4700.0);
    assert_eq!(parse_quantity("3V3", "voltage").unwrap(), 3.3);
    let (field, message) = thrown(parse_quantity("500 mA", "voltage").map(JsValue::from));
    assert_eq!(field, "text");
    assert!(message.contains("current"), "{message}");
    let (field, _) = thrown(parse_quantity("1", "volts").map(JsValue::from));
    assert_eq!(field, "kind");
    assert_eq!(format_quantity(0.0123, "current", 3).unwrap(), "12.3 mA");
    assert_eq!(format_quantity(f64::NAN, "voltage", 3).unwrap(), "—");
    assert!(quantity_kinds().iter().any(|k| k == "thermalResistance"));
}

/// The thermal demo (invented scenario: the logger's LDO with its radio bursts).
fn thermal_demo() -> JsValue {
    JSON::parse(
        r#"{"powerW":0.49,"taMax":60,"taMin":-20,"tjMax":125,"marginC":15,"path":"ja",
            "thetaJa":100,"psiJt":8,"caseTopC":95,
            "foster":[{"r":2,"tau":0.001},{"r":8,"tau":0.01},{"r":25,"tau":0.1},{"r":65,"tau":2}],
            "pulsePowerW":0.49,"pulseOnS":0.05,"pulsePeriodS":0.5}"#,
    )
    .expect("the thermal demo is valid JSON")
}

#[wasm_bindgen_test]
fn check_thermal_crosses_with_lists_and_nulls() {
    let report = railnote_wasm::check_thermal(thermal_demo()).expect("the demo computes");
    assert_eq!(get(&report, "verdict").as_string().as_deref(), Some("pass"));
    // 60 °C + 100 K/W × 0.49 W (JESD51-2A).
    assert_eq!(get(&report, "steady.tjC").as_f64(), Some(109.0));
    assert!(get(&report, "steady.thetaSaNeededKPerW").is_null());
    assert!(get(&report, "measured.fromBoardC").is_null());
    assert!(get(&report, "transient.series").is_instance_of::<Array>());
    assert!(get(&report, "transient.pulse.trainPeakC")
        .as_f64()
        .is_some());
}

#[wasm_bindgen_test]
fn thermal_errors_name_list_items() {
    // A wrong type inside a list is named by its path, as the page's fields are.
    let input = thermal_demo();
    let stage = get(&input, "foster").dyn_into::<Array>().unwrap().get(2);
    set(&stage, "tau", "100 ms".into());
    let (field, message) = thrown(railnote_wasm::check_thermal(input));
    assert_eq!(field, "foster[2].tau");
    assert!(message.contains("found text"), "{message}");
    // A value core refuses is named the same way.
    let input = thermal_demo();
    let stage = get(&input, "foster").dyn_into::<Array>().unwrap().get(1);
    set(&stage, "tau", 0.0.into());
    assert_eq!(
        thrown(railnote_wasm::check_thermal(input)).0,
        "foster[1].tau"
    );
    let input = thermal_demo();
    set(&input, "path", "sideways".into());
    assert_eq!(thrown(railnote_wasm::check_thermal(input)).0, "path");
}

/// The switching demo (invented scenario: the logger's 5.0 V buck from its 12 V lead-acid
/// battery, 0.8 A; parts invented), as the switching page sends it.
fn switching_demo() -> JsValue {
    JSON::parse(
        r#"{"topology":"buck","rectifier":"synchronous","lightLoad":"discontinuousAllowed",
            "vinMin":10.8,"vinNom":12,"vinMax":14.4,"vout":5,"iout":0.8,"fsw":500e3,
            "inductance":22e-6,"rippleRatioPct":30,"mainRdsOn":0.1,"rectRdsOn":0.05,
            "diodeVf":null,"riseTime":10e-9,"fallTime":10e-9,"mainGateCharge":5e-9,
            "rectGateCharge":5e-9,"driveV":5,"deadTime":20e-9,"bodyDiodeVf":0.7,
            "coss":200e-12,"dcr":0.05,"coreLoss":0.01,"iq":1e-3,"cout":22e-6,"esr":0.01,
            "minOnTime":100e-9,"maxDutyPct":90,"isat":1.5}"#,
    )
    .expect("the switching demo is valid JSON")
}

#[wasm_bindgen_test]
fn check_switching_returns_a_plain_report() {
    let report = railnote_wasm::check_switching(switching_demo()).expect("the demo computes");
    assert_eq!(get(&report, "verdict").as_string().as_deref(), Some("pass"));
    let corners = get(&report, "corners").dyn_into::<Array>().unwrap();
    assert_eq!(corners.length(), 3);
    let nom = corners.get(1);
    assert_eq!(get(&nom, "label").as_string().as_deref(), Some("nom"));
    assert_eq!(get(&nom, "mode").as_string().as_deref(), Some("continuous"));
    // D = 5.08 / 11.96 and the total loss 0.191763823648045 W, hand-worked in core's tests.
    let duty = get(&nom, "duty").as_f64().unwrap();
    assert!((duty - 5.08 / 11.96).abs() < 1e-12, "duty = {duty}");
    let total = get(&nom, "losses.totalW").as_f64().unwrap();
    assert!(
        (total - 0.191763823648045).abs() < 1e-12,
        "totalW = {total}"
    );
    assert!(get(&nom, "lForRatioH").as_f64().is_some());
    let sweep = get(&report, "sweep").dyn_into::<Array>().unwrap();
    assert_eq!(sweep.length(), 3);
    let curve = sweep.get(0);
    assert_eq!(Array::from(&get(&curve, "efficiencyPct")).length(), 50);
    assert_eq!(
        Array::from(&get(&curve, "discontinuous")).get(0).as_bool(),
        Some(true)
    );
    assert_eq!(get(&report, "inductanceProposed").as_bool(), Some(false));
    let json = JSON::stringify(&report).unwrap().as_string().unwrap();
    assert!(!json.contains("NaN") && !json.contains("Infinity"));

    // Without L the ripple ratio proposes one; the inverting topology takes |V_out|.
    let input = switching_demo();
    set(&input, "inductance", JsValue::NULL);
    let report = railnote_wasm::check_switching(input).expect("L is proposed");
    assert_eq!(get(&report, "inductanceProposed").as_bool(), Some(true));
}

#[wasm_bindgen_test]
fn switching_errors_name_the_field() {
    let input = switching_demo();
    set(&input, "vout", 12.0.into());
    let (field, message) = thrown(railnote_wasm::check_switching(input));
    assert_eq!(field, "vout");
    assert!(
        message.contains("below V_in,min (10.8 V) for a buck"),
        "{message}"
    );

    let input = switching_demo();
    set(&input, "inductance", 0.0.into());
    assert_eq!(
        thrown(railnote_wasm::check_switching(input)).0,
        "inductance"
    );

    let input = switching_demo();
    set(&input, "topology", "flyback".into());
    let (field, message) = thrown(railnote_wasm::check_switching(input));
    assert_eq!(field, "topology");
    assert!(message.contains("\"inverting\""), "{message}");

    let input = switching_demo();
    set(&input, "rectRdsOn", "50 mΩ".into());
    assert_eq!(thrown(railnote_wasm::check_switching(input)).0, "rectRdsOn");
}

#[wasm_bindgen_test]
fn compare_rails_crosses_with_an_impossible_linear_side() {
    let input = switching_demo();
    for (key, value) in [
        ("taMax", 60.0),
        ("tjMax", 125.0),
        ("swThetaJa", 40.0),
        ("ldoIq", 100e-6),
        ("ldoGndPct", 1.0),
        ("ldoDropoutV", 0.5),
        ("ldoDropoutAtA", 1.0),
        ("ldoRatedA", 1.0),
        ("ldoThetaJa", 25.0),
    ] {
        set(&input, key, value.into());
    }
    set(&input, "ldoDropoutModel", "resistive".into());
    let report = railnote_wasm::compare_rails(input.clone()).expect("the demo compares");
    assert_eq!(get(&report, "linearPossible").as_bool(), Some(true));
    assert!(get(&report, "linearImpossible").is_null());
    // 60 °C + 25 K/W × 7.63664 W at 14.4 V (hand-worked in core's tests).
    let max = get(&report, "corners").dyn_into::<Array>().unwrap().get(2);
    let tj = get(&max, "linear.tjC").as_f64().unwrap();
    assert!((tj - 250.916).abs() < 1e-9, "tjC = {tj}");
    assert!(Reflect::has(&max, &"crossingLoadA".into()).unwrap());
    assert!(Array::is_array(&get(&report, "tradeoffs")));

    // A boost: the linear side is a sentence, not a crash.
    for (key, value) in [
        ("topology", JsValue::from("boost")),
        ("vinMin", 4.5.into()),
        ("vinNom", 5.0.into()),
        ("vinMax", 5.5.into()),
        ("vout", 12.0.into()),
        ("iout", 0.2.into()),
    ] {
        set(&input, key, value);
    }
    let report = railnote_wasm::compare_rails(input.clone()).expect("a boost compares");
    assert_eq!(get(&report, "linearPossible").as_bool(), Some(false));
    let why = get(&report, "linearImpossible").as_string().unwrap();
    assert!(why.contains("cannot step up"), "{why}");
    assert!(get(&report, "curves.linearW").is_null());

    set(&input, "ldoThetaJa", 0.0.into());
    set(&input, "topology", "buck".into());
    set(&input, "vout", 3.3.into());
    assert_eq!(thrown(railnote_wasm::compare_rails(input)).0, "ldoThetaJa");
}

/// The logger board as a tree document (invented scenario; schema version 1).
fn tree_demo() -> JsValue {
    JSON::parse(
        r#"{"version":1,"taMax":60,
            "sources":[{"name":"Battery","vMin":10.8,"vNom":12,"vMax":14.4,"capacityMah":7000}],
            "rails":[{"name":"5V0 buck","parent":"Battery","kind":"switching","vout":5,"efficiencyPct":88},
                     {"name":"3V3 LDO","parent":"5V0 buck","kind":"linear","vout":3.3,"dropoutV":0.3,"iq":5e-5,"thetaJa":100}],
            "loads":[{"name":"MCU and radio","rail":"3V3 LDO","typA":0.03,"peakA":0.25}]}"#,
    )
    .expect("the tree demo is valid JSON")
}

#[wasm_bindgen_test]
fn check_tree_crosses_with_its_lists() {
    let report = railnote_wasm::check_tree(tree_demo()).expect("the demo computes");
    assert_eq!(get(&report, "verdict").as_string().as_deref(), Some("pass"));
    assert!(get(&report, "firstFailure").is_null());
    let corners = get(&report, "corners").dyn_into::<Array>().unwrap();
    assert_eq!(corners.length(), 3);
    let rails = get(&corners.get(1), "rails").dyn_into::<Array>().unwrap();
    assert_eq!(
        get(&rails.get(1), "name").as_string().as_deref(),
        Some("3V3 LDO")
    );
    // 3V3: 30 mA out, 30.05 mA in (I_q 50 µA added; Kirchhoff).
    let iin = get(&rails.get(1), "iinA.typ").as_f64().unwrap();
    assert!((iin - 0.03005).abs() < 1e-15, "{iin}");
    assert!(get(&report, "runtimeH").as_f64().is_some());
}

#[wasm_bindgen_test]
fn tree_errors_name_the_list_and_the_rail() {
    let input = tree_demo();
    let rail = get(&input, "rails").dyn_into::<Array>().unwrap().get(1);
    set(&rail, "parent", "Nowhere".into());
    let (field, message) = thrown(railnote_wasm::check_tree(input));
    assert_eq!(field, "rails");
    assert!(
        message.contains("3V3 LDO") && message.contains("Nowhere"),
        "{message}"
    );
    let input = tree_demo();
    set(&input, "version", 3.into());
    assert_eq!(thrown(railnote_wasm::check_tree(input)).0, "version");
    let input = tree_demo();
    let rail = get(&input, "rails").dyn_into::<Array>().unwrap().get(0);
    set(&rail, "kind", "magic".into());
    assert_eq!(thrown(railnote_wasm::check_tree(input)).0, "rails[0].kind");
}
