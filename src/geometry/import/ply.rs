//! PLY (Stanford polygon format), ASCII and binary (little or big endian): the `vertex`
//! element's `x y z` (with `nx ny nz` and `red green blue` when present) and the `face` element's vertex index list
//! (`vertex_indices` or `vertex_index`); other elements and properties are read past. Our own
//! parser, like OBJ's and STL's, so errors carry a line or byte offset.

use super::ParseError;
use crate::geometry::mesh::{Corner, Mesh, MAX_TRIANGLES, NO_NORMAL};
use glam::Vec3;

#[derive(Clone, Copy, PartialEq)]
enum Encoding {
    Ascii,
    Little,
    Big,
}

#[derive(Clone, Copy, PartialEq, Debug)]
enum Scalar {
    I8,
    U8,
    I16,
    U16,
    I32,
    U32,
    F32,
    F64,
}

impl Scalar {
    fn parse(name: &str) -> Option<Scalar> {
        Some(match name {
            "char" | "int8" => Scalar::I8,
            "uchar" | "uint8" => Scalar::U8,
            "short" | "int16" => Scalar::I16,
            "ushort" | "uint16" => Scalar::U16,
            "int" | "int32" => Scalar::I32,
            "uint" | "uint32" => Scalar::U32,
            "float" | "float32" => Scalar::F32,
            "double" | "float64" => Scalar::F64,
            _ => return None,
        })
    }

    fn size(self) -> usize {
        match self {
            Scalar::I8 | Scalar::U8 => 1,
            Scalar::I16 | Scalar::U16 => 2,
            Scalar::I32 | Scalar::U32 | Scalar::F32 => 4,
            Scalar::F64 => 8,
        }
    }
}

struct Property {
    name: String,
    /// `Some(count type)` for a list property.
    list: Option<Scalar>,
    value: Scalar,
}

struct Element {
    name: String,
    count: usize,
    properties: Vec<Property>,
}

/// Reads values one by one from the body, ASCII or binary, remembering where it is.
struct Body<'a> {
    bytes: &'a [u8],
    pos: usize,
    encoding: Encoding,
    /// ASCII: the current line's tokens and its number.
    tokens: std::vec::IntoIter<&'a str>,
    line: usize,
    lines: std::iter::Peekable<std::iter::Enumerate<std::str::Lines<'a>>>,
    first_line: usize,
}

impl<'a> Body<'a> {
    fn here(&self) -> ParseError {
        match self.encoding {
            Encoding::Ascii => ParseError::line(self.line, ""),
            _ => ParseError::byte(self.pos, ""),
        }
    }

    fn fail(&self, message: String) -> ParseError {
        ParseError {
            message,
            ..self.here()
        }
    }

    /// Starts the next element instance (ASCII: one line each).
    fn next_record(&mut self) -> Result<(), ParseError> {
        if self.encoding == Encoding::Ascii {
            loop {
                let Some((i, l)) = self.lines.next() else {
                    return Err(self.fail("the file ends before all elements are read".into()));
                };
                self.line = self.first_line + i;
                let toks: Vec<&str> = l.split_ascii_whitespace().collect();
                if !toks.is_empty() {
                    self.tokens = toks.into_iter();
                    return Ok(());
                }
            }
        }
        Ok(())
    }

    fn value(&mut self, t: Scalar) -> Result<f64, ParseError> {
        if self.encoding == Encoding::Ascii {
            let tok = self
                .tokens
                .next()
                .ok_or_else(|| self.fail("this line has too few values".into()))?;
            let v: f64 = tok
                .parse()
                .map_err(|_| self.fail(format!("'{tok}' is not a number")))?;
            return Ok(v);
        }
        let n = t.size();
        let Some(raw) = self.bytes.get(self.pos..self.pos + n) else {
            return Err(self.fail(format!(
                "the file is cut short: {n} more bytes were expected here"
            )));
        };
        let mut b = [0u8; 8];
        b[..n].copy_from_slice(raw);
        if self.encoding == Encoding::Big {
            b[..n].reverse();
        }
        self.pos += n;
        Ok(match t {
            Scalar::I8 => f64::from(b[0] as i8),
            Scalar::U8 => f64::from(b[0]),
            Scalar::I16 => f64::from(i16::from_le_bytes([b[0], b[1]])),
            Scalar::U16 => f64::from(u16::from_le_bytes([b[0], b[1]])),
            Scalar::I32 => f64::from(i32::from_le_bytes([b[0], b[1], b[2], b[3]])),
            Scalar::U32 => f64::from(u32::from_le_bytes([b[0], b[1], b[2], b[3]])),
            Scalar::F32 => f64::from(f32::from_le_bytes([b[0], b[1], b[2], b[3]])),
            Scalar::F64 => f64::from_le_bytes(b),
        })
    }
}

/// Parses PLY bytes.
///
/// # Errors
/// A malformed header (with its line), unsupported encodings, truncated binary data (with its
/// byte offset), malformed ASCII values (with their line), bad indices, non-finite values.
pub fn parse(bytes: &[u8]) -> Result<Mesh, ParseError> {
    // Header: ASCII lines up to "end_header".
    let mut elements: Vec<Element> = Vec::new();
    let mut encoding = None;
    let mut pos = 0usize;
    let mut line = 0usize;
    loop {
        let Some(len) = bytes[pos..].iter().position(|&b| b == b'\n') else {
            return Err(ParseError::line(
                line + 1,
                "the header has no 'end_header' line",
            ));
        };
        line += 1;
        let text = std::str::from_utf8(&bytes[pos..pos + len])
            .map_err(|_| ParseError::line(line, "the header is not text"))?
            .trim_end_matches('\r');
        pos += len + 1;
        let mut t = text.split_ascii_whitespace();
        match t.next() {
            Some("ply") if line == 1 => {}
            _ if line == 1 => {
                return Err(ParseError::byte(
                    0,
                    "not a PLY file: it does not start with 'ply'",
                ))
            }
            Some("format") => {
                encoding = Some(match (t.next(), t.next()) {
                    (Some("ascii"), Some("1.0")) => Encoding::Ascii,
                    (Some("binary_little_endian"), Some("1.0")) => Encoding::Little,
                    (Some("binary_big_endian"), Some("1.0")) => Encoding::Big,
                    _ => {
                        return Err(ParseError::line(
                            line,
                            format!("unsupported format line '{text}'"),
                        ))
                    }
                });
            }
            Some("element") => {
                let name = t.next().unwrap_or("").to_string();
                let count = t
                    .next()
                    .and_then(|c| c.parse::<usize>().ok())
                    .ok_or_else(|| ParseError::line(line, "an element needs a name and a count"))?;
                elements.push(Element {
                    name,
                    count,
                    properties: Vec::new(),
                });
            }
            Some("property") => {
                let Some(el) = elements.last_mut() else {
                    return Err(ParseError::line(line, "a property before any element"));
                };
                let toks: Vec<&str> = t.collect();
                let bad = || ParseError::line(line, format!("unsupported property line '{text}'"));
                let prop = match toks.as_slice() {
                    ["list", c, v, name] => Property {
                        name: name.to_string(),
                        list: Some(Scalar::parse(c).ok_or_else(bad)?),
                        value: Scalar::parse(v).ok_or_else(bad)?,
                    },
                    [v, name] => Property {
                        name: name.to_string(),
                        list: None,
                        value: Scalar::parse(v).ok_or_else(bad)?,
                    },
                    _ => return Err(bad()),
                };
                el.properties.push(prop);
            }
            Some("comment" | "obj_info") | None => {}
            Some("end_header") => break,
            Some(other) => {
                return Err(ParseError::line(
                    line,
                    format!("unknown header line '{other}'"),
                ))
            }
        }
    }
    let encoding =
        encoding.ok_or_else(|| ParseError::line(line, "the header has no 'format' line"))?;
    let rest = &bytes[pos..];
    let ascii_text = if encoding == Encoding::Ascii {
        std::str::from_utf8(rest)
            .map_err(|e| ParseError::byte(pos + e.valid_up_to(), "the ASCII body is not text"))?
    } else {
        ""
    };
    let mut body = Body {
        bytes,
        pos,
        encoding,
        tokens: Vec::new().into_iter(),
        line,
        lines: ascii_text.lines().enumerate().peekable(),
        first_line: line + 1,
    };
    let mut mesh = Mesh::new("");
    let mut corners: Vec<Corner> = Vec::new();
    let mut triangles = 0usize;
    for el in &elements {
        let idx = |n: &str| el.properties.iter().position(|p| p.name == n);
        let is_vertex = el.name == "vertex";
        let is_face = el.name == "face";
        let xyz = [idx("x"), idx("y"), idx("z")];
        let nxyz = [idx("nx"), idx("ny"), idx("nz")];
        let with_normals = nxyz.iter().all(Option::is_some);
        // Vertex colours: `red`, `green`, `blue` (`alpha` is not used); integers scaled by
        // their type's largest value (uchar: 255), floats taken as 0..1; sRGB-encoded by
        // common practice (see Mesh::colors).
        let rgb = [idx("red"), idx("green"), idx("blue")];
        let with_colors = is_vertex && rgb.iter().all(Option::is_some);
        let colour_scale = rgb[0].map_or(1.0, |k| match el.properties[k].value {
            Scalar::U8 | Scalar::I8 => 255.0,
            Scalar::U16 | Scalar::I16 => 65535.0,
            Scalar::U32 | Scalar::I32 => 4_294_967_295.0,
            Scalar::F32 | Scalar::F64 => 1.0,
        });
        let list = idx("vertex_indices").or_else(|| idx("vertex_index"));
        if is_vertex && xyz.iter().any(Option::is_none) {
            return Err(ParseError::line(
                line,
                "the vertex element has no x, y and z",
            ));
        }
        if is_face && list.is_none() {
            return Err(ParseError::line(
                line,
                "the face element has no vertex_indices list",
            ));
        }
        let mut values = vec![0.0f64; el.properties.len()];
        for _ in 0..el.count {
            body.next_record()?;
            corners.clear();
            for (k, p) in el.properties.iter().enumerate() {
                match p.list {
                    None => values[k] = body.value(p.value)?,
                    Some(count_type) => {
                        let n = body.value(count_type)?;
                        if !(0.0..=1_000_000.0).contains(&n) || n.fract() != 0.0 {
                            return Err(body.fail(format!("a list of {n} values")));
                        }
                        for _ in 0..n as usize {
                            let v = body.value(p.value)?;
                            if is_face && Some(k) == list {
                                if v < 0.0 || v.fract() != 0.0 || v >= mesh.positions.len() as f64 {
                                    return Err(body.fail(format!(
                                        "vertex index {v} is out of range ({} vertices)",
                                        mesh.positions.len()
                                    )));
                                }
                                let i = v as u32;
                                corners.push(Corner {
                                    position: i,
                                    normal: if mesh.normals.is_empty() {
                                        NO_NORMAL
                                    } else {
                                        i
                                    },
                                });
                            }
                        }
                    }
                }
            }
            if is_vertex {
                let get = |o: [Option<usize>; 3]| {
                    Vec3::new(
                        values[o[0].unwrap_or(0)] as f32,
                        values[o[1].unwrap_or(0)] as f32,
                        values[o[2].unwrap_or(0)] as f32,
                    )
                };
                let p = get(xyz);
                if !p.is_finite() {
                    return Err(body.fail(format!(
                        "vertex {} has a NaN or infinite coordinate",
                        mesh.positions.len()
                    )));
                }
                mesh.positions.push(p);
                if with_colors {
                    let c = get(rgb) / colour_scale as f32;
                    mesh.colors.push(c.clamp(Vec3::ZERO, Vec3::ONE));
                    mesh.colors_srgb = true;
                }
                if with_normals {
                    mesh.normals
                        .push(get(nxyz).try_normalize().unwrap_or(Vec3::Z));
                }
            } else if is_face {
                if corners.len() < 3 {
                    return Err(body.fail(format!(
                        "a face needs 3 corners, this one has {}",
                        corners.len()
                    )));
                }
                triangles += corners.len() - 2;
                if triangles > MAX_TRIANGLES {
                    return Err(body.fail(format!("more than {MAX_TRIANGLES} triangles")));
                }
                mesh.push_face(&corners);
            }
        }
    }
    Ok(mesh)
}
