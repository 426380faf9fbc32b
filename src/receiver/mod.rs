//! PLACEHOLDER module `receiver`: filled in by its own work item.
