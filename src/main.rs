//! Command-line entry point: parse the arguments, dispatch to one subcommand,
//! print an error once and map it to an exit code.
//!
//! Exit codes: 0 success; 1 an error in the input or the computation (the
//! message names the file, the place and the rule); 2 a usage error (reported
//! by the argument parser).

mod cli;

use clap::Parser;

fn main() -> std::process::ExitCode {
    let args = cli::Cli::parse();
    match cli::run(args) {
        Ok(()) => std::process::ExitCode::SUCCESS,
        Err(err) => {
            eprintln!("recoil: error: {err:#}");
            std::process::ExitCode::from(1)
        }
    }
}
