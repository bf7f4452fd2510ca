//! Subdivision: counts, midpoint points on their parent faces, PN-triangle properties cited
//! from Vlachos, Peters, Boyd and Mitchell, "Curved PN Triangles", I3D 2001.

use glam::Vec3;
use std::collections::HashMap;
use twinshade::geometry::Mesh;
use twinshade::geometry::Shape;
use twinshade::geometry::{subdivide, Subdivision, SubdivisionMethod};
use twinshade::scene::MeshSource;
use twinshade::{Scene, Workbench};

fn corner_positions(m: &Mesh, t: usize) -> [Vec3; 3] {
    let s = m.face_starts[t] as usize;
    [0, 1, 2].map(|k| m.positions[m.corners[s + k].position as usize])
}

#[test]
fn triangle_counts_multiply_by_four_per_level() {
    // Each level splits every triangle into four (the definition of the scheme; Loop 1987 and
    // PN triangles at tessellation factor 2^L alike). Quads are split in two first.
    for (shape, triangles) in [
        (Shape::Icosphere { level: 1 }, 80),
        (Shape::QuadGrid { cells: 3 }, 18),
        (Shape::Cube, 12),
    ] {
        let mesh = shape.build();
        assert_eq!(mesh.triangle_count(), triangles);
        for method in [SubdivisionMethod::Midpoint, SubdivisionMethod::PnTriangles] {
            for level in 1..=3 {
                let out = subdivide(&mesh, method, level).expect("subdivides");
                assert_eq!(
                    out.face_count(),
                    triangles * 4usize.pow(level),
                    "{shape:?} {method:?} L{level}"
                );
                assert!(out.validate().is_ok());
            }
        }
    }
}

#[test]
fn midpoint_points_stay_on_their_parent_face() {
    // Midpoint subdivision adds only barycentric combinations of a face's corners, so every
    // new vertex lies in the plane of its parent triangle and inside it (common practice).
    let mesh = Shape::Icosphere { level: 1 }.build();
    let level = 3;
    let out = subdivide(&mesh, SubdivisionMethod::Midpoint, level).expect("subdivides");
    let per = 4usize.pow(level);
    let mut worst = 0.0f32;
    for t in 0..out.face_count() {
        let [a, b, c] = corner_positions(&mesh, t / per);
        let n = (b - a).cross(c - a);
        let area = n.length();
        let n = n / area;
        for p in corner_positions(&out, t) {
            worst = worst.max((p - a).dot(n).abs());
            // Barycentric weights from sub-areas: all non-negative inside.
            let w = [
                (c - b).cross(p - b).dot(n) / area,
                (a - c).cross(p - c).dot(n) / area,
                (b - a).cross(p - a).dot(n) / area,
            ];
            assert!(w.iter().all(|&x| x > -1e-5), "triangle {t}: weights {w:?}");
        }
    }
    assert!(
        worst < 1e-6,
        "largest distance from the parent plane {worst}"
    );
}

#[test]
fn subdivided_closed_meshes_stay_closed() {
    // Points on an original edge are shared by both faces: every edge of the result has two
    // triangles (a closed 2-manifold; no cracks).
    for method in [SubdivisionMethod::Midpoint, SubdivisionMethod::PnTriangles] {
        let out = subdivide(&Shape::Icosphere { level: 1 }.build(), method, 3).expect("ok");
        let mut edges: HashMap<(u32, u32), u32> = HashMap::new();
        for f in 0..out.face_count() {
            let s = out.face_starts[f] as usize;
            let v = [0, 1, 2].map(|k| out.corners[s + k].position);
            for k in 0..3 {
                let (a, b) = (v[k], v[(k + 1) % 3]);
                *edges.entry((a.min(b), a.max(b))).or_default() += 1;
            }
        }
        assert!(
            edges.values().all(|&n| n == 2),
            "{method:?}: open or non-manifold edges"
        );
        // Euler characteristic of a sphere: V - E + F = 2.
        let (v, e, f) = (
            out.positions.len() as i64,
            edges.len() as i64,
            out.face_count() as i64,
        );
        assert_eq!(v - e + f, 2, "{method:?}");
    }
}

#[test]
fn pn_triangles_interpolate_corners_and_approach_the_sphere() {
    // Vlachos et al. 2001, section 3: the PN triangle interpolates its three corners and their
    // normals, and its edge control points lie in the corners' tangent planes, so with the
    // exact normals of a sphere the patch bulges toward the sphere that flat midpoint points
    // cut through.
    let mesh = Shape::Icosphere { level: 1 }.build();
    let level = 2;
    let pn = subdivide(&mesh, SubdivisionMethod::PnTriangles, level).expect("pn");
    let mid = subdivide(&mesh, SubdivisionMethod::Midpoint, level).expect("midpoint");
    for (i, p) in mesh.positions.iter().enumerate() {
        assert_eq!(pn.positions[i], *p, "corner {i} moved");
        assert_eq!(pn.normals[i], mesh.normals[i], "corner normal {i} changed");
    }
    let off = |m: &Mesh| {
        m.positions
            .iter()
            .map(|p| (p.length() - 1.0).abs())
            .fold(0.0f32, f32::max)
    };
    let (e_pn, e_mid) = (off(&pn), off(&mid));
    println!(
        "largest distance from the unit sphere at level {level}: PN {e_pn:.5}, midpoint {e_mid:.5}"
    );
    assert!(e_pn * 4.0 < e_mid, "PN {e_pn} vs midpoint {e_mid}");
    // Normals of the PN patch stay close to the sphere's normal at the same point.
    let worst = pn
        .normals
        .iter()
        .zip(&pn.positions)
        .map(|(n, p)| n.dot(p.normalize()))
        .fold(1.0f32, f32::min);
    assert!(worst > 0.995, "normal deviation cos {worst}");
}

#[test]
fn scenes_render_subdivided_meshes_and_refuse_too_many_levels() {
    let mut scene = Scene::default();
    scene.panel.width = 64;
    scene.panel.height = 48;
    scene.mesh = MeshSource::Shape(Shape::Icosphere { level: 1 });
    scene.subdivision = Subdivision {
        method: SubdivisionMethod::PnTriangles,
        levels: 2,
    };
    let mut bench = Workbench::new();
    let report = *bench
        .render(&scene.checked().expect("valid scene"))
        .expect("renders");
    assert_eq!(report.triangles, 80 * 16);
    // Past the triangle limit: refused before drawing, with the counts in the message.
    scene.mesh = MeshSource::Shape(Shape::Icosphere { level: 6 });
    scene.subdivision.levels = 4;
    let err = bench
        .prepare(&scene.checked().expect("valid scene"))
        .expect_err("too many triangles");
    assert!(err.to_string().contains("2000000"), "{err}");
    scene.subdivision.levels = 9;
    assert!(scene.validate().is_err());
}
