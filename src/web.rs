//! The WebAssembly boundary: the only file that talks to JavaScript.
//!
//! One [`Viewer`] owns the scene, the renderer and the panels' framebuffers, all in wasm
//! memory for the page's lifetime. JavaScript asks for a render, then wraps each panel's
//! pixels (a view of wasm memory at `panel_ptr`) as ImageData once per frame: no call per
//! pixel or per triangle crosses the boundary. A scene the page sends is validated whole; a
//! bad one raises a JavaScript `Error` and leaves the previous scene in place.

use crate::analysis::advisor::{AdviceSettings, Advisor};
use crate::analysis::measure::Comparer;
use crate::analysis::report::Panel;
use crate::analysis::sweep::{Sweep, SweepAxis, SweepMetric, SweepSettings, MAX_STEPS};
use crate::analysis::workbench::Workbench;
use crate::geometry::shapes::{DetailControl, Shape};
use crate::geometry::subdivide::{SubdivisionMethod, MAX_LEVELS};
use crate::scene::definition::{Scene, ValidScene};
use crate::scene::formats::{revision_notice, RENDERER_REVISION};
use crate::scene::settings::{MaterialSource, MeshSource, ShadingMode, MAX_PANEL_SIDE};
use crate::shading::lighting::{
    blinn_exponent_for_roughness, roughness_for_blinn_exponent, ReflectionModel, MIN_ROUGHNESS,
};
use wasm_bindgen::prelude::*;

fn js_error(msg: impl std::fmt::Display) -> JsValue {
    js_sys::Error::new(&msg.to_string()).into()
}

/// The panels in the order `panel_ptr` numbers them, with the names the page uses for them
/// (its canvases' `data-panel`).
const PANELS: [(Panel, &str); 4] = [
    (Panel::PerVertex, "per_vertex"),
    (Panel::PerPixel, "per_pixel"),
    (Panel::Difference, "difference"),
    (Panel::Exact, "exact"),
];

/// A choice named by the page (`"roll"`, `"de00"`, ...) as the enum whose serde name it is;
/// an unknown name is an error naming `what`.
fn choice<T: serde::de::DeserializeOwned>(what: &str, name: &str) -> Result<T, JsValue> {
    serde_json::from_value(serde_json::Value::String(name.to_string()))
        .map_err(|_| js_error(format!("no {what} '{name}'")))
}

/// The serde names of enum values, for the page's lists.
fn names<T: serde::Serialize>(values: &[T]) -> Vec<String> {
    values
        .iter()
        .filter_map(|v| match serde_json::to_value(v) {
            Ok(serde_json::Value::String(s)) => Some(s),
            _ => None,
        })
        .collect()
}

fn to_js(value: &impl serde::Serialize) -> Result<JsValue, JsValue> {
    let ser = serde_wasm_bindgen::Serializer::json_compatible();
    value.serialize(&ser).map_err(js_error)
}

/// The page's renderer: the scene and the workbench that renders and compares its panels.
#[wasm_bindgen]
pub struct Viewer {
    scene: ValidScene,
    bench: Workbench,
    legend: Comparer,
    /// Name of the mesh file loaded into the workbench, if any.
    mesh_name: Option<String>,
    /// The sweep in progress or last finished, if any.
    sweep: Option<Sweep>,
    /// The advice in progress or last finished, if any.
    advisor: Option<Advisor>,
    /// The shading panels in the workbench show the current scene (only the comparison may
    /// be stale): a full render then only compares.
    panels_fresh: bool,
}

impl Default for Viewer {
    fn default() -> Self {
        Self::new()
    }
}

#[wasm_bindgen]
impl Viewer {
    /// A viewer with the built-in default scene.
    #[wasm_bindgen(constructor)]
    pub fn new() -> Viewer {
        #[cfg(debug_assertions)]
        console_error_panic_hook::set_once();
        Viewer {
            scene: ValidScene::default(),
            bench: Workbench::new(),
            legend: Comparer::new(),
            mesh_name: None,
            sweep: None,
            advisor: None,
            panels_fresh: false,
        }
    }

    /// The facts the page builds its controls from, so it repeats none of them: panel names
    /// in `panelPtr` order, shading modes (`id`, `label`, `short`), the shapes' detail
    /// controls, sweep axes and plot metrics, subdivision methods and levels, the largest
    /// panel side and sweep length.
    pub fn vocabulary() -> Result<JsValue, JsValue> {
        #[derive(serde::Serialize)]
        struct Mode {
            id: &'static str,
            label: &'static str,
            short: &'static str,
        }
        #[derive(serde::Serialize)]
        struct Model {
            id: &'static str,
            label: &'static str,
        }
        #[derive(serde::Serialize)]
        struct Vocabulary {
            panels: Vec<&'static str>,
            modes: Vec<Mode>,
            models: Vec<Model>,
            min_roughness: f32,
            exposure_ev: [f32; 2],
            shapes: [DetailControl; 6],
            sweep_axes: Vec<String>,
            sweep_metrics: Vec<String>,
            subdivision_methods: Vec<String>,
            subdivision_max_levels: u32,
            max_panel_side: u32,
            max_sweep_steps: u32,
        }
        to_js(&Vocabulary {
            panels: PANELS.iter().map(|p| p.1).collect(),
            modes: ShadingMode::ALL
                .iter()
                .map(|m| Mode {
                    id: m.id(),
                    label: m.label(),
                    short: m.short(),
                })
                .collect(),
            models: ReflectionModel::ALL
                .iter()
                .map(|m| Model {
                    id: m.id(),
                    label: m.label(),
                })
                .collect(),
            min_roughness: MIN_ROUGHNESS,
            exposure_ev: [
                crate::scene::definition::MIN_EXPOSURE_EV,
                crate::scene::definition::MAX_EXPOSURE_EV,
            ],
            shapes: Shape::DETAIL,
            sweep_axes: names(&[SweepAxis::Turntable, SweepAxis::Roll]),
            sweep_metrics: names(&[
                SweepMetric::PeakLuminance,
                SweepMetric::De00,
                SweepMetric::ProbeChange,
            ]),
            subdivision_methods: names(&[
                SubdivisionMethod::Midpoint,
                SubdivisionMethod::PnTriangles,
            ]),
            subdivision_max_levels: MAX_LEVELS,
            max_panel_side: MAX_PANEL_SIDE,
            max_sweep_steps: MAX_STEPS,
        })
    }

    /// The shape of `kind` at `detail` (see `Shape::from_detail`) as a scene JSON object.
    #[wasm_bindgen(js_name = shapeFromDetail)]
    pub fn shape_from_detail(kind: &str, detail: u32) -> Result<JsValue, JsValue> {
        let shape = Shape::from_detail(kind, detail)
            .ok_or_else(|| js_error(format!("no shape '{kind}'")))?;
        to_js(&shape)
    }

    /// The detail value of a shape object and its text, `[value, text]`.
    #[wasm_bindgen(js_name = shapeDetail)]
    pub fn shape_detail(shape: JsValue) -> Result<Vec<JsValue>, JsValue> {
        let shape: Shape = serde_wasm_bindgen::from_value(shape).map_err(js_error)?;
        Ok(vec![
            JsValue::from(shape.detail()),
            JsValue::from(shape.detail_text()),
        ])
    }

    /// The Blinn-Phong exponent comparable to a metallic-roughness `roughness`
    /// (n = 2 / alpha^2 - 2, alpha = roughness^2).
    #[wasm_bindgen(js_name = blinnExponentForRoughness)]
    pub fn blinn_exponent_for_roughness(roughness: f32) -> f32 {
        blinn_exponent_for_roughness(roughness)
    }

    /// The roughness comparable to a Blinn-Phong exponent (the inverse of the above).
    #[wasm_bindgen(js_name = roughnessForBlinnExponent)]
    pub fn roughness_for_blinn_exponent(n: f32) -> f32 {
        roughness_for_blinn_exponent(n)
    }

    /// The built-in default scene as JSON.
    #[wasm_bindgen(js_name = defaultSceneJson)]
    pub fn default_scene_json() -> String {
        Scene::default().to_json()
    }

    /// The current scene as a plain JavaScript object.
    pub fn scene(&self) -> Result<JsValue, JsValue> {
        let ser = serde_wasm_bindgen::Serializer::json_compatible();
        serde::Serialize::serialize(&self.scene, &ser).map_err(js_error)
    }

    /// The current scene as JSON text.
    #[wasm_bindgen(js_name = sceneJson)]
    pub fn scene_json(&self) -> String {
        self.scene.to_json()
    }

    /// Replaces the scene with a JavaScript object; validated whole, the previous scene is
    /// kept when it is refused.
    #[wasm_bindgen(js_name = setScene)]
    pub fn set_scene(&mut self, value: JsValue) -> Result<(), JsValue> {
        let scene: ValidScene = serde_wasm_bindgen::from_value(value).map_err(js_error)?;
        self.bench.prepare(&scene).map_err(js_error)?;
        self.replace_scene(scene);
        Ok(())
    }

    /// Replaces the scene with JSON text; validated whole, the previous scene is kept when
    /// it is refused.
    #[wasm_bindgen(js_name = setSceneJson)]
    pub fn set_scene_json(&mut self, text: &str) -> Result<(), JsValue> {
        let scene = Scene::from_json(text).map_err(js_error)?;
        self.bench.prepare(&scene).map_err(js_error)?;
        self.replace_scene(scene);
        Ok(())
    }

    /// The current scene as link text for the URL fragment (see `share`).
    #[wasm_bindgen(js_name = shareFragment)]
    pub fn share_fragment(&self) -> String {
        crate::scene::link::encode(&self.scene)
    }

    /// Replaces the scene with one read from link text; on failure the scene is kept and a
    /// JavaScript `Error` says what is wrong with the link. Returns a notice when the link was
    /// made under an older renderer revision (its pixels may differ), else `undefined`; the
    /// scene is then shown, and linked again, as this build's revision.
    #[wasm_bindgen(js_name = setSceneFromLink)]
    pub fn set_scene_from_link(&mut self, text: &str) -> Result<Option<String>, JsValue> {
        let scene = crate::scene::link::decode(text, self.scene.panel).map_err(js_error)?;
        if let MeshSource::File { name } = &scene.mesh {
            if self.mesh_name.as_deref() != Some(name.as_str()) {
                return Err(js_error(format!(
                    "This link shows the mesh file '{name}', which is not loaded here: drop that file on the page, then open the link again"
                )));
            }
        }
        let notice = revision_notice(scene.renderer, RENDERER_REVISION);
        let scene = scene
            .edit(|s| s.renderer = RENDERER_REVISION)
            .map_err(js_error)?;
        self.bench.prepare(&scene).map_err(js_error)?;
        self.replace_scene(scene);
        Ok(notice)
    }

    /// The files a mesh file refers to, as it names them (an OBJ's material libraries), so
    /// the page can fetch them beside a hosted mesh.
    #[wasm_bindgen(js_name = meshCompanions)]
    pub fn mesh_companions(name: &str, bytes: &[u8]) -> Vec<String> {
        crate::geometry::import::companions(name, bytes)
    }

    /// Imports a mesh file (OBJ, STL, PLY, glTF or GLB) from its bytes and shows it, with the
    /// files given with it as `[[name, Uint8Array], ...]` (an OBJ's `.mtl`). Returns its
    /// counts `{name, format, vertices, faces, triangles, dropped_faces, authored_normals,
    /// vertex_colors, materials, notes}`. On any problem a JavaScript `Error` names the file,
    /// the place and the problem, and the previous scene stays.
    #[wasm_bindgen(js_name = loadMesh)]
    pub fn load_mesh(
        &mut self,
        name: &str,
        bytes: &[u8],
        companions: Option<js_sys::Array>,
    ) -> Result<JsValue, JsValue> {
        let given: Vec<(String, Vec<u8>)> = companions
            .iter()
            .flat_map(|a| a.iter())
            .map(|pair| {
                let pair = js_sys::Array::from(&pair);
                let name = pair.get(0).as_string().unwrap_or_default();
                let bytes = js_sys::Uint8Array::new(&pair.get(1)).to_vec();
                (name, bytes)
            })
            .collect();
        let companions: Vec<crate::geometry::import::Companion> = given
            .iter()
            .map(|(name, bytes)| crate::geometry::import::Companion { name, bytes })
            .collect();
        let imported =
            crate::geometry::import::import_with(name, bytes, &companions).map_err(js_error)?;
        let info = imported.info();
        self.bench.set_file_mesh(imported.mesh);
        self.mesh_name = Some(name.to_string());
        let file = MeshSource::File {
            name: name.to_string(),
        };
        // The import refused empty names, so the scene stays valid; kept as it was otherwise.
        if let Ok(next) = self.scene.edit(|s| s.mesh = file) {
            self.scene = next;
        }
        self.panels_fresh = false; // a new file may carry an old name
        let ser = serde_wasm_bindgen::Serializer::json_compatible();
        serde::Serialize::serialize(&info, &ser).map_err(js_error)
    }

    /// The loaded mesh file's materials as `[{name, model, base_color, metallic, roughness,
    /// shininess, faces}]` (`model` is the reflection model id it is lit with, `"page"` for
    /// faces without one); empty without a file or when the file has none.
    #[wasm_bindgen(js_name = fileMaterials)]
    pub fn file_materials(&self) -> Result<JsValue, JsValue> {
        #[derive(serde::Serialize)]
        struct Shown {
            name: String,
            model: &'static str,
            base_color: String,
            metallic: f32,
            roughness: f32,
            shininess: f32,
            faces: usize,
        }
        let mesh = self.bench.file_mesh();
        let list: Vec<Shown> = mesh
            .map(|m| m.materials.as_slice())
            .unwrap_or_default()
            .iter()
            .enumerate()
            .map(|(k, fm)| {
                let (mat, model) = crate::pipeline::render::file_material(
                    fm,
                    &self.scene.material,
                    self.scene.model,
                );
                Shown {
                    name: fm.name.clone(),
                    model: match fm.reflectance {
                        crate::geometry::mesh::Reflectance::Viewer => "page",
                        _ => model.id(),
                    },
                    base_color: mat.base_color.to_string(),
                    metallic: mat.metallic,
                    roughness: mat.roughness,
                    shininess: mat.shininess,
                    faces: mesh.map_or(0, |m| {
                        m.face_material.iter().filter(|&&f| f as usize == k).count()
                    }),
                }
            })
            .collect();
        let ser = serde_wasm_bindgen::Serializer::json_compatible();
        serde::Serialize::serialize(&list, &ser).map_err(js_error)
    }

    /// Edit a copy: the loaded file's material `index` becomes the page's own material (its
    /// model, colours and terms; an OBJ highlight colour becomes its brightest component) and
    /// the page's material is used from then on, so the Surface settings edit it.
    #[wasm_bindgen(js_name = copyFileMaterial)]
    pub fn copy_file_material(&mut self, index: usize) -> Result<(), JsValue> {
        let fm = self
            .bench
            .file_mesh()
            .and_then(|m| m.materials.get(index))
            .ok_or_else(|| js_error(format!("the mesh file has no material {index}")))?;
        let (material, model) =
            crate::pipeline::render::file_material(fm, &self.scene.material, self.scene.model);
        let next = self
            .scene
            .edit(|s| {
                s.material = material;
                s.model = model;
                s.material_source = MaterialSource::Scene;
            })
            .map_err(js_error)?;
        self.replace_scene(next);
        Ok(())
    }

    /// What lit the last frame, in words: the page's material and model or the file's
    /// materials, and the exposure.
    #[wasm_bindgen(js_name = litWith)]
    pub fn lit_with(&self) -> String {
        self.bench.report().lit_with.describe()
    }

    /// The presets as `[{id, title, caption}]`.
    pub fn presets() -> Result<JsValue, JsValue> {
        let list: Vec<[&str; 3]> = crate::scene::presets::presets()
            .iter()
            .map(|p| [p.id, p.title, p.caption])
            .collect();
        let ser = serde_wasm_bindgen::Serializer::json_compatible();
        serde::Serialize::serialize(&list, &ser).map_err(js_error)
    }

    /// Loads a preset by id, keeping the panel size.
    #[wasm_bindgen(js_name = loadPreset)]
    pub fn load_preset(&mut self, id: &str) -> Result<(), JsValue> {
        let preset = crate::scene::presets::preset(id)
            .ok_or_else(|| js_error(format!("no preset '{id}'")))?;
        let mut scene = preset.scene;
        scene.panel = self.scene.panel;
        let scene = scene.validated().map_err(js_error)?;
        self.replace_scene(scene);
        Ok(())
    }

    /// Sets the panel size in device pixels.
    #[wasm_bindgen(js_name = setPanelSize)]
    pub fn set_panel_size(&mut self, width: u32, height: u32) -> Result<(), JsValue> {
        let next = self
            .scene
            .edit(|s| {
                s.panel.width = width;
                s.panel.height = height;
            })
            .map_err(js_error)?;
        self.replace_scene(next);
        Ok(())
    }

    /// Turns the mesh as a drag would: degrees about the screen's vertical and horizontal axes.
    pub fn turn(&mut self, right_deg: f32, down_deg: f32) {
        if right_deg.is_finite() && down_deg.is_finite() {
            self.scene.turn(right_deg, down_deg);
            self.panels_fresh = false;
        }
    }

    /// Renders every panel and compares the selected pair; when the shading panels already
    /// show this scene (a change of difference settings, or the settle frame after a drag
    /// rendered with `renderPanels`), only the comparison runs.
    pub fn render(&mut self) -> Result<(), JsValue> {
        if self.panels_fresh {
            self.bench.compare_only(&self.scene).map_err(js_error)?;
        } else {
            self.bench.render(&self.scene).map_err(js_error)?;
        }
        self.panels_fresh = true;
        Ok(())
    }

    /// Renders only the Gouraud and Phong panels (the benchmark's unit of work).
    #[wasm_bindgen(js_name = renderPanels)]
    pub fn render_panels(&mut self) -> Result<(), JsValue> {
        self.bench.render_panels(&self.scene).map_err(js_error)?;
        self.panels_fresh = true;
        Ok(())
    }

    /// Renders only rows `y0..y1` of the Gouraud and Phong panels (a worker's band of a
    /// frame): `panelPtr`/`panelLen` of panels 0 and 1 then give that band's bytes, equal to
    /// the same rows of [`Viewer::render_panels`]. The panels no longer show the whole frame
    /// (the next `render` draws it again).
    #[wasm_bindgen(js_name = renderPanelRows)]
    pub fn render_panel_rows(&mut self, y0: u32, y1: u32) -> Result<(), JsValue> {
        self.bench
            .render_panel_rows(&self.scene, y0..y1)
            .map_err(js_error)?;
        self.panels_fresh = false;
        Ok(())
    }

    /// Loads the fixed benchmark scene (docs/REFERENCES.md, "The benchmark scene") at icosphere `level` and
    /// panel size `width` x `height`.
    #[wasm_bindgen(js_name = loadBenchmarkScene)]
    pub fn load_benchmark_scene(
        &mut self,
        level: u32,
        width: u32,
        height: u32,
    ) -> Result<(), JsValue> {
        let scene = Scene::benchmark(level, width, height, 0)
            .validated()
            .map_err(js_error)?;
        self.replace_scene(scene);
        Ok(())
    }

    /// Sets the mesh's rotation to `deg` degrees about +y (a turntable position).
    #[wasm_bindgen(js_name = setTurntable)]
    pub fn set_turntable(&mut self, deg: f32) {
        if deg.is_finite() {
            self.scene
                .set_rotation(crate::scene::definition::axis_angle(glam::Vec3::Y, deg));
        }
    }

    /// Address in wasm memory of a panel's RGBA bytes: 0 Gouraud, 1 Phong, 2 difference,
    /// 3 exact reference (drawn only when the difference view compares against it).
    #[wasm_bindgen(js_name = panelPtr)]
    pub fn panel_ptr(&self, i: usize) -> *const u8 {
        PANELS.get(i).map_or(std::ptr::null(), |(p, _)| {
            self.bench.framebuffer(*p).bytes().as_ptr()
        })
    }

    /// Length in bytes of a panel's pixels (0 for a panel not drawn).
    #[wasm_bindgen(js_name = panelLen)]
    pub fn panel_len(&self, i: usize) -> usize {
        PANELS
            .get(i)
            .map_or(0, |(p, _)| self.bench.framebuffer(*p).bytes().len())
    }

    /// The colours of pixel (x, y) in the compared pair, their CIELAB and dE00/dE*ab, or
    /// `null` outside the panel.
    pub fn probe(&self, x: u32, y: u32) -> Result<JsValue, JsValue> {
        let ser = serde_wasm_bindgen::Serializer::json_compatible();
        let found = self
            .bench
            .probe(self.scene.difference.pair, x as usize, y as usize);
        serde::Serialize::serialize(&found, &ser).map_err(js_error)
    }

    /// The difference colour scale as `width` RGBA pixels from 0 to the scale's maximum.
    pub fn legend(&mut self, width: u32) -> Vec<u8> {
        let max = self.scene.difference.scale_max;
        let w = width.max(2);
        (0..w)
            .flat_map(|i| {
                let de = max * i as f32 / (w - 1) as f32;
                let c = self.legend.map_color(de, max);
                [c[0], c[1], c[2], 255]
            })
            .collect()
    }

    /// Panel width in pixels.
    pub fn width(&self) -> u32 {
        self.scene.panel.width
    }

    /// Panel height in pixels.
    pub fn height(&self) -> u32 {
        self.scene.panel.height
    }

    /// The report sheet of the last frame as `{width, height, rgba}` (RGBA bytes).
    #[wasm_bindgen(js_name = reportSheet)]
    pub fn report_sheet(&self) -> Result<JsValue, JsValue> {
        let img = crate::analysis::sheet::workbench_sheet(&self.bench, &self.scene);
        let out = js_sys::Object::new();
        let set = |k: &str, v: JsValue| js_sys::Reflect::set(&out, &JsValue::from_str(k), &v);
        set("width", JsValue::from(img.width as u32))?;
        set("height", JsValue::from(img.height as u32))?;
        set("rgba", js_sys::Uint8Array::from(img.rgba.as_slice()).into())?;
        Ok(out.into())
    }

    /// The last frame's metrics as CSV (header and one row), with the scene's link.
    #[wasm_bindgen(js_name = reportCsv)]
    pub fn report_csv(&self) -> String {
        self.bench
            .report()
            .to_csv(&crate::scene::link::encode(&self.scene))
    }

    /// The last frame's report: metrics of the compared pair and the lighting cost.
    pub fn report(&self) -> Result<JsValue, JsValue> {
        let ser = serde_wasm_bindgen::Serializer::json_compatible();
        serde::Serialize::serialize(self.bench.report(), &ser).map_err(js_error)
    }

    /// Turns the mesh by `deg` degrees about its own up axis (object +y), as a turntable
    /// does; the page's play button calls it once per animation frame.
    pub fn spin(&mut self, deg: f32) {
        if deg.is_finite() {
            let q = self.scene.rotation_quat()
                * crate::scene::definition::axis_angle(glam::Vec3::Y, deg);
            self.scene.set_rotation(q);
            self.panels_fresh = false;
        }
    }

    /// Starts a sweep of the current scene: `axis` "turntable" or "roll", `steps` evenly
    /// spaced over a full turn. Replaces any earlier sweep.
    #[wasm_bindgen(js_name = startSweep)]
    pub fn start_sweep(&mut self, axis: &str, steps: u32) -> Result<(), JsValue> {
        let axis: SweepAxis = choice("sweep axis", axis)?;
        let settings = SweepSettings {
            axis,
            steps,
            degrees: 360.0,
        };
        self.sweep = Some(Sweep::new(&self.scene, settings).map_err(js_error)?);
        Ok(())
    }

    /// Renders and measures the next sweep step; false when the sweep is complete (or there
    /// is none). The page calls it in slices between frames.
    #[wasm_bindgen(js_name = sweepStep)]
    pub fn sweep_step(&mut self) -> Result<bool, JsValue> {
        let Some(sweep) = self.sweep.as_mut() else {
            return Ok(false);
        };
        self.panels_fresh = false; // the workbench now holds the sweep's frame
        sweep.run_step(&mut self.bench).map_err(js_error)?;
        Ok(!sweep.is_done())
    }

    /// Steps measured and steps in all, `[done, total]` (`[0, 0]` without a sweep).
    #[wasm_bindgen(js_name = sweepProgress)]
    pub fn sweep_progress(&self) -> Vec<u32> {
        self.sweep.as_ref().map_or(vec![0, 0], |s| {
            vec![s.steps().len() as u32, s.settings().steps]
        })
    }

    /// Forgets the sweep.
    #[wasm_bindgen(js_name = cancelSweep)]
    pub fn cancel_sweep(&mut self) {
        self.sweep = None;
    }

    /// The sweep's plot as SVG: `metric` "peak_luminance", "de00" or "probe_change",
    /// `current` the step to mark (negative: none). Empty without a sweep.
    #[wasm_bindgen(js_name = sweepPlot)]
    pub fn sweep_plot(
        &self,
        metric: &str,
        width: u32,
        height: u32,
        current: i32,
    ) -> Result<String, JsValue> {
        let metric: SweepMetric = choice("sweep plot", metric)?;
        Ok(self.sweep.as_ref().map_or_else(String::new, |s| {
            s.plot(metric, u32::try_from(current).ok())
                .to_svg(width, height)
        }))
    }

    /// The sweep's summary (highlight stability, orientation variance) as an object.
    #[wasm_bindgen(js_name = sweepSummary)]
    pub fn sweep_summary(&self) -> Result<JsValue, JsValue> {
        let Some(sweep) = self.sweep.as_ref() else {
            return Ok(JsValue::NULL);
        };
        let ser = serde_wasm_bindgen::Serializer::json_compatible();
        serde::Serialize::serialize(&sweep.summary(), &ser).map_err(js_error)
    }

    /// The sweep's steps as CSV (the command line's `sweep --out` format).
    #[wasm_bindgen(js_name = sweepCsv)]
    pub fn sweep_csv(&self) -> String {
        self.sweep.as_ref().map_or_else(String::new, Sweep::to_csv)
    }

    /// Shows step `step` of the sweep: the swept scene turned or rolled to that angle, at the
    /// current panel size.
    #[wasm_bindgen(js_name = sweepJump)]
    pub fn sweep_jump(&mut self, step: u32) -> Result<(), JsValue> {
        let Some(sweep) = self.sweep.as_ref() else {
            return Err(js_error("no sweep to jump into"));
        };
        let panel = self.scene.panel;
        let scene = sweep
            .scene_at(step)
            .edit(|s| s.panel = panel)
            .map_err(js_error)?;
        self.replace_scene(scene);
        Ok(())
    }

    /// Starts tessellation advice for the current scene: `steps` turntable angles per level,
    /// `method` "midpoint" or "pn_triangles" for meshes without a resolution parameter; the
    /// threshold is the difference view's.
    #[wasm_bindgen(js_name = startAdvice)]
    pub fn start_advice(&mut self, steps: u32, method: &str) -> Result<(), JsValue> {
        let method: SubdivisionMethod = choice("subdivision method", method)?;
        let settings = AdviceSettings {
            threshold: self.scene.difference.threshold,
            steps,
            method,
        };
        self.advisor = Some(Advisor::new(&self.scene, settings).map_err(js_error)?);
        Ok(())
    }

    /// Renders the next frame of the advice; false when it is complete (or there is none).
    #[wasm_bindgen(js_name = adviceStep)]
    pub fn advice_step(&mut self) -> Result<bool, JsValue> {
        self.panels_fresh = false; // the workbench now holds the advice's frame
        match self.advisor.as_mut() {
            Some(a) => a.run_step(&mut self.bench).map_err(js_error),
            None => Ok(false),
        }
    }

    /// Frames rendered and frames at most, `[done, total]` (`[0, 0]` without advice).
    #[wasm_bindgen(js_name = adviceProgress)]
    pub fn advice_progress(&self) -> Vec<u32> {
        self.advisor
            .as_ref()
            .map_or(vec![0, 0], |a| vec![a.frames_done(), a.total_frames()])
    }

    /// The advice so far as an object (levels measured, the advised one, costs).
    pub fn advice(&self) -> Result<JsValue, JsValue> {
        let Some(a) = self.advisor.as_ref() else {
            return Ok(JsValue::NULL);
        };
        let ser = serde_wasm_bindgen::Serializer::json_compatible();
        serde::Serialize::serialize(a.advice(), &ser).map_err(js_error)
    }

    /// The advice plot as SVG with level `current` marked (negative: none).
    #[wasm_bindgen(js_name = advicePlot)]
    pub fn advice_plot(&self, width: u32, height: u32, current: i32) -> String {
        self.advisor.as_ref().map_or_else(String::new, |a| {
            a.plot(usize::try_from(current).ok()).to_svg(width, height)
        })
    }

    /// Shows level `i` of the advice: its mesh and subdivision in the current view.
    #[wasm_bindgen(js_name = adviceJump)]
    pub fn advice_jump(&mut self, i: u32) -> Result<(), JsValue> {
        let Some(rung) = self
            .advisor
            .as_ref()
            .and_then(|a| a.advice().rungs.get(i as usize))
        else {
            return Err(js_error("no such level in the advice"));
        };
        let scene = self
            .scene
            .edit(|s| {
                s.mesh = rung.mesh.clone();
                s.subdivision = rung.subdivision;
            })
            .map_err(js_error)?;
        self.bench.prepare(&scene).map_err(js_error)?;
        self.replace_scene(scene);
        Ok(())
    }

    /// Forgets the advice.
    #[wasm_bindgen(js_name = cancelAdvice)]
    pub fn cancel_advice(&mut self) {
        self.advisor = None;
    }
}

impl Viewer {
    /// Makes `scene` current; the panels stay fresh only if it draws the same panels.
    fn replace_scene(&mut self, scene: ValidScene) {
        self.panels_fresh &= scene.same_panels(&self.scene);
        self.scene = scene;
    }
}
