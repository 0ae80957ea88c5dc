//! The TOML walker of the case parser: a table with its key path, strict key checks and
//! unit-aware values, so every fault names the file, the key and what is wrong.

use toml::{Table, Value};

use super::CaseError;
use crate::units::{self, Dimension};

/// A table being read, with its key path for messages.
pub(super) struct Section<'a> {
    pub(super) file: &'a str,
    path: String,
    pub(super) table: &'a Table,
}

impl<'a> Section<'a> {
    pub(super) fn new(file: &'a str, path: String, table: &'a Table) -> Self {
        Self { file, path, table }
    }

    pub(super) fn key_path(&self, key: &str) -> String {
        if self.path.is_empty() {
            key.to_string()
        } else {
            format!("{}.{key}", self.path)
        }
    }

    pub(super) fn fault(&self, key: &str, fault: &str) -> CaseError {
        CaseError::Key {
            file: self.file.to_string(),
            key: self.key_path(key),
            fault: fault.to_string(),
        }
    }

    /// Rejects keys not in `known`, suggesting the nearest known key.
    pub(super) fn only(&self, known: &[&str]) -> Result<(), CaseError> {
        for k in self.table.keys() {
            if !known.contains(&k.as_str()) {
                return Err(self.fault(k, &format!("unknown key{}", hint(k, known))));
            }
        }
        Ok(())
    }

    pub(super) fn table(&self, key: &str) -> Result<Option<Section<'a>>, CaseError> {
        match self.table.get(key) {
            None => Ok(None),
            Some(Value::Table(t)) => Ok(Some(Section::new(self.file, self.key_path(key), t))),
            Some(_) => Err(self.fault(key, "must be a table")),
        }
    }

    pub(super) fn string(&self, key: &str) -> Result<Option<String>, CaseError> {
        match self.table.get(key) {
            None => Ok(None),
            Some(Value::String(s)) => Ok(Some(s.clone())),
            Some(_) => Err(self.fault(key, "must be a string")),
        }
    }

    /// A number (SI) or a string with a unit of dimension `dim`.
    pub(super) fn quantity(&self, key: &str, dim: Dimension) -> Result<Option<f64>, CaseError> {
        let v = match self.table.get(key) {
            None => return Ok(None),
            Some(Value::Integer(i)) => *i as f64,
            Some(Value::Float(f)) => *f,
            Some(Value::String(s)) => units::parse(s, dim).map_err(|e| self.fault(key, &e))?,
            Some(_) => return Err(self.fault(key, &format!("must be {dim}"))),
        };
        if !v.is_finite() {
            return Err(self.fault(key, "must be finite"));
        }
        units::check_magnitude(v, dim).map_err(|e| self.fault(key, &e))?;
        Ok(Some(v))
    }

    /// An array of quantities (numbers in SI or strings with units).
    pub(super) fn quantity_list(&self, key: &str, dim: Dimension) -> Result<Vec<f64>, CaseError> {
        let Some(v) = self.table.get(key) else {
            return Err(self.fault(key, "missing"));
        };
        let Value::Array(items) = v else {
            return Err(self.fault(key, &format!("must be an array of {dim}")));
        };
        items
            .iter()
            .enumerate()
            .map(|(i, item)| {
                let at = format!("{key}[{}]", i + 1);
                let x = match item {
                    Value::Integer(n) => *n as f64,
                    Value::Float(f) => *f,
                    Value::String(s) => units::parse(s, dim).map_err(|e| self.fault(&at, &e))?,
                    _ => return Err(self.fault(&at, &format!("must be {dim}"))),
                };
                if !x.is_finite() {
                    return Err(self.fault(&at, "must be finite"));
                }
                units::check_magnitude(x, dim).map_err(|e| self.fault(&at, &e))?;
                Ok(x)
            })
            .collect()
    }

    pub(super) fn positive(&self, key: &str, dim: Dimension) -> Result<Option<f64>, CaseError> {
        match self.quantity(key, dim)? {
            Some(v) if v <= 0.0 => Err(self.fault(key, &format!("{v} must be positive"))),
            Some(v) if dim == Dimension::Length => {
                units::check_size(v).map_err(|e| self.fault(key, &e))?;
                Ok(Some(v))
            }
            other => Ok(other),
        }
    }

    pub(super) fn required_positive(&self, key: &str, dim: Dimension) -> Result<f64, CaseError> {
        self.positive(key, dim)?
            .ok_or_else(|| self.fault(key, &format!("missing ({dim})")))
    }
}

/// " (did you mean 'x'?)" when a known word is within a small edit distance.
pub(crate) fn hint(word: &str, known: &[&str]) -> String {
    known
        .iter()
        .map(|k| (edit_distance(word, k), *k))
        .filter(|&(d, k)| d <= 2.max(k.len() / 3))
        .min()
        .map(|(_, k)| format!(" (did you mean '{k}'?)"))
        .unwrap_or_default()
}

fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().collect();
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for i in 1..=a.len() {
        let mut cur = vec![i; b.len() + 1];
        for j in 1..=b.len() {
            let sub = prev[j - 1] + usize::from(a[i - 1] != b[j - 1]);
            cur[j] = sub.min(prev[j] + 1).min(cur[j - 1] + 1);
        }
        prev = cur;
    }
    prev[b.len()]
}
