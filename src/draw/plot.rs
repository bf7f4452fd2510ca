//! Line plots of sweeps and advice, as SVG text (page and CLI) or an RGBA image (CLI PNG).
//!
//! One description ([`Plot`]) feeds both outputs, so the page's plot and the command line's
//! are the same figure. Why not a plotting crate: `plotters` (the well-kept choice) draws text
//! on bitmaps only through a TrueType font that we would have to ship and rasterize; our
//! images already draw text with the public-domain `font8x8` glyphs (see [`crate::analysis::sheet`]),
//! which keeps PNG plots byte-identical on every machine, and the SVG is a few dozen elements.
//! Series are told apart by dash pattern and marker as well as colour.
//!
//! In the SVG every pickable x value carries an invisible full-height band and every point a
//! marker with `data-pick="i"`: the page maps a click to step or level `i`.

use crate::draw::image::Image;
use std::fmt::Write;

/// One line of a plot.
#[derive(Clone, Debug, PartialEq)]
pub struct Series {
    /// Legend name.
    pub name: String,
    /// sRGB colour.
    pub color: [u8; 3],
    /// Drawn dashed (the second of a pair).
    pub dashed: bool,
    /// (x, y) points in data units; non-finite y values break the line.
    pub points: Vec<(f64, f64)>,
}

/// A horizontal or vertical reference line with its label.
#[derive(Clone, Debug, PartialEq)]
pub struct Rule {
    /// Position in data units (y for horizontal rules, x for vertical ones).
    pub at: f64,
    /// Label drawn beside the line.
    pub label: String,
}

/// A plot: axes, series, reference lines and pickable x positions.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Plot {
    /// Title above the plot.
    pub title: String,
    /// X axis label.
    pub x_label: String,
    /// Y axis label.
    pub y_label: String,
    /// X range; `None`: from the data.
    pub x_range: Option<(f64, f64)>,
    /// Logarithmic x axis (base 10); x values must be positive.
    pub x_log: bool,
    /// The lines.
    pub series: Vec<Series>,
    /// Horizontal reference lines (e.g. a threshold).
    pub h_rules: Vec<Rule>,
    /// Vertical reference lines (e.g. a cost marker).
    pub v_rules: Vec<Rule>,
    /// X positions a click can pick, in order: pick `i` is `picks[i]`.
    pub picks: Vec<f64>,
    /// The pick to highlight, if any.
    pub current: Option<usize>,
}

/// Margins around the plot area, in pixels: left, right, top, bottom.
const MARGIN: (f64, f64, f64, f64) = (64.0, 16.0, 40.0, 44.0);
const BACKGROUND: [u8; 3] = [0x1b, 0x1d, 0x22];
const INK: [u8; 3] = [0xe6, 0xe8, 0xee];
const MUTED: [u8; 3] = [0x9a, 0xa0, 0xad];
const GRID: [u8; 3] = [0x2c, 0x2f, 0x37];
const RULE: [u8; 3] = [0xe0, 0xa8, 0x4a];

/// Colours of the Gouraud and Phong series (orange and blue: apart for common colour-vision
/// deficiencies; the Phong line is also dashed).
pub const PANEL_COLORS: [[u8; 3]; 2] = [[0xe3, 0x86, 0x2d], [0x4a, 0x9c, 0xe8]];

fn hex(c: [u8; 3]) -> String {
    format!("#{:02x}{:02x}{:02x}", c[0], c[1], c[2])
}

fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// "Nice" tick positions (1, 2 or 5 times a power of ten) covering `lo..=hi`.
fn ticks(lo: f64, hi: f64) -> Vec<f64> {
    let span = hi - lo;
    if span.is_nan() || span <= 0.0 || !span.is_finite() {
        return vec![lo];
    }
    let raw = span / 5.0;
    let mag = libm::pow(10.0, libm::floor(libm::log10(raw)));
    let step = [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * mag)
        .find(|s| span / s <= 6.0)
        .unwrap_or(10.0 * mag);
    let first = libm::ceil(lo / step - 1e-9) * step;
    (0..)
        .map(|i| first + i as f64 * step)
        .take_while(|v| *v <= hi + step * 1e-9)
        .take(12)
        .collect()
}

fn tick_label(v: f64) -> String {
    let a = v.abs();
    if a != 0.0 && !(1e-3..1e5).contains(&a) {
        format!("{v:.0e}")
    } else if a >= 100.0 || v == libm::round(v) {
        format!("{v:.0}")
    } else if a >= 1.0 {
        format!("{v:.1}")
    } else {
        let s = format!("{v:.3}");
        s.trim_end_matches('0').to_string()
    }
}

/// The mapping from data to pixels.
struct Frame {
    x: (f64, f64),
    y: (f64, f64),
    log: bool,
    area: (f64, f64, f64, f64),
}

impl Frame {
    fn new(plot: &Plot, width: f64, height: f64) -> Frame {
        let tx = |x: f64| if plot.x_log { libm::log10(x) } else { x };
        let finite = |v: &f64| v.is_finite();
        let xs = plot
            .series
            .iter()
            .flat_map(|s| s.points.iter().map(|p| p.0))
            .chain(plot.v_rules.iter().map(|r| r.at))
            .chain(plot.picks.iter().copied())
            .map(tx)
            .filter(finite);
        let (mut x0, mut x1) = match plot.x_range {
            Some((a, b)) => (tx(a), tx(b)),
            None => xs.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
                (a.min(v), b.max(v))
            }),
        };
        if !(x0.is_finite() && x1.is_finite()) {
            (x0, x1) = (0.0, 1.0);
        }
        if x1 <= x0 {
            (x0, x1) = (x0 - 0.5, x0 + 0.5);
        }
        if plot.x_log {
            (x0, x1) = (libm::floor(x0), libm::ceil(x1));
        }
        let ys = plot
            .series
            .iter()
            .flat_map(|s| s.points.iter().map(|p| p.1))
            .chain(plot.h_rules.iter().map(|r| r.at))
            .filter(finite);
        let (mut y0, mut y1) = ys.fold((0.0f64, f64::NEG_INFINITY), |(a, b), v| {
            (a.min(v), b.max(v))
        });
        if !y1.is_finite() || y1 <= y0 {
            y1 = y0 + 1.0;
        }
        // Head room above the highest value, rounded up to a whole tick step.
        let t = ticks(y0, y1 * 1.1);
        if let [a, b, ..] = t[..] {
            let step = b - a;
            y1 = libm::ceil(y1 * 1.1 / step - 1e-9) * step;
            y0 = libm::floor(y0 / step + 1e-9) * step;
        }
        let (l, r, top, b) = MARGIN;
        Frame {
            x: (x0, x1),
            y: (y0, y1),
            log: plot.x_log,
            area: (l, top, width - r, height - b),
        }
    }

    fn px(&self, x: f64) -> f64 {
        let x = if self.log { libm::log10(x) } else { x };
        self.area.0 + (x - self.x.0) / (self.x.1 - self.x.0) * (self.area.2 - self.area.0)
    }

    fn py(&self, y: f64) -> f64 {
        self.area.3 - (y - self.y.0) / (self.y.1 - self.y.0) * (self.area.3 - self.area.1)
    }

    fn x_ticks(&self) -> Vec<(f64, String)> {
        if self.log {
            let (a, b) = (self.x.0 as i32, self.x.1 as i32);
            (a..=b)
                .map(|e| {
                    let v = libm::pow(10.0, f64::from(e));
                    (v, tick_label(v))
                })
                .collect()
        } else {
            ticks(self.x.0, self.x.1)
                .into_iter()
                .map(|v| (v, tick_label(v)))
                .collect()
        }
    }
}

/// Polyline pieces of a series: runs of finite points, in pixels.
fn runs(f: &Frame, s: &Series) -> Vec<Vec<(f64, f64)>> {
    let mut out = vec![];
    let mut cur = vec![];
    for &(x, y) in &s.points {
        if x.is_finite() && y.is_finite() && (!f.log || x > 0.0) {
            cur.push((f.px(x), f.py(y)));
        } else if !cur.is_empty() {
            out.push(std::mem::take(&mut cur));
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

impl Plot {
    /// The plot as a standalone SVG document of `width` x `height` pixels.
    pub fn to_svg(&self, width: u32, height: u32) -> String {
        let (w, h) = (f64::from(width.max(160)), f64::from(height.max(120)));
        let f = Frame::new(self, w, h);
        let (l, t, r, b) = f.area;
        let mut s = String::new();
        let _ = write!(
            s,
            r#"<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {w} {h}" width="{w}" height="{h}" font-family="system-ui, sans-serif" font-size="12" pointer-events="none" role="img" aria-label="{}">"#,
            escape(&self.title)
        );
        let _ = write!(
            s,
            r#"<rect width="{w}" height="{h}" fill="{}"/>"#,
            hex(BACKGROUND)
        );
        // Click bands, under everything else: each pick owns the x range halfway to its
        // neighbours, and its markers drawn later pick it as well. Nothing else takes the
        // pointer (the root's `pointer-events="none"`), so a grid line or a label over a band
        // never swallows its click.
        for (i, &x) in self.picks.iter().enumerate() {
            let here = f.px(x);
            let left = if i > 0 {
                (f.px(self.picks[i - 1]) + here) / 2.0
            } else {
                l
            };
            let right = self.picks.get(i + 1).map_or(r, |n| (f.px(*n) + here) / 2.0);
            let _ = write!(
                s,
                r#"<rect data-pick="{i}" x="{:.1}" y="{t}" width="{:.1}" height="{:.1}" fill="transparent" pointer-events="all"/>"#,
                left.min(right),
                (right - left).abs().max(1.0),
                b - t
            );
        }
        let _ = write!(
            s,
            r#"<text x="{l}" y="18" fill="{}" font-weight="600">{}</text>"#,
            hex(INK),
            escape(&self.title)
        );
        for v in ticks(f.y.0, f.y.1) {
            let y = f.py(v);
            let _ = write!(
                s,
                r#"<line x1="{l}" x2="{r}" y1="{y:.1}" y2="{y:.1}" stroke="{}"/><text x="{:.1}" y="{:.1}" fill="{}" text-anchor="end">{}</text>"#,
                hex(GRID),
                l - 6.0,
                y + 4.0,
                hex(MUTED),
                tick_label(v)
            );
        }
        for (v, label) in f.x_ticks() {
            let x = f.px(v);
            let _ = write!(
                s,
                r#"<line x1="{x:.1}" x2="{x:.1}" y1="{t}" y2="{b}" stroke="{}"/><text x="{x:.1}" y="{:.1}" fill="{}" text-anchor="middle">{}</text>"#,
                hex(GRID),
                b + 16.0,
                hex(MUTED),
                escape(&label)
            );
        }
        let _ = write!(
            s,
            r#"<text x="{:.1}" y="{:.1}" fill="{}" text-anchor="middle">{}</text><text transform="translate(14 {:.1}) rotate(-90)" fill="{}" text-anchor="middle">{}</text>"#,
            (l + r) / 2.0,
            h - 6.0,
            hex(MUTED),
            escape(&self.x_label),
            (t + b) / 2.0,
            hex(MUTED),
            escape(&self.y_label)
        );
        for rule in &self.h_rules {
            let y = f.py(rule.at);
            let _ = write!(
                s,
                r#"<line x1="{l}" x2="{r}" y1="{y:.1}" y2="{y:.1}" stroke="{c}" stroke-dasharray="2 3"/><text x="{:.1}" y="{:.1}" fill="{c}" text-anchor="end">{}</text>"#,
                r - 2.0,
                y - 4.0,
                escape(&rule.label),
                c = hex(RULE)
            );
        }
        for rule in &self.v_rules {
            let x = f.px(rule.at);
            let _ = write!(
                s,
                r#"<line x1="{x:.1}" x2="{x:.1}" y1="{t}" y2="{b}" stroke="{c}" stroke-dasharray="6 3"/><text x="{:.1}" y="{:.1}" fill="{c}" text-anchor="end">{}</text>"#,
                x - 4.0,
                t + 12.0,
                escape(&rule.label),
                c = hex(RULE)
            );
        }
        if let Some(x) = self.current.and_then(|i| self.picks.get(i)) {
            let x = f.px(*x);
            let _ = write!(
                s,
                r#"<line class="current" x1="{x:.1}" x2="{x:.1}" y1="{t}" y2="{b}" stroke="{}" stroke-width="2"/>"#,
                hex(INK)
            );
        }
        for (k, series) in self.series.iter().enumerate() {
            let c = hex(series.color);
            let dash = if series.dashed {
                r#" stroke-dasharray="7 4""#
            } else {
                ""
            };
            for run in runs(&f, series) {
                let pts: Vec<String> = run.iter().map(|(x, y)| format!("{x:.1},{y:.1}")).collect();
                let _ = write!(
                    s,
                    r#"<polyline fill="none" stroke="{c}" stroke-width="2"{dash} points="{}"/>"#,
                    pts.join(" ")
                );
            }
            if series.points.len() <= 64 {
                for &(x, y) in &series.points {
                    if x.is_finite() && y.is_finite() {
                        // A point at a pickable x picks it too.
                        let pick = self
                            .picks
                            .iter()
                            .position(|&p| p == x)
                            .map_or(String::new(), |i| {
                                format!(r#" data-pick="{i}" pointer-events="all""#)
                            });
                        let _ = write!(
                            s,
                            r#"<circle{pick} cx="{:.1}" cy="{:.1}" r="4" fill="{c}"/>"#,
                            f.px(x),
                            f.py(y)
                        );
                    }
                }
            }
            let (lx, ly) = legend_at(r, &self.series, k);
            let _ = write!(
                s,
                r#"<line x1="{lx}" x2="{:.1}" y1="{ly}" y2="{ly}" stroke="{c}" stroke-width="2"{dash}/><text x="{:.1}" y="{:.1}" fill="{}">{}</text>"#,
                lx + 22.0,
                lx + 27.0,
                ly + 4.0,
                hex(INK),
                escape(&series.name)
            );
        }
        s.push_str("</svg>");
        s
    }

    /// The plot as an RGBA image of `width` x `height` pixels (text in 8x8 glyphs).
    pub fn to_image(&self, width: u32, height: u32) -> Image {
        let (w, h) = (width.max(160) as usize, height.max(120) as usize);
        let f = Frame::new(self, w as f64, h as f64);
        let (l, t, r, b) = f.area;
        let rgba = |c: [u8; 3]| [c[0], c[1], c[2], 255];
        let mut img = Image::filled(w, h, rgba(BACKGROUND));
        img.text(&self.title, l as usize, 10, 1, rgba(INK));
        for v in ticks(f.y.0, f.y.1) {
            let y = f.py(v);
            line(&mut img, (l, y), (r, y), GRID, 1, None);
            let label = tick_label(v);
            let x = (l - 6.0 - 8.0 * label.len() as f64).max(0.0);
            img.text(
                &label,
                x as usize,
                (y - 4.0).max(0.0) as usize,
                1,
                rgba(MUTED),
            );
        }
        for (v, label) in f.x_ticks() {
            let x = f.px(v);
            line(&mut img, (x, t), (x, b), GRID, 1, None);
            let lx = (x - 4.0 * label.len() as f64).max(0.0);
            img.text(&label, lx as usize, (b + 8.0) as usize, 1, rgba(MUTED));
        }
        let xl = ((l + r) / 2.0 - 4.0 * self.x_label.len() as f64).max(0.0);
        img.text(&self.x_label, xl as usize, h - 14, 1, rgba(MUTED));
        img.text(
            &self.y_label,
            4,
            (t - 14.0).max(0.0) as usize,
            1,
            rgba(MUTED),
        );
        for rule in &self.h_rules {
            let y = f.py(rule.at);
            line(&mut img, (l, y), (r, y), RULE, 1, Some((2.0, 3.0)));
            let x = (r - 2.0 - 8.0 * rule.label.len() as f64).max(0.0);
            img.text(
                &rule.label,
                x as usize,
                (y - 12.0).max(0.0) as usize,
                1,
                rgba(RULE),
            );
        }
        for rule in &self.v_rules {
            let x = f.px(rule.at);
            line(&mut img, (x, t), (x, b), RULE, 1, Some((6.0, 3.0)));
            let lx = (x - 4.0 - 8.0 * rule.label.len() as f64).max(0.0);
            img.text(&rule.label, lx as usize, (t + 4.0) as usize, 1, rgba(RULE));
        }
        for (k, series) in self.series.iter().enumerate() {
            let dash = series.dashed.then_some((7.0, 4.0));
            for run in runs(&f, series) {
                for pair in run.windows(2) {
                    line(&mut img, pair[0], pair[1], series.color, 2, dash);
                }
                if series.points.len() <= 64 {
                    for &(x, y) in &run {
                        dot(&mut img, x, y, series.color);
                    }
                }
            }
            let (lx, ly) = legend_at(r, &self.series, k);
            line(&mut img, (lx, ly), (lx + 22.0, ly), series.color, 2, dash);
            img.text(
                &series.name,
                (lx + 27.0) as usize,
                (ly - 4.0) as usize,
                1,
                rgba(INK),
            );
        }
        img
    }
}

/// Where legend entry `k` starts: in the top margin, the entries right-aligned to `right`,
/// each a 22-pixel line, a gap and its name (8 pixels a character, the raster glyph width).
fn legend_at(right: f64, series: &[Series], k: usize) -> (f64, f64) {
    let width = |s: &Series| 40.0 + 8.0 * s.name.len() as f64;
    let after: f64 = series[k..].iter().map(width).sum();
    (right - after, 14.0)
}

/// A line `width` pixels thick, optionally dashed (on, off lengths in pixels), clipped.
fn line(
    img: &mut Image,
    a: (f64, f64),
    b: (f64, f64),
    c: [u8; 3],
    width: usize,
    dash: Option<(f64, f64)>,
) {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    let len = libm::sqrt(dx * dx + dy * dy);
    let steps = libm::ceil(len).max(1.0) as usize;
    for i in 0..=steps {
        let d = i as f64 / steps as f64;
        if let Some((on, off)) = dash {
            if (d * len) % (on + off) >= on {
                continue;
            }
        }
        let (x, y) = (a.0 + dx * d, a.1 + dy * d);
        for o in 0..width {
            let (px, py) = if dx.abs() >= dy.abs() {
                (x, y + o as f64)
            } else {
                (x + o as f64, y)
            };
            put(img, px, py, c);
        }
    }
}

fn dot(img: &mut Image, x: f64, y: f64, c: [u8; 3]) {
    for oy in -3..=3 {
        for ox in -3..=3 {
            if ox * ox + oy * oy <= 10 {
                put(img, x + f64::from(ox), y + f64::from(oy), c);
            }
        }
    }
}

fn put(img: &mut Image, x: f64, y: f64, c: [u8; 3]) {
    if x >= 0.0 && y >= 0.0 && (x as usize) < img.width && (y as usize) < img.height {
        let i = ((y as usize) * img.width + x as usize) * 4;
        img.rgba[i..i + 4].copy_from_slice(&[c[0], c[1], c[2], 255]);
    }
}
