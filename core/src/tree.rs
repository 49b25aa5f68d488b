//! The rail tree: a source feeding rails feeding rails and loads, computed from the leaves up at
//! the source's lowest, nominal and highest voltage.
//!
//! # Method
//!
//! Every rail takes its input from its parent (the source or another rail) and gives an output
//! voltage: a linear regulator its set voltage (or less, in dropout: V_in − V_do), a switching
//! regulator its set voltage, a plain switch its input less I·R_on. Currents go the other way: a
//! rail's output current is the sum of its loads' and its child rails' input currents
//! (Kirchhoff's current law at the rail), and its input current is
//!
//! - linear: I_out + I_q + k·I_out (the pass element carries the load current; the ground
//!   current adds I_q and a share k of the load, as in the linear rail check);
//! - switching, fixed efficiency η: V_out·I_out / (η·V_in) + I_q;
//! - switching, through the switching estimate (the rail carries its parts: topology, f_sw, L,
//!   switches, inductor, capacitor): P_in / V_in of the estimate's operating point at that V_in
//!   and I_out, which counts the controller's I_q among its losses;
//! - plain switch: I_out.
//!
//! A load draws a current, or a power P (then I = P / V at its rail). Because a switch's drop and
//! a power load's current depend on each other, voltages (top down) and currents (bottom up) are
//! alternated until they agree to 1e-12, at most 100 rounds. Each rail's loss is its input power
//! less its output power, so the source's power equals the loads' power plus every rail's loss
//! (conservation of energy, checked on random trees by a property test).
//!
//! Three load cases: typical (every load at its typical draw), peak (every load at its peak) and
//! average (each load at its typical draw for its activity fraction and at its sleep current the
//! rest of the time).
//!
//! Checks. Once the tree is solved, every linear rail goes through the linear rail check
//! ([`crate::linear::check`]) with what the tree found: its input at the source's lowest, nominal
//! and highest voltage (peak case), its largest peak output current and its typical output
//! current at the nominal voltage, and the rail's own dropout model, ground current, output
//! tolerance, margins, θJA and limits. So headroom, junction temperature and rating are graded
//! exactly as on the linear page, margins and "marginal" included. A rail estimated from its parts
//! goes through the switching estimate ([`crate::switching::check_switching`]) the same way, for
//! its duty, on-time and saturation checks. Every other rail with a θJA gets
//! T_j = T_a + θJA·P at peak load and the highest source voltage (JEDEC JESD51-2A's
//! junction-to-ambient relation, as in the thermal path calculator), and a rating check when
//! rated. Battery runtime is the capacity over the average current (Ah) or the average power (Wh)
//! at the nominal voltage.
//!
//! A check the rail gives no figures for is not made: a linear rail without θJA has no junction
//! check, one without a rating no current check (the linear check is run with neutral values for
//! them, and those checks are left out).
//!
//! # Assumptions
//!
//! Regulators start and stay up (no start-up surge, no undervoltage lockout); a fixed efficiency
//! is the same at every load; a switching rail keeps its set output even where its estimate runs
//! out of duty (the duty check then fails); the peaks of all loads coincide, which errs on the
//! safe side.
//!
//! # Sources
//!
//! Kirchhoff's current law and conservation of energy; JESD51-2A for θJA. Runtime as capacity
//! over average current: common practice (it ignores the capacity's fall at high discharge rates
//! and low temperature; derate it from the battery's datasheet).

use crate::error::check::figure as show;
use crate::error::{check, InputError};
use crate::fields::{numbers, optional_choice, FieldSource, ReadError};
use crate::linear::{DropoutModel, LinearInput};
use crate::switching::{CornerLabel, SwitchingInput, Topology, ValidSwitching};
use crate::units::QuantityKind;
use crate::verdict::{overall, Status};
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

/// The most rails and loads one tree may hold: far beyond any board, small enough that a pasted
/// document cannot make the page spin.
pub const MAX_RAILS: usize = 500;
pub const MAX_LOADS: usize = 2000;
/// The newest version of the tree document [`TreeInput::read`] reads. Version 1 is read too:
/// it gave the capacity as `capacityMah` (mAh) and had no per-rail linear details or estimates.
pub const SCHEMA_VERSION: u32 = 2;
/// Rounds of the voltage–current alternation.
const MAX_ROUNDS: usize = 100;

/// What a rail is.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum RailKind {
    Linear,
    Switching,
    Switch,
}

/// The source: a battery, an adapter, a bus.
#[derive(Clone, Debug, PartialEq)]
pub struct SourceSpec {
    pub name: String,
    pub v_min: f64,
    pub v_nom: f64,
    pub v_max: f64,
    /// Charge capacity, ampere-hours (document key `capacityAh`; version 1's `capacityMah` is
    /// read into it).
    pub capacity_ah: Option<f64>,
    pub capacity_wh: Option<f64>,
    pub current_limit_a: Option<f64>,
}

/// One rail. Fields a kind does not use are `None`.
#[derive(Clone, Debug, PartialEq)]
pub struct RailSpec {
    pub name: String,
    pub parent: String,
    pub kind: RailKind,
    /// Set output voltage (linear, switching).
    pub vout: Option<f64>,
    /// Fixed efficiency, percent (switching).
    pub efficiency_pct: Option<f64>,
    /// Quiescent current drawn at the input (linear, switching).
    pub iq: Option<f64>,
    /// Dropout voltage (linear).
    pub dropout_v: Option<f64>,
    /// On-resistance (switch).
    pub r_on: Option<f64>,
    /// θJA of the part, if its temperature is to be checked.
    pub theta_ja: Option<f64>,
    pub tj_max: Option<f64>,
    /// Rated output current, if it is to be checked.
    pub rated_a: Option<f64>,
    /// Linear: how the dropout depends on load (default constant).
    pub dropout_model: Option<DropoutModel>,
    /// Linear, resistive model: the current the dropout is rated at.
    pub dropout_at_a: Option<f64>,
    /// Linear: ground current that grows with the load, percent of it (default 0).
    pub gnd_pct: Option<f64>,
    /// Linear: the output's ± tolerance, percent (default 0).
    pub vout_tol_pct: Option<f64>,
    /// Linear: the headroom and junction margins wanted (default 0).
    pub headroom_margin_v: Option<f64>,
    pub thermal_margin_c: Option<f64>,
    /// Switching: estimated from its parts instead of a fixed efficiency (document key
    /// `efficiencyFrom: "estimate"` and the switching estimate's own keys on the rail). Its
    /// input voltages and load are placeholders here; the tree supplies them.
    pub estimate: Option<SwitchingInput>,
}

impl RailSpec {
    /// A rail with only its name, parent and kind; every figure absent.
    pub fn new(name: &str, parent: &str, kind: RailKind) -> RailSpec {
        RailSpec {
            name: String::from(name),
            parent: String::from(parent),
            kind,
            vout: None,
            efficiency_pct: None,
            iq: None,
            dropout_v: None,
            r_on: None,
            theta_ja: None,
            tj_max: None,
            rated_a: None,
            dropout_model: None,
            dropout_at_a: None,
            gnd_pct: None,
            vout_tol_pct: None,
            headroom_margin_v: None,
            thermal_margin_c: None,
            estimate: None,
        }
    }
}

/// A rail's fields as the switching estimate reads them: the rail's own keys (`vout`, `iq`,
/// `fsw`, `inductance`, …), with the input voltages and the load, which the tree supplies,
/// standing in as 1 until the tree is solved.
struct EstimateKeys<'a> {
    rail: &'a mut dyn FieldSource,
}

impl FieldSource for EstimateKeys<'_> {
    fn number(&mut self, key: &'static str) -> Result<Option<f64>, ReadError> {
        match key {
            "vinMin" | "vinNom" | "vinMax" | "iout" => Ok(Some(1.0)),
            "iq" => Ok(Some(self.rail.number("iq")?.unwrap_or(0.0))),
            _ => self.rail.number(key),
        }
    }
    fn text(&mut self, key: &'static str) -> Result<Option<String>, ReadError> {
        self.rail.text(key)
    }
    fn each_object(
        &mut self,
        key: &'static str,
        item: &mut dyn FnMut(&mut dyn FieldSource) -> Result<(), ReadError>,
    ) -> Result<(), ReadError> {
        self.rail.each_object(key, item)
    }
    fn error(&self, key: &str, message: String) -> ReadError {
        self.rail.error(key, message)
    }
}

/// One load on a rail (or on the source).
#[derive(Clone, Debug, PartialEq)]
pub struct LoadSpec {
    pub name: String,
    pub rail: String,
    pub typ_a: Option<f64>,
    pub peak_a: Option<f64>,
    pub typ_w: Option<f64>,
    pub peak_w: Option<f64>,
    /// Share of the time at the typical draw, percent (default 100).
    pub activity_pct: Option<f64>,
    /// Draw the rest of the time (default nothing).
    pub sleep_a: Option<f64>,
}

/// The whole tree.
#[derive(Clone, Debug, PartialEq)]
pub struct TreeInput {
    pub source: SourceSpec,
    pub rails: Vec<RailSpec>,
    pub loads: Vec<LoadSpec>,
    pub ta_max: f64,
}

fn name_of(f: &mut dyn FieldSource, key: &'static str) -> Result<String, ReadError> {
    f.text(key)?
        .ok_or_else(|| f.error(key, String::from("a name is needed here")))
}

impl TreeInput {
    /// Read the tree from named fields: `sources`, a list of exactly one {name, vMin, vNom,
    /// vMax, capacityMah, capacityWh, currentLimitA} (a list so that a later version of the
    /// document can carry several), `rails` [{name, parent, kind, vout, efficiencyPct, iq,
    /// dropoutV, rOn, thetaJa, tjMax, ratedA}], `loads` [{name, rail, typA, peakA, typW, peakW,
    /// activityPct, sleepA}], `taMax`.
    pub fn read(f: &mut dyn FieldSource) -> Result<TreeInput, ReadError> {
        // The document's schema version: 1 is the only one so far (and what a document without
        // the field is taken to be); a later version must migrate older documents here.
        let version = match crate::fields::count(f, "version")? {
            None | Some(1) => 1,
            Some(SCHEMA_VERSION) => SCHEMA_VERSION,
            Some(_) => {
                return Err(f.error(
                    "version",
                    String::from("this document is of a schema version this railnote does not know (it reads versions 1 and 2)"),
                ))
            }
        };
        // Version 1 gave the charge capacity in mAh; version 2 in Ah.
        let (capacity_key, capacity_per_ah) = if version == 1 {
            ("capacityMah", 1000.0)
        } else {
            ("capacityAh", 1.0)
        };
        let mut sources = Vec::new();
        f.each_object("sources", &mut |s| {
            let name = name_of(s, "name")?;
            let [v_min, v_nom, v_max, capacity_wh, current_limit_a] =
                numbers(s, &["vMin", "vNom", "vMax", "capacityWh", "currentLimitA"])?;
            // Divided, as the page's version 1 → 2 migration does, so both give the same double.
            let capacity_ah = s.number(capacity_key)?.map(|c| c / capacity_per_ah);
            let need = |s: &mut dyn FieldSource, key, v: Option<f64>| {
                v.ok_or_else(|| s.error(key, String::from("a number is needed here")))
            };
            sources.push(SourceSpec {
                name,
                v_min: need(s, "vMin", v_min)?,
                v_nom: need(s, "vNom", v_nom)?,
                v_max: need(s, "vMax", v_max)?,
                capacity_ah,
                capacity_wh,
                current_limit_a,
            });
            Ok(())
        })?;
        let mut rails = Vec::new();
        f.each_object("rails", &mut |r| {
            let name = name_of(r, "name")?;
            let parent = name_of(r, "parent")?;
            let kind = optional_choice(
                r,
                "kind",
                &[
                    ("linear", RailKind::Linear),
                    ("switching", RailKind::Switching),
                    ("switch", RailKind::Switch),
                ],
            )?
            .ok_or_else(|| {
                r.error(
                    "kind",
                    String::from("expected one of \"linear\", \"switching\", \"switch\""),
                )
            })?;
            let [vout, efficiency_pct, iq, dropout_v, r_on, theta_ja, tj_max, rated_a] = numbers(
                r,
                &[
                    "vout",
                    "efficiencyPct",
                    "iq",
                    "dropoutV",
                    "rOn",
                    "thetaJa",
                    "tjMax",
                    "ratedA",
                ],
            )?;
            let [dropout_at_a, gnd_pct, vout_tol_pct, headroom_margin_v, thermal_margin_c] =
                numbers(
                    r,
                    &[
                        "dropoutAtA",
                        "gndPct",
                        "voutTolPct",
                        "headroomMarginV",
                        "thermalMarginC",
                    ],
                )?;
            let dropout_model = optional_choice(
                r,
                "dropoutModel",
                &[
                    ("resistive", DropoutModel::Resistive),
                    ("constant", DropoutModel::Constant),
                    ("classic", DropoutModel::Classic),
                ],
            )?;
            let estimated =
                optional_choice(r, "efficiencyFrom", &[("fixed", false), ("estimate", true)])?
                    .unwrap_or(false);
            let estimate = if estimated && kind == RailKind::Switching {
                Some(SwitchingInput::read(&mut EstimateKeys { rail: r })?)
            } else {
                None
            };
            rails.push(RailSpec {
                name,
                parent,
                kind,
                vout,
                efficiency_pct,
                iq,
                dropout_v,
                r_on,
                theta_ja,
                tj_max,
                rated_a,
                dropout_model,
                dropout_at_a,
                gnd_pct,
                vout_tol_pct,
                headroom_margin_v,
                thermal_margin_c,
                estimate,
            });
            Ok(())
        })?;
        let mut loads = Vec::new();
        f.each_object("loads", &mut |l| {
            let name = name_of(l, "name")?;
            let rail = name_of(l, "rail")?;
            let [typ_a, peak_a, typ_w, peak_w, activity_pct, sleep_a] = numbers(
                l,
                &["typA", "peakA", "typW", "peakW", "activityPct", "sleepA"],
            )?;
            loads.push(LoadSpec {
                name,
                rail,
                typ_a,
                peak_a,
                typ_w,
                peak_w,
                activity_pct,
                sleep_a,
            });
            Ok(())
        })?;
        let source = match sources.len() {
            1 => sources.remove(0),
            _ => return Err(f.error("sources", String::from("exactly one source is needed"))),
        };
        let ta_max = f
            .number("taMax")?
            .ok_or_else(|| f.error("taMax", String::from("a number is needed here")))?;
        Ok(TreeInput {
            source,
            rails,
            loads,
            ta_max,
        })
    }
}

/// Which check a [`Check`] reports.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum CheckId {
    Headroom,
    Thermal,
    Rating,
    SourceLimit,
    /// A switching rail estimated from its parts: the switching estimate's checks.
    Duty,
    OnTime,
    Saturation,
}

/// One check of one rail (or the source), its outcome and the reason in words.
pub type Check = crate::verdict::Check<CheckId>;

/// A check as the report gives it: with the name of the rail (or the source) it is about.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct TreeCheck {
    pub rail: String,
    pub id: CheckId,
    pub title: String,
    pub status: crate::verdict::Status,
    pub text: String,
}

/// A load case's three figures.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Cases {
    pub typ: f64,
    pub peak: f64,
    pub avg: f64,
}

/// One rail at one source voltage.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct RailResult {
    pub name: String,
    /// Input and output voltage at peak load.
    pub vin: f64,
    pub vout: f64,
    pub iout_a: Cases,
    pub iin_a: Cases,
    pub loss_w: Cases,
}

/// One load at one source voltage.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct LoadResult {
    pub name: String,
    pub v: f64,
    pub i_a: Cases,
    pub p_w: Cases,
}

/// The tree at one source voltage.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct TreeCorner {
    pub vin: f64,
    pub source_a: Cases,
    pub source_w: Cases,
    pub loads_w: Cases,
    pub losses_w: Cases,
    /// Load power over source power, average case, percent.
    pub efficiency_pct: f64,
    pub rails: Vec<RailResult>,
    pub loads: Vec<LoadResult>,
}

/// Everything the tree check found.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct TreeReport {
    pub verdict: Status,
    pub summary: String,
    pub checks: Vec<TreeCheck>,
    /// The rail (or source) whose check fails first: the worst check, earliest in the tree.
    pub first_failure: Option<String>,
    /// At the source's lowest, nominal and highest voltage.
    pub corners: [TreeCorner; 3],
    /// Battery runtime at the nominal voltage and average load, hours.
    pub runtime_h: Option<f64>,
}

/// A [`TreeInput`] whose every value and link has been checked, rails in an order where every
/// parent comes before its children.
#[derive(Clone, Debug, PartialEq)]
pub struct ValidTree {
    input: TreeInput,
    /// Index into `input.rails`, parents first.
    order: Vec<usize>,
    /// For each rail, its parent's index (None: the source).
    parent: Vec<Option<usize>>,
    /// For each load, its rail's index (None: the source).
    load_rail: Vec<Option<usize>>,
    /// For each rail estimated from its parts, the checked estimate (input voltages and load
    /// are placeholders; [`ValidSwitching::point`] takes them per operating point).
    estimates: Vec<Option<ValidSwitching>>,
    /// The report, computed once in validation (which refuses a tree whose figures are not
    /// finite); `None` only while validating.
    report: Option<TreeReport>,
}

/// The switching estimate's fields as a rail's columns: its errors name the column
/// (`rails.fsw`), the sentence names the rail.
const ESTIMATE_COLUMNS: [(&str, &str); 26] = [
    ("vout", "rails.vout"),
    ("iq", "rails.iq"),
    ("topology", "rails.topology"),
    ("rectifier", "rails.rectifier"),
    ("lightLoad", "rails.lightLoad"),
    ("fsw", "rails.fsw"),
    ("inductance", "rails.inductance"),
    ("mainRdsOn", "rails.mainRdsOn"),
    ("rectRdsOn", "rails.rectRdsOn"),
    ("diodeVf", "rails.diodeVf"),
    ("riseTime", "rails.riseTime"),
    ("fallTime", "rails.fallTime"),
    ("mainGateCharge", "rails.mainGateCharge"),
    ("rectGateCharge", "rails.rectGateCharge"),
    ("driveV", "rails.driveV"),
    ("deadTime", "rails.deadTime"),
    ("bodyDiodeVf", "rails.bodyDiodeVf"),
    ("cossCharge", "rails.cossCharge"),
    ("coss", "rails.coss"),
    ("dcr", "rails.dcr"),
    ("coreLoss", "rails.coreLoss"),
    ("cout", "rails.cout"),
    ("esr", "rails.esr"),
    ("minOnTime", "rails.minOnTime"),
    ("maxDutyPct", "rails.maxDutyPct"),
    ("isat", "rails.isat"),
];

/// A value check's error, said of the rail: its field is the column (`rails.vout`, or for the
/// switching estimate's fields their column too), the sentence names the rail.
#[inline(never)]
fn on_rail(name: &str, e: InputError) -> InputError {
    let field = if e.field.starts_with("rails") {
        e.field
    } else {
        ESTIMATE_COLUMNS
            .iter()
            .find(|(k, _)| *k == e.field)
            .map_or("rails", |(_, c)| c)
    };
    rail_error_at(field, name, e.message)
}

/// An error about a rail as a whole (its name, parent, place in the tree).
#[inline(never)]
fn rail_error(name: &str, message: String) -> InputError {
    rail_error_at("rails", name, message)
}

#[inline(never)]
fn rail_error_at(field: &'static str, name: &str, message: String) -> InputError {
    let name: String = name.chars().take(40).collect();
    InputError::new(field, format!("Rail \"{name}\": {message}"))
}

impl TreeInput {
    /// Check every value and every link, and order the rails parents first.
    pub fn validate(&self) -> Result<ValidTree, InputError> {
        use QuantityKind::{
            BatteryCharge, Current, Energy, Percent, Power, Resistance, Temperature,
            TemperatureDifference, ThermalResistance, Voltage,
        };
        let s = &self.source;
        if s.name.trim().is_empty() {
            return Err(InputError::new(
                "sources[0].name",
                "The source needs a name",
            ));
        }
        let v_min = check::above(
            "sources[0].vMin",
            "The source's lowest voltage",
            s.v_min,
            0.0,
            Voltage,
        )?;
        let v_nom = check::finite(
            "sources[0].vNom",
            "The source's nominal voltage",
            s.v_nom,
            Voltage,
        )?;
        let v_max = check::finite(
            "sources[0].vMax",
            "The source's highest voltage",
            s.v_max,
            Voltage,
        )?;
        if !(v_min <= v_nom && v_nom <= v_max) {
            return Err(InputError::new(
                "sources[0].vNom",
                "The source's voltages must run lowest ≤ nominal ≤ highest",
            ));
        }
        if let Some(c) = s.capacity_ah {
            check::above(
                "sources[0].capacityAh",
                "The source's capacity",
                c,
                0.0,
                BatteryCharge,
            )?;
        }
        if let Some(c) = s.capacity_wh {
            check::above(
                "sources[0].capacityWh",
                "The source's capacity",
                c,
                0.0,
                Energy,
            )?;
        }
        if let Some(c) = s.current_limit_a {
            check::above(
                "sources[0].currentLimitA",
                "The source's current limit",
                c,
                0.0,
                Current,
            )?;
        }
        check::within(
            "taMax",
            "The hottest ambient",
            self.ta_max,
            -100.0,
            250.0,
            Temperature,
        )?;
        if self.rails.len() > MAX_RAILS || self.loads.len() > MAX_LOADS {
            return Err(InputError::new(
                "rails",
                format!("A tree holds at most {MAX_RAILS} rails and {MAX_LOADS} loads"),
            ));
        }
        // Names: the source and the rails are what rails and loads hang from, so they must be
        // unique among themselves; loads must be unique among loads.
        for (i, r) in self.rails.iter().enumerate() {
            if r.name.trim().is_empty() {
                return Err(InputError::new("rails", "Every rail needs a name"));
            }
            if r.name == s.name || self.rails[..i].iter().any(|o| o.name == r.name) {
                return Err(rail_error(&r.name, String::from("the name is used twice")));
            }
        }
        for (i, l) in self.loads.iter().enumerate() {
            if l.name.trim().is_empty() || self.loads[..i].iter().any(|o| o.name == l.name) {
                let name: String = l.name.chars().take(40).collect();
                return Err(InputError::new(
                    "loads",
                    format!("Load \"{name}\": every load needs a name of its own"),
                ));
            }
        }
        let index_of = |name: &str| -> Option<Option<usize>> {
            if name == s.name {
                Some(None)
            } else {
                self.rails.iter().position(|r| r.name == name).map(Some)
            }
        };
        let mut parent = Vec::with_capacity(self.rails.len());
        for r in &self.rails {
            let p = index_of(&r.parent).ok_or_else(|| {
                let p: String = r.parent.chars().take(40).collect();
                rail_error(
                    &r.name,
                    format!("its parent \"{p}\" is neither the source nor a rail"),
                )
            })?;
            parent.push(p);
        }
        let mut load_rail = Vec::with_capacity(self.loads.len());
        for l in &self.loads {
            let r = index_of(&l.rail).ok_or_else(|| {
                let (n, p): (String, String) = (
                    l.name.chars().take(40).collect(),
                    l.rail.chars().take(40).collect(),
                );
                InputError::new(
                    "loads",
                    format!("Load \"{n}\": its rail \"{p}\" is neither the source nor a rail"),
                )
            })?;
            load_rail.push(r);
        }
        // Parents first (Kahn's order); a rail never reached sits on a cycle.
        let mut order = Vec::with_capacity(self.rails.len());
        let mut placed = alloc::vec![false; self.rails.len()];
        loop {
            let before = order.len();
            for i in 0..self.rails.len() {
                if !placed[i] && parent[i].is_none_or(|p| placed[p]) {
                    placed[i] = true;
                    order.push(i);
                }
            }
            if order.len() == self.rails.len() {
                break;
            }
            if order.len() == before {
                let i = placed.iter().position(|p| !p).unwrap_or(0);
                return Err(rail_error(
                    &self.rails[i].name,
                    String::from("it feeds itself through its parents (a cycle)"),
                ));
            }
        }
        // Values, and the highest voltage each rail can give (for "below its own output").
        let mut highest = alloc::vec![0.0; self.rails.len()];
        let mut estimates = alloc::vec![None; self.rails.len()];
        for &i in &order {
            let r = &self.rails[i];
            let bad = |field, m: &str| rail_error_at(field, &r.name, String::from(m));
            let from = parent[i].map_or(v_max, |p| highest[p]);
            let positive = |field, v: Option<f64>, what: &str, kind| -> Result<f64, InputError> {
                let v =
                    v.ok_or_else(|| rail_error_at(field, &r.name, format!("{what} is needed")))?;
                check::above(field, what, v, 0.0, kind).map_err(|e| on_rail(&r.name, e))
            };
            match r.kind {
                RailKind::Linear => {
                    let vout = positive("rails.vout", r.vout, "V_out", Voltage)?;
                    if vout >= from {
                        return Err(rail_error_at(
                            "rails.vout",
                            &r.name,
                            format!(
                                "a linear regulator cannot give {} from a parent of at most {}",
                                show(vout, Voltage),
                                show(from, Voltage)
                            ),
                        ));
                    }
                    check::at_least(
                        "rails.dropoutV",
                        "V_do",
                        r.dropout_v.unwrap_or(0.0),
                        0.0,
                        Voltage,
                    )
                    .map_err(|e| on_rail(&r.name, e))?;
                    if r.dropout_model == Some(DropoutModel::Resistive) {
                        let at = r.dropout_at_a.ok_or_else(|| {
                            bad(
                                "rails.dropoutAtA",
                                "a resistive dropout needs the current it is rated at",
                            )
                        })?;
                        check::at_least(
                            "rails.dropoutAtA",
                            "The current the dropout is rated at",
                            at,
                            1e-9,
                            Current,
                        )
                        .map_err(|e| on_rail(&r.name, e))?;
                    }
                    let within = |field, v: Option<f64>, what: &str, to: f64| {
                        check::within(field, what, v.unwrap_or(0.0), 0.0, to, Percent)
                            .map_err(|e| on_rail(&r.name, e))
                    };
                    within(
                        "rails.gndPct",
                        r.gnd_pct,
                        "The load-dependent ground current",
                        50.0,
                    )?;
                    within(
                        "rails.voutTolPct",
                        r.vout_tol_pct,
                        "The V_out tolerance",
                        20.0,
                    )?;
                    check::at_least(
                        "rails.headroomMarginV",
                        "The headroom margin",
                        r.headroom_margin_v.unwrap_or(0.0),
                        0.0,
                        Voltage,
                    )
                    .map_err(|e| on_rail(&r.name, e))?;
                    check::at_least(
                        "rails.thermalMarginC",
                        "The thermal margin",
                        r.thermal_margin_c.unwrap_or(0.0),
                        0.0,
                        TemperatureDifference,
                    )
                    .map_err(|e| on_rail(&r.name, e))?;
                    highest[i] = vout;
                }
                RailKind::Switching => {
                    let vout = positive("rails.vout", r.vout, "V_out", Voltage)?;
                    highest[i] = vout;
                    match &r.estimate {
                        None => {
                            let eta = positive(
                                "rails.efficiencyPct",
                                r.efficiency_pct,
                                "The efficiency",
                                Percent,
                            )?;
                            // Below 1 % no converter runs, and the input current would be
                            // unbounded.
                            if !(1.0..=100.0).contains(&eta) {
                                return Err(bad(
                                    "rails.efficiencyPct",
                                    "the efficiency must be between 1 % and 100 %",
                                ));
                            }
                        }
                        Some(est) => {
                            if est.inductance.is_none() {
                                return Err(bad(
                                    "rails.inductance",
                                    "an estimate from parts needs the inductance L (the tree proposes none)",
                                ));
                            }
                            // Checked at the parent's highest voltage as a stand-in; a boost
                            // must stay above whatever its parent gives.
                            let boost = est.topology == Topology::Boost;
                            if boost && vout <= from {
                                return Err(rail_error_at(
                                    "rails.vout",
                                    &r.name,
                                    format!(
                                        "a boost cannot give {} from a parent that reaches {}",
                                        show(vout, Voltage),
                                        show(from, Voltage)
                                    ),
                                ));
                            }
                            if est.topology == Topology::Buck && vout >= from {
                                return Err(rail_error_at(
                                    "rails.vout",
                                    &r.name,
                                    format!(
                                        "a buck cannot give {} from a parent of at most {}",
                                        show(vout, Voltage),
                                        show(from, Voltage)
                                    ),
                                ));
                            }
                            let mut stand_in = est.clone();
                            stand_in.vin_min = from;
                            stand_in.vin_nom = from;
                            stand_in.vin_max = from;
                            stand_in.iout = 1.0;
                            let valid = stand_in.validate().map_err(|e| on_rail(&r.name, e))?;
                            estimates[i] = Some(valid);
                        }
                    }
                }
                RailKind::Switch => {
                    check::at_least("rails.rOn", "R_on", r.r_on.unwrap_or(0.0), 0.0, Resistance)
                        .map_err(|e| on_rail(&r.name, e))?;
                    highest[i] = from;
                }
            }
            check::at_least("rails.iq", "I_q", r.iq.unwrap_or(0.0), 0.0, Current)
                .map_err(|e| on_rail(&r.name, e))?;
            if let Some(t) = r.theta_ja {
                // The linear check's own floor: below 1 mK/W nothing on a board conducts heat.
                check::at_least("rails.thetaJa", "θJA", t, 1e-3, ThermalResistance)
                    .map_err(|e| on_rail(&r.name, e))?;
                let tj = r.tj_max.unwrap_or(125.0);
                check::within("rails.tjMax", "T_j,max", tj, -100.0, 250.0, Temperature)
                    .map_err(|e| on_rail(&r.name, e))?;
                if tj <= self.ta_max {
                    return Err(rail_error_at(
                        "rails.tjMax",
                        &r.name,
                        format!(
                            "T_j,max {} must be above the hottest ambient {}",
                            show(tj, Temperature),
                            show(self.ta_max, Temperature)
                        ),
                    ));
                }
            }
            if let Some(a) = r.rated_a {
                check::above("rails.ratedA", "The rated current", a, 0.0, Current)
                    .map_err(|e| on_rail(&r.name, e))?;
            }
        }
        for l in &self.loads {
            let name: String = l.name.chars().take(40).collect();
            let err =
                |e: InputError| InputError::new(e.field, format!("Load \"{name}\": {}", e.message));
            let currents = l.typ_a.is_some() || l.peak_a.is_some();
            let powers = l.typ_w.is_some() || l.peak_w.is_some();
            if currents == powers {
                return Err(err(InputError::new(
                    "loads.typA",
                    "give its typical and peak current, or its typical and peak power",
                )));
            }
            let (kind, typ, peak, typ_key, peak_key) = if currents {
                (Current, l.typ_a, l.peak_a, "loads.typA", "loads.peakA")
            } else {
                (Power, l.typ_w, l.peak_w, "loads.typW", "loads.peakW")
            };
            let typ = check::at_least(typ_key, "The typical draw", typ.unwrap_or(0.0), 0.0, kind)
                .map_err(err)?;
            let peak = check::at_least(peak_key, "The peak draw", peak.unwrap_or(typ), 0.0, kind)
                .map_err(err)?;
            if peak < typ {
                return Err(err(InputError::new(
                    peak_key,
                    "the peak draw must not be below the typical one",
                )));
            }
            check::within(
                "loads.activityPct",
                "The activity",
                l.activity_pct.unwrap_or(100.0),
                0.0,
                100.0,
                Percent,
            )
            .map_err(err)?;
            check::at_least(
                "loads.sleepA",
                "The sleep current",
                l.sleep_a.unwrap_or(0.0),
                0.0,
                Current,
            )
            .map_err(err)?;
        }
        let mut valid = ValidTree {
            input: self.clone(),
            order,
            parent,
            load_rail,
            estimates,
            report: None,
        };
        // Bounds on each value cannot keep a whole tree finite: currents multiply down nested
        // rails (200 rails in a row at 1 % need 10^400 times the load). So the tree is solved
        // here, and one whose figures are not finite is refused (found by fuzzing).
        let report = valid.compute();
        if crate::output::has_non_finite(&crate::output::ToOut::to_out(&report)) {
            return Err(InputError::new(
                "rails",
                "The currents through nested rails grow past any usable number: check the \
                 efficiencies, voltages and loads of the chain",
            ));
        }
        valid.report = Some(report);
        Ok(valid)
    }
}

/// Check and compute in one step.
pub fn check_tree(input: &TreeInput) -> Result<TreeReport, InputError> {
    Ok(input.validate()?.into_report())
}

/// A check about `name` (a rail or the source), titled "<name> <what>" ("3V3 LDO headroom").
#[inline(never)]
fn check_of(name: &str, id: CheckId, what: &str, status: Status, text: String) -> Check {
    Check {
        id,
        title: format!("{name} {what}"),
        status,
        text,
    }
}

/// Pass or fail, for the checks that know no margin.
fn passes(ok: bool) -> Status {
    if ok {
        Status::Pass
    } else {
        Status::Fail
    }
}

/// A linear rail's dropout at output current `i`, by its dropout model (as the linear check).
fn dropout_at(r: &RailSpec, i: f64) -> f64 {
    let v = r.dropout_v.unwrap_or(0.0);
    match r.dropout_model.unwrap_or(DropoutModel::Constant) {
        DropoutModel::Constant => v,
        DropoutModel::Classic => crate::linear::CLASSIC_DROPOUT_V,
        DropoutModel::Resistive => v * i / r.dropout_at_a.unwrap_or(1.0),
    }
}

/// Which load case.
#[derive(Clone, Copy, PartialEq)]
enum Case {
    Typ,
    Peak,
    Avg,
}

/// The tree solved for one source voltage and one load case.
struct Solved {
    v_out: Vec<f64>,
    v_in: Vec<f64>,
    i_out: Vec<f64>,
    i_in: Vec<f64>,
    load_v: Vec<f64>,
    load_i: Vec<f64>,
    source_i: f64,
}

impl ValidTree {
    pub fn input(&self) -> &TreeInput {
        &self.input
    }

    fn load_current(&self, k: usize, v: f64, case: Case) -> f64 {
        let l = &self.input.loads[k];
        let (typ, peak) = match (l.typ_a, l.peak_a) {
            (None, None) => {
                // Powers: the current at this voltage (nothing at a dead rail).
                let typ = l.typ_w.unwrap_or(0.0);
                let peak = l.peak_w.unwrap_or(typ);
                if v <= 0.0 {
                    return 0.0;
                }
                (typ / v, peak / v)
            }
            (typ, peak) => {
                let typ = typ.unwrap_or(0.0);
                (typ, peak.unwrap_or(typ))
            }
        };
        match case {
            Case::Typ => typ,
            Case::Peak => peak,
            Case::Avg => {
                let a = l.activity_pct.unwrap_or(100.0) / 100.0;
                a * typ + (1.0 - a) * l.sleep_a.unwrap_or(0.0)
            }
        }
    }

    fn solve(&self, vs: f64, case: Case) -> Solved {
        let n = self.input.rails.len();
        let mut s = Solved {
            v_out: alloc::vec![0.0; n],
            v_in: alloc::vec![0.0; n],
            i_out: alloc::vec![0.0; n],
            i_in: alloc::vec![0.0; n],
            load_v: alloc::vec![0.0; self.input.loads.len()],
            load_i: alloc::vec![0.0; self.input.loads.len()],
            source_i: 0.0,
        };
        for _ in 0..MAX_ROUNDS {
            // Voltages, top down, with the currents of the last round.
            for &i in &self.order {
                let r = &self.input.rails[i];
                let vin = self.parent[i].map_or(vs, |p| s.v_out[p]);
                s.v_in[i] = vin;
                s.v_out[i] = match r.kind {
                    RailKind::Linear => r
                        .vout
                        .unwrap_or(0.0)
                        .min(vin - dropout_at(r, s.i_out[i]))
                        .max(0.0),
                    RailKind::Switching => {
                        if vin > 0.0 {
                            r.vout.unwrap_or(0.0)
                        } else {
                            0.0
                        }
                    }
                    RailKind::Switch => (vin - s.i_out[i] * r.r_on.unwrap_or(0.0)).max(0.0),
                };
            }
            // Currents, bottom up.
            let mut i_out = alloc::vec![0.0; n];
            let mut source_i = 0.0;
            for k in 0..self.input.loads.len() {
                let v = self.load_rail[k].map_or(vs, |r| s.v_out[r]);
                let i = self.load_current(k, v, case);
                s.load_v[k] = v;
                s.load_i[k] = i;
                match self.load_rail[k] {
                    Some(r) => i_out[r] += i,
                    None => source_i += i,
                }
            }
            for &i in self.order.iter().rev() {
                let r = &self.input.rails[i];
                let iq = r.iq.unwrap_or(0.0);
                let vin = s.v_in[i];
                let iin = match r.kind {
                    RailKind::Linear => i_out[i] * (1.0 + r.gnd_pct.unwrap_or(0.0) / 100.0) + iq,
                    RailKind::Switching if vin > 0.0 && self.estimates[i].is_some() => {
                        let est = self.estimates[i].as_ref();
                        est.map_or(0.0, |e| {
                            e.point(CornerLabel::Nom, vin, i_out[i]).input_current_a
                        })
                    }
                    RailKind::Switching => {
                        if vin > 0.0 {
                            s.v_out[i] * i_out[i]
                                / (vin * r.efficiency_pct.unwrap_or(100.0) / 100.0)
                                + iq
                        } else {
                            0.0
                        }
                    }
                    RailKind::Switch => i_out[i],
                };
                s.i_in[i] = iin;
                match self.parent[i] {
                    Some(p) => i_out[p] += iin,
                    None => source_i += iin,
                }
            }
            let settled = i_out
                .iter()
                .zip(&s.i_out)
                .all(|(a, b)| libm::fabs(a - b) <= 1e-12 * libm::fabs(*a).max(1e-9))
                && libm::fabs(source_i - s.source_i) <= 1e-12 * libm::fabs(source_i).max(1e-9);
            s.i_out = i_out;
            s.source_i = source_i;
            if settled {
                break;
            }
        }
        s
    }

    fn corner(&self, vs: f64) -> (TreeCorner, Solved) {
        let typ = self.solve(vs, Case::Typ);
        let peak = self.solve(vs, Case::Peak);
        let avg = self.solve(vs, Case::Avg);
        let cases = |f: &dyn Fn(&Solved) -> f64| Cases {
            typ: f(&typ),
            peak: f(&peak),
            avg: f(&avg),
        };
        let rails = (0..self.input.rails.len())
            .map(|i| RailResult {
                name: self.input.rails[i].name.clone(),
                vin: peak.v_in[i],
                vout: peak.v_out[i],
                iout_a: cases(&|s| s.i_out[i]),
                iin_a: cases(&|s| s.i_in[i]),
                loss_w: cases(&|s| s.v_in[i] * s.i_in[i] - s.v_out[i] * s.i_out[i]),
            })
            .collect::<Vec<_>>();
        let loads = (0..self.input.loads.len())
            .map(|k| LoadResult {
                name: self.input.loads[k].name.clone(),
                v: peak.load_v[k],
                i_a: cases(&|s| s.load_i[k]),
                p_w: cases(&|s| s.load_v[k] * s.load_i[k]),
            })
            .collect::<Vec<_>>();
        let loads_w = cases(&|s| (0..s.load_i.len()).map(|k| s.load_v[k] * s.load_i[k]).sum());
        let losses_w = cases(&|s| {
            (0..s.i_in.len())
                .map(|i| s.v_in[i] * s.i_in[i] - s.v_out[i] * s.i_out[i])
                .sum()
        });
        let source_w = cases(&|s| vs * s.source_i);
        let corner = TreeCorner {
            vin: vs,
            source_a: cases(&|s| s.source_i),
            source_w,
            loads_w,
            losses_w,
            efficiency_pct: if source_w.avg > 0.0 {
                100.0 * loads_w.avg / source_w.avg
            } else {
                100.0
            },
            rails,
            loads,
        };
        (corner, peak)
    }

    /// A linear rail through the linear rail check, with the inputs and loads the tree found.
    /// Only the checks the rail has figures for are kept: headroom always, the junction with a
    /// θJA, the current with a rating.
    fn linear_checks(
        &self,
        r: &RailSpec,
        vins: [f64; 3],
        peak_out: f64,
        nominal: &RailResult,
        checks: &mut Vec<Check>,
    ) {
        use QuantityKind::Voltage;
        let vout = r.vout.unwrap_or(0.0);
        // Nothing on the rail: checked at 1 nA, which is no load for any regulator.
        let iout_max = peak_out.max(1e-9);
        let tj_max = r.tj_max.unwrap_or(125.0);
        let input = LinearInput {
            vin_min: vins[0],
            vin_nom: vins[1],
            vin_max: vins[2],
            vout,
            vout_tol_pct: r.vout_tol_pct.unwrap_or(0.0),
            iout_max,
            iout_typ: nominal.iout_a.typ.clamp(0.0, iout_max),
            iq: r.iq.unwrap_or(0.0),
            gnd_pct: r.gnd_pct.unwrap_or(0.0),
            dropout_model: r.dropout_model.unwrap_or(DropoutModel::Constant),
            dropout_v: r.dropout_v.unwrap_or(0.0),
            dropout_at_a: r.dropout_at_a.unwrap_or(1.0),
            // Neutral stand-ins for the checks not asked for (left out below).
            rated_a: r.rated_a.unwrap_or(1e6),
            theta_ja: r.theta_ja.unwrap_or(1e-3),
            ta_max: self.input.ta_max,
            tj_max: if r.theta_ja.is_some() {
                tj_max
            } else {
                self.input.ta_max + 1000.0
            },
            headroom_margin_v: r.headroom_margin_v.unwrap_or(0.0),
            thermal_margin_c: r.thermal_margin_c.unwrap_or(0.0),
            eff_min_pct: None,
            input_budget_a: None,
        };
        match crate::linear::check(&input) {
            Ok(report) => {
                for c in report.checks {
                    let (id, word) = match c.id {
                        crate::linear::CheckId::Headroom => (CheckId::Headroom, "headroom"),
                        crate::linear::CheckId::Thermal if r.theta_ja.is_some() => {
                            (CheckId::Thermal, "junction")
                        }
                        crate::linear::CheckId::Rating if r.rated_a.is_some() => {
                            (CheckId::Rating, "current")
                        }
                        _ => continue,
                    };
                    checks.push(check_of(&r.name, id, word, c.status, c.text));
                }
            }
            // The refusal left once the rail's own values were checked: its input falls to its
            // output or below (a parent in dropout, a switch dropping too much).
            Err(e) => checks.push(check_of(
                &r.name,
                CheckId::Headroom,
                "headroom",
                Status::Fail,
                if vins[0] <= vout {
                    format!(
                        "Its input falls to {} at the source's lowest voltage, not above V_out \
                         {}: it cannot regulate",
                        show(vins[0], Voltage),
                        show(vout, Voltage)
                    )
                } else {
                    format!(
                        "The linear rail check refused the figures the tree gives it: {}",
                        e.message
                    )
                },
            )),
        }
    }

    /// A switching rail estimated from its parts, through the switching estimate with the
    /// inputs and the peak load the tree found: its duty, on-time and saturation checks.
    fn estimate_checks(
        &self,
        r: &RailSpec,
        vins: [f64; 3],
        peak_out: f64,
        checks: &mut Vec<Check>,
    ) {
        let Some(est) = &r.estimate else { return };
        let mut input = est.clone();
        (input.vin_min, input.vin_nom, input.vin_max) = (vins[0], vins[1], vins[2]);
        input.iout = peak_out.max(1e-9);
        match crate::switching::check_switching(&input) {
            Ok(report) => {
                for c in report.checks {
                    let (id, word) = match c.id {
                        crate::switching::CheckId::Duty => (CheckId::Duty, "duty"),
                        crate::switching::CheckId::OnTime => (CheckId::OnTime, "on-time"),
                        crate::switching::CheckId::Saturation => {
                            (CheckId::Saturation, "saturation")
                        }
                    };
                    checks.push(check_of(&r.name, id, word, c.status, c.text));
                }
            }
            // A parent that falls below a buck's output (or rises above a boost's).
            Err(e) => checks.push(check_of(
                &r.name,
                CheckId::Duty,
                "duty",
                Status::Fail,
                format!(
                    "With the inputs the tree gives it, it cannot regulate: {}",
                    e.message
                ),
            )),
        }
    }

    /// The report, without a copy.
    pub fn into_report(self) -> TreeReport {
        match self.report {
            Some(r) => r,
            None => self.compute(),
        }
    }

    /// The report (computed and checked finite in validation); cannot fail.
    pub fn report(&self) -> TreeReport {
        match &self.report {
            Some(r) => r.clone(),
            None => self.compute(),
        }
    }

    fn compute(&self) -> TreeReport {
        use QuantityKind::{Current, Temperature, TemperatureDifference, Voltage};
        let s = &self.input.source;
        let (low, _) = self.corner(s.v_min);
        let (nom, _) = self.corner(s.v_nom);
        let (high, high_peak) = self.corner(s.v_max);
        let mut checks = Vec::new();
        let mut owners = Vec::new();
        for &i in &self.order {
            let r = &self.input.rails[i];
            fn at(c: &TreeCorner, i: usize) -> &RailResult {
                &c.rails[i]
            }
            let peak_out = at(&low, i)
                .iout_a
                .peak
                .max(at(&nom, i).iout_a.peak)
                .max(at(&high, i).iout_a.peak);
            // The input at the three source voltages, lowest first (a rail's input rises with
            // the source's, but sort rather than assume it).
            let mut vins = [at(&low, i).vin, at(&nom, i).vin, at(&high, i).vin];
            vins.sort_by(f64::total_cmp);
            match r.kind {
                RailKind::Linear => self.linear_checks(r, vins, peak_out, at(&nom, i), &mut checks),
                RailKind::Switching if r.estimate.is_some() => {
                    self.estimate_checks(r, vins, peak_out, &mut checks)
                }
                _ => {}
            }
            let generic = r.kind != RailKind::Linear;
            if let (Some(theta), true) = (r.theta_ja, generic) {
                let p =
                    high_peak.v_in[i] * high_peak.i_in[i] - high_peak.v_out[i] * high_peak.i_out[i];
                let tj = self.input.ta_max + theta * p;
                let limit = r.tj_max.unwrap_or(125.0);
                checks.push(check_of(
                    &r.name,
                    CheckId::Thermal,
                    "junction",
                    passes(tj <= limit),
                    format!(
                        "{} at peak load, the highest source voltage and {} ambient: T_j {} \
                         against {} ({} {})",
                        show(p, QuantityKind::Power),
                        show(self.input.ta_max, Temperature),
                        show(tj, Temperature),
                        show(limit, Temperature),
                        show(libm::fabs(limit - tj), TemperatureDifference),
                        if tj <= limit { "to spare" } else { "over" }
                    ),
                ));
            }
            if let (Some(rated), true) = (r.rated_a, generic) {
                checks.push(check_of(
                    &r.name,
                    CheckId::Rating,
                    "current",
                    passes(peak_out <= rated),
                    format!(
                        "Peak output {} against its rating {}",
                        show(peak_out, Current),
                        show(rated, Current)
                    ),
                ));
            }
            owners.resize(checks.len(), i);
        }
        if let Some(limit) = s.current_limit_a {
            let peak = low.source_a.peak.max(high.source_a.peak);
            checks.push(check_of(
                &s.name,
                CheckId::SourceLimit,
                "current",
                passes(peak <= limit),
                format!(
                    "Peak draw {} against the limit {}",
                    show(peak, Current),
                    show(limit, Current)
                ),
            ));
            owners.push(usize::MAX);
        }
        let verdict = overall(&checks);
        let first_failure = checks
            .iter()
            .zip(&owners)
            .find(|(c, _)| c.status == verdict && verdict != Status::Pass)
            .map(|(_, &o)| {
                if o == usize::MAX {
                    s.name.clone()
                } else {
                    self.input.rails[o].name.clone()
                }
            });
        let runtime_h = match (s.capacity_ah, s.capacity_wh) {
            (Some(ah), _) if nom.source_a.avg > 0.0 => Some(ah / nom.source_a.avg),
            (_, Some(wh)) if nom.source_w.avg > 0.0 => Some(wh / nom.source_w.avg),
            _ => None,
        };
        let summary = match verdict {
            Status::Pass => format!(
                "Every rail passes; the source gives {} on average at {}",
                show(nom.source_w.avg, QuantityKind::Power),
                show(s.v_nom, Voltage)
            ),
            // Titles carry the rails' own names, so they are joined as typed (the shared
            // `titles_with` lowers them for the calculators' fixed titles).
            _ => format!(
                "{} {}; {}: {}",
                if verdict == Status::Fail {
                    "Fails on"
                } else {
                    "Works, but misses a wanted margin on"
                },
                checks
                    .iter()
                    .filter(|c| c.status == verdict)
                    .map(|c| c.title.as_str())
                    .collect::<Vec<_>>()
                    .join(", "),
                if verdict == Status::Fail {
                    "first to fail"
                } else {
                    "first short of its margin"
                },
                first_failure.clone().unwrap_or_default()
            ),
        };
        let checks = checks
            .into_iter()
            .zip(owners)
            .map(|(c, o)| TreeCheck {
                rail: if o == usize::MAX {
                    s.name.clone()
                } else {
                    self.input.rails[o].name.clone()
                },
                id: c.id,
                title: c.title,
                status: c.status,
                text: c.text,
            })
            .collect();
        TreeReport {
            verdict,
            summary,
            checks,
            first_failure,
            corners: [low, nom, high],
            runtime_h,
        }
    }
}

mod out {
    use super::*;
    use crate::output::{out_object, out_words, Out, ToOut};

    out_words!(CheckId {
        Headroom => "headroom",
        Thermal => "thermal",
        Rating => "rating",
        SourceLimit => "sourceLimit",
        Duty => "duty",
        OnTime => "onTime",
        Saturation => "saturation",
    });

    impl ToOut for TreeCheck {
        fn to_out(&self) -> Out {
            out_object! {
                "rail": self.rail,
                "id": self.id,
                "title": self.title,
                "status": self.status,
                "text": self.text,
            }
        }
    }

    impl ToOut for Cases {
        fn to_out(&self) -> Out {
            out_object! { "typ": self.typ, "peak": self.peak, "avg": self.avg }
        }
    }

    impl ToOut for RailResult {
        fn to_out(&self) -> Out {
            out_object! {
                "name": self.name,
                "vin": self.vin,
                "vout": self.vout,
                "ioutA": self.iout_a,
                "iinA": self.iin_a,
                "lossW": self.loss_w,
            }
        }
    }

    impl ToOut for LoadResult {
        fn to_out(&self) -> Out {
            out_object! { "name": self.name, "v": self.v, "iA": self.i_a, "pW": self.p_w }
        }
    }

    impl ToOut for TreeCorner {
        fn to_out(&self) -> Out {
            out_object! {
                "vin": self.vin,
                "sourceA": self.source_a,
                "sourceW": self.source_w,
                "loadsW": self.loads_w,
                "lossesW": self.losses_w,
                "efficiencyPct": self.efficiency_pct,
                "rails": self.rails,
                "loads": self.loads,
            }
        }
    }

    impl ToOut for TreeReport {
        fn to_out(&self) -> Out {
            out_object! {
                "verdict": self.verdict,
                "summary": self.summary,
                "checks": self.checks,
                "firstFailure": self.first_failure,
                "corners": self.corners,
                "runtimeH": self.runtime_h,
            }
        }
    }
}
