//! The command-line contract end to end, on the real binary: every exit code of
//! docs/cli.md, output that cannot be written, and input that must be refused.
//! Each case failed before this was fixed (the old code is named beside it).

use std::io::Read;
use std::process::{Command, Stdio};

fn bin() -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_cryochain"));
    c.current_dir(env!("CARGO_MANIFEST_DIR"));
    c
}

fn run(args: &[&str]) -> (i32, String, String) {
    let out = bin().args(args).output().unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn temp_file(name: &str, text: &[u8]) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("cryochain-contract-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path
}

/// 0 success, 1 input, 2 design, 3 non-convergence, 4 file, 5 usage.
#[test]
fn every_exit_code() {
    assert_eq!(run(&["state", "nitrogen", "T=80K", "p=1bar"]).0, 0);
    assert_eq!(run(&["--version"]).0, 0);
    // 1: bad input (a unit missing).
    assert_eq!(run(&["state", "nitrogen", "T=80", "p=1bar"]).0, 1);
    // 2: a design with errors.
    let (code, out, _) = run(&[
        "solve",
        "flowsheets/cascade-nitrogen-hydrogen.yaml",
        "--set",
        "n2-hx.warm_end_approach=3K",
    ]);
    assert_eq!(code, 2);
    assert!(out.starts_with("Design checks"));
    // 3: a recycle that cannot converge in two passes.
    let (code, _, err) = run(&[
        "solve",
        "flowsheets/nitrogen-linde-hampson.yaml",
        "--set",
        "settings.max_iterations=2",
    ]);
    assert_eq!(code, 3, "{err}");
    assert!(err.contains("did not converge"), "{err}");
    // 4: a file that cannot be read (was 1).
    let (code, _, err) = run(&["solve", "/nonexistent/plant.yaml"]);
    assert_eq!(code, 4, "{err}");
    assert!(err.contains("cannot read /nonexistent/plant.yaml"));
    // 5: a usage error (was 2, the design-error code).
    assert_eq!(run(&["solve", "--no-such-option"]).0, 5);
    assert_eq!(run(&["no-such-command"]).0, 5);
}

/// 6: an internal fault. No input is known to reach it, so the binary's fault hook
/// (`CRYOCHAIN_INJECT_FAULT`) raises one where a real one would be: a panic and an
/// internal error both exit 6 with the message, never Rust's 101, and without the
/// default panic report.
#[test]
fn internal_faults_exit_six() {
    for (fault, words) in [
        ("panic", "fault injected by CRYOCHAIN_INJECT_FAULT=panic"),
        (
            "internal",
            "fault injected by CRYOCHAIN_INJECT_FAULT=internal",
        ),
    ] {
        let out = bin()
            .args(["state", "nitrogen", "T=80K", "p=1bar"])
            .env("CRYOCHAIN_INJECT_FAULT", fault)
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(6), "{fault}: {err}");
        assert!(err.contains(words), "{fault}: {err}");
        assert!(!err.contains("panicked at"), "{fault}: {err}");
        assert!(out.stdout.is_empty(), "{fault}");
    }
    // An unknown value is ignored: the command runs as usual.
    let out = bin()
        .args(["state", "nitrogen", "T=80K", "p=1bar"])
        .env("CRYOCHAIN_INJECT_FAULT", "none")
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
}

/// Output that cannot be written: a closed pipe ends quietly with success (was a
/// panic, exit 101); a full disk and a missing folder are file errors (were 1).
#[test]
fn output_that_cannot_be_written() {
    let mut child = bin()
        .args(["inversion", "hydrogen", "--json"])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let mut first = [0u8; 100];
    child
        .stdout
        .as_mut()
        .unwrap()
        .read_exact(&mut first)
        .unwrap();
    drop(child.stdout.take());
    let status = child.wait().unwrap();
    let mut err = String::new();
    child
        .stderr
        .take()
        .unwrap()
        .read_to_string(&mut err)
        .unwrap();
    assert!(status.code() == Some(0), "{status:?} {err}");
    assert!(!err.contains("panicked"), "{err}");

    let full = bin()
        .args(["solve", "--json"])
        .stdout(std::fs::File::create("/dev/full").unwrap())
        .output()
        .unwrap();
    assert_eq!(full.status.code(), Some(4));
    assert!(String::from_utf8_lossy(&full.stderr).contains("cannot write to standard output"));

    let (code, _, err) = run(&["solve", "--csv", "/proc/nope"]);
    assert_eq!(code, 4, "{err}");
    // A mistyped parent is named, and no tree is made.
    let base = std::env::temp_dir().join(format!("cryochain-typo-{}", std::process::id()));
    let deep = base.join("deep").join("plots");
    let (code, _, err) = run(&["solve", "--plot", deep.to_str().unwrap()]);
    assert_eq!(code, 4, "{err}");
    assert!(err.contains("does not exist"), "{err}");
    assert!(!base.exists());
}

/// Input that was accepted and must not be.
#[test]
fn input_that_is_refused() {
    // A key given twice inside one unit (the last won silently).
    let text = std::fs::read_to_string("flowsheets/nitrogen-linde-hampson.yaml").unwrap();
    let twice = text.replace(
        "    outlet_pressure: 200 atm\n",
        "    outlet_pressure: 200 atm\n    outlet_pressure: 100 atm\n",
    );
    let path = temp_file("twice.yaml", twice.as_bytes());
    let (code, _, err) = run(&["solve", path.to_str().unwrap()]);
    assert_eq!(code, 1);
    assert!(err.contains("'outlet_pressure' is given twice"), "{err}");
    // Two make-up feeds in one network (split 50/50 silently).
    let two = text.replace(
        "  - id: mixer\n    kind: mixer\n    inlets: [makeup, recuperator.cold-out]",
        "  - {id: makeup2, kind: feed, fluid: nitrogen, temperature: 300 K, pressure: 1 atm, flow: balance}\n  - id: mixer\n    kind: mixer\n    inlets: [makeup, recuperator.cold-out, makeup2]",
    );
    let path = temp_file("two-feeds.yaml", two.as_bytes());
    let (code, _, err) = run(&["solve", path.to_str().unwrap()]);
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains("'flow: balance' feeds of one flow network"),
        "{err}"
    );
    // Deep nesting is refused at once (200 000 brackets took 99 s).
    let deep = format!(
        "title: t\nambient: 300 K\nfluids: [nitrogen]\nequipment: {}{}\n",
        "[".repeat(200_000),
        "]".repeat(200_000)
    );
    let path = temp_file("deep.yaml", deep.as_bytes());
    let started = std::time::Instant::now();
    let (code, _, err) = run(&["solve", path.to_str().unwrap()]);
    assert_eq!(code, 1);
    assert!(err.contains("nest deeper than 32"), "{err}");
    assert!(started.elapsed().as_secs() < 30);
    // A number without its unit; a top-level list; bytes that are not text.
    let path = temp_file(
        "bare.yaml",
        text.replace("ambient: 300 K", "ambient: 300").as_bytes(),
    );
    let (_, _, err) = run(&["solve", path.to_str().unwrap()]);
    assert!(err.contains("has no unit"), "{err}");
    let path = temp_file("list.yaml", b"- a\n- b\n");
    let (_, _, err) = run(&["solve", path.to_str().unwrap()]);
    assert!(err.contains("the file holds a list"), "{err}");
    let path = temp_file("bytes.yaml", b"title: t\n\xff\xfe\x00garbage");
    let (code, _, err) = run(&["solve", path.to_str().unwrap()]);
    assert_eq!(code, 1);
    assert!(err.contains(":2:1: the file stops being UTF-8"), "{err}");
    // Overrides are blamed for their own faults (were blamed on the file).
    let (_, _, err) = run(&[
        "solve",
        "flowsheets/nitrogen-linde-hampson.yaml",
        "--set",
        "settings.tolerance=abc",
    ]);
    assert!(err.contains("--set settings.tolerance"), "{err}");
    let (_, _, err) = run(&[
        "solve",
        "flowsheets/nitrogen-linde-hampson.yaml",
        "--set",
        "flowsheet.ambient=1000K",
    ]);
    assert!(err.contains("--set flowsheet.ambient"), "{err}");
    // compare with no files (exit 0 with an empty table), the same --vary twice.
    assert_eq!(run(&["compare"]).0, 5);
    assert_eq!(run(&["merge-shards"]).0, 5);
    let (code, _, err) = run(&[
        "sweep",
        "flowsheets/nitrogen-linde-hampson.yaml",
        "--vary",
        "compressor.outlet_pressure=100bar..200bar:3",
        "--vary",
        "compressor.outlet_pressure=150bar..250bar:3",
    ]);
    assert_eq!(code, 1);
    assert!(err.contains("given twice"), "{err}");
}

/// A failing flowsheet keeps its row in a comparison; shards missing are named.
#[test]
fn comparisons_and_shards_keep_their_rows() {
    let bad = temp_file("broken.yaml", b"title: t\n");
    let (code, out, err) = run(&[
        "compare",
        "flowsheets/nitrogen-linde-hampson.yaml",
        bad.to_str().unwrap(),
    ]);
    assert_eq!(code, 1, "{err}");
    assert!(out.contains("nitrogen-linde-hampson"), "{out}");
    assert!(out.contains("broken") && out.contains("failed:"), "{out}");
    let sweep = |shard: &str, name: &str| {
        let csv =
            std::env::temp_dir().join(format!("cryochain-shard-{}-{name}", std::process::id()));
        let (code, _, err) = run(&[
            "sweep",
            "flowsheets/nitrogen-linde-hampson.yaml",
            "--vary",
            "compressor.outlet_pressure=100bar..200bar:3",
            "--vary",
            "recuperator.warm_end_approach=2K..4K:2",
            "--shard",
            shard,
            "--csv",
            csv.to_str().unwrap(),
        ]);
        assert_eq!(code, 0, "{err}");
        csv
    };
    let (a, c) = (sweep("1/3", "a.csv"), sweep("3/3", "c.csv"));
    let (code, _, err) = run(&["merge-shards", a.to_str().unwrap(), c.to_str().unwrap()]);
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("a shard is missing"), "{err}");
}

/// An oversized file is refused before parsing; a batch table keeps a ragged row
/// in its place with its error (one ragged row aborted the whole batch), with line
/// numbers that count comment lines.
#[test]
fn oversized_files_and_ragged_tables() {
    let big = format!("title: t\n{}", "# padding\n".repeat(200_000));
    let path = temp_file("big.yaml", big.as_bytes());
    let (code, _, err) = run(&["solve", path.to_str().unwrap()]);
    assert_eq!(code, 1);
    assert!(err.contains("at most 1048576 bytes"), "{err}");
    let table = temp_file("states.csv", b"# by hand\nT [K],p [bar]\n80,1\n90\n95,1\n");
    let (code, out, err) = run(&["table", table.to_str().unwrap(), "--fluid", "nitrogen"]);
    assert_eq!(code, 1, "{err}");
    assert_eq!(out.lines().count(), 4, "{out}");
    assert!(
        out.lines().nth(3).unwrap().starts_with("95,1,95.0"),
        "{out}"
    );
    assert!(
        err.contains("line 4: this row has 1 cells where the header has 2"),
        "{err}"
    );
}

/// Supercritical streams are labelled so, not "vapour 1.0000".
#[test]
fn phases_are_labelled_truthfully() {
    let (_, out, _) = run(&["solve", "flowsheets/nitrogen-linde-hampson.yaml"]);
    let line = out
        .lines()
        .find(|l| l.starts_with("compressor.out"))
        .unwrap();
    assert!(line.ends_with("supercrit."), "{line}");
    let line = out.lines().find(|l| l.starts_with("valve.out")).unwrap();
    assert!(line.contains("x 0.9"), "{line}");
}

/// The effective user id, from /proc/self/status (Linux).
fn effective_uid() -> u32 {
    let status = std::fs::read_to_string("/proc/self/status").unwrap();
    let line = status.lines().find(|l| l.starts_with("Uid:")).unwrap();
    line.split_whitespace().nth(2).unwrap().parse().unwrap()
}

/// A folder the user may not write to: a permission error names the path and the
/// system's reason and exits 4 (was `BackendError(DrawingError(Os{code:13…}))`).
/// Root may write anywhere, so as root the binary runs as `nobody` through
/// util-linux's setpriv; it runs from a copy under the temporary folder so that
/// `nobody` can reach it wherever the checkout lies.
#[test]
fn permission_errors_name_the_path() {
    use std::os::unix::fs::PermissionsExt;
    let base = std::env::temp_dir().join(format!("cryochain-eacces-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&base);
    std::fs::create_dir_all(&base).unwrap();
    std::fs::set_permissions(&base, std::fs::Permissions::from_mode(0o755)).unwrap();
    let exe = base.join("cryochain");
    std::fs::copy(env!("CARGO_BIN_EXE_cryochain"), &exe).unwrap();
    std::fs::set_permissions(&exe, std::fs::Permissions::from_mode(0o755)).unwrap();
    let locked = base.join("locked");
    std::fs::create_dir(&locked).unwrap();
    std::fs::set_permissions(&locked, std::fs::Permissions::from_mode(0o555)).unwrap();
    let as_user = |args: &[&str]| {
        let mut command = if effective_uid() == 0 {
            let mut c = Command::new("setpriv");
            c.args(["--reuid=65534", "--regid=65534", "--clear-groups"]);
            c.arg(&exe);
            c
        } else {
            Command::new(&exe)
        };
        let out = command
            .args(args)
            .current_dir(&base)
            .output()
            .expect("setpriv (util-linux) runs the binary as nobody");
        (
            out.status.code().unwrap_or(-1),
            String::from_utf8_lossy(&out.stderr).into_owned(),
        )
    };
    let locked_text = locked.to_str().unwrap();
    for args in [
        vec!["solve", "--csv", locked_text],
        vec!["solve", "--plot", locked_text],
        vec!["inversion", "helium", "--plot", "locked/helium.png"],
    ] {
        let (code, err) = as_user(&args);
        assert_eq!(code, 4, "{args:?}: {err}");
        assert!(err.contains("Permission denied"), "{args:?}: {err}");
        assert!(err.contains("locked"), "{args:?}: {err}");
        assert!(
            !err.contains("BackendError") && !err.contains("Os {"),
            "{err}"
        );
    }
    // A property table written into it.
    std::fs::write(base.join("states.csv"), "T [K],p [bar]\n80,1\n").unwrap();
    let (code, err) = as_user(&[
        "table",
        "states.csv",
        "--fluid",
        "nitrogen",
        "-o",
        "locked/t.csv",
    ]);
    assert_eq!(code, 4, "{err}");
    assert!(
        err.contains("Permission denied") && err.contains("locked/t.csv"),
        "{err}"
    );
    // A folder to be made inside the locked one: the same, for the folder.
    let (code, err) = as_user(&["solve", "--csv", "locked/out"]);
    assert_eq!(code, 4, "{err}");
    assert!(
        err.contains("Permission denied") && err.contains("locked/out"),
        "{err}"
    );
    std::fs::set_permissions(&locked, std::fs::Permissions::from_mode(0o755)).unwrap();
    let _ = std::fs::remove_dir_all(&base);
}
