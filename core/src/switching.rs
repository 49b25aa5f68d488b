//! The switching estimate: a first-order model of a buck, boost or inverting buck-boost
//! converter, synchronous or diode-rectified, at each input corner and across the load range.
//!
//! # Method
//!
//! The inductor sees v_on while the main switch conducts (fraction D of the period T = 1/f_sw)
//! and −v_off while the rectifier conducts (D2). With i the average inductor current over an
//! interval, R_m and R_r the switches' on-resistances, V_f a diode's drop and R_L the winding
//! resistance (DCR):
//!
//! | topology  | v_on                          | v_off                           |
//! |-----------|-------------------------------|---------------------------------|
//! | buck      | V_in − V_out − i·(R_m + R_L)  | V_out + V_r + i·R_L             |
//! | boost     | V_in − i·(R_m + R_L)          | V_out + V_r + i·R_L − V_in      |
//! | inverting | V_in − i·(R_m + R_L)          | \|V_out\| + V_r + i·R_L         |
//!
//! with V_r = i·R_r (synchronous) or V_f (diode). Continuous conduction (CCM): volt-second
//! balance D·v_on = (1 − D)·v_off gives D = v_off / (v_on + v_off); charge balance at the output
//! gives the average inductor current I_L = I_out (buck) or I_out / (1 − D) (boost, inverting).
//! The two depend on each other, so the lossy operating point is found by fixed-point iteration
//! from the lossless duty (buck V_out/V_in, boost 1 − V_in/V_out, inverting
//! |V_out|/(V_in + |V_out|)), at most 100 steps, stopping when D moves less than 1e-13. The
//! iteration climbs monotonically to the lowest operating point; when it passes 99 % duty (or
//! v_on or v_off stops being positive) the losses keep the output out of reach, and the corner is
//! reported at 99 % duty with `duty_limited` set. Ripple ΔI = v_on·D/(L·f); peak and valley
//! I_L ± ΔI/2; RMS √(I_L² + ΔI²/12), the main switch's √D of it and the rectifier's √(1 − D).
//!
//! Discontinuous conduction (DCM), allowed for a diode and for a synchronous rectifier in
//! "discontinuous allowed" mode: the current rises from zero to I_pk = v_on·D1/(L·f), falls back
//! in D2 = D1·v_on/v_off and stays at zero for the rest of the period. Charge balance: the buck's
//! average inductor current I_pk·(D1 + D2)/2, or the boost's and inverting's average rectifier
//! current I_pk·D2/2, equals I_out, so D1 = √(2·L·f·I_out / (v_on·(1 + v_on/v_off))) (buck) or
//! D1 = √(2·L·f·I_out·v_off) / v_on (boost, inverting); the drops use the interval average
//! I_pk/2 and the pair is iterated the same way. DCM applies when D1 + D2 < 1; otherwise the
//! converter is continuous. Pulse currents: average I_pk·D/2, RMS I_pk·√(D/3) per interval.
//!
//! Boundary load (lossless, at the lossless duty): buck I_OB = V_out·(1 − D)/(2·L·f), boost
//! V_out·D·(1 − D)²/(2·L·f), inverting |V_out|·(1 − D)²/(2·L·f).
//!
//! Losses, each at the operating point: conduction I_rms²·R of each switch and of the winding;
//! diode V_f·I_avg; hard-switching overlap of the main switch ½·V_sw·f·(I_on·t_r + I_off·t_f)
//! with I_on the valley (zero in DCM, none when negative) and I_off the peak, which is
//! V·I·(t_r + t_f)·f/2 for a flat current; gate drive Q_g·V_drv·f for each switch; dead time
//! V_bd·t_dt·f·(|I_pk| + |I_valley|) (one edge at I_pk in DCM); switch-node capacitance
//! ½·C·V_sw²·f or ½·Q_oss·V_sw·f; the inductor's core loss as given; the controller V_in·I_q;
//! the output capacitor's ESR I_C,rms²·ESR, where the capacitor carries the inductor current
//! (buck) or the rectifier current (boost, inverting) less the load, so
//! I_C,rms² = I_rms² − I_out² (ΔI²/12 for a buck in CCM, I_out²·D/(1 − D) for a boost or
//! inverting stage with flat current).
//! The switch node swings V_sw = V_in (buck), V_out (boost) or V_in + |V_out| (inverting).
//! Input power is P_out + ΣP_loss (energy balance), input current P_in/V_in.
//!
//! Output ripple: the charge ΔQ the capacitor takes above the load current in one period over
//! C_out (buck CCM ΔI/(8·f); boost and inverting CCM I_out·D/f; in DCM the part of the
//! triangular pulse above I_out), plus ESR times the capacitor's peak-to-peak current (ΔI for a
//! buck, I_pk for the pulsed output current of a boost or inverting). The two are added, which
//! errs high because their peaks do not coincide.
//!
//! # Assumptions
//!
//! Steady state, ideal capacitors apart from ESR, constant inductance up to saturation (which is
//! only checked, not modelled), a diode as a constant drop, linear transitions, a linear
//! switch-node capacitance (E = ½·Q·V), core loss independent of load. The duty with losses
//! counts the conduction drops only; transition, dead-time, gate and capacitance losses are
//! counted in the power balance, not in the duty. Reverse recovery is not modelled. The
//! proposed inductance uses the lossless relations at the corner that needs the most inductance.
//!
//! # Sources
//!
//! The CCM conversion ratios, ripple, boundary and DCM relations are the standard relations of
//! power-electronics textbooks (from memory). The overlap, gate-drive and capacitance loss terms
//! are the usual first-order estimates found in textbooks on switch-mode supplies (from memory).
//! A ripple ratio of 20–40 % of the load current as the starting point for choosing L is common
//! practice.

use crate::error::check::figure as show;
use crate::error::{check, InputError};
use crate::fields::{choice, required, FieldSource, ReadError};
pub use crate::linear::CornerLabel;
use crate::units::QuantityKind;
pub use crate::verdict::Status;

/// Below and above these ripple ratios (percent of the full-load inductor current) a warning says
/// the design is away from the usual starting point, 20–40 % (common practice), with a tolerance
/// so that the usual range itself never warns.
const RIPPLE_USUAL_LOW: f64 = 10.0;
const RIPPLE_USUAL_HIGH: f64 = 60.0;
use crate::verdict::{overall, titles_with};
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

/// Loads in the efficiency sweep, per input corner.
pub const SWEEP_POINTS: usize = 50;
/// The sweep's lightest and heaviest load, as fractions of I_out.
pub const SWEEP_FROM: f64 = 0.01;
pub const SWEEP_TO: f64 = 1.2;
/// The highest duty the estimate follows; beyond it the output is out of reach.
pub const DUTY_CEILING: f64 = 0.99;
const ITERATIONS: usize = 100;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Topology {
    Buck,
    Boost,
    /// Inverting buck-boost: the output is negative; every voltage here is its magnitude.
    Inverting,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Rectifier {
    /// A second switch conducts while the main switch is off.
    Synchronous,
    /// A diode conducts while the main switch is off.
    Diode,
}

/// What a synchronous rectifier does at light load. A diode always lets the current stop.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum LightLoad {
    /// The rectifier stays on for the whole off-time; the inductor current may reverse.
    ForcedContinuous,
    /// The rectifier turns off when the current reaches zero (discontinuous conduction).
    DiscontinuousAllowed,
}

/// The converter as the engineer describes it. Units: V, A, Hz, H, Ω, s, C, F, W; percentages as
/// numbers of percent. Read from named fields by [`SwitchingInput::read`]; each key is the
/// camelCase form of the field name unless noted.
#[derive(Clone, Debug, PartialEq)]
pub struct SwitchingInput {
    pub topology: Topology,
    pub rectifier: Rectifier,
    /// Key `lightLoad`: `"forcedContinuous"` or `"discontinuousAllowed"`.
    pub light_load: LightLoad,
    pub vin_min: f64,
    pub vin_nom: f64,
    pub vin_max: f64,
    /// The output voltage; for the inverting topology its magnitude |V_out|, a positive number.
    pub vout: f64,
    /// Full load.
    pub iout: f64,
    pub fsw: f64,
    /// L; when absent, `ripple_ratio_pct` is needed and L is proposed from it.
    pub inductance: Option<f64>,
    /// Wanted peak-to-peak ripple over the full-load average inductor current, percent.
    pub ripple_ratio_pct: Option<f64>,
    /// On-resistance of the main switch (high side of a buck or inverting, low side of a boost).
    pub main_rds_on: f64,
    /// On-resistance of the synchronous rectifier (needed when synchronous).
    pub rect_rds_on: Option<f64>,
    /// Forward drop of the rectifier diode (needed when diode-rectified).
    pub diode_vf: Option<f64>,
    /// The main switch's turn-on transition time.
    pub rise_time: f64,
    /// The main switch's turn-off transition time.
    pub fall_time: f64,
    pub main_gate_charge: f64,
    /// Gate charge of the synchronous rectifier (needed when synchronous).
    pub rect_gate_charge: Option<f64>,
    /// Gate drive voltage.
    pub drive_v: f64,
    /// Dead time at each of the two edges (needed when synchronous).
    pub dead_time: Option<f64>,
    /// The rectifier's body-diode drop during dead time (needed when synchronous).
    pub body_diode_vf: Option<f64>,
    /// Switch-node charge (both switches' output capacitance) at the switch-node swing.
    pub coss_charge: Option<f64>,
    /// Switch-node capacitance instead of the charge (at most one of the two).
    pub coss: Option<f64>,
    /// Inductor winding resistance.
    pub dcr: f64,
    /// Inductor core loss at the operating point, W.
    pub core_loss: f64,
    /// Controller quiescent current, drawn from V_in.
    pub iq: f64,
    pub cout: f64,
    pub esr: f64,
    pub min_on_time: f64,
    pub max_duty_pct: f64,
    /// Inductor saturation current, if the peak current should be checked against it.
    pub isat: Option<f64>,
}

impl SwitchingInput {
    /// Read the input from named fields (`topology`, `vinMin`, `mainRdsOn`, …).
    pub fn read(f: &mut dyn FieldSource) -> Result<SwitchingInput, ReadError> {
        Ok(SwitchingInput {
            topology: choice(
                f,
                "topology",
                &[
                    ("buck", Topology::Buck),
                    ("boost", Topology::Boost),
                    ("inverting", Topology::Inverting),
                ],
            )?,
            rectifier: choice(
                f,
                "rectifier",
                &[
                    ("synchronous", Rectifier::Synchronous),
                    ("diode", Rectifier::Diode),
                ],
            )?,
            light_load: choice(
                f,
                "lightLoad",
                &[
                    ("forcedContinuous", LightLoad::ForcedContinuous),
                    ("discontinuousAllowed", LightLoad::DiscontinuousAllowed),
                ],
            )?,
            vin_min: required(f, "vinMin")?,
            vin_nom: required(f, "vinNom")?,
            vin_max: required(f, "vinMax")?,
            vout: required(f, "vout")?,
            iout: required(f, "iout")?,
            fsw: required(f, "fsw")?,
            inductance: f.number("inductance")?,
            ripple_ratio_pct: f.number("rippleRatioPct")?,
            main_rds_on: required(f, "mainRdsOn")?,
            rect_rds_on: f.number("rectRdsOn")?,
            diode_vf: f.number("diodeVf")?,
            rise_time: required(f, "riseTime")?,
            fall_time: required(f, "fallTime")?,
            main_gate_charge: required(f, "mainGateCharge")?,
            rect_gate_charge: f.number("rectGateCharge")?,
            drive_v: required(f, "driveV")?,
            dead_time: f.number("deadTime")?,
            body_diode_vf: f.number("bodyDiodeVf")?,
            coss_charge: f.number("cossCharge")?,
            coss: f.number("coss")?,
            dcr: required(f, "dcr")?,
            core_loss: required(f, "coreLoss")?,
            iq: required(f, "iq")?,
            cout: required(f, "cout")?,
            esr: required(f, "esr")?,
            min_on_time: required(f, "minOnTime")?,
            max_duty_pct: required(f, "maxDutyPct")?,
            isat: f.number("isat")?,
        })
    }
}

/// Which check a [`Check`] reports.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum CheckId {
    /// The duty with losses against the maximum duty (and the output within reach).
    Duty,
    /// The shortest full-load on-time against the minimum on-time.
    OnTime,
    /// The inductor's peak current against its saturation current.
    Saturation,
}

pub type Check = crate::verdict::Check<CheckId>;

/// Conduction mode.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum Mode {
    Continuous,
    Discontinuous,
}

/// Every loss at one operating point, W. Terms that do not apply are zero.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Losses {
    pub main_conduction_w: f64,
    pub main_switching_w: f64,
    pub main_gate_w: f64,
    pub rect_conduction_w: f64,
    pub rect_gate_w: f64,
    pub dead_time_w: f64,
    pub output_cap_w: f64,
    pub diode_w: f64,
    pub inductor_copper_w: f64,
    pub inductor_core_w: f64,
    pub controller_w: f64,
    /// The output capacitor's ESR carrying its ripple current, I_C,rms²·ESR.
    pub output_esr_w: f64,
    /// The sum of the others.
    pub total_w: f64,
}

/// The converter at one input voltage and one load (in a report: full load at each corner).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Corner {
    pub label: CornerLabel,
    pub vin: f64,
    pub iout: f64,
    pub mode: Mode,
    /// The lossless duty of the same mode.
    pub duty_ideal: f64,
    /// The main switch's on-fraction with conduction losses (D, or D1 in DCM).
    pub duty: f64,
    /// The rectifier's conduction fraction (1 − D in CCM, D2 in DCM).
    pub freewheel_duty: f64,
    /// The fraction with no inductor current (DCM only).
    pub idle_duty: f64,
    /// The losses keep the output out of reach below [`DUTY_CEILING`]; figures at the ceiling.
    pub duty_limited: bool,
    pub on_time_s: f64,
    /// Peak-to-peak inductor ripple (the peak in DCM).
    pub ripple_a: f64,
    /// Ripple over the average inductor current, percent.
    pub ripple_ratio_pct: f64,
    pub inductor_avg_a: f64,
    pub inductor_peak_a: f64,
    pub inductor_valley_a: f64,
    pub inductor_rms_a: f64,
    pub main_avg_a: f64,
    pub main_rms_a: f64,
    pub rect_avg_a: f64,
    pub rect_rms_a: f64,
    /// The load at the CCM/DCM boundary at this V_in (lossless relations).
    pub boundary_load_a: f64,
    /// Capacitive plus ESR ripple.
    pub output_ripple_v: f64,
    pub output_ripple_cap_v: f64,
    pub output_ripple_esr_v: f64,
    pub losses: Losses,
    pub output_w: f64,
    /// P_out + losses.total_w.
    pub input_w: f64,
    pub efficiency_pct: f64,
    /// input_w / vin.
    pub input_current_a: f64,
    /// The inductance that gives the wanted ripple ratio here (when one was given).
    pub l_for_ratio_h: Option<f64>,
}

/// Efficiency against load at one input corner; the lists run in parallel.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Curve {
    pub label: CornerLabel,
    pub vin: f64,
    pub iout_a: Vec<f64>,
    pub efficiency_pct: Vec<f64>,
    pub loss_w: Vec<f64>,
    pub discontinuous: Vec<bool>,
}

/// Everything the estimate found.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct SwitchingReport {
    pub verdict: Status,
    pub summary: String,
    pub checks: Vec<Check>,
    pub warnings: Vec<String>,
    /// The inductance used.
    pub inductance_h: f64,
    /// L was proposed from the ripple ratio.
    pub inductance_proposed: bool,
    pub corners: [Corner; 3],
    pub sweep: [Curve; 3],
    /// The highest inductor peak current over the corners.
    pub peak_current_a: f64,
}

/// A [`SwitchingInput`] whose every value has been checked, with the inductance settled and
/// the rectifier's figures resolved; computing from it cannot fail.
#[derive(Clone, Debug, PartialEq)]
pub struct ValidSwitching {
    input: SwitchingInput,
    inductance: f64,
    proposed: bool,
    rect_r: f64,
    diode_vf: f64,
    rect_qg: f64,
    dead_time: f64,
    body_vf: f64,
}

/// A refusal whose message puts one quantity between two pieces of text (one formatting site
/// for every such message keeps the module small).
fn refuse(
    field: &'static str,
    before: &str,
    value: f64,
    kind: QuantityKind,
    after: &str,
) -> InputError {
    InputError::new(field, format!("{before}{}{after}", show(value, kind)))
}

fn show_duty(duty: f64) -> String {
    show(100.0 * duty, QuantityKind::Percent)
}

/// The lossless CCM duty (textbook relations).
pub fn ideal_duty(topology: Topology, vin: f64, vout: f64) -> f64 {
    match topology {
        Topology::Buck => vout / vin,
        Topology::Boost => 1.0 - vin / vout,
        Topology::Inverting => vout / (vin + vout),
    }
}

/// A value a rectifier needs: present, finite and not negative.
fn needed(
    field: &'static str,
    label: &str,
    value: Option<f64>,
    why: &str,
    kind: QuantityKind,
) -> Result<f64, InputError> {
    match value {
        Some(v) => check::at_least(field, label, v, 0.0, kind),
        None => Err(InputError::new(field, format!("{label} is needed {why}"))),
    }
}

impl SwitchingInput {
    /// Check every value, in the order the fields appear on the page, and return the first
    /// problem.
    pub fn validate(&self) -> Result<ValidSwitching, InputError> {
        use QuantityKind::{
            Capacitance, Charge, Current, Inductance, Percent, Power, Resistance, Time, Voltage,
        };
        let vin_min = check::at_least("vinMin", "V_in,min", self.vin_min, 1e-3, Voltage)?;
        let vin_nom = check::finite("vinNom", "V_in,nom", self.vin_nom, Voltage)?;
        if vin_nom < vin_min {
            return Err(refuse(
                "vinNom",
                "V_in,nom must not be below V_in,min (",
                vin_min,
                Voltage,
                ")",
            ));
        }
        let vin_max = check::finite("vinMax", "V_in,max", self.vin_max, Voltage)?;
        if vin_max < vin_nom {
            return Err(refuse(
                "vinMax",
                "V_in,max must not be below V_in,nom (",
                vin_nom,
                Voltage,
                ")",
            ));
        }
        let label = match self.topology {
            Topology::Inverting => "|V_out|",
            _ => "V_out",
        };
        let vout = check::at_least("vout", label, self.vout, 1e-3, Voltage)?;
        match self.topology {
            Topology::Buck if vout >= vin_min => {
                return Err(refuse(
                    "vout",
                    "V_out must be below V_in,min (",
                    vin_min,
                    Voltage,
                    ") for a buck",
                ))
            }
            Topology::Boost if vout <= vin_max => {
                return Err(refuse(
                    "vout",
                    "V_out must be above V_in,max (",
                    vin_max,
                    Voltage,
                    ") for a boost: a boost cannot step down",
                ))
            }
            _ => {}
        }
        // Below 1 µA nothing on a board is a load worth a converter; the floor keeps the ripple
        // ratio finite.
        check::at_least("iout", "I_out", self.iout, 1e-6, Current)?;
        // Switching frequencies go beyond the 10^6 bound of other inputs; 1 Hz … 100 MHz.
        if !(1.0..=1e8).contains(&self.fsw) {
            return Err(InputError::new(
                "fsw",
                "f_sw must be between 1 Hz and 100 MHz",
            ));
        }
        let fsw = self.fsw;
        let period = 1.0 / fsw;
        if let Some(l) = self.inductance {
            // A 1 nH floor: below it the ripple of any board-level converter is unbounded.
            check::at_least("inductance", "L", l, 1e-9, Inductance)?;
        }
        if let Some(r) = self.ripple_ratio_pct {
            check::within("rippleRatioPct", "The ripple ratio", r, 1.0, 200.0, Percent)?;
        }
        if self.inductance.is_none() && self.ripple_ratio_pct.is_none() {
            return Err(InputError::new(
                "inductance",
                "L is needed, or a ripple ratio to propose it from",
            ));
        }
        check::at_least(
            "mainRdsOn",
            "R_DS(on) of the main switch",
            self.main_rds_on,
            0.0,
            Resistance,
        )?;
        let sync = "for a synchronous rectifier";
        let (rect_r, diode_vf, rect_qg, dead_time, body_vf) = match self.rectifier {
            Rectifier::Synchronous => (
                needed(
                    "rectRdsOn",
                    "R_DS(on) of the rectifier switch",
                    self.rect_rds_on,
                    sync,
                    Resistance,
                )?,
                0.0,
                needed(
                    "rectGateCharge",
                    "The rectifier's gate charge",
                    self.rect_gate_charge,
                    sync,
                    Charge,
                )?,
                needed("deadTime", "The dead time", self.dead_time, sync, Time)?,
                needed(
                    "bodyDiodeVf",
                    "The body-diode V_f",
                    self.body_diode_vf,
                    sync,
                    Voltage,
                )?,
            ),
            Rectifier::Diode => (
                0.0,
                needed(
                    "diodeVf",
                    "The diode V_f",
                    self.diode_vf,
                    "for a diode rectifier",
                    Voltage,
                )?,
                0.0,
                0.0,
                0.0,
            ),
        };
        let rise = check::at_least("riseTime", "t_r", self.rise_time, 0.0, Time)?;
        let fall = check::at_least("fallTime", "t_f", self.fall_time, 0.0, Time)?;
        if rise + fall >= period {
            return Err(refuse(
                "fallTime",
                "t_r + t_f must be shorter than the switching period (",
                period,
                Time,
                ")",
            ));
        }
        check::at_least(
            "mainGateCharge",
            "The main switch's gate charge",
            self.main_gate_charge,
            0.0,
            Charge,
        )?;
        check::at_least("driveV", "V_drv", self.drive_v, 0.0, Voltage)?;
        if 2.0 * dead_time >= period {
            return Err(refuse(
                "deadTime",
                "Twice the dead time must be shorter than the switching period (",
                period,
                Time,
                ")",
            ));
        }
        if let Some(q) = self.coss_charge {
            check::at_least("cossCharge", "Q_oss", q, 0.0, Charge)?;
        }
        if let Some(c) = self.coss {
            check::at_least("coss", "C_oss", c, 0.0, Capacitance)?;
            if self.coss_charge.is_some() {
                return Err(InputError::new(
                    "coss",
                    "Give the switch-node charge Q_oss or its capacitance C_oss, not both",
                ));
            }
        }
        check::at_least("dcr", "The DCR", self.dcr, 0.0, Resistance)?;
        check::at_least("coreLoss", "The core loss", self.core_loss, 0.0, Power)?;
        check::at_least("iq", "I_q", self.iq, 0.0, Current)?;
        // A 1 nF floor keeps the capacitive ripple finite.
        check::at_least("cout", "C_out", self.cout, 1e-9, Capacitance)?;
        check::at_least("esr", "The ESR", self.esr, 0.0, Resistance)?;
        check::at_least(
            "minOnTime",
            "The minimum on-time",
            self.min_on_time,
            0.0,
            Time,
        )?;
        let max_duty = check::within(
            "maxDutyPct",
            "The maximum duty",
            self.max_duty_pct,
            1.0,
            100.0,
            Percent,
        )? / 100.0;
        if let Some(isat) = self.isat {
            check::above("isat", "I_sat", isat, 0.0, Current)?;
        }
        // The lossless duty is highest at V_in,min for every topology.
        let duty = ideal_duty(self.topology, vin_min, vout);
        if duty > DUTY_CEILING {
            return Err(refuse(
                "vout",
                "At V_in,min this output needs a duty cycle of ",
                100.0 * duty,
                Percent,
                ", beyond the 99 % this estimate follows",
            ));
        }
        if duty > max_duty {
            return Err(refuse(
                "maxDutyPct",
                "At V_in,min the duty cycle must be ",
                100.0 * duty,
                Percent,
                ", above the maximum duty",
            ));
        }
        let mut valid = ValidSwitching {
            input: self.clone(),
            inductance: self.inductance.unwrap_or(0.0),
            proposed: self.inductance.is_none(),
            rect_r,
            diode_vf,
            rect_qg,
            dead_time,
            body_vf,
        };
        if valid.proposed {
            valid.inductance = [vin_min, vin_nom, vin_max]
                .into_iter()
                .filter_map(|vin| valid.inductance_for_ratio(vin))
                .fold(0.0, f64::max);
        }
        Ok(valid)
    }
}

/// Validate, then compute.
pub fn check_switching(input: &SwitchingInput) -> Result<SwitchingReport, InputError> {
    Ok(input.validate()?.report())
}

impl ValidSwitching {
    pub fn input(&self) -> &SwitchingInput {
        &self.input
    }

    /// The inductance used: given, or proposed from the ripple ratio.
    pub fn inductance(&self) -> f64 {
        self.inductance
    }

    /// The inductance giving the wanted ripple ratio at full load and `vin`, from the lossless
    /// CCM relations: L = v_on·D / (r·I_L·f); `None` when no ratio was given.
    pub fn inductance_for_ratio(&self, vin: f64) -> Option<f64> {
        let x = &self.input;
        let ratio = x.ripple_ratio_pct? / 100.0;
        let d = ideal_duty(x.topology, vin, x.vout);
        let (v_on, i_l) = match x.topology {
            Topology::Buck => (vin - x.vout, x.iout),
            _ => (vin, x.iout / (1.0 - d)),
        };
        Some(v_on * d / (ratio * i_l * x.fsw))
    }

    fn rect_drop(&self, i: f64) -> f64 {
        match self.input.rectifier {
            Rectifier::Synchronous => i * self.rect_r,
            Rectifier::Diode => self.diode_vf,
        }
    }

    /// The inductor's voltage while the main switch conducts, at interval-average current `i`.
    fn v_on(&self, vin: f64, i: f64) -> f64 {
        let x = &self.input;
        let drop = i * (x.main_rds_on + x.dcr);
        match x.topology {
            Topology::Buck => vin - x.vout - drop,
            _ => vin - drop,
        }
    }

    /// The magnitude of the inductor's voltage while the rectifier conducts.
    fn v_off(&self, vin: f64, i: f64) -> f64 {
        let x = &self.input;
        let v = x.vout + self.rect_drop(i) + i * x.dcr;
        match x.topology {
            Topology::Boost => v - vin,
            _ => v,
        }
    }

    /// v_on and v_off with every drop set to zero.
    fn lossless_voltages(&self, vin: f64) -> (f64, f64) {
        let vout = self.input.vout;
        match self.input.topology {
            Topology::Buck => (vin - vout, vout),
            Topology::Boost => (vin, vout - vin),
            Topology::Inverting => (vin, vout),
        }
    }

    fn switch_node_v(&self, vin: f64) -> f64 {
        let x = &self.input;
        match x.topology {
            Topology::Buck => vin,
            Topology::Boost => x.vout,
            Topology::Inverting => vin + x.vout,
        }
    }

    /// D1 from charge balance in DCM (see the module doc).
    fn dcm_duty(&self, v_on: f64, v_off: f64, iout: f64) -> f64 {
        let x = &self.input;
        let k = 2.0 * self.inductance * x.fsw * iout;
        match x.topology {
            Topology::Buck => libm::sqrt(k / (v_on * (1.0 + v_on / v_off))),
            _ => libm::sqrt(k * v_off) / v_on,
        }
    }

    /// The CCM operating point: (D, I_L, v_on, limited).
    fn solve_ccm(&self, vin: f64, iout: f64) -> (f64, f64, f64, bool) {
        let x = &self.input;
        let i_l = |d: f64| match x.topology {
            Topology::Buck => iout,
            _ => iout / (1.0 - d),
        };
        let mut d = ideal_duty(x.topology, vin, x.vout);
        let mut limited = false;
        for _ in 0..ITERATIONS {
            let i = i_l(d);
            let (v_on, v_off) = (self.v_on(vin, i), self.v_off(vin, i));
            if !(v_on > 0.0 && v_off > 0.0) {
                limited = true;
                break;
            }
            let next = v_off / (v_on + v_off);
            if next > DUTY_CEILING {
                limited = true;
                break;
            }
            let settled = libm::fabs(next - d) <= 1e-13;
            d = next;
            if settled {
                break;
            }
        }
        if limited {
            d = DUTY_CEILING;
        }
        let i = i_l(d);
        (d, i, self.v_on(vin, i).max(0.0), limited)
    }

    /// The DCM operating point (D1, D2, I_pk), or `None` when the converter is continuous at
    /// this load or the output is out of reach; the flag says it is out of reach (v_on or v_off
    /// stops being positive at the peak current).
    fn solve_dcm(&self, vin: f64, iout: f64) -> (Option<(f64, f64, f64)>, bool) {
        let (l, f) = (self.inductance, self.input.fsw);
        let (mut d1, mut d2, mut peak) = (0.0, 0.0, 0.0);
        for _ in 0..ITERATIONS {
            let (v_on, v_off) = (self.v_on(vin, peak / 2.0), self.v_off(vin, peak / 2.0));
            if !(v_on > 0.0 && v_off > 0.0) {
                return (None, true);
            }
            d1 = self.dcm_duty(v_on, v_off, iout);
            d2 = d1 * v_on / v_off;
            let next = v_on * d1 / (l * f);
            let settled = libm::fabs(next - peak) <= 1e-13 * next;
            peak = next;
            if settled {
                break;
            }
        }
        (
            (d1 + d2 < 1.0 && d1 <= DUTY_CEILING).then_some((d1, d2, peak)),
            false,
        )
    }

    /// The rectifier lets the inductor current stop (a diode, or a synchronous rectifier in
    /// discontinuous-allowed mode).
    pub fn may_stop(&self) -> bool {
        self.input.rectifier == Rectifier::Diode
            || self.input.light_load == LightLoad::DiscontinuousAllowed
    }

    /// The boundary load at `vin` from the lossless relations.
    fn boundary_load(&self, vin: f64) -> f64 {
        let x = &self.input;
        let d = ideal_duty(x.topology, vin, x.vout);
        let k = x.vout / (2.0 * self.inductance * x.fsw);
        match x.topology {
            Topology::Buck => k * (1.0 - d),
            Topology::Boost => k * d * (1.0 - d) * (1.0 - d),
            Topology::Inverting => k * (1.0 - d) * (1.0 - d),
        }
    }

    /// The converter at input `vin` and load `iout`.
    pub fn point(&self, label: CornerLabel, vin: f64, iout: f64) -> Corner {
        let x = &self.input;
        let (l, f) = (self.inductance, x.fsw);
        let period = 1.0 / f;
        let (dcm, out_of_reach) = if self.may_stop() {
            self.solve_dcm(vin, iout)
        } else {
            (None, false)
        };

        let mode;
        let (duty_ideal, duty, freewheel, idle, limited);
        let (ripple, i_l, peak, valley, l_rms, main_avg, main_rms, rect_avg, rect_rms);
        let charge; // the charge the output capacitor takes above the load in a period
        match dcm {
            Some((d1, d2, pk)) => {
                mode = Mode::Discontinuous;
                let (v_on, v_off) = self.lossless_voltages(vin);
                duty_ideal = self.dcm_duty(v_on, v_off, iout);
                (duty, freewheel, idle, limited) = (d1, d2, 1.0 - d1 - d2, false);
                (ripple, peak, valley) = (pk, pk, 0.0);
                i_l = pk * (d1 + d2) / 2.0;
                l_rms = pk * libm::sqrt((d1 + d2) / 3.0);
                (main_avg, main_rms) = (pk * d1 / 2.0, pk * libm::sqrt(d1 / 3.0));
                (rect_avg, rect_rms) = (pk * d2 / 2.0, pk * libm::sqrt(d2 / 3.0));
                let above = (pk - iout).max(0.0);
                let width = match x.topology {
                    Topology::Buck => d1 + d2,
                    _ => d2,
                };
                charge = 0.5 * above * above * width * period / pk;
            }
            None => {
                mode = Mode::Continuous;
                duty_ideal = ideal_duty(x.topology, vin, x.vout);
                let (d, il, v_on, lim) = self.solve_ccm(vin, iout);
                ripple = v_on * d * period / l;
                // A rectifier that lets the current stop cannot run continuous with a negative
                // valley: when the discontinuous solution was out of reach, so is the output.
                let stopped = out_of_reach && il < ripple / 2.0;
                (duty, freewheel, idle, limited) = (d, 1.0 - d, 0.0, lim || stopped);
                i_l = il;
                (peak, valley) = (il + ripple / 2.0, il - ripple / 2.0);
                l_rms = libm::sqrt(il * il + ripple * ripple / 12.0);
                (main_avg, main_rms) = (d * il, libm::sqrt(d) * l_rms);
                (rect_avg, rect_rms) = ((1.0 - d) * il, libm::sqrt(1.0 - d) * l_rms);
                charge = match x.topology {
                    Topology::Buck => ripple * period / 8.0,
                    _ => iout * d * period,
                };
            }
        }

        let v_sw = self.switch_node_v(vin);
        let sync = x.rectifier == Rectifier::Synchronous;
        let dead_edges = match mode {
            Mode::Continuous => libm::fabs(peak) + libm::fabs(valley),
            Mode::Discontinuous => peak,
        };
        let mut losses = Losses {
            main_conduction_w: main_rms * main_rms * x.main_rds_on,
            main_switching_w: 0.5
                * v_sw
                * f
                * (valley.max(0.0) * x.rise_time + peak.max(0.0) * x.fall_time),
            main_gate_w: x.main_gate_charge * x.drive_v * f,
            rect_conduction_w: rect_rms * rect_rms * self.rect_r,
            rect_gate_w: self.rect_qg * x.drive_v * f,
            dead_time_w: self.body_vf * self.dead_time * f * dead_edges,
            output_cap_w: match (x.coss_charge, x.coss) {
                (Some(q), _) => 0.5 * q * v_sw * f,
                (None, Some(c)) => 0.5 * c * v_sw * v_sw * f,
                (None, None) => 0.0,
            },
            diode_w: if sync { 0.0 } else { self.diode_vf * rect_avg },
            inductor_copper_w: l_rms * l_rms * x.dcr,
            inductor_core_w: x.core_loss,
            controller_w: vin * x.iq,
            // The capacitor carries what the load does not take of the inductor current (buck)
            // or of the rectifier current (boost, inverting): both average I_out, so its RMS²
            // is theirs less I_out².
            output_esr_w: x.esr
                * match x.topology {
                    Topology::Buck => l_rms * l_rms - iout * iout,
                    _ => rect_rms * rect_rms - iout * iout,
                }
                .max(0.0),
            total_w: 0.0,
        };
        losses.total_w = losses.main_conduction_w
            + losses.main_switching_w
            + losses.main_gate_w
            + losses.rect_conduction_w
            + losses.rect_gate_w
            + losses.dead_time_w
            + losses.output_cap_w
            + losses.diode_w
            + losses.inductor_copper_w
            + losses.inductor_core_w
            + losses.controller_w
            + losses.output_esr_w;
        let output_w = x.vout * iout;
        let input_w = output_w + losses.total_w;
        let cap_v = charge / x.cout;
        let esr_v = x.esr
            * match x.topology {
                Topology::Buck => ripple,
                _ => peak,
            };
        Corner {
            label,
            vin,
            iout,
            mode,
            duty_ideal,
            duty,
            freewheel_duty: freewheel,
            idle_duty: idle,
            duty_limited: limited,
            on_time_s: duty * period,
            ripple_a: ripple,
            ripple_ratio_pct: 100.0 * ripple / i_l,
            inductor_avg_a: i_l,
            inductor_peak_a: peak,
            inductor_valley_a: valley,
            inductor_rms_a: l_rms,
            main_avg_a: main_avg,
            main_rms_a: main_rms,
            rect_avg_a: rect_avg,
            rect_rms_a: rect_rms,
            boundary_load_a: self.boundary_load(vin),
            output_ripple_v: cap_v + esr_v,
            output_ripple_cap_v: cap_v,
            output_ripple_esr_v: esr_v,
            losses,
            output_w,
            input_w,
            efficiency_pct: 100.0 * output_w / input_w,
            input_current_a: input_w / vin,
            l_for_ratio_h: self.inductance_for_ratio(vin),
        }
    }

    /// The three input corners at full load.
    pub fn corners(&self) -> [Corner; 3] {
        let x = &self.input;
        [
            self.point(CornerLabel::Min, x.vin_min, x.iout),
            self.point(CornerLabel::Nom, x.vin_nom, x.iout),
            self.point(CornerLabel::Max, x.vin_max, x.iout),
        ]
    }

    /// The k-th load of the sweep: log-spaced from [`SWEEP_FROM`] to [`SWEEP_TO`] of I_out.
    pub fn sweep_load(&self, k: usize) -> f64 {
        let step = k as f64 / (SWEEP_POINTS - 1) as f64;
        self.input.iout * SWEEP_FROM * libm::pow(SWEEP_TO / SWEEP_FROM, step)
    }

    /// Compute every result. Cannot fail: the input was checked.
    pub fn report(&self) -> SwitchingReport {
        use QuantityKind::{Current, Inductance, Percent, Time, Voltage};
        let x = &self.input;
        let corners = self.corners();
        let mut short_on_light_load = false;
        let sweep = corners.map(|c| {
            let mut curve = Curve {
                label: c.label,
                vin: c.vin,
                iout_a: Vec::with_capacity(SWEEP_POINTS),
                efficiency_pct: Vec::with_capacity(SWEEP_POINTS),
                loss_w: Vec::with_capacity(SWEEP_POINTS),
                discontinuous: Vec::with_capacity(SWEEP_POINTS),
            };
            for k in 0..SWEEP_POINTS {
                let p = self.point(c.label, c.vin, self.sweep_load(k));
                short_on_light_load |= p.on_time_s < x.min_on_time;
                curve.iout_a.push(p.iout);
                curve.efficiency_pct.push(p.efficiency_pct);
                curve.loss_w.push(p.losses.total_w);
                curve.discontinuous.push(p.mode == Mode::Discontinuous);
            }
            curve
        });
        let vin_words = |c: &Corner| format!("V_in {}", show(c.vin, Voltage));

        let mut checks = Vec::new();
        let most = corners
            .iter()
            .fold(&corners[0], |a, c| if c.duty > a.duty { c } else { a });
        let least = corners
            .iter()
            .fold(&corners[0], |a, c| if c.duty < a.duty { c } else { a });
        let max_duty = x.max_duty_pct / 100.0;
        let (status, text) = if let Some(c) = corners.iter().find(|c| c.duty_limited) {
            (
                Status::Fail,
                format!(
                    "At {} the losses keep the output from reaching {} below 99 % duty; the \
                     figures there are at that limit.",
                    vin_words(c),
                    show(x.vout, Voltage)
                ),
            )
        } else if most.duty > max_duty {
            (
                Status::Fail,
                format!(
                    "With losses the duty cycle reaches {} at {}, above the maximum duty {}: \
                     the output sags there.",
                    show_duty(most.duty),
                    vin_words(most),
                    show(x.max_duty_pct, Percent)
                ),
            )
        } else {
            (
                Status::Pass,
                format!(
                    "With losses the duty cycle stays between {} and {}, within the maximum \
                     duty {}.",
                    show_duty(least.duty),
                    show_duty(most.duty),
                    show(x.max_duty_pct, Percent)
                ),
            )
        };
        checks.push(Check {
            id: CheckId::Duty,
            title: "Duty cycle".into(),
            status,
            text,
        });
        let shortest =
            corners.iter().fold(
                &corners[0],
                |a, c| {
                    if c.on_time_s < a.on_time_s {
                        c
                    } else {
                        a
                    }
                },
            );
        let short = shortest.on_time_s < x.min_on_time;
        checks.push(Check {
            id: CheckId::OnTime,
            title: "Minimum on-time".into(),
            status: if short { Status::Fail } else { Status::Pass },
            text: format!(
                "The shortest on-time at full load is {} at {}, {} the minimum on-time {}{}",
                show(shortest.on_time_s, Time),
                vin_words(shortest),
                if short { "below" } else { "above" },
                show(x.min_on_time, Time),
                if short {
                    ": the controller skips pulses or loses regulation there."
                } else {
                    "."
                }
            ),
        });
        let highest = corners.iter().fold(&corners[0], |a, c| {
            if c.inductor_peak_a > a.inductor_peak_a {
                c
            } else {
                a
            }
        });
        if let Some(isat) = x.isat {
            let over = highest.inductor_peak_a > isat;
            checks.push(Check {
                id: CheckId::Saturation,
                title: "Inductor saturation".into(),
                status: if over { Status::Fail } else { Status::Pass },
                text: format!(
                    "The inductor current peaks at {} at {}, {} its saturation current {}{}",
                    show(highest.inductor_peak_a, Current),
                    vin_words(highest),
                    if over { "above" } else { "within" },
                    show(isat, Current),
                    if over {
                        ": the inductance collapses and the peak current runs away."
                    } else {
                        "."
                    }
                ),
            });
        }

        let verdict = overall(&checks);
        let summary = match verdict {
            Status::Pass => String::from("The converter passes every check at each input corner."),
            Status::Marginal => format!(
                "The converter works but misses a wanted margin: {}.",
                titles_with(&checks, Status::Marginal)
            ),
            Status::Fail => format!(
                "The converter fails: {}.",
                titles_with(&checks, Status::Fail)
            ),
        };

        let mut warnings = Vec::new();
        if x.vin_max > 60.0 || (x.topology != Topology::Buck && x.vout > 60.0) {
            warnings.push(String::from(
                "A voltage above about 60 V DC is hazardous and outside what railnote checks.",
            ));
        }
        if self.proposed {
            warnings.push(format!(
                "L = {} is proposed for a {} ripple ratio at the corner that needs the most; \
                 pick a standard value near it and enter it as L.",
                show(self.inductance, Inductance),
                show(x.ripple_ratio_pct.unwrap_or(0.0), Percent)
            ));
        }
        // Common practice: a ripple ratio of 20–40 % of the load current is the usual starting
        // point for the inductor; well outside it, say so (a continuous full load only: in
        // discontinuous conduction the ratio is large by nature).
        if let Some(c) = corners.iter().find(|c| {
            c.mode == Mode::Continuous
                && !(RIPPLE_USUAL_LOW..=RIPPLE_USUAL_HIGH).contains(&c.ripple_ratio_pct)
        }) {
            warnings.push(format!(
                "At full load and {} the ripple ratio is {}, outside the usual 20–40 % starting \
                 point: {}",
                vin_words(c),
                show(c.ripple_ratio_pct, Percent),
                if c.ripple_ratio_pct > RIPPLE_USUAL_HIGH {
                    "more inductance lowers the peak current, the core loss and the output ripple"
                } else {
                    "a smaller inductor would be smaller and respond faster to load steps"
                }
            ));
        }
        if let Some(c) = corners.iter().find(|c| c.mode == Mode::Discontinuous) {
            warnings.push(format!(
                "At full load and {} the inductor current is discontinuous (boundary load {}): \
                 peak current and output ripple are higher than in a continuous design.",
                vin_words(c),
                show(c.boundary_load_a, Current)
            ));
        }
        if let Some(c) = corners.iter().find(|c| c.inductor_valley_a < 0.0) {
            warnings.push(if self.may_stop() {
                // The continuous solution reverses the current, the discontinuous one finds
                // the interval too long: with drops this large the first-order relations
                // disagree, and no consistent operating point exists in this model.
                format!(
                    "At {} the drops are so large that the continuous and discontinuous \
                     relations disagree (valley {}): the figures there are not a consistent \
                     operating point; reduce the resistances or the ripple.",
                    vin_words(c),
                    show(c.inductor_valley_a, Current)
                )
            } else {
                format!(
                    "In forced-continuous mode the inductor current reverses in every cycle \
                     at {} (valley {}); the circulating current keeps light-load losses high.",
                    vin_words(c),
                    show(c.inductor_valley_a, Current)
                )
            });
        }
        if short_on_light_load && !short {
            warnings.push(format!(
                "At the lightest loads of the sweep the on-time falls below the minimum \
                 on-time {}; there the controller skips pulses and the curve only estimates a \
                 converter that keeps switching.",
                show(x.min_on_time, Time)
            ));
        }

        SwitchingReport {
            verdict,
            summary,
            checks,
            warnings,
            inductance_h: self.inductance,
            inductance_proposed: self.proposed,
            peak_current_a: highest.inductor_peak_a,
            corners,
            sweep,
        }
    }
}

mod out {
    use super::*;
    use crate::output::{out_object, out_words, Out, ToOut};

    out_words!(CheckId { Duty => "duty", OnTime => "onTime", Saturation => "saturation" });
    out_words!(Mode { Continuous => "continuous", Discontinuous => "discontinuous" });

    impl ToOut for Losses {
        fn to_out(&self) -> Out {
            out_object! {
                "mainConductionW": self.main_conduction_w,
                "mainSwitchingW": self.main_switching_w,
                "mainGateW": self.main_gate_w,
                "rectConductionW": self.rect_conduction_w,
                "rectGateW": self.rect_gate_w,
                "deadTimeW": self.dead_time_w,
                "outputCapW": self.output_cap_w,
                "diodeW": self.diode_w,
                "inductorCopperW": self.inductor_copper_w,
                "inductorCoreW": self.inductor_core_w,
                "controllerW": self.controller_w,
                "outputEsrW": self.output_esr_w,
                "totalW": self.total_w,
            }
        }
    }

    impl ToOut for Corner {
        fn to_out(&self) -> Out {
            out_object! {
                "label": self.label,
                "vin": self.vin,
                "iout": self.iout,
                "mode": self.mode,
                "dutyIdeal": self.duty_ideal,
                "duty": self.duty,
                "freewheelDuty": self.freewheel_duty,
                "idleDuty": self.idle_duty,
                "dutyLimited": self.duty_limited,
                "onTimeS": self.on_time_s,
                "rippleA": self.ripple_a,
                "rippleRatioPct": self.ripple_ratio_pct,
                "inductorAvgA": self.inductor_avg_a,
                "inductorPeakA": self.inductor_peak_a,
                "inductorValleyA": self.inductor_valley_a,
                "inductorRmsA": self.inductor_rms_a,
                "mainAvgA": self.main_avg_a,
                "mainRmsA": self.main_rms_a,
                "rectAvgA": self.rect_avg_a,
                "rectRmsA": self.rect_rms_a,
                "boundaryLoadA": self.boundary_load_a,
                "outputRippleV": self.output_ripple_v,
                "outputRippleCapV": self.output_ripple_cap_v,
                "outputRippleEsrV": self.output_ripple_esr_v,
                "losses": self.losses,
                "outputW": self.output_w,
                "inputW": self.input_w,
                "efficiencyPct": self.efficiency_pct,
                "inputCurrentA": self.input_current_a,
                "lForRatioH": self.l_for_ratio_h,
            }
        }
    }

    impl ToOut for Curve {
        fn to_out(&self) -> Out {
            out_object! {
                "label": self.label,
                "vin": self.vin,
                "ioutA": self.iout_a,
                "efficiencyPct": self.efficiency_pct,
                "lossW": self.loss_w,
                "discontinuous": self.discontinuous,
            }
        }
    }

    impl ToOut for SwitchingReport {
        fn to_out(&self) -> Out {
            out_object! {
                "verdict": self.verdict,
                "summary": self.summary,
                "checks": self.checks,
                "warnings": self.warnings,
                "inductanceH": self.inductance_h,
                "inductanceProposed": self.inductance_proposed,
                "corners": self.corners,
                "sweep": self.sweep,
                "peakCurrentA": self.peak_current_a,
            }
        }
    }
}
