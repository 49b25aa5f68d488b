//! `cargo xtask fuzz [--seconds N] [target]`, and the short run inside `cargo xtask test`.
//!
//! Runs the cargo-fuzz targets of fuzz/ (see DEVELOPERS.md, "Fuzzing") one after another on
//! the stable toolchain: `cargo fuzz run --sanitizer none` passes rustc only stable flags (the
//! default AddressSanitizer is what needs nightly's `-Zsanitizer`). Each target keeps its
//! corpus in fuzz/corpus/<target> (the committed `seed-*` files plus what libFuzzer adds, which
//! git ignores); a crash stops the run, names the input libFuzzer saved and how to see it.

use crate::util::{header, repo_root, Result};
use std::fs;
use std::io::{BufRead, BufReader, Write};
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};

/// Every target, in the order they run.
pub const TARGETS: &[&str] = &[
    "units",
    "linear",
    "thermal",
    "divider",
    "switching",
    "compare",
    "tree",
    "tree_doc",
];

/// The documented longer run: ten minutes per target.
pub const LONG_SECONDS: u64 = 600;
/// The run inside `cargo xtask test`: a minute per target.
pub const SHORT_SECONDS: u64 = 60;
/// A single input slower than this is a failure (a page must not spin), not a slow unit.
const UNIT_TIMEOUT_SECONDS: u64 = 30;

const USAGE: &str = "usage: cargo xtask fuzz [--seconds N] [target]\n  targets: units, linear, \
                     thermal, divider, switching, compare, tree, tree_doc (default: all)";

/// `cargo xtask fuzz` with its arguments.
pub fn fuzz_command(args: &[String]) -> Result {
    let mut seconds = LONG_SECONDS;
    let mut only: Option<&str> = None;
    let mut rest = args.iter();
    while let Some(arg) = rest.next() {
        match arg.as_str() {
            "--seconds" => {
                let n = rest.next().ok_or(USAGE)?;
                seconds = n.parse().ok().filter(|&s| s > 0).ok_or_else(|| {
                    format!("--seconds wants a whole number above 0, not {n:?}\n\n{USAGE}")
                })?;
            }
            name if only.is_none() && TARGETS.contains(&name) => only = Some(name),
            other => return Err(format!("unknown fuzz argument {other:?}\n\n{USAGE}")),
        }
    }
    crate::tools::ensure_fuzz_tools()?;
    let targets: Vec<&str> = match only {
        Some(t) => vec![t],
        None => TARGETS.to_vec(),
    };
    run(&targets, seconds, None)
}

/// The short run of every target, as a step of `cargo xtask test`. A fixed libFuzzer seed, so
/// that a run on a fresh clone (seeds only) follows the same path each time.
pub fn short_run() -> Result {
    run(TARGETS, SHORT_SECONDS, Some(1))
}

/// What one target's run printed.
#[derive(Debug, Default, PartialEq)]
pub struct Stats {
    pub executions: Option<u64>,
    pub per_second: Option<u64>,
    pub new_units: Option<u64>,
    /// Coverage counters libFuzzer reached (`cov:` of its last line).
    pub coverage: Option<u64>,
}

/// Read libFuzzer's final stats (`-print_final_stats=1`) and its last status line.
pub fn parse_stats(lines: &[String]) -> Stats {
    let mut stats = Stats::default();
    let number =
        |line: &str, key: &str| -> Option<u64> { line.strip_prefix(key)?.trim().parse().ok() };
    for line in lines {
        let line = line.trim();
        if let Some(n) = number(line, "stat::number_of_executed_units:") {
            stats.executions = Some(n);
        } else if let Some(n) = number(line, "stat::average_exec_per_sec:") {
            stats.per_second = Some(n);
        } else if let Some(n) = number(line, "stat::new_units_added:") {
            stats.new_units = Some(n);
        } else if let Some(at) = line.find(" cov: ") {
            let digits: String = line[at + 6..]
                .chars()
                .take_while(char::is_ascii_digit)
                .collect();
            if let Ok(n) = digits.parse() {
                stats.coverage = Some(n);
            }
        }
    }
    stats
}

fn fuzz_dir() -> PathBuf {
    repo_root().join("fuzz")
}

fn fuzz_target_dir() -> PathBuf {
    crate::target_dir().join("fuzz")
}

/// `cargo fuzz <verb> --sanitizer none --debug-assertions --target-dir …`: no sanitizer (the
/// only nightly-only flag), debug assertions and with them integer overflow checks.
fn cargo_fuzz(verb: &str) -> Command {
    let mut cmd = crate::cargo();
    cmd.current_dir(repo_root())
        .args([
            "fuzz",
            verb,
            "--sanitizer",
            "none",
            "--debug-assertions",
            "--target-dir",
        ])
        .arg(fuzz_target_dir());
    cmd
}

/// Files and bytes in a corpus folder.
fn corpus_size(dir: &Path) -> (usize, u64) {
    fs::read_dir(dir)
        .map(|entries| {
            entries
                .flatten()
                .filter_map(|e| e.metadata().ok().filter(|m| m.is_file()))
                .fold((0, 0), |(n, b), m| (n + 1, b + m.len()))
        })
        .unwrap_or((0, 0))
}

fn run(targets: &[&str], seconds: u64, seed: Option<u32>) -> Result {
    header("fuzz: building every target (cargo fuzz build, stable, --sanitizer none)");
    crate::util::run(&mut cargo_fuzz("build"))?;

    let mut rows = Vec::new();
    for (i, target) in targets.iter().enumerate() {
        header(&format!(
            "fuzz {}/{}: {target} for {seconds} s",
            i + 1,
            targets.len()
        ));
        let corpus = fuzz_dir().join("corpus").join(target);
        fs::create_dir_all(&corpus)
            .map_err(|e| format!("cannot make {}: {e}", corpus.display()))?;
        let before = corpus_size(&corpus).0;
        let mut cmd = cargo_fuzz("run");
        cmd.arg(target)
            .arg(&corpus)
            .arg("--")
            .arg(format!("-max_total_time={seconds}"))
            .arg(format!("-timeout={UNIT_TIMEOUT_SECONDS}"))
            .arg("-print_final_stats=1");
        let dict = fuzz_dir().join(format!("{target}.dict"));
        if dict.is_file() {
            cmd.arg(format!("-dict={}", dict.display()));
        }
        if let Some(seed) = seed {
            cmd.arg(format!("-seed={seed}"));
        }
        let (ok, lines) = run_logged(&mut cmd)?;
        let stats = parse_stats(&lines);
        let (files, bytes) = corpus_size(&corpus);
        if !ok {
            return Err(format!(
                "fuzz target {target} failed: libFuzzer saved the input under fuzz/artifacts/{target}/ \
                 (see its output above). `RAILNOTE_FUZZ_SHOW=1 {}/x86_64-unknown-linux-gnu/release/{target} \
                 <file>` prints the input document; fix core and add the input to \
                 core/tests/fuzz_regressions.rs",
                fuzz_target_dir().display()
            ));
        }
        let executions = stats.executions.ok_or_else(|| {
            format!("{target}: libFuzzer printed no stat::number_of_executed_units")
        })?;
        println!(
            "fuzz {target}: {executions} executions in {seconds} s ({} /s), corpus {files} files \
             ({}; {before} before), coverage {}",
            stats.per_second.unwrap_or(0),
            crate::util::bytes(bytes),
            stats.coverage.map_or("?".into(), |c| c.to_string())
        );
        rows.push((*target, executions, files, stats.coverage));
    }
    println!();
    println!("fuzz summary ({seconds} s per target, no crash):");
    println!(
        "  {:<10} {:>12} {:>8} {:>9}",
        "target", "executions", "corpus", "coverage"
    );
    for (target, executions, files, coverage) in rows {
        println!(
            "  {target:<10} {executions:>12} {files:>8} {:>9}",
            coverage.map_or("?".into(), |c| c.to_string())
        );
    }
    Ok(())
}

/// Run with stderr (where libFuzzer writes) read line by line: every line but libFuzzer's
/// per-unit NEW/REDUCE chatter is passed on, and all are kept for the stats.
fn run_logged(cmd: &mut Command) -> Result<(bool, Vec<String>)> {
    println!("$ {cmd:?}");
    let _ = std::io::stdout().flush();
    let mut child = cmd
        .stderr(Stdio::piped())
        .spawn()
        .map_err(|e| format!("could not start cargo fuzz: {e}"))?;
    let mut lines = Vec::new();
    if let Some(stderr) = child.stderr.take() {
        let mut err = std::io::stderr();
        for line in BufReader::new(stderr).lines() {
            let Ok(line) = line else { break };
            let chatter = line.contains("\tNEW ") || line.contains("\tREDUCE ");
            if !chatter {
                let _ = writeln!(err, "{line}");
            }
            lines.push(line);
        }
    }
    let status = child
        .wait()
        .map_err(|e| format!("cargo fuzz did not finish: {e}"))?;
    Ok((status.success(), lines))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn final_stats_are_read() {
        // The tail of a real run (libFuzzer with -print_final_stats=1).
        let lines: Vec<String> = [
            "#819609\tDONE   cov: 595 ft: 2257 corp: 446/6763b lim: 4096 exec/s: 13436 rss: 29Mb",
            "Done 819609 runs in 61 second(s)",
            "stat::number_of_executed_units: 819609",
            "stat::average_exec_per_sec:     13436",
            "stat::new_units_added:          223",
            "stat::slowest_unit_time_sec:    0",
            "stat::peak_rss_mb:              29",
        ]
        .map(String::from)
        .to_vec();
        assert_eq!(
            parse_stats(&lines),
            Stats {
                executions: Some(819_609),
                per_second: Some(13_436),
                new_units: Some(223),
                coverage: Some(595),
            }
        );
        assert_eq!(parse_stats(&[]), Stats::default());
    }
}
