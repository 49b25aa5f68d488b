//! Finds, and where it can installs, the tools the pipeline needs. A fresh machine has none of
//! them beyond Rust, Node and npm: the wasm32 target, the wasm-bindgen CLI at exactly the crate's
//! version, npm's binaryen, playwright-core and axe-core, Debian's chromium, chromium-driver,
//! ngspice and poppler-utils (pdftotext, which reads back the printed PDFs), and the PyPI package
//! `eseries` (the reference for the IEC 60063 series).

use crate::util::{self, probe, run, Result};
use std::env;
use std::fs;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::SystemTime;

pub const WASM_TARGET: &str = "wasm32-unknown-unknown";
pub const CHROMIUM: &str = "/usr/bin/chromium";
pub const CHROMEDRIVER: &str = "/usr/bin/chromedriver";
/// The `eseries` release the series cross-check was written against.
pub const ESERIES_VERSION: &str = "1.2.1";

/// Where `cargo install` puts binaries: CARGO_INSTALL_ROOT, else CARGO_HOME, else ~/.cargo.
fn cargo_bin_dir() -> Option<PathBuf> {
    if let Some(root) = env::var_os("CARGO_INSTALL_ROOT") {
        return Some(PathBuf::from(root).join("bin"));
    }
    if let Some(home) = env::var_os("CARGO_HOME") {
        return Some(PathBuf::from(home).join("bin"));
    }
    env::var_os("HOME").map(|h| PathBuf::from(h).join(".cargo/bin"))
}

/// Puts cargo's install folder first on PATH for this process and every child, so that a
/// wasm-bindgen just installed (and cargo's wasm32 runner, wasm-bindgen-test-runner) is found
/// even when the login shell never added that folder.
pub fn prefer_cargo_bin_on_path() {
    let Some(bin) = cargo_bin_dir() else { return };
    let current = env::var_os("PATH").unwrap_or_default();
    let mut dirs: Vec<PathBuf> = env::split_paths(&current).collect();
    if dirs.first() == Some(&bin) {
        return;
    }
    dirs.retain(|d| d != &bin);
    dirs.insert(0, bin);
    if let Ok(joined) = env::join_paths(dirs) {
        // Edition 2021, called once at start-up before any thread exists.
        env::set_var("PATH", joined);
    }
}

/// The tools `build`, `serve` and `dist` need.
pub fn ensure_build_tools() -> Result {
    util::header("tools: checking what the build needs");
    ensure_node()?;
    ensure_wasm_target()?;
    ensure_wasm_bindgen()?;
    ensure_npm_packages()?;
    Ok(())
}

/// The tools `bench` needs: the build tools plus the browser.
pub fn ensure_bench_tools() -> Result {
    ensure_system_packages()?;
    ensure_build_tools()
}

/// The tools `test` needs: the build tools plus rustfmt, the browser, ngspice and eseries.
pub fn ensure_test_tools() -> Result {
    ensure_system_packages()?;
    ensure_build_tools()?;
    ensure_rustfmt()?;
    ensure_python_packages()?;
    ensure_fuzz_tools()?;
    Ok(())
}

/// The installed version of a Python distribution, if any.
fn python_package_version(name: &str) -> Option<String> {
    let script = format!("import importlib.metadata as m; print(m.version('{name}'))");
    probe("python3", &["-c", script.as_str()]).map(|v| v.trim().to_string())
}

/// `eseries` from PyPI at [`ESERIES_VERSION`], installed with pip when missing or different.
fn ensure_python_packages() -> Result {
    util::header("tools: checking PyPI packages (eseries)");
    if !util::on_path("python3") {
        if !is_root() {
            return Err("python3 is needed for the eseries cross-check:                         `sudo apt-get install -y python3 python3-pip`"
                .into());
        }
        apt_install(&["python3", "python3-pip"])?;
    }
    let wanted = format!("eseries=={ESERIES_VERSION}");
    if python_package_version("eseries").as_deref() == Some(ESERIES_VERSION) {
        println!("ok: {wanted}");
        return Ok(());
    }
    println!("installing {wanted} with pip");
    let pip = |extra: &[&str]| {
        run(Command::new("python3")
            .args([
                "-m",
                "pip",
                "install",
                "--quiet",
                "--disable-pip-version-check",
            ])
            .args(extra)
            .arg(&wanted)
            .stdin(std::process::Stdio::null()))
    };
    // A Debian-managed Python refuses plain installs (PEP 668); the package is pure Python and
    // only the tests import it, so fall back to installing it beside the system's packages.
    pip(&[])
        .or_else(|_| pip(&["--break-system-packages"]))
        .map_err(|e| format!("{e}. Install by hand: `python3 -m pip install {wanted}`"))?;
    match python_package_version("eseries") {
        Some(v) if v == ESERIES_VERSION => Ok(()),
        other => Err(format!(
            "pip ran but eseries is {other:?}, not {ESERIES_VERSION}: `python3 -m pip install {wanted}`"
        )),
    }
}

pub fn is_root() -> bool {
    if let Ok(status) = fs::read_to_string("/proc/self/status") {
        if let Some(line) = status.lines().find(|l| l.starts_with("Uid:")) {
            return line.split_whitespace().nth(1) == Some("0");
        }
    }
    probe("id", &["-u"]).is_some_and(|s| s.trim() == "0")
}

fn ensure_node() -> Result {
    let node = || probe("node", &["--version"]).is_some();
    let npm = || probe("npm", &["--version"]).is_some();
    if node() && npm() {
        return Ok(());
    }
    if is_root() {
        // One package at a time: some Node builds for Debian ship npm inside `nodejs` and
        // conflict with Debian's separate `npm` package.
        if !node() {
            println!("node is missing: installing Debian's nodejs");
            apt_install(&["nodejs"])?;
        }
        if !npm() {
            println!("npm is missing: installing Debian's npm");
            apt_install(&["npm"])?;
        }
        if node() && npm() {
            return Ok(());
        }
    }
    Err(
        "Node.js and npm are needed. Install them, e.g. `sudo apt-get install -y nodejs npm`"
            .into(),
    )
}

fn ensure_wasm_target() -> Result {
    if wasm_target_installed() {
        println!("ok: Rust target {WASM_TARGET}");
        return Ok(());
    }
    println!("Rust target {WASM_TARGET} is missing: adding it with rustup");
    let added = run(Command::new("rustup").args(["target", "add", WASM_TARGET]));
    if added.is_ok() && wasm_target_installed() {
        return Ok(());
    }
    Err(format!(
        "the Rust target {WASM_TARGET} is needed. Install it with `rustup target add {WASM_TARGET}`"
    ))
}

fn wasm_target_installed() -> bool {
    // Asking rustc for its sysroot works with and without rustup.
    probe("rustc", &["--print", "sysroot"])
        .map(|sysroot| {
            Path::new(sysroot.trim())
                .join("lib/rustlib")
                .join(WASM_TARGET)
                .join("lib")
                .is_dir()
        })
        .unwrap_or(false)
}

fn ensure_rustfmt() -> Result {
    if probe("cargo", &["fmt", "--version"]).is_some() {
        return Ok(());
    }
    println!("rustfmt is missing: adding it with rustup");
    let _ = run(Command::new("rustup").args(["component", "add", "rustfmt"]));
    if probe("cargo", &["fmt", "--version"]).is_some() {
        return Ok(());
    }
    Err("rustfmt is needed. Install it with `rustup component add rustfmt`".into())
}

/// The version of the `wasm-bindgen` crate recorded in Cargo.lock.
pub fn locked_version(lock: &str, crate_name: &str) -> Option<String> {
    let mut in_package = false;
    let mut name_matches = false;
    for line in lock.lines().map(str::trim) {
        if line == "[[package]]" {
            in_package = true;
            name_matches = false;
        } else if line.starts_with('[') {
            in_package = false;
        } else if in_package {
            if let Some(value) = toml_string(line, "name") {
                name_matches = value == crate_name;
            } else if let Some(value) = toml_string(line, "version") {
                if name_matches {
                    return Some(value.to_string());
                }
            }
        }
    }
    None
}

fn toml_string<'a>(line: &'a str, key: &str) -> Option<&'a str> {
    let rest = line
        .strip_prefix(key)?
        .trim_start()
        .strip_prefix('=')?
        .trim();
    rest.strip_prefix('"')?.strip_suffix('"')
}

/// The version in `wasm-bindgen 0.2.130` (or `wasm-bindgen-test-runner 0.2.130`).
pub fn reported_version(output: &str) -> Option<&str> {
    output.split_whitespace().nth(1)
}

fn cli_version(program: &str) -> Option<String> {
    probe(program, &["--version"]).and_then(|o| reported_version(&o).map(str::to_string))
}

fn ensure_wasm_bindgen() -> Result {
    let lock_path = util::repo_root().join("Cargo.lock");
    let lock = fs::read_to_string(&lock_path)
        .map_err(|e| format!("cannot read {}: {e}", lock_path.display()))?;
    let want = locked_version(&lock, "wasm-bindgen")
        .ok_or("Cargo.lock has no wasm-bindgen package; is the wasm crate in the workspace?")?;
    let have = (
        cli_version("wasm-bindgen"),
        cli_version("wasm-bindgen-test-runner"),
    );
    if have.0.as_deref() == Some(want.as_str()) && have.1.as_deref() == Some(want.as_str()) {
        println!("ok: wasm-bindgen CLI {want} (matches Cargo.lock)");
        return Ok(());
    }
    println!(
        "wasm-bindgen CLI must be {want} (Cargo.lock); found wasm-bindgen {} and \
         wasm-bindgen-test-runner {}. Installing wasm-bindgen-cli {want} (takes a few minutes).",
        have.0.as_deref().unwrap_or("none"),
        have.1.as_deref().unwrap_or("none"),
    );
    // No --locked: with it this install fails on the project's machines. --force replaces a
    // different version, or a tracked install whose binaries went missing.
    let installed =
        run(crate::cargo().args(["install", "wasm-bindgen-cli", "--version", &want, "--force"]));
    let after = (
        cli_version("wasm-bindgen"),
        cli_version("wasm-bindgen-test-runner"),
    );
    if installed.is_ok()
        && after.0.as_deref() == Some(want.as_str())
        && after.1.as_deref() == Some(want.as_str())
    {
        return Ok(());
    }
    Err(format!(
        "wasm-bindgen CLI {want} is needed. Install it with \
         `cargo install wasm-bindgen-cli --version {want}` and make sure {} is on PATH",
        cargo_bin_dir().map_or("cargo's bin folder".into(), |p| p.display().to_string())
    ))
}

/// Whether `npm ci` must run: no node_modules, a package missing, or an install older than the
/// lockfile (npm writes node_modules/.package-lock.json at every install).
pub fn npm_install_needed(root: &Path) -> bool {
    let marker = root.join("node_modules/.package-lock.json");
    let packages_present = [
        "node_modules/.bin/wasm-opt",
        "node_modules/playwright-core",
        "node_modules/axe-core/axe.min.js",
    ]
    .iter()
    .all(|p| root.join(p).exists());
    !packages_present || is_older(&marker, &root.join("package-lock.json"))
}

/// True when `a` is missing or was modified before `b`.
fn is_older(a: &Path, b: &Path) -> bool {
    let mtime = |p: &Path| fs::metadata(p).and_then(|m| m.modified()).ok();
    match (mtime(a), mtime(b)) {
        (None, _) => true,
        (Some(_), None) => false,
        (Some(ta), Some(tb)) => ta < tb,
    }
}

fn ensure_npm_packages() -> Result {
    let root = util::repo_root();
    if !npm_install_needed(&root) {
        println!("ok: npm packages (node_modules is up to date with package-lock.json)");
        return Ok(());
    }
    println!("node_modules is missing or older than package-lock.json: running npm ci");
    // playwright-core never downloads a browser; the variable makes sure nothing else does.
    run(Command::new("npm")
        .args(["ci", "--no-audit", "--no-fund"])
        .env("PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD", "1")
        .current_dir(&root))
    .map_err(|e| format!("{e}. Run `npm ci` in {} by hand", root.display()))?;
    // Touch the marker so that a clock skew between checkout and install cannot loop.
    let marker = root.join("node_modules/.package-lock.json");
    if let Ok(f) = fs::File::options().append(true).open(&marker) {
        let _ = f.set_modified(SystemTime::now());
    }
    Ok(())
}

/// Debian packages the tests need, by the file each provides.
fn missing_system_packages() -> Vec<&'static str> {
    let mut missing = Vec::new();
    if !Path::new(CHROMIUM).exists() {
        missing.push("chromium");
    }
    if !Path::new(CHROMEDRIVER).exists() {
        missing.push("chromium-driver");
    }
    if !util::on_path("ngspice") {
        missing.push("ngspice");
    }
    if !util::on_path("pdftotext") {
        missing.push("poppler-utils");
    }
    missing
}

fn ensure_system_packages() -> Result {
    util::header(
        "tools: checking Debian packages (chromium, chromium-driver, ngspice, poppler-utils)",
    );
    let missing = missing_system_packages();
    if missing.is_empty() {
        println!("ok: {CHROMIUM}, {CHROMEDRIVER}, ngspice, pdftotext");
        return Ok(());
    }
    let wanted = "apt-get install -y chromium chromium-driver ngspice poppler-utils";
    if !is_root() {
        return Err(format!(
            "missing {}; not running as root, so install them yourself: \
             `sudo apt-get update && sudo {wanted}`",
            missing.join(", ")
        ));
    }
    println!("missing {}: installing with apt-get", missing.join(", "));
    apt_install(&["chromium", "chromium-driver", "ngspice", "poppler-utils"])?;
    let still = missing_system_packages();
    if still.is_empty() {
        Ok(())
    } else {
        Err(format!(
            "still missing after apt-get: {}. Install them with `apt-get update && {wanted}`",
            still.join(", ")
        ))
    }
}

fn apt_install(packages: &[&str]) -> Result {
    let apt = |args: &[&str]| {
        run(Command::new("apt-get")
            .args(args)
            .env("DEBIAN_FRONTEND", "noninteractive")
            .stdin(std::process::Stdio::null()))
    };
    apt(&["update"])?;
    let mut args = vec!["install", "-y"];
    args.extend_from_slice(packages);
    apt(&args).map_err(|e| {
        format!(
            "{e}. Install by hand: `apt-get update && apt-get install -y {}`",
            packages.join(" ")
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const LOCK: &str = r#"
version = 4

[[package]]
name = "wasm-bindgen-backend"
version = "0.2.999"

[[package]]
name = "wasm-bindgen"
version = "0.2.130"
source = "registry+https://github.com/rust-lang/crates.io-index"
dependencies = [
 "cfg-if",
]

[[package]]
name = "wasm-bindgen-test"
version = "0.3.80"
"#;

    #[test]
    fn reads_the_locked_wasm_bindgen_version() {
        assert_eq!(
            locked_version(LOCK, "wasm-bindgen").as_deref(),
            Some("0.2.130")
        );
        assert_eq!(
            locked_version(LOCK, "wasm-bindgen-test").as_deref(),
            Some("0.3.80")
        );
        assert_eq!(locked_version(LOCK, "wasm"), None);
        // The real lockfile of this workspace names one.
        let real = fs::read_to_string(util::repo_root().join("Cargo.lock")).unwrap();
        assert!(locked_version(&real, "wasm-bindgen").is_some());
    }

    #[test]
    fn reads_the_cli_version() {
        assert_eq!(reported_version("wasm-bindgen 0.2.130\n"), Some("0.2.130"));
        assert_eq!(
            reported_version("wasm-bindgen-test-runner 0.2.92"),
            Some("0.2.92")
        );
        assert_eq!(reported_version(""), None);
    }

    #[test]
    fn npm_install_is_needed_without_node_modules_or_when_stale() {
        let dir = env::temp_dir().join(format!("xtask-npm-test-{}", std::process::id()));
        let _ = fs::remove_dir_all(&dir);
        fs::create_dir_all(dir.join("node_modules/.bin")).unwrap();
        let lock = dir.join("package-lock.json");
        fs::write(&lock, "{}").unwrap();
        assert!(npm_install_needed(&dir), "empty node_modules");

        fs::create_dir_all(dir.join("node_modules/playwright-core")).unwrap();
        fs::write(dir.join("node_modules/.bin/wasm-opt"), "").unwrap();
        let marker = dir.join("node_modules/.package-lock.json");
        fs::write(&marker, "{}").unwrap();
        let now = SystemTime::now();
        let set = |p: &Path, t: SystemTime| {
            fs::File::options()
                .append(true)
                .open(p)
                .unwrap()
                .set_modified(t)
                .unwrap()
        };
        set(&lock, now - std::time::Duration::from_secs(60));
        set(&marker, now);
        assert!(npm_install_needed(&dir), "axe-core missing");
        fs::create_dir_all(dir.join("node_modules/axe-core")).unwrap();
        fs::write(dir.join("node_modules/axe-core/axe.min.js"), "").unwrap();
        assert!(!npm_install_needed(&dir), "fresh install");

        set(&lock, now + std::time::Duration::from_secs(60));
        assert!(
            npm_install_needed(&dir),
            "lockfile changed after the install"
        );
        let _ = fs::remove_dir_all(&dir);
    }
}

/// The cargo-fuzz release the fuzz targets are run with (fuzz/, `cargo xtask fuzz`).
pub const CARGO_FUZZ_VERSION: &str = "0.13.2";

/// cargo-fuzz at [`CARGO_FUZZ_VERSION`] (installed from crates.io when missing or different,
/// like the wasm-bindgen CLI) and a C++ compiler, which libfuzzer-sys needs to build libFuzzer.
pub fn ensure_fuzz_tools() -> Result {
    util::header("tools: checking the fuzzing tools (cargo-fuzz, a C++ compiler)");
    if !["c++", "g++", "clang++"].iter().any(|c| util::on_path(c)) {
        if !is_root() {
            return Err(
                "a C++ compiler is needed to build libFuzzer: `sudo apt-get install -y g++`".into(),
            );
        }
        apt_install(&["g++"])?;
    }
    let want = CARGO_FUZZ_VERSION;
    // `cargo fuzz --version` prints "cargo-fuzz 0.13.2".
    let have = || {
        probe("cargo", &["fuzz", "--version"])
            .and_then(|o| reported_version(&o).map(str::to_string))
    };
    if have().as_deref() == Some(want) {
        println!("ok: cargo-fuzz {want}");
        return Ok(());
    }
    println!(
        "cargo-fuzz must be {want}; found {}. Installing it (takes a minute or two).",
        have().as_deref().unwrap_or("none")
    );
    let install = |locked: bool| {
        let mut cmd = crate::cargo();
        cmd.args(["install", "cargo-fuzz", "--version", want, "--force"]);
        if locked {
            cmd.arg("--locked");
        }
        run(&mut cmd)
    };
    // --locked builds with the versions cargo-fuzz was released with; where that fails, without.
    let installed = install(true).or_else(|_| install(false));
    if installed.is_ok() && have().as_deref() == Some(want) {
        return Ok(());
    }
    Err(format!(
        "cargo-fuzz {want} is needed. Install it with `cargo install cargo-fuzz --version {want}` \
         and make sure {} is on PATH",
        cargo_bin_dir().map_or("cargo's bin folder".into(), |p| p.display().to_string())
    ))
}
