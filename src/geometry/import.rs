//! Mesh files from users: format detection, limits, errors that say what and where, and the
//! clean-up every import gets (degenerate faces dropped, centred and scaled to the view).
//!
//! Formats: Wavefront OBJ ([`obj`]), STL binary and ASCII ([`stl`]), PLY ASCII and binary
//! ([`ply`]), glTF 2.0 `.gltf` and `.glb` ([`gltf`], through the `gltf` crate). An OBJ file's
//! material library (`.mtl`, [`mtl`]) comes with it as a companion file ([`import_with`]). The OBJ, STL
//! and PLY parsers are our own, small and strict: the crates we evaluated for them (`tobj` 4,
//! `stl_io` 0.11, `ply-rs` 0.1) report failures without a line number or byte offset, and
//! users must be told *where* a file is broken. Every parser works on bytes in memory (the page reads dropped files locally) and
//! never panics: malformed input of any kind becomes an [`ImportError`].

mod gltf;
mod mtl;
mod obj;
mod ply;
mod stl;

use crate::geometry::mesh::{FileMaterial, Fit, Mesh, MeshError, Reflectance, MAX_TRIANGLES};
use serde::Serialize;
use std::fmt;

/// The largest file accepted, in bytes.
pub const MAX_FILE_BYTES: usize = 256 * 1024 * 1024;

/// A mesh file format.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Format {
    /// Wavefront OBJ.
    Obj,
    /// Binary STL.
    StlBinary,
    /// ASCII STL.
    StlAscii,
    /// glTF 2.0, JSON with embedded buffers.
    Gltf,
    /// glTF 2.0, binary container.
    Glb,
    /// PLY, ASCII or binary.
    Ply,
}

/// Where in a file a problem is.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Location {
    /// A line, counted from 1.
    Line(usize),
    /// A byte offset, counted from 0.
    Byte(usize),
    /// The whole file.
    File,
}

/// Why a file could not be imported.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ImportError {
    /// The file's name as given.
    pub file: String,
    /// Where the problem is.
    pub at: Location,
    /// What is wrong, in plain words.
    pub message: String,
}

impl fmt::Display for ImportError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.at {
            Location::Line(n) => write!(f, "{}, line {n}: {}", self.file, self.message),
            Location::Byte(b) => write!(f, "{}, byte {b}: {}", self.file, self.message),
            Location::File => write!(f, "{}: {}", self.file, self.message),
        }
    }
}

impl std::error::Error for ImportError {}

/// A parser's error before the file name is attached.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ParseError {
    /// Where.
    pub at: Location,
    /// What.
    pub message: String,
}

impl ParseError {
    /// An error at a line.
    pub fn line(n: usize, message: impl Into<String>) -> Self {
        ParseError {
            at: Location::Line(n),
            message: message.into(),
        }
    }

    /// An error at a byte offset.
    pub fn byte(b: usize, message: impl Into<String>) -> Self {
        ParseError {
            at: Location::Byte(b),
            message: message.into(),
        }
    }

    /// An error about the whole file.
    pub fn file(message: impl Into<String>) -> Self {
        ParseError {
            at: Location::File,
            message: message.into(),
        }
    }
}

/// An imported mesh and what was done to it.
#[derive(Clone, Debug)]
pub struct Imported {
    /// The mesh, centred and scaled so its farthest vertex is at distance 1.
    pub mesh: Mesh,
    /// The detected format.
    pub format: Format,
    /// Faces dropped because they span no area.
    pub dropped_faces: usize,
    /// True when every corner had an authored normal.
    pub has_normals: bool,
    /// How the mesh was centred and scaled (maps positions back to the file's).
    pub fit: Fit,
    /// What the user should know about what was read and what was not (a material library
    /// that was not given, materials it lacks, texture maps not used).
    pub notes: Vec<String>,
}

/// A file a mesh file refers to (an OBJ's material library), given with it.
#[derive(Clone, Copy, Debug)]
pub struct Companion<'a> {
    /// Its file name (a path's last part is what is matched).
    pub name: &'a str,
    /// Its bytes.
    pub bytes: &'a [u8],
}

/// Counts reported for an imported mesh (page and `--metrics`).
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct MeshInfo {
    /// File name.
    pub name: String,
    /// Format, lowercase.
    pub format: String,
    /// Vertex positions.
    pub vertices: usize,
    /// Faces kept.
    pub faces: usize,
    /// Triangles after triangulation.
    pub triangles: usize,
    /// Degenerate faces dropped.
    pub dropped_faces: usize,
    /// Whether the file's own normals are used (else computed).
    pub authored_normals: bool,
    /// True when the file gives vertex colours.
    pub vertex_colors: bool,
    /// Materials the file gives (glTF, or an OBJ's library; 0 when it gives none).
    pub materials: usize,
    /// Notes on what was and was not read (see [`Imported::notes`]).
    pub notes: Vec<String>,
}

impl Imported {
    /// The counts to show.
    pub fn info(&self) -> MeshInfo {
        MeshInfo {
            name: self.mesh.name.clone(),
            format: format!("{:?}", self.format).to_lowercase(),
            vertices: self.mesh.positions.len(),
            faces: self.mesh.face_count(),
            triangles: self.mesh.triangle_count(),
            dropped_faces: self.dropped_faces,
            authored_normals: self.has_normals,
            vertex_colors: !self.mesh.colors.is_empty(),
            materials: self
                .mesh
                .materials
                .iter()
                .filter(|m| m.reflectance != Reflectance::Viewer)
                .count(),
            notes: self.notes.clone(),
        }
    }
}

/// Detects the format from the bytes (and the name's extension where bytes do not decide).
pub fn detect(name: &str, bytes: &[u8]) -> Result<Format, ParseError> {
    let lower = name.to_ascii_lowercase();
    if bytes.starts_with(b"glTF") {
        return Ok(Format::Glb);
    }
    if bytes.starts_with(b"ply\n") || bytes.starts_with(b"ply\r\n") {
        return Ok(Format::Ply);
    }
    if lower.ends_with(".ply") {
        return Err(ParseError::byte(
            0,
            "not a PLY file: it does not start with 'ply'",
        ));
    }
    if lower.ends_with(".gltf") || lower.ends_with(".glb") {
        return if lower.ends_with(".glb") {
            Err(ParseError::byte(
                0,
                "not a binary glTF file: it does not start with 'glTF'",
            ))
        } else {
            Ok(Format::Gltf)
        };
    }
    if stl::is_binary(bytes) {
        return Ok(Format::StlBinary);
    }
    let head = &bytes[..bytes.len().min(512)];
    let text = String::from_utf8_lossy(head).to_ascii_lowercase();
    if lower.ends_with(".stl") || text.trim_start().starts_with("solid") {
        if lower.ends_with(".stl") && !text.trim_start().starts_with("solid") && bytes.len() >= 84 {
            let count = u32::from_le_bytes([bytes[80], bytes[81], bytes[82], bytes[83]]) as u64;
            let need = 84 + 50 * count;
            if need > bytes.len() as u64 {
                return Err(ParseError::byte(
                    bytes.len(),
                    format!(
                        "the file is cut short: its {count} triangles need {need} bytes, it has {}",
                        bytes.len()
                    ),
                ));
            }
        }
        if lower.ends_with(".stl") && !text.trim_start().starts_with("solid") {
            return Err(ParseError::byte(
                0,
                "not an STL file: binary STL needs 84 + 50 x (triangle count) bytes and ASCII STL starts with 'solid'",
            ));
        }
        return Ok(Format::StlAscii);
    }
    if lower.ends_with(".obj") {
        return Ok(Format::Obj);
    }
    Err(ParseError::file(
        "unrecognised mesh format (twinshade reads .obj, .stl, .ply, .gltf and .glb)",
    ))
}

/// The files a mesh file refers to, as it names them (an OBJ's `mtllib` libraries; nothing for
/// other formats), so a caller can fetch them for [`import_with`]. A name with spaces is
/// offered whole and split.
pub fn companions(name: &str, bytes: &[u8]) -> Vec<String> {
    if detect(name, bytes) != Ok(Format::Obj) {
        return Vec::new();
    }
    let mut wanted: Vec<String> = Vec::new();
    for line in String::from_utf8_lossy(bytes).lines() {
        let Some(rest) = line.trim().strip_prefix("mtllib") else {
            continue;
        };
        let rest = rest.split('#').next().unwrap_or("").trim();
        let whole = std::iter::once(rest).filter(|r| r.contains(char::is_whitespace));
        for n in whole.chain(rest.split_ascii_whitespace()) {
            if !n.is_empty() && !wanted.iter().any(|w| w == n) {
                wanted.push(n.to_string());
            }
        }
    }
    wanted
}

/// Imports a mesh file from its bytes (see [`import_with`] for files with companions).
///
/// # Errors
/// An [`ImportError`] naming the file, the place and the problem.
pub fn import(name: &str, bytes: &[u8]) -> Result<Imported, ImportError> {
    import_with(name, bytes, &[])
}

/// The last part of a path written with either separator.
fn base_name(path: &str) -> &str {
    path.rsplit(['/', '\\']).next().unwrap_or(path)
}

/// The companion a reference names: the same last path part, exactly or else ignoring case.
fn find_companion<'a>(companions: &[Companion<'a>], wanted: &str) -> Option<Companion<'a>> {
    let want = base_name(wanted);
    companions
        .iter()
        .find(|c| base_name(c.name) == want)
        .or_else(|| {
            companions
                .iter()
                .find(|c| base_name(c.name).eq_ignore_ascii_case(want))
        })
        .copied()
}

/// Gives an OBJ mesh the materials its faces name, from the libraries among `companions`.
fn attach_materials(
    file: obj::ObjFile,
    companions: &[Companion],
    notes: &mut Vec<String>,
) -> Result<Mesh, ImportError> {
    let obj::ObjFile {
        mut mesh,
        libraries,
        material_names,
        face_material,
    } = file;
    if face_material.is_empty() {
        return Ok(mesh);
    }
    let mut loaded: Vec<FileMaterial> = Vec::new();
    let mut missing_libraries: Vec<&str> = Vec::new();
    let mut texture_maps = 0;
    for text in &libraries {
        let names: Vec<&str> = match find_companion(companions, text) {
            Some(_) => vec![text.as_str()],
            None => text.split_ascii_whitespace().collect(),
        };
        for wanted in names {
            let Some(c) = find_companion(companions, wanted) else {
                missing_libraries.push(wanted);
                continue;
            };
            let library = mtl::parse(c.bytes).map_err(|e| ImportError {
                file: c.name.to_string(),
                at: e.at,
                message: e.message,
            })?;
            texture_maps += library.texture_maps;
            loaded.extend(library.materials);
        }
    }
    if !missing_libraries.is_empty() {
        notes.push(format!(
            "the material librar{} {} {} not given (put {} beside the OBJ file, or drop {} together with it)",
            if missing_libraries.len() == 1 { "y" } else { "ies" },
            missing_libraries.iter().map(|n| format!("'{n}'")).collect::<Vec<_>>().join(", "),
            if missing_libraries.len() == 1 { "was" } else { "were" },
            if missing_libraries.len() == 1 { "it" } else { "them" },
            if missing_libraries.len() == 1 { "it" } else { "them" },
        ));
    }
    if libraries.is_empty() {
        notes.push(
            "the faces name materials but the file names no material library ('mtllib')".into(),
        );
    }
    if texture_maps > 0 {
        notes.push(format!(
            "{texture_maps} texture map{} in the material library {} not read: materials are lit with their factors only",
            if texture_maps == 1 { "" } else { "s" },
            if texture_maps == 1 { "is" } else { "are" },
        ));
    }
    // The used materials in order of first use; a face naming none, or one no library
    // defines, gets the viewer's material.
    let mut lacking: Vec<&str> = Vec::new();
    let used: Vec<Option<FileMaterial>> = material_names
        .iter()
        .map(|n| {
            let found = loaded.iter().find(|m| &m.name == n).cloned();
            if found.is_none() && !loaded.is_empty() {
                lacking.push(n);
            }
            found
        })
        .collect();
    if used.iter().all(Option::is_none) {
        return Ok(mesh);
    }
    if !lacking.is_empty() {
        notes.push(format!(
            "the material librar{} lack{} {}: those faces use the viewer's material",
            if libraries.len() == 1 { "y" } else { "ies" },
            if libraries.len() == 1 { "s" } else { "" },
            lacking
                .iter()
                .map(|n| format!("'{n}'"))
                .collect::<Vec<_>>()
                .join(", ")
        ));
    }
    let mut index = vec![u32::MAX; used.len()];
    for (slot, m) in index.iter_mut().zip(&used) {
        if let Some(m) = m {
            *slot = mesh.materials.len() as u32;
            mesh.materials.push(m.clone());
        }
    }
    let viewer = mesh.materials.len() as u32;
    mesh.face_material = face_material
        .iter()
        .map(|&m| index.get(m as usize).copied().unwrap_or(u32::MAX))
        .map(|m| if m == u32::MAX { viewer } else { m })
        .collect();
    if mesh.face_material.contains(&viewer) {
        mesh.materials.push(FileMaterial {
            name: "(no material: the viewer's)".into(),
            reflectance: Reflectance::Viewer,
            ..FileMaterial::default()
        });
    }
    Ok(mesh)
}

/// Imports a mesh file from its bytes, with the files it refers to (see [`companions`]); a
/// companion it names but that is not given is reported in [`Imported::notes`].
///
/// # Errors
/// An [`ImportError`] naming the file (the mesh or a companion), the place and the problem.
pub fn import_with(
    name: &str,
    bytes: &[u8],
    companions: &[Companion],
) -> Result<Imported, ImportError> {
    let fail = |e: ParseError| ImportError {
        file: name.to_string(),
        at: e.at,
        message: e.message,
    };
    if bytes.len() > MAX_FILE_BYTES {
        return Err(fail(ParseError::file(format!(
            "the file is {} MiB; the limit is {} MiB",
            bytes.len() / (1024 * 1024),
            MAX_FILE_BYTES / (1024 * 1024)
        ))));
    }
    if bytes.is_empty() {
        return Err(fail(ParseError::file("the file is empty")));
    }
    let format = detect(name, bytes).map_err(fail)?;
    let mut notes = Vec::new();
    let mut mesh = match format {
        Format::Obj => {
            let file = obj::parse(bytes).map_err(fail)?;
            attach_materials(file, companions, &mut notes)?
        }
        Format::StlBinary => stl::parse_binary(bytes).map_err(fail)?,
        Format::StlAscii => stl::parse_ascii(bytes).map_err(fail)?,
        Format::Gltf | Format::Glb => gltf::parse(bytes).map_err(fail)?,
        Format::Ply => ply::parse(bytes).map_err(fail)?,
    };
    mesh.name = name.to_string();
    let dropped_faces = mesh.drop_degenerate_faces();
    mesh.validate().map_err(|e| {
        fail(ParseError::file(match e {
            MeshError::Empty if dropped_faces > 0 => {
                format!("all {dropped_faces} faces are degenerate (no area)")
            }
            MeshError::TooLarge { count, .. } => {
                format!("the mesh has {count} triangles; the limit is {MAX_TRIANGLES}")
            }
            other => other.to_string(),
        }))
    })?;
    let fit = mesh.fit_unit();
    let has_normals = mesh.has_normals();
    Ok(Imported {
        mesh,
        format,
        dropped_faces,
        has_normals,
        fit,
        notes,
    })
}

/// Reads three finite numbers after a keyword on a text line (OBJ `v`/`vn`, STL `vertex`).
pub(crate) fn xyz<'a>(
    tokens: &mut impl Iterator<Item = &'a str>,
    keyword: &str,
    line: usize,
) -> Result<glam::Vec3, ParseError> {
    let mut v = [0.0f32; 3];
    for (k, slot) in v.iter_mut().enumerate() {
        let t = tokens.next().ok_or_else(|| {
            ParseError::line(line, format!("'{keyword}' needs 3 numbers, found {k}"))
        })?;
        *slot = number(t)
            .ok_or_else(|| ParseError::line(line, format!("'{t}' is not a finite number")))?;
    }
    Ok(glam::Vec3::from(v))
}

/// Parses a decimal number of a text format (finite only).
pub(crate) fn number(token: &str) -> Option<f32> {
    let v: f32 = token.parse().ok()?;
    v.is_finite().then_some(v)
}
