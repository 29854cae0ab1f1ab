//! One self-contained HTML page to share a result with people who will not run a
//! command line: a solved flowsheet (`solve --report`, `check --report`), a
//! comparison (`compare --report`) or a sweep (`sweep --report`).
//!
//! The page carries everything inline — its style sheet and its plots as SVG — and
//! needs no network, script or font file; it reads and prints the same with
//! scripts disabled. The order is the order an engineer reads in: what it is, the
//! verdict, the headline figures, the plots, the tables, the balances, the input
//! and the cautions.

use super::solution::{
    account_table, equipment_table, spin_table, stream_table, summary_rows, ResultTable,
};
use super::table::Align;
use crate::error::Result;
use crate::flowsheet::Plant;
use crate::rules::{Finding, Severity};
use crate::solve::Solution;
use crate::study::compare::Compared;
use crate::study::Sweep;

/// What a page says about where it came from.
#[derive(Debug, Clone)]
pub struct Provenance {
    /// The date it was made, `YYYY-MM-DD` (UTC).
    pub date: String,
    /// The command that made it, as typed.
    pub command: String,
}

impl Provenance {
    /// Today's date (UTC, from the system clock) and the command.
    pub fn now(command: String) -> Provenance {
        let seconds = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_secs());
        Provenance {
            date: civil_date(seconds / 86_400),
            command,
        }
    }
}

/// The calendar date of a day counted from 1970-01-01 (proleptic Gregorian; the
/// days-to-civil algorithm of H. Hinnant, "chrono-compatible low-level date
/// algorithms").
pub fn civil_date(days: u64) -> String {
    let z = days as i64 + 719_468;
    let era = z.div_euclid(146_097);
    let day_of_era = z - era * 146_097;
    let year_of_era =
        (day_of_era - day_of_era / 1460 + day_of_era / 36_524 - day_of_era / 146_096) / 365;
    let day_of_year = day_of_era - (365 * year_of_era + year_of_era / 4 - year_of_era / 100);
    let shifted_month = (5 * day_of_year + 2) / 153;
    let day = day_of_year - (153 * shifted_month + 2) / 5 + 1;
    let month = if shifted_month < 10 {
        shifted_month + 3
    } else {
        shifted_month - 9
    };
    let year = year_of_era + era * 400 + i64::from(month <= 2);
    format!("{year:04}-{month:02}-{day:02}")
}

/// Text made safe inside HTML elements and attributes.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
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

/// The style sheet: screen and print.
const STYLE: &str = r#"
:root { --ink: #1b1f24; --muted: #5a6270; --line: #d6dae0; --band: #f4f6f8;
        --error: #a4161a; --warning: #9a5b00; --note: #2c5d8a; --best: #e3f1e6; }
* { box-sizing: border-box; }
body { font-family: "DejaVu Sans", "Segoe UI", Helvetica, Arial, sans-serif; color: var(--ink);
       max-width: 1180px; margin: 0 auto; padding: 24px 28px 60px; line-height: 1.45; }
h1 { font-size: 1.7em; margin: 0 0 6px; }
h2 { font-size: 1.25em; border-bottom: 2px solid var(--ink); padding-bottom: 3px; margin-top: 34px; }
h3 { font-size: 1.05em; margin: 22px 0 6px; }
.meta { color: var(--muted); font-size: 0.92em; margin: 2px 0; }
.notes { white-space: pre-line; margin: 10px 0; }
table { border-collapse: collapse; margin: 8px 0 14px; font-size: 0.92em; }
th, td { border-bottom: 1px solid var(--line); padding: 4px 10px; vertical-align: top; }
th { background: var(--band); text-align: left; font-weight: 600; }
td.number, th.number { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
table.summary th { background: none; width: 15em; font-weight: 600; }
td.best { background: var(--best); font-weight: 600; }
.finding { border-left: 5px solid var(--note); padding: 6px 12px; margin: 10px 0; background: var(--band); }
.finding.error { border-color: var(--error); }
.finding.warning { border-color: var(--warning); }
.severity { font-weight: 700; text-transform: uppercase; font-size: 0.85em; letter-spacing: 0.04em; }
.error .severity { color: var(--error); }
.warning .severity { color: var(--warning); }
.note .severity { color: var(--note); }
.hint { margin: 4px 0 0; }
.verdict-line { font-size: 1.08em; font-weight: 600; }
.verdict-line.bad { color: var(--error); }
.verdict-line.good { color: #1d6b33; }
figure { margin: 14px 0 24px; }
figure svg { max-width: 100%; height: auto; border: 1px solid var(--line); }
figcaption { color: var(--muted); font-size: 0.9em; margin-top: 4px; }
pre { background: var(--band); border: 1px solid var(--line); padding: 10px 12px; font-size: 0.85em;
      overflow-x: auto; white-space: pre-wrap; }
.caution { border: 2px solid var(--warning); padding: 10px 14px; }
footer { color: var(--muted); font-size: 0.85em; margin-top: 40px; border-top: 1px solid var(--line); padding-top: 8px; }
@media print {
  body { max-width: none; padding: 0; font-size: 10.5pt; }
  h2 { break-before: page; break-after: avoid; }
  h3 { break-after: avoid; }
  #verdict h2, #summary h2 { break-before: auto; }
  table, figure, .finding { break-inside: avoid; }
  thead { display: table-header-group; }
  tr { break-inside: avoid; }
  figure svg { border: none; }
  a { color: inherit; text-decoration: none; }
}
"#;

/// A whole page around `body`.
fn page(title: &str, body: &str) -> String {
    format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <title>{}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n{body}\n<footer>Made by cryochain {} — figures for planning and feasibility only; design, build and operate to local codes and licensed engineering practice.</footer>\n</body>\n</html>\n",
        escape(title),
        env!("CARGO_PKG_VERSION"),
    )
}

/// A table of results as HTML; numbers right-aligned.
fn table(result: &ResultTable) -> String {
    let mut out = String::from("<table>\n<thead><tr>");
    for (header, align) in &result.headers {
        let class = if *align == Align::Right {
            " class=\"number\""
        } else {
            ""
        };
        out.push_str(&format!("<th{class}>{}</th>", escape(header)));
    }
    out.push_str("</tr></thead>\n<tbody>\n");
    for row in &result.rows {
        out.push_str("<tr>");
        for (cell, (_, align)) in row.iter().zip(&result.headers) {
            let class = if *align == Align::Right {
                " class=\"number\""
            } else {
                ""
            };
            out.push_str(&format!("<td{class}>{}</td>", escape(cell)));
        }
        out.push_str("</tr>\n");
    }
    out.push_str("</tbody>\n</table>\n");
    out
}

/// The findings, errors first, each with its hint; or a line saying there are none.
fn verdict(findings: &[Finding]) -> String {
    let errors = findings
        .iter()
        .filter(|f| f.severity == Severity::Error)
        .count();
    let warnings = findings
        .iter()
        .filter(|f| f.severity == Severity::Warning)
        .count();
    let mut out = String::from("<section id=\"verdict\">\n<h2>Verdict</h2>\n");
    let (class, words) = match (errors, warnings) {
        (0, 0) => (
            "good",
            "No design errors or warnings: the layout works as drawn.".to_string(),
        ),
        (0, w) => (
            "good",
            format!(
                "No design errors; {w} warning{} to read.",
                if w == 1 { "" } else { "s" }
            ),
        ),
        (e, w) => (
            "bad",
            format!(
                "The design has {e} error{}: it cannot work as drawn; {w} warning{}.",
                if e == 1 { "" } else { "s" },
                if w == 1 { "" } else { "s" }
            ),
        ),
    };
    out.push_str(&format!(
        "<p class=\"verdict-line {class}\">{}</p>\n",
        escape(&words)
    ));
    let mut ordered: Vec<&Finding> = findings.iter().collect();
    ordered.sort_by_key(|f| f.severity);
    for f in ordered {
        let word = f.severity.word();
        out.push_str(&format!(
            "<div class=\"finding {word}\"><span class=\"severity\">{word}</span> {}<code>{}</code>\n<p>{}</p>\n<p class=\"hint\">→ {}</p></div>\n",
            f.equipment
                .as_deref()
                .map_or(String::new(), |e| format!("<strong>{}</strong> ", escape(e))),
            escape(&f.id),
            escape(&f.message),
            escape(&f.hint),
        ));
    }
    out.push_str("</section>\n");
    out
}

/// The property sources of the fluids a result uses, as people cite them.
fn sources(fluids: &[String]) -> String {
    let mut cited: Vec<String> = Vec::new();
    for name in fluids {
        if let Ok(fluid) = crate::fluids::fluid(name) {
            let line = format!("{}: {}", fluid.name, fluid.source);
            if !cited.contains(&line) {
                cited.push(line);
            }
        }
    }
    cited
        .iter()
        .map(|c| format!("<li>{}</li>", escape(c)))
        .collect::<Vec<_>>()
        .join("\n")
}

/// The head of a page: title, notes, provenance and property sources.
fn header(
    title: &str,
    notes: &str,
    what: &str,
    provenance: &Provenance,
    fluids: &[String],
) -> String {
    let mut out = format!("<header>\n<h1>{}</h1>\n", escape(title));
    if !notes.trim().is_empty() {
        out.push_str(&format!(
            "<p class=\"notes\">{}</p>\n",
            escape(notes.trim())
        ));
    }
    out.push_str(&format!(
        "<p class=\"meta\">{} · made {} with cryochain {} · <code>{}</code></p>\n",
        escape(what),
        escape(&provenance.date),
        env!("CARGO_PKG_VERSION"),
        escape(&provenance.command)
    ));
    let cited = sources(fluids);
    if !cited.is_empty() {
        out.push_str(&format!(
            "<details class=\"meta\" open><summary>Property sources</summary><ul>\n{cited}\n</ul></details>\n"
        ));
    }
    out.push_str("</header>\n");
    out
}

/// The caution for the fluids present, as a section.
fn cautions(fluids: &[String]) -> String {
    let text = super::caution::caution(fluids).replace('\n', " ");
    format!(
        "<section id=\"cautions\">\n<h2>Cautions</h2>\n<p class=\"caution\">{}</p>\n<p class=\"meta\">The fuller text is in docs/safety.md of cryochain.</p>\n</section>\n",
        escape(text.trim())
    )
}

/// The page of one solved flowsheet: its findings, figures, plots, tables,
/// balances, the input as given and the cautions.
pub fn solution_page(
    plant: &Plant,
    solution: &Solution,
    findings: &[Finding],
    flowsheet_text: &str,
    provenance: &Provenance,
    units: super::Units,
) -> Result<String> {
    let mut body = header(
        &solution.title,
        &plant.notes,
        &format!("flowsheet {}", solution.source),
        provenance,
        &solution.fluids,
    );
    body.push_str(&verdict(findings));
    body.push_str("<section id=\"summary\">\n<h2>Summary</h2>\n<table class=\"summary\">\n");
    for (label, value) in summary_rows(solution, units) {
        body.push_str(&format!(
            "<tr><th>{}</th><td>{}</td></tr>\n",
            escape(label),
            escape(&value)
        ));
    }
    body.push_str(&format!(
        "</table>\n<p class=\"meta\">Ambient {:.2} K; converged in {} passes; tear streams: {}.</p>\n</section>\n",
        solution.ambient,
        solution.iterations,
        escape(&if solution.tears.is_empty() {
            "none".to_string()
        } else {
            solution.tears.join(", ")
        })
    ));
    body.push_str("<section id=\"plots\">\n<h2>Plots</h2>\n");
    for plot in super::plot::cycle::cycle_plots(plant, solution)? {
        let mut svg = String::new();
        plot.render(super::plot::Canvas::Svg(&mut svg))?;
        body.push_str(&format!(
            "<figure id=\"plot-{}\">\n{}\n<figcaption>{}</figcaption>\n</figure>\n",
            escape(&plot.stem),
            svg,
            escape(&plot.caption)
        ));
    }
    body.push_str("</section>\n");
    body.push_str("<section id=\"streams\">\n<h2>Streams</h2>\n");
    body.push_str(&table(&stream_table(solution, units)));
    if let Some(spin) = spin_table(solution) {
        body.push_str(&format!(
            "<h3>{}</h3>\n{}",
            escape(&spin.title),
            table(&spin)
        ));
    }
    body.push_str("</section>\n<section id=\"equipment\">\n<h2>Equipment</h2>\n");
    body.push_str(&table(&equipment_table(solution)));
    body.push_str("</section>\n<section id=\"balances\">\n<h2>Exergy account and balances</h2>\n");
    let account = account_table(solution);
    body.push_str(&format!(
        "<p>{}</p>\n{}",
        escape(&account.title),
        table(&account)
    ));
    let s = &solution.summary;
    body.push_str(&format!(
        "<p>Balance closure (relative): mass {:.1e}, energy {:.1e}, exergy {:.1e}.</p>\n</section>\n",
        s.mass_closure, s.energy_closure, s.exergy_closure
    ));
    body.push_str(&format!(
        "<section id=\"input\">\n<h2>Input flowsheet</h2>\n<p class=\"meta\">{}</p>\n<pre>{}</pre>\n</section>\n",
        escape(&solution.source),
        escape(flowsheet_text)
    ));
    body.push_str(&cautions(&solution.fluids));
    Ok(page(&solution.title, &body))
}

/// The page of a comparison: the flowsheets side by side, the best feasible value
/// of each figure highlighted (a flowsheet with design errors or that failed is
/// never highlighted), and the bar chart.
pub fn comparison_page(
    cases: &[Compared],
    chart_svg: &str,
    fluids: &[String],
    provenance: &Provenance,
) -> String {
    let mut body = header(
        "Comparison of flowsheets",
        "",
        &format!("{} flowsheets", cases.len()),
        provenance,
        fluids,
    );
    type Figure = fn(&crate::solve::Summary) -> Option<f64>;
    // (label, the figure, decimals, whether more is better)
    let rows: [(&str, Figure, usize, bool); 8] = [
        ("liquid yield", |s| s.liquid_yield, 5, true),
        (
            "liquid production [kg/h]",
            |s| Some(s.liquid_flow * 3600.0),
            3,
            true,
        ),
        ("shaft power [kW]", |s| Some(s.shaft_power / 1e3), 3, false),
        (
            "precooling work [kW]",
            |s| Some(s.precooling_work / 1e3),
            3,
            false,
        ),
        (
            "cryogen bought [kg per kg liquid]",
            |s| s.cryogen_per_kg_liquid(),
            3,
            false,
        ),
        ("specific energy [kWh/kg]", |s| s.specific_energy, 3, false),
        ("figure of merit", |s| s.figure_of_merit, 4, true),
        (
            "para fraction of the hydrogen product",
            |s| s.hydrogen_storage.map(|h| h.para_fraction),
            4,
            true,
        ),
    ];
    body.push_str(
        "<section id=\"summary\">\n<h2>Side by side</h2>\n<table>\n<thead><tr><th>figure</th>",
    );
    for case in cases {
        body.push_str(&format!("<th class=\"number\">{}</th>", escape(&case.name)));
    }
    body.push_str("</tr></thead>\n<tbody>\n<tr><th>status</th>");
    for case in cases {
        let status = match (&case.outcome, case.design_errors) {
            (Err(e), _) => format!("failed: {e}"),
            (Ok(_), 0) => "ok".to_string(),
            (Ok(_), n) => format!(
                "INFEASIBLE: {n} design error{}",
                if n == 1 { "" } else { "s" }
            ),
        };
        body.push_str(&format!("<td class=\"number\">{}</td>", escape(&status)));
    }
    body.push_str("</tr>\n");
    for (label, figure, decimals, more_is_better) in rows {
        let values: Vec<Option<f64>> = cases
            .iter()
            .map(|c| {
                c.outcome
                    .as_ref()
                    .ok()
                    .and_then(figure)
                    .filter(|v| v.is_finite())
            })
            .collect();
        if values.iter().all(Option::is_none) {
            continue;
        }
        let feasible = |i: usize| cases[i].outcome.is_ok() && cases[i].design_errors == 0;
        let best = values
            .iter()
            .enumerate()
            .filter(|(i, v)| feasible(*i) && v.is_some())
            .map(|(i, v)| (i, v.unwrap_or_default()))
            .reduce(|a, b| {
                let better = if more_is_better { b.1 > a.1 } else { b.1 < a.1 };
                if better {
                    b
                } else {
                    a
                }
            })
            .map(|(i, _)| i);
        let distinct = values.iter().flatten().any(|v| {
            (v - values.iter().flatten().next().copied().unwrap_or(*v)).abs() > 1e-12 * v.abs()
        });
        body.push_str(&format!("<tr><th>{}</th>", escape(label)));
        for (i, value) in values.iter().enumerate() {
            let class = if distinct && Some(i) == best {
                "number best"
            } else {
                "number"
            };
            body.push_str(&format!(
                "<td class=\"{class}\">{}</td>",
                value.map_or("—".to_string(), |v| format!("{v:.decimals$}"))
            ));
        }
        body.push_str("</tr>\n");
    }
    body.push_str("</tbody>\n</table>\n<p class=\"meta\">Highlighted: the best value of each figure among the flowsheets that solve without design errors.</p>\n</section>\n");
    body.push_str(&format!(
        "<section id=\"plots\">\n<h2>Plot</h2>\n<figure>\n{chart_svg}\n<figcaption>Liquid yield and specific energy of each flowsheet.</figcaption>\n</figure>\n</section>\n"
    ));
    body.push_str(&cautions(fluids));
    page("Comparison of flowsheets", &body)
}

/// The page of a sweep: the headline, the plot and every case.
pub fn sweep_page(
    study: &Sweep,
    source: &str,
    chart_svg: &str,
    fluids: &[String],
    provenance: &Provenance,
) -> String {
    let title = format!("Sweep of {source}");
    let mut body = header(
        &title,
        "",
        &format!("flowsheet {source}"),
        provenance,
        fluids,
    );
    let text = super::study::sweep_text(study);
    let (table_text, headline) = match text.trim_end().rsplit_once("\n\n") {
        Some((table, headline)) => (table.to_string(), headline.to_string()),
        None => (text.clone(), String::new()),
    };
    body.push_str(&format!(
        "<section id=\"summary\">\n<h2>Result</h2>\n<p class=\"verdict-line\">{}</p>\n</section>\n",
        escape(headline.trim())
    ));
    body.push_str(&format!(
        "<section id=\"plots\">\n<h2>Plot</h2>\n<figure>\n{chart_svg}\n<figcaption>Liquid yield over the swept parameters; infeasible and failed cases are marked apart.</figcaption>\n</figure>\n</section>\n"
    ));
    body.push_str(&format!(
        "<section id=\"cases\">\n<h2>Every case</h2>\n<pre>{}</pre>\n</section>\n",
        escape(&table_text)
    ));
    body.push_str(&cautions(fluids));
    page(&title, &body)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Dates by hand: the epoch, a leap day, and a day of this century.
    #[test]
    fn civil_dates() {
        assert_eq!(civil_date(0), "1970-01-01");
        assert_eq!(civil_date(11_016), "2000-02-29");
        assert_eq!(civil_date(20_791), "2026-12-04");
    }

    #[test]
    fn text_is_escaped() {
        assert_eq!(escape("a<b & \"c\"'"), "a&lt;b &amp; &quot;c&quot;&#39;");
    }
}
