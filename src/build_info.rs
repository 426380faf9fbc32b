//! Which build produced a result: recorded in `comparison.json` and
//! `result.json` so a reviewer knows what computed the numbers (`build.rs`
//! fills these in at compile time).

use serde::Serialize;

/// The build of this polaray binary.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct BuildInfo {
    /// Package version.
    pub version: &'static str,
    /// Git commit checked out when it was built (`unknown` outside a git
    /// checkout; uncommitted changes are not detected).
    pub commit: &'static str,
    /// Target triple.
    pub target: &'static str,
    /// Compiler, as `rustc --version` prints it.
    pub compiler: &'static str,
    /// Cargo profile (`release`, `debug`).
    pub profile: &'static str,
}

/// This build.
pub const BUILD: BuildInfo = BuildInfo {
    version: env!("CARGO_PKG_VERSION"),
    commit: env!("POLARAY_BUILD_COMMIT"),
    target: env!("POLARAY_BUILD_TARGET"),
    compiler: env!("POLARAY_BUILD_COMPILER"),
    profile: env!("POLARAY_BUILD_PROFILE"),
};
