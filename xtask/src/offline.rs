//! The service worker's precache list (site/pkg/precache.js), written by every site build.
//!
//! site/sw.js imports it with importScripts: `self.RAILNOTE_PRECACHE = { version, files }`. The
//! list is every file below site/ that a host serves (dot files, type declarations, the worker
//! and this file left out) plus `./` for the folder's address, so a new site file is precached
//! without anyone listing it. The version is the first 16 hex digits of a SHA-256 over every
//! listed file's path and bytes and over sw.js itself: any change to the site changes
//! precache.js, the browser's update check sees a changed worker, and the new worker caches the
//! new files under a new cache name (`railnote-<version>`) and deletes the old caches.

use crate::encode::{hex, sha256};
use crate::util::Result;
use std::fs;
use std::path::Path;

/// Where the list goes, below site/.
pub const PRECACHE: &str = "pkg/precache.js";
/// The worker, below site/.
pub const WORKER: &str = "sw.js";

/// Whether a path below site/ is one the worker precaches.
pub fn precached(path: &str) -> bool {
    let name = path.rsplit('/').next().unwrap_or(path);
    !(name.starts_with('.') || name.ends_with(".d.ts") || path == WORKER || path == PRECACHE)
}

fn collect(site: &Path, dir: &Path, out: &mut Vec<String>) -> Result {
    let entries = fs::read_dir(dir).map_err(|e| format!("cannot read {}: {e}", dir.display()))?;
    for entry in entries.flatten() {
        let path = entry.path();
        let rel = path
            .strip_prefix(site)
            .map_err(|e| e.to_string())?
            .to_string_lossy()
            .replace('\\', "/");
        if entry.file_name().to_string_lossy().starts_with('.') {
            continue;
        }
        if path.is_dir() {
            collect(site, &path, out)?;
        } else if precached(&rel) {
            out.push(rel);
        }
    }
    Ok(())
}

/// The precached files (sorted, below site/) and the version.
pub fn manifest(site: &Path) -> Result<(Vec<String>, String)> {
    let mut files = Vec::new();
    collect(site, site, &mut files)?;
    files.sort();
    let mut all = Vec::new();
    for f in files.iter().map(String::as_str).chain([WORKER]) {
        let bytes = fs::read(site.join(f)).map_err(|e| format!("cannot read site/{f}: {e}"))?;
        all.extend_from_slice(f.as_bytes());
        all.push(0);
        all.extend_from_slice(&(bytes.len() as u64).to_le_bytes());
        all.extend_from_slice(&bytes);
    }
    let version = hex(&sha256(&all)?)[..16].to_string();
    Ok((files, version))
}

/// Writes site/pkg/precache.js; returns the version and the number of files.
pub fn write_precache(site: &Path) -> Result<(String, usize)> {
    let (files, version) = manifest(site)?;
    let mut list = vec!["'./'".to_string()];
    list.extend(files.iter().map(|f| format!("'{f}'")));
    let text = format!(
        "// Written by the site build (cargo xtask build; xtask/src/offline.rs): what site/sw.js \
         precaches, and its version.\nself.RAILNOTE_PRECACHE = {{\n  version: '{version}',\n  \
         files: [\n    {},\n  ],\n}};\n",
        list.join(",\n    ")
    );
    let out = site.join(PRECACHE);
    fs::write(&out, text).map_err(|e| format!("cannot write {}: {e}", out.display()))?;
    Ok((version, files.len()))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn what_is_precached() {
        for yes in [
            "index.html",
            "js/common.js",
            "pkg/railnote_bg.wasm",
            "favicon.svg",
        ] {
            assert!(precached(yes), "{yes}");
        }
        for no in [
            "sw.js",
            "pkg/precache.js",
            "pkg/railnote.d.ts",
            ".DS_Store",
            "js/.x.swp",
        ] {
            assert!(!precached(no), "{no}");
        }
    }

    #[test]
    fn a_new_file_is_listed_and_changes_the_version() {
        let dir = std::env::temp_dir().join(format!("railnote-precache-{}", std::process::id()));
        let _ = fs::remove_dir_all(&dir);
        fs::create_dir_all(dir.join("js")).unwrap();
        fs::create_dir_all(dir.join("pkg")).unwrap();
        fs::write(dir.join("index.html"), "a").unwrap();
        fs::write(dir.join("sw.js"), "w").unwrap();
        let (files, v1) = manifest(&dir).unwrap();
        assert_eq!(files, ["index.html"]);
        fs::write(dir.join("js/new.js"), "n").unwrap();
        let (files, v2) = manifest(&dir).unwrap();
        assert_eq!(files, ["index.html", "js/new.js"]);
        assert_ne!(v1, v2);
        // The worker's own change changes the version too; the list file does not count.
        fs::write(dir.join("sw.js"), "w2").unwrap();
        let (_, v3) = manifest(&dir).unwrap();
        assert_ne!(v2, v3);
        write_precache(&dir).unwrap();
        let (_, v4) = manifest(&dir).unwrap();
        assert_eq!(v3, v4);
        let text = fs::read_to_string(dir.join(PRECACHE)).unwrap();
        assert!(text.contains(&format!("version: '{v3}'")) && text.contains("'js/new.js'"));
    }
}
