//! The WebAssembly boundary: the only file that talks to JavaScript.
//!
//! One [`Viewer`] owns the scene, the renderer and the panels' framebuffers, all in wasm
//! memory for the page's lifetime. JavaScript asks for a render, then wraps each panel's
//! pixels (a view of wasm memory at `panel_ptr`) as ImageData once per frame: no call per
//! pixel or per triangle crosses the boundary. A scene the page sends is validated whole; a
//! bad one raises a JavaScript `Error` and leaves the previous scene in place.

use crate::render::{PanelStats, Renderer, ShadingMode};
use crate::scene::Scene;
use crate::Framebuffer;
use wasm_bindgen::prelude::*;

fn js_error(msg: impl std::fmt::Display) -> JsValue {
    js_sys::Error::new(&msg.to_string()).into()
}

/// The page's renderer: scene, panels and their last statistics.
#[wasm_bindgen]
pub struct Viewer {
    scene: Scene,
    renderer: Renderer,
    panels: [(ShadingMode, Framebuffer, PanelStats); 2],
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
            scene: Scene::default(),
            renderer: Renderer::new(),
            panels: [
                (
                    ShadingMode::Gouraud,
                    Framebuffer::new(0, 0),
                    PanelStats::default(),
                ),
                (
                    ShadingMode::Phong,
                    Framebuffer::new(0, 0),
                    PanelStats::default(),
                ),
            ],
        }
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
        let scene: Scene = serde_wasm_bindgen::from_value(value).map_err(js_error)?;
        scene.validate().map_err(js_error)?;
        self.scene = scene;
        Ok(())
    }

    /// Replaces the scene with JSON text; validated whole, the previous scene is kept when
    /// it is refused.
    #[wasm_bindgen(js_name = setSceneJson)]
    pub fn set_scene_json(&mut self, text: &str) -> Result<(), JsValue> {
        self.scene = Scene::from_json(text).map_err(js_error)?;
        Ok(())
    }

    /// Sets the panel size in device pixels.
    #[wasm_bindgen(js_name = setPanelSize)]
    pub fn set_panel_size(&mut self, width: u32, height: u32) -> Result<(), JsValue> {
        let mut next = self.scene.clone();
        next.panel.width = width;
        next.panel.height = height;
        next.validate().map_err(js_error)?;
        self.scene = next;
        Ok(())
    }

    /// Turns the mesh as a drag would: degrees about the screen's vertical and horizontal axes.
    pub fn turn(&mut self, right_deg: f32, down_deg: f32) {
        if right_deg.is_finite() && down_deg.is_finite() {
            self.scene.turn(right_deg, down_deg);
        }
    }

    /// Renders both panels.
    pub fn render(&mut self) -> Result<(), JsValue> {
        for (mode, fb, stats) in &mut self.panels {
            *stats = self
                .renderer
                .render(&self.scene, *mode, fb)
                .map_err(js_error)?;
        }
        Ok(())
    }

    /// Address in wasm memory of panel `i`'s RGBA bytes (0 = Gouraud, 1 = Phong).
    #[wasm_bindgen(js_name = panelPtr)]
    pub fn panel_ptr(&self, i: usize) -> *const u8 {
        self.panels
            .get(i)
            .map_or(std::ptr::null(), |p| p.1.bytes().as_ptr())
    }

    /// Length in bytes of panel `i`'s pixels.
    #[wasm_bindgen(js_name = panelLen)]
    pub fn panel_len(&self, i: usize) -> usize {
        self.panels.get(i).map_or(0, |p| p.1.bytes().len())
    }

    /// Panel width in pixels.
    pub fn width(&self) -> u32 {
        self.scene.panel.width
    }

    /// Panel height in pixels.
    pub fn height(&self) -> u32 {
        self.scene.panel.height
    }

    /// Statistics of the last render: `[{lit_vertices, fragments, triangles}, ...]`.
    pub fn stats(&self) -> Result<JsValue, JsValue> {
        let ser = serde_wasm_bindgen::Serializer::json_compatible();
        let all: Vec<PanelStats> = self.panels.iter().map(|p| p.2).collect();
        serde::Serialize::serialize(&all, &ser).map_err(js_error)
    }
}
