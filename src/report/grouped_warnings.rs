//! Warnings that differ only in their octave band, folded into one line
//! ("bands 125, 250 and 500 Hz: ..."), so a report lists each thing once.

/// The band a warning names (`band 500 Hz: `), with the text before and after.
fn split_band(warning: &str) -> Option<(&str, u32, &str)> {
    let start = warning.find("band ")?;
    let rest = &warning[start + 5..];
    let digits = rest.find(|c: char| !c.is_ascii_digit())?;
    let hz: u32 = rest[..digits].parse().ok()?;
    let tail = rest[digits..].strip_prefix(" Hz")?;
    Some((&warning[..start], hz, tail))
}

/// `warnings` with those that differ only in the band they name folded into
/// one, in the order of their first appearance; the others unchanged.
#[must_use]
pub fn group_by_band(warnings: &[String]) -> Vec<String> {
    // (prefix, tail, bands) per group, or a plain warning.
    let mut groups: Vec<(String, String, Vec<u32>)> = Vec::new();
    let mut order: Vec<Result<usize, String>> = Vec::new();
    for w in warnings {
        match split_band(w) {
            Some((prefix, hz, tail)) => {
                if let Some(i) = groups.iter().position(|g| g.0 == prefix && g.1 == tail) {
                    groups[i].2.push(hz);
                } else {
                    groups.push((prefix.to_string(), tail.to_string(), vec![hz]));
                    order.push(Ok(groups.len() - 1));
                }
            }
            None => order.push(Err(w.clone())),
        }
    }
    order
        .into_iter()
        .map(|item| match item {
            Err(plain) => plain,
            Ok(i) => {
                let (prefix, tail, bands) = &groups[i];
                let names: Vec<String> = bands.iter().map(ToString::to_string).collect();
                let list = match names.as_slice() {
                    [one] => format!("band {one}"),
                    [rest @ .., last] => format!("bands {} and {last}", rest.join(", ")),
                    [] => unreachable!("a group has a band"),
                };
                format!("{prefix}{list} Hz{tail}")
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn folds_warnings_that_differ_only_in_the_band() {
        let w: Vec<String> = [
            "material `a`: f.toml: band 125 Hz: incidences 0° to 60° (runs: x)",
            "material `b` lacks polar data",
            "material `a`: f.toml: band 250 Hz: incidences 0° to 60° (runs: x)",
            "material `a`: f.toml: band 500 Hz: incidences 0° to 30° (runs: x)",
            "material `a`: f.toml: band 1000 Hz: incidences 0° to 60° (runs: x)",
        ]
        .map(String::from)
        .to_vec();
        assert_eq!(
            group_by_band(&w),
            [
                "material `a`: f.toml: bands 125, 250 and 1000 Hz: incidences 0° to 60° (runs: x)",
                "material `b` lacks polar data",
                "material `a`: f.toml: band 500 Hz: incidences 0° to 30° (runs: x)",
            ]
        );
    }

    #[test]
    fn leaves_text_without_a_band_alone() {
        let w = vec!["band width is odd".to_string(), "bands 1 Hz".to_string()];
        assert_eq!(group_by_band(&w), w);
    }
}
