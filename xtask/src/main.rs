//! railnote's automation, run as `cargo xtask <command>` (alias in .cargo/config.toml).
//!
//! Commands: build, serve [--port N], test, dist, bench, fuzz [--seconds N] [target]. Std only,
//! so that it compiles in seconds on a fresh machine; each command first installs what it needs
//! where it can (see tools.rs).

mod bench;
mod encode;
mod flatten;
mod fuzz;
mod offline;
mod server;
mod single;
mod tools;
mod util;
mod wasm_names;

use std::env;
use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, ExitCode};
use util::{header, repo_root, run, Result};

const USAGE: &str = "usage: cargo xtask <command>

  build              build the wasm package into site/pkg (cargo, wasm-bindgen, wasm-opt)
  serve [--port N]   build, then serve site/ on 127.0.0.1 (default port 8000)
  test               every check CI runs, in order, stopping at the first failure
  dist               build, then copy the site to dist/railnote/ for a static host and write
                     one self-contained file per page and one for the whole site to dist/single/
  bench              print sizes, page weight, page timings and native-vs-WASM speed
  fuzz [--seconds N] [target]
                     run the cargo-fuzz targets of fuzz/ (default 600 s each, all targets)";

fn main() -> ExitCode {
    tools::prefer_cargo_bin_on_path();
    let args: Vec<String> = env::args().skip(1).collect();
    let result = match args.first().map(String::as_str) {
        Some("build") => build(),
        Some("serve") => parse_port(&args[1..]).and_then(serve),
        Some("test") => test(),
        Some("dist") => dist(),
        Some("bench") => bench::bench(),
        Some("fuzz") => fuzz::fuzz_command(&args[1..]),
        Some("help" | "--help" | "-h") => {
            println!("{USAGE}");
            Ok(())
        }
        _ => Err(format!("unknown or missing command\n\n{USAGE}")),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(message) => {
            eprintln!();
            eprintln!("xtask: FAILED: {message}");
            ExitCode::FAILURE
        }
    }
}

fn parse_port(args: &[String]) -> Result<u16> {
    match args {
        [] => Ok(8000),
        [flag, port] if flag == "--port" => port
            .parse()
            .map_err(|_| format!("--port wants a number from 0 to 65535, not {port:?}")),
        _ => Err(format!("serve takes only --port N\n\n{USAGE}")),
    }
}

/// The cargo that runs us (so a rustup toolchain override is honoured), else `cargo` from PATH.
pub fn cargo() -> Command {
    Command::new(env::var_os("CARGO").unwrap_or_else(|| "cargo".into()))
}

pub fn target_dir() -> PathBuf {
    env::var_os("CARGO_TARGET_DIR")
        .map(PathBuf::from)
        .unwrap_or_else(|| repo_root().join("target"))
}

pub fn site_dir() -> PathBuf {
    repo_root().join("site")
}

pub fn pkg_dir() -> PathBuf {
    site_dir().join("pkg")
}

/// Size of railnote_bg.wasm as wasm-bindgen wrote it, before wasm-opt (kept for `bench`).
pub fn bindgen_size_record() -> PathBuf {
    target_dir().join("railnote-bindgen-size")
}

fn build() -> Result {
    tools::ensure_build_tools()?;
    build_site()
}

/// The build pipeline of the contract: cargo (wasm-release) -> wasm-bindgen -> wasm-opt.
pub fn build_site() -> Result {
    let root = repo_root();
    header("build 1/3: cargo build -p railnote-wasm (wasm32, wasm-release profile)");
    run(cargo().current_dir(&root).args([
        "build",
        "-p",
        "railnote-wasm",
        "--target",
        tools::WASM_TARGET,
        "--profile",
        "wasm-release",
    ]))?;
    let wasm = target_dir().join("wasm32-unknown-unknown/wasm-release/railnote_wasm.wasm");

    header("build 2/3: wasm-bindgen --target web into site/pkg");
    let pkg = pkg_dir();
    if pkg.exists() {
        // Stale files from an older build must not be served or shipped.
        fs::remove_dir_all(&pkg).map_err(|e| format!("cannot clear {}: {e}", pkg.display()))?;
    }
    run(Command::new("wasm-bindgen")
        .args(["--target", "web", "--out-name", "railnote", "--out-dir"])
        .arg(&pkg)
        .arg(&wasm))?;
    let module = pkg.join("railnote_bg.wasm");
    let raw = util::file_size(&module)?;
    fs::write(bindgen_size_record(), format!("{raw}\n"))
        .map_err(|e| format!("cannot write {}: {e}", bindgen_size_record().display()))?;

    header("build 3/3: wasm-opt (npm binaryen)");
    // The level was chosen by gzip size (see OPT_LEVEL); the feature flags are needed because
    // rustc emits bulk-memory and nontrapping float-to-int instructions.
    let wasm_opt = root.join("node_modules/.bin/wasm-opt");
    run(Command::new(&wasm_opt)
        .args([
            OPT_LEVEL,
            "--enable-bulk-memory",
            "--enable-nontrapping-float-to-int",
        ])
        .arg(&module)
        .arg("-o")
        .arg(&module))?;
    let optimised = util::file_size(&module)?;
    println!(
        "site/pkg/railnote_bg.wasm: {} after wasm-bindgen, {} after wasm-opt {OPT_LEVEL}",
        util::bytes(raw),
        util::bytes(optimised)
    );
    // The service worker's precache list and version, from the files now in site/.
    let (version, files) = offline::write_precache(&site_dir())?;
    println!(
        "site/{}: {files} files, version {version}",
        offline::PRECACHE
    );
    Ok(())
}

/// wasm-opt level, chosen by comparing gzip -9 sizes of the optimised module (binaryen 132;
/// gzip size is what a visitor downloads). Measured on the module with parseQuantity,
/// formatQuantity and checkLinear (commit e251759, 153 279 B after wasm-bindgen):
/// -Os 97 475 B raw / 42 553 B gzip, -Oz 97 357 B / 42 509 B, so -Oz. The two stay within 0.1 %
/// of each other (an earlier module had -Os ahead by 21 B), and the speed of checkLinear under
/// Node did not differ beyond run-to-run noise (38–48 µs vs 43–50 µs per check). Checked again
/// at commit 3f5e8e6 (rustc opt-level z, thermal module, 198 859 B after wasm-bindgen): -Os
/// 124 652 B / 52 516 B gzip, -Oz 124 518 B / 52 414 B.
const OPT_LEVEL: &str = "-Oz";

fn serve(port: u16) -> Result {
    build()?;
    let listener = server::bind(Some(port)).map_err(|e| format!("cannot listen: {e}"))?;
    let addr = listener.local_addr().map_err(|e| e.to_string())?;
    header("serving site/ (Ctrl-C stops)");
    print_urls(&format!("http://{addr}/"));
    server::serve(listener, site_dir());
    Ok(())
}

fn print_urls(base: &str) {
    println!("index:        {base}");
    match linear_page(&site_dir()) {
        Some(page) => println!("linear check: {base}{page}"),
        None => println!("linear check: (no linear page in site/ yet)"),
    }
}

/// The path of the linear check page below site/, as the site lays it out.
pub fn linear_page(site: &Path) -> Option<&'static str> {
    [
        ("linear.html", "linear.html"),
        ("linear/index.html", "linear/"),
    ]
    .into_iter()
    .find(|(file, _)| site.join(file).is_file())
    .map(|(_, url)| url)
}

/// One step of `cargo xtask test`.
enum Step {
    Cargo(&'static [&'static str]),
    WasmBrowserTests,
    SiteBuild,
    NodeTests,
    BrowserTests,
    /// The short fuzz run: a minute per target (xtask/src/fuzz.rs).
    Fuzz,
}

const TEST_STEPS: &[(&str, Step)] = &[
    (
        "cargo fmt --all --check",
        Step::Cargo(&["fmt", "--all", "--check"]),
    ),
    (
        "cargo test -p railnote-core --features serde",
        Step::Cargo(&["test", "-p", "railnote-core", "--features", "serde"]),
    ),
    (
        "cargo test -p railnote-core --no-default-features",
        Step::Cargo(&["test", "-p", "railnote-core", "--no-default-features"]),
    ),
    (
        "cargo build -p railnote-core --no-default-features --target wasm32-unknown-unknown",
        Step::Cargo(&[
            "build",
            "-p",
            "railnote-core",
            "--no-default-features",
            "--target",
            tools::WASM_TARGET,
        ]),
    ),
    ("cargo test -p xtask", Step::Cargo(&["test", "-p", "xtask"])),
    (
        "cargo test -p railnote-reference -- --nocapture (core vs ngspice)",
        Step::Cargo(&["test", "-p", "railnote-reference", "--", "--nocapture"]),
    ),
    (
        "cargo fuzz: every target of fuzz/ for 60 s (stable, --sanitizer none)",
        Step::Fuzz,
    ),
    (
        "cargo test -p railnote-wasm --target wasm32-unknown-unknown (headless Chromium)",
        Step::WasmBrowserTests,
    ),
    (
        "site build (cargo, wasm-bindgen, wasm-opt)",
        Step::SiteBuild,
    ),
    ("node --test tests/node/", Step::NodeTests),
    (
        "browser tests: node --test --test-concurrency=1 tests/browser/",
        Step::BrowserTests,
    ),
];

fn test() -> Result {
    tools::ensure_test_tools()?;
    let count = TEST_STEPS.len();
    for (i, (name, step)) in TEST_STEPS.iter().enumerate() {
        header(&format!("test step {}/{count}: {name}", i + 1));
        run_step(step).map_err(|e| format!("test step {}/{count} ({name}): {e}", i + 1))?;
    }
    println!();
    println!("xtask test: all {count} steps succeeded");
    Ok(())
}

fn run_step(step: &Step) -> Result {
    let root = repo_root();
    match step {
        Step::Cargo(args) => run(cargo().current_dir(&root).args(*args)),
        // wasm-bindgen-test-runner drives Chromium through chromedriver; naming Debian's driver
        // keeps a stray one on PATH from winning, and a loaded CI machine needs the long timeout.
        Step::WasmBrowserTests => run(cargo()
            .current_dir(&root)
            .args([
                "test",
                "-p",
                "railnote-wasm",
                "--target",
                tools::WASM_TARGET,
            ])
            .env("CHROMEDRIVER", tools::CHROMEDRIVER)
            .env("WASM_BINDGEN_TEST_TIMEOUT", "180")),
        Step::SiteBuild => build_site(),
        Step::NodeTests => node_tests(),
        Step::BrowserTests => browser_tests(),
        Step::Fuzz => fuzz::short_run(),
    }
}

fn node_tests() -> Result {
    let root = repo_root();
    let files = util::node_test_files(&root.join("tests/node"));
    if files.is_empty() {
        return Err("tests/node has no test files".into());
    }
    run(Command::new("node")
        .arg("--test")
        .args(&files)
        .current_dir(&root))
}

fn browser_tests() -> Result {
    let root = repo_root();
    let files = util::node_test_files(&root.join("tests/browser"));
    if files.is_empty() {
        println!();
        println!("!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!");
        println!("!!! SKIPPED: tests/browser/ has no test files yet, so no browser test ran.");
        println!("!!! They run here as soon as the first one is added.");
        println!("!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!!");
        return Ok(());
    }
    let listener = server::bind(None).map_err(|e| format!("cannot listen: {e}"))?;
    let addr = server::spawn(listener, site_dir()).map_err(|e| e.to_string())?;
    let base = format!("http://{addr}/");
    println!("static server for the browser tests: {base}");
    // tests/browser/single-file.test.mjs opens these from disk.
    let single = single_dir();
    write_single_files(&single)?;
    run(Command::new("node")
        .args(["--test", "--test-concurrency=1"])
        .args(&files)
        .env("RAILNOTE_BASE_URL", &base)
        .env("RAILNOTE_SINGLE_DIR", &single)
        .current_dir(&root))
}

/// Where the single files go (dist/single/).
fn single_dir() -> PathBuf {
    repo_root().join("dist/single")
}

/// Writes the single files from the built site/ and prints each one's size.
fn write_single_files(out: &Path) -> Result {
    header("single files: one self-contained HTML file per page and one for the whole site");
    let written = single::build(&site_dir(), out)?;
    for w in &written {
        let gz = util::gzip9_size(&w.path)?;
        let name = w.path.file_name().unwrap_or_default().to_string_lossy();
        println!(
            "{name:<16} {:>28}   gzip -9 {}",
            util::bytes(w.bytes),
            util::bytes(gz)
        );
    }
    for (page, why) in single::SKIPPED {
        println!("(not written: {page}, which {why})");
    }
    println!("{}", out.display());
    Ok(())
}

fn dist() -> Result {
    build()?;
    let out = repo_root().join("dist/railnote");
    header("dist: copying site/ to dist/railnote/");
    if out.exists() {
        fs::remove_dir_all(&out).map_err(|e| format!("cannot clear {}: {e}", out.display()))?;
    }
    // Type declarations are for editors, not browsers; dot files are never served.
    let skip = |p: &Path| {
        let name = p
            .file_name()
            .map(|n| n.to_string_lossy())
            .unwrap_or_default();
        name.ends_with(".d.ts") || name.starts_with('.')
    };
    let total = util::copy_tree(&site_dir(), &out, &skip)?;
    let files = count_files(&out);
    println!("{}", out.display());
    println!("{files} files, {} in total", util::bytes(total));
    println!(
        "Copy the folder as it is to any static host. It needs no server code; the host should \
         send .wasm as application/wasm (the page still loads without, a little slower)."
    );
    write_single_files(&single_dir())?;
    println!(
        "Each file opens from disk with no server; {} holds every page (?page=NAME).",
        single::WHOLE_SITE
    );
    Ok(())
}

fn count_files(dir: &Path) -> usize {
    fs::read_dir(dir)
        .map(|entries| {
            entries
                .flatten()
                .map(|e| {
                    let p = e.path();
                    if p.is_dir() {
                        count_files(&p)
                    } else {
                        1
                    }
                })
                .sum()
        })
        .unwrap_or(0)
}
