//! The points of a sweep: axes over case keys (`KEY=FROM..TO:N[:log]` or `KEY=v1,v2,…`), their
//! grid product, and each point's case text with the keys set.

use toml::{Table, Value};

/// One varied key and its values as written into the case (numbers keep the axis's unit).
#[derive(Debug, Clone, PartialEq)]
pub struct Axis {
    /// Dotted key path, e.g. `core.length` or `winding.1.current` (windings from 1).
    pub key: String,
    /// The values, as TOML values (strings with units, or plain numbers).
    pub values: Vec<Value>,
}

/// Splits "70 mm" into (70, "mm"): the longest leading number; a plain number has an empty
/// unit.
fn number_and_unit(text: &str) -> Option<(f64, String)> {
    let t = text.trim();
    (1..=t.len())
        .rev()
        .filter(|&i| t.is_char_boundary(i))
        .find_map(|i| {
            t[..i]
                .trim()
                .parse::<f64>()
                .ok()
                .map(|v| (v, t[i..].trim().to_string()))
        })
}

/// A value as written: a plain number becomes a TOML number, anything else a string.
fn value_of(number: f64, unit: &str) -> Value {
    if unit.is_empty() {
        Value::Float(number)
    } else {
        Value::String(format!("{} {unit}", crate::report::format::input(number)))
    }
}

/// Parses `KEY=FROM..TO:N[:log]` (`--vary`).
pub fn parse_range(spec: &str) -> Result<Axis, String> {
    let fault = |why: &str| format!("--vary: '{spec}': {why}");
    let (key, range) = spec
        .split_once('=')
        .ok_or_else(|| fault("must be KEY=FROM..TO:N[:log]"))?;
    let mut parts = range.split(':');
    let span = parts.next().unwrap_or_default();
    let n: usize = parts
        .next()
        .and_then(|n| n.trim().parse().ok())
        .filter(|&n| (1..=100_000).contains(&n))
        .ok_or_else(|| fault("the point count N must be an integer from 1 to 100000"))?;
    let log = match parts.next() {
        None => false,
        Some("log") => true,
        Some(other) => return Err(fault(&format!("'{other}' must be log or left out"))),
    };
    let (from, to) = span
        .split_once("..")
        .ok_or_else(|| fault("the range must be FROM..TO"))?;
    let (a, ua) = number_and_unit(from).ok_or_else(|| fault("FROM is not a number"))?;
    let (b, ub) = number_and_unit(to).ok_or_else(|| fault("TO is not a number"))?;
    if ua != ub {
        return Err(fault(&format!(
            "FROM and TO must use one unit ('{ua}' and '{ub}')"
        )));
    }
    if !(a.is_finite() && b.is_finite()) {
        return Err(fault("FROM and TO must be finite"));
    }
    if log && !(a > 0.0 && b > 0.0) {
        return Err(fault("a log range needs positive FROM and TO"));
    }
    let values = (0..n)
        .map(|k| {
            let t = if n == 1 {
                0.0
            } else {
                k as f64 / (n - 1) as f64
            };
            let x = if log {
                (a.ln() + t * (b.ln() - a.ln())).exp()
            } else {
                a + t * (b - a)
            };
            // Round to 12 digits so the endpoints are written as given.
            let x: f64 = format!("{x:.11e}").parse().unwrap_or(x);
            value_of(x, &ua)
        })
        .collect();
    Ok(Axis {
        key: key.trim().to_string(),
        values,
    })
}

/// Parses `KEY=v1,v2,…` (`--values`).
pub fn parse_list(spec: &str) -> Result<Axis, String> {
    let (key, list) = spec
        .split_once('=')
        .ok_or_else(|| format!("--values: '{spec}' must be KEY=v1,v2,…"))?;
    let values = list
        .split(',')
        .map(str::trim)
        .filter(|v| !v.is_empty())
        .map(|v| match v.parse::<f64>() {
            Ok(x) => Value::Float(x),
            Err(_) => Value::String(v.to_string()),
        })
        .collect::<Vec<_>>();
    if values.is_empty() {
        return Err(format!("--values: '{spec}' lists no values"));
    }
    Ok(Axis {
        key: key.trim().to_string(),
        values,
    })
}

/// Number of points of the grid product.
pub fn point_count(axes: &[Axis]) -> usize {
    axes.iter().map(|a| a.values.len()).product()
}

/// The values of point `index` (the last axis varies fastest).
pub fn point(axes: &[Axis], mut index: usize) -> Vec<&Value> {
    let mut out = vec![&axes[0].values[0]; axes.len()];
    for (k, axis) in axes.iter().enumerate().rev() {
        out[k] = &axis.values[index % axis.values.len()];
        index /= axis.values.len();
    }
    out
}

/// A value as a CSV cell (strings without their quotes).
pub fn cell(v: &Value) -> String {
    match v {
        Value::String(s) => s.clone(),
        Value::Float(x) => crate::report::format::input(*x),
        other => other.to_string(),
    }
}

/// The case text with `key` set to `value`: tables are created as needed; `winding.K`
/// addresses the K-th `[[winding]]` (from 1).
pub fn set_key(root: &mut Table, key: &str, value: Value) -> Result<(), String> {
    let parts: Vec<&str> = key.split('.').collect();
    let (last, path) = parts.split_last().ok_or("empty key")?;
    let mut table = root;
    let mut k = 0;
    while k < path.len() {
        let name = path[k];
        if name == "winding" {
            let index: usize = path
                .get(k + 1)
                .and_then(|i| i.parse().ok())
                .filter(|&i| i >= 1)
                .ok_or_else(|| format!("{key}: winding keys are winding.K.NAME with K from 1"))?;
            let list = table
                .get_mut("winding")
                .and_then(Value::as_array_mut)
                .ok_or_else(|| format!("{key}: the case has no [[winding]]"))?;
            let count = list.len();
            table = list
                .get_mut(index - 1)
                .and_then(Value::as_table_mut)
                .ok_or_else(|| format!("{key}: the case has {count} winding(s)"))?;
            k += 2;
        } else {
            table = table
                .entry(name)
                .or_insert_with(|| Value::Table(Table::new()))
                .as_table_mut()
                .ok_or_else(|| format!("{key}: '{name}' is not a table"))?;
            k += 1;
        }
    }
    table.insert(last.to_string(), value);
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranges_keep_their_unit_and_endpoints() {
        let a = parse_range("core.length=60 mm..80mm:3").unwrap();
        let cells: Vec<String> = a.values.iter().map(cell).collect();
        assert_eq!(cells, ["60 mm", "70 mm", "80 mm"]);
        let l = parse_range("core.mu_r=10..1e4:4:log").unwrap();
        let cells: Vec<String> = l.values.iter().map(cell).collect();
        assert_eq!(cells, ["10", "100", "1000", "10000"]);
        assert!(parse_range("core.length=60mm..80m:3").is_err());
        assert!(parse_range("core.mu_r=0..10:3:log").is_err());
    }

    #[test]
    fn points_enumerate_the_grid_last_axis_fastest() {
        let a = parse_list("a=1,2").unwrap();
        let b = parse_list("b=x,y,z").unwrap();
        let axes = [a, b];
        assert_eq!(point_count(&axes), 6);
        let p: Vec<String> = point(&axes, 4).into_iter().map(cell).collect();
        assert_eq!(p, ["2", "y"]);
    }

    #[test]
    fn keys_reach_windings_by_number_and_create_tables() {
        let mut t: Table = "[[winding]]\nturns = 1\n[[winding]]\nturns = 2\n"
            .parse()
            .unwrap();
        set_key(&mut t, "winding.2.turns", Value::Float(5.0)).unwrap();
        set_key(&mut t, "background.b_axial", Value::String("1 mT".into())).unwrap();
        assert_eq!(t["winding"][1]["turns"].as_float(), Some(5.0));
        assert_eq!(t["background"]["b_axial"].as_str(), Some("1 mT"));
        assert!(set_key(&mut t, "winding.3.turns", Value::Float(1.0)).is_err());
    }
}
