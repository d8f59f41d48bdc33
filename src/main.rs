//! The `holecast` command-line program: parse → settings → run → export.

mod cli;

use std::process::ExitCode;

use clap::Parser;

use cli::args::{Cli, Command};

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match &cli.command {
        Command::Check(a) => cli::commands::check(a),
        Command::Orbits(a) => cli::commands::orbits(a),
        Command::Spectrum(a) => cli::commands::spectrum(a, cli.quiet),
        Command::Holes(a) => cli::commands::holes(a, cli.quiet),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("error: {e:#}");
            ExitCode::FAILURE
        }
    }
}
