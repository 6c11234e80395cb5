//! The parameter table covers `Params` exactly: its keys are the JSON keys serde writes for
//! `Params` (every field, no other), and each entry's accessor reaches its own field and no
//! other. The JSON written by serde's derive does not go through the table, so it is an
//! independent view of the fields.

use ramulus_core::params::table::{parameters, Access};
use ramulus_core::params::Params;

/// The fields of `params` as serde writes them.
fn json_fields(params: &Params) -> serde_json::Map<String, serde_json::Value> {
    match serde_json::to_value(params).expect("parameters serialize") {
        serde_json::Value::Object(map) => map,
        other => panic!("parameters serialize to {other}"),
    }
}

#[test]
fn table_keys_are_exactly_the_json_keys() {
    let mut json: Vec<String> = json_fields(&Params::default()).keys().cloned().collect();
    let mut table: Vec<String> = parameters()
        .iter()
        .map(|spec| spec.key.to_string())
        .collect();
    json.sort();
    table.sort();
    assert_eq!(table, json);
    assert_eq!(table.len(), 48);
}

/// A valid text different from the default, per kind (hand-picked, not read off the program).
fn other_text(access: &Access, default: &str) -> String {
    match access {
        Access::Count32(..) | Access::Count64(..) => {
            (default.parse::<u64>().expect("whole default") + 1).to_string()
        }
        Access::Real(..) | Access::OptionalReal(..) => {
            if default == "0.37" { "0.38" } else { "0.37" }.to_string()
        }
        Access::Flag(..) => if default == "true" { "false" } else { "true" }.to_string(),
        Access::Joining(..) => if default == "cheapest" {
            "uniform"
        } else {
            "cheapest"
        }
        .into(),
        Access::Units(..) => if default == "m" { "mm" } else { "m" }.to_string(),
        Access::Roots(..) => "1,2,1,0".to_string(),
        Access::Polygon(..) | Access::Polygons(..) => "0,0;1,0;1,1".to_string(),
        Access::Mask(..) => "120x120:0.14400".to_string(),
        Access::Levels(..) => "0,0,1.5;10,0,1;0,10,2".to_string(),
        Access::Zones(..) => "0.9:0,0;1,0;1,1~0.2:2,2;5,2;5,5".to_string(),
    }
}

#[test]
fn each_entry_reaches_its_own_field_and_no_other() {
    let defaults = Params::default();
    let before = json_fields(&defaults);
    for spec in parameters() {
        let mut params = defaults.clone();
        let text = other_text(&spec.access, spec.default);
        spec.set_text(&mut params, &text)
            .unwrap_or_else(|error| panic!("`{}` = {text}: {error}", spec.key));
        assert_eq!(
            spec.text(&params),
            text,
            "`{}` reads back differently",
            spec.key
        );
        let after = json_fields(&params);
        let changed: Vec<&String> = after
            .iter()
            .filter(|(key, value)| before.get(*key) != Some(value))
            .map(|(key, _)| key)
            .collect();
        assert_eq!(
            changed,
            [spec.key],
            "setting `{}` changed {changed:?}",
            spec.key
        );
    }
}

/// The defaults column reads, and the defaults validate (a run with no parameters given starts).
#[test]
fn defaults_read_and_validate() {
    let defaults = Params::default();
    assert_eq!(defaults.validate(), Ok(()));
    for spec in parameters() {
        assert_eq!(spec.text(&defaults), spec.default, "`{}`", spec.key);
    }
    let version_1 = ramulus_core::link::version_1_defaults();
    for spec in parameters() {
        assert_eq!(
            spec.text(&version_1),
            spec.link_v1_default,
            "`{}`",
            spec.key
        );
    }
}
