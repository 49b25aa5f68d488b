//! The linear rail check against hand-worked examples, standard definitions and trade facts.
//!
//! Accuracy is data. Tolerances, relative unless stated:
//!
//! | quantity                         | tolerance | why                                        |
//! |----------------------------------|-----------|--------------------------------------------|
//! | dissipation, currents, T_j, η    | 1e-12     | closed-form arithmetic, a few roundings    |
//! | solved-back limits               | 1e-12     | exact inversions of the same relations     |
//!
//! Every expected value below names where it comes from.

use railnote_core::linear::{
    check as check_rail, CheckId, DropoutModel, LinearInput, LinearReport, LoadBound, Status,
};

/// The brief's demo rail (invented scenario): the soil-moisture logger's 3.3 V LDO for the
/// microcontroller and radio, fed from the board's 5.0 V buck (±3 %), 250 mA peak, 30 mA
/// typical, enclosure ambient up to 60 °C.
fn demo_rail() -> LinearInput {
    LinearInput {
        vin_min: 4.85,
        vin_nom: 5.0,
        vin_max: 5.15,
        vout: 3.3,
        vout_tol_pct: 2.0,
        iout_max: 0.25,
        iout_typ: 0.03,
        iq: 50e-6,
        gnd_pct: 1.0,
        dropout_model: DropoutModel::Resistive,
        dropout_v: 0.3,
        dropout_at_a: 0.3,
        rated_a: 0.3,
        theta_ja: 100.0,
        ta_max: 60.0,
        tj_max: 125.0,
        headroom_margin_v: 0.3,
        thermal_margin_c: 15.0,
        eff_min_pct: None,
        input_budget_a: None,
    }
}

/// A quantity picked out of a report, by name for the failure message.
type Pick = (&'static str, fn(&LinearReport) -> f64);

const HEADROOM: Pick = ("worst.headroom_v", |r| r.worst.headroom_v);
const POWER: Pick = ("worst.power_w", |r| r.worst.power_w);
const TJ: Pick = ("worst.tj_c", |r| r.worst.tj_c);
const THERMAL_MARGIN: Pick = ("worst.thermal_margin_c", |r| r.worst.thermal_margin_c);
const INPUT_CURRENT: Pick = ("worst.input_current_a", |r| r.worst.input_current_a);
const EFF_NOM_FULL: Pick = ("corners[nom].full.efficiency_pct", |r| {
    r.corners[1].full.efficiency_pct
});
const EFF_NOM_TYP: Pick = ("corners[nom].typ.efficiency_pct", |r| {
    r.corners[1].typ.efficiency_pct
});
const MAX_LOAD_THERMAL: Pick = ("limits.max_load_thermal_a", |r| r.limits.max_load_thermal_a);
const MAX_LOAD: Pick = ("limits.max_load_a", |r| r.limits.max_load_a);
const HOTTEST_AMBIENT: Pick = ("limits.hottest_ambient_c", |r| r.limits.hottest_ambient_c);
const VIN_MIN_REG: Pick = ("limits.vin_min_regulating", |r| r.limits.vin_min_regulating);
const VIN_MAX_THERMAL: Pick = ("limits.vin_max_thermal", |r| {
    r.limits.vin_max_thermal.unwrap_or(f64::NAN)
});

/// The only test code that calls the calculator: run `input`, expect `verdict`, and compare each
/// picked quantity with its expected value within `rel_tol`.
fn check(
    input: &LinearInput,
    verdict: Status,
    expected: &[(Pick, f64)],
    rel_tol: f64,
) -> LinearReport {
    let report = check_rail(input).unwrap_or_else(|e| panic!("input refused: {e}"));
    assert_eq!(
        report.verdict, verdict,
        "verdict; summary: {}",
        report.summary
    );
    for &((name, pick), want) in expected {
        let got = pick(&report);
        let err = ((got - want) / want).abs();
        assert!(
            err <= rel_tol,
            "{name}: got {got}, want {want} (rel. error {err:e})"
        );
    }
    report
}

#[test]
fn demo_rail_worked_by_hand() {
    // Worked by hand from the brief's relations:
    //   V_out,min = 3.3 × 0.98 = 3.234 V, V_out,max = 3.3 × 1.02 = 3.366 V
    //   V_do(250 mA) = 0.3 V × 0.25 / 0.3 = 0.25 V (resistive pass element)
    //   headroom = 4.85 − 3.366 − 0.25 = 1.234 V
    //   I_gnd = 50 µA + 1 % × 250 mA = 2.55 mA; I_in = 252.55 mA
    //   P = (5.15 − 3.234) × 0.25 + 5.15 × 0.00255 = 0.479 + 0.0131325 = 0.4921325 W
    //   T_j = 60 + 100 × 0.4921325 = 109.21325 °C (JESD51: T_j = T_a + θJA·P); margin 15.78675 K
    //   η(5 V, 250 mA) = 3.3 × 0.25 / (5 × 0.25255) = 0.825 / 1.26275 = 65.33359730746...%
    //   η(5 V, 30 mA) = 3.3 × 0.03 / (5 × 0.03035) = 0.099 / 0.15175 = 65.23887973640...%
    //   allowed P = (125 − 15 − 60) / 100 = 0.5 W
    //   largest load (thermal) = (0.5 − 5.15 × 50e-6) / (5.15 − 3.234 + 5.15 × 0.01)
    //                          = 0.4997425 / 1.9675 = 0.253998729...A
    //   hottest ambient = 125 − 15 − 100 × 0.4921325 = 60.78675 °C
    //   lowest V_in that regulates = 3.366 + 0.25 = 3.616 V
    //   highest V_in (thermal) = (0.5 + 3.234 × 0.25) / 0.25255 = 1.3085 / 0.25255 = 5.1811522...V
    let report = check(
        &demo_rail(),
        Status::Pass,
        &[
            (HEADROOM, 1.234),
            (POWER, 0.4921325),
            (TJ, 109.21325),
            (THERMAL_MARGIN, 15.78675),
            (INPUT_CURRENT, 0.25255),
            (EFF_NOM_FULL, 100.0 * 0.825 / 1.26275),
            (EFF_NOM_TYP, 100.0 * 0.099 / 0.15175),
            (MAX_LOAD_THERMAL, 0.4997425 / 1.9675),
            (MAX_LOAD, 0.4997425 / 1.9675),
            (HOTTEST_AMBIENT, 60.78675),
            (VIN_MIN_REG, 3.616),
            (VIN_MAX_THERMAL, 1.3085 / 0.25255),
        ],
        1e-12,
    );
    assert_eq!(report.limits.max_load_by, LoadBound::Thermal);
    // Headroom spare 4.85 − 3.366 − 0.3 = 1.184 V over 1 Ω: 1.184 A.
    let headroom_load = report
        .limits
        .max_load_headroom_a
        .expect("resistive model bounds load");
    assert!((headroom_load - 1.184).abs() < 1e-12);
    assert!(!report.suggest_switching);
    assert!(report.warnings.is_empty(), "{:?}", report.warnings);
}

#[test]
fn jesd51_theta_ja_definition() {
    // JEDEC JESD51-2A defines θJA = (T_j − T_a) / P. Every operating point the check reports
    // must satisfy it exactly with the θJA given.
    let report = check(&demo_rail(), Status::Pass, &[], 0.0);
    for corner in &report.corners {
        for point in [&corner.full, &corner.typ] {
            let theta = (point.tj_c - 60.0) / point.total_w;
            assert!((theta - 100.0).abs() < 1e-9, "θJA recovered as {theta}");
        }
    }
}

#[test]
fn classic_three_terminal_needs_about_two_volts() {
    // Common practice: classic three-terminal regulators want about 2 V of headroom, LDOs a few
    // hundred mV. So 5 V → 3.3 V fails with the classic part and passes with a 300 mV LDO, and
    // 12 V → 5 V is comfortable for the classic part.
    let mut classic = demo_rail();
    classic.dropout_model = DropoutModel::Classic;
    // 4.85 − 3.366 − 2.0 = −0.516 V.
    let report = check(&classic, Status::Fail, &[(HEADROOM, -0.516)], 1e-12);
    let headroom = &report.checks[0];
    assert_eq!(
        (headroom.id, headroom.status),
        (CheckId::Headroom, Status::Fail)
    );
    assert!(headroom.text.contains("drops out"), "{}", headroom.text);
    assert_eq!(report.limits.max_load_headroom_a, Some(0.0));
    assert_eq!(report.limits.max_load_by, LoadBound::Headroom);

    let twelve_to_five = LinearInput {
        vin_min: 10.8,
        vin_nom: 12.0,
        vin_max: 14.4,
        vout: 5.0,
        iout_max: 0.05,
        iout_typ: 0.02,
        rated_a: 1.0,
        theta_ja: 50.0,
        ..classic
    };
    // 10.8 − 5.1 − 2.0 = 3.7 V.
    check(&twelve_to_five, Status::Pass, &[(HEADROOM, 3.7)], 1e-12);
}

#[test]
fn bandgap_output_from_a_low_rail() {
    // Common practice: a silicon bandgap reference sits near 1.2 V, the lowest output a simple
    // adjustable LDO reaches. A 1.2 V output from a 1.8 V rail (±3 %) through an LDO rated
    // 300 mV at 300 mA is the low-voltage case such parts are made for.
    let rail = LinearInput {
        vin_min: 1.746,
        vin_nom: 1.8,
        vin_max: 1.854,
        vout: 1.2,
        iout_max: 0.04,
        iout_typ: 0.04,
        dropout_at_a: 0.3,
        dropout_v: 0.3,
        rated_a: 0.15,
        ..demo_rail()
    };
    // V_out,max = 1.224 V, V_do(40 mA) = 0.04 V: headroom = 1.746 − 1.224 − 0.04 = 0.482 V.
    // Efficiency can never beat V_out/V_in: at 1.8 V, 66.7 % at best.
    let report = check(&rail, Status::Pass, &[(HEADROOM, 0.482)], 1e-12);
    assert!(report.corners[1].full.efficiency_pct < 100.0 * 1.2 / 1.8);
}

#[test]
fn margins_grade_marginal_before_fail() {
    // θJA 120 K/W: T_j = 60 + 120 × 0.4921325 = 119.0559 °C, inside 125 °C but within 15 K.
    let hot = LinearInput {
        theta_ja: 120.0,
        ..demo_rail()
    };
    let report = check(&hot, Status::Marginal, &[(TJ, 119.0559)], 1e-12);
    assert!(report.suggest_switching);
    assert!(
        report.summary.contains("junction temperature"),
        "{}",
        report.summary
    );
    // θJA 140 K/W: 128.89855 °C, over the limit.
    let hotter = LinearInput {
        theta_ja: 140.0,
        ..demo_rail()
    };
    check(&hotter, Status::Fail, &[(TJ, 128.89855)], 1e-12);
}

#[test]
fn optional_requirements_become_checks() {
    let wanted = LinearInput {
        eff_min_pct: Some(70.0),
        input_budget_a: Some(0.2),
        ..demo_rail()
    };
    let report = check(&wanted, Status::Fail, &[], 0.0);
    let status = |id| report.checks.iter().find(|c| c.id == id).map(|c| c.status);
    // η at 5 V and 30 mA is 65.2 % < 70 %; I_in 252.55 mA > 200 mA.
    assert_eq!(status(CheckId::Efficiency), Some(Status::Fail));
    assert_eq!(status(CheckId::Budget), Some(Status::Fail));
    assert!(
        report.suggest_switching,
        "efficiency failure suggests a switcher"
    );
}

#[test]
fn warnings_in_words() {
    let stretched = LinearInput {
        iout_max: 0.29,
        dropout_at_a: 0.2,
        vin_max: 70.0,
        vin_nom: 24.0,
        ..demo_rail()
    };
    let report = check_rail(&stretched).expect("computes");
    let text = report.warnings.join(" ");
    assert!(text.contains("60 V"), "{text}");
    assert!(text.contains("extrapolated"), "{text}");
}

#[test]
fn bad_inputs_name_their_field() {
    type Spoil = fn(&mut LinearInput);
    let cases: &[(&str, Spoil, &str)] = &[
        ("vinMin", |x| x.vin_min = 0.0, "V_in,min must be above 0 V"),
        (
            "vinNom",
            |x| x.vin_nom = 4.0,
            "V_in,nom must not be below V_in,min",
        ),
        (
            "vinMax",
            |x| x.vin_max = 4.9,
            "V_in,max must not be below V_in,nom",
        ),
        ("vinMin", |x| x.vout = 5.0, "cannot step up"),
        ("vout", |x| x.vout = -1.0, "V_out must be above 0 V"),
        (
            "voutTolPct",
            |x| x.vout_tol_pct = 30.0,
            "between 0 % and 20",
        ),
        ("ioutMax", |x| x.iout_max = 0.0, "I_out,max must be above"),
        ("ioutTyp", |x| x.iout_typ = 0.5, "must not exceed I_out,max"),
        ("iq", |x| x.iq = -1e-6, "I_q must not be below"),
        ("gndPct", |x| x.gnd_pct = 80.0, "ground current"),
        ("dropoutV", |x| x.dropout_v = -0.1, "dropout"),
        ("dropoutAtA", |x| x.dropout_at_a = 0.0, "rated at"),
        ("ratedA", |x| x.rated_a = 0.0, "rated current"),
        (
            "thetaJa",
            |x| x.theta_ja = -5.0,
            "θJA must not be below 0.001 K/W",
        ),
        (
            "taMax",
            |x| x.ta_max = 130.0,
            "T_a,max must be below T_j,max",
        ),
        ("taMax", |x| x.ta_max = -300.0, "T_a,max must be above"),
        ("tjMax", |x| x.tj_max = f64::NAN, "finite"),
        ("vinMax", |x| x.vin_max = f64::INFINITY, "finite"),
        ("vinMax", |x| x.vin_max = 1e300, "at most"),
        ("headroomMarginV", |x| x.headroom_margin_v = -1.0, "margin"),
        ("thermalMarginC", |x| x.thermal_margin_c = -1.0, "margin"),
        ("effMinPct", |x| x.eff_min_pct = Some(120.0), "efficiency"),
        ("inputBudgetA", |x| x.input_budget_a = Some(0.0), "budget"),
    ];
    for &(field, spoil, words) in cases {
        let mut input = demo_rail();
        spoil(&mut input);
        let error = check_rail(&input).expect_err(field);
        assert_eq!(error.field, field, "{error}");
        assert!(error.message.contains(words), "{field}: {error}");
    }
}

#[test]
fn window_bounds_lie_on_their_limits() {
    let report = check(&demo_rail(), Status::Pass, &[], 0.0);
    let w = &report.window;
    // Dropout line: headroom is zero along it: V_in − V_out,max − R·I = 0 with R = 1 Ω.
    for &[vin, iout] in &w.dropout {
        assert!((vin - 3.366 - iout).abs() < 1e-12, "({vin}, {iout})");
    }
    // Thermal curve: T_j = T_j,max at T_a,max and V_out,min wherever it is below the top.
    assert!(w.thermal.len() > 2);
    for &[vin, iout] in &w.thermal {
        let p = (vin - 3.234) * iout + vin * (50e-6 + 0.01 * iout);
        if iout < w.iout_to - 1e-9 {
            assert!(
                (60.0 + 100.0 * p - 125.0).abs() < 1e-9,
                "T_j at ({vin}, {iout})"
            );
        }
        assert!(vin >= w.vin_from && vin <= w.vin_to && iout >= 0.0 && iout <= w.iout_to);
    }
    assert_eq!(w.rated_a, 0.3);
    // 1.25 × max(250 mA, min(300 mA, 4 × 250 mA)) = 375 mA: the rating line is on the plot.
    assert!((w.iout_to - 0.375).abs() < 1e-12);
}

#[test]
fn window_of_a_light_load_on_a_big_regulator_is_not_squashed() {
    // 5 mA from a 1 A part: the axis runs to 1.25 × 4 × 5 mA = 25 mA, the rating above it.
    let light = LinearInput {
        iout_max: 0.005,
        iout_typ: 0.001,
        rated_a: 1.0,
        ..demo_rail()
    };
    let report = check(&light, Status::Pass, &[], 0.0);
    assert!((report.window.iout_to - 0.025).abs() < 1e-15);
    assert!(report.window.rated_a > report.window.iout_to);
}
