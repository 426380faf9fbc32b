//! The HTML text of the comparison report.

use std::fmt::Write as _;

use super::charts::Chart;
use super::{band_label, pair_slug, run_styles, RunStyle};
use crate::compare::document::{ComparisonDocument, Spread, SpreadKind, SpreadRow};
use crate::compare::verdict::judge;
use crate::compare::{Parameter, Verdict};

/// Escapes text for HTML element content and attribute values.
fn esc(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            _ => out.push(c),
        }
    }
    out
}

/// A value in the parameter's display unit, `–` where undefined.
fn value_text(p: Parameter, v: Option<f64>) -> String {
    let (scale, _) = p.display_unit();
    let d = p.display_decimals();
    v.map_or_else(|| "–".into(), |x| format!("{:.d$}", x * scale))
}

/// A standard error in the display unit, one more decimal than the value.
fn se_text(p: Parameter, v: Option<f64>) -> String {
    let (scale, _) = p.display_unit();
    let d = p.display_decimals() + 1;
    v.map_or_else(|| "–".into(), |x| format!("{:.d$}", x * scale))
}

fn unit_suffix(p: Parameter) -> String {
    match p.display_unit().1 {
        "" => String::new(),
        u => format!(" {u}"),
    }
}

const STYLE: &str = r#"
:root { --paper:#faf8f3; --ink:#282c34; --muted:#6b6f76; --rule:#ded9cf; --teal:#1b6f7a;
  --robust:#d6eadf; --noise:#f5e7c6; --sensitive:#f2d0c4; --na:#e7e4dd; }
* { box-sizing: border-box; }
body { margin:0; background:var(--paper); color:var(--ink);
  font: 15px/1.5 "Source Sans 3", "Segoe UI", "Helvetica Neue", Arial, sans-serif; }
header.masthead { background:var(--ink); color:var(--paper); padding:28px 40px 22px; }
header.masthead .kicker { margin:0; letter-spacing:.12em; text-transform:uppercase; font-size:12px; color:#c9d6d2; }
header.masthead h1 { margin:6px 0 6px; font-size:28px; font-weight:600; }
header.masthead .meta { margin:0; font-size:13px; color:#c9d6d2; }
main { max-width:1120px; margin:0 auto; padding:18px 32px 40px; }
h2 { font-size:22px; margin:36px 0 8px; padding-bottom:4px; border-bottom:2px solid var(--teal); }
h3 { font-size:18px; margin:26px 0 6px; }
h4 { font-size:15.5px; margin:18px 0 4px; }
table.verdicts { width:100%; table-layout:fixed; }
p.lead { color:var(--muted); margin-top:0; }
aside.caution { border-left:6px solid #d08c2b; background:#fff7e8; padding:10px 18px; margin:18px 0; }
aside.caution h2 { border:0; margin:4px 0; font-size:17px; }
aside.caution ul { margin:4px 0 6px 18px; padding:0; }
nav.contents { font-size:14px; margin:8px 0 0; }
nav.contents a { margin-right:14px; color:var(--teal); }
table { border-collapse:collapse; margin:8px 0 14px; font-size:13.5px; }
th, td { border:1px solid var(--rule); padding:4px 8px; vertical-align:top; }
th { background:#efebe2; text-align:left; font-weight:600; }
td.num { text-align:right; font-variant-numeric:tabular-nums; white-space:nowrap; }
td.v { min-width:118px; }
td.v .vl { display:block; font-weight:600; }
td.v .vn, td.v .vp { display:block; font-size:12px; color:#44484f; font-variant-numeric:tabular-nums; }
.v-robust { background:var(--robust); } .v-within_noise { background:var(--noise); }
.v-sensitive { background:var(--sensitive); } .v-undefined { background:var(--na); }
span.chip { display:inline-block; padding:1px 8px; border-radius:9px; font-size:12.5px; margin-right:6px; }
span.swatch { display:inline-block; width:22px; height:10px; margin-right:6px; vertical-align:middle; border-radius:2px; }
details { margin:4px 0 14px; } summary { cursor:pointer; color:var(--teal); font-size:14px; }
figure { margin:14px 0 22px; background:#fff; border:1px solid var(--rule); padding:6px; }
figure svg { display:block; width:100%; height:auto; }
figcaption { font-size:13px; color:var(--muted); padding:4px 6px 0; }
code { font-size:12.5px; background:#efebe2; padding:0 3px; }
footer { border-top:1px solid var(--rule); color:var(--muted); font-size:13px; padding:14px 40px 30px; }
.grid2 { display:grid; grid-template-columns:1fr 1fr; gap:12px; }
@media (max-width: 800px) { .grid2 { grid-template-columns:1fr; } main { padding:12px; } }
"#;

/// Marks on `<body>` how many charts there are and whether each has drawn
/// content with a size, so a headless browser can tell that every image rendered.
const CHECK_SCRIPT: &str = r#"<script>
(function () {
  var svgs = document.querySelectorAll("figure svg");
  var bad = [];
  for (var i = 0; i < svgs.length; i++) {
    var box = svgs[i].getBoundingClientRect();
    if (!(box.width > 0 && box.height > 0 && svgs[i].childElementCount > 0)) { bad.push(svgs[i].parentNode.id); }
  }
  document.body.setAttribute("data-charts", String(svgs.length));
  document.body.setAttribute("data-charts-ok", bad.length === 0 ? "yes" : "no: " + bad.join(" "));
})();
</script>"#;

/// The whole page.
pub(super) fn render(doc: &ComparisonDocument, charts: &[Chart], svgs: &[String]) -> String {
    let styles = run_styles(doc);
    let svg_of = |name: &str| {
        charts
            .iter()
            .position(|c| c.name == name)
            .and_then(|i| svgs.get(i))
            .map(String::as_str)
    };
    let s = &doc.settings;
    let mut h = String::new();
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>{} · polaray comparison</title>\n<style>{STYLE}</style>\n</head>\n<body>\n",
        esc(&doc.name)
    );
    let _ = write!(
        h,
        "<header class=\"masthead\"><p class=\"kicker\">polaray · comparison of scattering treatments</p><h1>{}</h1><p class=\"meta\">room {} · {} runs · {} rays per source in {} batches · seed {} · laws {} · estimator {} · polaray {}</p></header>\n<main>\n",
        esc(&doc.name),
        esc(&s.room),
        doc.runs.len(),
        s.rays_per_source,
        s.batches,
        s.seed,
        esc(&s.laws.join(", ")),
        s.estimator.name(),
        esc(&doc.provenance.polaray_version)
    );
    super::summary::summary(&mut h, doc, &esc);
    cautions(&mut h, doc);
    h.push_str("<nav class=\"contents\"><a href=\"#summary\">Summary</a><a href=\"#reading\">How to read</a><a href=\"#verdicts\">Verdicts</a><a href=\"#receivers\">Receivers</a><a href=\"#surfaces\">Surfaces</a><a href=\"#provenance\">Provenance</a></nav>\n");
    reading(&mut h, doc);
    verdicts(&mut h, doc);
    receivers(&mut h, doc, &styles, &svg_of);
    surfaces(&mut h, doc, charts, &svg_of);
    provenance(&mut h, doc);
    h.push_str("</main>\n<footer>");
    for c in &doc.cautions {
        let _ = write!(h, "{} ", esc(c));
    }
    h.push_str("</footer>\n");
    h.push_str(CHECK_SCRIPT);
    h.push_str("\n</body>\n</html>\n");
    h
}

fn cautions(h: &mut String, doc: &ComparisonDocument) {
    h.push_str("<aside class=\"caution\"><h2>Advisory results</h2><ul>");
    for c in &doc.cautions {
        let _ = write!(h, "<li>{}</li>", esc(c));
    }
    h.push_str("</ul></aside>\n");
}

fn chip(v: Verdict) -> String {
    format!(
        "<span class=\"chip v-{}\">{}</span>",
        v.key(),
        esc(v.label())
    )
}

fn reading(h: &mut String, doc: &ComparisonDocument) {
    let r = &doc.verdict_rule;
    let _ = write!(
        h,
        "<section id=\"reading\"><h2>How to read the verdicts</h2><p>Every difference between two runs is expressed in just noticeable differences (JND). {}; {}. Then:</p><ul>",
        esc(&r.spread),
        esc(&r.noise)
    );
    for v in &r.verdicts {
        let _ = write!(h, "<li>{} {}</li>", chip(v.verdict), esc(&v.rule));
    }
    let _ = write!(
        h,
        "</ul><p>{}.</p><p>{}.</p><p>Each table cell shows the verdict, then S and N of the deciding pair of runs, then that pair. Single-number values are means over bands: {}.</p>",
        esc(&r.several_runs),
        esc(&r.standard_errors),
        esc(&doc.settings.single_number)
    );
    h.push_str("<details><summary>JND table</summary><table><tr><th>parameter</th><th>JND</th><th>source</th></tr>");
    for j in &doc.jnds {
        let value = match j.kind {
            crate::metrics::jnd::JndKind::Relative => {
                format!("{:.0} % (relative)", j.value * 100.0)
            }
            crate::metrics::jnd::JndKind::Absolute => format!("{}", j.value),
        };
        let _ = write!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td></tr>",
            esc(j.parameter),
            esc(&value),
            esc(j.source)
        );
    }
    h.push_str("</table></details></section>\n");
}

/// Short name of a run inside a group: the law, the variant's tag, or the envelope end.
fn short_run(doc: &ComparisonDocument, id: &str, kind: SpreadKind) -> String {
    let Some(r) = doc.runs.iter().find(|r| r.id == id) else {
        return id.to_string();
    };
    match kind {
        SpreadKind::Laws => r.law.clone(),
        SpreadKind::Variants => r
            .variant
            .split_once(':')
            .map_or(r.variant.clone(), |(tag, _)| tag.trim().to_string()),
        SpreadKind::Envelope => match r.role {
            crate::compare::RunRole::EnvelopeLeastEven => "least even".into(),
            _ => "most even".into(),
        },
    }
}

/// "S … · N …" with as many decimals (2 to 4) as it takes for the verdict
/// rule, applied to the printed numbers, to give the verdict shown.
fn shown_s_n(s: f64, n: f64, verdict: Verdict) -> String {
    for d in 2..=4 {
        let text = format!("S {s:.d$} · N {n:.d$}");
        let round = |x: f64| format!("{x:.d$}").parse::<f64>().unwrap_or(x);
        if judge(round(s), round(n)) == verdict {
            return text;
        }
    }
    format!("S {s:.4} · N {n:.4}")
}

fn verdict_cell(doc: &ComparisonDocument, kind: SpreadKind, row: &SpreadRow) -> String {
    let Some(d) = row.differences.get(row.deciding) else {
        return format!(
            "<td class=\"v v-{}\"><span class=\"vl\">{}</span></td>",
            row.verdict.key(),
            esc(row.verdict.label())
        );
    };
    let p = row.parameter;
    let u = unit_suffix(p);
    let title = format!(
        "{} − {}: difference {}{u} ± {}{u} (standard error), JND {}{u}",
        d.to,
        d.from,
        se_text(p, d.difference),
        se_text(p, d.se),
        se_text(p, d.jnd)
    );
    let numbers = match (d.spread_jnd, d.noise_jnd) {
        (Some(s), Some(n)) => shown_s_n(s, n, row.verdict),
        (Some(s), None) => format!("S {s:.2} · N –"),
        _ => "S – · N –".into(),
    };
    // The physical difference beside the JNDs: to − from, in the display unit.
    let (scale, _) = p.display_unit();
    let decimals = p.display_decimals();
    let physical = d.difference.map_or_else(String::new, |x| {
        let shown = x * scale;
        // A difference that rounds to zero is shown unsigned ("0.00", not "-0.00").
        if (shown * 10f64.powi(decimals as i32)).round() == 0.0 {
            format!(": {:.decimals$}{u}", 0.0)
        } else {
            format!(": {shown:+.decimals$}{u}")
        }
    });
    format!(
        "<td class=\"v v-{}\" title=\"{}\"><span class=\"vl\">{}</span><span class=\"vn\">{}</span><span class=\"vp\">{} vs {}{}</span></td>",
        row.verdict.key(),
        esc(&title),
        esc(row.verdict.label()),
        numbers,
        esc(&short_run(doc, &d.to, kind)),
        esc(&short_run(doc, &d.from, kind)),
        esc(&physical)
    )
}

fn spread_table(h: &mut String, doc: &ComparisonDocument, spread: &Spread) {
    let params = &doc.settings.parameters;
    let _ = write!(
        h,
        "<h4>{}</h4><p class=\"lead\">Runs: {}.</p><table class=\"verdicts\"><tr><th>receiver</th>",
        esc(&spread.question),
        esc(&spread.runs.join("; "))
    );
    for p in params {
        let _ = write!(h, "<th>{}</th>", esc(&p.heading()));
    }
    h.push_str("</tr>");
    let pairs: Vec<(String, String)> = {
        let mut v: Vec<(String, String)> = Vec::new();
        for r in &spread.rows {
            let k = (r.source.clone(), r.receiver.clone());
            if !v.contains(&k) {
                v.push(k);
            }
        }
        v
    };
    let who = |src: &str, rec: &str| {
        if doc.settings.sources.len() > 1 {
            format!("{src} → {rec}")
        } else {
            rec.to_string()
        }
    };
    for (src, rec) in &pairs {
        let _ = write!(h, "<tr><th>{}</th>", esc(&who(src, rec)));
        for &p in params {
            match spread.rows.iter().find(|r| {
                &r.source == src && &r.receiver == rec && r.parameter == p && r.band_hz.is_none()
            }) {
                Some(row) => h.push_str(&verdict_cell(doc, spread.kind, row)),
                None => h.push_str("<td></td>"),
            }
        }
        h.push_str("</tr>");
    }
    h.push_str(
        "</table>\n<details><summary>Per band</summary><table><tr><th>receiver</th><th>band</th>",
    );
    for p in params {
        let _ = write!(h, "<th>{}</th>", esc(&p.heading()));
    }
    h.push_str("</tr>");
    for (src, rec) in &pairs {
        for &hz in &doc.settings.bands_hz {
            let _ = write!(h, "<tr><th>{}</th><td>{} Hz</td>", esc(&who(src, rec)), hz);
            for &p in params {
                match spread.rows.iter().find(|r| {
                    &r.source == src
                        && &r.receiver == rec
                        && r.parameter == p
                        && r.band_hz == Some(hz)
                }) {
                    Some(row) => h.push_str(&verdict_cell(doc, spread.kind, row)),
                    None => h.push_str("<td></td>"),
                }
            }
            h.push_str("</tr>");
        }
    }
    h.push_str("</table></details>\n");
}

fn verdicts(h: &mut String, doc: &ComparisonDocument) {
    h.push_str("<section id=\"verdicts\"><h2>Verdicts</h2>");
    let groups = [
        (
            SpreadKind::Laws,
            "Does the scattering treatment change the result?",
            "Each variant traced under every reflection law; the spread between laws is judged.",
        ),
        (
            SpreadKind::Variants,
            "Does the choice of surface treatment change the result?",
            "Every variant traced under one law; the spread between variants is judged, law by law. A conclusion that holds under every law does not depend on the scattering treatment.",
        ),
        (
            SpreadKind::Envelope,
            "What describing surfaces by s alone leaves open",
            "The s-only surfaces traced with the bounded law at the least even spread their scattering coefficient allows and at the most even one, at the bound.",
        ),
    ];
    for (kind, heading, lead) in groups {
        let group: Vec<&Spread> = doc.spreads.iter().filter(|s| s.kind == kind).collect();
        if group.is_empty() {
            if kind == SpreadKind::Envelope {
                if let Some(note) = &doc.envelope.note {
                    let _ = write!(
                        h,
                        "<h3>{}</h3><p class=\"lead\">No envelope: {}.</p>",
                        esc(heading),
                        esc(note)
                    );
                }
            }
            continue;
        }
        let _ = write!(
            h,
            "<h3>{}</h3><p class=\"lead\">{}</p>",
            esc(heading),
            esc(lead)
        );
        for s in group {
            spread_table(h, doc, s);
        }
    }
    h.push_str("</section>\n");
}

fn figure(h: &mut String, name: &str, svg: Option<&str>, caption: &str) {
    let Some(svg) = svg else { return };
    let svg = svg.trim_start_matches(|c: char| c != '<');
    let svg = if svg.starts_with("<?xml") {
        svg.split_once("?>")
            .map_or(svg, |(_, rest)| rest.trim_start())
    } else {
        svg
    };
    let _ = writeln!(
        h,
        "<figure id=\"fig-{}\">{}<figcaption>{} <a href=\"plots/{}.png\">PNG</a></figcaption></figure>",
        esc(name),
        svg.replacen("<svg ", &format!("<svg role=\"img\" aria-label=\"{}\" ", esc(caption)), 1),
        esc(caption),
        esc(name)
    );
}

fn receivers<'a>(
    h: &mut String,
    doc: &ComparisonDocument,
    styles: &[RunStyle],
    svg_of: &dyn Fn(&str) -> Option<&'a str>,
) {
    h.push_str("<section id=\"receivers\"><h2>Receivers</h2><p class=\"lead\">Single-number values of every run with their standard errors; echograms and decay curves in the chart band; every band in the bar charts.</p>");
    let Some(first) = doc.runs.first() else {
        h.push_str("</section>");
        return;
    };
    for (k, pair) in first.pairs.iter().enumerate() {
        let slug = pair_slug(doc, &pair.source, &pair.receiver);
        let who = if doc.settings.sources.len() > 1 {
            format!("{} at {}", pair.source, pair.receiver)
        } else {
            pair.receiver.clone()
        };
        let _ = write!(h, "<h3 id=\"r-{}\">{}</h3>", esc(&slug), esc(&who));
        for n in &pair.notes {
            let _ = write!(h, "<p class=\"lead\">Note: {}</p>", esc(n));
        }
        h.push_str("<table><tr><th>run</th>");
        for p in &doc.settings.parameters {
            let _ = write!(h, "<th>{}</th>", esc(&p.heading()));
        }
        h.push_str("</tr>");
        for (r, style) in doc.runs.iter().zip(styles) {
            let c = style.colour;
            let _ = write!(
                h,
                "<tr><th><span class=\"swatch\" style=\"background:rgb({},{},{})\"></span>{}</th>",
                c.0,
                c.1,
                c.2,
                esc(&r.id)
            );
            for &p in &doc.settings.parameters {
                let e = r
                    .pairs
                    .get(k)
                    .and_then(|x| x.parameters.iter().find(|q| q.parameter == p));
                match e {
                    Some(q) => {
                        let _ = write!(
                            h,
                            "<td class=\"num\">{} ± {}</td>",
                            value_text(p, q.single_number.value),
                            se_text(p, q.single_number.se)
                        );
                    }
                    None => h.push_str("<td></td>"),
                }
            }
            h.push_str("</tr>");
        }
        h.push_str("</table>");
        figure(
            h,
            &format!("echograms-{slug}"),
            svg_of(&format!("echograms-{slug}")),
            &format!("{who}: echograms of every run, one panel per variant."),
        );
        figure(
            h,
            &format!("decay-{slug}"),
            svg_of(&format!("decay-{slug}")),
            &format!("{who}: Schroeder decay curves of every run; envelope runs dashed."),
        );
        for p in &doc.settings.parameters {
            let name = format!("bars-{slug}-{}", p.short());
            figure(
                h,
                &name,
                svg_of(&name),
                &format!(
                    "{who}: {} per band and single-number value. Black: ±{} standard errors; grey brackets: ±½ JND, so bars whose brackets do not overlap differ by more than one JND.",
                    p.short(),
                    doc.settings.noise_factor
                ),
            );
        }
    }
    h.push_str("</section>\n");
}

fn surfaces<'a>(
    h: &mut String,
    doc: &ComparisonDocument,
    charts: &[Chart],
    svg_of: &dyn Fn(&str) -> Option<&'a str>,
) {
    h.push_str("<section id=\"surfaces\"><h2>Surfaces</h2>");
    figure(
        h,
        "diffusion-against-scattering",
        svg_of("diffusion-against-scattering"),
        "Diffusion coefficient against scattering coefficient per band for every material of the comparison. Above the bound d_max(min(s, s*)) (reference sheet §3) no surface can lie; the shaded band is what the bounded law reproduces. Vertical bars: the envelope of an s-only material, from its least even to its most even spread.",
    );
    h.push_str("<table><tr><th>material</th><th>from</th><th>used by</th><th>band</th>");
    for &hz in &doc.settings.bands_hz {
        let _ = write!(h, "<th>{}</th>", band_label(hz));
    }
    h.push_str("</tr>");
    for m in &doc.materials {
        let rows: Vec<(&str, Option<&Vec<f64>>)> = vec![
            ("α", Some(&m.absorption)),
            ("s", Some(&m.scattering)),
            ("d", m.diffusion.as_ref()),
        ];
        for (i, (what, values)) in rows.iter().enumerate() {
            if i == 0 {
                let _ = write!(
                    h,
                    "<tr><th rowspan=\"3\">{}{}</th><td rowspan=\"3\">{}</td><td rowspan=\"3\">{}</td>",
                    esc(&m.name),
                    if m.s_only { " (s only)" } else { "" },
                    esc(&m.defined_in),
                    esc(&m.used_by.join("; "))
                );
            } else {
                h.push_str("<tr>");
            }
            let _ = write!(h, "<td>{what}</td>");
            for b in 0..doc.settings.bands_hz.len() {
                let v = values
                    .and_then(|v| v.get(b))
                    .map_or("–".to_string(), |x| format!("{x:.3}"));
                let _ = write!(h, "<td class=\"num\">{v}</td>");
            }
            h.push_str("</tr>");
        }
    }
    h.push_str("</table>");
    if !doc.envelope.materials.is_empty() {
        let _ = write!(
            h,
            "<h3>The s-only envelope</h3><p class=\"lead\">Variant {}: each material below traced with the bounded law once at the least even and once at the most even diffusion coefficient its s allows (cells: s, then d least even – most even; the most even value sits at the bound d_max(min(s, s*))).</p><table><tr><th>material</th>",
            esc(doc.envelope.variant.as_deref().unwrap_or(""))
        );
        for &hz in &doc.settings.bands_hz {
            let _ = write!(h, "<th>{}</th>", band_label(hz));
        }
        h.push_str("</tr>");
        for m in &doc.envelope.materials {
            let _ = write!(h, "<tr><th>{}</th>", esc(&m.name));
            for b in &m.bands {
                let _ = write!(
                    h,
                    "<td class=\"num\">s {:.3}<br>d {:.3} – {:.3}</td>",
                    b.scattering, b.least_even, b.most_even
                );
            }
            h.push_str("</tr>");
        }
        h.push_str("</table>");
    }
    let polar: Vec<&Chart> = charts
        .iter()
        .filter(|c| c.name.starts_with("polar-"))
        .collect();
    if !polar.is_empty() {
        h.push_str("<h3>Polar responses of the treatments</h3><p class=\"lead\">Levels from the polar data files the polar law draws from, at the incidence nearest the normal.</p><div class=\"grid2\">");
        for c in polar {
            figure(
                h,
                &c.name,
                svg_of(&c.name),
                "Polar response of each treatment, dB.",
            );
        }
        h.push_str("</div>");
    }
    h.push_str("</section>\n");
}

fn provenance(h: &mut String, doc: &ComparisonDocument) {
    let s = &doc.settings;
    let p = &doc.provenance;
    let _ = write!(
        h,
        "<section id=\"provenance\"><h2>Provenance</h2><p>Written by polaray {}. A reviewer re-runs it with <code>{}</code>, which checks every input below against its SHA-256 and every number against this comparison.</p><table><tr><th>role</th><th>file</th><th>SHA-256</th></tr>",
        esc(&p.polaray_version),
        esc(&p.reproduce_command)
    );
    for f in &p.inputs {
        let _ = write!(
            h,
            "<tr><td>{}</td><td>{}</td><td><code>{}</code></td></tr>",
            esc(&f.role),
            esc(&f.path),
            esc(&f.sha256)
        );
    }
    h.push_str("</table><table>");
    let overrides = {
        let o = &p.overrides;
        let mut v = Vec::new();
        if let Some(r) = o.rays {
            v.push(format!("--rays {r}"));
        }
        if let Some(b) = o.batches {
            v.push(format!("--batches {b}"));
        }
        if let Some(x) = o.seed {
            v.push(format!("--seed {x}"));
        }
        if v.is_empty() {
            "none".to_string()
        } else {
            v.join(" ")
        }
    };
    let rows = [
        ("laws", s.laws.join(", ")),
        (
            "fallback law",
            s.fallback.clone().unwrap_or_else(|| "none".into()),
        ),
        (
            "rays per source",
            format!(
                "{} in {} batches of {}",
                s.rays_per_source, s.batches, s.rays_per_batch
            ),
        ),
        ("seed", s.seed.to_string()),
        ("random streams", s.stream_rule.clone()),
        ("command-line settings", overrides),
        (
            "bands",
            s.bands_hz
                .iter()
                .map(|b| format!("{b} Hz"))
                .collect::<Vec<_>>()
                .join(", "),
        ),
        (
            "echogram",
            format!("{:.3} s in {:.1} ms bins", s.duration_s, s.bin_s * 1e3),
        ),
        (
            "air",
            format!(
                "{} °C, {} % RH, {} kPa, absorption {}",
                s.temperature_c,
                s.humidity_pct,
                s.pressure_kpa,
                if s.air_absorption { "on" } else { "off" }
            ),
        ),
        (
            "sources",
            s.sources
                .iter()
                .map(|x| {
                    format!(
                        "{} ({:.2}, {:.2}, {:.2}) m",
                        x.name, x.position_m[0], x.position_m[1], x.position_m[2]
                    )
                })
                .collect::<Vec<_>>()
                .join("; "),
        ),
        (
            "receivers",
            s.receivers
                .iter()
                .map(|x| {
                    format!(
                        "{} ({:.2}, {:.2}, {:.2}) m, r = {} m",
                        x.name,
                        x.position_m[0],
                        x.position_m[1],
                        x.position_m[2],
                        x.radius_m.map_or("–".into(), |r| format!("{r:.2}"))
                    )
                })
                .collect::<Vec<_>>()
                .join("; "),
        ),
        ("noise factor k", s.noise_factor.to_string()),
        ("receiver estimator", s.estimator.describe()),
    ];
    for (k, v) in rows {
        let _ = write!(h, "<tr><th>{}</th><td>{}</td></tr>", esc(k), esc(&v));
    }
    h.push_str("</table><h3>Runs</h3><table><tr><th>run</th><th>law</th><th>role</th><th>segments</th><th>reflections</th><th>lost rays</th><th title=\"traced mean free path ÷ 4V/S; near 1 for a reciprocal law in a diffuse hall\">free path ÷ 4V/S</th></tr>");
    for r in &doc.runs {
        let role = match r.role {
            crate::compare::RunRole::Treatment => "treatment",
            crate::compare::RunRole::EnvelopeLeastEven => "envelope, least even",
            crate::compare::RunRole::EnvelopeMostEven => "envelope, most even",
        };
        let _ = write!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>",
            esc(&r.id),
            esc(&r.law),
            role,
            r.stats.segments,
            r.stats.reflections,
            r.stats.lost_rays,
            r.stats
                .free_path_ratio
                .map_or_else(|| "–".to_string(), |x| format!("{x:.3}"))
        );
    }
    h.push_str("</table>");
    if !doc.warnings.is_empty() {
        h.push_str("<h3>Warnings</h3><ul>");
        for w in &crate::report::grouped_warnings::group_by_band(&doc.warnings) {
            let _ = write!(h, "<li>{}</li>", esc(w));
        }
        h.push_str("</ul>");
    }
    h.push_str("</section>\n");
}
