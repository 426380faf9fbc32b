//! Every parser polaray has, fed damaged versions of the files it ships:
//! each answers with the parsed value or an error naming the file, and never
//! panics. The damage is random but seeded (proptest's deterministic runner),
//! built from edits a user or a broken export makes: numbers replaced by odd
//! tokens, characters inserted or deleted, lines doubled or dropped, bytes
//! flipped in a WAV file.

use std::path::{Path, PathBuf};

use polaray::compare::{load_comparison, Overrides};
use polaray::gonio::material_file::load_material_file;
use polaray::metrics::read_wav;
use polaray::polar::chamber::load_chamber_file;
use polaray::polar::csv::load_polar_csv;
use polaray::polar::load_polar_file;
use polaray::profile::spec::load_spec;
use polaray::room::load_room;
use proptest::prelude::*;
use proptest::test_runner::RngSeed;

/// Tokens a damaged file may hold where a value was.
const TOKENS: [&str; 18] = [
    "",
    "-1",
    "nan",
    "1e309",
    "0",
    "[]",
    "\"\"",
    "=",
    "[[",
    "]]",
    "\n",
    "inf",
    "99999999999999999999",
    "-0.0",
    "[1, 2, 3]",
    "{}",
    "true",
    "#",
];

/// One edit: kind, position (taken modulo the length), token.
type Edit = (u8, usize, usize);

fn edits() -> impl Strategy<Value = Vec<Edit>> {
    prop::collection::vec((0u8..5, any::<usize>(), 0usize..TOKENS.len()), 1..5)
}

/// Applies the edits to `text` (on char boundaries).
fn damage(text: &str, edits: &[Edit]) -> String {
    let mut s = text.to_string();
    for &(kind, at, token) in edits {
        if s.is_empty() {
            s.push_str(TOKENS[token]);
            continue;
        }
        let mut at = at % s.len();
        while !s.is_char_boundary(at) {
            at -= 1;
        }
        let token = TOKENS[token];
        match kind {
            // Replace the number (or word) at `at` by the token.
            0 => {
                let end = s[at..]
                    .find(|c: char| c.is_whitespace() || c == ',' || c == ']')
                    .map_or(s.len(), |k| at + k);
                s.replace_range(at..end, token);
            }
            1 => s.insert_str(at, token),
            2 => {
                let mut end = (at + 1 + at % 20).min(s.len());
                while !s.is_char_boundary(end) {
                    end += 1;
                }
                s.replace_range(at..end, "");
            }
            // Double or drop the line holding `at`.
            k => {
                let start = s[..at].rfind('\n').map_or(0, |i| i + 1);
                let end = s[at..].find('\n').map_or(s.len(), |i| at + i + 1);
                let line = s[start..end].to_string();
                if k == 3 {
                    s.insert_str(start, &line);
                } else {
                    s.replace_range(start..end, "");
                }
            }
        }
    }
    s
}

/// Cases per parser: `POLARAY_FUZZ_CASES`, else 96.
fn fuzz_cases() -> u32 {
    std::env::var("POLARAY_FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(96)
}

fn repo(path: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(path)
}

/// Writes the damaged text to `name` in a fresh folder (with `extra` files
/// copied beside it), runs `parse`, and checks that an error names the file.
fn check<T, E: std::fmt::Display>(
    name: &str,
    text: &str,
    extra: &[(&str, &Path)],
    parse: impl Fn(&Path) -> Result<T, E>,
) -> Result<(), TestCaseError> {
    let dir = tempfile::tempdir().unwrap();
    for (to, from) in extra {
        std::fs::copy(from, dir.path().join(to)).unwrap();
    }
    let path = dir.path().join(name);
    std::fs::write(&path, text).unwrap();
    if let Err(e) = parse(&path) {
        let message = e.to_string();
        prop_assert!(
            message.contains(name),
            "error does not name {name}: {message}"
        );
    }
    Ok(())
}

fn shipped(path: &str) -> String {
    std::fs::read_to_string(repo(path)).unwrap()
}

proptest! {
    // A fixed seed, so CI meets the same damaged files every run; no
    // regression files are written into the checkout. The suite runs 96
    // cases per parser; `POLARAY_FUZZ_CASES=N` runs N (the long run).
    #![proptest_config(ProptestConfig {
        cases: fuzz_cases(),
        rng_seed: RngSeed::Fixed(20261204),
        failure_persistence: None,
        ..ProptestConfig::default()
    })]

    #[test]
    fn room_files(e in edits()) {
        check("room.toml", &damage(&shipped("rooms/shoebox.toml"), &e), &[], load_room)?;
    }

    #[test]
    fn room_files_with_a_mesh(e in edits(), in_obj in any::<bool>()) {
        let room = shipped("rooms/mesh-room.toml");
        let obj = shipped("rooms/l-room.obj");
        let dir = tempfile::tempdir().unwrap();
        let (room, obj) = if in_obj { (room, damage(&obj, &e)) } else { (damage(&room, &e), obj) };
        std::fs::write(dir.path().join("l-room.obj"), obj).unwrap();
        let path = dir.path().join("mesh-room.toml");
        std::fs::write(&path, room).unwrap();
        if let Err(err) = load_room(&path) {
            let m = err.to_string();
            prop_assert!(m.contains("mesh-room.toml") || m.contains("l-room.obj"), "{m}");
        }
    }

    #[test]
    fn comparison_files(e in edits()) {
        let polar = repo("demo-rooms/treatments/qrd7-panel.polar.toml");
        let text = shipped("tests/data/compare/treatments.compare.toml")
            .replace("../../../demo-rooms/treatments/qrd7-panel.polar.toml", &polar.to_string_lossy());
        check(
            "treatments.compare.toml",
            &damage(&text, &e),
            &[("room.toml", &repo("tests/data/compare/room.toml"))],
            |p| load_comparison(p, Overrides::default()),
        )?;
    }

    #[test]
    fn polar_files(e in edits()) {
        check("panel.polar.toml", &damage(&shipped("tests/data/polar/demo-qrd.toml"), &e), &[], load_polar_file)?;
    }

    #[test]
    fn polar_csv_files(e in edits()) {
        check("quick.csv", &damage(&shipped("examples/data/quick.csv"), &e), &[], load_polar_csv)?;
    }

    #[test]
    fn chamber_files(e in edits()) {
        check("chamber.toml", &damage(&shipped("examples/data/chamber.toml"), &e), &[], load_chamber_file)?;
    }

    #[test]
    fn material_files(e in edits()) {
        check("panel.material.toml", &damage(&shipped("examples/data/panel.material.toml"), &e), &[], load_material_file)?;
    }

    #[test]
    fn profile_specifications(e in edits()) {
        check("qrd7-panel.toml", &damage(&shipped("demo-rooms/treatments/qrd7-panel.toml"), &e), &[], load_spec)?;
    }

    #[test]
    fn wav_files(flips in prop::collection::vec((any::<usize>(), any::<u8>()), 1..8), cut in any::<bool>()) {
        let mut bytes = std::fs::read(repo("examples/data/impulse.wav")).unwrap();
        // Damage the header region most of the time, the samples otherwise.
        for &(at, value) in &flips {
            let at = if at % 4 == 0 { at % bytes.len() } else { at % 64 };
            bytes[at] = value;
        }
        if cut {
            let keep = flips[0].0 % bytes.len();
            bytes.truncate(keep);
        }
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("ir.wav");
        std::fs::write(&path, &bytes).unwrap();
        if let Err(e) = read_wav(&path) {
            prop_assert!(e.to_string().contains("ir.wav"), "{e}");
        }
    }
}
