//! The rail tree against a hand-worked board, the relations that define it, and random trees.
//!
//! Tolerances: sums and products of the inputs (hand-worked figures, the switch's closed form):
//! 1e-12 relative; conservation of energy on random trees: 1e-9 relative (the voltage–current
//! alternation stops at 1e-12 per current).

use proptest::prelude::*;
use railnote_core::linear::{self, DropoutModel, LinearInput};
use railnote_core::switching::{self, CornerLabel, LightLoad, Rectifier, SwitchingInput, Topology};
use railnote_core::tree::{
    check_tree, CheckId, LoadSpec, RailKind, RailSpec, SourceSpec, TreeInput, TreeReport,
};
use railnote_core::verdict::Status;
use railnote_core::InputError;

/// The only test code that calls the tree check.
fn check(input: &TreeInput) -> Result<TreeReport, InputError> {
    check_tree(input)
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

fn rail(name: &str, parent: &str, kind: RailKind) -> RailSpec {
    RailSpec::new(name, parent, kind)
}

fn load(name: &str, on: &str, typ: f64, peak: f64) -> LoadSpec {
    LoadSpec {
        name: name.into(),
        rail: on.into(),
        typ_a: Some(typ),
        peak_a: Some(peak),
        typ_w: None,
        peak_w: None,
        activity_pct: None,
        sleep_a: None,
    }
}

/// The brief's logger board (invented): a 12 V lead-acid battery (10.8–14.4 V, an invented
/// 7 Ah), a 5.0 V buck (88 %, invented), a 3.3 V LDO for the microcontroller and radio (30 mA
/// typical, 250 mA peak) and a 1.8 V LDO from the 3.3 V rail for the sensor front end (40 mA);
/// both LDOs with 0.3 V dropout and 50 µA quiescent current, the 3.3 V one on 100 K/W; 60 °C.
fn board() -> TreeInput {
    TreeInput {
        source: SourceSpec {
            name: "Battery".into(),
            v_min: 10.8,
            v_nom: 12.0,
            v_max: 14.4,
            capacity_ah: Some(7.0),
            capacity_wh: None,
            current_limit_a: Some(2.0),
        },
        rails: vec![
            RailSpec {
                vout: Some(1.8),
                dropout_v: Some(0.3),
                iq: Some(50e-6),
                ..rail("1V8 LDO", "3V3 LDO", RailKind::Linear)
            },
            RailSpec {
                vout: Some(3.3),
                dropout_v: Some(0.3),
                iq: Some(50e-6),
                theta_ja: Some(100.0),
                tj_max: Some(125.0),
                rated_a: Some(0.3),
                ..rail("3V3 LDO", "5V0 buck", RailKind::Linear)
            },
            RailSpec {
                vout: Some(5.0),
                efficiency_pct: Some(88.0),
                rated_a: Some(0.8),
                ..rail("5V0 buck", "Battery", RailKind::Switching)
            },
        ],
        loads: vec![
            load("MCU and radio", "3V3 LDO", 0.030, 0.250),
            load("Sensor front end", "1V8 LDO", 0.040, 0.040),
        ],
        ta_max: 60.0,
    }
}

#[test]
fn the_logger_board_worked_by_hand() {
    // Typical loads at 12 V, hand-worked (Kirchhoff at each rail, P_in = P_out/η for the buck):
    // 1V8: I_in = 40 mA + 50 µA = 40.05 mA from 3.3 V; loss 3.3·0.04005 − 1.8·0.04 = 60.165 mW.
    // 3V3: I_out = 30 mA + 40.05 mA = 70.05 mA, I_in = 70.10 mA from 5 V;
    //      loss 5·0.0701 − 3.3·0.07005 = 119.335 mW.
    // 5V0: P_out = 5·0.0701 = 350.5 mW, P_in = 350.5/0.88 = 398.2954545 mW, I_in at 12 V
    //      = 33.19128788 mA, loss 47.7954545 mW.
    // Loads 3.3·0.03 + 1.8·0.04 = 171 mW; efficiency 171/398.2954545 = 42.9330 %;
    // runtime 7 Ah / 33.19128788 mA = 210.899 h.
    let r = check(&board()).unwrap();
    let nom = &r.corners[1];
    let by = |name: &str| nom.rails.iter().find(|x| x.name == name).unwrap();
    near(by("1V8 LDO").iin_a.typ, 0.04005, 1e-12, "1V8 input");
    near(by("1V8 LDO").loss_w.typ, 0.060165, 1e-12, "1V8 loss");
    near(by("3V3 LDO").iout_a.typ, 0.07005, 1e-12, "3V3 output");
    near(by("3V3 LDO").loss_w.typ, 0.119335, 1e-12, "3V3 loss");
    near(
        by("5V0 buck").loss_w.typ,
        0.3505 / 0.88 - 0.3505,
        1e-12,
        "buck loss",
    );
    near(nom.source_w.typ, 0.3505 / 0.88, 1e-12, "source power");
    near(
        nom.source_a.typ,
        0.3505 / 0.88 / 12.0,
        1e-12,
        "source current",
    );
    near(nom.loads_w.typ, 0.171, 1e-12, "load power");
    near(
        nom.efficiency_pct,
        100.0 * 0.171 / (0.3505 / 0.88),
        1e-12,
        "efficiency",
    );
    near(
        r.runtime_h.unwrap(),
        7.0 / (0.3505 / 0.88 / 12.0),
        1e-12,
        "runtime",
    );
    // Peak at 14.4 V: the 3.3 V LDO passes 290.05 mA and takes 290.10 mA from 5 V, dissipating
    // 5·0.2901 − 3.3·0.29005 = 493.335 mW: T_j = 60 + 100·0.493335 = 109.33 °C (the linear rail
    // check's demo figure for the same rail).
    let t = r
        .checks
        .iter()
        .find(|c| c.id == CheckId::Thermal && c.title.starts_with("3V3"))
        .unwrap();
    assert_eq!(t.status, Status::Pass);
    assert!(t.text.contains("109 °C"), "{}", t.text);
    assert_eq!(r.verdict, Status::Pass, "{}", r.summary);
    assert_eq!(r.first_failure, None);
}

#[test]
fn the_first_rail_to_fail_is_named() {
    // A 3.3 V LDO on 200 K/W runs at 60 + 200·0.493 = 159 °C: over 125 °C.
    let mut input = board();
    input.rails[1].theta_ja = Some(200.0);
    let r = check(&input).unwrap();
    assert_eq!(r.verdict, Status::Fail);
    assert_eq!(r.first_failure.as_deref(), Some("3V3 LDO"));
    assert!(r.summary.contains("3V3 LDO junction"), "{}", r.summary);
    // A 20 mA limit on the battery fails at the source (the buck alone draws 33 mA).
    let mut input = board();
    input.source.current_limit_a = Some(0.02);
    let r = check(&input).unwrap();
    assert_eq!(r.first_failure.as_deref(), Some("Battery"));
}

#[test]
fn a_switch_with_a_power_load_meets_its_closed_form() {
    // A load switch R_on = 0.5 Ω feeding a 2 W load from 5 V: V_out = V_in − I·R with
    // I = P/V_out, so V_out² − V_in·V_out + P·R = 0 and V_out = (V_in + √(V_in² − 4PR))/2
    // (the physical root).
    let input = TreeInput {
        source: SourceSpec {
            name: "Adapter".into(),
            v_min: 5.0,
            v_nom: 5.0,
            v_max: 5.0,
            capacity_ah: None,
            capacity_wh: Some(10.0),
            current_limit_a: None,
        },
        rails: vec![RailSpec {
            r_on: Some(0.5),
            ..rail("Switch", "Adapter", RailKind::Switch)
        }],
        loads: vec![LoadSpec {
            typ_a: None,
            peak_a: None,
            typ_w: Some(2.0),
            peak_w: Some(2.0),
            ..load("Heater", "Switch", 0.0, 0.0)
        }],
        ta_max: 25.0,
    };
    let r = check(&input).unwrap();
    let vout = (5.0 + (25.0f64 - 4.0 * 2.0 * 0.5).sqrt()) / 2.0;
    let c = &r.corners[1];
    near(c.rails[0].vout, vout, 1e-12, "switch output");
    near(c.loads[0].p_w.typ, 2.0, 1e-12, "load power");
    near(
        c.rails[0].loss_w.typ,
        (2.0 / vout).powi(2) * 0.5,
        1e-10,
        "I²R",
    );
    near(
        r.runtime_h.unwrap(),
        10.0 / c.source_w.avg,
        1e-12,
        "runtime from Wh",
    );
}

#[test]
fn bad_trees_are_refused_naming_the_rail() {
    let cases: Vec<(Box<dyn Fn(&mut TreeInput)>, &str, &str)> = vec![
        (
            Box::new(|t| t.rails[2].parent = "1V8 LDO".into()),
            "rails",
            "cycle",
        ),
        (
            Box::new(|t| t.rails[0].parent = "Nowhere".into()),
            "rails",
            "\"Nowhere\" is neither",
        ),
        (
            Box::new(|t| t.rails[0].name = "3V3 LDO".into()),
            "rails",
            "used twice",
        ),
        (
            Box::new(|t| t.rails[0].vout = Some(3.6)),
            "rails.vout",
            "cannot give",
        ),
        (
            Box::new(|t| t.loads[1].rail = "2V5".into()),
            "loads",
            "neither the source",
        ),
        (
            Box::new(|t| t.loads[0].typ_w = Some(1.0)),
            "loads.typA",
            "current, or its typical and peak power",
        ),
        (
            Box::new(|t| t.loads[0].peak_a = Some(0.001)),
            "loads.peakA",
            "below the typical",
        ),
        (
            Box::new(|t| t.rails[2].efficiency_pct = Some(120.0)),
            "rails.efficiencyPct",
            "between 1 % and 100 %",
        ),
        (
            // A hostile-input corpus entry: 1e-308 % made the source current infinite.
            Box::new(|t| t.rails[2].efficiency_pct = Some(1e-308)),
            "rails.efficiencyPct",
            "The efficiency must be 0 or at least",
        ),
        (
            // No converter runs below 1 %.
            Box::new(|t| t.rails[2].efficiency_pct = Some(0.5)),
            "rails.efficiencyPct",
            "between 1 % and 100 %",
        ),
        (
            Box::new(|t| t.rails[1].theta_ja = Some(-5.0)),
            "rails.thetaJa",
            "θJA",
        ),
        (
            Box::new(|t| t.source.capacity_ah = Some(-1.0)),
            "sources[0].capacityAh",
            "capacity",
        ),
        (
            Box::new(|t| t.source.v_min = 15.0),
            "sources[0].vNom",
            "lowest ≤ nominal ≤ highest",
        ),
        (
            Box::new(|t| {
                t.rails = (0..501)
                    .map(|k| rail(&format!("r{k}"), "Battery", RailKind::Switch))
                    .collect()
            }),
            "rails",
            "at most 500",
        ),
    ];
    for (edit, field, words) in cases {
        let mut input = board();
        edit(&mut input);
        let e = check(&input).expect_err(words);
        assert_eq!(e.field, field, "{}", e.message);
        assert!(e.message.contains(words), "{words}: {}", e.message);
    }
}

prop_compose! {
    /// A random valid tree: each rail hangs from the source or an earlier rail, linear rails
    /// below their parent's voltage, loads anywhere.
    fn random_tree()(
        kinds in proptest::collection::vec((0u8..5, 0.0f64..1.0, 0.05f64..1.0, 0.0f64..1.0), 1..12),
        loads in proptest::collection::vec((0.0f64..1.0, 0.0f64..0.5, 0.0f64..1.0, any::<bool>(), 0.0f64..100.0), 1..20),
        vs in 3.0f64..30.0,
    ) -> TreeInput {
        let mut rails: Vec<RailSpec> = Vec::new();
        let mut highest: Vec<f64> = Vec::new();
        for (k, (kind, pick, frac, x)) in kinds.iter().enumerate() {
            let parent = (pick * (rails.len() + 1) as f64) as usize;
            let (pname, from) = if parent == 0 { ("Source".to_string(), vs) } else { (rails[parent - 1].name.clone(), highest[parent - 1]) };
            let name = format!("R{k}");
            let spec = match kind {
                0 => RailSpec { vout: Some(from * frac * 0.9), dropout_v: Some(0.2 * x), iq: Some(1e-4 * x), theta_ja: Some(50.0), ..rail(&name, &pname, RailKind::Linear) },
                1 => RailSpec { vout: Some(from * (0.2 + 2.0 * frac)), efficiency_pct: Some(60.0 + 39.0 * x), iq: Some(1e-3 * x), ..rail(&name, &pname, RailKind::Switching) },
                2 => RailSpec { r_on: Some(0.5 * x), ..rail(&name, &pname, RailKind::Switch) },
                // A buck from its parts (the switching estimate), below its parent.
                3 => RailSpec {
                    vout: Some(from * frac * 0.9),
                    estimate: Some(SwitchingInput { vout: from * frac * 0.9, dcr: 0.2 * x, ..buck_parts() }),
                    ..rail(&name, &pname, RailKind::Switching)
                },
                // A MOS-pass LDO (resistive dropout) with load-dependent ground current.
                _ => RailSpec {
                    vout: Some(from * frac * 0.9),
                    dropout_model: Some(DropoutModel::Resistive),
                    dropout_v: Some(0.3 * x),
                    dropout_at_a: Some(0.5),
                    gnd_pct: Some(5.0 * x),
                    iq: Some(1e-4 * x),
                    ..rail(&name, &pname, RailKind::Linear)
                },
            };
            highest.push(spec.vout.unwrap_or(from));
            rails.push(spec);
        }
        let loads = loads.iter().enumerate().map(|(k, (pick, i, act, power, _))| {
            let on = (pick * (rails.len() + 1) as f64) as usize;
            let on = if on == 0 { "Source".to_string() } else { rails[on - 1].name.clone() };
            let mut l = load(&format!("L{k}"), &on, *i, i * 1.5);
            if *power { l.typ_a = None; l.peak_a = None; l.typ_w = Some(i * 0.5); l.peak_w = Some(i * 0.75); }
            l.activity_pct = Some(100.0 * act);
            l.sleep_a = Some(1e-5);
            l
        }).collect();
        TreeInput {
            source: SourceSpec { name: "Source".into(), v_min: vs * 0.9, v_nom: vs, v_max: vs * 1.2, capacity_ah: Some(1.0), capacity_wh: None, current_limit_a: None },
            rails,
            loads,
            ta_max: 40.0,
        }
    }
}

proptest! {
    #[test]
    fn source_power_is_load_power_plus_every_loss(tree in random_tree()) {
        let r = check(&tree).unwrap();
        for c in &r.checks {
            prop_assert!(!c.text.contains("NaN") && !c.text.contains("inf"), "{}", c.text);
        }
        for c in &r.corners {
            for (src, loads, losses) in [
                (c.source_w.typ, c.loads_w.typ, c.losses_w.typ),
                (c.source_w.peak, c.loads_w.peak, c.losses_w.peak),
                (c.source_w.avg, c.loads_w.avg, c.losses_w.avg),
            ] {
                prop_assert!(src.is_finite() && loads.is_finite() && losses.is_finite());
                prop_assert!((src - loads - losses).abs() <= 1e-9 * src.abs().max(1e-9), "{src} vs {loads} + {losses}");
                prop_assert!(losses >= -1e-12 * src.abs().max(1e-9), "a loss below zero: {losses}");
            }
        }
    }
}

/// The demo's 5 V buck from its parts (invented values, the switching page's demo): synchronous,
/// 500 kHz, 22 µH. The input voltages and the load are the tree's to give (placeholders here).
fn buck_parts() -> SwitchingInput {
    SwitchingInput {
        topology: Topology::Buck,
        rectifier: Rectifier::Synchronous,
        light_load: LightLoad::DiscontinuousAllowed,
        vin_min: 1.0,
        vin_nom: 1.0,
        vin_max: 1.0,
        vout: 5.0,
        iout: 1.0,
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
        isat: Some(1.5),
    }
}

#[test]
fn a_linear_rail_is_graded_by_the_linear_check_itself() {
    // The 3.3 V LDO with a 2 % output tolerance, 1 % of its load as extra ground current and a
    // 1.5 V headroom margin: the tree must give exactly the linear check's checks for the inputs
    // and loads the tree found (5 V from the buck at every corner, 290 mA peak, 70.05 mA typical
    // out of the 3.3 V rail at the nominal voltage).
    let mut input = board();
    let ldo = &mut input.rails[1];
    ldo.gnd_pct = Some(1.0);
    ldo.vout_tol_pct = Some(2.0);
    ldo.headroom_margin_v = Some(1.5);
    ldo.thermal_margin_c = Some(10.0);
    let r = check(&input).unwrap();
    let nom = &r.corners[1];
    let out = nom.rails[1].iout_a;
    // Ground current: I_in = I_out·(1 + 1 %) + I_q (the linear check's relation).
    near(
        nom.rails[1].iin_a.typ,
        out.typ * 1.01 + 50e-6,
        1e-12,
        "3V3 input current",
    );
    let direct = linear::check(&LinearInput {
        vin_min: 5.0,
        vin_nom: 5.0,
        vin_max: 5.0,
        vout: 3.3,
        vout_tol_pct: 2.0,
        iout_max: out.peak,
        iout_typ: out.typ,
        iq: 50e-6,
        gnd_pct: 1.0,
        dropout_model: DropoutModel::Constant,
        dropout_v: 0.3,
        dropout_at_a: 1.0,
        rated_a: 0.3,
        theta_ja: 100.0,
        ta_max: 60.0,
        tj_max: 125.0,
        headroom_margin_v: 1.5,
        thermal_margin_c: 10.0,
        eff_min_pct: None,
        input_budget_a: None,
    })
    .unwrap();
    let mine: Vec<_> = r.checks.iter().filter(|c| c.rail == "3V3 LDO").collect();
    let ids = [CheckId::Headroom, CheckId::Thermal, CheckId::Rating];
    assert_eq!(mine.len(), 3, "{mine:?}");
    for (c, (d, id)) in mine.iter().zip(direct.checks.iter().zip(ids)) {
        assert_eq!((c.id, c.status, &c.text), (id, d.status, &d.text));
    }
    // Headroom 5 − 3.366 − 0.3 = 1.334 V is short of the 1.5 V margin: marginal, not failing.
    assert_eq!(mine[0].status, Status::Marginal, "{}", mine[0].text);
    assert_eq!(r.verdict, Status::Marginal);
    assert_eq!(r.first_failure.as_deref(), Some("3V3 LDO"));
    assert!(
        r.summary
            .contains("misses a wanted margin on 3V3 LDO headroom"),
        "{}",
        r.summary
    );
    // The 1.8 V LDO has no θJA and no rating: only its headroom is checked.
    let ids: Vec<_> = r
        .checks
        .iter()
        .filter(|c| c.rail == "1V8 LDO")
        .map(|c| c.id)
        .collect();
    assert_eq!(ids, [CheckId::Headroom]);
}

#[test]
fn a_resistive_dropout_follows_the_load_into_dropout() {
    // A MOS-pass LDO rated 0.5 V at 1 A (0.5 Ω) set to 3.3 V, fed 3.5 V, with 0.8 A: it needs
    // 3.3 + 0.4 = 3.7 V, so it sits in dropout at V_out = 3.5 − 0.5·0.8 = 3.1 V (R·I of the
    // resistive model, as on the linear page), and its headroom check fails.
    let input = TreeInput {
        source: SourceSpec {
            name: "Bus".into(),
            v_min: 3.5,
            v_nom: 3.5,
            v_max: 3.5,
            capacity_ah: None,
            capacity_wh: None,
            current_limit_a: None,
        },
        rails: vec![RailSpec {
            vout: Some(3.3),
            dropout_model: Some(DropoutModel::Resistive),
            dropout_v: Some(0.5),
            dropout_at_a: Some(1.0),
            ..rail("LDO", "Bus", RailKind::Linear)
        }],
        loads: vec![load("Load", "LDO", 0.8, 0.8)],
        ta_max: 25.0,
    };
    let r = check(&input).unwrap();
    near(r.corners[1].rails[0].vout, 3.1, 1e-12, "output in dropout");
    assert_eq!(r.checks[0].status, Status::Fail, "{}", r.checks[0].text);
    // At 0.3 A it needs 3.45 V and regulates.
    let mut light = input.clone();
    light.loads[0] = load("Load", "LDO", 0.3, 0.3);
    let r = check(&light).unwrap();
    near(r.corners[1].rails[0].vout, 3.3, 1e-12, "output regulating");
    assert_eq!(r.checks[0].status, Status::Pass, "{}", r.checks[0].text);
    // Without the rating current the resistive model has no resistance.
    let mut bad = input;
    bad.rails[0].dropout_at_a = None;
    let e = check(&bad).unwrap_err();
    assert!(e.message.starts_with("Rail \"LDO\""), "{}", e.message);
}

#[test]
fn a_switching_rail_estimated_from_its_parts_draws_what_the_estimate_says() {
    // The buck from its parts instead of 88 %: at every source voltage its input current is the
    // switching estimate's P_in / V_in at that V_in and the tree's load, and its checks are the
    // switching estimate's own for the tree's input range and peak load.
    let mut input = board();
    input.rails[2].efficiency_pct = None;
    input.rails[2].estimate = Some(buck_parts());
    let r = check(&input).unwrap();
    for (k, label) in [CornerLabel::Min, CornerLabel::Nom, CornerLabel::Max]
        .into_iter()
        .enumerate()
    {
        let c = &r.corners[k];
        let buck = &c.rails[2];
        let mut whole = buck_parts();
        (whole.vin_min, whole.vin_nom, whole.vin_max) = (10.8, 12.0, 14.4);
        whole.iout = buck.iout_a.peak;
        let valid = whole.validate().unwrap();
        for (iout, iin) in [
            (buck.iout_a.typ, buck.iin_a.typ),
            (buck.iout_a.peak, buck.iin_a.peak),
            (buck.iout_a.avg, buck.iin_a.avg),
        ] {
            let point = valid.point(label, c.vin, iout);
            near(iin, point.input_current_a, 1e-9, "buck input current");
        }
        // Energy still balances with the estimate's losses.
        near(
            c.source_w.avg,
            c.loads_w.avg + c.losses_w.avg,
            1e-9,
            "energy balance",
        );
    }
    let mut whole = buck_parts();
    (whole.vin_min, whole.vin_nom, whole.vin_max) = (10.8, 12.0, 14.4);
    whole.iout = r
        .corners
        .iter()
        .map(|c| c.rails[2].iout_a.peak)
        .fold(0.0, f64::max);
    let direct = switching::check_switching(&whole).unwrap();
    let mine: Vec<_> = r.checks.iter().filter(|c| c.rail == "5V0 buck").collect();
    let want = [
        CheckId::Duty,
        CheckId::OnTime,
        CheckId::Saturation,
        CheckId::Rating,
    ];
    assert_eq!(mine.iter().map(|c| c.id).collect::<Vec<_>>(), want);
    for (c, d) in mine.iter().zip(&direct.checks) {
        assert_eq!((c.status, &c.text), (d.status, &d.text));
    }
    // A buck whose parent cannot reach its output is refused by name; one without L too.
    let mut high = board();
    high.rails[2].vout = Some(15.0);
    high.rails[2].estimate = Some(buck_parts());
    let e = check(&high).unwrap_err();
    assert!(e.message.contains("a buck cannot give"), "{}", e.message);
    let mut no_l = board();
    no_l.rails[2].estimate = Some(SwitchingInput {
        inductance: None,
        ..buck_parts()
    });
    let e = check(&no_l).unwrap_err();
    assert!(e.message.contains("inductance"), "{}", e.message);
}

#[test]
fn checks_name_their_rail_and_capacity_in_watt_hours_gives_runtime() {
    let mut input = board();
    input.source.capacity_ah = None;
    input.source.capacity_wh = Some(84.0);
    let r = check(&input).unwrap();
    // Runtime from energy: 84 Wh over the average source power at the nominal voltage.
    near(
        r.runtime_h.unwrap(),
        84.0 / r.corners[1].source_w.avg,
        1e-12,
        "runtime from Wh",
    );
    for c in &r.checks {
        assert!(c.title.starts_with(&c.rail), "{} / {}", c.rail, c.title);
    }
    assert!(r
        .checks
        .iter()
        .any(|c| c.rail == "Battery" && c.id == CheckId::SourceLimit));
}
