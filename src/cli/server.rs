//! A static file server for the page on 127.0.0.1, through `hyper` on a one-thread `tokio`
//! runtime: each connection is its own task, so connections a browser opens ahead of time
//! (and keeps idle) never hold up the others. (The `tiny_http` server used before queued a
//! new connection behind busy pool threads now and then, and a page of a dozen modules then
//! never finished loading.)

use http_body_util::Full;
use hyper::body::Bytes;
use hyper::{Request, Response, StatusCode};
use hyper_util::rt::TokioIo;
use std::convert::Infallible;
use std::io::ErrorKind;
use std::net::TcpListener;
use std::path::{Component, Path, PathBuf};
use std::sync::Arc;

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
    listener
        .set_nonblocking(true)
        .map_err(|e| format!("cannot start the server: {e}"))?;
    let runtime = tokio::runtime::Builder::new_current_thread()
        .enable_io()
        .enable_time()
        .build()
        .map_err(|e| format!("cannot start the server: {e}"))?;
    let root = Arc::new(root.to_path_buf());
    runtime.block_on(async move {
        let listener = tokio::net::TcpListener::from_std(listener)
            .map_err(|e| format!("cannot start the server: {e}"))?;
        ready(&format!("http://{addr}/"));
        loop {
            let stream = match listener.accept().await {
                Ok((stream, _)) => stream,
                Err(_) => {
                    // Out of file descriptors or a connection reset before accept: wait a
                    // moment rather than spin.
                    tokio::time::sleep(std::time::Duration::from_millis(50)).await;
                    continue;
                }
            };
            let root = Arc::clone(&root);
            tokio::spawn(async move {
                let service =
                    hyper::service::service_fn(move |req: Request<hyper::body::Incoming>| {
                        let reply = respond(&root, req.uri().path());
                        async move { Ok::<_, Infallible>(reply) }
                    });
                // A connection that fails (the browser went away) ends only itself.
                let _ = hyper::server::conn::http1::Builder::new()
                    .serve_connection(TokioIo::new(stream), service)
                    .await;
            });
        }
    })
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

type Reply = Response<Full<Bytes>>;

fn plain(status: StatusCode, text: &'static str) -> Reply {
    let mut r = Response::new(Full::new(Bytes::from_static(text.as_bytes())));
    *r.status_mut() = status;
    r
}

fn respond(root: &Path, url: &str) -> Reply {
    let Some(path) = resolve(root, url) else {
        return plain(StatusCode::BAD_REQUEST, "bad path");
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
            let mut r = Response::new(Full::new(Bytes::from(bytes)));
            let h = r.headers_mut();
            if let Ok(v) = mime.parse() {
                h.insert(hyper::header::CONTENT_TYPE, v);
            }
            h.insert(
                hyper::header::CACHE_CONTROL,
                hyper::header::HeaderValue::from_static("no-store"),
            );
            r
        }
        Err(_) => plain(StatusCode::NOT_FOUND, "not found"),
    }
}
