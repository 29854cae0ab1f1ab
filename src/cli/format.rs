//! The output format, one option shared by every command that prints results:
//! `--format text|json|csv`, with `--json` as the short form of `--format json`.
//! Each command says which formats it offers; the first it lists is its default.

use super::{exit, Failure};
use clap::{Args, ValueEnum};

/// A format for results on stdout.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// Tables and sentences for people.
    Text,
    /// One JSON value (schemas in docs/output.md).
    Json,
    /// Comma-separated values with units in the headers.
    Csv,
}

impl Format {
    fn name(self) -> &'static str {
        match self {
            Format::Text => "text",
            Format::Json => "json",
            Format::Csv => "csv",
        }
    }
}

/// The format options as clap reads them.
#[derive(Debug, Clone, Copy, Args)]
pub struct FormatArgs {
    /// Output format (each command's default is its first: see docs/cli.md).
    #[arg(long, value_enum, value_name = "FORMAT")]
    format: Option<Format>,
    /// Short for --format json.
    #[arg(long, conflicts_with = "format")]
    json: bool,
}

impl FormatArgs {
    /// The format asked for, among those `command` offers (the first is the default).
    pub fn choose(self, command: &str, offered: &[Format]) -> Result<Format, Failure> {
        let asked = if self.json {
            Some(Format::Json)
        } else {
            self.format
        };
        match asked {
            None => Ok(offered[0]),
            Some(format) if offered.contains(&format) => Ok(format),
            Some(format) => {
                let names: Vec<&str> = offered.iter().map(|f| f.name()).collect();
                Err(Failure::new(
                    format!(
                        "{command} does not print {}; its formats are: {}",
                        format.name(),
                        names.join(", ")
                    ),
                    exit::INPUT,
                ))
            }
        }
    }
}
