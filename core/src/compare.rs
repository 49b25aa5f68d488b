//! Linear or switching: the same rail through the linear check and the switching estimate, side
//! by side.
//!
//! # Method
//!
//! The rail's V_in range, V_out and full load go through [`crate::linear`] (with its own pass
//! element, ground current, dropout and θJA) and through [`crate::switching`]. At each input
//! corner, at full load: each side's dissipation, efficiency, input current and junction
//! temperature T_j = T_a,max + θJA·P (JESD51-2A definition). The linear side is exactly the
//! linear check's full-load operating point at that corner. The switching side's junction heat
//! is the loss inside the regulator's package, taken as every loss except the inductor's
//! (copper and core), a rectifier diode's and the output capacitor's ESR loss, which dissipate
//! in their own parts.
//!
//! The crossing load is where the two dissipations are equal at a corner: the difference is
//! sampled at the switching sweep's 50 log-spaced loads (1 %–120 % of I_out); the first sign
//! change is narrowed by bisection (at most 80 halvings, stopping at a relative width of
//! 1e-13). No sign change means no crossing in that range.
//!
//! A linear regulator can only step down: for a boost (V_out above V_in) or an inverting output
//! the linear side is impossible, and the report says so instead of computing it.
//!
//! # Sources
//!
//! The linear and switching modules' own sources; T_j from JEDEC JESD51-2A. The trade-offs in
//! words are common practice.

use crate::error::check::figure as show;
use crate::error::{check, InputError};
use crate::fields::{choice, required, FieldSource, ReadError};
use crate::linear::{DropoutModel, LinearInput, ValidLinear};
use crate::switching::{CornerLabel, SwitchingInput, Topology, ValidSwitching, SWEEP_POINTS};
use crate::units::QuantityKind;
use crate::verdict::Status;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

/// The rail and both regulators. The switching part is read with the same keys as
/// [`SwitchingInput::read`]; the linear regulator's own keys carry an `ldo` prefix.
#[derive(Clone, Debug, PartialEq)]
pub struct CompareInput {
    /// The rail (V_in range, V_out, full load) and the switching regulator.
    pub switching: SwitchingInput,
    pub ta_max: f64,
    pub tj_max: f64,
    /// θJA of the switching regulator's package.
    pub sw_theta_ja: f64,
    /// The linear output tolerance, ± percent (absent: 0).
    pub vout_tol_pct: Option<f64>,
    /// Wanted linear headroom margin (absent: 0).
    pub headroom_margin_v: Option<f64>,
    /// Wanted thermal margin (absent: 0).
    pub thermal_margin_c: Option<f64>,
    pub ldo_iq: f64,
    pub ldo_gnd_pct: f64,
    pub ldo_dropout_model: DropoutModel,
    pub ldo_dropout_v: f64,
    pub ldo_dropout_at_a: f64,
    pub ldo_rated_a: f64,
    pub ldo_theta_ja: f64,
}

impl CompareInput {
    /// Read the input from named fields: every `checkSwitching` key plus `taMax`, `tjMax`,
    /// `swThetaJa`, the optional margins and the `ldo…` keys.
    pub fn read(f: &mut dyn FieldSource) -> Result<CompareInput, ReadError> {
        Ok(CompareInput {
            switching: SwitchingInput::read(f)?,
            ta_max: required(f, "taMax")?,
            tj_max: required(f, "tjMax")?,
            sw_theta_ja: required(f, "swThetaJa")?,
            vout_tol_pct: f.number("voutTolPct")?,
            headroom_margin_v: f.number("headroomMarginV")?,
            thermal_margin_c: f.number("thermalMarginC")?,
            ldo_iq: required(f, "ldoIq")?,
            ldo_gnd_pct: required(f, "ldoGndPct")?,
            ldo_dropout_model: choice(
                f,
                "ldoDropoutModel",
                &[
                    ("resistive", DropoutModel::Resistive),
                    ("constant", DropoutModel::Constant),
                    ("classic", DropoutModel::Classic),
                ],
            )?,
            ldo_dropout_v: required(f, "ldoDropoutV")?,
            ldo_dropout_at_a: required(f, "ldoDropoutAtA")?,
            ldo_rated_a: required(f, "ldoRatedA")?,
            ldo_theta_ja: required(f, "ldoThetaJa")?,
        })
    }
}

/// One regulator at one corner, full load.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Side {
    /// Every loss of the regulator.
    pub dissipation_w: f64,
    /// The part of it inside the regulator's package (heats the junction): all but the
    /// inductor's, a rectifier diode's and the output capacitor's losses.
    pub package_w: f64,
    pub efficiency_pct: f64,
    pub tj_c: f64,
    pub input_current_a: f64,
}

#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct CompareCorner {
    pub label: CornerLabel,
    pub vin: f64,
    /// `None` when a linear regulator cannot make the rail.
    pub linear: Option<Side>,
    pub switching: Side,
    /// The load where the two dissipations are equal; `None`: none in 1 %–120 % of I_out.
    pub crossing_load_a: Option<f64>,
}

/// Dissipation against load at V_in,nom, for a plot; the lists run in parallel.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Curves {
    pub iout_a: Vec<f64>,
    pub linear_w: Option<Vec<f64>>,
    pub switching_w: Vec<f64>,
}

/// Everything the comparison found.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct CompareReport {
    pub linear_possible: bool,
    /// Why a linear regulator cannot make this rail.
    pub linear_impossible: Option<String>,
    pub linear_verdict: Option<Status>,
    pub linear_summary: Option<String>,
    pub switching_verdict: Status,
    pub switching_summary: String,
    pub corners: [CompareCorner; 3],
    pub curves: Curves,
    /// What no number shows, in words.
    pub tradeoffs: Vec<String>,
}

/// A [`CompareInput`] whose every value has been checked.
#[derive(Clone, Debug, PartialEq)]
pub struct ValidCompare {
    switching: ValidSwitching,
    /// The linear side, or why there is none.
    linear: Result<ValidLinear, String>,
    ta_max: f64,
    sw_theta_ja: f64,
}

/// The comparison's key for a linear check's field.
fn ldo_key(field: &'static str) -> &'static str {
    match field {
        "iq" => "ldoIq",
        "gndPct" => "ldoGndPct",
        "dropoutV" => "ldoDropoutV",
        "dropoutAtA" => "ldoDropoutAtA",
        "ratedA" => "ldoRatedA",
        "thetaJa" => "ldoThetaJa",
        other => other,
    }
}

impl CompareInput {
    /// Check every value; the switching part first, then the ambient, then the linear part.
    pub fn validate(&self) -> Result<ValidCompare, InputError> {
        use QuantityKind::{Temperature, ThermalResistance, Voltage};
        let switching = self.switching.validate()?;
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
        // Below 1 mK/W nothing on a board conducts heat; the same bound as the linear check.
        let sw_theta_ja = check::at_least(
            "swThetaJa",
            "θJA of the switching regulator",
            self.sw_theta_ja,
            1e-3,
            ThermalResistance,
        )?;
        let s = &self.switching;
        let linear = match s.topology {
            Topology::Inverting => Err(String::from(
                "The output is negative (inverting): a linear regulator cannot make it from a \
                 positive input.",
            )),
            Topology::Boost => Err(format!(
                "V_out ({}) is above V_in: a linear regulator cannot step up.",
                show(s.vout, Voltage)
            )),
            Topology::Buck => {
                let input = LinearInput {
                    vin_min: s.vin_min,
                    vin_nom: s.vin_nom,
                    vin_max: s.vin_max,
                    vout: s.vout,
                    vout_tol_pct: self.vout_tol_pct.unwrap_or(0.0),
                    iout_max: s.iout,
                    iout_typ: s.iout,
                    iq: self.ldo_iq,
                    gnd_pct: self.ldo_gnd_pct,
                    dropout_model: self.ldo_dropout_model,
                    dropout_v: self.ldo_dropout_v,
                    dropout_at_a: self.ldo_dropout_at_a,
                    rated_a: self.ldo_rated_a,
                    theta_ja: self.ldo_theta_ja,
                    ta_max,
                    tj_max,
                    headroom_margin_v: self.headroom_margin_v.unwrap_or(0.0),
                    thermal_margin_c: self.thermal_margin_c.unwrap_or(0.0),
                    eff_min_pct: None,
                    input_budget_a: None,
                };
                match input.validate() {
                    Ok(valid) => Ok(valid),
                    Err(e) => {
                        let field = ldo_key(e.field);
                        return Err(if field == e.field {
                            e
                        } else {
                            InputError::new(field, format!("LDO: {}", e.message))
                        });
                    }
                }
            }
        };
        Ok(ValidCompare {
            switching,
            linear,
            ta_max,
            sw_theta_ja,
        })
    }
}

/// Validate, then compute.
pub fn compare_rails(input: &CompareInput) -> Result<CompareReport, InputError> {
    Ok(input.validate()?.report())
}

impl ValidCompare {
    fn vout(&self) -> f64 {
        self.switching.input().vout
    }

    /// Linear minus switching dissipation at `vin` and load `iout`.
    fn difference(&self, linear: &ValidLinear, vin: f64, iout: f64) -> f64 {
        let lin = linear.operating_point(vin, self.vout(), iout, self.ta_max);
        let sw = self.switching.point(CornerLabel::Nom, vin, iout);
        lin.total_w - sw.losses.total_w
    }

    /// The load in the sweep's range where the dissipations are equal (see the module doc).
    pub fn crossing_load(&self, vin: f64) -> Option<f64> {
        let linear = self.linear.as_ref().ok()?;
        let (mut low, mut low_diff) = (
            self.switching.sweep_load(0),
            self.difference(linear, vin, self.switching.sweep_load(0)),
        );
        for k in 1..SWEEP_POINTS {
            let high = self.switching.sweep_load(k);
            let high_diff = self.difference(linear, vin, high);
            if low_diff == 0.0 {
                return Some(low);
            }
            if (low_diff < 0.0) != (high_diff < 0.0) {
                let mut high = high;
                for _ in 0..80 {
                    let mid = 0.5 * (low + high);
                    let mid_diff = self.difference(linear, vin, mid);
                    if (mid_diff < 0.0) == (low_diff < 0.0) {
                        (low, low_diff) = (mid, mid_diff);
                    } else {
                        high = mid;
                    }
                    if high - low <= 1e-13 * high {
                        break;
                    }
                }
                return Some(0.5 * (low + high));
            }
            (low, low_diff) = (high, high_diff);
        }
        None
    }

    /// Compute every result. Cannot fail: the input was checked.
    pub fn report(&self) -> CompareReport {
        use QuantityKind::{Current, Frequency, Percent, Voltage};
        let sw = self.switching.report();
        let x = self.switching.input();
        let linear = self.linear.as_ref().ok();
        let lin = linear.map(|l| l.report());
        let corners = [0, 1, 2].map(|i| {
            let c = &sw.corners[i];
            let l = &c.losses;
            let package_w = l.main_conduction_w
                + l.main_switching_w
                + l.main_gate_w
                + l.rect_conduction_w
                + l.rect_gate_w
                + l.dead_time_w
                + l.output_cap_w
                + l.controller_w;
            CompareCorner {
                label: c.label,
                vin: c.vin,
                linear: lin.as_ref().map(|r| {
                    let p = &r.corners[i].full;
                    Side {
                        dissipation_w: p.total_w,
                        package_w: p.total_w,
                        efficiency_pct: p.efficiency_pct,
                        tj_c: p.tj_c,
                        input_current_a: p.input_a,
                    }
                }),
                switching: Side {
                    dissipation_w: l.total_w,
                    package_w,
                    efficiency_pct: c.efficiency_pct,
                    tj_c: self.ta_max + self.sw_theta_ja * package_w,
                    input_current_a: c.input_current_a,
                },
                crossing_load_a: self.crossing_load(c.vin),
            }
        });
        let nom = &sw.sweep[1];
        let curves = Curves {
            iout_a: nom.iout_a.clone(),
            linear_w: linear.map(|l| {
                nom.iout_a
                    .iter()
                    .map(|&i| l.operating_point(x.vin_nom, x.vout, i, self.ta_max).total_w)
                    .collect()
            }),
            switching_w: nom.loss_w.clone(),
        };

        let nominal = &sw.corners[1];
        let mut tradeoffs = Vec::new();
        tradeoffs.push(match &self.linear {
            Err(_) => String::from(
                "A linear regulator only steps down: only the switcher can make this rail.",
            ),
            Ok(_) => String::from(
                "A linear regulator only steps down: it stops regulating once V_in falls to \
                 V_out plus its dropout.",
            ),
        });
        match (corners[1].linear, corners[1].crossing_load_a) {
            (Some(c), Some(crossing)) => tradeoffs.push(format!(
                "At V_in,nom the linear regulator wastes less below {} of load, the switcher \
                 above; at full load they dissipate {} and {}.",
                show(crossing, Current),
                show(c.dissipation_w, QuantityKind::Power),
                show(corners[1].switching.dissipation_w, QuantityKind::Power)
            )),
            (Some(c), None) => tradeoffs.push(format!(
                "At V_in,nom the dissipations do not cross between 1 % and 120 % of the load: \
                 {} wastes less throughout.",
                if c.dissipation_w > corners[1].switching.dissipation_w {
                    "the switcher"
                } else {
                    "the linear regulator"
                }
            )),
            (None, _) => {}
        }
        tradeoffs.push(format!(
            "Noise: a linear regulator adds no switching ripple; the switcher adds about {} at \
             {} and its harmonics, which analog and RF loads may need filtered.",
            show(nominal.output_ripple_v, Voltage),
            show(x.fsw, Frequency)
        ));
        tradeoffs.push(String::from(
            "Supply rejection: a linear regulator's PSRR is high at low frequency and falls above \
             its loop bandwidth; a switcher's comes from its control loop, usually lower.",
        ));
        tradeoffs.push(String::from(
            "Interference: the switcher's fast edges radiate and conduct; layout and input \
             filtering decide how much. A linear regulator emits none.",
        ));
        tradeoffs.push(String::from(
            "Transient response: a linear regulator usually answers a load step faster; a \
             switcher is limited by its loop (a fraction of f_sw) and the inductor's slew.",
        ));
        tradeoffs.push(String::from(
            "Parts count: a linear regulator needs two capacitors; a switcher adds an inductor, \
             larger capacitors, often a diode, and careful layout.",
        ));
        if let Some(c) = corners[1].linear {
            tradeoffs.push(format!(
                "Efficiency at V_in,nom, full load: linear {}, switching {} (linear never \
                 exceeds V_out/V_in = {}).",
                show(c.efficiency_pct, Percent),
                show(corners[1].switching.efficiency_pct, Percent),
                show(100.0 * x.vout / x.vin_nom, Percent)
            ));
        }

        CompareReport {
            linear_possible: linear.is_some(),
            linear_impossible: self.linear.as_ref().err().cloned(),
            linear_verdict: lin.as_ref().map(|r| r.verdict),
            linear_summary: lin.map(|r| r.summary),
            switching_verdict: sw.verdict,
            switching_summary: sw.summary,
            corners,
            curves,
            tradeoffs,
        }
    }
}

mod out {
    use super::*;
    use crate::output::{out_object, Out, ToOut};

    impl ToOut for Side {
        fn to_out(&self) -> Out {
            out_object! {
                "dissipationW": self.dissipation_w,
                "packageW": self.package_w,
                "efficiencyPct": self.efficiency_pct,
                "tjC": self.tj_c,
                "inputCurrentA": self.input_current_a,
            }
        }
    }

    impl ToOut for CompareCorner {
        fn to_out(&self) -> Out {
            out_object! {
                "label": self.label,
                "vin": self.vin,
                "linear": self.linear,
                "switching": self.switching,
                "crossingLoadA": self.crossing_load_a,
            }
        }
    }

    impl ToOut for Curves {
        fn to_out(&self) -> Out {
            out_object! {
                "ioutA": self.iout_a,
                "linearW": self.linear_w,
                "switchingW": self.switching_w,
            }
        }
    }

    impl ToOut for CompareReport {
        fn to_out(&self) -> Out {
            out_object! {
                "linearPossible": self.linear_possible,
                "linearImpossible": self.linear_impossible,
                "linearVerdict": self.linear_verdict,
                "linearSummary": self.linear_summary,
                "switchingVerdict": self.switching_verdict,
                "switchingSummary": self.switching_summary,
                "corners": self.corners,
                "curves": self.curves,
                "tradeoffs": self.tradeoffs,
            }
        }
    }
}
