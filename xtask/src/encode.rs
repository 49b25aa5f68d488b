//! SHA-256 and base64 for the single-file build (CSP hashes, the inlined module, data: URLs) and
//! for the service worker's version.
//!
//! Why not crates: xtask is std-only so it builds in seconds on a fresh two-core machine (see
//! main.rs). SHA-256 is not written here: it comes from coreutils' `sha256sum`, always present on
//! Debian, the same way util.rs takes gzip from the system. Base64 (RFC 4648, standard alphabet,
//! padded) is twenty lines and checked below against the RFC's own examples.

use crate::util::Result;
use std::io::Write;
use std::process::{Command, Stdio};

/// The SHA-256 digest of `data`, from coreutils' `sha256sum`.
pub fn sha256(data: &[u8]) -> Result<[u8; 32]> {
    let mut child = Command::new("sha256sum")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::inherit())
        .spawn()
        .map_err(|e| format!("could not run sha256sum (coreutils): {e}"))?;
    // Write from a thread so a large input cannot deadlock against a full stdout pipe.
    let mut stdin = child.stdin.take().expect("stdin was piped");
    let input = data.to_vec();
    let writer = std::thread::spawn(move || stdin.write_all(&input));
    let out = child
        .wait_with_output()
        .map_err(|e| format!("sha256sum: {e}"))?;
    writer
        .join()
        .map_err(|_| "sha256sum: writer thread panicked".to_string())?
        .map_err(|e| format!("sha256sum: cannot write its input: {e}"))?;
    if !out.status.success() {
        return Err(format!("sha256sum failed ({})", out.status));
    }
    let text = String::from_utf8_lossy(&out.stdout);
    let hex = text.split_whitespace().next().unwrap_or("");
    if hex.len() != 64 {
        return Err(format!("sha256sum printed {text:?}, not a 64-digit digest"));
    }
    let mut digest = [0u8; 32];
    for (i, byte) in digest.iter_mut().enumerate() {
        *byte = u8::from_str_radix(&hex[2 * i..2 * i + 2], 16)
            .map_err(|_| format!("sha256sum printed {hex:?}, not hexadecimal"))?;
    }
    Ok(digest)
}

/// Lower-case hexadecimal.
pub fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// Base64 with the standard alphabet and padding (RFC 4648 §4), as CSP hashes and data: URLs use.
pub fn base64(data: &[u8]) -> String {
    const ALPHABET: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut out = String::with_capacity(data.len().div_ceil(3) * 4);
    for chunk in data.chunks(3) {
        let b = [
            chunk[0],
            chunk.get(1).copied().unwrap_or(0),
            chunk.get(2).copied().unwrap_or(0),
        ];
        let n = (u32::from(b[0]) << 16) | (u32::from(b[1]) << 8) | u32::from(b[2]);
        for i in 0..4 {
            if i <= chunk.len() {
                out.push(ALPHABET[(n >> (18 - 6 * i) & 63) as usize] as char);
            } else {
                out.push('=');
            }
        }
    }
    out
}

/// The CSP source expression for an inline script or style: `'sha256-<base64 digest>'`.
pub fn csp_hash(text: &str) -> Result<String> {
    Ok(format!("'sha256-{}'", base64(&sha256(text.as_bytes())?)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn base64_matches_rfc_4648_section_10() {
        // RFC 4648 §10, test vectors.
        for (input, expected) in [
            ("", ""),
            ("f", "Zg=="),
            ("fo", "Zm8="),
            ("foo", "Zm9v"),
            ("foob", "Zm9vYg=="),
            ("fooba", "Zm9vYmE="),
            ("foobar", "Zm9vYmFy"),
        ] {
            assert_eq!(base64(input.as_bytes()), expected, "{input:?}");
        }
        // Every byte value, against the alphabet's last two characters.
        assert_eq!(base64(&[0xfb, 0xff]), "+/8=");
    }

    #[test]
    fn sha256_matches_fips_180_2_examples() {
        // FIPS 180-2, appendix B.1 ("abc") and B.2 (the 448-bit message).
        assert_eq!(
            hex(&sha256(b"abc").unwrap()),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
        assert_eq!(
            hex(&sha256(b"abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq").unwrap()),
            "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"
        );
    }

    #[test]
    fn csp_hash_of_an_empty_script() {
        // The well-known SHA-256 of no bytes (FIPS 180-2), as CSP writes it.
        assert_eq!(
            csp_hash("").unwrap(),
            "'sha256-47DEQpj8HBSa+/TImW+5JCeuQeRkm5NMpJWZG3hSuFU='"
        );
    }
}
