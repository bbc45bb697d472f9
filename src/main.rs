//! The `gatehold` command: parses arguments, dispatches to the handlers in
//! [`cli`] and turns their outcome into the exit code ([`cli::exit::Exit`]:
//! 0 done, 1 bad input or failure, 2 finished with figures or points missing,
//! 3 a sweep stopped early, 64 a usage error).

use std::process::ExitCode;

use clap::Parser;

mod cli;

use cli::exit::Exit;

fn main() -> ExitCode {
    let parsed = match cli::Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let _ = e.print();
            // --help and --version are not errors.
            let exit = if e.use_stderr() {
                Exit::Usage
            } else {
                Exit::Done
            };
            return ExitCode::from(exit.code());
        }
    };
    match cli::run(parsed) {
        Ok(exit) => ExitCode::from(exit.code()),
        Err(e) => {
            eprintln!("error: {e:#}");
            ExitCode::from(Exit::of_error(&e).code())
        }
    }
}
