//! Why a sweep or an advice could not start or go on.

use crate::pipeline::render::PrepareError;
use std::fmt;

/// An analysis refused its settings or could not prepare a scene's mesh.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum AnalysisError {
    /// A setting out of range (the message names it and its range).
    Settings(String),
    /// A scene's mesh could not be prepared.
    Prepare(PrepareError),
}

impl fmt::Display for AnalysisError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            AnalysisError::Settings(m) => f.write_str(m),
            AnalysisError::Prepare(e) => e.fmt(f),
        }
    }
}

impl std::error::Error for AnalysisError {}

impl From<PrepareError> for AnalysisError {
    fn from(e: PrepareError) -> Self {
        AnalysisError::Prepare(e)
    }
}
