//! Analysis: what the panels mean. The perceptual difference (CIELAB, CIEDE2000), the
//! workbench that renders and compares one scene's panels, frame reports, rotation sweeps,
//! the tessellation advisor, and the report sheets.

pub(crate) mod advisor;
pub(crate) mod error;
pub(crate) mod measure;
pub(crate) mod report;
pub(crate) mod sheet;
pub(crate) mod sweep;
pub(crate) mod workbench;

pub use advisor::{Advice, AdviceSettings, Advisor, Rung};
pub use error::AnalysisError;
pub use measure::{
    ciede2000, delta_e76, luminance, pixel_difference, srgb8_to_lab, srgb_to_xyz_matrix, Comparer,
    DiffMetrics, Lab, PixelDifference, Summary, SILHOUETTE_RGB, WHITE,
};
pub use report::{panel_labels, FrameReport, LightingCost, LitWith, Panel};
pub use sheet::{metrics_lines, report_sheet, sheet, workbench_sheet, GAP, LABEL_STRIP};
pub use sweep::{
    peak_luminance, Measured, StepMap, Sweep, SweepAxis, SweepMetric, SweepSettings, SweepStep,
    SweepSummary, MAX_STEPS, PROBES,
};
pub use workbench::Workbench;
