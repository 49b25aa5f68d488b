//! Where the module's bytes go: the size of each function's body, read from a WebAssembly file's
//! code section and named from its `name` section, summed by the part of railnote (or the crate)
//! it belongs to. `cargo xtask bench` prints it from wasm-bindgen's output (before wasm-opt,
//! which drops the names), so a size change can be traced to a calculator.
//!
//! Only the little of the binary format this needs (the WebAssembly core specification, 5.5
//! "Modules": section ids 2 imports, 10 code, 0 custom "name" with subsection 1 function names).

use std::collections::BTreeMap;

/// Function-body sizes in bytes with their names (`?` where the name section has none).
pub fn function_sizes(module: &[u8]) -> Result<Vec<(usize, String)>, String> {
    if module.len() < 8 || &module[..4] != b"\0asm" {
        return Err("not a WebAssembly module".into());
    }
    let mut at = 8;
    let mut imported_functions = 0;
    let mut bodies = Vec::new();
    let mut names = BTreeMap::new();
    while at < module.len() {
        let id = module[at];
        at += 1;
        let size = leb(module, &mut at)? as usize;
        let end = at.checked_add(size).filter(|e| *e <= module.len());
        let end = end.ok_or("a section runs past the end of the file")?;
        let mut p = at;
        match id {
            2 => {
                for _ in 0..leb(module, &mut p)? {
                    for _ in 0..2 {
                        let len = leb(module, &mut p)? as usize;
                        p += len;
                    }
                    let kind = *module.get(p).ok_or("truncated import")?;
                    p += 1;
                    match kind {
                        0 => {
                            leb(module, &mut p)?;
                            imported_functions += 1;
                        }
                        1 => {
                            p += 1;
                            let flags = leb(module, &mut p)?;
                            leb(module, &mut p)?;
                            if flags & 1 == 1 {
                                leb(module, &mut p)?;
                            }
                        }
                        2 => {
                            let flags = leb(module, &mut p)?;
                            leb(module, &mut p)?;
                            if flags & 1 == 1 {
                                leb(module, &mut p)?;
                            }
                        }
                        3 => p += 2,
                        _ => p += 1,
                    }
                }
            }
            10 => {
                for _ in 0..leb(module, &mut p)? {
                    let start = p;
                    let len = leb(module, &mut p)? as usize;
                    p += len;
                    bodies.push(p - start);
                }
            }
            0 => {
                let len = leb(module, &mut p)? as usize;
                if module.get(p..p + len) == Some(b"name") {
                    p += len;
                    while p < end {
                        let sub = module[p];
                        p += 1;
                        let sub_len = leb(module, &mut p)? as usize;
                        let sub_end = p + sub_len;
                        if sub == 1 {
                            for _ in 0..leb(module, &mut p)? {
                                let index = leb(module, &mut p)?;
                                let len = leb(module, &mut p)? as usize;
                                let name = module.get(p..p + len).ok_or("truncated name")?;
                                names.insert(index, String::from_utf8_lossy(name).into_owned());
                                p += len;
                            }
                        }
                        p = sub_end;
                    }
                }
            }
            _ => {}
        }
        at = end;
    }
    Ok(bodies
        .into_iter()
        .enumerate()
        .map(|(k, size)| {
            let index = imported_functions + k as u64;
            (
                size,
                names.get(&index).cloned().unwrap_or_else(|| "?".into()),
            )
        })
        .collect())
}

/// What a function belongs to: `core::divider` for anything of railnote-core's divider module
/// (its reports' writers included), `wasm` for the binding crate, else the crate's name.
pub fn part_of(name: &str) -> String {
    if let Some(at) = name.find("railnote_core::") {
        let rest = &name[at + "railnote_core::".len()..];
        let module: String = rest
            .chars()
            .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
            .collect();
        return format!("core::{module}");
    }
    if name.contains("railnote_wasm") {
        return "wasm".into();
    }
    let name = name.trim_start_matches(['<', '_']);
    let krate: String = name
        .chars()
        .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
        .collect();
    if krate.is_empty() {
        "other".into()
    } else {
        krate
    }
}

/// Sizes summed by [`part_of`], largest first.
pub fn by_part(sizes: &[(usize, String)]) -> Vec<(String, usize)> {
    let mut parts: BTreeMap<String, usize> = BTreeMap::new();
    for (size, name) in sizes {
        *parts.entry(part_of(name)).or_default() += size;
    }
    let mut parts: Vec<(String, usize)> = parts.into_iter().collect();
    parts.sort_by(|a, b| b.1.cmp(&a.1).then(a.0.cmp(&b.0)));
    parts
}

fn leb(bytes: &[u8], at: &mut usize) -> Result<u64, String> {
    let mut value = 0u64;
    let mut shift = 0;
    loop {
        let byte = *bytes.get(*at).ok_or("truncated number")?;
        *at += 1;
        value |= u64::from(byte & 0x7f) << shift;
        if byte < 0x80 {
            return Ok(value);
        }
        shift += 7;
        if shift > 63 {
            return Err("number too long".into());
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A module with one imported function and two defined ones, the second unnamed.
    fn module() -> Vec<u8> {
        let mut m = b"\0asm\x01\0\0\0".to_vec();
        // type section: one type () -> ()
        m.extend([1, 4, 1, 0x60, 0, 0]);
        // import section: "e" "f" func type 0
        m.extend([2, 7, 1, 1, b'e', 1, b'f', 0, 0]);
        // function section: two functions of type 0
        m.extend([3, 3, 2, 0, 0]);
        // code section: bodies of 2 and 4 bytes (each with its size byte: 3 and 5)
        m.extend([10, 9, 2, 2, 0, 0x0b, 4, 0, 1, 1, 0x0b]);
        // name section: function 1 is "railnote_core::divider::search"
        let name = b"railnote_core::divider::search";
        let mut sub = vec![1, 1, name.len() as u8];
        sub.extend(name);
        let mut body = vec![4];
        body.extend(b"name");
        body.push(1);
        body.push(sub.len() as u8);
        body.extend(&sub);
        m.push(0);
        m.push(body.len() as u8);
        m.extend(body);
        m
    }

    #[test]
    fn reads_body_sizes_and_names() {
        let sizes = function_sizes(&module()).unwrap();
        assert_eq!(
            sizes,
            vec![
                (3, "railnote_core::divider::search".to_string()),
                (5, "?".to_string())
            ]
        );
        assert!(function_sizes(b"nope").is_err());
    }

    #[test]
    fn groups_by_part() {
        assert_eq!(
            part_of("railnote_core::divider::Spread::rss::h12"),
            "core::divider"
        );
        assert_eq!(
            part_of("railnote_core::linear::out::<impl railnote_core::output::ToOut for x>"),
            "core::linear"
        );
        assert_eq!(
            part_of("<railnote_core::units::ParseError as core::fmt::Display>::fmt"),
            "core::units"
        );
        assert_eq!(part_of("railnote_wasm::check_linear::h1"), "wasm");
        assert_eq!(part_of("<alloc::vec::Vec<T> as Clone>::clone"), "alloc");
        assert_eq!(part_of("libm::math::pow::pow::h2"), "libm");
        assert_eq!(part_of("?"), "other");
        let parts = by_part(&[
            (10, "libm::a".into()),
            (30, "railnote_core::divider::b".into()),
            (5, "libm::c".into()),
        ]);
        assert_eq!(
            parts,
            vec![("core::divider".into(), 30), ("libm".into(), 15)]
        );
    }
}
