//! `polaray compare` end to end: common random numbers, the verdict rule,
//! the JSON schema, byte-identical re-runs, a reviewer's reproduction, clear
//! errors, and the report in a real headless browser.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

use assert_cmd::cargo::cargo_bin;
use polaray::metrics::Parameter;
use serde_json::Value;

const COMPARISON: &str = "tests/data/compare/treatments.compare.toml";

fn polaray() -> Command {
    Command::new(cargo_bin("polaray"))
}

/// Runs `polaray compare FILE --out DIR --quiet` and returns stdout; panics with stderr on failure.
fn compare_into(file: &Path, out: &Path) -> String {
    compare_with(file, out, None)
}

/// As [`compare_into`], with `RAYON_NUM_THREADS` set when `threads` is given.
fn compare_with(file: &Path, out: &Path, threads: Option<usize>) -> String {
    let mut cmd = polaray();
    if let Some(t) = threads {
        cmd.env("RAYON_NUM_THREADS", t.to_string());
    }
    let o = cmd
        .args(["compare"])
        .arg(file)
        .arg("--out")
        .arg(out)
        .arg("--quiet")
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "compare failed:\n{}",
        String::from_utf8_lossy(&o.stderr)
    );
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// The test comparison, run once per test binary.
fn shared_run() -> &'static Path {
    static OUT: OnceLock<PathBuf> = OnceLock::new();
    OUT.get_or_init(|| {
        let dir = tempfile::tempdir().unwrap().keep();
        compare_into(Path::new(COMPARISON), &dir);
        dir
    })
}

fn document(dir: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(dir.join("comparison.json")).unwrap()).unwrap()
}

#[test]
fn identical_treatments_differ_by_exactly_zero() {
    // Variants A and A2 put the same material on the same wall, so with
    // common random numbers every ray, hence every echogram, is the same.
    let doc = document(shared_run());
    let mut checked = 0;
    for spread in doc["spreads"].as_array().unwrap() {
        if spread["kind"] != "variants" {
            continue;
        }
        for row in spread["rows"].as_array().unwrap() {
            for d in row["differences"].as_array().unwrap() {
                let pair = (d["from"].as_str().unwrap(), d["to"].as_str().unwrap());
                if pair.0.starts_with("A: panel") && pair.1.starts_with("A2: the same panel") {
                    if d["difference"].is_null() {
                        continue; // undefined in both (e.g. J_LF without 125 Hz)
                    }
                    assert_eq!(d["difference"].as_f64(), Some(0.0), "{d}");
                    assert_eq!(d["se"].as_f64(), Some(0.0), "{d}");
                    assert_eq!(d["verdict"], "robust", "{d}");
                    checked += 1;
                }
            }
        }
    }
    assert!(checked > 50, "only {checked} differences checked");
    // ... while a different treatment does change the numbers.
    let runs = doc["runs"].as_array().unwrap();
    let g = |id: &str| {
        runs.iter().find(|r| r["id"] == id).unwrap()["pairs"][0]["parameters"][7]["per_band"][0]
            ["value"]
            .as_f64()
            .unwrap()
    };
    assert_eq!(g("A: panel / split"), g("A2: the same panel / split"));
    assert_ne!(g("A: panel / split"), g("B: diffuser / split"));
}

/// The rule of `polaray::compare::verdict`, restated: S − N > 1 is
/// sensitive, S + N ≤ 1 robust, anything else within noise.
fn rule(s: f64, n: f64) -> &'static str {
    if s - n > 1.0 {
        "sensitive"
    } else if s + n <= 1.0 {
        "robust"
    } else {
        "within_noise"
    }
}

#[test]
fn verdicts_follow_from_the_numbers_shown() {
    let doc = document(shared_run());
    let k = doc["settings"]["noise_factor"].as_f64().unwrap();
    let mut seen = std::collections::BTreeSet::new();
    for spread in doc["spreads"].as_array().unwrap() {
        for row in spread["rows"].as_array().unwrap() {
            let diffs = row["differences"].as_array().unwrap();
            for d in diffs {
                let verdict = d["verdict"].as_str().unwrap();
                match (
                    d["difference"].as_f64(),
                    d["se"].as_f64(),
                    d["jnd"].as_f64(),
                ) {
                    (Some(diff), Some(se), Some(jnd)) => {
                        let s = d["spread_jnd"].as_f64().unwrap();
                        let n = d["noise_jnd"].as_f64().unwrap();
                        assert!((s - diff.abs() / jnd).abs() <= 1e-12 * s.max(1.0), "{d}");
                        assert!((n - k * se / jnd).abs() <= 1e-12 * n.max(1.0), "{d}");
                        assert_eq!(verdict, rule(s, n), "{d}");
                    }
                    _ => assert_eq!(verdict, "undefined", "{d}"),
                }
            }
            // The row's verdict is its deciding pair's, and that pair is the
            // right one: any sensitive pair decides, else all robust, else noise.
            let deciding = &diffs[row["deciding"].as_u64().unwrap() as usize];
            assert_eq!(row["verdict"], deciding["verdict"], "{row}");
            let any = |v: &str| diffs.iter().any(|d| d["verdict"] == v);
            let expected = if any("sensitive") {
                "sensitive"
            } else if any("undefined") {
                "undefined"
            } else if any("within_noise") {
                "within_noise"
            } else {
                "robust"
            };
            assert_eq!(row["verdict"], expected, "{row}");
            seen.insert(expected);
        }
    }
    // The test comparison exercises every verdict.
    assert_eq!(seen.len(), 4, "verdicts seen: {seen:?}");

    // In the report, each cell's verdict follows from the S and N it prints.
    let html = std::fs::read_to_string(shared_run().join("report.html")).unwrap();
    let mut cells = 0;
    for cell in html.split("<td class=\"v v-").skip(1) {
        let class = cell.split('"').next().unwrap();
        let Some(numbers) = cell
            .split("<span class=\"vn\">")
            .nth(1)
            .and_then(|r| r.split("</span>").next())
        else {
            continue;
        };
        let parts: Vec<&str> = numbers.split_whitespace().collect(); // S x · N y
        let (Ok(s), Ok(n)) = (parts[1].parse::<f64>(), parts[4].parse::<f64>()) else {
            assert_eq!(class, "undefined", "{numbers}");
            continue;
        };
        assert_eq!(class, rule(s, n), "cell `{numbers}`");
        cells += 1;
    }
    assert!(cells > 100, "only {cells} cells");
}

#[test]
fn standard_errors_are_positive_where_the_batches_differ() {
    let doc = document(shared_run());
    let run = &doc["runs"][0];
    let t30 = &run["pairs"][0]["parameters"][2];
    assert_eq!(t30["parameter"], "T30_s");
    for e in t30["per_band"].as_array().unwrap() {
        let (v, se) = (e["value"].as_f64().unwrap(), e["se"].as_f64().unwrap());
        // Monte Carlo noise of 4 batches of 2048 rays: more than nothing and
        // well under the value itself (common practice, no source).
        assert!(se > 0.0 && se < 0.5 * v, "T30 {v} ± {se}");
    }
}

#[test]
fn json_validates_against_its_documented_schema() {
    let schema: Value =
        serde_json::from_str(include_str!("../src/compare/comparison.schema.json")).unwrap();
    let validator = jsonschema::validator_for(&schema).unwrap();
    let doc = document(shared_run());
    let errors: Vec<String> = validator
        .iter_errors(&doc)
        .take(10)
        .map(|e| format!("{} at {}", e, e.instance_path()))
        .collect();
    assert!(errors.is_empty(), "{errors:#?}");
    // The schema has teeth: an unknown verdict and a missing field are refused.
    let mut bad = doc.clone();
    bad["spreads"][0]["rows"][0]["verdict"] = Value::String("maybe".into());
    assert!(!validator.is_valid(&bad));
    let mut bad = doc;
    bad["runs"][0]
        .as_object_mut()
        .unwrap()
        .remove("stats")
        .unwrap();
    assert!(!validator.is_valid(&bad));
}

#[test]
fn envelope_takes_the_s_only_material_at_both_ends_of_its_range() {
    let doc = document(shared_run());
    let env = &doc["envelope"];
    assert_eq!(env["variant"], "A: panel");
    let materials = env["materials"].as_array().unwrap();
    assert_eq!(materials.len(), 1, "{env}");
    assert_eq!(materials[0]["name"], "plaster");
    for b in materials[0]["bands"].as_array().unwrap() {
        let (lo, hi, bound) = (
            b["least_even"].as_f64().unwrap(),
            b["most_even"].as_f64().unwrap(),
            b["bound"].as_f64().unwrap(),
        );
        // reference.md §3 with M = 37, M_s = 5: d_max(0.05) = 0.1258 (derived there).
        assert!((bound - 0.1258).abs() < 5e-4, "{bound}");
        assert!(lo < hi && hi <= bound + 1e-9 && bound - hi < 0.002, "{b}");
    }
    let roles: Vec<&str> = doc["runs"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["role"].as_str().unwrap())
        .collect();
    assert_eq!(
        &roles[roles.len() - 2..],
        ["envelope_least_even", "envelope_most_even"]
    );
}

/// Every file under `dir`, relative path → bytes.
fn files(dir: &Path) -> std::collections::BTreeMap<String, Vec<u8>> {
    let mut out = std::collections::BTreeMap::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for e in std::fs::read_dir(&d).unwrap() {
            let p = e.unwrap().path();
            if p.is_dir() {
                stack.push(p);
            } else {
                let rel = p.strip_prefix(dir).unwrap().to_string_lossy().into_owned();
                out.insert(rel, std::fs::read(&p).unwrap());
            }
        }
    }
    out
}

#[test]
fn a_rerun_with_the_same_seed_is_byte_identical_except_timings() {
    // The re-run uses one thread, the first run all of them: no difference either.
    let first = shared_run();
    let second = tempfile::tempdir().unwrap();
    compare_with(Path::new(COMPARISON), second.path(), Some(1));
    let (a, b) = (files(first), files(second.path()));
    assert_eq!(a.keys().collect::<Vec<_>>(), b.keys().collect::<Vec<_>>());
    assert!(a.keys().any(|k| k.ends_with(".png")) && a.contains_key("report.html"));
    for (name, bytes) in &a {
        if name == "comparison.json" {
            let strip = |raw: &[u8]| {
                let mut v: Value = serde_json::from_slice(raw).unwrap();
                v.as_object_mut().unwrap().remove("timings").unwrap();
                serde_json::to_string(&v).unwrap()
            };
            assert_eq!(
                strip(bytes),
                strip(&b[name]),
                "comparison.json beyond timings"
            );
        } else {
            assert!(bytes == &b[name], "{name} differs between identical runs");
        }
    }
}

#[test]
fn a_reviewer_reproduces_the_numbers_from_the_provenance() {
    let out = shared_run();
    let o = polaray()
        .args(["compare", "--quiet", "--reproduce"])
        .arg(out.join("comparison.json"))
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&o.stdout);
    assert!(
        o.status.success(),
        "{stdout}\n{}",
        String::from_utf8_lossy(&o.stderr)
    );
    assert!(stdout.contains("reproduced: all"), "{stdout}");
    let count: usize = stdout
        .split("reproduced: all ")
        .nth(1)
        .and_then(|s| s.split_whitespace().next())
        .and_then(|s| s.parse().ok())
        .unwrap();
    assert!(count > 1000, "{stdout}");
}

#[test]
fn a_changed_input_or_number_is_caught_by_the_reproduction() {
    // A self-contained comparison in a scratch folder, so its room can change.
    let dir = tempfile::tempdir().unwrap();
    let room = std::fs::read_to_string("tests/data/compare/room.toml").unwrap();
    std::fs::write(dir.path().join("room.toml"), &room).unwrap();
    let file = dir.path().join("small.compare.toml");
    std::fs::write(
        &file,
        "room = \"room.toml\"\nlaws = [\"split\"]\nrays = 512\nbatches = 2\nparameters = [\"T30\"]\n",
    )
    .unwrap();
    let out = dir.path().join("out");
    compare_into(&file, &out);
    let json = out.join("comparison.json");

    // A number edited in the record is reported, with its place.
    let edited = dir.path().join("edited.json");
    let text = std::fs::read_to_string(&json).unwrap();
    let mut v: Value = serde_json::from_str(&text).unwrap();
    let x = &mut v["runs"][0]["pairs"][0]["parameters"][2]["per_band"][0]["value"];
    *x = Value::from(x.as_f64().unwrap() + 0.01);
    std::fs::write(&edited, serde_json::to_string(&v).unwrap()).unwrap();
    let o = polaray()
        .args(["compare", "--quiet", "--reproduce"])
        .arg(&edited)
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&o.stdout);
    assert!(!o.status.success());
    assert!(stdout.contains("NOT reproduced: 1 of"), "{stdout}");
    assert!(
        stdout.contains("/runs/0/pairs/0/parameters/2/per_band/0/value"),
        "{stdout}"
    );

    // A changed room file is refused before tracing, naming the file.
    std::fs::write(dir.path().join("room.toml"), room + "\n# edited\n").unwrap();
    let o = polaray()
        .args(["compare", "--quiet", "--reproduce"])
        .arg(&json)
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&o.stderr);
    assert!(!o.status.success());
    assert!(
        stderr.contains("the room file")
            && stderr.contains("room.toml")
            && stderr.contains("has changed"),
        "{stderr}"
    );
}

#[test]
fn bad_comparison_files_are_refused_with_the_item_named() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::copy("tests/data/compare/room.toml", dir.path().join("room.toml")).unwrap();
    let cases = [
        (
            "laws = [\"mirror\"]\n",
            "laws[0]: unknown reflection law `mirror`",
        ),
        (
            "rays = 1000\nbatches = 3\n",
            "rays: 1000 rays per source do not split into 3",
        ),
        ("batches = 1\n", "batches: 1 is too few"),
        (
            "estimator = \"cone\"\n",
            "estimator: `cone` is not one of: exact-early, next-event, sphere",
        ),
        (
            "receivers = [\"R9\"]\n",
            "receivers[0]: the room has no receiver named `R9`",
        ),
        (
            "parameters = [\"RT60\"]\n",
            "parameters[0]: unknown parameter `RT60`",
        ),
        (
            "[[variants]]\nname = \"x\"\nreplace = { north = \"plaster\" }\n",
            "variants[0].replace: the room has no surface group `north`",
        ),
        (
            "[[variants]]\nname = \"x\"\nreplace = { x1 = \"velvet\" }\n",
            "variants[0].replace.x1: material `velvet` is defined neither",
        ),
        ("colour = \"red\"\n", "unknown field `colour`"),
        // The plaster has no diffusion: the bounded law needs a fallback.
        (
            "laws = [\"bounded\"]\nbatches = 4\n",
            "variant `as in the room file`, law `bounded`: material `plaster`",
        ),
    ];
    for (i, (extra, expected)) in cases.iter().enumerate() {
        let file = dir.path().join(format!("case{i}.compare.toml"));
        std::fs::write(&file, format!("room = \"room.toml\"\n{extra}")).unwrap();
        let o = polaray()
            .args(["compare", "--quiet"])
            .arg(&file)
            .arg("--out")
            .arg(dir.path().join("out"))
            .output()
            .unwrap();
        let stderr = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(1), "case {i}: {stderr}");
        assert!(stderr.starts_with("Error: "), "case {i}: {stderr}");
        assert!(
            stderr.contains(&format!("case{i}.compare.toml")),
            "case {i}: {stderr}"
        );
        assert!(
            stderr.contains(expected),
            "case {i}: expected `{expected}` in {stderr}"
        );
        assert!(!stderr.contains("panicked"), "case {i}: {stderr}");
    }
}

/// Where CI installs Debian's chromium (`.ci/run`).
const CHROMIUM: &str = "/usr/bin/chromium";

fn chromium(profile: &Path, args: &[&str]) -> std::process::Output {
    Command::new(CHROMIUM)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--enable-logging=stderr",
            "--v=0",
            "--virtual-time-budget=10000",
            "--window-size=1200,1600",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .args(args)
        .output()
        .unwrap()
}

#[test]
fn the_report_renders_in_a_headless_browser() {
    if !Path::new(CHROMIUM).exists() {
        if std::env::var_os("POLARAY_SKIP_BROWSER").is_some() {
            eprintln!(
                "POLARAY_SKIP_BROWSER is set and {CHROMIUM} is missing: browser test skipped"
            );
            return;
        }
        panic!(
            "{CHROMIUM} is missing: install it (`apt-get install -y --no-install-recommends chromium`, as .ci/run does) or set POLARAY_SKIP_BROWSER=1"
        );
    }
    let out = shared_run();
    let report = out.join("report.html").canonicalize().unwrap();
    let url = format!("file://{}", report.display());
    let scratch = tempfile::tempdir().unwrap();

    // The page's own check: every chart is an SVG with content and a size.
    let o = chromium(&scratch.path().join("p1"), &["--dump-dom", &url]);
    let dom = String::from_utf8_lossy(&o.stdout);
    let stderr = String::from_utf8_lossy(&o.stderr);
    assert!(o.status.success(), "{stderr}");
    let charts = std::fs::read_dir(out.join("plots")).unwrap().count();
    assert!(
        dom.contains(&format!("data-charts=\"{charts}\"")),
        "expected {charts} charts; body: {}",
        &dom[dom.find("<body").unwrap_or(0)..][..300.min(dom.len())]
    );
    assert!(
        dom.contains("data-charts-ok=\"yes\""),
        "a chart did not render"
    );
    // No console output at all: no script errors, no failed loads.
    let console: Vec<&str> = stderr.lines().filter(|l| l.contains(":CONSOLE")).collect();
    assert!(console.is_empty(), "console messages: {console:#?}");
    // Self-contained: the only URL in the page is the SVG namespace.
    let html = std::fs::read_to_string(&report).unwrap();
    let urls: Vec<usize> = html
        .match_indices("http")
        .map(|(i, _)| i)
        .filter(|&i| !html[i..].starts_with("http://www.w3.org/2000/svg\""))
        .collect();
    assert!(urls.is_empty(), "network references at {urls:?}");

    // A screenshot of the top of the page is not blank.
    let shot = scratch.path().join("shot.png");
    let o = chromium(
        &scratch.path().join("p2"),
        &[&format!("--screenshot={}", shot.display()), &url],
    );
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(&shot).unwrap()));
    let mut reader = decoder.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).unwrap();
    let channels = info.color_type.samples();
    let pixels: Vec<&[u8]> = buf[..info.buffer_size()].chunks(channels).collect();
    let colours: std::collections::HashSet<&[u8]> = pixels.iter().copied().collect();
    let paper: &[u8] = &[250, 248, 243];
    let off_paper = pixels.iter().filter(|p| p[..3] != *paper).count();
    // A blank page has one or two colours; this page has text, tables and the masthead.
    assert!(colours.len() > 50, "only {} colours", colours.len());
    assert!(
        off_paper * 10 > pixels.len(),
        "only {off_paper} of {} pixels differ from the page colour",
        pixels.len()
    );
}

#[test]
fn the_record_holds_no_absolute_path_and_reproduces_from_anywhere() {
    // Provenance records paths relative to the working folder and to the
    // results folder, never the author's absolute paths; a reviewer working
    // in the results folder itself still finds the inputs.
    let out = shared_run();
    fn absolute_strings(v: &Value, found: &mut Vec<String>) {
        match v {
            Value::String(s) if s.starts_with(env!("CARGO_MANIFEST_DIR")) => found.push(s.clone()),
            Value::Array(a) => a.iter().for_each(|x| absolute_strings(x, found)),
            Value::Object(o) => o.values().for_each(|x| absolute_strings(x, found)),
            _ => {}
        }
    }
    let mut found = Vec::new();
    absolute_strings(&document(out), &mut found);
    assert!(found.is_empty(), "absolute paths recorded: {found:?}");
    let o = polaray()
        .current_dir(out)
        .args(["compare", "--quiet", "--reproduce", "comparison.json"])
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&o.stdout);
    assert!(
        o.status.success() && stdout.contains("reproduced: all"),
        "{stdout}\n{}",
        String::from_utf8_lossy(&o.stderr)
    );
}

#[test]
fn the_report_opens_with_a_summary_that_matches_the_verdicts() {
    let out = shared_run();
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    let start = html
        .find("<section id=\"summary\">")
        .expect("summary section");
    assert!(
        start < html.find("Advisory results").unwrap()
            && start < html.find("id=\"verdicts\"").unwrap(),
        "the summary comes first"
    );
    let summary = &html[start..start + html[start..].find("</section>").unwrap()];
    let doc = document(out);
    // Every sensitive single-number verdict on the choice of treatment is
    // named, and a parameter robust everywhere is said to hold.
    let mut sensitive = 0;
    let mut robust_everywhere = std::collections::BTreeMap::new();
    for spread in doc["spreads"].as_array().unwrap() {
        if spread["kind"] != "variants" {
            continue;
        }
        for row in spread["rows"].as_array().unwrap() {
            if !row["band_hz"].is_null() {
                continue;
            }
            let p = Parameter::from_name(row["parameter"].as_str().unwrap()).unwrap();
            let robust = row["verdict"] == "robust";
            robust_everywhere
                .entry(p.short())
                .and_modify(|r: &mut bool| *r &= robust)
                .or_insert(robust);
            if row["verdict"] == "sensitive" {
                let needle = format!("{} at {}", p.short(), row["receiver"].as_str().unwrap());
                assert!(
                    summary.contains(&needle),
                    "{needle} missing from: {summary}"
                );
                sensitive += 1;
            }
        }
    }
    assert!(
        sensitive > 0,
        "the test comparison has sensitive verdicts (noise_factor 1)"
    );
    // Verdict cells give the physical difference beside the JNDs, signed,
    // in the parameter's unit ("B vs A: -0.12 s").
    let cells: Vec<&str> = html
        .split("<span class=\"vp\">")
        .skip(1)
        .map(|c| c.split("</span>").next().unwrap())
        .collect();
    assert!(
        cells.iter().any(|c| c.contains(" vs ")
            && (c.contains(": +") || c.contains(": -"))
            && c.ends_with(" s")),
        "{:?}",
        &cells[..cells.len().min(5)]
    );
    let holds = summary
        .split("Does the choice of treatment change the result?")
        .nth(1)
        .unwrap()
        .split("</li>")
        .next()
        .unwrap();
    for (p, robust) in robust_everywhere {
        if robust {
            assert!(
                holds.contains("holds for") && holds.contains(p),
                "{p}: {holds}"
            );
        }
    }
}
