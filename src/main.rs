//! The `cryochain` binary: parses arguments, runs the command, and is the one place
//! that writes: notes to stderr, results to stdout, then any error to stderr with
//! its exit code (docs/cli.md). A closed pipe on stdout (`| head`) ends quietly with
//! success; any other failure to write stdout (a full disk) is a file error.

mod cli;

use clap::Parser;
use std::io::Write;

/// Environment variable that makes the binary fail on purpose, so the path of an
/// internal fault (exit code 6) can be tested end to end: `panic` panics inside
/// the command, `internal` returns an internal error. No input reaches code 6
/// otherwise (docs/cli.md). Any other value is ignored.
const FAULT_VARIABLE: &str = "CRYOCHAIN_INJECT_FAULT";

/// The fault asked for by [`FAULT_VARIABLE`], raised where a real one would be.
fn injected_fault(fault: Option<&str>) -> Result<(), cli::Failure> {
    match fault {
        Some("panic") => panic!("fault injected by {FAULT_VARIABLE}=panic"),
        Some("internal") => Err(cli::Failure::from(cryochain::Error::Internal(format!(
            "fault injected by {FAULT_VARIABLE}=internal"
        )))),
        _ => Ok(()),
    }
}

fn main() {
    let parsed = match cli::Cli::try_parse() {
        Ok(parsed) => parsed,
        Err(e) => {
            // Help and version are answers, not errors.
            let code = if e.use_stderr() {
                cli::exit::USAGE
            } else {
                cli::exit::OK
            };
            let _ = e.print();
            std::process::exit(code);
        }
    };
    let fault = std::env::var(FAULT_VARIABLE).ok();
    let (output, failure) = match cli::guarded(|| {
        injected_fault(fault.as_deref())?;
        cli::run(parsed)
    }) {
        Ok(output) => (output, None),
        Err(mut failure) => (std::mem::take(&mut failure.partial), Some(failure)),
    };
    let mut stderr = std::io::stderr().lock();
    for note in &output.notes {
        let _ = writeln!(stderr, "{note}");
    }
    let mut stdout = std::io::stdout().lock();
    let written = stdout
        .write_all(output.stdout.as_bytes())
        .and_then(|()| stdout.flush());
    if let Err(e) = written {
        if e.kind() == std::io::ErrorKind::BrokenPipe {
            std::process::exit(cli::exit::OK);
        }
        let _ = writeln!(stderr, "error: cannot write to standard output: {e}");
        std::process::exit(cli::exit::IO);
    }
    match failure {
        None => std::process::exit(cli::exit::OK),
        Some(failure) => {
            let _ = writeln!(stderr, "error: {}", failure.message);
            std::process::exit(failure.code);
        }
    }
}
