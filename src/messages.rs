//! Wording of the problems users meet most: unreadable files and TOML values
//! of the wrong kind, in plain words instead of the system's and the
//! parser's (`(os error 2)`, `expected usize`).

/// Why a file cannot be read, in plain words.
#[must_use]
pub fn io_problem(e: &std::io::Error) -> String {
    use std::io::ErrorKind;
    match e.kind() {
        ErrorKind::NotFound => "no such file; check the path and the working folder".into(),
        ErrorKind::PermissionDenied => "permission denied".into(),
        ErrorKind::IsADirectory => "this is a folder, not a file".into(),
        ErrorKind::InvalidData => "the file is not UTF-8 text".into(),
        _ => strip_os_code(&e.to_string()),
    }
}

/// A system message without its trailing ` (os error N)`.
fn strip_os_code(text: &str) -> String {
    match text.rfind(" (os error ") {
        Some(at) if text.ends_with(')') => text[..at].to_string(),
        _ => text.to_string(),
    }
}

/// A TOML error with the Rust type names the parser uses replaced by what a
/// user should write, and no trailing blank lines.
#[must_use]
pub fn toml_problem(e: &toml::de::Error) -> String {
    plain_types(e.to_string().trim_end())
}

/// Replaces Rust type names in a parser message (`expected usize` …).
#[must_use]
pub fn plain_types(text: &str) -> String {
    const NAMES: [(&str, &str); 8] = [
        ("expected usize", "expected a whole number, 0 or more"),
        ("expected u64", "expected a whole number, 0 or more"),
        ("expected u32", "expected a whole number, 0 or more"),
        ("expected u16", "expected a whole number, 0 or more"),
        ("expected i64", "expected a whole number"),
        ("expected i32", "expected a whole number"),
        ("expected f64", "expected a number"),
        ("expected f32", "expected a number"),
    ];
    let mut out = text.to_string();
    for (from, to) in NAMES {
        out = out.replace(from, to);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn system_and_parser_jargon_is_replaced() {
        let e = std::fs::read("/nonexistent/polaray/file.toml").unwrap_err();
        let text = io_problem(&e);
        assert!(text.starts_with("no such file"), "{text}");
        assert_eq!(strip_os_code("Broken pipe (os error 32)"), "Broken pipe");
        let e: toml::de::Error =
            toml::from_str::<std::collections::BTreeMap<String, usize>>("rays = -5").unwrap_err();
        let text = toml_problem(&e);
        assert!(
            text.contains("expected a whole number, 0 or more") && !text.contains("usize"),
            "{text}"
        );
    }
}
