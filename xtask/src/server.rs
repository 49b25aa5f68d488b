//! A small static file server for site/ (used by `cargo xtask serve`, the browser tests and the
//! benchmark).
//!
//! Why hand-written rather than a crate: xtask is std-only so that it builds in seconds on a fresh
//! two-core machine before anything else; a static GET/HEAD server is about a hundred lines on
//! std::net; and the very same code then serves the developer's `serve`, the browser tests and
//! the benchmark, so the MIME types and headers the tests see are the ones developers see. It binds
//! to 127.0.0.1 only and is not meant for production hosting (`cargo xtask dist` makes the files
//! for a real static host).

use std::fs;
use std::io::{self, BufRead, BufReader, Write};
use std::net::{SocketAddr, TcpListener, TcpStream};
use std::path::{Component, Path, PathBuf};
use std::thread;
use std::time::Duration;

/// Binds 127.0.0.1 on `preferred`, or on a free port chosen by the OS when that one is busy
/// (or when `preferred` is None).
pub fn bind(preferred: Option<u16>) -> io::Result<TcpListener> {
    if let Some(port) = preferred {
        match TcpListener::bind(("127.0.0.1", port)) {
            Ok(listener) => return Ok(listener),
            Err(e) => eprintln!("port {port} is not available ({e}); using a free port instead"),
        }
    }
    TcpListener::bind(("127.0.0.1", 0))
}

/// Serves `root` from `listener` on a background thread; returns the bound address.
pub fn spawn(listener: TcpListener, root: PathBuf) -> io::Result<SocketAddr> {
    let addr = listener.local_addr()?;
    thread::spawn(move || serve(listener, root));
    Ok(addr)
}

/// Accepts connections forever, one thread per connection.
pub fn serve(listener: TcpListener, root: PathBuf) {
    let root = fs::canonicalize(&root).unwrap_or(root);
    for stream in listener.incoming() {
        let Ok(stream) = stream else { continue };
        let root = root.clone();
        thread::spawn(move || {
            let _ = handle(stream, &root);
        });
    }
}

struct Response {
    status: &'static str,
    content_type: &'static str,
    body: Vec<u8>,
    extra: Vec<(&'static str, String)>,
}

impl Response {
    fn text(status: &'static str, body: &str) -> Response {
        Response {
            status,
            content_type: "text/plain; charset=utf-8",
            body: body.as_bytes().to_vec(),
            extra: Vec::new(),
        }
    }
}

fn handle(stream: TcpStream, root: &Path) -> io::Result<()> {
    stream.set_read_timeout(Some(Duration::from_secs(10)))?;
    let mut reader = BufReader::new(stream.try_clone()?);
    let mut request_line = String::new();
    reader.read_line(&mut request_line)?;
    // Drain the headers; nothing in them changes what a static file server sends back.
    let mut header_bytes = 0;
    loop {
        let mut line = String::new();
        let n = reader.read_line(&mut line)?;
        header_bytes += n;
        if n == 0 || line == "\r\n" || line == "\n" || header_bytes > 64 * 1024 {
            break;
        }
    }
    let mut parts = request_line.split_whitespace();
    let (method, target) = (parts.next().unwrap_or(""), parts.next().unwrap_or(""));
    let head_only = method == "HEAD";
    let response = if method != "GET" && method != "HEAD" {
        let mut r = Response::text("405 Method Not Allowed", "only GET and HEAD are served\n");
        r.extra.push(("Allow", "GET, HEAD".into()));
        r
    } else {
        respond(root, target)
    };
    write_response(stream, &response, head_only)
}

fn respond(root: &Path, target: &str) -> Response {
    let (path_part, query) = match target.find(['?', '#']) {
        Some(i) => (&target[..i], &target[i..]),
        None => (target, ""),
    };
    let Some(relative) = sanitize(path_part) else {
        return Response::text("400 Bad Request", "bad path\n");
    };
    let mut file = root.join(&relative);
    if file.is_dir() {
        if !path_part.ends_with('/') {
            // Relative links inside an index page resolve against the folder only with the slash.
            let mut r = Response::text("301 Moved Permanently", "moved\n");
            r.extra.push(("Location", format!("{path_part}/{query}")));
            return r;
        }
        file = file.join("index.html");
    }
    // A symlink inside site/ must not lead outside it.
    let inside = fs::canonicalize(&file)
        .map(|real| real.starts_with(root))
        .unwrap_or(false);
    match fs::read(&file) {
        Ok(body) if inside && file.is_file() => Response {
            status: "200 OK",
            content_type: mime_type(&file),
            body,
            extra: Vec::new(),
        },
        _ => Response::text("404 Not Found", "not found\n"),
    }
}

fn write_response(mut stream: TcpStream, r: &Response, head_only: bool) -> io::Result<()> {
    let mut head = format!(
        "HTTP/1.1 {}\r\nContent-Type: {}\r\nContent-Length: {}\r\n\
         Cache-Control: no-cache\r\nX-Content-Type-Options: nosniff\r\nConnection: close\r\n",
        r.status,
        r.content_type,
        r.body.len()
    );
    for (name, value) in &r.extra {
        head.push_str(&format!("{name}: {value}\r\n"));
    }
    head.push_str("\r\n");
    stream.write_all(head.as_bytes())?;
    if !head_only {
        stream.write_all(&r.body)?;
    }
    stream.flush()
}

/// Turns the path of a request target into a path relative to the served folder, or None when
/// it must be refused: not starting with '/', bad percent-encoding, NUL or backslash, a `..`
/// segment (before or after decoding), or a hidden (dot) file or folder.
pub fn sanitize(url_path: &str) -> Option<PathBuf> {
    if !url_path.starts_with('/') {
        return None;
    }
    let decoded = percent_decode(url_path)?;
    if decoded.contains('\0') || decoded.contains('\\') {
        return None;
    }
    let mut relative = PathBuf::new();
    for segment in decoded.split('/') {
        match segment {
            "" | "." => continue,
            s if s.starts_with('.') => return None,
            s => relative.push(s),
        }
    }
    // Belt and braces: only plain names may remain.
    relative
        .components()
        .all(|c| matches!(c, Component::Normal(_)))
        .then_some(relative)
}

fn percent_decode(s: &str) -> Option<String> {
    let bytes = s.as_bytes();
    let mut out = Vec::with_capacity(bytes.len());
    let mut i = 0;
    while i < bytes.len() {
        if bytes[i] == b'%' {
            let hex = s.get(i + 1..i + 3)?;
            out.push(u8::from_str_radix(hex, 16).ok()?);
            i += 3;
        } else {
            out.push(bytes[i]);
            i += 1;
        }
    }
    String::from_utf8(out).ok()
}

/// Content-Type by file extension. `application/wasm` matters: browsers refuse
/// `WebAssembly.instantiateStreaming` without it, and with `nosniff` a module script must be
/// served as JavaScript.
pub fn mime_type(path: &Path) -> &'static str {
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase);
    match ext.as_deref() {
        Some("html" | "htm") => "text/html; charset=utf-8",
        Some("js" | "mjs") => "text/javascript; charset=utf-8",
        Some("css") => "text/css; charset=utf-8",
        Some("wasm") => "application/wasm",
        Some("svg") => "image/svg+xml",
        Some("json" | "map") => "application/json",
        Some("webmanifest") => "application/manifest+json",
        Some("txt" | "md") => "text/plain; charset=utf-8",
        Some("png") => "image/png",
        Some("jpg" | "jpeg") => "image/jpeg",
        Some("ico") => "image/x-icon",
        Some("woff2") => "font/woff2",
        Some("pdf") => "application/pdf",
        _ => "application/octet-stream",
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::io::Read;

    #[test]
    fn sanitize_keeps_plain_paths() {
        assert_eq!(sanitize("/"), Some(PathBuf::new()));
        assert_eq!(sanitize("/index.html"), Some(PathBuf::from("index.html")));
        assert_eq!(
            sanitize("/pkg/railnote_bg.wasm"),
            Some(PathBuf::from("pkg/railnote_bg.wasm"))
        );
        assert_eq!(sanitize("//a/./b/"), Some(PathBuf::from("a/b")));
        assert_eq!(
            sanitize("/with%20space.html"),
            Some(PathBuf::from("with space.html"))
        );
        assert_eq!(sanitize("/%C2%B5.txt"), Some(PathBuf::from("µ.txt")));
    }

    #[test]
    fn sanitize_rejects_traversal_and_oddities() {
        for bad in [
            "",
            "index.html",
            "/..",
            "/../etc/passwd",
            "/a/../../b",
            "/%2e%2e/etc/passwd",
            "/%2E%2E%2Fetc%2Fpasswd",
            "/a/%2e%2e/%2e%2e/x",
            "/..%5c..%5cwindows",
            "/a\\..\\b",
            "/a%00.html",
            "/%zz",
            "/%4",
            "/%ff%fe",
            "/.git/config",
            "/pkg/.gitignore",
        ] {
            assert_eq!(sanitize(bad), None, "{bad:?} must be refused");
        }
    }

    #[test]
    fn mime_types_cover_the_site() {
        let cases = [
            ("index.html", "text/html; charset=utf-8"),
            ("pkg/railnote.js", "text/javascript; charset=utf-8"),
            ("js/linear.mjs", "text/javascript; charset=utf-8"),
            ("style.CSS", "text/css; charset=utf-8"),
            ("pkg/railnote_bg.wasm", "application/wasm"),
            ("icon.svg", "image/svg+xml"),
            ("demo.json", "application/json"),
            ("LICENSE", "application/octet-stream"),
            ("archive.tar.gz", "application/octet-stream"),
        ];
        for (file, want) in cases {
            assert_eq!(mime_type(Path::new(file)), want, "{file}");
        }
    }

    fn get(addr: SocketAddr, request: &str) -> String {
        let mut s = TcpStream::connect(addr).unwrap();
        s.write_all(request.as_bytes()).unwrap();
        let mut out = String::new();
        s.read_to_string(&mut out).unwrap();
        out
    }

    #[test]
    fn serves_files_with_headers_and_refuses_the_rest() {
        let dir = std::env::temp_dir().join(format!("xtask-server-test-{}", std::process::id()));
        let _ = fs::remove_dir_all(&dir);
        fs::create_dir_all(dir.join("sub")).unwrap();
        fs::write(dir.join("index.html"), "<p>home</p>").unwrap();
        fs::write(dir.join("sub/index.html"), "<p>sub</p>").unwrap();
        fs::write(dir.join("m.wasm"), [0u8, 97, 115, 109]).unwrap();
        let addr = spawn(bind(None).unwrap(), dir.clone()).unwrap();

        let home = get(addr, "GET / HTTP/1.1\r\nHost: x\r\n\r\n");
        assert!(home.starts_with("HTTP/1.1 200 OK\r\n"), "{home}");
        assert!(home.contains("Content-Type: text/html; charset=utf-8\r\n"));
        assert!(home.contains("Cache-Control: no-cache\r\n"));
        assert!(home.contains("X-Content-Type-Options: nosniff\r\n"));
        assert!(home.ends_with("<p>home</p>"));

        let wasm = get(addr, "GET /m.wasm?v=1 HTTP/1.1\r\n\r\n");
        assert!(
            wasm.contains("Content-Type: application/wasm\r\n"),
            "{wasm}"
        );
        assert!(wasm.contains("Content-Length: 4\r\n"));

        let head = get(addr, "HEAD /index.html HTTP/1.1\r\n\r\n");
        assert!(head.contains("Content-Length: 11\r\n"), "{head}");
        assert!(head.ends_with("\r\n\r\n"), "HEAD sends no body: {head}");

        let redirect = get(addr, "GET /sub?x=1 HTTP/1.1\r\n\r\n");
        assert!(redirect.starts_with("HTTP/1.1 301"), "{redirect}");
        assert!(redirect.contains("Location: /sub/?x=1\r\n"));
        assert!(get(addr, "GET /sub/ HTTP/1.1\r\n\r\n").ends_with("<p>sub</p>"));

        assert!(get(addr, "GET /nope.js HTTP/1.1\r\n\r\n").starts_with("HTTP/1.1 404"));
        assert!(get(addr, "GET /../x HTTP/1.1\r\n\r\n").starts_with("HTTP/1.1 400"));
        assert!(get(addr, "POST / HTTP/1.1\r\n\r\n").starts_with("HTTP/1.1 405"));
        let _ = fs::remove_dir_all(&dir);
    }
}
