//! Every command the README shows with real file names runs as written, on
//! the files the repository ships, in an empty working folder (so nothing is
//! written into the checkout). Lines with placeholders (`ROOM.toml`, `FILE`,
//! `DIR` …) are templates, not examples, and are skipped; optional parts in
//! `[…]` are dropped.

use std::path::{Path, PathBuf};

/// Commands too long for the suite, with where they are measured instead.
const TOO_LONG: [(&str, &str); 2] = [
    (
        "rear-wall.compare.toml",
        "the demo comparison: 90 s on 2 cores, timed in the README walkthrough",
    ),
    ("--reproduce", "re-runs the demo comparison"),
];

fn repo() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// `polaray …` command lines of the README's `sh` blocks, without comments
/// and optional parts, as argument lists (after `polaray`).
fn readme_commands() -> Vec<Vec<String>> {
    let text = std::fs::read_to_string(repo().join("README.md")).unwrap();
    let mut out = Vec::new();
    let mut in_sh = false;
    for line in text.lines() {
        if line.starts_with("```") {
            in_sh = line.trim() == "```sh";
            continue;
        }
        if !in_sh {
            continue;
        }
        let line = line.split(" #").next().unwrap().trim();
        let line = line
            .strip_prefix("cargo run --release -- ")
            .map(|rest| format!("polaray {rest}"))
            .unwrap_or_else(|| line.to_string());
        let Some(rest) = line.strip_prefix("polaray ") else {
            continue;
        };
        // Drop optional parts `[...]`.
        let mut plain = String::new();
        let mut depth = 0;
        for ch in rest.chars() {
            match ch {
                '[' => depth += 1,
                ']' => depth -= 1,
                _ if depth == 0 => plain.push(ch),
                _ => {}
            }
        }
        let words: Vec<String> = plain.split_whitespace().map(str::to_string).collect();
        let placeholder = words.iter().any(|w| {
            let head: String = w.chars().take_while(|c| *c != '.').collect();
            head.len() >= 2 && head.chars().all(|c| c.is_ascii_uppercase() || c == '_')
        });
        if !placeholder && !words.is_empty() {
            out.push(words);
        }
    }
    out
}

fn link(dir: &Path, name: &str) {
    std::os::unix::fs::symlink(repo().join(name), dir.join(name)).unwrap();
}

#[test]
fn every_readme_example_runs_as_written() {
    let commands = readme_commands();
    let dir = tempfile::tempdir().unwrap();
    for name in ["demo-rooms", "examples", "rooms"] {
        link(dir.path(), name);
    }
    let mut ran = 0;
    for args in &commands {
        let line = args.join(" ");
        if let Some((_, why)) = TOO_LONG.iter().find(|(key, _)| line.contains(key)) {
            eprintln!("skipped `polaray {line}`: {why}");
            continue;
        }
        let output = std::process::Command::new(assert_cmd::cargo::cargo_bin("polaray"))
            .args(args)
            .current_dir(dir.path())
            .output()
            .unwrap();
        let stderr = String::from_utf8_lossy(&output.stderr);
        assert!(
            output.status.success(),
            "`polaray {line}` failed ({:?}): {stderr}",
            output.status
        );
        assert!(!stderr.contains("panicked"), "`polaray {line}`: {stderr}");
        ran += 1;
    }
    // The README names at least these runnable examples: check ×2, run,
    // gonio ×3, analyze, polar ×3, profile.
    assert!(ran >= 11, "only {ran} README commands ran: {commands:?}");
    // Nothing was written into the checkout through the links.
    for shipped in ["examples/data", "demo-rooms/treatments"] {
        let names: Vec<String> = std::fs::read_dir(repo().join(shipped))
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .filter(|n| n.ends_with("-polar") || n.ends_with("-results"))
            .collect();
        assert!(names.is_empty(), "{shipped}: {names:?}");
    }
}
