//! Proptest strategies for parameters, generated from the parameter table: every field of
//! `Params` gets a value drawn from its entry (bounds, fitting scale, choices, kind), so a new
//! parameter is covered by the strategies as soon as it has its table entry.

use proptest::prelude::*;
use ramulus_core::params::table::{parameters, Access, FitScale, ParamSpec};
use ramulus_core::params::{Params, MAX_CELLS};

/// Random valid parameters with every field drawn from its table entry: reals over their whole
/// range with arbitrary bits (log-uniform when the entry fits on a log scale, and now and then
/// exactly at a bound), optional values sometimes `none`, every choice, roots inside the
/// lattice, polygons of arbitrary finite points, and a mask of the lattice's size.
pub fn any_valid_params() -> impl Strategy<Value = Params> {
    lattice()
        .prop_flat_map(|(width, height)| {
            let texts: Vec<BoxedStrategy<(&'static str, String)>> = parameters()
                .iter()
                .map(|spec| {
                    let key = spec.key;
                    field_text(spec, width, height)
                        .prop_map(move |text| (key, text))
                        .boxed()
                })
                .collect();
            texts
        })
        .prop_filter_map("parameters that validate", |texts| {
            let mut params = Params::default();
            for (key, text) in &texts {
                ramulus_core::link::set_field(&mut params, key, text)
                    .unwrap_or_else(|error| panic!("generated `{key}` = {text:?}: {error}"));
            }
            params.validate().is_ok().then_some(params)
        })
}

/// Link texts `(key, text)` of the named keys, each drawn from its table entry. Keys whose
/// values depend on the lattice (roots, mask) need `width` and `height`.
pub fn field_texts(
    keys: &[&str],
    width: u32,
    height: u32,
) -> impl Strategy<Value = Vec<(&'static str, String)>> {
    parameters()
        .iter()
        .filter(|spec| keys.contains(&spec.key))
        .map(|spec| {
            let key = spec.key;
            field_text(spec, width, height)
                .prop_map(move |text| (key, text))
                .boxed()
        })
        .collect::<Vec<_>>()
}

/// Width and height within their bounds whose product fits `MAX_CELLS`, small lattices more
/// often than large ones.
fn lattice() -> impl Strategy<Value = (u32, u32)> {
    let side = prop_oneof![3 => 1u32..200, 1 => 1u32..=20_000];
    (side.clone(), side).prop_map(|(width, height)| {
        let height = height.min((MAX_CELLS / width as u64) as u32);
        (width, height)
    })
}

/// Link text of one field, from its entry.
fn field_text(spec: &ParamSpec, width: u32, height: u32) -> BoxedStrategy<String> {
    match spec.access {
        Access::Count32(..) if spec.key == "width" || spec.key == "height" => {
            // Width and height come from `lattice`.
            let value = if spec.key == "width" { width } else { height };
            Just(value.to_string()).boxed()
        }
        Access::Count32(..) => {
            // Other counts (sweeps) over their bounds, now and then exactly at one.
            let bounds = spec.bounds.expect("whole numbers have bounds");
            let (low, high) = (bounds.min as u32, bounds.max.min(u32::MAX as f64) as u32);
            prop_oneof![Just(low), Just(high), low..=high]
                .prop_map(|value| value.to_string())
                .boxed()
        }
        Access::Count64(..) => {
            let bounds = spec.bounds.expect("whole numbers have bounds");
            let high = (bounds.max as u128).min(u64::MAX as u128) as u64;
            let low = bounds.min as u64;
            prop_oneof![Just(low), Just(high), low..=high]
                .prop_map(|value| value.to_string())
                .boxed()
        }
        Access::Real(..) => real(spec).prop_map(|value| format!("{value}")).boxed(),
        Access::OptionalReal(..) => prop_oneof![
            1 => Just("none".to_string()),
            3 => real(spec).prop_map(|value| format!("{value}")),
        ]
        .boxed(),
        Access::Flag(..) | Access::Joining(..) | Access::Units(..) => {
            proptest::sample::select(spec.choices())
                .prop_map(str::to_string)
                .boxed()
        }
        Access::Roots(..) => {
            proptest::collection::vec((0..width, 0..height, finite(), finite()), 1..4)
                .prop_map(|roots| {
                    roots
                        .into_iter()
                        .map(|(x, y, dx, dy)| {
                            // A zero direction is refused; make it point down instead.
                            let (dx, dy) = if dx == 0.0 && dy == 0.0 {
                                (0.0, 1.0)
                            } else {
                                (dx, dy)
                            };
                            format!("{x},{y},{dx},{dy}")
                        })
                        .collect::<Vec<_>>()
                        .join(";")
                })
                .boxed()
        }
        Access::Polygon(..) => prop_oneof![Just("none".to_string()), polygon_text(),].boxed(),
        Access::Polygons(..) => proptest::collection::vec(polygon_text(), 0..3)
            .prop_map(|polygons| polygons.join("~"))
            .boxed(),
        Access::Levels(..) => prop_oneof![
            Just("none".to_string()),
            // Distinct places: the k-th level stands at x = k (no two at one place).
            proptest::collection::vec((-1.0e6f64..=1.0e6, -1.0e6f64..=1.0e6), 1..6).prop_map(
                |levels| {
                    levels
                        .iter()
                        .enumerate()
                        .map(|(index, (y, z))| format!("{index},{y},{z}"))
                        .collect::<Vec<_>>()
                        .join(";")
                }
            ),
        ]
        .boxed(),
        Access::Zones(..) => proptest::collection::vec((0.01f64..=1.0, polygon_text()), 0..3)
            .prop_map(|zones| {
                zones
                    .iter()
                    .map(|(runoff, polygon)| format!("{runoff}:{polygon}"))
                    .collect::<Vec<_>>()
                    .join("~")
            })
            .boxed(),
        Access::Mask(..) => {
            let total = width as u64 * height as u64;
            prop_oneof![
                Just("none".to_string()),
                proptest::collection::vec(0..=total, 0..6).prop_map(move |mut cuts| {
                    cuts.push(0);
                    cuts.push(total);
                    cuts.sort_unstable();
                    let runs: Vec<String> = cuts
                        .windows(2)
                        .map(|pair| (pair[1] - pair[0]).to_string())
                        .collect();
                    format!("{width}x{height}:{}", runs.join("."))
                }),
            ]
            .boxed()
        }
    }
}

/// A real inside the entry's bounds: arbitrary bits, evenly or log-evenly spread, or a bound.
fn real(spec: &ParamSpec) -> BoxedStrategy<f64> {
    let bounds = spec.bounds.expect("reals have bounds");
    // An unbounded top ("finite") is drawn up to 1e6 and now and then as the largest finite.
    let top = if bounds.max == f64::MAX {
        1.0e6
    } else {
        bounds.max
    };
    let bottom = if bounds.min_excluded {
        bounds.min.next_up()
    } else {
        bounds.min
    };
    let spread: BoxedStrategy<f64> = match spec.fit {
        // Positive doubles are ordered like their bit patterns (IEEE 754-2008, section 3.4),
        // and evenly drawn bit patterns are close to log-evenly drawn values.
        Some(FitScale::Log) if bottom > 0.0 => (bottom.to_bits()..=top.to_bits())
            .prop_map(f64::from_bits)
            .boxed(),
        _ => (bottom..=top).boxed(),
    };
    prop_oneof![
        6 => spread,
        1 => Just(bottom),
        1 => Just(bounds.max),
    ]
    .boxed()
}

/// Any finite real, arbitrary bits.
fn finite() -> impl Strategy<Value = f64> {
    proptest::num::f64::NORMAL | proptest::num::f64::SUBNORMAL | proptest::num::f64::ZERO
}

/// A polygon of 3 to 6 arbitrary finite points, as link text.
fn polygon_text() -> BoxedStrategy<String> {
    proptest::collection::vec((finite(), finite()), 3..7)
        .prop_map(|points| {
            points
                .iter()
                .map(|(x, y)| format!("{x},{y}"))
                .collect::<Vec<_>>()
                .join(";")
        })
        .boxed()
}
