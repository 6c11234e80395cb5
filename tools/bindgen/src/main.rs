//! `ramulus-bindgen INPUT.wasm OUT_DIR`: the page's wasm-bindgen step. Writes the same files
//! as `wasm-bindgen --target web --no-typescript --experimental-reset-state-function --out-dir
//! OUT_DIR INPUT.wasm` of the same version (the reset-state function lets the page replace an
//! instance that trapped, as when memory runs out, by a fresh one): ES module glue (`NAME.js`) and the processed module (`NAME_bg.wasm`), with the
//! default module path kept (the glue loads `NAME_bg.wasm` beside itself when `init` is called
//! without a path).

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use wasm_bindgen_cli_support::Bindgen;

const USAGE: &str = "usage: ramulus-bindgen INPUT.wasm OUT_DIR\n\
writes OUT_DIR/NAME.js and OUT_DIR/NAME_bg.wasm for the browser (ES module, no TypeScript)";

fn main() -> ExitCode {
    let arguments: Vec<String> = std::env::args().skip(1).collect();
    let [input, out_dir] = arguments.as_slice() else {
        eprintln!(
            "ramulus-bindgen: needs two arguments, got {}\n{USAGE}",
            arguments.len()
        );
        return ExitCode::from(2);
    };
    match generate(&PathBuf::from(input), &PathBuf::from(out_dir)) {
        Ok(()) => ExitCode::SUCCESS,
        Err(error) => {
            eprintln!("ramulus-bindgen: {input}: {error}");
            ExitCode::from(1)
        }
    }
}

/// The settings the `wasm-bindgen` command line uses for `--target web --no-typescript
/// --experimental-reset-state-function` and no other flag. The library's own defaults differ in two places, so both are set here: the
/// command line keeps the default module path (the library omits it) and switches reference
/// types off unless asked (the library reads an environment variable).
/// Errors come back as text with their causes (`{:#}` of the library's error).
fn generate(input: &Path, out_dir: &Path) -> Result<(), String> {
    let mut bindgen = Bindgen::new();
    bindgen.web(true).map_err(|error| format!("{error:#}"))?;
    #[allow(deprecated)]
    bindgen
        .input_path(input)
        .debug(false)
        .demangle(true)
        .keep_lld_exports(false)
        .keep_debug(false)
        .split_debug_info(false)
        .remove_name_section(false)
        .remove_producers_section(false)
        .typescript(false)
        .omit_imports(false)
        .omit_default_module_path(false)
        .split_linked_modules(false)
        .js_string_builtins(false)
        .ts_typed_array_buffers(false)
        .reference_types(false)
        .reset_state_function(true)
        .force_enable_abort_handler(false);
    bindgen
        .generate(out_dir)
        .map_err(|error| format!("{error:#}"))
}
