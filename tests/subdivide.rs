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

/// The curved PN triangle of A. Vlachos, J. Peters, C. Boyd, J. L. Mitchell, "Curved PN
/// Triangles" (I3D 2001), written out here in f64 from the paper's formulas: the cubic Bezier
/// patch b(u, v, w) with w = 1 - u - v on corners P1 (w = 1), P2 (u = 1), P3 (v = 1), and the
/// quadratic normal field n(u, v, w), normalised.
fn pn_patch(p: [[f64; 3]; 3], n: [[f64; 3]; 3], u: f64, v: f64) -> ([f64; 3], [f64; 3]) {
    let add = |a: [f64; 3], b: [f64; 3]| [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
    let sub = |a: [f64; 3], b: [f64; 3]| [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
    let mul = |a: [f64; 3], k: f64| [a[0] * k, a[1] * k, a[2] * k];
    let dot = |a: [f64; 3], b: [f64; 3]| a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
    let unit = |a: [f64; 3]| mul(a, 1.0 / dot(a, a).sqrt());
    // w_ij = (P_j - P_i) . N_i; b_ij = (2 P_i + P_j - w_ij N_i) / 3.
    let b = |i: usize, j: usize| {
        let w = dot(sub(p[j], p[i]), n[i]);
        mul(sub(add(mul(p[i], 2.0), p[j]), mul(n[i], w)), 1.0 / 3.0)
    };
    let (b210, b120, b021, b012, b102, b201) =
        (b(0, 1), b(1, 0), b(1, 2), b(2, 1), b(2, 0), b(0, 2));
    let e = mul(
        [b210, b120, b021, b012, b102, b201]
            .into_iter()
            .fold([0.0; 3], add),
        1.0 / 6.0,
    );
    let centroid = mul(add(add(p[0], p[1]), p[2]), 1.0 / 3.0);
    let b111 = add(e, mul(sub(e, centroid), 0.5));
    let w = 1.0 - u - v;
    let terms = [
        (p[0], w * w * w),
        (p[1], u * u * u),
        (p[2], v * v * v),
        (b210, 3.0 * w * w * u),
        (b120, 3.0 * w * u * u),
        (b201, 3.0 * w * w * v),
        (b021, 3.0 * u * u * v),
        (b102, 3.0 * w * v * v),
        (b012, 3.0 * u * v * v),
        (b111, 6.0 * w * u * v),
    ];
    let pos = terms.iter().fold([0.0; 3], |s, (c, k)| add(s, mul(*c, *k)));
    // v_ij = 2 (P_j - P_i) . (N_i + N_j) / |P_j - P_i|^2; n_ij = unit(N_i + N_j - v_ij (P_j - P_i)).
    let nn = |i: usize, j: usize| {
        let d = sub(p[j], p[i]);
        let vij = 2.0 * dot(d, add(n[i], n[j])) / dot(d, d);
        unit(sub(add(n[i], n[j]), mul(d, vij)))
    };
    let normal = [
        (n[0], w * w),
        (n[1], u * u),
        (n[2], v * v),
        (nn(0, 1), w * u),
        (nn(1, 2), u * v),
        (nn(2, 0), w * v),
    ]
    .iter()
    .fold([0.0; 3], |s, (c, k)| add(s, mul(*c, *k)));
    (pos, unit(normal))
}

#[test]
fn pn_triangles_follow_the_papers_patch_and_normals() {
    // A triangle whose normals lean away from its face, so the cubic and the quadratic normal
    // terms are not zero. Every vertex of two PN levels lies on the paper's patch at a
    // quarter-step barycentric point (edge midpoints at level 1, interior points at level 2),
    // with the paper's normal there.
    let p = [[0.0, 0.0, 0.0], [1.0, 0.1, 0.0], [0.2, 0.9, 0.1]];
    let n = [[-0.3, -0.2, 1.0], [0.4, -0.1, 1.0], [0.0, 0.5, 1.0]].map(|v: [f64; 3]| {
        let l = (v[0] * v[0] + v[1] * v[1] + v[2] * v[2]).sqrt();
        [v[0] / l, v[1] / l, v[2] / l]
    });
    let mut mesh = Mesh::new("tilted");
    for (pp, nn) in p.iter().zip(&n) {
        mesh.positions
            .push(Vec3::new(pp[0] as f32, pp[1] as f32, pp[2] as f32));
        mesh.normals
            .push(Vec3::new(nn[0] as f32, nn[1] as f32, nn[2] as f32));
    }
    mesh.push_face(&[0, 1, 2].map(|i| twinshade::geometry::Corner {
        position: i,
        normal: i,
    }));
    let sub = subdivide(&mesh, SubdivisionMethod::PnTriangles, 2).expect("subdivides");
    let mut matched = 0;
    let mut interior = 0;
    for f in sub.faces() {
        for c in f {
            let got = sub.positions[c.position as usize];
            let got_n = sub.normals[c.normal as usize];
            // The grid point this vertex should be: the nearest quarter-step point.
            let best = (0..=4)
                .flat_map(|i| (0..=4 - i).map(move |j| (i as f64 / 4.0, j as f64 / 4.0)))
                .map(|(u, v)| (u, v, pn_patch(p, n, u, v)))
                .min_by(|a, b| {
                    let d = |q: [f64; 3]| {
                        (0..3)
                            .map(|k| (q[k] - f64::from(got[k])).powi(2))
                            .sum::<f64>()
                    };
                    d(a.2 .0).total_cmp(&d(b.2 .0))
                })
                .expect("grid");
            let (u, v, (want, want_n)) = best;
            for k in 0..3 {
                assert!(
                    (f64::from(got[k]) - want[k]).abs() < 1e-5,
                    "vertex at (u {u}, v {v}): {got} vs the paper's {want:?}"
                );
                assert!(
                    (f64::from(got_n[k]) - want_n[k]).abs() < 1e-5,
                    "normal at (u {u}, v {v}): {got_n} vs the paper's {want_n:?}"
                );
            }
            matched += 1;
            if u > 0.0 && v > 0.0 && u + v < 1.0 {
                interior += 1;
            }
        }
    }
    assert_eq!(matched, 16 * 3, "16 triangles of 3 corners");
    assert!(interior > 0, "interior points were checked");

    // On a sphere (corners on the unit sphere, radial normals) the cubic's edge midpoint lies at
    // radius (5 - cos t) cos(t / 2) / 4 for corners t apart (from b210 = ((3 - cos t) P1 + P2) / 3).
    let t = 60f64.to_radians();
    let mut arc = Mesh::new("arc");
    for q in [[1.0, 0.0, 0.0], [t.cos(), t.sin(), 0.0], [0.0, 0.0, 1.0]] {
        let q = Vec3::new(q[0] as f32, q[1] as f32, q[2] as f32);
        arc.positions.push(q);
        arc.normals.push(q);
    }
    arc.push_face(&[0, 1, 2].map(|i| twinshade::geometry::Corner {
        position: i,
        normal: i,
    }));
    let one = subdivide(&arc, SubdivisionMethod::PnTriangles, 1).expect("subdivides");
    let mid = Vec3::new((1.0 + t.cos() as f32) / 2.0, t.sin() as f32 / 2.0, 0.0).normalize();
    let near = one
        .positions
        .iter()
        .max_by(|a, b| a.dot(mid).total_cmp(&b.dot(mid)))
        .expect("points");
    let want = (5.0 - t.cos()) * (t / 2.0).cos() / 4.0;
    assert!(
        (f64::from(near.length()) - want).abs() < 1e-6,
        "edge midpoint radius {} vs (5 - cos t) cos(t/2) / 4 = {want}",
        near.length()
    );
}
