//! The single-file build: each page of site/ as one self-contained HTML file that opens from disk
//! (file://) with no server, and one file holding the whole site (`railnote.html`). Written by
//! `cargo xtask dist` into dist/single/ (and by the browser-test step, which tests them).
//!
//! Each file holds: the stylesheet in a `<style>` (its `url(…)`s as data: URLs), the favicon as a
//! data: URL, one `<script type="module">` with the page's module graph flattened into it
//! (flatten.rs) behind a prelude that declares `RAILNOTE_INLINE_WASM`, the WebAssembly module's
//! bytes decoded from base64 (engine.js instantiates from them instead of fetching), and its own
//! Content-Security-Policy meta: the hosted policy with the sha256 hashes of its one script and
//! one style in place of 'self' (nothing else is loaded, so the rest is 'none' or data:), and the
//! same 'wasm-unsafe-eval' and Trusted Types lines. A page's existing CSP meta is replaced.
//!
//! Links. A per-page file keeps the hosted names: `thermal.html` is the sibling single file, so
//! dist/single/ works as a folder of pages. In the whole-site file every page's body is a
//! `<template data-rn-page="NAME">`; the page shown is `?page=NAME` (index by default), and links
//! to NAME.html (static ones and those widgets make later, watched with a MutationObserver)
//! become `railnote.html?page=NAME&<their keys>#<their fragment>`: a reload of the same file, so
//! every widget starts exactly as on its hosted page, with its keys in the query.
//! The embed page is left out: it exists to be framed by a host page, which a file on disk cannot
//! be usefully, and it loads its calculator by dynamic import.

use crate::encode::{base64, csp_hash};
use crate::flatten::flatten;
use crate::util::Result;
use std::fs;
use std::path::{Path, PathBuf};

/// Pages not written as single files, with the reason (printed by dist).
pub const SKIPPED: &[(&str, &str)] = &[(
    "embed.html",
    "exists to be framed by a host page and loads its calculator by dynamic import",
)];

/// The whole-site file's name inside the output folder.
pub const WHOLE_SITE: &str = "railnote.html";

/// The policy of a single file. 'self' of the hosted policy becomes the hashes of the file's own
/// script and style; what the file never loads is 'none'.
fn csp(script_hash: &str, style_hash: &str) -> String {
    format!(
        "default-src 'none'; script-src {script_hash} 'wasm-unsafe-eval'; style-src {style_hash}; \
         img-src data:; connect-src 'none'; worker-src 'none'; manifest-src 'none'; \
         object-src 'none'; base-uri 'none'; form-action 'none'; \
         require-trusted-types-for 'script'; trusted-types railnote-sw"
    )
}

/// One written file: its path and size.
pub struct Written {
    pub path: PathBuf,
    pub bytes: u64,
}

/// Writes every single file into `out` (emptied first). `site` must hold a built site/pkg.
pub fn build(site: &Path, out: &Path) -> Result<Vec<Written>> {
    if out.exists() {
        fs::remove_dir_all(out).map_err(|e| format!("cannot clear {}: {e}", out.display()))?;
    }
    fs::create_dir_all(out).map_err(|e| format!("cannot create {}: {e}", out.display()))?;
    let wasm_path = site.join("pkg/railnote_bg.wasm");
    let wasm = fs::read(&wasm_path).map_err(|e| {
        format!(
            "cannot read {} (build the site first): {e}",
            wasm_path.display()
        )
    })?;
    let wasm_b64 = base64(&wasm);
    let pages = page_names(site)?;
    let mut written = Vec::new();
    let mut parsed = Vec::new();
    for name in &pages {
        let file = site.join(format!("{name}.html"));
        let html = fs::read_to_string(&file)
            .map_err(|e| format!("cannot read {}: {e}", file.display()))?;
        let page = Page::parse(name, &html).map_err(|e| format!("{name}.html: {e}"))?;
        let single = page_file(site, &page, &wasm_b64).map_err(|e| format!("{name}.html: {e}"))?;
        written.push(write(out, &format!("{name}.html"), &single)?);
        parsed.push(page);
    }
    let whole = whole_site_file(site, &parsed, &wasm_b64)?;
    written.push(write(out, WHOLE_SITE, &whole)?);
    Ok(written)
}

fn write(out: &Path, name: &str, text: &str) -> Result<Written> {
    let path = out.join(name);
    fs::write(&path, text).map_err(|e| format!("cannot write {}: {e}", path.display()))?;
    Ok(Written {
        path,
        bytes: text.len() as u64,
    })
}

/// site/*.html by name (without .html), sorted, less SKIPPED.
fn page_names(site: &Path) -> Result<Vec<String>> {
    let mut names = Vec::new();
    let entries = fs::read_dir(site).map_err(|e| format!("cannot read {}: {e}", site.display()))?;
    for entry in entries.flatten() {
        let file = entry.file_name().to_string_lossy().into_owned();
        if let Some(name) = file.strip_suffix(".html") {
            if SKIPPED.iter().any(|(s, _)| *s == file) {
                continue;
            }
            if file == WHOLE_SITE {
                return Err(format!(
                    "site/{file} has the name of the whole-site single file; rename one of them"
                ));
            }
            names.push(name.to_string());
        }
    }
    names.sort();
    if !names.iter().any(|n| n == "index") {
        return Err("site/ has no index.html for the whole-site file to open on".into());
    }
    Ok(names)
}

/// A page as the builder needs it: its head with the stylesheet, icon and scripts taken out
/// (marked where they go), its module entries, title and body.
#[derive(Debug)]
struct Page {
    name: String,
    /// From `<!doctype` to `</head>`, with markers for the pieces put back.
    head: String,
    /// After `</head>` to the end.
    rest: String,
    title: String,
    body_class: Option<String>,
    body_inner: String,
    stylesheet: String,
    icon: Option<String>,
    entries: Vec<String>,
}

const STYLE_MARK: &str = "\u{0}STYLE\u{0}";
const SCRIPT_MARK: &str = "\u{0}SCRIPT\u{0}";
const ICON_MARK: &str = "\u{0}ICON\u{0}";

/// Every `<tag …>` (opening tag only) in `html`: (start, end after `>`).
fn tags(html: &str, tag: &str) -> Vec<(usize, usize)> {
    let open = format!("<{tag}");
    let mut found = Vec::new();
    let lower = html.to_ascii_lowercase();
    let mut from = 0;
    while let Some(i) = lower[from..].find(&open) {
        let start = from + i;
        let after = lower[start + open.len()..].chars().next();
        if matches!(after, Some(' ' | '>' | '\n' | '\t' | '/')) {
            if let Some(end) = html[start..].find('>') {
                found.push((start, start + end + 1));
                from = start + end + 1;
                continue;
            }
        }
        from = start + open.len();
    }
    found
}

/// The value of attribute `name` in an opening tag (double-quoted, as the site writes them).
fn attr(tag: &str, name: &str) -> Option<String> {
    let lower = tag.to_ascii_lowercase();
    let key = format!(" {name}=\"");
    let i = lower.find(&key)? + key.len();
    let end = tag[i..].find('"')?;
    Some(tag[i..i + end].to_string())
}

impl Page {
    fn parse(name: &str, html: &str) -> Result<Page> {
        let head_end = html.find("</head>").ok_or("no </head>")?;
        let (head_src, rest) = html.split_at(head_end);
        // Replace from the back so earlier offsets stay valid.
        let mut edits: Vec<(usize, usize, String)> = Vec::new();
        let mut stylesheet = None;
        let mut icon = None;
        for (s, e) in tags(head_src, "link") {
            let tag = &head_src[s..e];
            let rel = attr(tag, "rel").unwrap_or_default();
            let href = attr(tag, "href").ok_or_else(|| format!("{tag} has no href"))?;
            match rel.as_str() {
                "stylesheet" => {
                    if stylesheet.replace(href).is_some() {
                        return Err("more than one stylesheet; the builder inlines one".into());
                    }
                    edits.push((s, e, STYLE_MARK.into()));
                }
                "icon" => {
                    edits.push((s, e, tag.replace(&format!("href=\"{href}\""), ICON_MARK)));
                    icon = Some(href);
                }
                other => {
                    return Err(format!(
                        "<link rel=\"{other}\"> is not inlined by the single-file builder \
                         (xtask/src/single.rs): teach it, or leave the link out"
                    ))
                }
            }
        }
        let mut entries = Vec::new();
        for (s, e) in tags(head_src, "script") {
            let tag = &head_src[s..e];
            let close = head_src[e..]
                .find("</script>")
                .ok_or_else(|| format!("{tag} is not closed"))?;
            if !head_src[e..e + close].trim().is_empty() {
                return Err("an inline script in the head (the hosted CSP forbids it)".into());
            }
            if attr(tag, "type").as_deref() != Some("module") {
                return Err(format!("{tag}: only module scripts are flattened"));
            }
            let src = attr(tag, "src").ok_or_else(|| format!("{tag} has no src"))?;
            let mark = if entries.is_empty() { SCRIPT_MARK } else { "" };
            entries.push(src.trim_start_matches("./").to_string());
            edits.push((s, e + close + "</script>".len(), mark.into()));
        }
        for (s, e) in tags(head_src, "meta") {
            let tag = &head_src[s..e];
            if attr(tag, "http-equiv")
                .is_some_and(|v| v.eq_ignore_ascii_case("content-security-policy"))
            {
                let e = if head_src[e..].starts_with('\n') {
                    e + 1
                } else {
                    e
                };
                edits.push((s, e, String::new()));
            }
        }
        edits.sort_by_key(|(s, _, _)| *s);
        let mut head = String::new();
        let mut at = 0;
        for (s, e, with) in &edits {
            head.push_str(&head_src[at..*s]);
            head.push_str(with);
            at = *e;
        }
        head.push_str(&head_src[at..]);
        if entries.is_empty() {
            // A page without scripts (index, reference) still gets the style; the script mark
            // goes before </head> so the page's whole-site sibling code path is the same.
            head.push_str(SCRIPT_MARK);
        }
        let stylesheet = stylesheet.ok_or("no stylesheet link")?;
        if !head.contains("<meta charset=\"utf-8\">") {
            return Err("no <meta charset=\"utf-8\"> to put the CSP meta after".into());
        }
        let title = tags(head_src, "title")
            .first()
            .and_then(|&(_, e)| {
                head_src[e..]
                    .find("</title>")
                    .map(|c| head_src[e..e + c].to_string())
            })
            .ok_or("no <title>")?;
        let (bs, be) = *tags(rest, "body").first().ok_or("no <body>")?;
        let body_tag = &rest[bs..be];
        let body_end = rest.rfind("</body>").ok_or("no </body>")?;
        let body_inner = rest[be..body_end].to_string();
        for bad in [
            "script", "link", "img", "iframe", "object", "embed", "template",
        ] {
            if !tags(&body_inner, bad).is_empty() {
                return Err(format!(
                    "a <{bad}> in the body: the single-file builder does not inline it"
                ));
            }
        }
        Ok(Page {
            name: name.to_string(),
            head,
            rest: rest.to_string(),
            title,
            body_class: attr(body_tag, "class"),
            body_inner,
            stylesheet,
            icon,
            entries,
        })
    }
}

fn mime(path: &str) -> Result<&'static str> {
    let ext = path.rsplit('.').next().unwrap_or("");
    Ok(match ext {
        "svg" => "image/svg+xml",
        "png" => "image/png",
        "woff2" => "font/woff2",
        "ico" => "image/x-icon",
        _ => {
            return Err(format!(
                "no data: URL type for {path} (add it in single.rs)"
            ))
        }
    })
}

fn data_url(site: &Path, path: &str) -> Result<String> {
    let file = site.join(path);
    let bytes = fs::read(&file).map_err(|e| format!("cannot read {}: {e}", file.display()))?;
    Ok(format!("data:{};base64,{}", mime(path)?, base64(&bytes)))
}

/// Joins a relative reference to the folder of `from` (paths below site/).
fn join(from: &str, rel: &str) -> String {
    let mut parts: Vec<&str> = from.split('/').collect();
    parts.pop();
    for p in rel.split('/') {
        match p {
            "." | "" => {}
            ".." => {
                parts.pop();
            }
            p => parts.push(p),
        }
    }
    parts.join("/")
}

/// The stylesheet with each `url(…)` of a site file as a data: URL.
fn stylesheet(site: &Path, href: &str) -> Result<String> {
    let file = site.join(href);
    let css =
        fs::read_to_string(&file).map_err(|e| format!("cannot read {}: {e}", file.display()))?;
    let mut out = String::new();
    let mut rest = css.as_str();
    while let Some(i) = rest.find("url(") {
        out.push_str(&rest[..i + 4]);
        rest = &rest[i + 4..];
        let end = rest
            .find(')')
            .ok_or_else(|| format!("{href}: unclosed url("))?;
        let arg = rest[..end].trim().trim_matches(|c| c == '"' || c == '\'');
        if arg.starts_with("data:") || arg.starts_with('#') {
            out.push_str(&rest[..end]);
        } else {
            out.push('"');
            out.push_str(&data_url(site, &join(href, arg))?);
            out.push('"');
        }
        rest = &rest[end..];
    }
    out.push_str(rest);
    if out.contains("</style") {
        return Err(format!("{href} contains </style"));
    }
    Ok(out)
}

/// The prelude every single file's script starts with: the module's bytes, then the two URL
/// functions flatten.rs rewrote `import.meta.url` to.
fn prelude(wasm_b64: &str, whole_site: Option<&[&str]>) -> String {
    let mut js = String::from(
        "// railnote, single-file build (cargo xtask dist; xtask/src/single.rs). The modules of \
         site/js and site/pkg follow, flattened\n// (xtask/src/flatten.rs); engine.js \
         instantiates the WebAssembly module from RAILNOTE_INLINE_WASM instead of fetching it.\n",
    );
    js.push_str("const RAILNOTE_INLINE_WASM = ((text) => {\n  const bin = atob(text);\n  const bytes = new Uint8Array(bin.length);\n  for (let i = 0; i < bin.length; i += 1) bytes[i] = bin.charCodeAt(i);\n  return bytes;\n})('");
    js.push_str(wasm_b64);
    js.push_str("');\n");
    js.push_str("const __rnModuleUrl = (path) => new URL(path, document.baseURI).href;\n");
    match whole_site {
        None => {
            js.push_str("const __rnPage = (name) => new URL(`${name}.html`, document.baseURI);\n")
        }
        Some(pages) => {
            let list: Vec<String> = pages.iter().map(|p| format!("'{p}'")).collect();
            js.push_str(&format!("const RAILNOTE_PAGES = [{}];\n", list.join(", ")));
            js.push_str(ROUTER);
        }
    }
    js
}

/// The whole-site file's router: shows `?page=NAME` from its template, turns links to NAME.html
/// into links to this file, and scrolls to the fragment once the page is in.
const ROUTER: &str = r#"const __rnHere = new URL(document.baseURI);
const __rnFileName = __rnHere.pathname.slice(__rnHere.pathname.lastIndexOf('/') + 1);
/** This file at page NAME (the widgets' links to their pages: query keys are added after page=). */
const __rnPage = (name) => {
  const u = new URL(__rnHere.href);
  u.search = `?page=${name}`;
  u.hash = '';
  return u;
};
(() => {
  const dirOf = (p) => p.slice(0, p.lastIndexOf('/') + 1);
  /** NAME when `u` points to NAME.html beside this file and NAME is a page held here. */
  const pageOf = (u) => {
    if (u.protocol !== __rnHere.protocol || u.host !== __rnHere.host) return null;
    if (dirOf(u.pathname) !== dirOf(__rnHere.pathname)) return null;
    const m = /\/([A-Za-z0-9_-]+)\.html$/.exec(u.pathname);
    return m && RAILNOTE_PAGES.includes(m[1]) ? m[1] : null;
  };
  const fix = (a) => {
    const href = a.getAttribute('href');
    if (!href || href.startsWith('#')) return;
    let u;
    try { u = new URL(href, document.baseURI); } catch { return; }
    const name = pageOf(u);
    if (!name) return;
    const params = new URLSearchParams(u.search);
    params.delete('page');
    const q = params.toString();
    a.setAttribute('href', `${__rnFileName}?page=${name}${q ? `&${q}` : ''}${u.hash}`);
  };
  const templates = [...document.querySelectorAll('template[data-rn-page]')];
  const want = __rnHere.searchParams.get('page') || 'index';
  let tpl = templates.find((t) => t.dataset.rnPage === want);
  const missing = !tpl;
  if (missing) tpl = templates.find((t) => t.dataset.rnPage === 'index');
  document.title = tpl.dataset.rnTitle;
  if (tpl.dataset.rnBodyClass) document.body.className = tpl.dataset.rnBodyClass;
  const page = tpl.content.cloneNode(true);
  page.querySelectorAll('a[href]').forEach(fix);
  if (missing) {
    const note = document.createElement('p');
    note.className = 'rn-error-box';
    note.textContent = `This file holds no page “${want.slice(0, 80)}”; here is the index. Pages: ${RAILNOTE_PAGES.join(', ')}.`;
    page.prepend(note);
  }
  document.body.prepend(page);
  new MutationObserver((records) => {
    for (const r of records) {
      if (r.type === 'attributes') { if (r.target.matches('a[href]')) fix(r.target); continue; }
      for (const n of r.addedNodes) {
        if (n.nodeType !== 1) continue;
        if (n.matches('a[href]')) fix(n);
        n.querySelectorAll('a[href]').forEach(fix);
      }
    }
  }).observe(document.body, { subtree: true, childList: true, attributes: true, attributeFilter: ['href'] });
  if (__rnHere.hash.length > 1) {
    let id = __rnHere.hash.slice(1);
    try { id = decodeURIComponent(id); } catch { /* keep it as written */ }
    const target = document.getElementById(id);
    if (target) target.scrollIntoView();
  }
})();
"#;

/// The page's script: prelude and flattened modules, refused if it could close its element.
fn script(site: &Path, entries: &[String], prelude: String) -> Result<String> {
    let (modules, _) = flatten(site, entries)?;
    let js = format!("{prelude}{modules}");
    if js.to_ascii_lowercase().contains("</script") {
        return Err("a module contains </script, which would end the inline script".into());
    }
    Ok(js)
}

fn attr_escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('"', "&quot;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
}

/// Fills a head's markers and puts the CSP meta right after the charset.
fn finish_head(head: &str, icon: Option<String>, css: &str, js: &str) -> Result<String> {
    let policy = csp(&csp_hash(js)?, &csp_hash(css)?);
    let mut head = head.replacen(
        "<meta charset=\"utf-8\">",
        &format!(
            "<meta charset=\"utf-8\">\n<meta http-equiv=\"Content-Security-Policy\" content=\"{policy}\">"
        ),
        1,
    );
    if let Some(icon) = icon {
        head = head.replace(ICON_MARK, &format!("href=\"{icon}\""));
    }
    head = head.replace(STYLE_MARK, &format!("<style>{css}</style>"));
    head = head.replace(
        SCRIPT_MARK,
        &format!("<script type=\"module\">{js}</script>\n"),
    );
    Ok(head)
}

fn page_file(site: &Path, page: &Page, wasm_b64: &str) -> Result<String> {
    let css = stylesheet(site, &page.stylesheet)?;
    let js = if page.entries.is_empty() {
        String::new()
    } else {
        script(site, &page.entries, prelude(wasm_b64, None))?
    };
    let icon = page
        .icon
        .as_deref()
        .map(|i| data_url(site, i))
        .transpose()?;
    let head = if js.is_empty() {
        // No script: no script element and no script hash.
        let head = page.head.replace(SCRIPT_MARK, "");
        finish_head(&head, icon, &css, "")?.replacen(
            &format!(" {} 'wasm-unsafe-eval'", csp_hash("")?),
            " 'none'",
            1,
        )
    } else {
        finish_head(&page.head, icon, &css, &js)?
    };
    Ok(format!("{head}{}", page.rest))
}

fn whole_site_file(site: &Path, pages: &[Page], wasm_b64: &str) -> Result<String> {
    let index = pages
        .iter()
        .find(|p| p.name == "index")
        .ok_or("no index page")?;
    for p in pages {
        if p.stylesheet != index.stylesheet || p.icon != index.icon {
            return Err(format!(
                "{}.html links another stylesheet or icon than index.html; the whole-site file holds one",
                p.name
            ));
        }
    }
    let names: Vec<&str> = pages.iter().map(|p| p.name.as_str()).collect();
    let mut entries: Vec<String> = Vec::new();
    for p in pages {
        for e in &p.entries {
            if !entries.contains(e) {
                entries.push(e.clone());
            }
        }
    }
    let css = stylesheet(site, &index.stylesheet)?;
    let js = script(site, &entries, prelude(wasm_b64, Some(&names)))?;
    let icon = index
        .icon
        .as_deref()
        .map(|i| data_url(site, i))
        .transpose()?;
    let mut head = finish_head(&index.head, icon, &css, &js)?;
    // The index's description and title stand for the file until the router sets the page's.
    head = head.replacen(
        &format!("<title>{}</title>", index.title),
        "<title>railnote</title>",
        1,
    );
    let mut body = String::from("\n<body>\n");
    for p in pages {
        body.push_str(&format!(
            "<template data-rn-page=\"{}\" data-rn-title=\"{}\"{}>{}</template>\n",
            p.name,
            attr_escape(&unescape_title(&p.title)),
            p.body_class
                .as_ref()
                .map(|c| format!(" data-rn-body-class=\"{}\"", attr_escape(c)))
                .unwrap_or_default(),
            p.body_inner
        ));
    }
    body.push_str("<noscript><p>railnote needs JavaScript and WebAssembly.</p></noscript>\n</body>\n</html>\n");
    Ok(format!("{head}</head>{body}"))
}

/// A page's <title> text as the browser shows it (the site writes &amp; and &middot; style
/// entities rarely; the common ones are undone so the attribute holds the plain text).
fn unescape_title(t: &str) -> String {
    t.replace("&middot;", "·")
        .replace("&lt;", "<")
        .replace("&gt;", ">")
        .replace("&quot;", "\"")
        .replace("&amp;", "&")
}

#[cfg(test)]
mod tests {
    use super::*;

    const PAGE: &str = "<!doctype html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
        <meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'self'\">\n\
        <title>Linear · railnote</title>\n<link rel=\"icon\" href=\"favicon.svg\" type=\"image/svg+xml\">\n\
        <link rel=\"stylesheet\" href=\"css/railnote.css\">\n<script type=\"module\" src=\"js/linear-widget.js\"></script>\n\
        </head>\n<body class=\"rn-x\">\n<p>hi</p>\n</body>\n</html>\n";

    #[test]
    fn a_page_is_taken_apart_with_its_csp_meta_removed_and_its_entries_found() {
        let p = Page::parse("linear", PAGE).unwrap();
        assert_eq!(p.entries, ["js/linear-widget.js"]);
        assert_eq!(p.stylesheet, "css/railnote.css");
        assert_eq!(p.icon.as_deref(), Some("favicon.svg"));
        assert_eq!(p.title, "Linear · railnote");
        assert_eq!(p.body_class.as_deref(), Some("rn-x"));
        assert!(!p.head.contains("Content-Security-Policy"), "{}", p.head);
        assert!(
            p.head.contains(SCRIPT_MARK)
                && p.head.contains(STYLE_MARK)
                && p.head.contains(ICON_MARK)
        );
        // Without a CSP meta it parses the same way.
        let bare = PAGE.replace(
            "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'self'\">\n",
            "",
        );
        assert_eq!(Page::parse("linear", &bare).unwrap().head, p.head);
    }

    #[test]
    fn the_head_gets_one_csp_meta_with_the_hashes_of_what_it_holds() {
        let p = Page::parse("linear", PAGE).unwrap();
        let head = finish_head(&p.head, Some("data:x".into()), "b{}", "let a;").unwrap();
        assert_eq!(head.matches("Content-Security-Policy").count(), 1);
        let meta_at = head.find("Content-Security-Policy").unwrap();
        assert!(meta_at < head.find("<script").unwrap() && meta_at < head.find("<style").unwrap());
        assert!(head.contains(&format!(
            "script-src {} 'wasm-unsafe-eval'",
            csp_hash("let a;").unwrap()
        )));
        assert!(head.contains(&format!("style-src {};", csp_hash("b{}").unwrap())));
        assert!(!head.contains("'self'") && !head.contains("unsafe-inline"));
        assert!(head.contains("<script type=\"module\">let a;</script>"));
        assert!(head.contains("href=\"data:x\""));
    }

    /// The text between `open` and `close` after the first `open`.
    fn between<'a>(s: &'a str, open: &str, close: &str) -> &'a str {
        let i = s.find(open).expect(open) + open.len();
        &s[i..i + s[i..].find(close).expect(close)]
    }

    #[test]
    fn a_small_site_becomes_single_files_whose_policy_hashes_what_they_hold() {
        let site = std::env::temp_dir().join(format!("railnote-single-{}", std::process::id()));
        let out = site.join("out");
        let _ = fs::remove_dir_all(&site);
        for (path, text) in [
            ("index.html", PAGE.replace("<script type=\"module\" src=\"js/linear-widget.js\"></script>\n", "")
                .replace("<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'self'\">\n", "")),
            ("linear.html", PAGE.to_string()),
            ("embed.html", "not read".to_string()),
            ("css/railnote.css", "i { background: url(\"../favicon.svg\"); }".to_string()),
            ("favicon.svg", "<svg/>".to_string()),
            ("js/linear-widget.js", "import { ready } from './engine.js';\nconst PAGE = new URL('../linear.html', import.meta.url).href;\nready.then(() => PAGE);\n".to_string()),
            ("js/engine.js", "export const ready = Promise.resolve(typeof RAILNOTE_INLINE_WASM);\n".to_string()),
            ("pkg/railnote_bg.wasm", "\0asm".to_string()),
        ] {
            let file = site.join(path);
            fs::create_dir_all(file.parent().unwrap()).unwrap();
            fs::write(file, text).unwrap();
        }
        let written = build(&site, &out).unwrap();
        let names: Vec<String> = written
            .iter()
            .map(|w| w.path.file_name().unwrap().to_string_lossy().into_owned())
            .collect();
        assert_eq!(names, ["index.html", "linear.html", WHOLE_SITE]);
        for name in &names {
            let html = fs::read_to_string(out.join(name)).unwrap();
            assert_eq!(
                html.matches("http-equiv=\"Content-Security-Policy\"")
                    .count(),
                1,
                "{name}"
            );
            let policy = between(
                &html,
                "http-equiv=\"Content-Security-Policy\" content=\"",
                "\"",
            );
            let css = between(&html, "<style>", "</style>");
            assert!(
                css.contains("url(\"data:image/svg+xml;base64,PHN2Zy8+\")"),
                "{css}"
            );
            assert!(
                policy.contains(&format!("style-src {};", csp_hash(css).unwrap())),
                "{policy}"
            );
            assert!(html.contains("<link rel=\"icon\" href=\"data:image/svg+xml;base64,PHN2Zy8+\""));
            if name == "index.html" {
                assert!(
                    !html.contains("<script") && policy.contains("script-src 'none';"),
                    "{policy}"
                );
                continue;
            }
            let js = between(&html, "<script type=\"module\">", "</script>");
            assert!(
                policy.contains(&format!(
                    "script-src {} 'wasm-unsafe-eval';",
                    csp_hash(js).unwrap()
                )),
                "{policy}"
            );
            // The module's bytes ("\0asm" in base64), and the page link rewritten.
            assert!(
                js.contains("})('AGFzbQ==');") && js.contains("__rnPage('linear')"),
                "{js}"
            );
        }
        let whole = fs::read_to_string(out.join(WHOLE_SITE)).unwrap();
        assert!(whole.contains("<template data-rn-page=\"index\" data-rn-title=\"Linear · railnote\" data-rn-body-class=\"rn-x\">"));
        assert!(whole.contains("<template data-rn-page=\"linear\""));
        assert!(whole.contains("const RAILNOTE_PAGES = ['index', 'linear'];"));
        fs::remove_dir_all(&site).unwrap();
    }

    #[test]
    fn unknown_links_and_body_scripts_are_refused() {
        let manifest = PAGE.replace(
            "<title>",
            "<link rel=\"manifest\" href=\"m.json\">\n<title>",
        );
        assert!(Page::parse("x", &manifest)
            .unwrap_err()
            .contains("rel=\"manifest\""));
        let body_script = PAGE.replace("<p>hi</p>", "<script src=\"x.js\"></script>");
        assert!(Page::parse("x", &body_script)
            .unwrap_err()
            .contains("<script> in the body"));
    }
}
