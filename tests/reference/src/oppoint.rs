//! DC operating points from ngspice: a netlist in, the asked node voltages out.
//!
//! The deck is run in batch mode with a `.control` block that runs `op` and prints each node
//! with 12 significant digits (`set numdgt=12`), then `quit 0` (batch mode would otherwise exit
//! 1 for want of a dot analysis); the printed `v(node) = value` lines are read back. Like `spice::simulate`, a missing ngspice is an error that says how to install it, so a
//! cross-check can never pass without having run.

use std::fs;
use std::io::ErrorKind;
use std::path::PathBuf;
use std::process::Command;
use std::sync::atomic::{AtomicUsize, Ordering};

/// Run the operating point of `netlist` (element lines only) and return the voltage of each
/// node in `nodes`, in order.
pub fn operating_point(name: &str, netlist: &str, nodes: &[&str]) -> Result<Vec<f64>, String> {
    static RUNS: AtomicUsize = AtomicUsize::new(0);
    let run_id = RUNS.fetch_add(1, Ordering::Relaxed);
    let slug: String = name
        .chars()
        .map(|c| if c.is_ascii_alphanumeric() { c } else { '-' })
        .collect();
    let dir: PathBuf = std::env::temp_dir().join(format!(
        "railnote-op-{}-{run_id}-{slug}",
        std::process::id()
    ));
    let _ = fs::remove_dir_all(&dir);
    fs::create_dir_all(&dir).map_err(|e| format!("cannot create {}: {e}", dir.display()))?;
    let probes: Vec<String> = nodes.iter().map(|n| format!("v({n})")).collect();
    let deck = format!(
        "* railnote {name}\n{netlist}\n.control\nset numdgt=12\nop\nprint {}\nquit 0\n.endc\n.end\n",
        probes.join(" ")
    );
    fs::write(dir.join("deck.cir"), &deck).map_err(|e| format!("cannot write the deck: {e}"))?;
    let out = match Command::new("ngspice")
        .arg("-b")
        .arg("deck.cir")
        .current_dir(&dir)
        .output()
    {
        Ok(out) => out,
        Err(e) if e.kind() == ErrorKind::NotFound => {
            return Err(
                "ngspice is not installed, so the operating point cannot be \
                        cross-checked. Install it with `sudo apt-get install ngspice` (Debian), \
                        or run `cargo xtask test` as root, which installs it"
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
        return Err(format!("ngspice failed ({}):\n{deck}\n{log}", out.status));
    }
    let values = probes
        .iter()
        .map(|probe| {
            log.lines()
                .find_map(|line| {
                    let (left, right) = line.split_once('=')?;
                    (left.trim() == probe).then(|| right.trim().parse::<f64>().ok())?
                })
                .ok_or_else(|| format!("ngspice printed no {probe}:\n{deck}\n{log}"))
        })
        .collect::<Result<Vec<f64>, String>>()?;
    let _ = fs::remove_dir_all(&dir);
    Ok(values)
}
