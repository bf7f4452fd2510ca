//! The tessellation advisor: how many vertices per-vertex lighting needs before it cannot be
//! told from per-pixel lighting, for the current material, lights and view.
//!
//! It walks a ladder of ever finer versions of the mesh: a procedural shape's own resolution
//! (icosphere level, rings and segments, grid cells), or subdivision levels of any other mesh
//! (midpoint or PN triangles, [`crate::geometry::subdivide`]). At each rung a turntable sweep measures
//! the per-vertex panel against the per-pixel panel at every sampled angle, so one lucky angle does
//! not decide; a rung passes when the 95th-percentile dE00 stays under the threshold at every
//! angle. The advice is the first passing rung, with its cost in lighting evaluations (lit
//! vertices per frame) beside the per-pixel path's (lit pixels per frame at the current view).
//!
//! Like a sweep, the advisor runs one frame per call so the page can work in slices; it stops
//! one rung after the first pass (to show the curve flattening), at the triangle limit, or at
//! the end of the ladder.

use crate::analysis::error::AnalysisError;
use crate::analysis::report::LitWith;
use crate::analysis::sweep::{StepMap, Sweep, SweepAxis, SweepSettings};
use crate::analysis::workbench::Workbench;
use crate::draw::plot::{Plot, Rule, Series, PANEL_COLORS};
use crate::geometry::mesh::MAX_TRIANGLES;
use crate::geometry::shapes::Shape;
use crate::geometry::subdivide::{Subdivision, SubdivisionMethod, MAX_LEVELS};
use crate::scene::definition::{Scene, ValidScene};
use crate::scene::settings::DifferenceSettings;
use crate::scene::settings::MeshSource;
use crate::scene::settings::ShadingMode;
use serde::{Deserialize, Serialize};

/// What the advisor is asked.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct AdviceSettings {
    /// The dE00 the per-vertex panel's 95th percentile must stay under (the difference view's
    /// threshold by default: 1.0, common practice for "just noticeable").
    pub threshold: f32,
    /// Turntable steps per rung, 1..=360.
    pub steps: u32,
    /// Subdivision for meshes without a resolution parameter (files, the cube).
    pub method: SubdivisionMethod,
}

impl Default for AdviceSettings {
    fn default() -> Self {
        AdviceSettings {
            threshold: DifferenceSettings::default().threshold,
            steps: 24,
            method: SubdivisionMethod::Midpoint,
        }
    }
}

/// One rung of the ladder as measured.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Rung {
    /// What this rung is, in words ("icosphere level 3", "2 levels of PN triangles").
    pub label: String,
    /// The mesh of this rung (the scene's `mesh` field).
    pub mesh: MeshSource,
    /// The subdivision of this rung (the scene's `subdivision` field).
    pub subdivision: Subdivision,
    /// Lit vertices per frame: the per-vertex path's lighting evaluations.
    pub vertices: u64,
    /// Triangles drawn.
    pub triangles: u64,
    /// Largest 95th-percentile dE00 (per-vertex against per-pixel) over the sampled angles.
    pub worst_p95: f64,
    /// The turntable angle of the worst step, degrees.
    pub worst_angle_deg: f32,
    /// Mean over the angles of the 95th-percentile dE00.
    pub mean_p95: f64,
    /// Mean lit pixels per frame: the per-pixel path's lighting evaluations.
    pub pixels: f64,
    /// True when `worst_p95` is under the threshold.
    pub passes: bool,
}

/// The advisor's answer.
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct Advice {
    /// The settings used.
    pub settings: AdviceSettings,
    /// Panel size the costs refer to.
    pub view: [u32; 2],
    /// The rungs measured, coarsest first.
    pub rungs: Vec<Rung>,
    /// Index into `rungs` of the advised one: the first that passes.
    pub advised: Option<usize>,
    /// The per-pixel path's lighting evaluations for the scene as given (lit pixels in the
    /// current view).
    pub current_pixels: u64,
    /// The per-vertex path's lighting evaluations for the scene as given.
    pub current_vertices: u64,
    /// Why the ladder ended without a passing rung, if it did.
    pub note: Option<String>,
    /// What lit the scene as given (its material and exposure): the advice is about it.
    pub lit_with: LitWith,
    /// The same in words ("Lit with ...", see [`LitWith::describe`]).
    pub lit_with_text: String,
}

impl Default for Rung {
    fn default() -> Self {
        Rung {
            label: String::new(),
            mesh: MeshSource::Shape(Shape::default()),
            subdivision: Subdivision::default(),
            vertices: 0,
            triangles: 0,
            worst_p95: 0.0,
            worst_angle_deg: 0.0,
            mean_p95: 0.0,
            pixels: 0.0,
            passes: false,
        }
    }
}

/// A rung before it is measured: the scene to sweep and its label.
struct Candidate {
    scene: ValidScene,
    label: String,
}

/// The ladder of finer versions of `scene`'s mesh.
fn ladder(scene: &ValidScene, method: SubdivisionMethod) -> Vec<Candidate> {
    rungs(scene, method).into_iter().flatten().collect()
}

fn rungs(scene: &ValidScene, method: SubdivisionMethod) -> Vec<Option<Candidate>> {
    // Every rung stays within the ranges a scene allows (resolutions clamped below, levels up
    // to MAX_LEVELS), so `edit` refuses none; one that it did refuse would be left out.
    let with = |mesh: MeshSource, sub: Subdivision, label: String| {
        scene
            .edit(|s| {
                s.mesh = mesh;
                s.subdivision = sub;
            })
            .ok()
            .map(|scene| Candidate { scene, label })
    };
    let shape = |s: Shape, label: String| with(MeshSource::Shape(s), Subdivision::default(), label);
    // Steps of about 1.5x in resolution (about 2.25x in vertices).
    const STEPS: [u32; 16] = [
        2, 3, 4, 6, 8, 12, 16, 24, 32, 48, 64, 96, 128, 192, 256, 512,
    ];
    let ratio = |a: u32, b: u32| b as f32 / a.max(1) as f32;
    match &scene.mesh {
        MeshSource::Shape(Shape::Icosphere { .. }) => (0..=7)
            .map(|level| {
                shape(
                    Shape::Icosphere { level },
                    format!("icosphere level {level}"),
                )
            })
            .collect(),
        MeshSource::Shape(
            original @ (Shape::UvSphere { rings, segments } | Shape::Vase { rings, segments }),
        ) => {
            // Rings up the ladder, segments keeping the shape's own proportion.
            let k = ratio(*rings, *segments);
            STEPS
                .iter()
                .filter(|&&r| (2..=256).contains(&r))
                .map(|&r| {
                    let s = ((r as f32 * k).round() as u32).clamp(3, 512);
                    let (rings, segments) = (r, s);
                    let next = match original {
                        Shape::Vase { .. } => Shape::Vase { rings, segments },
                        _ => Shape::UvSphere { rings, segments },
                    };
                    shape(next, format!("{} {r} x {s}", original.name()))
                })
                .collect()
        }
        MeshSource::Shape(Shape::Torus { rings, segments }) => {
            let k = ratio(*segments, *rings);
            STEPS
                .iter()
                .filter(|&&s| (3..=256).contains(&s))
                .map(|&s| {
                    let r = ((s as f32 * k).round() as u32).clamp(3, 512);
                    shape(
                        Shape::Torus {
                            rings: r,
                            segments: s,
                        },
                        format!("torus {r} x {s}"),
                    )
                })
                .collect()
        }
        MeshSource::Shape(Shape::QuadGrid { .. }) => [1, 2, 4, 8, 16, 32, 64, 128, 256, 512]
            .into_iter()
            .map(|c| shape(Shape::QuadGrid { cells: c }, format!("{c} x {c} grid")))
            .collect(),
        MeshSource::Shape(Shape::Cube) | MeshSource::File { .. } => {
            let name = match method {
                SubdivisionMethod::Midpoint => "midpoint",
                SubdivisionMethod::PnTriangles => "PN triangles",
            };
            (0..=MAX_LEVELS)
                .map(|levels| {
                    with(
                        scene.mesh.clone(),
                        Subdivision { method, levels },
                        if levels == 0 {
                            "as authored".to_string()
                        } else {
                            format!("{levels} x {name}")
                        },
                    )
                })
                .collect()
        }
    }
}

/// An advice in progress.
pub struct Advisor {
    settings: AdviceSettings,
    base: ValidScene,
    candidates: Vec<Candidate>,
    next: usize,
    sweep: Option<Sweep>,
    advice: Advice,
    started: bool,
    done: bool,
}

impl Advisor {
    /// Prepares advice for `scene` (its view, lights and material; its orientation is the
    /// turntable's angle 0).
    ///
    /// # Errors
    /// When the scene or the settings are invalid.
    pub fn new(scene: &ValidScene, settings: AdviceSettings) -> Result<Advisor, AnalysisError> {
        if !(settings.threshold > 0.0 && settings.threshold <= 100.0) {
            return Err(AnalysisError::Settings(format!(
                "the threshold must be more than 0 and at most 100 dE00, not {}",
                settings.threshold
            )));
        }
        if !(1..=360).contains(&settings.steps) {
            return Err(AnalysisError::Settings(format!(
                "advice sweeps 1 to 360 angles per level, not {}",
                settings.steps
            )));
        }
        // The threshold was checked above to lie in the range a scene allows.
        let base = scene
            .edit(|s| {
                s.difference.pair = [ShadingMode::PerVertex, ShadingMode::PerPixel];
                s.difference.threshold = settings.threshold;
            })
            .map_err(|e| AnalysisError::Settings(e.to_string()))?;
        let candidates = ladder(&base, settings.method);
        Ok(Advisor {
            settings,
            advice: Advice {
                settings,
                view: [scene.panel.width, scene.panel.height],
                ..Advice::default()
            },
            base,
            candidates,
            next: 0,
            sweep: None,
            started: false,
            done: false,
        })
    }

    /// Frames to render at most (rungs x steps, plus one for the scene as given).
    pub fn total_frames(&self) -> u32 {
        1 + self.candidates.len() as u32 * self.settings.steps
    }

    /// Frames rendered so far.
    pub fn frames_done(&self) -> u32 {
        if self.done {
            return self.total_frames();
        }
        u32::from(self.started)
            + self.advice.rungs.len() as u32 * self.settings.steps
            + self.sweep.as_ref().map_or(0, |s| s.steps().len() as u32)
    }

    /// True when the advice is complete.
    pub fn is_done(&self) -> bool {
        self.done
    }

    /// The advice so far (complete once [`Advisor::is_done`]).
    pub fn advice(&self) -> &Advice {
        &self.advice
    }

    /// The scene of rung `i` in the orientation of the scene as given, or `None`.
    pub fn rung_scene(&self, i: usize) -> Option<ValidScene> {
        self.candidates.get(i).map(|c| c.scene.clone())
    }

    /// Renders one frame of the advice with `bench`; false once the advice is complete.
    ///
    /// # Errors
    /// When the scene cannot be rendered (e.g. a mesh file that was not supplied).
    pub fn run_step(&mut self, bench: &mut Workbench) -> Result<bool, AnalysisError> {
        self.advance(bench, None)
    }

    /// Runs to completion like [`Advisor::run`], each level's turntable measured through
    /// `map` (see [`Sweep::run_with`]: steps spread over threads); the advice is the same.
    ///
    /// # Errors
    /// As [`Advisor::run_step`].
    pub fn run_with(
        &mut self,
        bench: &mut Workbench,
        map: &mut StepMap<'_>,
        mut progress: impl FnMut(u32, u32),
    ) -> Result<(), AnalysisError> {
        while self.advance(bench, Some(&mut *map))? {
            progress(self.frames_done(), self.total_frames());
        }
        progress(self.total_frames(), self.total_frames());
        Ok(())
    }

    /// One frame of the advice, or with `map` the whole turntable of the current level.
    fn advance(
        &mut self,
        bench: &mut Workbench,
        map: Option<&mut StepMap<'_>>,
    ) -> Result<bool, AnalysisError> {
        if self.done {
            return Ok(false);
        }
        if !self.started {
            let r = *bench.render(&self.base)?;
            self.advice.current_pixels = r.lighting.per_pixel;
            self.advice.current_vertices = r.lighting.per_vertex;
            self.advice.lit_with = r.lit_with;
            self.advice.lit_with_text = format!("Lit with {}", r.lit_with.describe());
            self.started = true;
            return Ok(true);
        }
        if self.sweep.is_none() {
            let Some(c) = self.candidates.get(self.next) else {
                self.finish(None);
                return Ok(false);
            };
            // Refuse a rung past the triangle limit before building it.
            if let Err(e) = bench.prepare(&c.scene) {
                self.finish(Some(format!("stopped before {}: {e}", c.label)));
                return Ok(false);
            }
            let settings = SweepSettings {
                axis: SweepAxis::Turntable,
                steps: self.settings.steps,
                degrees: 360.0,
            };
            self.sweep = Some(Sweep::new(&c.scene, settings)?);
        }
        let Some(sweep) = self.sweep.as_mut() else {
            return Ok(false);
        };
        match map {
            Some(map) => sweep.run_with(bench, map, |_, _| {})?,
            None => {
                sweep.run_step(bench)?;
            }
        }
        if sweep.is_done() {
            let steps = sweep.steps();
            let n = steps.len().max(1) as f64;
            let worst = steps
                .iter()
                .max_by(|a, b| a.de00_p95.total_cmp(&b.de00_p95))
                .copied()
                .unwrap_or_default();
            let c = &self.candidates[self.next];
            let rung = Rung {
                label: c.label.clone(),
                mesh: c.scene.mesh.clone(),
                subdivision: c.scene.subdivision,
                vertices: steps.first().map_or(0, |s| s.lit_vertices),
                triangles: sweep.triangles(),
                worst_p95: worst.de00_p95,
                worst_angle_deg: worst.angle_deg,
                mean_p95: steps.iter().map(|s| s.de00_p95).sum::<f64>() / n,
                pixels: steps.iter().map(|s| s.lit_pixels as f64).sum::<f64>() / n,
                passes: worst.de00_p95 < f64::from(self.settings.threshold),
            };
            let passed_before = self.advice.advised.is_some();
            if rung.passes && !passed_before {
                self.advice.advised = Some(self.advice.rungs.len());
            }
            self.advice.rungs.push(rung);
            self.sweep = None;
            self.next += 1;
            // One rung past the first pass shows where the curve goes; then stop.
            if passed_before {
                self.finish(None);
                return Ok(false);
            }
            let over = self
                .candidates
                .get(self.next)
                .is_some_and(|c| exceeds_limit(&c.scene));
            if over {
                self.finish(Some(format!(
                    "the next level would exceed {MAX_TRIANGLES} triangles"
                )));
                return Ok(false);
            }
        }
        Ok(true)
    }

    /// Runs to completion, calling `progress(done, total)` after each frame.
    ///
    /// # Errors
    /// As [`Advisor::run_step`].
    pub fn run(
        &mut self,
        bench: &mut Workbench,
        mut progress: impl FnMut(u32, u32),
    ) -> Result<(), AnalysisError> {
        while self.run_step(bench)? {
            progress(self.frames_done(), self.total_frames());
        }
        progress(self.total_frames(), self.total_frames());
        Ok(())
    }

    fn finish(&mut self, note: Option<String>) {
        self.done = true;
        if self.advice.advised.is_none() {
            self.advice.note = Some(note.unwrap_or_else(|| {
                "no level of the ladder stays under the threshold at every angle".into()
            }));
        }
    }

    /// The plot: worst p95 dE00 per rung against its lit vertices (log scale), the threshold,
    /// and the per-pixel path's lit pixels at the current view; each rung is pickable.
    pub fn plot(&self, current: Option<usize>) -> Plot {
        let a = &self.advice;
        let point = |r: &Rung| (r.vertices as f64, r.worst_p95);
        let mut series = vec![Series {
            name: "worst p95 per level".into(),
            color: PANEL_COLORS[0],
            dashed: false,
            points: a.rungs.iter().map(point).collect(),
        }];
        if let Some(i) = a.advised {
            series.push(Series {
                name: "advised level".into(),
                color: PANEL_COLORS[1],
                dashed: false,
                points: vec![point(&a.rungs[i])],
            });
        }
        Plot {
            title: "Error against lighting cost per level".into(),
            x_label: "lighting evaluations per frame (log)".into(),
            y_label: "worst p95 dE00 over the turn".into(),
            x_range: None,
            x_log: true,
            series,
            h_rules: vec![Rule {
                at: f64::from(self.settings.threshold),
                label: format!("threshold {}", self.settings.threshold),
            }],
            v_rules: if a.current_pixels > 0 {
                vec![Rule {
                    at: a.current_pixels as f64,
                    label: format!("per-pixel: {}", a.current_pixels),
                }]
            } else {
                vec![]
            },
            picks: a.rungs.iter().map(|r| r.vertices.max(1) as f64).collect(),
            current,
        }
    }
}

/// True when a shape rung would be over the triangle limit, estimated without building it.
/// File meshes are checked when the rung is prepared ([`Workbench::prepare`]).
fn exceeds_limit(scene: &Scene) -> bool {
    let shape_tris = |s: &Shape| -> u64 {
        match *s {
            Shape::Icosphere { level } => 20 * 4u64.pow(level.min(12)),
            Shape::UvSphere { rings, segments } | Shape::Vase { rings, segments } => {
                2 * u64::from(rings) * u64::from(segments)
            }
            Shape::Torus { rings, segments } => 2 * u64::from(rings) * u64::from(segments),
            Shape::QuadGrid { cells } => 2 * u64::from(cells) * u64::from(cells),
            Shape::Cube => 12,
        }
    };
    match &scene.mesh {
        MeshSource::Shape(s) => {
            shape_tris(s) * 4u64.pow(scene.subdivision.levels.min(12)) > MAX_TRIANGLES as u64
        }
        MeshSource::File { .. } => false,
    }
}
