//! Loading a room file (TOML, optionally with an OBJ mesh) into a checked [`Room`].
//!
//! PLACEHOLDER: the loader work item replaces the body; the signature is the contract.

use std::path::{Path, PathBuf};

use super::Room;

/// A room that loaded, with the warnings found on the way (warnings don't fail).
#[derive(Debug)]
pub struct LoadedRoom {
    /// The checked room.
    pub room: Room,
    /// Human-readable warnings, each naming the item concerned.
    pub warnings: Vec<String>,
}

/// A room file that cannot be used.
#[derive(Debug, thiserror::Error)]
#[error("{}: {}", .file.display(), .problems.join("\n  "))]
pub struct RoomError {
    /// The room file.
    pub file: PathBuf,
    /// Every problem found, each naming the item and what is wrong.
    pub problems: Vec<String>,
}

/// Loads and checks a room file.
pub fn load_room(path: &Path) -> Result<LoadedRoom, RoomError> {
    Err(RoomError {
        file: path.to_path_buf(),
        problems: vec!["the room loader is not built yet".into()],
    })
}
