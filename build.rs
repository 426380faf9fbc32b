//! Records which build produced polaray's numbers, for the provenance of
//! `comparison.json` and `result.json`: the git commit checked out at build
//! time (when built from a git checkout), the target triple, the compiler and
//! the profile. Nothing here affects a computed value.

use std::process::Command;

fn output(cmd: &str, args: &[&str]) -> Option<String> {
    let out = Command::new(cmd).args(args).output().ok()?;
    out.status
        .success()
        .then(|| String::from_utf8_lossy(&out.stdout).trim().to_string())
        .filter(|s| !s.is_empty())
}

fn main() {
    let commit = output("git", &["rev-parse", "HEAD"]).unwrap_or_else(|| "unknown".into());
    let rustc = std::env::var("RUSTC").unwrap_or_else(|_| "rustc".into());
    let compiler = output(&rustc, &["--version"]).unwrap_or_else(|| "unknown".into());
    let target = std::env::var("TARGET").unwrap_or_else(|_| "unknown".into());
    let profile = std::env::var("PROFILE").unwrap_or_else(|_| "unknown".into());
    println!("cargo:rustc-env=POLARAY_BUILD_COMMIT={commit}");
    println!("cargo:rustc-env=POLARAY_BUILD_COMPILER={compiler}");
    println!("cargo:rustc-env=POLARAY_BUILD_TARGET={target}");
    println!("cargo:rustc-env=POLARAY_BUILD_PROFILE={profile}");
    // Re-run when the checked-out commit changes (HEAD, or the branch it names).
    println!("cargo:rerun-if-changed=build.rs");
    if let Some(git_dir) = output("git", &["rev-parse", "--git-dir"]) {
        println!("cargo:rerun-if-changed={git_dir}/HEAD");
        if let Some(head) = output("git", &["symbolic-ref", "-q", "HEAD"]) {
            println!("cargo:rerun-if-changed={git_dir}/{head}");
        }
    }
}
