//! The TOML walker of the case parser: a table with its key path, strict key checks and
//! unit-aware values, so every fault names the file, the key and what is wrong.

use std::cell::RefCell;

use toml::{Table, Value};

use super::{CaseError, GivenLength};
use crate::units::{self, Dimension};

pub(crate) use crate::suggest::hint;

/// A table being read, with its key path for messages.
pub(super) struct Section<'a> {
    pub(super) file: &'a str,
    path: String,
    pub(super) table: &'a Table,
    /// Every length read so far, shared by all sections of one file.
    lengths: &'a RefCell<Vec<GivenLength>>,
}

impl<'a> Section<'a> {
    /// The top-level table of `file`; lengths read through it and its children go to `lengths`.
    pub(super) fn root(
        file: &'a str,
        table: &'a Table,
        lengths: &'a RefCell<Vec<GivenLength>>,
    ) -> Self {
        Self {
            file,
            path: String::new(),
            table,
            lengths,
        }
    }

    /// A sub-table read under the key path `path`.
    pub(super) fn child(&self, path: String, table: &'a Table) -> Section<'a> {
        Section {
            file: self.file,
            path,
            table,
            lengths: self.lengths,
        }
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

    /// Refuses keys of the earlier schema, naming what replaced them: (old key, new key, note).
    pub(super) fn renamed(&self, renames: &[(&str, &str, &str)]) -> Result<(), CaseError> {
        for &(old, new, note) in renames {
            if self.table.contains_key(old) {
                let fault = format!("renamed to {}{note}", self.key_path(new));
                return Err(self.fault(old, &fault));
            }
        }
        Ok(())
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
            Some(Value::Table(t)) => Ok(Some(self.child(self.key_path(key), t))),
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

    /// A number (SI) or a string with a unit of dimension `dim`. Lengths are recorded with
    /// whether they carried a unit.
    pub(super) fn quantity(&self, key: &str, dim: Dimension) -> Result<Option<f64>, CaseError> {
        let (v, plain) = match self.table.get(key) {
            None => return Ok(None),
            Some(Value::Integer(i)) => (*i as f64, true),
            Some(Value::Float(f)) => (*f, true),
            Some(Value::String(s)) => (
                units::parse(s, dim).map_err(|e| self.fault(key, &e))?,
                units::parse(s, Dimension::Dimensionless).is_ok(),
            ),
            Some(_) => return Err(self.fault(key, &format!("must be {dim}"))),
        };
        if !v.is_finite() {
            return Err(self.fault(key, "must be finite"));
        }
        units::check_magnitude(v, dim).map_err(|e| self.fault(key, &e))?;
        if dim == Dimension::Length {
            self.lengths.borrow_mut().push(GivenLength {
                key: self.key_path(key),
                metres: v,
                plain,
            });
        }
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
