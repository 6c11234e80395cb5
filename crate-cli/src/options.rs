//! Command-line option parsing (`GrowOptions`, `CliError`) and parameter assembly from a
//! preset, a parameter file and `--set` overrides.

use ramulus_core::params::Params;
use ramulus_core::presets::preset;
use serde_json::{Map, Value};

/// A command-line failure: wrong usage (exit 2) or a failed operation (exit 1).
pub enum CliError {
    /// The arguments are wrong.
    Usage(String),
    /// The arguments are fine but the work failed (bad file, bad parameter).
    Failed(String),
}

/// Options of `ramulus grow`.
#[derive(Default)]
pub struct GrowOptions {
    pub preset: Option<String>,
    pub params_file: Option<String>,
    pub sets: Vec<String>,
    pub mask_file: Option<String>,
    pub link: Option<String>,
    pub record_file: Option<String>,
    pub svg_file: Option<String>,
    pub colour: Option<String>,
    pub json: bool,
}

impl GrowOptions {
    pub fn parse(arguments: &[String]) -> Result<GrowOptions, CliError> {
        let mut options = GrowOptions::default();
        let mut index = 0;
        while index < arguments.len() {
            let flag = arguments[index].as_str();
            let mut value = || {
                index += 1;
                arguments
                    .get(index)
                    .cloned()
                    .ok_or_else(|| CliError::Usage(format!("`{flag}` needs a value")))
            };
            match flag {
                "--preset" => options.preset = Some(value()?),
                "--params" => options.params_file = Some(value()?),
                "--set" => options.sets.push(value()?),
                "--mask" => options.mask_file = Some(value()?),
                "--link" => options.link = Some(value()?),
                "--record" => options.record_file = Some(value()?),
                "--svg" => options.svg_file = Some(value()?),
                "--colour" | "--color" => options.colour = Some(value()?),
                "--json" => options.json = true,
                other => {
                    return Err(CliError::Usage(format!(
                        "unknown option `{other}` for `grow`"
                    )))
                }
            }
            index += 1;
        }
        if options.link.is_some() && (options.preset.is_some() || options.params_file.is_some()) {
            return Err(CliError::Usage(
                "`--link` holds every parameter: give it without `--preset` or `--params`".into(),
            ));
        }
        Ok(options)
    }
}

/// Assembles parameters: a link's parameters, or a preset (or defaults when a file is given),
/// then file keys, then `--set`s.
pub fn assemble_params(
    link_params: Option<Params>,
    preset_name: Option<&str>,
    file_text: Option<(&str, &str)>,
    sets: &[String],
) -> Result<Params, CliError> {
    let base = match (preset_name, file_text) {
        _ if link_params.is_some() => link_params.unwrap_or_default(),
        (Some(name), _) => preset(name).ok_or_else(|| {
            let names: Vec<&str> = ramulus_core::presets::presets()
                .iter()
                .map(|preset| preset.name)
                .collect();
            CliError::Failed(format!(
                "no preset named `{name}`; presets: {}",
                names.join(", ")
            ))
        })?,
        (None, Some(_)) => Params::default(),
        (None, None) => preset("broad-leaf").unwrap_or_default(),
    };
    let mut object = match serde_json::to_value(&base) {
        Ok(Value::Object(object)) => object,
        _ => Map::new(),
    };
    if let Some((path, text)) = file_text {
        let value: Value = serde_json::from_str(text).map_err(|error| {
            CliError::Failed(format!(
                "{path}: not valid JSON at line {} column {}: {error}",
                error.line(),
                error.column()
            ))
        })?;
        let Value::Object(keys) = value else {
            return Err(CliError::Failed(format!(
                "{path}: expected a JSON object of parameters"
            )));
        };
        for (key, value) in keys {
            object.insert(key, value);
        }
    }
    for set in sets {
        let Some((key, text)) = set.split_once('=') else {
            return Err(CliError::Usage(format!(
                "`--set {set}` needs the form KEY=VALUE"
            )));
        };
        let value = serde_json::from_str(text).unwrap_or_else(|_| Value::String(text.to_string()));
        object.insert(key.trim().to_string(), value);
    }
    let params = Params::from_json_value(Value::Object(object))
        .map_err(|error| CliError::Failed(error.to_string()))?;
    params
        .validate()
        .map_err(|error| CliError::Failed(error.to_string()))?;
    Ok(params)
}

/// Checks that every argument is one of `allowed` flags; returns the flags given.
pub fn only_flags<'a>(
    arguments: &[String],
    allowed: &[&'a str],
    command: &str,
) -> Result<Vec<&'a str>, CliError> {
    let mut given = Vec::new();
    for argument in arguments {
        match allowed.iter().find(|flag| **flag == argument.as_str()) {
            Some(flag) => given.push(*flag),
            None => {
                return Err(CliError::Usage(format!(
                    "unknown option `{argument}` for `{command}`"
                )))
            }
        }
    }
    Ok(given)
}
