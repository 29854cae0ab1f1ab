//! The `cryochain` binary: parses arguments, runs the command, and is the one place
//! that writes: notes to stderr, results to stdout, then any error to stderr with
//! its exit code (docs/cli.md). A closed pipe on stdout (`| head`) ends quietly with
//! success; any other failure to write stdout (a full disk) is a file error.

mod cli;

use clap::Parser;
use std::io::Write;

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
    let (output, failure) = match cli::guarded(|| cli::run(parsed)) {
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
