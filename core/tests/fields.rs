//! The input readers: each input type reads its fields by name from any `FieldSource`.
//! The source here is a plain list of keys and values; the wasm crate's JS-object source is
//! checked through the bindings (wasm/tests/web.rs) and the browser tests.

use railnote_core::fields::{FieldSource, ReadError};
use railnote_core::linear::{DropoutModel, LinearInput};
use railnote_core::thermal::{HeatPath, ThermalInput};

#[derive(Clone, Debug)]
enum V {
    N(f64),
    T(&'static str),
    L(Vec<Vec<(&'static str, V)>>),
}

struct Source {
    entries: Vec<(&'static str, V)>,
    path: String,
}

impl FieldSource for Source {
    fn number(&mut self, key: &'static str) -> Result<Option<f64>, ReadError> {
        match self.entries.iter().find(|(k, _)| *k == key) {
            None => Ok(None),
            Some((_, V::N(n))) => Ok(Some(*n)),
            Some(_) => Err(self.error(key, "expected a number".into())),
        }
    }
    fn text(&mut self, key: &'static str) -> Result<Option<String>, ReadError> {
        match self.entries.iter().find(|(k, _)| *k == key) {
            None => Ok(None),
            Some((_, V::T(t))) => Ok(Some(t.to_string())),
            Some(_) => Err(self.error(key, "expected text".into())),
        }
    }
    fn each_object(
        &mut self,
        key: &'static str,
        item: &mut dyn FnMut(&mut dyn FieldSource) -> Result<(), ReadError>,
    ) -> Result<(), ReadError> {
        let Some((_, V::L(items))) = self.entries.iter().find(|(k, _)| *k == key).cloned() else {
            return Ok(());
        };
        for (i, entries) in items.into_iter().enumerate() {
            item(&mut Source {
                entries,
                path: format!("{key}[{i}]"),
            })?;
        }
        Ok(())
    }
    fn error(&self, key: &str, message: String) -> ReadError {
        let field = if self.path.is_empty() {
            key.to_string()
        } else {
            format!("{}.{key}", self.path)
        };
        ReadError { field, message }
    }
}

fn linear_entries() -> Vec<(&'static str, V)> {
    use V::*;
    vec![
        ("vinMin", N(4.85)),
        ("vinNom", N(5.0)),
        ("vinMax", N(5.15)),
        ("vout", N(3.3)),
        ("voutTolPct", N(2.0)),
        ("ioutMax", N(0.25)),
        ("ioutTyp", N(0.03)),
        ("iq", N(50e-6)),
        ("gndPct", N(1.0)),
        ("dropoutModel", T("classic")),
        ("dropoutV", N(0.3)),
        ("dropoutAtA", N(0.3)),
        ("ratedA", N(0.3)),
        ("thetaJa", N(100.0)),
        ("taMax", N(60.0)),
        ("tjMax", N(125.0)),
        ("headroomMarginV", N(0.3)),
        ("thermalMarginC", N(15.0)),
        ("inputBudgetA", N(0.5)),
    ]
}

fn read_linear(entries: Vec<(&'static str, V)>) -> Result<LinearInput, ReadError> {
    LinearInput::read(&mut Source {
        entries,
        path: String::new(),
    })
}

#[test]
fn linear_reads_every_field_by_its_name() {
    let x = read_linear(linear_entries()).expect("reads");
    assert_eq!(
        (x.vin_min, x.vin_max, x.thermal_margin_c),
        (4.85, 5.15, 15.0)
    );
    assert_eq!(x.dropout_model, DropoutModel::Classic);
    assert_eq!((x.eff_min_pct, x.input_budget_a), (None, Some(0.5)));
}

#[test]
fn linear_reading_errors_name_the_field() {
    let mut missing = linear_entries();
    missing.retain(|(k, _)| *k != "tjMax");
    let e = read_linear(missing).unwrap_err();
    assert_eq!(
        (e.field.as_str(), e.message.as_str()),
        ("tjMax", "a number is needed here")
    );

    let mut bad_choice = linear_entries();
    bad_choice[9].1 = V::T("quantum");
    let e = read_linear(bad_choice).unwrap_err();
    assert_eq!(e.field, "dropoutModel");
    assert_eq!(
        e.message,
        r#"expected one of "resistive", "constant", "classic""#
    );

    let mut wrong_type = linear_entries();
    wrong_type[0].1 = V::T("4.85 V");
    assert_eq!(read_linear(wrong_type).unwrap_err().field, "vinMin");
}

#[test]
fn thermal_reads_lists_and_counts() {
    use V::*;
    let stage = |r, tau| vec![("r", N(r)), ("tau", N(tau))];
    let mut entries = vec![
        ("powerW", N(0.49)),
        ("taMax", N(60.0)),
        ("taMin", N(-20.0)),
        ("tjMax", N(125.0)),
        ("marginC", N(15.0)),
        ("path", T("ja")),
        ("thetaJa", N(100.0)),
        ("foster", L(vec![stage(2.0, 1e-3), stage(98.0, 2.0)])),
        (
            "profile",
            L(vec![vec![("powerW", N(1.0)), ("durationS", N(0.02))]]),
        ),
        ("profilePeriods", N(7.0)),
    ];
    let read = |entries| {
        ThermalInput::read(&mut Source {
            entries,
            path: String::new(),
        })
    };
    let x = read(entries.clone()).expect("reads");
    assert_eq!(x.path, HeatPath::Ja);
    assert_eq!(x.foster.len(), 2);
    assert_eq!((x.foster[1].r, x.foster[1].tau), (98.0, 2.0));
    assert_eq!((x.profile[0].power_w, x.profile_periods), (1.0, Some(7)));
    // A stage's missing τ is named by its path; a fractional count is refused.
    entries[7].1 = L(vec![stage(2.0, 1e-3), vec![("r", N(98.0))]]);
    assert_eq!(read(entries.clone()).unwrap_err().field, "foster[1].tau");
    entries[7].1 = L(vec![]);
    entries[9].1 = N(2.5);
    let e = read(entries).unwrap_err();
    assert_eq!(
        (e.field.as_str(), e.message.as_str()),
        ("profilePeriods", "expected a whole number")
    );
}

fn switching_entries() -> Vec<(&'static str, V)> {
    use V::*;
    vec![
        ("topology", T("inverting")),
        ("rectifier", T("diode")),
        ("lightLoad", T("forcedContinuous")),
        ("vinMin", N(10.8)),
        ("vinNom", N(12.0)),
        ("vinMax", N(14.4)),
        ("vout", N(5.0)),
        ("iout", N(0.8)),
        ("fsw", N(500e3)),
        ("rippleRatioPct", N(30.0)),
        ("mainRdsOn", N(0.1)),
        ("diodeVf", N(0.45)),
        ("riseTime", N(10e-9)),
        ("fallTime", N(12e-9)),
        ("mainGateCharge", N(5e-9)),
        ("driveV", N(5.0)),
        ("cossCharge", N(3e-9)),
        ("dcr", N(0.05)),
        ("coreLoss", N(0.01)),
        ("iq", N(1e-3)),
        ("cout", N(22e-6)),
        ("esr", N(0.01)),
        ("minOnTime", N(100e-9)),
        ("maxDutyPct", N(90.0)),
    ]
}

#[test]
fn switching_and_comparison_read_every_field_by_its_name() {
    use railnote_core::compare::CompareInput;
    use railnote_core::switching::{LightLoad, Rectifier, SwitchingInput, Topology};
    use V::*;
    let read = |entries| {
        SwitchingInput::read(&mut Source {
            entries,
            path: String::new(),
        })
    };
    let x = read(switching_entries()).expect("reads");
    assert_eq!(
        (x.topology, x.rectifier, x.light_load),
        (
            Topology::Inverting,
            Rectifier::Diode,
            LightLoad::ForcedContinuous
        )
    );
    assert_eq!(
        (x.vin_max, x.fall_time, x.max_duty_pct),
        (14.4, 12e-9, 90.0)
    );
    assert_eq!((x.inductance, x.ripple_ratio_pct), (None, Some(30.0)));
    assert_eq!((x.diode_vf, x.rect_rds_on), (Some(0.45), None));
    assert_eq!((x.coss_charge, x.coss, x.isat), (Some(3e-9), None, None));

    let mut missing = switching_entries();
    missing.retain(|(k, _)| *k != "esr");
    let e = read(missing).unwrap_err();
    assert_eq!(
        (e.field.as_str(), e.message.as_str()),
        ("esr", "a number is needed here")
    );
    let mut bad = switching_entries();
    bad[2].1 = T("sometimes");
    let e = read(bad).unwrap_err();
    assert_eq!(e.field, "lightLoad");
    assert!(e.message.contains(r#""discontinuousAllowed""#));

    // The comparison reads every switching key plus its own.
    let mut entries = switching_entries();
    entries.extend([
        ("taMax", N(60.0)),
        ("tjMax", N(125.0)),
        ("swThetaJa", N(40.0)),
        ("thermalMarginC", N(10.0)),
        ("ldoIq", N(1e-4)),
        ("ldoGndPct", N(1.0)),
        ("ldoDropoutModel", T("constant")),
        ("ldoDropoutV", N(0.3)),
        ("ldoDropoutAtA", N(1.0)),
        ("ldoRatedA", N(1.0)),
        ("ldoThetaJa", N(25.0)),
    ]);
    let c = CompareInput::read(&mut Source {
        entries: entries.clone(),
        path: String::new(),
    })
    .expect("reads");
    assert_eq!(c.switching, x);
    assert_eq!((c.sw_theta_ja, c.ldo_theta_ja), (40.0, 25.0));
    assert_eq!((c.thermal_margin_c, c.vout_tol_pct), (Some(10.0), None));
    assert_eq!(c.ldo_dropout_model, DropoutModel::Constant);
    entries.retain(|(k, _)| *k != "ldoRatedA");
    let e = CompareInput::read(&mut Source {
        entries,
        path: String::new(),
    })
    .unwrap_err();
    assert_eq!(e.field, "ldoRatedA");
}

#[test]
fn tree_reads_its_lists_and_refuses_a_newer_version() {
    use railnote_core::tree::{RailKind, TreeInput};
    use V::*;
    let entries = |version: f64| {
        vec![
            ("version", N(version)),
            ("taMax", N(60.0)),
            (
                "sources",
                L(vec![vec![
                    ("name", T("Battery")),
                    ("vMin", N(10.8)),
                    ("vNom", N(12.0)),
                    ("vMax", N(14.4)),
                    ("capacityMah", N(7000.0)),
                ]]),
            ),
            (
                "rails",
                L(vec![vec![
                    ("name", T("3V3")),
                    ("parent", T("Battery")),
                    ("kind", T("linear")),
                    ("vout", N(3.3)),
                ]]),
            ),
            (
                "loads",
                L(vec![vec![
                    ("name", T("MCU")),
                    ("rail", T("3V3")),
                    ("typA", N(0.03)),
                    ("peakA", N(0.25)),
                ]]),
            ),
        ]
    };
    let read = |entries| {
        TreeInput::read(&mut Source {
            entries,
            path: String::new(),
        })
    };
    let x = read(entries(1.0)).expect("reads");
    assert_eq!(x.source.name, "Battery");
    // Version 1 gave the capacity in mAh; it is read as ampere-hours.
    assert_eq!(x.source.capacity_ah, Some(7.0));
    assert_eq!(x.rails[0].kind, RailKind::Linear);
    assert_eq!(
        (x.loads[0].typ_a, x.loads[0].peak_a),
        (Some(0.03), Some(0.25))
    );
    assert_eq!(read(entries(3.0)).unwrap_err().field, "version");
    let mut no_name = entries(1.0);
    no_name[3].1 = L(vec![vec![("parent", T("Battery")), ("kind", T("switch"))]]);
    assert_eq!(read(no_name).unwrap_err().field, "rails[0].name");
}
