//! Geometry: meshes as authored, procedural shapes, vertex normals, subdivision, mesh files,
//! the render vertex buffer and the camera. Nothing here knows about light or pixels.

pub(crate) mod camera;
pub(crate) mod import;
pub(crate) mod mesh;
pub(crate) mod normals;
pub(crate) mod shapes;
pub(crate) mod subdivide;
pub(crate) mod vertex_buffer;

pub use camera::{Camera, CameraFrame, Projection};
pub use import::{
    companions, detect, import, import_with, Companion, Format, ImportError, Imported, Location,
    MeshInfo, ParseError, MAX_FILE_BYTES,
};
pub use mesh::{
    polygon_area_vector, Corner, FileMaterial, Fit, Mesh, MeshError, Reflectance, MAX_TRIANGLES,
    NO_NORMAL,
};
pub use normals::{compute_normals, Coincident, NormalWeighting};
pub use shapes::{DetailControl, Shape};
pub use subdivide::{subdivide, triangles_after, Subdivision, SubdivisionMethod, MAX_LEVELS};
pub use vertex_buffer::{PolygonMode, VertexBuffer, MAX_CORNERS};
