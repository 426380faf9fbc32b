//! What can stop a comparison.

use std::path::PathBuf;

use crate::room::RoomError;
use crate::trace::TraceError;

/// A comparison that cannot be loaded, traced, written or reproduced.
#[derive(Debug, thiserror::Error)]
pub enum CompareError {
    /// The comparison file is unusable; every problem found is listed.
    #[error("{}: {}", .file.display(), .problems.join("\n  "))]
    File {
        /// The comparison file.
        file: PathBuf,
        /// Each problem, naming the item and what is wrong.
        problems: Vec<String>,
    },
    /// The room file is unusable.
    #[error(transparent)]
    Room(#[from] RoomError),
    /// A run could not be traced.
    #[error("{}: run `{run}`: {source}", .file.display())]
    Trace {
        /// The comparison file.
        file: PathBuf,
        /// Run id.
        run: String,
        /// The cause.
        source: TraceError,
    },
    /// Writing an output failed.
    #[error("cannot write {}: {source}; check that the folder is writable and the disk not full", .path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// The cause.
        source: std::io::Error,
    },
    /// Drawing a chart failed.
    #[error("cannot draw {}: {message}", .path.display())]
    Plot {
        /// The chart.
        path: PathBuf,
        /// What the plotting library said.
        message: String,
    },
    /// Serializing failed (a bug: every value is serializable).
    #[error("cannot serialize {}: {source}", .path.display())]
    Json {
        /// The file.
        path: PathBuf,
        /// The cause.
        source: serde_json::Error,
    },
    /// A reproduction could not start or did not match.
    #[error("{}: {message}", .file.display())]
    Reproduce {
        /// The `comparison.json` being reproduced.
        file: PathBuf,
        /// What is wrong.
        message: String,
    },
}
