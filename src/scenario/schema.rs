//! The JSON Schema of the scenario format, derived from the raw shapes of [`super::raw`]
//! (`schemars` derive), for editors' YAML support and for checking a file before it is read.
//!
//! A quantity field is "a number or a string 'value unit'"; each field names its kind with one
//! of the marker types below (`#[schemars(with = "k::Length")]` in `raw`), whose schema lists
//! the units that kind accepts (from [`crate::units::Kind::spellings`]) and whether a bare
//! number is read (not for temperatures, accelerations and onsets). The schema describes the
//! shape and the spelling of quantities; ranges and cross-field rules are checked when the file
//! is read.

use super::raw::{RawLimitsFile, RawScenario};
use crate::units::Kind;
use schemars::generate::SchemaSettings;
use schemars::{json_schema, JsonSchema, Schema, SchemaGenerator};
use serde_json::Value;
use std::borrow::Cow;

/// The schema of a scenario file (JSON Schema draft-07, which editors' YAML support reads).
pub fn scenario_schema() -> Value {
    finish(
        generator().into_root_schema_for::<RawScenario>(),
        "eddyzone scenario (version 1)",
    )
}

/// The schema of a limit set file (`limits_file:`): `name` and `limits` only.
pub fn limits_file_schema() -> Value {
    finish(
        generator().into_root_schema_for::<RawLimitsFile>(),
        "eddyzone limit set",
    )
}

/// The root schema with its title, optional keys without the `null` alternative (a key is
/// left out, not set to null), so a validator blames the wrong value itself rather than the
/// block around it.
fn finish(schema: Schema, title: &str) -> Value {
    let mut v = schema.to_value();
    drop_null(&mut v);
    if let Value::Object(m) = &mut v {
        m.insert("title".into(), title.into());
    }
    v
}

fn drop_null(v: &mut Value) {
    match v {
        Value::Object(m) => {
            if let Some(Value::Array(types)) = m.get_mut("type") {
                types.retain(|t| t != "null");
                if types.len() == 1 {
                    let t = types.remove(0);
                    m.insert("type".into(), t);
                }
            }
            let only = match m.get_mut("anyOf") {
                Some(Value::Array(alts)) => {
                    let before = alts.len();
                    alts.retain(|a| a.get("type").is_none_or(|t| t != "null"));
                    (alts.len() == 1 && before == 2).then(|| alts.remove(0))
                }
                _ => None,
            };
            if let Some(Value::Object(inner)) = only {
                m.remove("anyOf");
                if inner.contains_key("$ref") {
                    // Draft-07 ignores the siblings of `$ref` (the description would be lost).
                    m.insert("allOf".into(), Value::Array(vec![Value::Object(inner)]));
                } else {
                    for (k, x) in inner {
                        m.entry(k).or_insert(x);
                    }
                }
            }
            m.values_mut().for_each(drop_null);
        }
        Value::Array(a) => a.iter_mut().for_each(drop_null),
        _ => {}
    }
}

fn generator() -> SchemaGenerator {
    SchemaSettings::draft07().for_deserialize().into_generator()
}

/// Escapes a unit spelling for a regular expression; spaces match any spacing, as the reader
/// ignores them.
fn unit_pattern(unit: &str) -> String {
    let mut o = String::new();
    for c in unit.chars() {
        match c {
            ' ' => o.push_str("\\s*"),
            '^' | '*' | '(' | ')' | '.' | '+' | '?' | '[' | ']' | '{' | '}' | '|' | '\\' | '$' => {
                o.push('\\');
                o.push(c);
            }
            _ => o.push(c),
        }
    }
    o
}

/// The schema of one quantity kind.
fn quantity(kind: Kind) -> Schema {
    let mut units: Vec<String> = Vec::new();
    for u in kind.spellings() {
        units.push(unit_pattern(u));
        // The reader takes ² and ³ for ^2 and ^3.
        if u.contains("^2") || u.contains("^3") {
            units.push(unit_pattern(&u.replace("^2", "²").replace("^3", "³")));
        }
    }
    let number = r"[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?";
    let optional = if kind.takes_bare_number() { "?" } else { "" };
    let pattern = format!(r"^\s*{number}\s*({}){optional}\s*$", units.join("|"));
    let accepted = kind.spellings().join(", ");
    if kind.takes_bare_number() {
        let description = format!(
            "a {}: a number in {} or the text \"value unit\" with one of: {accepted}",
            kind.describe(),
            kind.si_unit()
        );
        json_schema!({
            "description": description,
            "anyOf": [
                { "type": "number" },
                { "type": "string", "pattern": pattern }
            ]
        })
    } else {
        let description = format!(
            "a {}: the text \"value unit\" (a bare number is refused) with one of: {accepted}",
            kind.describe()
        );
        json_schema!({
            "description": description,
            "type": "string",
            "pattern": pattern
        })
    }
}

/// Marker types naming the kind of a quantity field in the schema.
macro_rules! kinds {
    ($($name:ident),* $(,)?) => {
        $(
            #[doc = concat!("Schema of a quantity of kind `Kind::", stringify!($name), "`.")]
            pub struct $name;
            impl JsonSchema for $name {
                fn schema_name() -> Cow<'static, str> {
                    stringify!($name).into()
                }
                fn json_schema(_: &mut SchemaGenerator) -> Schema {
                    quantity(Kind::$name)
                }
            }
        )*
    };
}

kinds!(
    Length,
    Speed,
    Mass,
    FluxDensity,
    Temperature,
    Conductivity,
    TempCoefficient,
    Density,
    SpecificHeat,
    Force,
    ForcePerLength,
    Area,
    Time,
    Angle,
    Ratio,
    Acceleration,
    Jerk,
    HeatTransfer,
);

/// A quantity whose kind follows from another field (a sweep input's mean, bounds and values
/// take the unit of the input they vary): a number or the text "value unit".
pub struct AnyQuantity;

impl JsonSchema for AnyQuantity {
    fn schema_name() -> Cow<'static, str> {
        "AnyQuantity".into()
    }
    fn json_schema(_: &mut SchemaGenerator) -> Schema {
        json_schema!({
            "description": "a quantity in the unit of the input it varies: a number or \"value unit\"",
            "anyOf": [{ "type": "number" }, { "type": "string" }]
        })
    }
}

/// `duty.cycles`: a count or `until_steady`.
pub struct Cycles;

impl JsonSchema for Cycles {
    fn schema_name() -> Cow<'static, str> {
        "Cycles".into()
    }
    fn json_schema(_: &mut SchemaGenerator) -> Schema {
        json_schema!({
            "description": "a number of dispatches, or until_steady",
            "anyOf": [
                { "type": "integer", "minimum": 1 },
                { "type": "string", "enum": ["until_steady"] }
            ]
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn unit_patterns_escape_regex_characters() {
        assert_eq!(unit_pattern("J/(kg*K)"), r"J/\(kg\*K\)");
        assert_eq!(unit_pattern("J/(kg K)"), r"J/\(kg\s*K\)");
        assert_eq!(unit_pattern("m^2"), r"m\^2");
    }

    #[test]
    fn optional_keys_have_no_null_alternative() {
        let s = scenario_schema().to_string();
        assert!(!s.contains("\"null\""), "{s}");
        // A quantity's own alternatives (number or text) stay.
        assert!(s.contains("anyOf"));
    }

    #[test]
    fn temperature_needs_text() {
        let s = quantity(Kind::Temperature);
        assert_eq!(s.get("type").and_then(|t| t.as_str()), Some("string"));
        let d = s.get("description").and_then(|t| t.as_str()).unwrap();
        assert!(d.contains("°C") && d.contains("K"), "{d}");
    }
}
