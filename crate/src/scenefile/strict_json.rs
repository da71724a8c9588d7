//! JSON parsing that refuses duplicate keys (serde_json keeps the last one silently) and
//! explains the usual non-JSON numbers.

use serde::de::{self, Deserialize, Deserializer, MapAccess, SeqAccess, Visitor};
use serde_json::{Map, Number, Value};
use std::fmt;

/// A `serde_json::Value` built without accepting duplicate object keys.
struct Strict(Value);

impl<'de> Deserialize<'de> for Strict {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        d.deserialize_any(StrictVisitor).map(Strict)
    }
}

struct StrictVisitor;

impl<'de> Visitor<'de> for StrictVisitor {
    type Value = Value;

    fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str("a JSON value")
    }
    fn visit_bool<E>(self, v: bool) -> Result<Value, E> {
        Ok(Value::Bool(v))
    }
    fn visit_i64<E>(self, v: i64) -> Result<Value, E> {
        Ok(Value::Number(v.into()))
    }
    fn visit_u64<E>(self, v: u64) -> Result<Value, E> {
        Ok(Value::Number(v.into()))
    }
    fn visit_f64<E: de::Error>(self, v: f64) -> Result<Value, E> {
        Number::from_f64(v)
            .map(Value::Number)
            .ok_or_else(|| E::custom("number out of range"))
    }
    fn visit_str<E>(self, v: &str) -> Result<Value, E> {
        Ok(Value::String(v.to_owned()))
    }
    fn visit_string<E>(self, v: String) -> Result<Value, E> {
        Ok(Value::String(v))
    }
    fn visit_unit<E>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_none<E>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_some<D: Deserializer<'de>>(self, d: D) -> Result<Value, D::Error> {
        Strict::deserialize(d).map(|s| s.0)
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Value, A::Error> {
        let mut out = Vec::new();
        while let Some(Strict(v)) = seq.next_element()? {
            out.push(v);
        }
        Ok(Value::Array(out))
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Value, A::Error> {
        let mut out = Map::new();
        while let Some(key) = map.next_key::<String>()? {
            if out.contains_key(&key) {
                return Err(de::Error::custom(format!(
                    "the key \"{key}\" appears twice in one object"
                )));
            }
            let Strict(v) = map.next_value()?;
            out.insert(key, v);
        }
        Ok(Value::Object(out))
    }
}

/// Parse JSON text, refusing duplicate keys; the error is one plain sentence with the line and
/// column.
pub(crate) fn parse(text: &str) -> Result<Value, String> {
    let mut de = serde_json::Deserializer::from_str(text);
    let parsed = Strict::deserialize(&mut de).and_then(|v| de.end().map(|_| v.0));
    parsed.map_err(|e| {
        let hint = non_json_number_hint(text, e.line(), e.column());
        format!("not valid JSON: {e}{hint}")
    })
}

fn non_json_number_hint(text: &str, line: usize, column: usize) -> &'static str {
    let Some(l) = text.lines().nth(line.saturating_sub(1)) else {
        return "";
    };
    let start = column.saturating_sub(1).min(l.len());
    let rest = l.get(start..).unwrap_or("");
    let rest = rest.trim_start_matches([' ', ':', '-', '+']);
    if rest.starts_with("NaN")
        || rest.starts_with("Infinity")
        || rest.starts_with("inf")
        || rest.starts_with("nan")
    {
        " (NaN and Infinity are not numbers in JSON; give a finite value)"
    } else {
        ""
    }
}
