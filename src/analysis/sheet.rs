//! Contact and report sheets: panels side by side with their labels, the difference colour
//! scale, the metrics and the scene's link, as one RGBA image (text from [`crate::draw::text`]).

use crate::analysis::measure::Comparer;
use crate::analysis::report::{panel_labels, FrameReport, Panel};
use crate::analysis::workbench::Workbench;
use crate::draw::image::Image;
use crate::pipeline::framebuffer::Framebuffer;
use crate::scene::definition::Scene;

/// Height of the label strip above each panel, in pixels.
pub const LABEL_STRIP: usize = 28;
/// Gap between panels, in pixels.
pub const GAP: usize = 8;

/// Puts panels side by side, each under a label strip, on a dark background.
pub fn sheet(panels: &[(&str, &Framebuffer)]) -> Image {
    let h = panels.iter().map(|(_, f)| f.height()).max().unwrap_or(0);
    let w: usize = panels.iter().map(|(_, f)| f.width()).sum::<usize>() + GAP * (panels.len() + 1);
    let mut img = Image::filled(w, h + LABEL_STRIP + GAP, [18, 19, 23, 255]);
    let mut x = GAP;
    for (label, fb) in panels {
        // Glyphs at twice their size when the label fits above its panel with a gap to the
        // next label, else actual size.
        let scale = if label.len() * 16 + GAP <= fb.width() {
            2
        } else {
            1
        };
        img.text(label, x, 8 + 4 * (2 - scale), scale, [232, 234, 240, 255]);
        img.blit(fb.bytes(), fb.width(), fb.height(), x, LABEL_STRIP);
        x += fb.width() + GAP;
    }
    img
}

/// Text lines summarising a frame report for sheets (ASCII).
pub fn metrics_lines(report: &FrameReport) -> Vec<String> {
    let m = &report.metrics;
    let name = |i: usize| report.pair[i].short();
    vec![
        format!(
            "{} vs {}: dE00 mean {:.2}  p95 {:.2}  max {:.2}   dE*ab mean {:.2}  p95 {:.2}  max {:.2}",
            name(0),
            name(1),
            m.de00.mean,
            m.de00.p95,
            m.de00.max,
            m.de76.mean,
            m.de76.p95,
            m.de76.max
        ),
        format!(
            "{:.1}% of {} pixels above {} dE00; {} silhouette pixels; peak Y {:.3} vs {:.3} (ratio {:.2})",
            100.0 * m.share_above_threshold,
            m.covered_pixels,
            m.threshold_de00,
            m.silhouette_mismatch_pixels,
            m.peak_luminance[0],
            m.peak_luminance[1],
            m.peak_ratio
        ),
        format!(
            "Lighting evaluations per frame: {} per vertex vs {} per pixel ({} triangles, {}x{} px); renderer revision {}",
            report.lighting.per_vertex,
            report.lighting.per_pixel,
            report.triangles,
            report.width,
            report.height,
            report.renderer_revision
        ),
        format!("Lit with {}", report.lit_with.describe()),
    ]
}

/// The report sheet the page exports and `twinshade render` writes: the labelled panels, the
/// difference colour scale with its threshold mark, the key metrics and the scene's link.
/// `panels` are Gouraud, Phong and the difference image, in that order.
pub fn report_sheet(
    panels: &[(&str, &Framebuffer)],
    report: &FrameReport,
    scale_max: f32,
    link: &str,
) -> Image {
    let base = sheet(panels);
    let text_w = 8;
    let width = base.width;
    let chars_per_line = ((width - 2 * GAP) / text_w).max(16);
    let mut lines = metrics_lines(report);
    let link_line = format!("Scene: {link}");
    let link_chars: Vec<char> = link_line.chars().collect();
    for chunk in link_chars.chunks(chars_per_line) {
        lines.push(chunk.iter().collect());
    }
    let legend_h = 28;
    let height = base.height + legend_h + lines.len() * 12 + GAP;
    let mut img = Image::filled(width, height, [18, 19, 23, 255]);
    img.rgba[..base.rgba.len()].copy_from_slice(&base.rgba);
    // The colour scale under the difference panel (the last one).
    if let Some((_, diff)) = panels.last() {
        let x0 = width - GAP - diff.width();
        let y0 = base.height;
        let mut comparer = Comparer::new();
        for x in 0..diff.width() {
            let de = scale_max * x as f32 / (diff.width().max(2) - 1) as f32;
            let c = comparer.map_color(de, scale_max);
            for y in y0..y0 + 10 {
                img.put(x0 + x, y, [c[0], c[1], c[2], 255]);
            }
        }
        let t = report.metrics.threshold_de00 as f32 / scale_max;
        if t <= 1.0 {
            let mx = x0 + (t * (diff.width() - 1) as f32) as usize;
            for y in y0..y0 + 12 {
                img.put(mx, y, [255, 255, 255, 255]);
            }
        }
        let grey = [170, 174, 184, 255];
        img.text("0", x0, y0 + 14, 1, grey);
        let max = format!("{scale_max} dE00");
        img.text(
            &max,
            x0 + diff.width().saturating_sub(max.len() * 8),
            y0 + 14,
            1,
            grey,
        );
        let mark = format!("| {} noticeable", report.metrics.threshold_de00);
        if t <= 1.0 {
            let mx = x0 + (t * (diff.width() - 1) as f32) as usize;
            img.text(&mark, mx, y0 + 14, 1, grey);
        }
    }
    let mut y = base.height + legend_h;
    for line in &lines {
        img.text(line, GAP, y, 1, [232, 234, 240, 255]);
        y += 12;
    }
    img
}

/// The report sheet of the workbench's last frame, which must be of `scene` (see
/// [`report_sheet`]).
pub fn workbench_sheet(bench: &Workbench, scene: &Scene) -> Image {
    let report = bench.report();
    let labels = panel_labels(report, scene.difference.scale_max);
    let panels = [
        (labels[0].as_str(), bench.framebuffer(Panel::PerVertex)),
        (labels[1].as_str(), bench.framebuffer(Panel::PerPixel)),
        (labels[2].as_str(), bench.framebuffer(Panel::Difference)),
    ];
    report_sheet(
        &panels,
        report,
        scene.difference.scale_max,
        &crate::scene::link::encode(scene),
    )
}
