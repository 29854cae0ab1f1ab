//! The HTML report (`--report FILE`), checked as a file and rendered in a real
//! browser: Debian's headless Chromium, which `.ci/run` installs. For every demo
//! flowsheet, a comparison and a sweep: the page holds every section in reading
//! order, loads nothing from outside, renders without console errors, shows the
//! summary's figures in the rendered DOM, and its screenshot is not blank.
//!
//! Where Chromium is missing the browser half is skipped with a message, except
//! under CI (`CI` set), where a missing browser fails the test.

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn folder() -> PathBuf {
    let dir = std::env::temp_dir().join(format!("cryochain-html-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// The browser, or None (and a failure under CI).
fn chromium() -> Option<&'static str> {
    let found = ["chromium", "chromium-browser"]
        .into_iter()
        .find(|name| Command::new(name).arg("--version").output().is_ok());
    if found.is_none() {
        assert!(
            std::env::var_os("CI").is_none(),
            "Chromium is not installed; .ci/run installs Debian's chromium"
        );
        eprintln!(
            "skipped the browser checks: chromium is not installed (bash .ci/run installs it)"
        );
    }
    found
}

/// Runs headless Chromium on the page with `mode` (`--dump-dom` or
/// `--screenshot=FILE`); returns (stdout, stderr).
fn browse(browser: &str, page: &Path, mode: &str) -> (String, String) {
    // A profile of its own each time: browsers sharing one refuse to start.
    static RUNS: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
    let run = RUNS.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
    let profile = folder().join(format!("chromium-profile-{run}"));
    let out = Command::new(browser)
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
            "--window-size=1280,2000",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .arg(mode)
        .arg(format!("file://{}", page.display()))
        .output()
        .unwrap();
    (
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// The page in the browser: no console output (the page has no script), the
/// expected texts in the rendered DOM, a screenshot with real content.
fn check_in_browser(page: &Path, expected: &[&str]) {
    let Some(browser) = chromium() else {
        return;
    };
    let (dom, log) = browse(browser, page, "--dump-dom");
    assert!(
        !log.contains(":CONSOLE("),
        "{}: console output: {log}",
        page.display()
    );
    assert!(dom.contains("</html>"), "{}: no DOM", page.display());
    for text in expected {
        assert!(
            dom.contains(text),
            "{}: '{text}' not in the DOM",
            page.display()
        );
    }
    let shot = page.with_extension("png");
    let _ = std::fs::remove_file(&shot);
    browse(browser, page, &format!("--screenshot={}", shot.display()));
    let image = image::open(&shot)
        .unwrap_or_else(|e| panic!("{}: no screenshot: {e}", shot.display()))
        .to_rgb8();
    let mut colours = std::collections::HashSet::new();
    let mut dark = 0usize;
    for pixel in image.pixels() {
        colours.insert(pixel.0);
        if pixel.0.iter().all(|&c| c < 100) {
            dark += 1;
        }
    }
    assert!(
        colours.len() > 50,
        "{}: {} colours",
        shot.display(),
        colours.len()
    );
    assert!(
        dark > 2000,
        "{}: {dark} dark pixels: blank?",
        shot.display()
    );
}

/// What any page must hold: no reference to anything outside it.
fn self_contained(html: &str) {
    assert!(html.starts_with("<!DOCTYPE html>"));
    assert!(!html.contains("<script"), "a script");
    assert!(!html.contains("src=\""), "an external source");
    assert!(!html.contains("href=\"http"), "a link out");
    assert!(
        !html.contains("@import") && !html.contains("url("),
        "an external style"
    );
    assert!(html.contains("@media print"));
}

/// Every demo's page: the sections in reading order, its summary figures as the
/// JSON gives them, the plots inline, the input echoed, the cautions.
#[test]
fn every_demo_has_a_whole_report() {
    let dir = folder();
    let mut demos: Vec<PathBuf> = std::fs::read_dir(root().join("flowsheets"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "yaml"))
        .collect();
    demos.sort();
    assert_eq!(demos.len(), 7);
    for demo in &demos {
        let stem = demo.file_stem().unwrap().to_string_lossy().into_owned();
        let page = dir.join(format!("{stem}.html"));
        let (code, _, err) = common::run_in(
            root(),
            &[
                "solve",
                demo.to_str().unwrap(),
                "--report",
                page.to_str().unwrap(),
            ],
        );
        assert!(code == 0 || code == 2, "{stem}: {err}");
        assert!(err.contains("wrote the report"), "{err}");
        let html = std::fs::read_to_string(&page).unwrap();
        self_contained(&html);
        let positions: Vec<usize> = [
            "<h1>",
            "Property sources",
            "id=\"verdict\"",
            "id=\"summary\"",
            "id=\"plots\"",
            "id=\"streams\"",
            "id=\"equipment\"",
            "id=\"balances\"",
            "id=\"input\"",
            "id=\"cautions\"",
        ]
        .iter()
        .map(|marker| {
            html.find(marker)
                .unwrap_or_else(|| panic!("{stem}: no {marker}"))
        })
        .collect();
        assert!(
            positions.windows(2).all(|w| w[0] < w[1]),
            "{stem}: out of order"
        );
        assert!(html.matches("<svg").count() >= 3, "{stem}: plots missing");
        // The figures are the solver's: the liquid yield as the JSON has it.
        let (_, json, _) = common::run_in(root(), &["solve", demo.to_str().unwrap(), "--json"]);
        let value: serde_json::Value = serde_json::from_str(&json).unwrap();
        let yield_text = format!("{:.5}", value["liquid_yield"].as_f64().unwrap());
        assert!(html.contains(&yield_text), "{stem}: yield {yield_text}");
        // The input as given, escaped.
        let input = std::fs::read_to_string(demo).unwrap();
        let first_key = input.lines().find(|l| l.starts_with("title:")).unwrap();
        assert!(
            html.contains(&first_key.replace('\'', "&#39;")),
            "{stem}: input"
        );
        assert!(html.contains("follow local codes") || html.contains("local codes"));
        check_in_browser(&page, &["Verdict", "Summary", &yield_text, "Cautions"]);
    }
}

/// A design with errors says so first, in red words, before the figures.
#[test]
fn a_design_with_errors_leads_with_them() {
    let page = folder().join("refused.html");
    let (code, _, _) = common::run_in(
        root(),
        &[
            "check",
            "flowsheets/cascade-nitrogen-hydrogen.yaml",
            "--set",
            "n2-hx.warm_end_approach=3K",
            "--report",
            page.to_str().unwrap(),
        ],
    );
    assert_eq!(code, 2);
    let html = std::fs::read_to_string(&page).unwrap();
    let verdict = html.find("The design has 1 error").expect("verdict line");
    let finding = html.find("exchanger-spec-not-met").unwrap();
    assert!(verdict < finding && finding < html.find("id=\"summary\"").unwrap());
    check_in_browser(&page, &["The design has 1 error", "exchanger-spec-not-met"]);
}

/// A comparison: side by side, the best feasible value highlighted, an infeasible
/// flowsheet never highlighted.
#[test]
fn a_comparison_report() {
    let page = folder().join("comparison.html");
    let (code, _, err) = common::run_in(
        root(),
        &[
            "compare",
            "flowsheets/hydrogen-ln2-precooled.yaml",
            "tests/flowsheets/hydrogen-ln2-precooled-frozen-normal.yaml",
            "flowsheets/nitrogen-linde-hampson.yaml",
            "--report",
            page.to_str().unwrap(),
        ],
    );
    assert_eq!(code, 0, "{err}");
    let html = std::fs::read_to_string(&page).unwrap();
    self_contained(&html);
    assert!(html.contains("hydrogen-ln2-precooled-frozen-normal"));
    assert!(html.contains("class=\"number best\""));
    assert!(html.matches("<svg").count() == 1);
    // The frozen-normal demo makes the most liquid at once: its yield cell is
    // the best of that row.
    let row = html.find("<tr><th>liquid yield</th>").unwrap();
    let row_end = row + html[row..].find("</tr>").unwrap();
    let cells: Vec<&str> = html[row..row_end].split("<td").skip(1).collect();
    assert!(cells[1].contains("best"), "{}", &html[row..row_end]);
    check_in_browser(&page, &["Side by side", "liquid yield"]);
}

/// A sweep: the headline with its units, the plot, every case.
#[test]
fn a_sweep_report() {
    let page = folder().join("sweep.html");
    let (code, _, err) = common::run_in(
        root(),
        &[
            "sweep",
            "flowsheets/nitrogen-linde-hampson.yaml",
            "--vary",
            "compressor.outlet_pressure=100bar..200bar:3",
            "--report",
            page.to_str().unwrap(),
        ],
    );
    assert_eq!(code, 0, "{err}");
    let html = std::fs::read_to_string(&page).unwrap();
    self_contained(&html);
    assert!(html.contains("highest yield"), "headline");
    assert!(html.contains("id=\"cases\""));
    check_in_browser(&page, &["highest yield", "Every case"]);
}

/// A report that cannot be written is a file error, exit 4, naming the path.
#[test]
fn an_unwritable_report_is_a_file_error() {
    let (code, _, err) = common::run_in(root(), &["solve", "--report", "/proc/nope/report.html"]);
    assert_eq!(code, 4, "{err}");
    assert!(err.contains("/proc/nope/report.html"), "{err}");
}
