//! Scenes in links: a compact, versioned, checksummed text for the URL fragment.
//!
//! A link carries only what differs from the defaults of its format (a JSON object holding the
//! changed fields), compressed with zlib (whose Adler-32 trailer makes any truncation or
//! corruption detectable) and written in URL-safe base64 without padding, behind the format
//! number: `1.<base64url(zlib(json diff))>`. The panel size is left out: the receiver's page
//! sizes its own panels. Decoding writes the diff over the frozen defaults of the link's format
//! ([`crate::scene::formats`]), not over today's, and validates the whole scene, so a link
//! opens to the scene it was made from in every later build; anything else is refused with a
//! message.

use crate::scene::definition::{Scene, ValidScene};
use crate::scene::formats::{self, merge, FORMAT};
use crate::scene::settings::PanelSize;
use base64::engine::general_purpose::URL_SAFE_NO_PAD;
use base64::Engine;
use serde_json::{Map, Value};
use std::fmt;

/// Largest decompressed scene accepted from a link, in bytes.
const MAX_JSON: usize = 64 * 1024;
/// Largest link text accepted, in characters.
const MAX_LINK: usize = 16 * 1024;

/// Why link text was refused.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum LinkError {
    /// The text is not a link this build reads (unknown format, damaged, cut short, too long).
    Unreadable(&'static str),
    /// The link decodes, but its scene does not validate (the scene's message).
    Unusable(String),
}

impl fmt::Display for LinkError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            LinkError::Unreadable(m) => write!(f, "This link cannot be read: {m}"),
            LinkError::Unusable(m) => write!(f, "This link's scene cannot be used: {m}"),
        }
    }
}

impl std::error::Error for LinkError {}

/// The fields of `value` that differ from `base` (objects compared field by field).
fn diff(value: &Value, base: &Value) -> Option<Value> {
    match (value, base) {
        (Value::Object(v), Value::Object(b)) => {
            let mut out = Map::new();
            for (k, x) in v {
                match b.get(k) {
                    Some(y) => {
                        if let Some(d) = diff(x, y) {
                            out.insert(k.clone(), d);
                        }
                    }
                    None => {
                        out.insert(k.clone(), x.clone());
                    }
                }
            }
            (!out.is_empty()).then_some(Value::Object(out))
        }
        _ => (value != base).then(|| value.clone()),
    }
}

/// A scene's JSON without the panel size (links leave it out) or the version (the link's
/// format number stands for it).
fn without_panel(mut v: Value) -> Value {
    if let Value::Object(m) = &mut v {
        m.remove("panel");
        m.remove("version");
    }
    v
}

/// The defaults of link format `n` as a scene's JSON would hold them: parsed into a scene
/// and written back, so their numbers take the same f32 path as the scene being encoded.
fn format_defaults(n: u32) -> Option<Value> {
    let scene: Scene = serde_json::from_value(formats::defaults(n)?).ok()?;
    Some(scene_value(&scene))
}

/// The current format's defaults, made once: the page encodes its link after every full frame.
fn current_defaults() -> &'static Value {
    static CURRENT: std::sync::OnceLock<Value> = std::sync::OnceLock::new();
    CURRENT.get_or_init(|| format_defaults(FORMAT).unwrap_or(Value::Null))
}

fn scene_value(scene: &Scene) -> Value {
    // A scene is plain data with string keys: conversion cannot fail.
    without_panel(serde_json::to_value(scene).unwrap_or(Value::Null))
}

/// The link text (URL fragment payload) for a scene.
pub fn encode(scene: &Scene) -> String {
    let d =
        diff(&scene_value(scene), current_defaults()).unwrap_or_else(|| Value::Object(Map::new()));
    let json = d.to_string();
    let packed = miniz_oxide::deflate::compress_to_vec_zlib(json.as_bytes(), 9);
    format!("{FORMAT}.{}", URL_SAFE_NO_PAD.encode(packed))
}

/// Reads a scene from link text made by [`encode`] (with or without a leading `#s=`). The
/// panel size is `panel`'s.
///
/// # Errors
/// A message saying what is wrong: unknown format, damaged or truncated data, or a scene that
/// does not validate.
pub fn decode(text: &str, panel: PanelSize) -> Result<ValidScene, LinkError> {
    let err = LinkError::Unreadable;
    let text = text.trim_start_matches('#').trim_start_matches("s=");
    if text.len() > MAX_LINK {
        return Err(err("it is too long"));
    }
    let parsed = text.split_once('.').and_then(|(head, body)| {
        let digits = !head.is_empty() && head.bytes().all(|b| b.is_ascii_digit());
        Some((head.parse::<u32>().ok().filter(|_| digits)?, body))
    });
    let Some((format, body)) = parsed else {
        return Err(err("it is not a twinshade scene link"));
    };
    let Some(defaults) = format_defaults(format) else {
        return Err(err("it is from a newer version of twinshade"));
    };
    let packed = URL_SAFE_NO_PAD
        .decode(body)
        .map_err(|_| err("it is damaged (not valid base64)"))?;
    let json = miniz_oxide::inflate::decompress_to_vec_zlib_with_limit(&packed, MAX_JSON)
        .map_err(|_| err("it is damaged or cut short"))?;
    let patch: Value =
        serde_json::from_slice(&json).map_err(|_| err("it does not hold a scene"))?;
    if !patch.is_object() {
        return Err(err("it does not hold a scene"));
    }
    let mut value = defaults;
    merge(&mut value, patch);
    let mut scene: Scene =
        serde_json::from_value(value).map_err(|e| LinkError::Unusable(e.to_string()))?;
    scene.panel = panel;
    scene
        .validated()
        .map_err(|e| LinkError::Unusable(e.to_string()))
}
