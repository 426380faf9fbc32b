//! What can stop a comparison.

use std::path::PathBuf;

use crate::report::ReportError;
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
    /// The room file the comparison file names is unusable.
    #[error("{}: the room file it names is unusable: {cause}", .file.display())]
    RoomOfComparison {
        /// The comparison file.
        file: PathBuf,
        /// Why (the room file's own error, which names it; not a `source`,
        /// since the message already says it).
        cause: RoomError,
    },
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
    /// Writing an output (file, chart, JSON) failed.
    #[error(transparent)]
    Output(#[from] ReportError),
    /// A reproduction could not start or did not match.
    #[error("{}: {message}", .file.display())]
    Reproduce {
        /// The `comparison.json` being reproduced.
        file: PathBuf,
        /// What is wrong.
        message: String,
    },
}
