//! PLACEHOLDER module `trace`: filled in by its own work item.
