//! The `cryochain` binary: parses arguments, runs the command, prints the result.

mod cli;

use clap::Parser;

fn main() {
    let parsed = cli::Cli::parse();
    match cli::run(parsed) {
        Ok(output) => {
            print!("{output}");
            std::process::exit(cli::exit::OK);
        }
        Err(failure) => {
            eprintln!("error: {}", failure.message);
            std::process::exit(failure.code);
        }
    }
}
