//! PLACEHOLDER module `profile`: filled in by its own work item.
