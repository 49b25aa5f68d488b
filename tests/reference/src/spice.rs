//! The Foster network as an electrical circuit, simulated by ngspice.
//!
//! The thermal–electrical analogy maps temperature rise to voltage, heat flow to current,
//! thermal resistance (K/W) to resistance (Ω) and heat capacity (J/K) to capacitance (F). A
//! Foster stage (R_i, τ_i) becomes a resistor R_i in parallel with a capacitor C_i = τ_i/R_i;
//! the stages sit in series from the junction node `j` to ground (the ambient), and a current
//! source drives the dissipated power P (as amperes) into `j`. The voltage of `j` is then the
//! junction's rise above ambient, in kelvin. ngspice integrates the circuit by itself (its
//! default trapezoidal method with local truncation error control), so its answer does not
//! share any arithmetic with core's closed forms.

use railnote_core::thermal::{FosterStage, ProfileStep};
use std::fmt::Write as _;
use std::fs;
use std::io::ErrorKind;
use std::path::PathBuf;
use std::process::Command;
use std::sync::atomic::{AtomicUsize, Ordering};

/// A power waveform as SPICE PWL corners: (time s, power W), times strictly increasing.
pub type Pwl = Vec<(f64, f64)>;

/// The corners of a piecewise-constant power profile repeated `periods` times from t = 0.
///
/// SPICE cannot jump, so each change of power is a straight ramp of width `edge` centred on the
/// step boundary: the energy of every step is then exactly P·Δt, as in core's stepped solution,
/// and the shape differs from a jump only within ±edge/2 of the boundary.
pub fn profile_pwl(profile: &[ProfileStep], periods: u32, edge: f64) -> Pwl {
    let mut corners = Vec::new();
    let mut t = 0.0;
    let mut power = profile.first().map_or(0.0, |s| s.power_w);
    corners.push((0.0, power));
    for _ in 0..periods {
        for step in profile {
            if step.power_w != power {
                corners.push((t - edge / 2.0, power));
                corners.push((t + edge / 2.0, step.power_w));
                power = step.power_w;
            }
            t += step.duration_s;
        }
    }
    // The profile starts at its first step's power, so no ramp sits at t = 0.
    corners.push((t, power));
    corners
}

/// What the transient analysis is asked for.
#[derive(Clone, Copy, Debug)]
pub struct Transient {
    /// End of the analysis, s.
    pub stop: f64,
    /// Output is kept from this time on (the analysis still starts cold at 0), s.
    pub keep_from: f64,
    /// Largest internal time step ngspice may take, s.
    pub max_step: f64,
}

/// The SPICE deck of `stages` driven by `power`, with a `.control` block that runs the analysis
/// and writes time and v(j) to `out_file` with `wrdata`.
pub fn foster_deck(
    stages: &[FosterStage],
    power: &[(f64, f64)],
    tran: Transient,
    out_file: &str,
) -> String {
    let mut deck = String::from("* railnote Foster network, electrical analogue (V = K, A = W)\n");
    // ngspice reads a long PWL list through `+` continuation lines.
    deck.push_str("Ip 0 j PWL(\n");
    for (t, p) in power {
        writeln!(deck, "+ {t:.15e} {p:.15e}").unwrap();
    }
    deck.push_str("+ )\n");
    for (i, s) in stages.iter().enumerate() {
        let from = if i == 0 {
            "j".to_string()
        } else {
            format!("n{i}")
        };
        let to = if i + 1 == stages.len() {
            "0".to_string()
        } else {
            format!("n{}", i + 1)
        };
        let c = s.tau / s.r;
        writeln!(deck, "R{i} {from} {to} {:.15e}", s.r).unwrap();
        writeln!(deck, "C{i} {from} {to} {c:.15e}").unwrap();
    }
    // reltol 1e-6 (default 1e-3) and a small max step keep SPICE's own error far below the
    // tolerance of the comparison; `uic` starts every capacitor at 0 V (cold) without an
    // operating-point solve (which, with the source at 0 A at t = 0, would give the same).
    let step = tran.max_step;
    write!(
        deck,
        ".control\n\
         set wr_singlescale\n\
         set wr_vecnames\n\
         option reltol=1e-6 abstol=1e-15 vntol=1e-12\n\
         tran {step:.6e} {:.15e} {:.15e} {step:.6e} uic\n\
         wrdata {out_file} v(j)\n\
         quit\n\
         .endc\n\
         .end\n",
        tran.stop, tran.keep_from
    )
    .unwrap();
    deck
}

/// A sampled waveform: times (increasing) and values.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Trace {
    pub t: Vec<f64>,
    pub v: Vec<f64>,
}

impl Trace {
    /// The value at `time`, linearly interpolated between the nearest samples (ngspice puts a
    /// time point on every PWL corner, so at a step boundary this is a computed point).
    pub fn at(&self, time: f64) -> f64 {
        let i = self.t.partition_point(|&x| x < time);
        if i == 0 {
            return self.v[0];
        }
        if i == self.t.len() {
            return self.v[i - 1];
        }
        let (t0, t1, v0, v1) = (self.t[i - 1], self.t[i], self.v[i - 1], self.v[i]);
        if t1 == t0 {
            return v1;
        }
        v0 + (v1 - v0) * (time - t0) / (t1 - t0)
    }

    /// Largest and smallest value among the samples with `from ≤ t ≤ to`.
    pub fn extremes(&self, from: f64, to: f64) -> (f64, f64) {
        self.t
            .iter()
            .zip(&self.v)
            .filter(|(&t, _)| t >= from && t <= to)
            .fold((f64::NEG_INFINITY, f64::INFINITY), |(hi, lo), (_, &v)| {
                (hi.max(v), lo.min(v))
            })
    }
}

/// Reads `wrdata` output: rows of whitespace-separated numbers, time first and the vector
/// second. Lines that are not two numbers (the vector-name header, blank lines, notes) are
/// skipped; rows must come in increasing time (ngspice may repeat a time at a breakpoint; the
/// later row wins).
pub fn parse_wrdata(text: &str) -> Result<Trace, String> {
    let mut trace = Trace::default();
    for line in text.lines() {
        let mut fields = line.split_whitespace().map(str::parse::<f64>);
        let (Some(Ok(t)), Some(Ok(v))) = (fields.next(), fields.next()) else {
            continue;
        };
        if !t.is_finite() || !v.is_finite() {
            return Err(format!("non-finite value in the ngspice output: {line:?}"));
        }
        match trace.t.last() {
            Some(&last) if t < last => {
                return Err(format!(
                    "time goes backwards in the ngspice output at {line:?}"
                ))
            }
            Some(&last) if t == last => {
                *trace.v.last_mut().unwrap() = v;
            }
            _ => {
                trace.t.push(t);
                trace.v.push(v);
            }
        }
    }
    if trace.t.len() < 2 {
        return Err("the ngspice output has fewer than two data rows".into());
    }
    Ok(trace)
}

/// Runs `ngspice -b` on the deck in a fresh folder under the system temp dir and returns v(j).
///
/// A missing ngspice is an error that says how to install it: the cross-check must never pass
/// without having run.
pub fn simulate(
    name: &str,
    stages: &[FosterStage],
    power: &[(f64, f64)],
    tran: Transient,
) -> Result<Trace, String> {
    let (data, log, deck_path) = run_deck(name, &foster_deck(stages, power, tran, "out.txt"))?;
    let trace = parse_wrdata(&data).map_err(|e| format!("{e} ({deck_path})"))?;
    // A run that gave up early (time step too small) still exits 0: it must reach the end.
    let last = *trace.t.last().unwrap();
    if (last - tran.stop).abs() > 1e-9 * tran.stop.max(1.0) {
        return Err(format!(
            "ngspice stopped at t = {last} s, not at the end {} s:\n{log}",
            tran.stop
        ));
    }
    Ok(trace)
}

/// Runs `ngspice -b deck.cir` on `deck` in a fresh folder under the system temp dir and returns
/// what the deck wrote to `out.txt` (its `wrdata` file), ngspice's log, and the deck's path (for
/// messages). The folder is removed after a run that wrote its output and kept after a failure,
/// so the deck can be run again by hand.
///
/// A missing ngspice is an error that says how to install it: the cross-check must never pass
/// without having run.
pub fn run_deck(name: &str, deck: &str) -> Result<(String, String, String), String> {
    // One folder per run: tests run in parallel and may share a case name.
    static RUNS: AtomicUsize = AtomicUsize::new(0);
    let run_id = RUNS.fetch_add(1, Ordering::Relaxed);
    let slug: String = name
        .chars()
        .map(|c| if c.is_ascii_alphanumeric() { c } else { '-' })
        .collect();
    let dir: PathBuf = std::env::temp_dir().join(format!(
        "railnote-spice-{}-{run_id}-{slug}",
        std::process::id()
    ));
    let _ = fs::remove_dir_all(&dir);
    fs::create_dir_all(&dir).map_err(|e| format!("cannot create {}: {e}", dir.display()))?;
    let deck_path = dir.join("deck.cir");
    let shown = deck_path.display().to_string();
    fs::write(&deck_path, deck).map_err(|e| format!("cannot write {shown}: {e}"))?;
    let run = Command::new("ngspice")
        .arg("-b")
        .arg("deck.cir")
        .current_dir(&dir)
        .output();
    let out = match run {
        Ok(out) => out,
        Err(e) if e.kind() == ErrorKind::NotFound => {
            return Err(
                "ngspice is not installed, so core cannot be cross-checked against it. \
                 Install it with `sudo apt-get install ngspice` (Debian), or run \
                 `cargo xtask test` as root, which installs it"
                    .into(),
            )
        }
        Err(e) => return Err(format!("could not start ngspice: {e}")),
    };
    let log = format!(
        "{}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    if !out.status.success() {
        return Err(format!(
            "ngspice failed ({}) on {shown}:\n{log}",
            out.status
        ));
    }
    let data = fs::read_to_string(dir.join("out.txt"))
        .map_err(|e| format!("ngspice wrote no output for {shown} ({e}):\n{log}"))?;
    let _ = fs::remove_dir_all(&dir);
    Ok((data, log, shown))
}

/// Columns of a `wrdata` file written with `wr_singlescale` and `wr_vecnames`: the header's
/// names and one column per name (time first).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Table {
    pub names: Vec<String>,
    pub columns: Vec<Vec<f64>>,
}

impl Table {
    /// The column named `name` (as ngspice spells it in the header, case-insensitive).
    pub fn column(&self, name: &str) -> Result<&[f64], String> {
        self.names
            .iter()
            .position(|n| n.eq_ignore_ascii_case(name))
            .map(|i| self.columns[i].as_slice())
            .ok_or_else(|| format!("no column {name:?} among {:?}", self.names))
    }
}

/// Reads a `wrdata` file of several vectors: the first line that is not all numbers names the
/// columns; every row of exactly that many numbers is data. Rows must come in increasing time
/// in the first column (a repeated time at a breakpoint: the later row wins).
pub fn parse_table(text: &str) -> Result<Table, String> {
    let mut table = Table::default();
    for line in text.lines() {
        let fields: Vec<&str> = line.split_whitespace().collect();
        if fields.is_empty() {
            continue;
        }
        let numbers: Result<Vec<f64>, _> = fields.iter().map(|f| f.parse::<f64>()).collect();
        let Ok(row) = numbers else {
            if table.names.is_empty() {
                table.names = fields.iter().map(|f| f.to_string()).collect();
                table.columns = vec![Vec::new(); table.names.len()];
            }
            continue;
        };
        if table.names.is_empty() {
            return Err("the ngspice output has data before its header of names".into());
        }
        if row.len() != table.names.len() {
            return Err(format!(
                "a row of {} numbers under {} names: {line:?}",
                row.len(),
                table.names.len()
            ));
        }
        if row.iter().any(|v| !v.is_finite()) {
            return Err(format!("non-finite value in the ngspice output: {line:?}"));
        }
        let t = row[0];
        match table.columns[0].last() {
            Some(&last) if t < last => {
                return Err(format!(
                    "time goes backwards in the ngspice output at {line:?}"
                ))
            }
            Some(&last) if t == last => {
                for (column, v) in table.columns.iter_mut().zip(row) {
                    *column.last_mut().unwrap() = v;
                }
            }
            _ => {
                for (column, v) in table.columns.iter_mut().zip(row) {
                    column.push(v);
                }
            }
        }
    }
    if table.columns.first().map_or(0, Vec::len) < 2 {
        return Err("the ngspice output has fewer than two data rows".into());
    }
    Ok(table)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_wrdata_with_header_noise_and_repeated_times() {
        let text = " time v(j)\n\n 0.0e+00 0.0e+00 \n 1.0e-3  2.5e+00\n 1.0e-3 2.6e+00\nnote\n 3.0e-3 3.0e+00 \n";
        let trace = parse_wrdata(text).unwrap();
        assert_eq!(trace.t, [0.0, 1e-3, 3e-3]);
        assert_eq!(trace.v, [0.0, 2.6, 3.0]);
        assert!((trace.at(2e-3) - 2.8).abs() < 1e-12);
        assert_eq!(trace.at(-1.0), 0.0);
        assert_eq!(trace.at(1.0), 3.0);
        assert_eq!(trace.extremes(0.5e-3, 3e-3), (3.0, 2.6));
        assert!(parse_wrdata("0 1\n").is_err());
        assert!(parse_wrdata("0 1\n2 3\n1 4\n").is_err());
    }

    #[test]
    fn reads_a_table_of_several_vectors() {
        let text = " time v(out) l1#branch\n 0.0e+00 1.0 2.0\n 1.0e-6 1.5 2.5\n 1.0e-6 1.6 2.6\n";
        let table = parse_table(text).unwrap();
        assert_eq!(table.column("TIME").unwrap(), [0.0, 1e-6]);
        assert_eq!(table.column("v(out)").unwrap(), [1.0, 1.6]);
        assert_eq!(table.column("l1#branch").unwrap(), [2.0, 2.6]);
        assert!(table.column("i(x)").is_err());
        assert!(parse_table("t a\n0 1\n").is_err());
        assert!(parse_table("t a\n0 1\n1 2 3\n").is_err());
        assert!(parse_table("0 1\n1 2\n").is_err());
        assert!(parse_table("t a\n0 1\n2 3\n1 4\n").is_err());
    }

    #[test]
    fn profile_corners_keep_each_steps_energy() {
        let profile = [
            ProfileStep {
                power_w: 1.0,
                duration_s: 0.02,
            },
            ProfileStep {
                power_w: 0.0,
                duration_s: 0.08,
            },
        ];
        let pwl = profile_pwl(&profile, 2, 1e-6);
        assert_eq!(pwl.first(), Some(&(0.0, 1.0)));
        assert!(pwl.windows(2).all(|w| w[1].0 > w[0].0), "{pwl:?}");
        // Trapezoid area = energy: two periods of 1 W for 20 ms.
        let energy: f64 = pwl
            .windows(2)
            .map(|w| (w[1].0 - w[0].0) * (w[0].1 + w[1].1) / 2.0)
            .sum();
        assert!((energy - 0.04).abs() < 1e-15, "{energy}");
        assert!((pwl.last().unwrap().0 - 0.2).abs() < 1e-15);
    }
}
