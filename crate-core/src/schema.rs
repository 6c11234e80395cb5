//! `FieldSpec` and `fields`: the page's description of every parameter (group, label, unit,
//! kind, bounds, choices, default, one-line help), read off the parameter table
//! (`params::table`), so the form, validation and links cannot drift apart.

use serde::Serialize;

use crate::params::table::parameters;
pub use crate::params::table::FieldKind;

/// One parameter as the page shows it.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct FieldSpec {
    /// The parameter key (JSON key and link key).
    pub key: &'static str,
    /// Which panel group it belongs to.
    pub group: &'static str,
    /// Short human label.
    pub label: &'static str,
    /// Unit shown beside the control; `length` means the run's own length unit.
    pub unit: &'static str,
    /// Kind of value.
    pub kind: FieldKind,
    /// Smallest allowed value (numeric kinds).
    pub min: Option<f64>,
    /// Whether `min` itself is excluded.
    pub min_excluded: bool,
    /// Largest allowed value (numeric kinds).
    pub max: Option<f64>,
    /// Allowed words (choice kinds).
    pub choices: Vec<&'static str>,
    /// The default, as link text.
    pub default: &'static str,
    /// What validation accepts, in words (the page shows it under the help line).
    pub allowed: String,
    /// One line of help.
    pub help: &'static str,
}

/// Every parameter, in the order the page shows them.
pub fn fields() -> Vec<FieldSpec> {
    parameters()
        .iter()
        .map(|spec| FieldSpec {
            key: spec.key,
            group: spec.group,
            label: spec.label,
            unit: spec.unit,
            kind: spec.kind(),
            min: spec.bounds.map(|bounds| bounds.min),
            min_excluded: spec.bounds.is_some_and(|bounds| bounds.min_excluded),
            max: spec.bounds.map(|bounds| bounds.max),
            choices: spec.choices().to_vec(),
            default: spec.default,
            allowed: spec.allowed_text(),
            help: spec.help,
        })
        .collect()
}
