//! Frame cost for instruction counting: renders F frames of the bench scene and prints the
//! pixels shaded, so `valgrind --tool=callgrind` totals of two runs (F and F + 10 frames)
//! give instructions per frame and per covered pixel, free of timing noise.
//!
//! `cargo bench --bench frame_cost -- LEVEL WIDTH HEIGHT FRAMES [pair|both|phong|gouraud]`
//! (`pair`, the default: both panels in one pass as the page renders them; `both`: two
//! separate passes).
//! (DEVELOPERS.md, "Performance", shows the callgrind recipe.)

use twinshade::{Framebuffer, Renderer, Scene, ShadingMode};

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| a != "--bench")
        .collect();
    let num = |i: usize, d: u32| args.get(i).and_then(|a| a.parse().ok()).unwrap_or(d);
    let (level, w, h, frames) = (num(0, 5), num(1, 800), num(2, 600), num(3, 10));
    let kind = args.get(4).map(String::as_str).unwrap_or("pair");
    let modes: &[ShadingMode] = match kind {
        "phong" => &[ShadingMode::PerPixel],
        "gouraud" => &[ShadingMode::PerVertex],
        _ => &[ShadingMode::PerVertex, ShadingMode::PerPixel],
    };
    let mut r = Renderer::new();
    let mut fbs: Vec<Framebuffer> = modes.iter().map(|_| Framebuffer::new(0, 0)).collect();
    let mut fragments = 0u64;
    for f in 0..frames {
        let Ok(scene) = Scene::benchmark(level, w, h, f).validated() else {
            eprintln!("frame_cost: the bench scene does not validate");
            std::process::exit(1);
        };
        if kind == "pair" {
            let (a, b) = fbs.split_at_mut(1);
            match r.render_pair(&scene, &mut a[0], &mut b[0]) {
                Ok(stats) => fragments += stats[1].fragments,
                Err(e) => {
                    eprintln!("frame_cost: {e}");
                    std::process::exit(1);
                }
            }
            continue;
        }
        for (mode, fb) in modes.iter().zip(&mut fbs) {
            match r.render(&scene, *mode, fb) {
                Ok(stats) => fragments += stats.fragments,
                Err(e) => {
                    eprintln!("frame_cost: {e}");
                    std::process::exit(1);
                }
            }
        }
    }
    println!("frame_cost L{level} {w}x{h} {frames} frames {modes:?}: {fragments} fragments");
}
