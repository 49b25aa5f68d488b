//! `cargo xtask bench`: figures, never pass/fail on time.
//!
//! 1. WASM size: after wasm-bindgen (before wasm-opt), after wasm-opt, and gzip -9; and where
//!    the bytes go: function bodies summed by part (core module, crate), from the names that
//!    wasm-bindgen's output still has.
//! 2. In headless Chromium (tests/bench/browser.mjs): first-load weight of the linear page
//!    (every response gzipped), navigation to the first result, and edit to painted result.
//! 3. The same batch of linear checks natively (core/examples/bench_linear.rs) and in WASM under
//!    Node (tests/bench/wasm_linear.mjs), printed as a ratio.
//! 4. A 10 000-step T_j(t) series of an eight-stage Foster network (one thermal check each),
//!    natively (core/examples/bench_thermal.rs) and through the page's own WASM in headless
//!    Chromium (tests/bench/wasm_thermal.mjs), side by side with their ratio.
//! 5. The divider picker: an exhaustive E192 search over 1 kΩ–1 MΩ and a 100 000-sample Monte
//!    Carlo run, natively (core/examples/bench_divider.rs) and in headless Chromium
//!    (tests/bench/wasm_divider.mjs), with their ratios.
//! 6. Full switching-estimate reports (3 V_in corners × 50 sweep loads each), natively
//!    (core/examples/bench_switching.rs) and through the page's own WASM in headless Chromium
//!    (tests/bench/wasm_switching.mjs), side by side with their ratio.
//! 7. A 200-rail, 1000-load rail tree, natively (core/examples/bench_tree.rs) and in headless
//!    Chromium (tests/bench/wasm_tree.mjs), with their ratio; and the length of the demo tree's
//!    compressed share link (tests/bench/tree_link.mjs).

use crate::util::{self, header, output, repo_root, run, Result};
use crate::{
    bindgen_size_record, build_site, cargo, linear_page, pkg_dir, server, site_dir, target_dir,
    tools, wasm_names,
};
use std::fs;
use std::process::Command;

/// Checks per run of the native-vs-WASM comparison: about a tenth of a second natively.
const LINEAR_CHECKS: &str = "20000";
/// Thermal checks (10 000-step series each) per run: about half a second natively.
const THERMAL_CHECKS: &str = "200";
/// Runs of each divider job: about a quarter of a second natively for both.
const DIVIDER_RUNS: &str = "20";
/// Switching reports (150 sweep points each) per run: about a tenth of a second natively.
const SWITCHING_CHECKS: &str = "2000";
/// Rail-tree checks per run (200 rails, 1000 loads each): about 50 ms natively.
const TREE_CHECKS: &str = "20";

pub fn bench() -> Result {
    tools::ensure_bench_tools()?;
    build_site()?;
    sizes()?;
    browser()?;
    native_vs_wasm()?;
    thermal_series()?;
    divider()?;
    switching_sweep()?;
    tree()?;
    println!();
    println!("xtask bench: done (figures only; nothing here fails on time)");
    Ok(())
}

fn sizes() -> Result {
    header("bench 1/7: WASM size");
    let record = bindgen_size_record();
    let raw: u64 = fs::read_to_string(&record)
        .ok()
        .and_then(|s| s.trim().parse().ok())
        .ok_or_else(|| format!("no size record at {}", record.display()))?;
    let module = pkg_dir().join("railnote_bg.wasm");
    let optimised = util::file_size(&module)?;
    let gzip = util::gzip9_size(&module)?;
    println!("after wasm-bindgen (before wasm-opt): {}", util::bytes(raw));
    println!(
        "after wasm-opt:                       {}",
        util::bytes(optimised)
    );
    println!(
        "after wasm-opt, gzip -9:              {}",
        util::bytes(gzip)
    );
    breakdown()
}

/// Function bodies by part, from a fresh wasm-bindgen run (site/pkg's module has been through
/// wasm-opt, which drops the names and merges functions, so these are pre-wasm-opt bytes).
fn breakdown() -> Result {
    let dir = target_dir().join("railnote-names");
    let wasm = target_dir().join("wasm32-unknown-unknown/wasm-release/railnote_wasm.wasm");
    run(Command::new("wasm-bindgen")
        .args(["--target", "web", "--out-name", "railnote", "--out-dir"])
        .arg(&dir)
        .arg(&wasm))?;
    let module = dir.join("railnote_bg.wasm");
    let bytes = fs::read(&module).map_err(|e| format!("cannot read {}: {e}", module.display()))?;
    let sizes = wasm_names::function_sizes(&bytes)?;
    let total: usize = sizes.iter().map(|s| s.0).sum();
    println!("function bodies after wasm-bindgen, by part ({total} B in all):");
    for (part, size) in wasm_names::by_part(&sizes).into_iter().take(16) {
        println!(
            "  {part:<20} {size:>7} B  {:>5.1} %",
            100.0 * size as f64 / total as f64
        );
    }
    Ok(())
}

fn browser() -> Result {
    header("bench 2/7: linear page in headless Chromium");
    let page = linear_page(&site_dir()).ok_or("site/ has no linear page to measure")?;
    let listener = server::bind(None).map_err(|e| format!("cannot listen: {e}"))?;
    let addr = server::spawn(listener, site_dir()).map_err(|e| e.to_string())?;
    run(Command::new("node")
        .arg("tests/bench/browser.mjs")
        .arg(format!("http://{addr}/"))
        .args([page, "50", "10"])
        .current_dir(repo_root()))
}

fn native_vs_wasm() -> Result {
    header("bench 3/7: the same batch of linear checks, native and WASM (Node)");
    let native = native_example("bench_linear", LINEAR_CHECKS)?;
    let wasm = output(
        Command::new("node")
            .args(["tests/bench/wasm_linear.mjs", LINEAR_CHECKS])
            .current_dir(repo_root()),
    )?;
    let (native, wasm) = (last_line(&native), last_line(&wasm));
    println!("native: {native}");
    println!("wasm:   {wasm}");
    let (native_ns, wasm_ns) = (
        field_of(native, "nsPerCheck")?,
        field_of(wasm, "nsPerCheck")?,
    );
    println!(
        "per check: native {:.2} µs, WASM {:.2} µs: WASM takes {:.2}× the native time",
        native_ns / 1000.0,
        wasm_ns / 1000.0,
        wasm_ns / native_ns
    );
    // Both sum the worst-case junction temperature over the batch; equal sums show equal inputs
    // and equal arithmetic (both use libm).
    compare_checksums(native, wasm)
}

fn thermal_series() -> Result {
    header("bench 4/7: 10 000-step T_j(t) series, eight stages: native and WASM (Chromium)");
    let native = native_example("bench_thermal", THERMAL_CHECKS)?;
    let wasm = in_chromium("wasm_thermal.mjs", THERMAL_CHECKS)?;
    let (native, wasm) = (last_line(&native), last_line(&wasm));
    println!("native:        {native}");
    println!("wasm-chromium: {wasm}");
    let (native_ns, wasm_ns) = (
        field_of(native, "nsPerCheck")?,
        field_of(wasm, "nsPerCheck")?,
    );
    let steps = field_of(native, "steps")?;
    println!(
        "per {steps:.0}-step series: native {:.3} ms, WASM in Chromium {:.3} ms: WASM takes {:.2}× \
         the native time ({:.0} ns vs {:.0} ns per step, report included)",
        native_ns / 1e6,
        wasm_ns / 1e6,
        wasm_ns / native_ns,
        native_ns / steps,
        wasm_ns / steps,
    );
    compare_checksums(native, wasm)
}

fn divider() -> Result {
    header("bench 5/7: divider picker, E192 search and 100 000-sample Monte Carlo: native and WASM (Chromium)");
    let native = native_example("bench_divider", DIVIDER_RUNS)?;
    let wasm = in_chromium("wasm_divider.mjs", DIVIDER_RUNS)?;
    for job in ["search", "montecarlo"] {
        let pick = |text: &str| -> Result<String> {
            text.lines()
                .find(|l| l.contains(&format!("\"job\":\"{job}\"")))
                .map(|l| l.trim().to_string())
                .ok_or_else(|| format!("no {job} line in {text:?}"))
        };
        let (native, wasm) = (pick(&native)?, pick(&wasm)?);
        println!("native:        {native}");
        println!("wasm-chromium: {wasm}");
        let (native_ns, wasm_ns) = (field_of(&native, "nsPerRun")?, field_of(&wasm, "nsPerRun")?);
        let what = if job == "search" {
            format!("{:.0}-pair E192 search", field_of(&native, "searched")?)
        } else {
            "100 000-sample Monte Carlo run".to_string()
        };
        println!(
            "per {what}: native {:.3} ms, WASM in Chromium {:.3} ms: WASM takes {:.2}× the native time",
            native_ns / 1e6,
            wasm_ns / 1e6,
            wasm_ns / native_ns
        );
        compare_checksums(&native, &wasm)?;
    }
    Ok(())
}

fn switching_sweep() -> Result {
    header("bench 6/7: switching estimate, 3 corners × 50 loads: native and WASM (Chromium)");
    let native = native_example("bench_switching", SWITCHING_CHECKS)?;
    let wasm = in_chromium("wasm_switching.mjs", SWITCHING_CHECKS)?;
    let (native, wasm) = (last_line(&native), last_line(&wasm));
    println!("native:        {native}");
    println!("wasm-chromium: {wasm}");
    let (native_ns, wasm_ns) = (
        field_of(native, "nsPerCheck")?,
        field_of(wasm, "nsPerCheck")?,
    );
    let points = field_of(native, "points")?;
    println!(
        "per full sweep ({points:.0} load points and 3 corners): native {:.1} µs, WASM in \
         Chromium {:.1} µs: WASM takes {:.2}× the native time (report included)",
        native_ns / 1e3,
        wasm_ns / 1e3,
        wasm_ns / native_ns,
    );
    compare_checksums(native, wasm)
}

fn tree() -> Result {
    header("bench 7/7: rail tree, 200 rails and 1000 loads: native and WASM (Chromium)");
    let native = native_example("bench_tree", TREE_CHECKS)?;
    let wasm = in_chromium("wasm_tree.mjs", TREE_CHECKS)?;
    let (native, wasm) = (last_line(&native), last_line(&wasm));
    println!("native:        {native}");
    println!("wasm-chromium: {wasm}");
    let (native_ns, wasm_ns) = (field_of(native, "nsPerRun")?, field_of(wasm, "nsPerRun")?);
    println!(
        "per tree check: native {:.3} ms, WASM in Chromium {:.3} ms: WASM takes {:.2}× the native time",
        native_ns / 1e6,
        wasm_ns / 1e6,
        wasm_ns / native_ns
    );
    compare_checksums(native, wasm)?;
    let link = output(
        Command::new("node")
            .arg("tests/bench/tree_link.mjs")
            .current_dir(repo_root()),
    )?;
    let link = last_line(&link);
    println!(
        "demo tree's share link: {:.0} characters of JSON, {:.0} after deflate-raw and base64url, \
         {:.0} for tree.html#doc=… ({link})",
        field_of(link, "jsonChars")?,
        field_of(link, "codeChars")?,
        field_of(link, "linkChars")?
    );
    Ok(())
}

/// Serve site/ on a free port and run one of tests/bench's Chromium scripts against it with
/// `count`; returns what the script printed.
fn in_chromium(script: &str, count: &str) -> Result<String> {
    let listener = server::bind(None).map_err(|e| format!("cannot listen: {e}"))?;
    let addr = server::spawn(listener, site_dir()).map_err(|e| e.to_string())?;
    output(
        Command::new("node")
            .arg(format!("tests/bench/{script}"))
            .arg(format!("http://{addr}/"))
            .arg(count)
            .current_dir(repo_root()),
    )
}

/// Run one of core's benchmark examples in release mode and return what it printed.
fn native_example(name: &str, count: &str) -> Result<String> {
    output(cargo().current_dir(repo_root()).args([
        "run",
        "--quiet",
        "--release",
        "-p",
        "railnote-core",
        "--example",
        name,
        "--",
        count,
    ]))
}

/// A number from a benchmark's JSON line, or an error naming what is missing.
fn field_of(line: &str, key: &str) -> Result<f64> {
    json_number(line, key).ok_or_else(|| format!("no {key} in {line:?}"))
}

/// Equal checksums show that native and WASM ran the same batch with the same arithmetic.
fn compare_checksums(native: &str, wasm: &str) -> Result {
    let (native_sum, wasm_sum) = (field_of(native, "checksum")?, field_of(wasm, "checksum")?);
    if ((native_sum - wasm_sum) / native_sum).abs() < 1e-12 {
        println!("checksums agree ({native_sum}): both ran the same batch");
    } else {
        println!(
            "WARNING: checksums differ (native {native_sum}, WASM {wasm_sum}): not the same batch"
        );
    }
    Ok(())
}

fn last_line(text: &str) -> &str {
    text.lines()
        .rev()
        .find(|l| !l.trim().is_empty())
        .unwrap_or("")
        .trim()
}

/// The number after `"key":` in a one-line JSON object of plain numbers (enough for the bench
/// scripts' output; xtask stays std-only).
pub fn json_number(line: &str, key: &str) -> Option<f64> {
    let needle = format!("\"{key}\":");
    let start = line.find(&needle)? + needle.len();
    let rest = line[start..].trim_start();
    let end = rest.find([',', '}']).unwrap_or(rest.len());
    rest[..end].trim().parse().ok()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_numbers_from_the_bench_lines() {
        let line = r#"{"runner":"wasm","n":20000,"totalNs":1.5e8,"nsPerCheck":7423.4,"checksum":2248363.36}"#;
        assert_eq!(json_number(line, "n"), Some(20000.0));
        assert_eq!(json_number(line, "totalNs"), Some(1.5e8));
        assert_eq!(json_number(line, "nsPerCheck"), Some(7423.4));
        assert_eq!(json_number(line, "checksum"), Some(2248363.36));
        assert_eq!(json_number(line, "runner"), None);
        assert_eq!(json_number(line, "missing"), None);
        assert_eq!(last_line("a\nb\n\n"), "b");
    }
}
