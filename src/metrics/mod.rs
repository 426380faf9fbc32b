//! PLACEHOLDER module `metrics`: filled in by its own work item.
