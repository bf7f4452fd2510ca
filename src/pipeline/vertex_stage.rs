//! The vertex stage: every render vertex to world space, clip space, clip outcodes and (inside
//! the clip volume) screen position and snapped fixed-point corner, once per frame.
//!
//! Every panel of a frame and every surface probe reads the same results; the work is skipped
//! when nothing it depends on (mesh generation, rotation, camera, panel size) changed, and the
//! buffers are kept between frames, so a frame allocates nothing once sizes are stable.

use crate::geometry::camera::{Camera, CameraFrame};
use crate::geometry::vertex_buffer::VertexBuffer;
use crate::pipeline::clip::outcode;
use crate::pipeline::raster::snap_xy;
use glam::{Mat3, Quat, Vec3, Vec4};

/// Inputs of the per-frame vertex work; when they repeat, the work is reused.
#[derive(Clone, Copy, PartialEq)]
pub struct StageKey {
    /// Which prepared mesh (raised each time geometry is prepared anew).
    pub generation: u64,
    /// The scene's rotation quaternion as stored.
    pub rotation: [f32; 4],
    /// The scene's camera.
    pub camera: Camera,
    /// Panel width in pixels.
    pub width: usize,
    /// Panel height in pixels.
    pub height: usize,
}

/// Per-vertex results of one frame, indexed by render vertex.
#[derive(Default)]
pub struct VertexStage {
    key: Option<StageKey>,
    world_pos: Vec<Vec3>,
    world_nrm: Vec<Vec3>,
    clip: Vec<Vec4>,
    outcodes: Vec<u8>,
    screen: Vec<[f32; 4]>,
    fixed: Vec<[i64; 2]>,
}

impl VertexStage {
    /// Transforms every vertex of `vb` by `rotation` (object to world) and `camera` (world to
    /// clip) and projects the ones inside all clip planes to a `key.width` x `key.height`
    /// panel. Skipped when `key` equals the last run's.
    pub fn run(&mut self, vb: &VertexBuffer, key: StageKey, camera: &CameraFrame, rotation: Quat) {
        if self.key == Some(key) {
            return;
        }
        let r = Mat3::from_quat(rotation);
        let (w, h) = (key.width as f32, key.height as f32);
        self.world_pos.clear();
        self.world_nrm.clear();
        self.clip.clear();
        self.outcodes.clear();
        self.screen.clear();
        self.fixed.clear();
        for (p, n) in vb.positions.iter().zip(&vb.normals) {
            let pw = r * *p;
            let c = camera.view_proj * pw.extend(1.0);
            let code = outcode(c);
            self.world_pos.push(pw);
            self.world_nrm.push(r * *n);
            self.clip.push(c);
            self.outcodes.push(code);
            let s = if code == 0 {
                project(c, w, h)
            } else {
                [0.0; 4]
            };
            self.screen.push(s);
            self.fixed.push(snap_xy(s[0], s[1]));
        }
        self.key = Some(key);
    }

    /// World-space positions.
    pub fn world_pos(&self) -> &[Vec3] {
        &self.world_pos
    }

    /// World-space normals (not renormalised: the rotation keeps their length).
    pub fn world_nrm(&self) -> &[Vec3] {
        &self.world_nrm
    }

    /// Clip-space positions.
    pub fn clip(&self) -> &[Vec4] {
        &self.clip
    }

    /// Clip outcodes (0 = inside every plane; see [`outcode`]).
    pub fn outcodes(&self) -> &[u8] {
        &self.outcodes
    }

    /// Screen positions (x px, y px down, NDC z, 1/w) of vertices inside the clip volume;
    /// zeros for the others.
    pub fn screen(&self) -> &[[f32; 4]] {
        &self.screen
    }

    /// Snapped fixed-point screen corners (see [`snap_xy`]).
    pub fn fixed(&self) -> &[[i64; 2]] {
        &self.fixed
    }
}

/// Viewport transform of a clip-space point inside the clip volume: (x px, y px down, NDC z,
/// 1/w). Pixel centres are at half-integers.
#[inline(always)]
pub fn project(c: Vec4, w: f32, h: f32) -> [f32; 4] {
    let iw = 1.0 / c.w;
    [
        (c.x * iw + 1.0) * 0.5 * w,
        (1.0 - c.y * iw) * 0.5 * h,
        c.z * iw,
        iw,
    ]
}
