//! Writers for trace results: `result.json`, echogram CSV files and echogram plots.
