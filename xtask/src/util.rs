//! Small helpers shared by the xtask commands: running programs, headers, paths and sizes.

use std::ffi::OsStr;
use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};

/// Every fallible xtask step returns a sentence for the person at the terminal.
pub type Result<T = ()> = std::result::Result<T, String>;

/// The repository root (xtask lives one folder below it).
pub fn repo_root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .parent()
        .expect("xtask sits inside the repository")
        .to_path_buf()
}

/// A loud banner so that a failing step is easy to find in a long CI log.
pub fn header(text: &str) {
    println!();
    println!("==== {text} ====");
    let _ = std::io::stdout().flush();
}

fn describe(cmd: &Command) -> String {
    let mut line = cmd.get_program().to_string_lossy().into_owned();
    for arg in cmd.get_args() {
        line.push(' ');
        line.push_str(&arg.to_string_lossy());
    }
    line
}

/// Runs a command with inherited stdio; a non-zero exit is an error naming the command.
pub fn run(cmd: &mut Command) -> Result {
    let line = describe(cmd);
    println!("$ {line}");
    let _ = std::io::stdout().flush();
    let status = cmd
        .status()
        .map_err(|e| format!("could not start `{line}`: {e}"))?;
    if status.success() {
        Ok(())
    } else {
        Err(format!("`{line}` failed ({status})"))
    }
}

/// Runs a command and returns its stdout; stderr is passed through so problems stay visible.
pub fn output(cmd: &mut Command) -> Result<String> {
    let line = describe(cmd);
    let out = cmd
        .stderr(Stdio::inherit())
        .output()
        .map_err(|e| format!("could not start `{line}`: {e}"))?;
    if out.status.success() {
        Ok(String::from_utf8_lossy(&out.stdout).into_owned())
    } else {
        Err(format!("`{line}` failed ({})", out.status))
    }
}

/// Stdout of a probe such as `tool --version`, or None when the tool is absent or fails.
pub fn probe<S: AsRef<OsStr>>(program: &str, args: &[S]) -> Option<String> {
    let out = Command::new(program)
        .args(args)
        .stdin(Stdio::null())
        .stderr(Stdio::null())
        .output()
        .ok()?;
    out.status
        .success()
        .then(|| String::from_utf8_lossy(&out.stdout).into_owned())
}

/// Whether `program` is found on PATH (as an executable file).
pub fn on_path(program: &str) -> bool {
    let Some(path) = std::env::var_os("PATH") else {
        return false;
    };
    std::env::split_paths(&path).any(|dir| is_executable(&dir.join(program)))
}

fn is_executable(path: &Path) -> bool {
    use std::os::unix::fs::PermissionsExt;
    fs::metadata(path)
        .map(|m| m.is_file() && m.permissions().mode() & 0o111 != 0)
        .unwrap_or(false)
}

/// Size of a gzip stream of `path` at level 9, from the system's `gzip` (always present on
/// Debian). xtask stays std-only, so it does not carry a deflate implementation of its own.
pub fn gzip9_size(path: &Path) -> Result<u64> {
    let file = fs::File::open(path).map_err(|e| format!("cannot open {}: {e}", path.display()))?;
    let out = Command::new("gzip")
        .args(["-9", "-n", "-c"])
        .stdin(file)
        .stderr(Stdio::inherit())
        .output()
        .map_err(|e| format!("could not run gzip: {e}"))?;
    if !out.status.success() {
        return Err(format!("gzip failed on {}", path.display()));
    }
    Ok(out.stdout.len() as u64)
}

pub fn file_size(path: &Path) -> Result<u64> {
    fs::metadata(path)
        .map(|m| m.len())
        .map_err(|e| format!("cannot read {}: {e}", path.display()))
}

/// Human-readable byte count: "12 345 B (12.1 KiB)".
pub fn bytes(n: u64) -> String {
    format!("{n} B ({:.1} KiB)", n as f64 / 1024.0)
}

/// Copies a directory tree, skipping files for which `skip` returns true.
pub fn copy_tree(from: &Path, to: &Path, skip: &dyn Fn(&Path) -> bool) -> Result<u64> {
    let mut total = 0;
    fs::create_dir_all(to).map_err(|e| format!("cannot create {}: {e}", to.display()))?;
    let entries = fs::read_dir(from).map_err(|e| format!("cannot read {}: {e}", from.display()))?;
    for entry in entries {
        let entry = entry.map_err(|e| e.to_string())?;
        let src = entry.path();
        if skip(&src) {
            continue;
        }
        let dst = to.join(entry.file_name());
        let kind = entry.file_type().map_err(|e| e.to_string())?;
        if kind.is_dir() {
            total += copy_tree(&src, &dst, skip)?;
        } else {
            total +=
                fs::copy(&src, &dst).map_err(|e| format!("cannot copy {}: {e}", src.display()))?;
        }
    }
    Ok(total)
}

/// Files under `dir` (recursively) whose names Node's test runner treats as test files
/// (`*.test.mjs`, `*-test.js`, `*_test.cjs`, `test-*.mjs`, `test.js`, …), sorted.
pub fn node_test_files(dir: &Path) -> Vec<PathBuf> {
    let mut found = Vec::new();
    collect_node_tests(dir, &mut found);
    found.sort();
    found
}

fn collect_node_tests(dir: &Path, found: &mut Vec<PathBuf>) {
    let Ok(entries) = fs::read_dir(dir) else {
        return;
    };
    for entry in entries.flatten() {
        let path = entry.path();
        let name = entry.file_name().to_string_lossy().into_owned();
        if name.starts_with('.') || name == "node_modules" {
            continue;
        }
        if path.is_dir() {
            collect_node_tests(&path, found);
        } else if is_node_test_name(&name) {
            found.push(path);
        }
    }
}

pub fn is_node_test_name(name: &str) -> bool {
    let Some(stem) = [".mjs", ".cjs", ".js"]
        .iter()
        .find_map(|ext| name.strip_suffix(ext))
    else {
        return false;
    };
    stem == "test"
        || stem.starts_with("test-")
        || stem.ends_with(".test")
        || stem.ends_with("-test")
        || stem.ends_with("_test")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn node_test_names_follow_the_runner_patterns() {
        for yes in [
            "api.test.mjs",
            "a-test.js",
            "a_test.cjs",
            "test-x.mjs",
            "test.js",
        ] {
            assert!(is_node_test_name(yes), "{yes}");
        }
        for no in [
            "helpers.mjs",
            "api.test.ts",
            "testing.mjs",
            "README.md",
            "latest.mjs",
        ] {
            assert!(!is_node_test_name(no), "{no}");
        }
    }
}
