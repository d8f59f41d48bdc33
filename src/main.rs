//! The `holecast` command-line program: parse → settings → run → export.

mod cli;

use std::process::ExitCode;

use clap::Parser;

use cli::args::{Cli, Command};
use cli::commands::Global;
use cli::limits::{Limits, hint};

fn main() -> ExitCode {
    let cli = Cli::parse();
    // `fit` installs its own handler (stop, then write the best result so far).
    if !matches!(cli.command, Command::Fit(_)) {
        cli::interrupt::install();
    }
    let result = Limits::new(cli.work_limit_factor, cli.max_memory_mb).and_then(|limits| {
        let global = Global {
            quiet: cli.quiet,
            limits,
            factor: cli.work_limit_factor,
        };
        match &cli.command {
            Command::Check(a) => cli::check::check(a, &global),
            Command::Orbits(a) => cli::commands::orbits(a, &global),
            Command::Spectrum(a) => cli::commands::spectrum(a, &global),
            Command::Holes(a) => cli::commands::holes(a, &global),
            Command::Scan(a) => cli::scan::scan(a, &global),
            Command::ScanMerge(a) => cli::scan::merge(a, &global),
            Command::ScanSlurm(a) => cli::scan::slurm(a, &global),
            Command::Fit(a) => cli::fit::fit(a, &global),
            Command::Synthetic(a) => cli::fit::synthetic(a, &global),
        }
    });
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("error: {e:#}");
            if let Some(h) = hint(&e, cli.work_limit_factor) {
                eprintln!("  {h}");
            }
            ExitCode::FAILURE
        }
    }
}
