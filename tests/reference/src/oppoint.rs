//! DC operating points from ngspice: a netlist in, the asked node voltages out.
//!
//! The deck's `.control` block runs `op` and prints each node with 12 significant digits
//! (`set numdgt=12`) into `out.txt`, then `quit 0` (batch mode would otherwise exit 1 for want of
//! a dot analysis); [`crate::spice::run_deck`] runs it, and the printed `v(node) = value` lines
//! are read back. A missing ngspice is an error that says how to install it, so a cross-check
//! can never pass without having run.

use crate::spice::run_deck;

/// Run the operating point of `netlist` (element lines only) and return the voltage of each
/// node in `nodes`, in order.
pub fn operating_point(name: &str, netlist: &str, nodes: &[&str]) -> Result<Vec<f64>, String> {
    let probes: Vec<String> = nodes.iter().map(|n| format!("v({n})")).collect();
    let deck = format!(
        "* railnote {name}\n{netlist}\n.control\nset numdgt=12\nop\nprint {} > out.txt\nquit 0\n.endc\n.end\n",
        probes.join(" ")
    );
    let (data, log, shown) = run_deck(name, &deck)?;
    probes
        .iter()
        .map(|probe| {
            data.lines()
                .find_map(|line| {
                    let (left, right) = line.split_once('=')?;
                    (left.trim() == probe).then(|| right.trim().parse::<f64>().ok())?
                })
                .ok_or_else(|| format!("ngspice printed no {probe} for {shown}:\n{log}"))
        })
        .collect()
}
