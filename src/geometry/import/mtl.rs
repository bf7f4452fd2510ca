//! Wavefront material libraries (`.mtl`), the materials an OBJ file names with `mtllib` and
//! `usemtl`.
//!
//! Read: `newmtl`, the diffuse colour `Kd` (the base colour), the specular colour `Ks` and
//! exponent `Ns` (a Blinn-Phong material), the emitted colour `Ke`, the illumination model
//! `illum` (0 and 1 have no highlight), and the physically based extension's roughness `Pr`
//! and metalness `Pm` (either makes it a metallic-roughness material). Colours are taken as
//! linear reflectances, as the format's colours are reflectance factors and as exporters that
//! write their scene-linear colours produce them (common practice). Everything else (ambient
//! `Ka`, transparency, refraction, texture maps) is read past; texture maps are counted so the
//! user is told they are not used.

use super::{number, ParseError};
use crate::geometry::mesh::{FileMaterial, Reflectance};
use glam::Vec3;

/// A parsed library: its materials by name, in the file's order.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Library {
    /// Named materials.
    pub materials: Vec<FileMaterial>,
    /// Texture map statements read past.
    pub texture_maps: usize,
}

/// One material while it is read.
#[derive(Default)]
struct Pending {
    name: String,
    kd: Option<Vec3>,
    ks: Option<Vec3>,
    ke: Option<Vec3>,
    ns: Option<f32>,
    pr: Option<f32>,
    pm: Option<f32>,
    illum: Option<u32>,
}

impl Pending {
    fn finish(self) -> FileMaterial {
        let highlight = !matches!(self.illum, Some(0 | 1));
        let reflectance = if self.pr.is_some() || self.pm.is_some() {
            Reflectance::MetallicRoughness
        } else {
            Reflectance::Specular {
                color: if highlight {
                    self.ks.unwrap_or(Vec3::ZERO)
                } else {
                    Vec3::ZERO
                },
                exponent: self.ns.unwrap_or(1.0),
            }
        };
        FileMaterial {
            name: self.name,
            base_color: self.kd.unwrap_or(Vec3::ONE),
            // The physically based extension's defaults where one of the two is missing:
            // glTF's roughness 1 and a dielectric (metalness 0).
            metallic: self.pm.unwrap_or(0.0),
            roughness: self.pr.unwrap_or(1.0),
            emissive: self.ke.unwrap_or(Vec3::ZERO),
            double_sided: false,
            reflectance,
        }
    }
}

/// Reads an MTL colour statement: `r g b`, or one value for grey. `spectral` and `xyz`
/// colours are refused.
fn colour<'a>(
    tokens: impl Iterator<Item = &'a str>,
    keyword: &str,
    line: usize,
) -> Result<Vec3, ParseError> {
    let values: Vec<&str> = tokens.collect();
    if values
        .first()
        .is_some_and(|t| *t == "spectral" || *t == "xyz")
    {
        return Err(ParseError::line(
            line,
            format!(
                "'{keyword} {}' colours are not supported; give r g b",
                values[0]
            ),
        ));
    }
    let mut c = [0.0f32; 3];
    match values.len() {
        1 | 3 => {
            for (k, slot) in c.iter_mut().enumerate() {
                let t = values[k.min(values.len() - 1)];
                *slot = number(t).ok_or_else(|| {
                    ParseError::line(line, format!("'{t}' is not a finite number"))
                })?;
            }
        }
        n => {
            return Err(ParseError::line(
                line,
                format!("'{keyword}' needs 3 numbers (or 1 for grey), found {n}"),
            ))
        }
    }
    Ok(Vec3::from(c.map(|v| v.clamp(0.0, 1.0))))
}

fn scalar<'a>(
    mut tokens: impl Iterator<Item = &'a str>,
    keyword: &str,
    line: usize,
) -> Result<f32, ParseError> {
    let t = tokens
        .next()
        .ok_or_else(|| ParseError::line(line, format!("'{keyword}' needs a number")))?;
    number(t).ok_or_else(|| ParseError::line(line, format!("'{t}' is not a finite number")))
}

/// Parses MTL text.
///
/// # Errors
/// Non-UTF-8 bytes, a statement before the first `newmtl`, malformed numbers (with their
/// line), and a library without any material.
pub fn parse(bytes: &[u8]) -> Result<Library, ParseError> {
    let text = std::str::from_utf8(bytes).map_err(|e| {
        ParseError::byte(
            e.valid_up_to(),
            "the file is not UTF-8 text (is it really a material library?)",
        )
    })?;
    let mut library = Library::default();
    let mut current: Option<Pending> = None;
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let content = raw.split('#').next().unwrap_or("").trim();
        let mut tokens = content.split_ascii_whitespace();
        let Some(keyword) = tokens.next() else {
            continue;
        };
        if keyword == "newmtl" {
            let name = content["newmtl".len()..].trim();
            if name.is_empty() {
                return Err(ParseError::line(line, "'newmtl' needs a material name"));
            }
            if let Some(done) = current.take() {
                library.materials.push(done.finish());
            }
            current = Some(Pending {
                name: name.to_string(),
                ..Pending::default()
            });
            continue;
        }
        let Some(m) = current.as_mut() else {
            return Err(ParseError::line(
                line,
                format!("'{keyword}' before the first 'newmtl' (is this a material library?)"),
            ));
        };
        match keyword {
            "Kd" => m.kd = Some(colour(tokens, keyword, line)?),
            "Ks" => m.ks = Some(colour(tokens, keyword, line)?),
            "Ke" => m.ke = Some(colour(tokens, keyword, line)?),
            "Ns" => m.ns = Some(scalar(tokens, keyword, line)?.clamp(0.0, 1.0e4)),
            "Pr" => m.pr = Some(scalar(tokens, keyword, line)?.clamp(0.0, 1.0)),
            "Pm" => m.pm = Some(scalar(tokens, keyword, line)?.clamp(0.0, 1.0)),
            "illum" => {
                let v = scalar(tokens, keyword, line)?;
                m.illum = Some(v.max(0.0) as u32);
            }
            k if k.starts_with("map_")
                || matches!(k, "bump" | "disp" | "decal" | "refl" | "norm") =>
            {
                library.texture_maps += 1;
            }
            // Read past: ambient, transparency, refraction, sheen, clearcoat, anisotropy.
            _ => {}
        }
    }
    if let Some(done) = current.take() {
        library.materials.push(done.finish());
    }
    if library.materials.is_empty() {
        return Err(ParseError::file(
            "the material library defines no material ('newmtl')",
        ));
    }
    Ok(library)
}
