//! The `ramulus` command line: reads arguments (with clap), reads and writes files, and hands
//! everything else to `ramulus-core`. Only this crate turns errors into messages and exit codes.

/// Prints a line on stdout; a closed pipe (e.g. `ramulus grow | head`) is not an error, any other
/// failure to write makes the command fail (see `output::say_line`).
macro_rules! say {
    ($($argument:tt)*) => {
        crate::output::say_line(format_args!($($argument)*))
    };
}

mod bench;
mod commands;
mod drain;
mod fit_bench;
mod fit_command;
mod heap;
mod identifiability_bench;
mod image_bench;
mod interrupt;
mod options;
mod output;
mod record_readings;
mod refill_bench;
mod specimens;

use std::process::ExitCode;

use clap::{Parser, Subcommand};

use options::{BenchOptions, CliError, GrowOptions, MeasureOptions, PresetsOptions};

#[global_allocator]
static ALLOCATOR: bench::CountingAllocator = bench::CountingAllocator;

/// The whole command line; clap reads it, answers `help`, `--help` and `--version` itself and
/// turns wrong usage into a message naming the argument (exit 2).
#[derive(Parser)]
#[command(
    name = "ramulus",
    version,
    about = "Grow, measure and export branching transport networks (leaf veins, site drainage)",
    after_help = "`ramulus help COMMAND` or `ramulus COMMAND --help` describes one command.\n\
                  Exit status: 0 done, 1 a file or parameter is wrong (named on stderr), 2 wrong usage.",
    arg_required_else_help = true
)]
struct CommandLine {
    #[command(subcommand)]
    command: Command,
}

// One command is parsed once per process, so the size of its largest options is of no account.
#[allow(clippy::large_enum_variant)]
#[derive(Subcommand)]
enum Command {
    /// Grow one network; print its figures, write its record or drawing
    Grow(GrowOptions),
    /// Measure saved run records, or traced specimens (SVG, GeoJSON, CSV edge lists)
    Measure(MeasureOptions),
    /// List the named parameter sets with their parameters
    Presets(PresetsOptions),
    /// Time growth on fixed cases: cells per second, peak bytes per cell
    Bench(BenchOptions),
    /// Grow a drainage layout on a site and size its channels for a design storm
    Drain(drain::DrainOptions),
    /// Fit growth parameters to a specimen: posterior intervals, sensitivity, best run
    Fit(fit_command::FitOptions),
    /// Combine the shard files of a fit run as a job array
    Merge(fit_command::MergeOptions),
}

fn main() -> ExitCode {
    heap::keep_freed_blocks();
    // clap prints help and version on stdout (exit 0) and usage errors on stderr (exit 2).
    let command_line = CommandLine::try_parse().unwrap_or_else(|error| error.exit());
    interrupt::install();
    let outcome = match command_line.command {
        Command::Grow(options) => commands::grow(options),
        Command::Measure(options) => commands::measure(options),
        Command::Presets(options) => commands::presets(options),
        Command::Bench(options) => bench::run(options),
        Command::Drain(options) => drain::drain(options),
        Command::Fit(options) => fit_command::fit(options),
        Command::Merge(options) => fit_command::merge(options),
    };
    match outcome {
        Ok(()) if output::stdout_failed() => {
            eprintln!("ramulus: cannot write standard output (is the disk full?)");
            ExitCode::from(1)
        }
        Ok(()) => ExitCode::SUCCESS,
        Err(CliError::Usage(message)) => {
            eprintln!("ramulus: {message}\n\n(`ramulus help` lists the commands and options)");
            ExitCode::from(2)
        }
        Err(CliError::Failed(message)) => {
            eprintln!("ramulus: {message}");
            ExitCode::from(1)
        }
    }
}

#[cfg(test)]
mod tests {
    use clap::CommandFactory;

    /// clap's own consistency check of the definition (clashing names, conflicts naming
    /// arguments that do not exist, required positional after optional ones).
    #[test]
    fn the_command_line_definition_is_consistent() {
        super::CommandLine::command().debug_assert();
    }
}
