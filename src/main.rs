//! The `cryochain` binary: parses arguments, runs the command, and is the one place
//! that writes: notes to stderr, results to stdout, then any error to stderr with
//! its exit code.

mod cli;

use clap::Parser;

fn main() {
    let parsed = cli::Cli::parse();
    let (output, failure) = match cli::run(parsed) {
        Ok(output) => (output, None),
        Err(mut failure) => (std::mem::take(&mut failure.partial), Some(failure)),
    };
    for note in &output.notes {
        eprintln!("{note}");
    }
    print!("{}", output.stdout);
    match failure {
        None => std::process::exit(cli::exit::OK),
        Some(failure) => {
            eprintln!("error: {}", failure.message);
            std::process::exit(failure.code);
        }
    }
}
