//! The module flattener of the single-file build: railnote's ES modules (site/js/*.js and
//! wasm-bindgen's site/pkg/railnote.js) combined into one script, for an inline
//! `<script type="module">` that cannot import other files.
//!
//! Why by hand rather than a bundler: the site's modules keep to a small fixed style, the
//! single file needs two rewrites of our own (`import.meta.url`, page links; below), and xtask
//! stays std-only (a bundler such as esbuild would bring a native binary package and a Node step
//! to the build). Anything outside the style is refused with the module and line, never guessed
//! at, so a new construct fails the build instead of shipping a broken file.
//!
//! The style (checked here):
//! - imports at the start of a line, relative paths only: `import { a, b as c } from './x.js';`
//!   (may span lines), `import d from '…'`, `import * as ns from '…'`, `import d, * as ns from
//!   '…'`, `import d, { a } from '…'`, `import '…'`. No dynamic `import()`.
//! - exports at the start of a line: `export function|async function|class|const NAME`,
//!   `export { a, b as c };`, `export default …`. No `export let`/`var` (their live bindings
//!   would be lost), no re-exports (`export … from`), one name per `export const`.
//! - no import cycles.
//!
//! How: each module becomes a function scope run once, in dependency order (the order ES module
//! evaluation uses for an acyclic graph), that starts with `const` bindings of what it imports
//! from the namespace objects of its dependencies and ends by returning its own frozen
//! namespace object. Every imported name must be exported by its dependency (checked), so a
//! misspelled or multi-declarator export fails the build.
//!
//! `import.meta.url` has no per-module meaning inside one inline script, so
//! `new URL('../NAME.html', import.meta.url)` (a widget's link to a page) becomes
//! `__rnPage('NAME')`, and any other `import.meta.url` becomes `__rnModuleUrl('js/x.js')` (the
//! URL the module would have beside the single file). The single-file builder defines both.

use crate::util::Result;
use std::collections::{BTreeMap, HashSet};
use std::fs;
use std::path::Path;

/// One module after parsing: its path below the site, its dependencies and its rewritten body.
struct Module {
    path: String,
    /// (specifier resolved to a site path, what is bound locally)
    imports: Vec<(String, Binding)>,
    exports: BTreeMap<String, String>,
    body: String,
}

enum Binding {
    /// `import './x.js'`
    SideEffect,
    /// `import d from` → local name
    Default(String),
    /// `import * as ns from` → local name
    Namespace(String),
    /// `import { a as b }` → (exported, local)
    Named(Vec<(String, String)>),
}

/// Flattens the module graph reachable from `entries` (paths below `site`, such as
/// `js/linear-widget.js`) into one script body. Returns the script and the module paths in
/// evaluation order.
pub fn flatten(site: &Path, entries: &[String]) -> Result<(String, Vec<String>)> {
    let mut loaded: BTreeMap<String, Module> = BTreeMap::new();
    let mut order = Vec::new();
    let mut active = Vec::new();
    for entry in entries {
        visit(site, entry, &mut loaded, &mut order, &mut active)?;
    }
    // Every imported name must exist in its dependency.
    for module in loaded.values() {
        for (dep, binding) in &module.imports {
            if let Binding::Named(names) = binding {
                let exports = &loaded[dep].exports;
                for (name, _) in names {
                    if !exports.contains_key(name) {
                        return Err(format!(
                            "{} imports {name:?} from {dep}, which does not export it (exports: {})",
                            module.path,
                            exports.keys().cloned().collect::<Vec<_>>().join(", ")
                        ));
                    }
                }
            }
            if let Binding::Default(_) = binding {
                if !loaded[dep].exports.contains_key("default") {
                    return Err(format!(
                        "{} imports the default of {dep}, which has no default export",
                        module.path
                    ));
                }
            }
        }
    }
    let mut out = String::new();
    for path in &order {
        let m = &loaded[path];
        out.push_str(&format!(
            "// ---- {path}\nconst {} = (() => {{\n",
            var_name(path)
        ));
        for (dep, binding) in &m.imports {
            let ns = var_name(dep);
            match binding {
                Binding::SideEffect => {}
                Binding::Default(local) => {
                    out.push_str(&format!("const {local} = {ns}.default;\n"))
                }
                Binding::Namespace(local) => out.push_str(&format!("const {local} = {ns};\n")),
                Binding::Named(names) => {
                    let list: Vec<String> = names
                        .iter()
                        .map(|(name, local)| {
                            if name == local {
                                name.clone()
                            } else {
                                format!("{name}: {local}")
                            }
                        })
                        .collect();
                    out.push_str(&format!("const {{ {} }} = {ns};\n", list.join(", ")));
                }
            }
        }
        out.push_str(&m.body);
        if !m.body.ends_with('\n') {
            out.push('\n');
        }
        let fields: Vec<String> = m
            .exports
            .iter()
            .map(|(name, local)| format!("{name}: {local}"))
            .collect();
        out.push_str(&format!(
            "return Object.freeze({{ __proto__: null, {} }});\n}})();\n",
            fields.join(", ")
        ));
    }
    Ok((out, order))
}

fn visit(
    site: &Path,
    path: &str,
    loaded: &mut BTreeMap<String, Module>,
    order: &mut Vec<String>,
    active: &mut Vec<String>,
) -> Result {
    if loaded.contains_key(path) {
        return Ok(());
    }
    if active.iter().any(|p| p == path) {
        active.push(path.to_string());
        return Err(format!(
            "import cycle: {} (the flattener runs modules in dependency order and needs none)",
            active.join(" → ")
        ));
    }
    active.push(path.to_string());
    let file = site.join(path);
    let source =
        fs::read_to_string(&file).map_err(|e| format!("cannot read {}: {e}", file.display()))?;
    let module = parse(path, &source)?;
    for (dep, _) in &module.imports {
        visit(site, dep, loaded, order, active)?;
    }
    active.pop();
    order.push(path.to_string());
    loaded.insert(path.to_string(), module);
    Ok(())
}

/// The JavaScript name of a module's namespace object: `js/common.js` → `__rn_js_common_js`.
fn var_name(path: &str) -> String {
    let mut name = String::from("__rn_");
    name.extend(
        path.chars()
            .map(|c| if c.is_ascii_alphanumeric() { c } else { '_' }),
    );
    name
}

/// `dir` of `from` joined with a relative specifier, normalised; refuses leaving the site.
fn resolve(from: &str, spec: &str) -> std::result::Result<String, String> {
    if !(spec.starts_with("./") || spec.starts_with("../")) {
        return Err(format!(
            "import of {spec:?}: only relative paths (./ or ../) are flattened"
        ));
    }
    let mut parts: Vec<&str> = from.split('/').collect();
    parts.pop();
    for piece in spec.split('/') {
        match piece {
            "." | "" => {}
            ".." => {
                if parts.pop().is_none() {
                    return Err(format!("import of {spec:?} leaves the site folder"));
                }
            }
            p => parts.push(p),
        }
    }
    Ok(parts.join("/"))
}

fn is_ident(s: &str) -> bool {
    let mut chars = s.chars();
    matches!(chars.next(), Some(c) if c.is_ascii_alphabetic() || c == '_' || c == '$')
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_' || c == '$')
}

fn ident(s: &str, what: &str) -> std::result::Result<String, String> {
    let s = s.trim();
    if is_ident(s) {
        Ok(s.to_string())
    } else {
        Err(format!("{what} {s:?} is not a plain name"))
    }
}

/// `a, b as c` (inside braces) → [(a, a), (b, c)]; `as` maps left to right.
fn name_list(inner: &str) -> std::result::Result<Vec<(String, String)>, String> {
    let mut names = Vec::new();
    for item in inner.split(',').map(str::trim).filter(|s| !s.is_empty()) {
        let words: Vec<&str> = item.split_whitespace().collect();
        match words.as_slice() {
            [one] => names.push((ident(one, "name")?, ident(one, "name")?)),
            [left, "as", right] => {
                let left = if *left == "default" {
                    "default".to_string()
                } else {
                    ident(left, "name")?
                };
                let right = if *right == "default" {
                    "default".to_string()
                } else {
                    ident(right, "name")?
                };
                names.push((left, right));
            }
            _ => return Err(format!("cannot read {item:?} in a name list")),
        }
    }
    Ok(names)
}

/// Strips a quoted specifier: `'./x.js'` or `"./x.js"`.
fn unquote(s: &str) -> std::result::Result<String, String> {
    let s = s.trim().trim_end_matches(';').trim();
    let q = s.chars().next().unwrap_or(' ');
    if (q == '\'' || q == '"') && s.len() >= 2 && s.ends_with(q) {
        Ok(s[1..s.len() - 1].to_string())
    } else {
        Err(format!("{s:?} is not a quoted module path"))
    }
}

fn parse_import(from: &str, stmt: &str) -> std::result::Result<Vec<(String, Binding)>, String> {
    let rest = stmt.trim().strip_prefix("import").unwrap_or("").trim();
    if rest.starts_with('\'') || rest.starts_with('"') {
        return Ok(vec![(resolve(from, &unquote(rest)?)?, Binding::SideEffect)]);
    }
    // The last `from` keyword: after `}` or a space, before a space or the quote.
    let at = rest
        .match_indices("from")
        .map(|(i, _)| i)
        .filter(|&i| {
            let before = rest[..i].chars().last();
            let after = rest[i + 4..].chars().next();
            matches!(before, Some('}' | ' ')) && matches!(after, Some(' ' | '\'' | '"'))
        })
        .last()
        .ok_or_else(|| "an import without `from`".to_string())?;
    let clause = rest[..at].trim();
    let spec = &rest[at + 4..];
    let dep = resolve(from, &unquote(spec)?)?;
    let mut out = Vec::new();
    let mut clause = clause.trim();
    // A default binding first, if any.
    if !clause.starts_with('{') && !clause.starts_with('*') {
        let (name, after) = match clause.find(',') {
            Some(i) => (&clause[..i], clause[i + 1..].trim()),
            None => (clause, ""),
        };
        out.push((
            dep.clone(),
            Binding::Default(ident(name, "default import")?),
        ));
        clause = after;
    }
    if let Some(ns) = clause.strip_prefix('*') {
        let ns = ns.trim().strip_prefix("as").ok_or("`* ` without `as`")?;
        out.push((dep.clone(), Binding::Namespace(ident(ns, "namespace")?)));
    } else if let Some(inner) = clause.strip_prefix('{') {
        let inner = inner
            .strip_suffix('}')
            .ok_or_else(|| format!("unclosed braces in {clause:?}"))?;
        out.push((dep.clone(), Binding::Named(name_list(inner)?)));
    } else if !clause.is_empty() {
        return Err(format!("cannot read the import clause {clause:?}"));
    }
    Ok(out)
}

/// The declared name after `export ` in `function f(`, `async function f(`, `class C `,
/// `const X =`; None for other forms.
fn declared_name(decl: &str) -> Option<String> {
    let decl = decl.trim_start();
    let rest = decl
        .strip_prefix("async function")
        .or_else(|| decl.strip_prefix("function"))
        .or_else(|| decl.strip_prefix("class "))
        .or_else(|| decl.strip_prefix("const "))?;
    let rest = rest.trim_start().trim_start_matches('*').trim_start();
    let name: String = rest
        .chars()
        .take_while(|c| c.is_ascii_alphanumeric() || *c == '_' || *c == '$')
        .collect();
    is_ident(&name).then_some(name)
}

/// Reads a statement starting at line `i` up to the line that ends it with `;` (imports and
/// export lists); returns (text, index of the last line).
fn statement(lines: &[&str], i: usize) -> (String, usize) {
    let mut text = String::new();
    let mut j = i;
    loop {
        text.push_str(lines[j]);
        text.push(' ');
        if lines[j].trim_end().ends_with(';') || j + 1 == lines.len() {
            return (text, j);
        }
        j += 1;
    }
}

fn parse(path: &str, source: &str) -> Result<Module> {
    let fail = |line: usize, why: String| format!("{path}:{}: {why}", line + 1);
    let lines: Vec<&str> = source.lines().collect();
    let mut imports = Vec::new();
    let mut exports = BTreeMap::new();
    let mut body = String::new();
    let mut i = 0;
    while i < lines.len() {
        let line = lines[i];
        if line.starts_with("import ") || line.starts_with("import{") {
            let (stmt, end) = statement(&lines, i);
            imports.extend(parse_import(path, &stmt).map_err(|e| fail(i, e))?);
            i = end + 1;
            continue;
        }
        if let Some(rest) = line.strip_prefix("export ") {
            let rest_t = rest.trim_start();
            if rest_t.starts_with('{') {
                let (stmt, end) = statement(&lines, i);
                let inner = stmt.trim().strip_prefix("export").unwrap_or("").trim();
                if inner.contains(" from ") {
                    return Err(fail(
                        i,
                        "re-exports (`export … from`) are not flattened".into(),
                    ));
                }
                let inner = inner
                    .trim_end_matches(';')
                    .trim()
                    .strip_prefix('{')
                    .and_then(|s| s.strip_suffix('}'))
                    .ok_or_else(|| fail(i, format!("cannot read {stmt:?}")))?;
                for (local, exported) in name_list(inner).map_err(|e| fail(i, e))? {
                    exports.insert(exported, local);
                }
                i = end + 1;
                continue;
            }
            if rest_t.starts_with('*') {
                return Err(fail(i, "`export *` is not flattened".into()));
            }
            if rest_t.starts_with("let ") || rest_t.starts_with("var ") {
                return Err(fail(
                    i,
                    "`export let`/`export var` would lose its live binding; export a const or a function"
                        .into(),
                ));
            }
            if let Some(def) = rest_t.strip_prefix("default ") {
                match declared_name(def) {
                    Some(name) if !def.trim_start().starts_with("const") => {
                        exports.insert("default".into(), name);
                        body.push_str(def);
                    }
                    _ => {
                        exports.insert("default".into(), "__rn_default".into());
                        body.push_str("const __rn_default = ");
                        body.push_str(def);
                    }
                }
                body.push('\n');
                i += 1;
                continue;
            }
            let name = declared_name(rest_t).ok_or_else(|| {
                fail(
                    i,
                    format!("cannot read the export {line:?} (see the style in flatten.rs)"),
                )
            })?;
            exports.insert(name.clone(), name);
            body.push_str(rest);
            body.push('\n');
            i += 1;
            continue;
        }
        if line.contains("import(") && !line.trim_start().starts_with("//") {
            return Err(fail(i, "dynamic import() is not flattened".into()));
        }
        body.push_str(line);
        body.push('\n');
        i += 1;
    }
    let body = rewrite_import_meta(path, &body)?;
    Ok(Module {
        path: path.to_string(),
        imports: dedupe(imports),
        exports,
        body,
    })
}

/// Keeps the first of repeated bindings of the same dependency in order (a module may import a
/// default and names from one file in two statements; both are kept, order preserved).
fn dedupe(imports: Vec<(String, Binding)>) -> Vec<(String, Binding)> {
    let mut seen_side = HashSet::new();
    imports
        .into_iter()
        .filter(|(dep, b)| !matches!(b, Binding::SideEffect) || seen_side.insert(dep.clone()))
        .collect()
}

/// `new URL('../NAME.html', import.meta.url)` → `__rnPage('NAME')`; other `import.meta.url` →
/// `__rnModuleUrl('<path>')`; any other `import.meta` is refused. Comments are rewritten too
/// (harmless).
fn rewrite_import_meta(path: &str, body: &str) -> Result<String> {
    let mut out = String::with_capacity(body.len());
    let mut rest = body;
    const PAGE_START: &str = "new URL('../";
    const PAGE_END: &str = ".html', import.meta.url)";
    while let Some(at) = rest.find("import.meta") {
        // Is this the page form? Look back for `new URL('../NAME` right before.
        let before = &rest[..at];
        let page_form = before.rfind(PAGE_START).and_then(|start| {
            let name = &rest[start + PAGE_START.len()..];
            let end = name.find(PAGE_END)?;
            let name = &name[..end];
            (start + PAGE_START.len() + end + PAGE_END.len() - "import.meta.url)".len() == at
                && !name.is_empty()
                && name
                    .chars()
                    .all(|c| c.is_ascii_alphanumeric() || c == '-' || c == '_'))
            .then(|| {
                (
                    start,
                    name.to_string(),
                    start + PAGE_START.len() + end + PAGE_END.len(),
                )
            })
        });
        if let Some((start, name, end)) = page_form {
            out.push_str(&rest[..start]);
            out.push_str(&format!("__rnPage('{name}')"));
            rest = &rest[end..];
            continue;
        }
        if rest[at..].starts_with("import.meta.url") {
            out.push_str(before);
            out.push_str(&format!("__rnModuleUrl('{path}')"));
            rest = &rest[at + "import.meta.url".len()..];
            continue;
        }
        let line = body[..body.len() - rest.len() + at].lines().count();
        return Err(format!(
            "{path}:{line}: only import.meta.url is flattened, not other import.meta fields"
        ));
    }
    out.push_str(rest);
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn site(files: &[(&str, &str)]) -> std::path::PathBuf {
        static NEXT: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
        let n = NEXT.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        let dir = std::env::temp_dir().join(format!("railnote-flatten-{}-{n}", std::process::id()));
        let _ = fs::remove_dir_all(&dir);
        for (path, text) in files {
            let file = dir.join(path);
            fs::create_dir_all(file.parent().unwrap()).unwrap();
            fs::write(file, text).unwrap();
        }
        dir
    }

    /// Runs the flattened script in Node and returns what it printed.
    fn run_in_node(script: &str) -> String {
        let out = std::process::Command::new("node")
            .args(["--input-type=module", "-e", script])
            .output()
            .expect("node runs");
        assert!(
            out.status.success(),
            "node failed: {}\n{script}",
            String::from_utf8_lossy(&out.stderr)
        );
        String::from_utf8_lossy(&out.stdout).into_owned()
    }

    #[test]
    fn every_import_and_export_form_of_the_style_runs_as_modules_would() {
        let dir = site(&[
            (
                "js/main.js",
                "import { twice, label as name } from './lib.js';\nimport init, * as pkg from '../pkg/glue.js';\nimport {\n  answer,\n} from './lib.js';\nimport './side.js';\nconsole.log(twice(answer), name, init(), pkg.extra, pkg.default === init);\nconsole.log(new URL('../thermal.html', import.meta.url).href);\nconsole.log(import.meta.url);\n",
            ),
            (
                "js/lib.js",
                "export const answer = 21;\nexport function twice(x) { return 2 * x; }\nconst label = 'lib';\nexport { label };\nexport class Thing {}\n",
            ),
            (
                "pkg/glue.js",
                "function start() { return 'started'; }\nconst extra = 7;\nexport { extra, start as default };\n",
            ),
            ("js/side.js", "console.log('side effect first');\n"),
        ]);
        let (script, order) = flatten(&dir, &["js/main.js".into()]).unwrap();
        assert_eq!(
            order,
            ["js/lib.js", "pkg/glue.js", "js/side.js", "js/main.js"]
        );
        let prelude = "const __rnPage = (n) => new URL(`https://x.test/single/${n}.html`);\nconst __rnModuleUrl = (p) => `https://x.test/single/${p}`;\n";
        let printed = run_in_node(&format!("{prelude}{script}"));
        assert_eq!(
            printed,
            "side effect first\n42 lib started 7 true\nhttps://x.test/single/thermal.html\nhttps://x.test/single/js/main.js\n"
        );
    }

    #[test]
    fn outside_the_style_is_refused_with_the_place() {
        for (files, says) in [
            (
                vec![
                    ("js/a.js", "import { b } from './b.js';\n"),
                    (
                        "js/b.js",
                        "import { a } from './a.js';\nexport const b = 1;\n",
                    ),
                ],
                "import cycle: js/a.js → js/b.js → js/a.js",
            ),
            (
                vec![("js/a.js", "export let x = 1;\n")],
                "js/a.js:1: `export let`",
            ),
            (
                vec![("js/a.js", "import x from 'lib';\n")],
                "only relative paths",
            ),
            (vec![("js/a.js", "export * from './b.js';\n")], "`export *`"),
            (
                vec![("js/a.js", "  const m = await import('./b.js');\n")],
                "js/a.js:1: dynamic import()",
            ),
            (
                vec![
                    ("js/a.js", "import { nope } from './b.js';\n"),
                    ("js/b.js", "export const yes = 1;\n"),
                ],
                "imports \"nope\" from js/b.js, which does not export it",
            ),
            (
                vec![("js/a.js", "console.log(import.meta.resolve('x'));\n")],
                "only import.meta.url",
            ),
        ] {
            let dir = site(&files);
            let err = flatten(&dir, &["js/a.js".into()]).unwrap_err();
            assert!(err.contains(says), "expected {says:?} in {err:?}");
        }
    }
}
