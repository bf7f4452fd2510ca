//! Frame cost for instruction counting: renders F frames of the bench scene and prints the
//! pixels shaded, so `valgrind --tool=callgrind` totals of two runs (F and F + 10 frames)
//! give instructions per frame and per covered pixel, free of timing noise.
//!
//! `cargo bench --bench frame_cost -- LEVEL WIDTH HEIGHT FRAMES [both|phong|gouraud]`
//! (DEVELOPERS.md, "Performance", shows the callgrind recipe.)

use twinshade::{Framebuffer, Renderer, Scene, ShadingMode};

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| a != "--bench")
        .collect();
    let num = |i: usize, d: u32| args.get(i).and_then(|a| a.parse().ok()).unwrap_or(d);
    let (level, w, h, frames) = (num(0, 5), num(1, 800), num(2, 600), num(3, 10));
    let modes: &[ShadingMode] = match args.get(4).map(String::as_str) {
        Some("phong") => &[ShadingMode::Phong],
        Some("gouraud") => &[ShadingMode::Gouraud],
        _ => &[ShadingMode::Gouraud, ShadingMode::Phong],
    };
    let mut r = Renderer::new();
    let mut fbs: Vec<Framebuffer> = modes.iter().map(|_| Framebuffer::new(0, 0)).collect();
    let mut fragments = 0u64;
    for f in 0..frames {
        let scene = Scene::bench(level, w, h, f);
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
