//! A static file server for the page on 127.0.0.1, through `tiny_http`.

use std::io::ErrorKind;
use std::net::TcpListener;
use std::path::{Component, Path, PathBuf};

/// How many ports after a busy one are tried.
const PORT_TRIES: u16 = 20;

/// Binds 127.0.0.1:`port` (0 = any free port; a busy port moves on to the next ones), calls
/// `ready` with the page URL, then serves `root` until the process ends.
///
/// # Errors
/// When no port can be bound.
pub fn serve(root: &Path, port: u16, ready: impl FnOnce(&str)) -> Result<(), String> {
    let listener = bind(port)?;
    let addr = listener.local_addr().map_err(|e| e.to_string())?;
    let server = tiny_http::Server::from_listener(listener, None)
        .map_err(|e| format!("cannot start the server: {e}"))?;
    ready(&format!("http://{addr}/"));
    for request in server.incoming_requests() {
        let response = respond(root, request.url());
        let _ = request.respond(response);
    }
    Ok(())
}

fn bind(port: u16) -> Result<TcpListener, String> {
    let tries = if port == 0 { 1 } else { PORT_TRIES };
    for i in 0..tries {
        let p = port.saturating_add(i);
        match TcpListener::bind(("127.0.0.1", p)) {
            Ok(l) => {
                if i > 0 {
                    eprintln!("twinshade: port {port} is busy; using {p}");
                }
                return Ok(l);
            }
            Err(e) if e.kind() == ErrorKind::AddrInUse => continue,
            Err(e) => return Err(format!("cannot listen on 127.0.0.1:{p}: {e}")),
        }
    }
    Err(format!(
        "ports {port} to {} are all busy; pick another with --port",
        port.saturating_add(PORT_TRIES - 1)
    ))
}

/// Maps a URL path to a file under `root`, refusing anything that leaves it.
fn resolve(root: &Path, url: &str) -> Option<PathBuf> {
    let path = url.split(['?', '#']).next().unwrap_or("/");
    let mut out = root.to_path_buf();
    for part in Path::new(path.trim_start_matches('/')).components() {
        match part {
            Component::Normal(p) => out.push(p),
            Component::CurDir => {}
            _ => return None,
        }
    }
    if out.is_dir() {
        out.push("index.html");
    }
    Some(out)
}

type Reply = tiny_http::Response<std::io::Cursor<Vec<u8>>>;

fn respond(root: &Path, url: &str) -> Reply {
    let header = |k: &str, v: &str| {
        tiny_http::Header::from_bytes(k.as_bytes(), v.as_bytes()).expect("static header is valid")
    };
    let Some(path) = resolve(root, url) else {
        return tiny_http::Response::from_string("bad path").with_status_code(400);
    };
    match std::fs::read(&path) {
        Ok(bytes) => {
            let mime = match path.extension().and_then(|e| e.to_str()) {
                Some("wasm") => "application/wasm".to_string(),
                Some("js" | "mjs") => "text/javascript; charset=utf-8".to_string(),
                _ => mime_guess::from_path(&path)
                    .first_or_octet_stream()
                    .essence_str()
                    .to_string(),
            };
            tiny_http::Response::from_data(bytes)
                .with_header(header("Content-Type", &mime))
                .with_header(header("Cache-Control", "no-store"))
        }
        Err(_) => tiny_http::Response::from_string("not found").with_status_code(404),
    }
}
