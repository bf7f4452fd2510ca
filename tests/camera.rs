//! The camera's matrices against an independent implementation: glam 0.34.3's camera module,
//! `camera::rh::view::look_at_mat4` and `camera::rh::proj::opengl::{perspective,
//! orthographic}` (OpenGL conventions: right-handed, eye down -z, clip depth in [-w, w]), with
//! the view's roll as `Mat4::from_rotation_z` applied after the look-at. twinshade writes its matrices out by hand (src/geometry/camera.rs); glam's are
//! the reference library here.

use glam::camera::rh::{proj::opengl, view::look_at_mat4};
use glam::{Mat4, Vec3};
use twinshade::geometry::{Camera, Projection};

/// Equal to 1e-6 of the matrix's largest element (at least 1e-6): a product of matrices
/// rounds each element at the scale of the sums that made it.
fn close(a: Mat4, b: Mat4, what: &str) {
    let scale = a.to_cols_array().iter().fold(1.0f32, |m, x| m.max(x.abs()));
    for (i, (x, y)) in a
        .to_cols_array()
        .iter()
        .zip(b.to_cols_array().iter())
        .enumerate()
    {
        let tol = 1e-6 * scale;
        assert!(
            (x - y).abs() <= tol,
            "{what}: element {i}: {x} vs {y}\n{a}\n{b}"
        );
    }
}

#[test]
fn view_and_projection_match_glams() {
    let mut checked = 0;
    for &yaw in &[0.0f32, 35.0, -120.0, 179.0] {
        for &pitch in &[0.0f32, 30.0, -60.0, 89.0] {
            for &roll in &[0.0f32, 15.0, -90.0] {
                for &(fov, aspect, near, far) in &[
                    (45.0f32, 4.0f32 / 3.0, 0.1f32, 100.0f32),
                    (90.0, 1.0, 0.5, 20.0),
                    (20.0, 2.5, 1.0, 5.0),
                ] {
                    for projection in [Projection::Perspective, Projection::Orthographic] {
                        let cam = Camera {
                            projection,
                            fov_y_deg: fov,
                            ortho_height: 2.4,
                            yaw_deg: yaw,
                            pitch_deg: pitch,
                            distance: 3.0,
                            roll_deg: roll,
                            near,
                            far,
                        };
                        let f = cam.frame(aspect);
                        // The eye orbits the origin: yaw about +y from +z, pitch up.
                        let (y, p) = (yaw.to_radians(), pitch.to_radians());
                        let eye = Vec3::new(p.cos() * y.sin(), p.sin(), p.cos() * y.cos()) * 3.0;
                        let what =
                            format!("yaw {yaw} pitch {pitch} roll {roll} fov {fov} {projection:?}");
                        assert!(
                            (f.eye - eye).length() < 1e-5,
                            "{what}: eye {} vs {eye}",
                            f.eye
                        );
                        let view = Mat4::from_rotation_z(roll.to_radians())
                            * look_at_mat4(f.eye, Vec3::ZERO, Vec3::Y);
                        close(f.view, view, &format!("{what}: view"));
                        let proj = match projection {
                            Projection::Perspective => {
                                opengl::perspective(fov.to_radians(), aspect, near, far)
                            }
                            Projection::Orthographic => {
                                let (h, w) = (2.4, 2.4 * aspect);
                                opengl::orthographic(
                                    -w / 2.0,
                                    w / 2.0,
                                    -h / 2.0,
                                    h / 2.0,
                                    near,
                                    far,
                                )
                            }
                        };
                        close(f.proj, proj, &format!("{what}: projection"));
                        close(
                            f.view_proj,
                            proj * view,
                            &format!("{what}: view-projection"),
                        );
                        checked += 1;
                    }
                }
            }
        }
    }
    assert_eq!(checked, 4 * 4 * 3 * 3 * 2);
}
