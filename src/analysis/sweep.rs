//! Sweeps: one scene rendered at evenly spaced angles of a rotation and measured at each step.
//!
//! A turntable sweep turns the mesh about its own up axis (object +y) under fixed lights and
//! a fixed camera, which is what makes a per-vertex highlight crawl, dim and pop. A roll
//! sweep rolls the view about its axis: lighting does not change at all, so whatever changes
//! at a fixed point of the surface is the interpolation method's dependence on orientation
//! (scanline-filled polygons) and nothing else; it is read with surface probes
//! ([`crate::pipeline::surface`]), not pixels.
//!
//! A [`Sweep`] runs one step per call so the page can work in slices between frames; the
//! command line runs them all. Each step is one workbench frame (both panels and their
//! comparison) plus the panel peaks and, for roll, the probes.

use crate::analysis::error::AnalysisError;
use crate::analysis::measure::luminance;
use crate::analysis::report::Panel;
use crate::analysis::workbench::Workbench;
use crate::draw::plot::{Plot, Rule, Series, PANEL_COLORS};
use crate::pipeline::framebuffer::Framebuffer;
use crate::pipeline::surface::SurfacePoint;
use crate::scene::definition::{axis_angle, ValidScene};
use crate::scene::settings::ShadingMode;
use serde::{Deserialize, Serialize};

/// The rotation a sweep follows.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum SweepAxis {
    /// The mesh turns about its own up axis (object +y) under fixed lights.
    #[default]
    Turntable,
    /// The view rolls about its axis; lights and mesh stay.
    Roll,
}

impl SweepAxis {
    /// The name used on the command line and in files.
    pub fn name(self) -> &'static str {
        match self {
            SweepAxis::Turntable => "turntable",
            SweepAxis::Roll => "roll",
        }
    }
}

/// Most steps a sweep may have.
pub const MAX_STEPS: u32 = 3600;

/// Surface probes a roll sweep follows.
pub const PROBES: usize = 512;

/// What a sweep does: `steps` evenly spaced angles from 0 up to (not including) `degrees`.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct SweepSettings {
    /// The rotation.
    pub axis: SweepAxis,
    /// Number of steps, 1..=[`MAX_STEPS`].
    pub steps: u32,
    /// The angle covered, degrees, 0 < degrees <= 360.
    pub degrees: f32,
}

impl Default for SweepSettings {
    fn default() -> Self {
        SweepSettings {
            axis: SweepAxis::Turntable,
            steps: 72,
            degrees: 360.0,
        }
    }
}

/// What one step measured. Panel pairs are (Gouraud, Phong).
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize)]
pub struct SweepStep {
    /// Step index from 0.
    pub step: u32,
    /// The angle of this step, degrees from the scene's own orientation.
    pub angle_deg: f32,
    /// Peak relative luminance Y (0..=1) of the covered pixels of each panel.
    pub peak_luminance: [f64; 2],
    /// Mean dE00 of the scene's compared pair over covered pixels.
    pub de00_mean: f64,
    /// 95th-percentile dE00 of the compared pair.
    pub de00_p95: f64,
    /// Share of covered pixels above the dE00 threshold.
    pub share_above_threshold: f64,
    /// Lighting evaluations of the per-vertex path (lit render vertices).
    pub lit_vertices: u64,
    /// Lighting evaluations of the per-pixel path (shaded pixels).
    pub lit_pixels: u64,
    /// Roll: probes visible at this step (0 for turntable sweeps).
    pub probes_visible: u32,
    /// Roll: the largest change, against step 0, of a probe's linear luminance, per panel,
    /// over probes visible at both steps (0 for turntable sweeps).
    pub probe_change: [f64; 2],
}

/// What a whole sweep measured. Panel pairs are (Gouraud, Phong).
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct SweepSummary {
    /// The sweep's settings.
    pub settings: SweepSettings,
    /// Steps measured.
    pub steps_done: u32,
    /// The compared pair of the dE00 figures.
    pub pair: [ShadingMode; 2],
    /// Mean of the per-step peak luminance.
    pub peak_mean: [f64; 2],
    /// Lowest per-step peak luminance.
    pub peak_min: [f64; 2],
    /// Highest per-step peak luminance.
    pub peak_max: [f64; 2],
    /// Highlight stability: coefficient of variation (population standard deviation / mean)
    /// of the peak luminance across the sweep; 0 = perfectly steady.
    pub highlight_cov: [f64; 2],
    /// Mean over steps of the mean dE00.
    pub de00_mean: f64,
    /// Highest per-step 95th-percentile dE00.
    pub de00_p95_max: f64,
    /// Roll only: orientation variance, the largest change (max - min) of a probe's linear
    /// luminance across all roll angles, over probes visible at every step.
    pub orientation_variance: Option<[f64; 2]>,
    /// Roll only: probes visible at every step.
    pub probes_tracked: u32,
}

/// Steps [`Sweep::run_with`] hands its measuring function at a time.
const RUN_CHUNK: u32 = 16;

/// Measures a range of a sweep's steps and returns them in step order (see
/// [`Sweep::run_with`]): how a caller spreads steps over threads, each with its own
/// workbench.
pub type StepMap<'a> =
    dyn FnMut(&Sweep, std::ops::Range<u32>) -> Vec<Result<Measured, AnalysisError>> + 'a;

/// One step measured by [`Sweep::measure`], waiting for [`Sweep::record`].
#[derive(Clone, Debug)]
pub struct Measured {
    step: SweepStep,
    values: Vec<[f32; 2]>,
    triangles: u64,
}

/// A sweep in progress: the base scene, the steps measured so far and the probes followed.
pub struct Sweep {
    settings: SweepSettings,
    base: ValidScene,
    records: Vec<SweepStep>,
    triangles: u64,
    points: Vec<SurfacePoint>,
    first: Vec<[f32; 2]>,
    lo: Vec<[f32; 2]>,
    hi: Vec<[f32; 2]>,
    values: Vec<[f32; 2]>,
}

impl Sweep {
    /// Prepares a sweep of `scene` (its orientation is angle 0).
    ///
    /// # Errors
    /// When the settings are out of range.
    pub fn new(scene: &ValidScene, settings: SweepSettings) -> Result<Sweep, AnalysisError> {
        if !(1..=MAX_STEPS).contains(&settings.steps) {
            return Err(AnalysisError::Settings(format!(
                "a sweep has 1 to {MAX_STEPS} steps, not {}",
                settings.steps
            )));
        }
        if !(settings.degrees > 0.0 && settings.degrees <= 360.0) {
            return Err(AnalysisError::Settings(format!(
                "a sweep covers more than 0 and at most 360 degrees, not {}",
                settings.degrees
            )));
        }
        Ok(Sweep {
            settings,
            base: scene.clone(),
            records: Vec::with_capacity(settings.steps as usize),
            triangles: 0,
            points: vec![],
            first: vec![],
            lo: vec![],
            hi: vec![],
            values: vec![],
        })
    }

    /// The settings.
    pub fn settings(&self) -> SweepSettings {
        self.settings
    }

    /// The angle of step `i`, degrees.
    pub fn angle(&self, i: u32) -> f32 {
        self.settings.degrees * i as f32 / self.settings.steps as f32
    }

    /// Writes the scene of step `i` into `scene` (a copy of the base scene turned or rolled).
    fn pose(base: &ValidScene, settings: SweepSettings, i: u32, scene: &mut ValidScene) {
        let angle = settings.degrees * i as f32 / settings.steps as f32;
        match settings.axis {
            SweepAxis::Turntable => {
                scene.set_rotation(base.rotation_quat() * axis_angle(glam::Vec3::Y, angle));
            }
            SweepAxis::Roll => {
                let r = base.camera.roll_deg + angle;
                // Kept in -180..=180 so the page's roll control can show it.
                scene.set_roll(if r > 180.0 { r - 360.0 } else { r });
            }
        }
    }

    /// The scene at step `i` (clamped to the last step): what the page shows when a point of
    /// the plot is picked.
    pub fn scene_at(&self, i: u32) -> ValidScene {
        let mut s = self.base.clone();
        Self::pose(
            &self.base,
            self.settings,
            i.min(self.settings.steps - 1),
            &mut s,
        );
        s
    }

    /// Steps measured so far.
    pub fn steps(&self) -> &[SweepStep] {
        &self.records
    }

    /// True when every step is measured.
    pub fn is_done(&self) -> bool {
        self.records.len() as u32 >= self.settings.steps
    }

    /// Renders and measures the next step with `bench`; returns it, or `None` when done.
    ///
    /// # Errors
    /// When the scene cannot be rendered (e.g. a mesh file that was not supplied).
    pub fn run_step(&mut self, bench: &mut Workbench) -> Result<Option<&SweepStep>, AnalysisError> {
        if self.is_done() {
            return Ok(None);
        }
        self.prepare(bench)?;
        let i = self.records.len() as u32;
        // The probe values' buffer is kept between steps (no allocation per step).
        let mut values = std::mem::take(&mut self.values);
        let measured = self.measure_into(bench, i, &mut values);
        let result = measured.map(|(rec, triangles)| self.record_values(rec, &values, triangles));
        self.values = values;
        result?;
        Ok(self.records.last())
    }

    /// Finds the probes a roll sweep follows (on the surface seen at step 0), once; nothing
    /// for a turntable. [`Sweep::run_step`] calls it; call it before [`Sweep::measure`].
    ///
    /// # Errors
    /// When the scene cannot be rendered.
    pub fn prepare(&mut self, bench: &mut Workbench) -> Result<(), AnalysisError> {
        if self.settings.axis == SweepAxis::Roll
            && self.records.is_empty()
            && self.points.is_empty()
        {
            let mut first = self.base.clone();
            Self::pose(&self.base, self.settings, 0, &mut first);
            self.points = bench.surface_points(&first, PROBES)?;
        }
        Ok(())
    }

    /// Renders and measures step `i` with `bench`, without recording it: steps are
    /// independent, so any number of workbenches (on any threads) may measure them, and
    /// [`Sweep::record`] then takes them in step order. The figures do not depend on which
    /// workbench measured a step.
    ///
    /// # Errors
    /// When the scene cannot be rendered.
    pub fn measure(&self, bench: &mut Workbench, i: u32) -> Result<Measured, AnalysisError> {
        let mut values = Vec::new();
        let (step, triangles) = self.measure_into(bench, i, &mut values)?;
        Ok(Measured {
            step,
            values,
            triangles,
        })
    }

    /// Records the next step measured by [`Sweep::measure`] (steps must come in order).
    ///
    /// # Errors
    /// When `m` is not the next step.
    pub fn record(&mut self, m: Measured) -> Result<(), AnalysisError> {
        if m.step.step != self.records.len() as u32 {
            return Err(AnalysisError::Settings(format!(
                "sweep step {} recorded out of order (expected {})",
                m.step.step,
                self.records.len()
            )));
        }
        self.record_values(m.step, &m.values, m.triangles);
        Ok(())
    }

    /// Runs every remaining step through `map`, which measures a range of steps (with
    /// [`Sweep::measure`], on as many workbenches and threads as it likes) and returns them in
    /// step order; `progress(done, total)` is called after each range. The result equals
    /// [`Sweep::run`]'s, step for step.
    ///
    /// # Errors
    /// The first step that could not be measured.
    pub fn run_with(
        &mut self,
        bench: &mut Workbench,
        map: &mut StepMap<'_>,
        mut progress: impl FnMut(u32, u32),
    ) -> Result<(), AnalysisError> {
        self.prepare(bench)?;
        while !self.is_done() {
            let from = self.records.len() as u32;
            let to = (from + RUN_CHUNK).min(self.settings.steps);
            for m in map(self, from..to) {
                self.record(m?)?;
            }
            progress(self.records.len() as u32, self.settings.steps);
        }
        Ok(())
    }

    /// Triangles drawn per panel at the last step recorded.
    pub fn triangles(&self) -> u64 {
        self.triangles
    }

    /// Renders step `i` and measures it; the probe values land in `values`.
    fn measure_into(
        &self,
        bench: &mut Workbench,
        i: u32,
        values: &mut Vec<[f32; 2]>,
    ) -> Result<(SweepStep, u64), AnalysisError> {
        let mut scene = self.base.clone();
        Self::pose(&self.base, self.settings, i, &mut scene);
        let report = *bench.render(&scene)?;
        let rec = SweepStep {
            step: i,
            angle_deg: self.angle(i),
            peak_luminance: [
                peak_luminance(bench.framebuffer(Panel::PerVertex)),
                peak_luminance(bench.framebuffer(Panel::PerPixel)),
            ],
            de00_mean: report.metrics.de00.mean,
            de00_p95: report.metrics.de00.p95,
            share_above_threshold: report.metrics.share_above_threshold,
            lit_vertices: report.lighting.per_vertex,
            lit_pixels: report.lighting.per_pixel,
            ..SweepStep::default()
        };
        values.clear();
        if self.settings.axis == SweepAxis::Roll {
            bench.sample_surface(&scene, &self.points, values)?;
        }
        Ok((rec, report.triangles))
    }

    /// Appends a measured step, following the probes (roll) from the first step's values.
    fn record_values(&mut self, mut rec: SweepStep, values: &[[f32; 2]], triangles: u64) {
        if self.settings.axis == SweepAxis::Roll {
            if rec.step == 0 {
                self.first = values.to_vec();
                self.lo = values.to_vec();
                self.hi = values.to_vec();
            }
            let mut change = [0.0f64; 2];
            for (k, v) in values.iter().enumerate() {
                let seen = v[0].is_finite();
                if seen {
                    rec.probes_visible += 1;
                }
                for p in 0..2 {
                    let (v, f) = (v[p], self.first[k][p]);
                    if seen && f.is_finite() {
                        change[p] = change[p].max(f64::from((v - f).abs()));
                    }
                    // A probe hidden at any step drops out of the summary (NaN sticks).
                    self.lo[k][p] = if seen { self.lo[k][p].min(v) } else { f32::NAN };
                    self.hi[k][p] = if seen { self.hi[k][p].max(v) } else { f32::NAN };
                }
            }
            rec.probe_change = change;
        }
        self.triangles = triangles;
        self.records.push(rec);
    }

    /// Runs every remaining step, calling `progress(done, total)` after each.
    ///
    /// # Errors
    /// As [`Sweep::run_step`].
    pub fn run(
        &mut self,
        bench: &mut Workbench,
        mut progress: impl FnMut(u32, u32),
    ) -> Result<(), AnalysisError> {
        while self.run_step(bench)?.is_some() {
            progress(self.records.len() as u32, self.settings.steps);
        }
        Ok(())
    }

    /// The summary of the steps measured so far.
    pub fn summary(&self) -> SweepSummary {
        let n = self.records.len();
        let mut s = SweepSummary {
            settings: self.settings,
            steps_done: n as u32,
            pair: self.base.difference.pair,
            peak_min: [f64::INFINITY; 2],
            ..SweepSummary::default()
        };
        if n == 0 {
            s.peak_min = [0.0; 2];
            return s;
        }
        for p in 0..2 {
            let peaks = self.records.iter().map(|r| r.peak_luminance[p]);
            let mean = peaks.clone().sum::<f64>() / n as f64;
            let var = peaks.clone().map(|v| (v - mean) * (v - mean)).sum::<f64>() / n as f64;
            s.peak_mean[p] = mean;
            s.peak_min[p] = peaks.clone().fold(f64::INFINITY, f64::min);
            s.peak_max[p] = peaks.fold(0.0, f64::max);
            s.highlight_cov[p] = if mean > 0.0 {
                libm::sqrt(var) / mean
            } else {
                0.0
            };
        }
        s.de00_mean = self.records.iter().map(|r| r.de00_mean).sum::<f64>() / n as f64;
        s.de00_p95_max = self.records.iter().map(|r| r.de00_p95).fold(0.0, f64::max);
        if self.settings.axis == SweepAxis::Roll {
            let mut var = [0.0f64; 2];
            let mut tracked = 0;
            for (lo, hi) in self.lo.iter().zip(&self.hi) {
                if lo[0].is_finite() && lo[1].is_finite() {
                    tracked += 1;
                    for p in 0..2 {
                        var[p] = var[p].max(f64::from(hi[p] - lo[p]));
                    }
                }
            }
            s.orientation_variance = Some(var);
            s.probes_tracked = tracked;
        }
        s
    }

    /// The steps as CSV: a header line, then one line per step.
    pub fn to_csv(&self) -> String {
        let mut out = String::from(
            "step,angle_deg,peak_luminance_per_vertex,peak_luminance_per_pixel,de00_mean,de00_p95,\
share_above_threshold,probes_visible,probe_change_per_vertex,probe_change_per_pixel,lit_vertices,lit_pixels\n",
        );
        for r in &self.records {
            out.push_str(&format!(
                "{},{},{:.6},{:.6},{:.6},{:.6},{:.6},{},{:.6},{:.6},{},{}\n",
                r.step,
                r.angle_deg,
                r.peak_luminance[0],
                r.peak_luminance[1],
                r.de00_mean,
                r.de00_p95,
                r.share_above_threshold,
                r.probes_visible,
                r.probe_change[0],
                r.probe_change[1],
                r.lit_vertices,
                r.lit_pixels,
            ));
        }
        out
    }

    /// A plot of `metric` against the angle, one line per panel (or the compared pair's
    /// dE00), with step `current` marked; every step is pickable.
    pub fn plot(&self, metric: SweepMetric, current: Option<u32>) -> Plot {
        let axis = match self.settings.axis {
            SweepAxis::Turntable => "Turntable angle (degrees)",
            SweepAxis::Roll => "View roll (degrees)",
        };
        let line = |name: &str, k: usize, f: &dyn Fn(&SweepStep) -> f64| Series {
            name: name.into(),
            color: PANEL_COLORS[k],
            dashed: k == 1,
            points: self
                .records
                .iter()
                .map(|r| (f64::from(r.angle_deg), f(r)))
                .collect(),
        };
        let (title, y_label, series, h_rules) = match metric {
            SweepMetric::PeakLuminance => (
                "Highlight peak per panel",
                "peak luminance Y",
                vec![
                    line("Per-vertex (Gouraud)", 0, &|r| r.peak_luminance[0]),
                    line("Per-pixel (Phong)", 1, &|r| r.peak_luminance[1]),
                ],
                vec![],
            ),
            SweepMetric::De00 => (
                "Difference between the panels",
                "dE00",
                vec![
                    line("p95", 0, &|r| r.de00_p95),
                    line("mean", 1, &|r| r.de00_mean),
                ],
                vec![Rule {
                    at: f64::from(self.base.difference.threshold),
                    label: format!("threshold {}", self.base.difference.threshold),
                }],
            ),
            SweepMetric::ProbeChange => (
                "Change at fixed surface points",
                "largest change of Y",
                vec![
                    line("Per-vertex (Gouraud)", 0, &|r| r.probe_change[0]),
                    line("Per-pixel (Phong)", 1, &|r| r.probe_change[1]),
                ],
                vec![Rule {
                    at: 1.0 / 255.0,
                    label: "1/255".into(),
                }],
            ),
        };
        Plot {
            title: title.into(),
            x_label: axis.into(),
            y_label: y_label.into(),
            x_range: Some((0.0, f64::from(self.settings.degrees))),
            x_log: false,
            series,
            h_rules,
            v_rules: vec![],
            picks: self
                .records
                .iter()
                .map(|r| f64::from(r.angle_deg))
                .collect(),
            current: current.map(|c| c as usize),
        }
    }
}

/// What a sweep plot shows.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum SweepMetric {
    /// Peak luminance of each panel.
    #[default]
    PeakLuminance,
    /// Mean and 95th-percentile dE00 between the compared panels.
    De00,
    /// Roll: the largest change at fixed surface points, per panel.
    ProbeChange,
}

/// Peak relative luminance Y of a panel's covered pixels (0 when none is covered).
pub fn peak_luminance(fb: &Framebuffer) -> f64 {
    let mut last = 0u32;
    let mut peak = 0.0f64;
    for (i, &px) in fb.pixels().iter().enumerate() {
        // Runs of one colour are common; a pixel like its left neighbour is not converted.
        if px != last && fb.covered(i) {
            let [r, g, b, _] = px.to_le_bytes();
            let y = luminance([r, g, b]);
            if y > peak {
                peak = y;
            }
            last = px;
        }
    }
    peak
}
