//! The specular power without `powf` against the reference `powf` (libm 0.2, a port of
//! musl's correctly-rounded-in-practice powf).

use twinshade::shading::specular_power;

/// Numbers in [-1, 1) from a xorshift generator seeded with `state` (deterministic, so a
/// failing case can be found again).
fn uniform(mut state: u64) -> impl FnMut() -> f32 {
    move || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        (state >> 40) as f32 / (1u64 << 24) as f32 * 2.0 - 1.0
    }
}

/// Four vectors as lanes.
fn lanes(v: &[glam::Vec3; 4]) -> twinshade::shading::V4 {
    use twinshade::shading::{F4, V4};
    V4 {
        x: F4::new(v.map(|v| v.x)),
        y: F4::new(v.map(|v| v.y)),
        z: F4::new(v.map(|v| v.z)),
    }
}

#[test]
fn specular_power_matches_powf() {
    let mut worst_int = 0.0f64;
    let mut worst_frac = 0.0f64;
    for i in 1..=4000 {
        let x = i as f32 / 4000.0;
        for n in [1.0f32, 2.0, 5.0, 16.0, 64.0, 80.0, 255.0, 1024.0, 2048.0] {
            let (got, want) = (specular_power(x, n), libm::powf(x, n));
            if want > 1e-30 {
                worst_int = worst_int.max(((got - want) / want).abs() as f64);
            }
        }
        for n in [1.5f32, 7.25, 63.9, 100.01, 333.3, 2047.5] {
            let (got, want) = (specular_power(x, n), libm::powf(x, n));
            if want > 1e-30 {
                worst_frac = worst_frac.max(((got - want) / want).abs() as f64);
            }
        }
    }
    eprintln!("worst relative error: integer n {worst_int:.2e}, fractional n {worst_frac:.2e}");
    assert!(worst_int < 1e-4, "integer exponents: {worst_int}");
    assert!(worst_frac < 2e-4, "fractional exponents: {worst_frac}");
    assert_eq!(specular_power(1.0, 80.0), 1.0);
}

#[test]
fn four_lane_lighting_is_bit_identical_to_scalar() {
    // The vectorised path must give exactly the scalar bits (STYLE: one reference, identical
    // optimised path), for every reflection model, both projections and both light kinds.
    use glam::Vec3;
    use twinshade::shading::{Lighting, ReflectionModel};
    use twinshade::Scene;
    let mut next = uniform(0x9e37_79b9_7f4a_7c15);
    for (model, ortho, metallic) in [
        (ReflectionModel::BlinnPhong, false, 0.0),
        (ReflectionModel::Phong, false, 0.0),
        (ReflectionModel::BlinnPhong, true, 0.0),
        (ReflectionModel::Phong, true, 0.0),
        (ReflectionModel::MetallicRoughness, false, 0.0),
        (ReflectionModel::MetallicRoughness, true, 1.0),
        (ReflectionModel::MetallicRoughness, false, 0.6),
    ] {
        let mut scene = Scene {
            model,
            ..Scene::default()
        };
        scene.material.metallic = metallic;
        scene.material.roughness = 0.35;
        if ortho {
            scene.camera.projection = twinshade::geometry::Projection::Orthographic;
        }
        scene.material.shininess = 37.5;
        let frame = scene.camera.frame(4.0 / 3.0);
        let l = Lighting::new(
            &scene.lights,
            scene.ambient_light,
            &scene.material,
            model,
            &frame,
        );
        for _ in 0..20_000 {
            let n: [Vec3; 4] =
                [0; 4].map(|_| Vec3::new(next(), next(), next()).normalize_or_zero());
            let p: [Vec3; 4] = [0; 4].map(|_| Vec3::new(next(), next(), next()));
            let got = l.shade4(lanes(&n), lanes(&p));
            for k in 0..4 {
                let want = l.shade(n[k], p[k]);
                let lane = Vec3::new(
                    got.x.to_array()[k],
                    got.y.to_array()[k],
                    got.z.to_array()[k],
                );
                assert_eq!(
                    lane.to_array().map(f32::to_bits),
                    want.to_array().map(f32::to_bits),
                    "{model:?} ortho {ortho}: n {} p {}",
                    n[k],
                    p[k]
                );
            }
        }
    }
}

#[test]
fn tinted_lighting_four_lanes_are_bit_identical_and_a_white_tint_changes_nothing() {
    use glam::Vec3;
    use twinshade::shading::{Finish, Lighting, ReflectionModel};
    use twinshade::Scene;
    let mut next = uniform(0x2545_f491_4f6c_dd1d);
    for (model, finish, metallic) in [
        (ReflectionModel::BlinnPhong, Finish::Dielectric, 0.0),
        (ReflectionModel::Phong, Finish::Metal, 0.0),
        (ReflectionModel::MetallicRoughness, Finish::Dielectric, 0.0),
        (ReflectionModel::MetallicRoughness, Finish::Dielectric, 0.7),
    ] {
        let mut scene = Scene {
            model,
            ..Scene::default()
        };
        scene.material.finish = finish;
        scene.material.metallic = metallic;
        scene.material.emissive_strength = 0.3;
        scene.material.emissive = twinshade::shading::Rgb::hex("#203040");
        let frame = scene.camera.frame(4.0 / 3.0);
        let l = Lighting::new(
            &scene.lights,
            scene.ambient_light,
            &scene.material,
            model,
            &frame,
        );
        for _ in 0..20_000 {
            let n: [Vec3; 4] =
                [0; 4].map(|_| Vec3::new(next(), next(), next()).normalize_or_zero());
            let p: [Vec3; 4] = [0; 4].map(|_| Vec3::new(next(), next(), next()));
            let t: [Vec3; 4] = [0; 4].map(|_| Vec3::new(next(), next(), next()).abs());
            let got = l.shade4_tinted(lanes(&n), lanes(&p), lanes(&t));
            for k in 0..4 {
                let want = l.shade_tinted(n[k], p[k], t[k]);
                let lane = [got.x, got.y, got.z].map(|c| c.to_array()[k]);
                assert_eq!(
                    lane.map(f32::to_bits),
                    want.to_array().map(f32::to_bits),
                    "{model:?}: n {} p {} tint {}",
                    n[k],
                    p[k],
                    t[k]
                );
                // A white tint is the untinted shading, up to the order of the sums.
                let white = l.shade_tinted(n[k], p[k], Vec3::ONE);
                let plain = l.shade(n[k], p[k]);
                assert!(
                    (white - plain).abs().max_element() <= 1e-5 * plain.max_element().max(1.0),
                    "{model:?}: white tint {white} vs {plain}"
                );
            }
        }
    }
}
