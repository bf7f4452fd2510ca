//! The orbit camera: where the eye is, how the view rolls, and the projection.
//!
//! Conventions (OpenGL's): right-handed world, eye looks down its -z, clip-space depth in
//! [-w, w], NDC y up. The mesh turns under fixed lights and a fixed camera (that is what makes
//! per-vertex highlights crawl); the camera itself orbits only when the user moves it. Angles
//! are degrees in the scene and go through `libm` for the same result on every target.

use glam::{Mat4, Vec3, Vec4};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

/// Perspective or orthographic projection.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Projection {
    /// Pinhole perspective with a vertical field of view.
    #[default]
    Perspective,
    /// Parallel projection showing `ortho_height` world units vertically.
    Orthographic,
}

/// An orbit camera around the origin.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[serde(default, deny_unknown_fields)]
pub struct Camera {
    /// Projection kind.
    pub projection: Projection,
    /// Vertical field of view in degrees (perspective), 1..=150.
    #[schemars(range(min = 1.0, max = 150.0))]
    pub fov_y_deg: f32,
    /// Visible height in world units (orthographic), > 0.
    #[schemars(extend("exclusiveMinimum" = 0))]
    pub ortho_height: f32,
    /// Orbit angle about +y, degrees; 0 puts the eye on +z.
    pub yaw_deg: f32,
    /// Orbit elevation, degrees, -89..=89.
    #[schemars(range(min = -89.0, max = 89.0))]
    pub pitch_deg: f32,
    /// Eye distance from the origin, world units, > near.
    pub distance: f32,
    /// Roll of the view about its axis, degrees; positive turns the picture counter-clockwise.
    pub roll_deg: f32,
    /// Near plane distance, > 0.
    #[schemars(extend("exclusiveMinimum" = 0))]
    pub near: f32,
    /// Far plane distance, > near.
    pub far: f32,
}

impl Default for Camera {
    fn default() -> Self {
        Camera {
            projection: Projection::Perspective,
            fov_y_deg: 45.0,
            ortho_height: 2.4,
            yaw_deg: 0.0,
            pitch_deg: 0.0,
            distance: 3.0,
            roll_deg: 0.0,
            near: 0.1,
            far: 100.0,
        }
    }
}

/// The matrices and vectors one frame needs.
#[derive(Clone, Copy, Debug)]
pub struct CameraFrame {
    /// World to eye space.
    pub view: Mat4,
    /// Eye to clip space.
    pub proj: Mat4,
    /// World to clip space.
    pub view_proj: Mat4,
    /// Eye position in world space (perspective).
    pub eye: Vec3,
    /// Unit vector from the scene toward the eye, world space (orthographic view direction).
    pub toward_eye: Vec3,
    /// True for orthographic projection.
    pub orthographic: bool,
}

fn sin_cos_deg(d: f32) -> (f32, f32) {
    let r = d.to_radians();
    (libm::sinf(r), libm::cosf(r))
}

impl Camera {
    /// Checks the ranges stated on the fields.
    ///
    /// # Errors
    /// A message naming the first field out of range.
    pub fn validate(&self) -> Result<(), String> {
        let finite = [
            self.fov_y_deg,
            self.ortho_height,
            self.yaw_deg,
            self.pitch_deg,
            self.distance,
            self.roll_deg,
            self.near,
            self.far,
        ]
        .iter()
        .all(|v| v.is_finite());
        if !finite {
            return Err("camera values must be finite numbers".into());
        }
        if !(1.0..=150.0).contains(&self.fov_y_deg) {
            return Err(format!(
                "field of view must be 1 to 150 degrees, not {}",
                self.fov_y_deg
            ));
        }
        if self.ortho_height.is_nan() || self.ortho_height <= 0.0 {
            return Err("orthographic height must be positive".into());
        }
        if !(-89.0..=89.0).contains(&self.pitch_deg) {
            return Err("camera pitch must be between -89 and 89 degrees".into());
        }
        if !(self.near > 0.0 && self.far > self.near && self.distance > self.near) {
            return Err("camera needs 0 < near < distance and near < far".into());
        }
        Ok(())
    }

    /// Builds the frame's matrices for a viewport aspect ratio (width / height).
    pub fn frame(&self, aspect: f32) -> CameraFrame {
        let (sy, cy) = sin_cos_deg(self.yaw_deg);
        let (sp, cp) = sin_cos_deg(self.pitch_deg);
        let toward_eye = Vec3::new(cp * sy, sp, cp * cy);
        let eye = toward_eye * self.distance;
        let f = -toward_eye;
        let s = f.cross(Vec3::Y).normalize();
        let u = s.cross(f);
        let look = Mat4::from_cols(
            Vec4::new(s.x, u.x, -f.x, 0.0),
            Vec4::new(s.y, u.y, -f.y, 0.0),
            Vec4::new(s.z, u.z, -f.z, 0.0),
            Vec4::new(-s.dot(eye), -u.dot(eye), f.dot(eye), 1.0),
        );
        let (sr, cr) = sin_cos_deg(self.roll_deg);
        let roll = Mat4::from_cols(
            Vec4::new(cr, sr, 0.0, 0.0),
            Vec4::new(-sr, cr, 0.0, 0.0),
            Vec4::Z,
            Vec4::W,
        );
        let view = roll * look;
        let (n, fa) = (self.near, self.far);
        let proj = match self.projection {
            Projection::Perspective => {
                let t = 1.0 / libm::tanf(0.5 * self.fov_y_deg.to_radians());
                Mat4::from_cols(
                    Vec4::new(t / aspect, 0.0, 0.0, 0.0),
                    Vec4::new(0.0, t, 0.0, 0.0),
                    Vec4::new(0.0, 0.0, (fa + n) / (n - fa), -1.0),
                    Vec4::new(0.0, 0.0, 2.0 * fa * n / (n - fa), 0.0),
                )
            }
            Projection::Orthographic => {
                let h = self.ortho_height;
                let w = h * aspect;
                Mat4::from_cols(
                    Vec4::new(2.0 / w, 0.0, 0.0, 0.0),
                    Vec4::new(0.0, 2.0 / h, 0.0, 0.0),
                    Vec4::new(0.0, 0.0, -2.0 / (fa - n), 0.0),
                    Vec4::new(0.0, 0.0, -(fa + n) / (fa - n), 1.0),
                )
            }
        };
        CameraFrame {
            view,
            proj,
            view_proj: proj * view,
            eye,
            toward_eye,
            orthographic: self.projection == Projection::Orthographic,
        }
    }
}
