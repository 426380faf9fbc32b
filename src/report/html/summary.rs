//! The report's opening summary: what was compared, and for each question the
//! comparison asks (which treatment, which law, what s alone leaves open),
//! which single-number conclusions hold, which differ by more than a JND and
//! which need more rays. Built from the verdicts alone, so it says nothing the
//! tables below do not.

use std::fmt::Write as _;

use crate::compare::document::{ComparisonDocument, Spread, SpreadKind, SpreadRow};
use crate::compare::{Parameter, Verdict};

/// One question's single-number verdicts, gathered per parameter.
struct Answer {
    /// Parameters robust in every group and at every receiver.
    robust: Vec<Parameter>,
    /// Sensitive cells: "T30 at R2-middle (bounded law: 3.2 JND, noise 1.8)".
    sensitive: Vec<String>,
    /// Parameters with a cell within noise and none sensitive.
    undecided: Vec<Parameter>,
}

/// The group's short label: what follows `kind: ` in its id.
fn group_label(spread: &Spread) -> &str {
    spread
        .id
        .split_once(": ")
        .map_or(spread.id.as_str(), |(_, rest)| rest)
}

fn answer(doc: &ComparisonDocument, kind: SpreadKind) -> Option<Answer> {
    let groups: Vec<&Spread> = doc.spreads.iter().filter(|s| s.kind == kind).collect();
    if groups.is_empty() {
        return None;
    }
    let mut out = Answer {
        robust: Vec::new(),
        sensitive: Vec::new(),
        undecided: Vec::new(),
    };
    for &p in &doc.settings.parameters {
        let rows: Vec<(&Spread, &SpreadRow)> = groups
            .iter()
            .flat_map(|g| g.rows.iter().map(move |r| (*g, r)))
            .filter(|(_, r)| r.parameter == p && r.band_hz.is_none())
            .collect();
        if rows.is_empty() {
            continue;
        }
        let mut any_sensitive = false;
        for (g, r) in &rows {
            if r.verdict == Verdict::Sensitive {
                any_sensitive = true;
                let d = r.differences.get(r.deciding);
                let (s, n) = d.map_or((None, None), |d| (d.spread_jnd, d.noise_jnd));
                let at = if doc.settings.sources.len() > 1 {
                    format!("{}/{}", r.source, r.receiver)
                } else {
                    r.receiver.clone()
                };
                let group = match kind {
                    SpreadKind::Variants => format!("{} law", group_label(g)),
                    SpreadKind::Laws => group_label(g).to_string(),
                    SpreadKind::Envelope => "least against most even".to_string(),
                };
                out.sensitive.push(format!(
                    "{} at {at} ({group}: {:.1} JND, noise {:.1})",
                    p.short(),
                    s.unwrap_or(f64::NAN),
                    n.unwrap_or(f64::NAN)
                ));
            }
        }
        if rows.iter().all(|(_, r)| r.verdict == Verdict::Robust) {
            out.robust.push(p);
        } else if !any_sensitive {
            out.undecided.push(p);
        }
    }
    Some(out)
}

fn names(ps: &[Parameter]) -> String {
    ps.iter().map(|p| p.short()).collect::<Vec<_>>().join(", ")
}

/// The summary section, escaped with `esc`.
pub(super) fn summary(h: &mut String, doc: &ComparisonDocument, esc: &dyn Fn(&str) -> String) {
    let s = &doc.settings;
    let variants: Vec<&str> = doc.variants.iter().map(|v| v.name.as_str()).collect();
    let _ = write!(
        h,
        "<section id=\"summary\"><h2>Summary</h2><p>Compared: {} under the {} law{}, at {} receiver{}, for {} (single-number values; per band in the tables below). A conclusion <em>holds</em> where the whole noise band of every difference stays within one JND.</p><ul>",
        esc(&variants.join("; ")),
        esc(&s.laws.join(", ")),
        if s.laws.len() == 1 { "" } else { "s" },
        s.receivers.len(),
        if s.receivers.len() == 1 { "" } else { "s" },
        esc(&names(&s.parameters))
    );
    let questions = [
        (
            SpreadKind::Variants,
            "Does the choice of treatment change the result?",
        ),
        (
            SpreadKind::Laws,
            "Does it matter which scattering law is right?",
        ),
        (
            SpreadKind::Envelope,
            "What do the surfaces known only by their scattering coefficient leave open?",
        ),
    ];
    for (kind, question) in questions {
        let Some(a) = answer(doc, kind) else {
            continue;
        };
        let mut parts = Vec::new();
        if !a.robust.is_empty() {
            parts.push(format!(
                "holds for {} at every receiver",
                esc(&names(&a.robust))
            ));
        }
        if !a.sensitive.is_empty() {
            parts.push(format!(
                "differs by more than a JND: {}",
                esc(&a.sensitive.join("; "))
            ));
        }
        if !a.undecided.is_empty() {
            parts.push(format!(
                "within noise for {} (more rays would tell)",
                esc(&names(&a.undecided))
            ));
        }
        let advice = if kind == SpreadKind::Envelope && !a.sensitive.is_empty() {
            " Those results depend on how the s-only surfaces spread their scattered energy: give them diffusion coefficients or polar data before relying on them."
        } else {
            ""
        };
        let _ = write!(
            h,
            "<li><strong>{}</strong> {}.{advice}</li>",
            esc(question),
            parts.join("; ")
        );
    }
    h.push_str("</ul></section>\n");
}
