//! The `ramulus` command line: parses arguments, reads and writes files, and hands everything
//! else to `ramulus-core`. Only this crate turns errors into messages and exit codes.

/// Prints a line on stdout, ignoring a closed pipe (e.g. `ramulus grow | head`) instead of
/// panicking.
macro_rules! say {
    ($($argument:tt)*) => {{
        use std::io::Write as _;
        let _ = writeln!(std::io::stdout(), $($argument)*);
    }};
}

mod bench;
mod commands;
mod options;

use std::process::ExitCode;

#[global_allocator]
static ALLOCATOR: bench::CountingAllocator = bench::CountingAllocator;

const USAGE: &str = "\
ramulus: grow, measure and export branching transport networks

usage:
  ramulus grow [--preset NAME | --params FILE.json | --link LINK] [--set KEY=VALUE]... [--mask FILE]
               [--record OUT.json] [--svg OUT.svg] [--colour order|flow|plain] [--json]
  ramulus measure RECORD.json [--json]
  ramulus presets [--json]
  ramulus bench [--quick] [--json]

`grow` starts from the preset (default: broad-leaf) or, with --params, from defaults plus the
file's keys, or, with --link, from a run link copied from the page (a whole URL or its #fragment;
a damaged field takes its default, with a warning on stderr); each --set KEY=VALUE then
overrides one key (VALUE is JSON, or else a string).
--mask reads a PBM (P1/P4, black = allowed) or PNG (dark = allowed) image; its size sets the
lattice. With --json exactly one JSON object is printed on stdout; its `link` opens the run on the page.";

fn main() -> ExitCode {
    let arguments: Vec<String> = std::env::args().skip(1).collect();
    let Some(command) = arguments.first() else {
        eprintln!("{USAGE}");
        return ExitCode::from(2);
    };
    let rest = &arguments[1..];
    let outcome = match command.as_str() {
        "grow" => commands::grow(rest),
        "measure" => commands::measure(rest),
        "presets" => commands::presets(rest),
        "bench" => bench::run(rest),
        "help" | "--help" | "-h" => {
            say!("{USAGE}");
            Ok(())
        }
        other => Err(options::CliError::Usage(format!(
            "unknown command `{other}`"
        ))),
    };
    match outcome {
        Ok(()) => ExitCode::SUCCESS,
        Err(options::CliError::Usage(message)) => {
            eprintln!("ramulus: {message}\n\n{USAGE}");
            ExitCode::from(2)
        }
        Err(options::CliError::Failed(message)) => {
            eprintln!("ramulus: {message}");
            ExitCode::from(1)
        }
    }
}
