//! Coverage and interpolation of the rasterizer against published rules and values.

use std::cell::Cell;
use twinshade::pipeline::{draw_triangle, Cull, FragmentShader, RasterVertex, Target};

/// Writes the first varying's bits as the pixel and counts fragments.
struct Probe<'a>(&'a Cell<u32>);
impl FragmentShader<1> for Probe<'_> {
    type Out = u32;
    fn shade(&self, v: &[f32; 1]) -> u32 {
        self.0.set(self.0.get() + 1);
        v[0].to_bits()
    }
}

struct Canvas {
    w: usize,
    h: usize,
    color: Vec<u32>,
    depth: Vec<f32>,
}

impl Canvas {
    fn new(w: usize, h: usize) -> Self {
        Canvas {
            w,
            h,
            color: vec![u32::MAX; w * h],
            depth: vec![1.0; w * h],
        }
    }
    fn draw<const P: bool>(&mut self, v: [(f32, f32, f32, f32, f32); 3]) -> u32 {
        let count = Cell::new(0);
        let rv = v.map(|(x, y, z, w, f)| RasterVertex {
            x,
            y,
            z,
            inv_w: 1.0 / w,
            var: [if P { f / w } else { f }],
        });
        let mut t = Target {
            color: &mut self.color,
            color2: &mut [],
            depth: &mut self.depth,
            width: self.w,
            height: self.h,
            rows: 0..self.h,
        };
        draw_triangle::<1, P, _>(&mut t, [&rv[0], &rv[1], &rv[2]], Cull::None, &Probe(&count));
        count.get()
    }
    fn value(&self, x: usize, y: usize) -> f32 {
        f32::from_bits(self.color[y * self.w + x])
    }
}

#[test]
fn top_left_rule_worked_example() {
    // Direct3D 9 documentation, "Rasterization Rules": with integer pixel centres the
    // triangles (0,0),(5,0),(5,5) and (0,5),(0,0),(5,5) cover 15 and 10 pixels. twinshade's
    // centres are at half-integers (Direct3D 10+ convention), so every vertex moves by +0.5.
    let s = |x: f32, y: f32| (x + 0.5, y + 0.5, 0.0, 1.0, 0.0);
    let mut c = Canvas::new(8, 8);
    assert_eq!(c.draw::<false>([s(0., 0.), s(5., 0.), s(5., 5.)]), 15);
    let mut c = Canvas::new(8, 8);
    assert_eq!(c.draw::<false>([s(0., 5.), s(0., 0.), s(5., 5.)]), 10);
}

/// The covered pixels of an 8x8 canvas as rows of `#` (covered) and `.`.
fn mask(c: &Canvas) -> Vec<String> {
    (0..c.h)
        .map(|y| {
            (0..c.w)
                .map(|x| {
                    if c.color[y * c.w + x] == u32::MAX {
                        '.'
                    } else {
                        '#'
                    }
                })
                .collect()
        })
        .collect()
}

#[test]
fn top_left_rule_worked_example_pixel_sets() {
    // The same two triangles as above, pixel by pixel. The sets are derived here from the
    // rule as the Direct3D 11 "Rasterization Rules" state it (a centre on an edge is inside
    // only for a top or a left edge; y grows downward), not copied from the documentation's
    // figure, which was not at hand. Triangle 1: its top edge y = 0 and its left edge, the
    // diagonal, are inside; the right edge x = 5 is not. Triangle 2: its left edge x = 0 is
    // inside; the diagonal (now its right edge) and the bottom edge y = 5 are not.
    let s = |x: f32, y: f32| (x + 0.5, y + 0.5, 0.0, 1.0, 0.0);
    let rows = |r: [&str; 8]| r.map(String::from).to_vec();
    let first = rows([
        "#####...", ".####...", "..###...", "...##...", "....#...", "........", "........",
        "........",
    ]);
    let second = rows([
        "........", "#.......", "##......", "###.....", "####....", "........", "........",
        "........",
    ]);
    // A top-right rule covers the same number of pixels (15) but not the same ones: the test
    // tells the two apart only because it compares sets.
    let top_right = rows([
        ".#####..", "..####..", "...###..", "....##..", ".....#..", "........", "........",
        "........",
    ]);
    let count = |m: &[String]| m.iter().map(|r| r.matches('#').count()).sum::<usize>();
    assert_eq!((count(&first), count(&top_right)), (15, 15));
    assert_ne!(first, top_right);
    // Either winding gives the same set.
    for order in [[0, 1, 2], [0, 2, 1]] {
        let t1 = [s(0., 0.), s(5., 0.), s(5., 5.)];
        let mut c = Canvas::new(8, 8);
        c.draw::<false>(order.map(|i| t1[i]));
        assert_eq!(
            mask(&c),
            first,
            "triangle (0,0),(5,0),(5,5), order {order:?}"
        );
        let t2 = [s(0., 5.), s(0., 0.), s(5., 5.)];
        let mut c = Canvas::new(8, 8);
        c.draw::<false>(order.map(|i| t2[i]));
        assert_eq!(
            mask(&c),
            second,
            "triangle (0,5),(0,0),(5,5), order {order:?}"
        );
    }
}

#[test]
fn shared_edges_cover_every_pixel_exactly_once_at_any_roll() {
    // Vulkan specification, "Basic Polygon Rasterization": a sample on an edge shared by two
    // polygons is covered by exactly one. Like the Khronos conformance check, a fan of
    // triangles is drawn at many rotations and every overlap or gap fails. The fan's centre
    // and corners sit on pixel centres, so the shared spokes run through many pixel centres
    // exactly (the case the fill rule decides).
    let (w, h) = (96usize, 96usize);
    let (cx, cy, r) = (48.5f32, 47.5f32, 37.3f32);
    let sides = 11;
    for k in 0..24 {
        let roll = k as f32 * 7.3_f32.to_radians();
        let corners: Vec<(f32, f32)> = (0..sides)
            .map(|i| {
                let a = roll + i as f32 * std::f32::consts::TAU / sides as f32;
                (
                    (cx + r * a.cos()).floor() + 0.5,
                    (cy + r * a.sin()).floor() + 0.5,
                )
            })
            .collect();
        let mut c = Canvas::new(w, h);
        let mut fragments = 0;
        for i in 0..sides {
            let (a, b) = (corners[i], corners[(i + 1) % sides]);
            // Each triangle nearer than the last, so an overlap would pass the depth test.
            let z = 0.9 - i as f32 * 0.01;
            fragments += c.draw::<false>([
                (cx, cy, z, 1.0, 0.0),
                (a.0, a.1, z, 1.0, 0.0),
                (b.0, b.1, z, 1.0, 0.0),
            ]);
        }
        let covered = c.color.iter().filter(|&&p| p != u32::MAX).count() as u32;
        assert_eq!(
            fragments,
            covered,
            "roll step {k}: {} pixels drawn twice",
            fragments - covered
        );
        // Every centre clearly inside the polygon is covered; none clearly outside is.
        for y in 0..h {
            for x in 0..w {
                let (px, py) = (x as f32 + 0.5, y as f32 + 0.5);
                // Signed distance to the nearest edge line, positive inside (corners run
                // counter-clockwise in y-down coordinates, i.e. clockwise on screen).
                let d = (0..sides)
                    .map(|i| {
                        let (a, b) = (corners[i], corners[(i + 1) % sides]);
                        let (ex, ey) = (b.0 - a.0, b.1 - a.1);
                        (ex * (py - a.1) - ey * (px - a.0)) / (ex * ex + ey * ey).sqrt()
                    })
                    .fold(f32::INFINITY, f32::min);
                let hit = c.color[y * w + x] != u32::MAX;
                if d > 0.01 {
                    assert!(hit, "roll step {k}: gap at ({x}, {y})");
                } else if d < -0.01 {
                    assert!(!hit, "roll step {k}: pixel ({x}, {y}) outside drawn");
                }
            }
        }
    }
}

#[test]
fn perspective_correct_golden_value() {
    // Vulkan specification, "Basic Polygon Rasterization":
    // f = (a fa/wa + b fb/wb + c fc/wc) / (a/wa + b/wb + c/wc). With w = (1, 2, 4),
    // f = (0, 1, 0) and screen barycentrics 1/3 each, f = (1/2) / (1 + 1/2 + 1/4) = 2/7;
    // screen-affine interpolation gives 1/3 (values derived in docs/REFERENCES.md).
    // The centroid of this triangle is the centre of pixel (10, 10).
    let tri = |(x, y): (f32, f32), w: f32, f: f32| (x, y, 0.0, w, f);
    let v = [
        tri((0.5, 0.5), 1.0, 0.0),
        tri((30.5, 0.5), 2.0, 1.0),
        tri((0.5, 30.5), 4.0, 0.0),
    ];
    let mut c = Canvas::new(32, 32);
    c.draw::<true>(v);
    assert!(
        (c.value(10, 10) - 2.0 / 7.0).abs() < 1e-6,
        "perspective: {}",
        c.value(10, 10)
    );
    let mut c = Canvas::new(32, 32);
    c.draw::<false>(v);
    assert!(
        (c.value(10, 10) - 1.0 / 3.0).abs() < 1e-6,
        "affine: {}",
        c.value(10, 10)
    );
}

#[test]
fn edge_then_span_interpolation_equals_barycentric() {
    // A fact of the trade (common practice; Gouraud 1971 describes the edge-then-span walk):
    // on a triangle, interpolating a value along the left and right edges and then across
    // the span gives the barycentric (planar) interpolation. The walk below is written
    // independently of the rasterizer and compared with its affine output at every pixel.
    let v = [
        (3.3f32, 2.1f32, 0.2f32),
        (41.7, 9.6, 0.9),
        (12.4, 37.2, 0.55),
    ];
    let mut c = Canvas::new(48, 48);
    c.draw::<false>(v.map(|(x, y, f)| (x, y, 0.0, 1.0, f)));
    let mut checked = 0;
    for py in 0..48 {
        let y = py as f32 + 0.5;
        // Crossings of the horizontal line y with each edge: (x, value).
        let mut hits = Vec::new();
        for i in 0..3 {
            let (a, b) = (v[i], v[(i + 1) % 3]);
            if (a.1 <= y && y < b.1) || (b.1 <= y && y < a.1) {
                let t = (y - a.1) / (b.1 - a.1);
                hits.push((a.0 + t * (b.0 - a.0), a.2 + t * (b.2 - a.2)));
            }
        }
        if hits.len() != 2 {
            continue;
        }
        hits.sort_by(|p, q| p.0.total_cmp(&q.0));
        let ((xl, fl), (xr, fr)) = (hits[0], hits[1]);
        for px in 0..48 {
            let x = px as f32 + 0.5;
            if x > xl + 0.01 && x < xr - 0.01 && c.color[py * 48 + px] != u32::MAX {
                let span = fl + (x - xl) / (xr - xl) * (fr - fl);
                let got = c.value(px, py);
                assert!(
                    (got - span).abs() < 1e-4,
                    "({px}, {py}): raster {got}, edge-span walk {span}"
                );
                checked += 1;
            }
        }
    }
    assert!(checked > 400, "only {checked} pixels compared");
}
