//! The linear rail check: does a linear regulator keep regulating, stay cool enough, waste
//! little enough and draw what its supply can give, in the worst case?
//!
//! # Method
//!
//! A linear regulator passes the load current through a pass element and drops the difference
//! between input and output across it. With load current I_out, ground current
//! I_gnd = I_q + k·I_out (quiescent current plus a fraction k of the load, which covers the drive
//! of a bipolar pass element or a load-dependent bias):
//!
//! - pass dissipation P_pass = (V_in − V_out)·I_out
//! - ground-current dissipation P_gnd = V_in·I_gnd
//! - input current I_in = I_out + I_gnd, input power P_in = V_in·I_in = P_out + P_pass + P_gnd
//! - efficiency η = V_out·I_out / (V_in·(I_out + I_gnd))
//! - junction temperature T_j = T_a + θJA·(P_pass + P_gnd)
//! - headroom margin V_in,min − V_out,max − V_do(I_out,max)
//!
//! Dropout V_do(I) follows one of two models. A MOS pass element in dropout is a resistance, so
//! V_do scales with current: V_do(I) = V_do,rated·I / I_rated. A bipolar pass element saturates
//! at a roughly constant voltage. A preset covers the classic three-terminal regulators that want
//! about 2 V of headroom (common practice: the usual figure for those parts, not a datasheet
//! value).
//!
//! The worst case takes each corner where it hurts: headroom at the lowest input, the highest
//! output (V_out·(1 + tol)) and the highest load; heat at the highest input, the lowest output
//! (V_out·(1 − tol), which drops most across the pass element), the highest load and the hottest
//! ambient. The solved-back limits invert those same relations exactly (they are linear in I_out
//! and in V_in), so a limit put back into the check lands on the limit.
//!
//! # Assumptions
//!
//! Steady state; θJA is the single junction-to-ambient figure for the board as built (its value
//! depends on copper area and airflow, so it belongs to the board, not only to the package);
//! dropout and ground current do not change with temperature; the regulator regulates whenever
//! the headroom is positive. Pulsed loads are judged at their peak as if it were continuous,
//! which errs on the hot side.
//!
//! # Sources
//!
//! θJA and T_j = T_a + θJA·P: JEDEC JESD51-2A (natural convection, still air) definitions of the
//! junction-to-ambient thermal resistance. The dissipation and efficiency relations follow from
//! conservation of energy and Kirchhoff's current law at the regulator.

use crate::error::check::figure as show;
use crate::error::{check, InputError};
use crate::fields::{choice, numbers, required_numbers, FieldSource, ReadError};
use crate::units::QuantityKind;
pub use crate::verdict::Status;
use crate::verdict::{grade, overall, titles_with};
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

/// The classic three-terminal regulator's dropout used by [`DropoutModel::Classic`]: about 2 V
/// (common practice).
pub const CLASSIC_DROPOUT_V: f64 = 2.0;

/// Points sampled along the thermal boundary of the operating-window plot.
const WINDOW_SAMPLES: usize = 40;

/// How dropout depends on load current.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DropoutModel {
    /// MOS pass element: V_do = dropout_v · I / dropout_at_a.
    Resistive,
    /// Bipolar pass element: V_do = dropout_v whatever the current.
    Constant,
    /// Classic three-terminal regulator: constant [`CLASSIC_DROPOUT_V`]; `dropout_v` is ignored.
    Classic,
}

/// What the engineer knows about the rail. Voltages in V, currents in A, temperatures in °C,
/// θJA in K/W, percentages as numbers of percent. Read from named fields by
/// [`LinearInput::read`]; the names are the camelCase forms of these.
#[derive(Clone, Debug, PartialEq)]
pub struct LinearInput {
    pub vin_min: f64,
    pub vin_nom: f64,
    pub vin_max: f64,
    pub vout: f64,
    /// Output tolerance, ± percent.
    pub vout_tol_pct: f64,
    pub iout_max: f64,
    pub iout_typ: f64,
    /// Quiescent (ground) current with no load.
    pub iq: f64,
    /// Extra ground current as a percentage of the load current.
    pub gnd_pct: f64,
    pub dropout_model: DropoutModel,
    /// Dropout at `dropout_at_a` (resistive) or the constant dropout.
    pub dropout_v: f64,
    /// The load current at which `dropout_v` is rated (resistive model only).
    pub dropout_at_a: f64,
    /// The regulator's rated output current.
    pub rated_a: f64,
    pub theta_ja: f64,
    pub ta_max: f64,
    pub tj_max: f64,
    pub headroom_margin_v: f64,
    pub thermal_margin_c: f64,
    /// Wanted efficiency at V_in,nom and typical load, if there is a requirement.
    pub eff_min_pct: Option<f64>,
    /// The current the parent supply can give this rail, if it is limited.
    pub input_budget_a: Option<f64>,
}

impl LinearInput {
    /// Read the input from named fields (`vinMin`, `dropoutModel`, …).
    pub fn read(f: &mut dyn FieldSource) -> Result<LinearInput, ReadError> {
        let dropout_model = choice(
            f,
            "dropoutModel",
            &[
                ("resistive", DropoutModel::Resistive),
                ("constant", DropoutModel::Constant),
                ("classic", DropoutModel::Classic),
            ],
        )?;
        let [vin_min, vin_nom, vin_max, vout, vout_tol_pct, iout_max, iout_typ, iq, gnd_pct, dropout_v, dropout_at_a, rated_a, theta_ja, ta_max, tj_max, headroom_margin_v, thermal_margin_c] =
            required_numbers(
                f,
                &[
                    "vinMin",
                    "vinNom",
                    "vinMax",
                    "vout",
                    "voutTolPct",
                    "ioutMax",
                    "ioutTyp",
                    "iq",
                    "gndPct",
                    "dropoutV",
                    "dropoutAtA",
                    "ratedA",
                    "thetaJa",
                    "taMax",
                    "tjMax",
                    "headroomMarginV",
                    "thermalMarginC",
                ],
            )?;
        let [eff_min_pct, input_budget_a] = numbers(f, &["effMinPct", "inputBudgetA"])?;
        Ok(LinearInput {
            vin_min,
            vin_nom,
            vin_max,
            vout,
            vout_tol_pct,
            iout_max,
            iout_typ,
            iq,
            gnd_pct,
            dropout_model,
            dropout_v,
            dropout_at_a,
            rated_a,
            theta_ja,
            ta_max,
            tj_max,
            headroom_margin_v,
            thermal_margin_c,
            eff_min_pct,
            input_budget_a,
        })
    }
}

/// Which check a [`Check`] reports.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum CheckId {
    Headroom,
    Thermal,
    Rating,
    Efficiency,
    Budget,
}

/// One check of the rail, its outcome and the reason in words.
pub type Check = crate::verdict::Check<CheckId>;

/// The rail at one input voltage and one load.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct OperatingPoint {
    pub iout_a: f64,
    pub ground_a: f64,
    pub input_a: f64,
    pub pass_w: f64,
    pub ground_w: f64,
    pub total_w: f64,
    pub input_w: f64,
    pub output_w: f64,
    pub efficiency_pct: f64,
    pub tj_c: f64,
    pub thermal_margin_c: f64,
}

/// Which input corner a [`Corner`] is.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum CornerLabel {
    Min,
    Nom,
    Max,
}

/// The rail at one input-voltage corner, nominal output, hottest ambient.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Corner {
    pub label: CornerLabel,
    pub vin: f64,
    /// vin − V_out,max − V_do(I_out,max).
    pub headroom_v: f64,
    /// At the highest load.
    pub full: OperatingPoint,
    /// At the typical load.
    pub typ: OperatingPoint,
}

/// The worst-case corners that decide the verdict.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct WorstCase {
    pub vout_min: f64,
    pub vout_max: f64,
    /// V_do(I_out,max).
    pub dropout_v: f64,
    /// V_in,min − V_out,max − V_do(I_out,max).
    pub headroom_v: f64,
    /// Total dissipation at V_in,max, V_out,min, I_out,max.
    pub power_w: f64,
    pub tj_c: f64,
    pub thermal_margin_c: f64,
    /// I_out,max + I_gnd(I_out,max).
    pub input_current_a: f64,
}

/// What bounds the largest load.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum LoadBound {
    Thermal,
    Headroom,
    Rating,
}

/// The check solved backwards: how far each quantity may go before a limit (with its wanted
/// margin) is reached.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Limits {
    pub max_load_a: f64,
    pub max_load_by: LoadBound,
    /// At V_in,max, V_out,min and T_a,max, keeping the thermal margin.
    pub max_load_thermal_a: f64,
    /// At V_in,min and V_out,max, keeping the headroom margin; `None` when the dropout does
    /// not depend on load and the headroom is met at every load.
    pub max_load_headroom_a: Option<f64>,
    /// At I_out,max and V_in,max, keeping the thermal margin.
    pub hottest_ambient_c: f64,
    /// V_out,max + V_do(I_out,max): the lowest input that still regulates.
    pub vin_min_regulating: f64,
    /// `vin_min_regulating` plus the wanted headroom margin.
    pub vin_min_with_margin: f64,
    /// The highest input keeping the thermal margin at I_out,max and T_a,max; `None` when no
    /// input above the output does.
    pub vin_max_thermal: Option<f64>,
}

/// The data of the operating-window plot: V_in across, I_out up.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Window {
    pub vin_from: f64,
    pub vin_to: f64,
    /// The top of the current axis; the rating line may lie above it.
    pub iout_to: f64,
    /// Headroom = 0 at V_out,max: the rail regulates to the right of (below) this line.
    pub dropout: Vec<[f64; 2]>,
    /// T_j = T_j,max at T_a,max and V_out,min: the junction is cool enough below this curve.
    pub thermal: Vec<[f64; 2]>,
    pub rated_a: f64,
    pub vin_min: f64,
    pub vin_max: f64,
    pub iout_typ: f64,
    pub iout_max: f64,
}

/// Everything the check found.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct LinearReport {
    pub verdict: Status,
    pub summary: String,
    pub checks: Vec<Check>,
    pub warnings: Vec<String>,
    /// Heat or efficiency is what fails: a switching regulator may suit the rail better.
    pub suggest_switching: bool,
    pub corners: [Corner; 3],
    pub worst: WorstCase,
    pub limits: Limits,
    pub window: Window,
}

/// A [`LinearInput`] whose every value has been checked; computing from it cannot fail.
#[derive(Clone, Debug, PartialEq)]
pub struct ValidLinear(LinearInput);

impl ValidLinear {
    pub fn input(&self) -> &LinearInput {
        &self.0
    }
}

impl LinearInput {
    /// Check every value, in the order the fields appear on the page, and return the first
    /// problem.
    pub fn validate(&self) -> Result<ValidLinear, InputError> {
        use QuantityKind::{
            Current, Percent, Temperature, TemperatureDifference, ThermalResistance, Voltage,
        };
        let vin_min = check::above("vinMin", "V_in,min", self.vin_min, 0.0, Voltage)?;
        let vin_nom = check::finite("vinNom", "V_in,nom", self.vin_nom, Voltage)?;
        if vin_nom < vin_min {
            return Err(InputError::new(
                "vinNom",
                format!(
                    "V_in,nom must not be below V_in,min ({})",
                    show(vin_min, Voltage)
                ),
            ));
        }
        let vin_max = check::finite("vinMax", "V_in,max", self.vin_max, Voltage)?;
        if vin_max < vin_nom {
            return Err(InputError::new(
                "vinMax",
                format!(
                    "V_in,max must not be below V_in,nom ({})",
                    show(vin_nom, Voltage)
                ),
            ));
        }
        let vout = check::above("vout", "V_out", self.vout, 0.0, Voltage)?;
        if vin_min <= vout {
            return Err(InputError::new(
                "vinMin",
                format!(
                    "V_in,min must be above V_out ({}): a linear regulator cannot step up",
                    show(vout, Voltage)
                ),
            ));
        }
        check::within(
            "voutTolPct",
            "The V_out tolerance",
            self.vout_tol_pct,
            0.0,
            20.0,
            Percent,
        )?;
        let iout_max = check::above("ioutMax", "I_out,max", self.iout_max, 0.0, Current)?;
        let iout_typ = check::at_least("ioutTyp", "I_out,typ", self.iout_typ, 0.0, Current)?;
        if iout_typ > iout_max {
            return Err(InputError::new(
                "ioutTyp",
                format!(
                    "I_out,typ must not exceed I_out,max ({})",
                    show(iout_max, Current)
                ),
            ));
        }
        check::at_least("iq", "I_q", self.iq, 0.0, Current)?;
        check::within(
            "gndPct",
            "The load-dependent ground current",
            self.gnd_pct,
            0.0,
            50.0,
            Percent,
        )?;
        match self.dropout_model {
            DropoutModel::Resistive => {
                check::at_least("dropoutV", "The dropout", self.dropout_v, 0.0, Voltage)?;
                // A rating current below 1 nA would turn the resistance into a huge number
                // that no real pass element has.
                check::at_least(
                    "dropoutAtA",
                    "The current the dropout is rated at",
                    self.dropout_at_a,
                    1e-9,
                    Current,
                )?;
            }
            DropoutModel::Constant => {
                check::at_least("dropoutV", "The dropout", self.dropout_v, 0.0, Voltage)?;
            }
            DropoutModel::Classic => {}
        }
        check::above("ratedA", "The rated current", self.rated_a, 0.0, Current)?;
        // Below 1 mK/W nothing on a board conducts heat; the bound keeps P = ΔT/θ finite.
        check::at_least("thetaJa", "θJA", self.theta_ja, 1e-3, ThermalResistance)?;
        let ta_max = check::above("taMax", "T_a,max", self.ta_max, -273.15, Temperature)?;
        let tj_max = check::finite("tjMax", "T_j,max", self.tj_max, Temperature)?;
        if tj_max <= ta_max {
            return Err(InputError::new(
                "taMax",
                format!(
                    "T_a,max must be below T_j,max ({})",
                    show(tj_max, Temperature)
                ),
            ));
        }
        check::at_least(
            "headroomMarginV",
            "The headroom margin",
            self.headroom_margin_v,
            0.0,
            Voltage,
        )?;
        check::at_least(
            "thermalMarginC",
            "The thermal margin",
            self.thermal_margin_c,
            0.0,
            TemperatureDifference,
        )?;
        if let Some(eff) = self.eff_min_pct {
            check::within(
                "effMinPct",
                "The wanted efficiency",
                eff,
                0.0,
                100.0,
                Percent,
            )?;
        }
        if let Some(budget) = self.input_budget_a {
            check::above("inputBudgetA", "The input budget", budget, 0.0, Current)?;
        }
        Ok(ValidLinear(self.clone()))
    }
}

/// Validate, then compute.
pub fn check(input: &LinearInput) -> Result<LinearReport, InputError> {
    Ok(input.validate()?.report())
}

impl ValidLinear {
    fn dropout_at(&self, iout: f64) -> f64 {
        let x = &self.0;
        match x.dropout_model {
            DropoutModel::Resistive => x.dropout_v * iout / x.dropout_at_a,
            DropoutModel::Constant => x.dropout_v,
            DropoutModel::Classic => CLASSIC_DROPOUT_V,
        }
    }

    fn ground_current(&self, iout: f64) -> f64 {
        self.0.iq + self.0.gnd_pct / 100.0 * iout
    }

    fn vout_min(&self) -> f64 {
        self.0.vout * (1.0 - self.0.vout_tol_pct / 100.0)
    }

    fn vout_max(&self) -> f64 {
        self.0.vout * (1.0 + self.0.vout_tol_pct / 100.0)
    }

    /// The rail at one input voltage, output voltage, load and ambient.
    pub fn operating_point(&self, vin: f64, vout: f64, iout: f64, ta: f64) -> OperatingPoint {
        let ground_a = self.ground_current(iout);
        let input_a = iout + ground_a;
        let pass_w = (vin - vout) * iout;
        let ground_w = vin * ground_a;
        let total_w = pass_w + ground_w;
        let input_w = vin * input_a;
        let output_w = vout * iout;
        let efficiency_pct = if input_w > 0.0 {
            100.0 * output_w / input_w
        } else {
            0.0
        };
        let tj_c = ta + self.0.theta_ja * total_w;
        OperatingPoint {
            iout_a: iout,
            ground_a,
            input_a,
            pass_w,
            ground_w,
            total_w,
            input_w,
            output_w,
            efficiency_pct,
            tj_c,
            thermal_margin_c: self.0.tj_max - tj_c,
        }
    }

    /// The dissipation the junction may take at T_a with the wanted thermal margin.
    fn power_allowed(&self, ta: f64, margin: f64) -> f64 {
        (self.0.tj_max - margin - ta) / self.0.theta_ja
    }

    /// The load at which the dissipation at (vin, vout) reaches `power`; 0 when even no load
    /// is too much. Inverts P(I) = (vin − vout)·I + vin·(I_q + k·I).
    fn load_for_power(&self, vin: f64, vout: f64, power: f64) -> f64 {
        let slope = vin - vout + vin * self.0.gnd_pct / 100.0;
        ((power - vin * self.0.iq) / slope).max(0.0)
    }

    fn limits(&self, worst: &WorstCase) -> Limits {
        let x = &self.0;
        let allowed = self.power_allowed(x.ta_max, x.thermal_margin_c);
        let max_load_thermal_a = self.load_for_power(x.vin_max, worst.vout_min, allowed);
        let headroom_spare = x.vin_min - worst.vout_max - x.headroom_margin_v;
        let max_load_headroom_a = match x.dropout_model {
            DropoutModel::Resistive if x.dropout_v > 0.0 => {
                Some((headroom_spare * x.dropout_at_a / x.dropout_v).max(0.0))
            }
            // A lossless pass element (0 V dropout) or a constant dropout does not bound the
            // load: either every load keeps the margin or none does.
            _ => {
                if headroom_spare - self.dropout_at(x.iout_max) >= 0.0 {
                    None
                } else {
                    Some(0.0)
                }
            }
        };
        let mut max_load_a = x.rated_a;
        let mut max_load_by = LoadBound::Rating;
        if max_load_thermal_a < max_load_a {
            max_load_a = max_load_thermal_a;
            max_load_by = LoadBound::Thermal;
        }
        if let Some(h) = max_load_headroom_a {
            if h < max_load_a {
                max_load_a = h;
                max_load_by = LoadBound::Headroom;
            }
        }
        let vin_min_regulating = worst.vout_max + worst.dropout_v;
        // Solve T_a + θ·[(V − V_out,min)·I + V·I_gnd] = T_j,max − margin for V.
        let i = x.iout_max;
        let v_thermal = (allowed + worst.vout_min * i) / (i + self.ground_current(i));
        Limits {
            max_load_a,
            max_load_by,
            max_load_thermal_a,
            max_load_headroom_a,
            hottest_ambient_c: x.tj_max - x.thermal_margin_c - x.theta_ja * worst.power_w,
            vin_min_regulating,
            vin_min_with_margin: vin_min_regulating + x.headroom_margin_v,
            vin_max_thermal: (v_thermal > worst.vout_min).then_some(v_thermal),
        }
    }

    fn window(&self, worst: &WorstCase) -> Window {
        let x = &self.0;
        let vin_from = worst.vout_min;
        let dropout_at_zero_load = worst.vout_max + self.dropout_at(0.0);
        let mut vin_to = x.vin_max + 0.4 * (x.vin_max - vin_from);
        let dropout_full = worst.vout_max + self.dropout_at(x.iout_max.max(x.rated_a));
        if dropout_full * 1.1 > vin_to {
            vin_to = dropout_full * 1.1;
        }
        // Show the current rating when it is within a few times the load; a light load on a
        // big regulator would otherwise be squashed against the axis.
        let iout_to = 1.25 * x.iout_max.max(x.rated_a.min(4.0 * x.iout_max));
        let dropout = match x.dropout_model {
            DropoutModel::Resistive if x.dropout_v > 0.0 => {
                let ohms = x.dropout_v / x.dropout_at_a;
                let top_vin = dropout_at_zero_load + ohms * iout_to;
                if top_vin <= vin_to {
                    Vec::from([[dropout_at_zero_load, 0.0], [top_vin, iout_to]])
                } else {
                    let top_i = (vin_to - dropout_at_zero_load) / ohms;
                    Vec::from([[dropout_at_zero_load, 0.0], [vin_to, top_i]])
                }
            }
            _ => Vec::from([[dropout_at_zero_load, 0.0], [dropout_at_zero_load, iout_to]]),
        };
        // The thermal boundary at zero margin, from where it leaves the top of the plot (or
        // the left edge) to the right edge.
        let allowed = self.power_allowed(x.ta_max, 0.0);
        let k = x.gnd_pct / 100.0;
        let v_top = (allowed + iout_to * worst.vout_min) / (iout_to * (1.0 + k) + x.iq);
        let start = v_top.max(vin_from);
        let mut thermal = Vec::new();
        if start < vin_to {
            for n in 0..=WINDOW_SAMPLES {
                let v = start + (vin_to - start) * n as f64 / WINDOW_SAMPLES as f64;
                let i = self.load_for_power(v, worst.vout_min, allowed).min(iout_to);
                thermal.push([v, i]);
            }
        }
        Window {
            vin_from,
            vin_to,
            iout_to,
            dropout,
            thermal,
            rated_a: x.rated_a,
            vin_min: x.vin_min,
            vin_max: x.vin_max,
            iout_typ: x.iout_typ,
            iout_max: x.iout_max,
        }
    }

    /// Compute every result. Cannot fail: the input was checked.
    pub fn report(&self) -> LinearReport {
        use QuantityKind::{Current, Percent, Power, Temperature, TemperatureDifference, Voltage};
        let x = &self.0;
        let dropout_v = self.dropout_at(x.iout_max);
        let vout_min = self.vout_min();
        let vout_max = self.vout_max();
        let corner = |label, vin: f64| Corner {
            label,
            vin,
            headroom_v: vin - vout_max - dropout_v,
            full: self.operating_point(vin, x.vout, x.iout_max, x.ta_max),
            typ: self.operating_point(vin, x.vout, x.iout_typ, x.ta_max),
        };
        let corners = [
            corner(CornerLabel::Min, x.vin_min),
            corner(CornerLabel::Nom, x.vin_nom),
            corner(CornerLabel::Max, x.vin_max),
        ];
        let hot = self.operating_point(x.vin_max, vout_min, x.iout_max, x.ta_max);
        let worst = WorstCase {
            vout_min,
            vout_max,
            dropout_v,
            headroom_v: x.vin_min - vout_max - dropout_v,
            power_w: hot.total_w,
            tj_c: hot.tj_c,
            thermal_margin_c: hot.thermal_margin_c,
            input_current_a: hot.input_a,
        };
        let limits = self.limits(&worst);

        let mut checks = Vec::new();
        let headroom_status = grade(worst.headroom_v, x.headroom_margin_v);
        checks.push(Check {
            id: CheckId::Headroom,
            title: "Headroom over dropout".into(),
            status: headroom_status,
            text: format!(
                "At V_in,min {} the output may need {} plus {} of dropout at {}, leaving {} of \
                 headroom (wanted {}){}",
                show(x.vin_min, Voltage),
                show(vout_max, Voltage),
                show(dropout_v, Voltage),
                show(x.iout_max, Current),
                show(worst.headroom_v, Voltage),
                show(x.headroom_margin_v, Voltage),
                match headroom_status {
                    Status::Pass => ".",
                    Status::Marginal => ": it regulates, with less margin than wanted.",
                    Status::Fail => ": the regulator drops out and the output sags.",
                }
            ),
        });
        let thermal_status = grade(worst.thermal_margin_c, x.thermal_margin_c);
        checks.push(Check {
            id: CheckId::Thermal,
            title: "Junction temperature".into(),
            status: thermal_status,
            text: format!(
                "At V_in,max {}, V_out,min {}, full load and {} ambient it dissipates {}; \
                 T_j = {} against the {} limit, a margin of {} (wanted {}){}",
                show(x.vin_max, Voltage),
                show(vout_min, Voltage),
                show(x.ta_max, Temperature),
                show(worst.power_w, Power),
                show(worst.tj_c, Temperature),
                show(x.tj_max, Temperature),
                show(worst.thermal_margin_c, TemperatureDifference),
                show(x.thermal_margin_c, TemperatureDifference),
                match thermal_status {
                    Status::Pass => ".",
                    Status::Marginal => ": within the limit, with less margin than wanted.",
                    Status::Fail => ": the junction runs above its limit.",
                }
            ),
        });
        let rating_status = if x.iout_max <= x.rated_a {
            Status::Pass
        } else {
            Status::Fail
        };
        checks.push(Check {
            id: CheckId::Rating,
            title: "Current rating".into(),
            status: rating_status,
            text: format!(
                "The highest load, {}, is {} the regulator's {} rating.",
                show(x.iout_max, Current),
                if rating_status == Status::Pass {
                    "within"
                } else {
                    "above"
                },
                show(x.rated_a, Current)
            ),
        });
        let mut efficiency_failed = false;
        if let Some(wanted) = x.eff_min_pct {
            let eff = corners[1].typ.efficiency_pct;
            let status = if eff >= wanted {
                Status::Pass
            } else {
                Status::Fail
            };
            efficiency_failed = status == Status::Fail;
            checks.push(Check {
                id: CheckId::Efficiency,
                title: "Efficiency".into(),
                status,
                text: format!(
                    "At V_in,nom {} and the typical load {} the efficiency is {} (wanted at \
                     least {}); it can never exceed V_out/V_in = {}.",
                    show(x.vin_nom, Voltage),
                    show(x.iout_typ, Current),
                    show(eff, Percent),
                    show(wanted, Percent),
                    show(100.0 * x.vout / x.vin_nom, Percent)
                ),
            });
        }
        if let Some(budget) = x.input_budget_a {
            let status = if worst.input_current_a <= budget {
                Status::Pass
            } else {
                Status::Fail
            };
            checks.push(Check {
                id: CheckId::Budget,
                title: "Current from the supply".into(),
                status,
                text: format!(
                    "At full load it draws {} from its supply (load plus ground current), {} \
                     the {} budget.",
                    show(worst.input_current_a, Current),
                    if status == Status::Pass {
                        "within"
                    } else {
                        "above"
                    },
                    show(budget, Current)
                ),
            });
        }

        let verdict = overall(&checks);
        let titles = |status| titles_with(&checks, status);
        let summary = match verdict {
            Status::Pass => String::from("The rail passes every check in the worst case."),
            Status::Marginal => format!(
                "The rail works but misses a wanted margin: {}.",
                titles(Status::Marginal)
            ),
            Status::Fail => format!("The rail fails: {}.", titles(Status::Fail)),
        };

        let mut warnings = Vec::new();
        if x.vin_max > 60.0 {
            warnings.push(String::from(
                "V_in,max is above about 60 V DC: such supplies are hazardous and outside what \
                 railnote checks.",
            ));
        }
        if x.dropout_model == DropoutModel::Resistive && x.iout_max > x.dropout_at_a {
            warnings.push(format!(
                "The dropout is extrapolated beyond the {} it is rated at; check the \
                 datasheet's dropout curve.",
                show(x.dropout_at_a, Current)
            ));
        }
        if x.dropout_model == DropoutModel::Classic {
            warnings.push(String::from(
                "Dropout taken as 2 V, the usual figure for classic three-terminal regulators \
                 (common practice); the part's datasheet gives the real value.",
            ));
        }
        if x.iout_typ > 0.0 && corners[1].typ.ground_a > 0.1 * x.iout_typ {
            warnings.push(format!(
                "At typical load the ground current ({}) is more than a tenth of the load \
                 current: it dominates battery life at light load.",
                show(corners[1].typ.ground_a, Current)
            ));
        }

        LinearReport {
            verdict,
            summary,
            suggest_switching: thermal_status != Status::Pass || efficiency_failed,
            checks,
            warnings,
            corners,
            window: self.window(&worst),
            worst,
            limits,
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
        Efficiency => "efficiency",
        Budget => "budget",
    });
    out_words!(CornerLabel { Min => "min", Nom => "nom", Max => "max" });
    out_words!(LoadBound { Thermal => "thermal", Headroom => "headroom", Rating => "rating" });

    impl ToOut for OperatingPoint {
        fn to_out(&self) -> Out {
            out_object! {
                "ioutA": self.iout_a,
                "groundA": self.ground_a,
                "inputA": self.input_a,
                "passW": self.pass_w,
                "groundW": self.ground_w,
                "totalW": self.total_w,
                "inputW": self.input_w,
                "outputW": self.output_w,
                "efficiencyPct": self.efficiency_pct,
                "tjC": self.tj_c,
                "thermalMarginC": self.thermal_margin_c,
            }
        }
    }

    impl ToOut for Corner {
        fn to_out(&self) -> Out {
            out_object! {
                "label": self.label,
                "vin": self.vin,
                "headroomV": self.headroom_v,
                "full": self.full,
                "typ": self.typ,
            }
        }
    }

    impl ToOut for WorstCase {
        fn to_out(&self) -> Out {
            out_object! {
                "voutMin": self.vout_min,
                "voutMax": self.vout_max,
                "dropoutV": self.dropout_v,
                "headroomV": self.headroom_v,
                "powerW": self.power_w,
                "tjC": self.tj_c,
                "thermalMarginC": self.thermal_margin_c,
                "inputCurrentA": self.input_current_a,
            }
        }
    }

    impl ToOut for Limits {
        fn to_out(&self) -> Out {
            out_object! {
                "maxLoadA": self.max_load_a,
                "maxLoadBy": self.max_load_by,
                "maxLoadThermalA": self.max_load_thermal_a,
                "maxLoadHeadroomA": self.max_load_headroom_a,
                "hottestAmbientC": self.hottest_ambient_c,
                "vinMinRegulating": self.vin_min_regulating,
                "vinMinWithMargin": self.vin_min_with_margin,
                "vinMaxThermal": self.vin_max_thermal,
            }
        }
    }

    impl ToOut for Window {
        fn to_out(&self) -> Out {
            out_object! {
                "vinFrom": self.vin_from,
                "vinTo": self.vin_to,
                "ioutTo": self.iout_to,
                "dropout": self.dropout,
                "thermal": self.thermal,
                "ratedA": self.rated_a,
                "vinMin": self.vin_min,
                "vinMax": self.vin_max,
                "ioutTyp": self.iout_typ,
                "ioutMax": self.iout_max,
            }
        }
    }

    impl ToOut for LinearReport {
        fn to_out(&self) -> Out {
            out_object! {
                "verdict": self.verdict,
                "summary": self.summary,
                "checks": self.checks,
                "warnings": self.warnings,
                "suggestSwitching": self.suggest_switching,
                "corners": self.corners,
                "worst": self.worst,
                "limits": self.limits,
                "window": self.window,
            }
        }
    }
}
