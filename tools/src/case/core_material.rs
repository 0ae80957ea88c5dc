//! The core's material in a case file: a built-in name, a linear `mu_r`, a B–H table
//! (`[core.bh_curve]`, inline or CSV) or an analytic law (`[core.law]`), or a permanent
//! magnet's prescribed `magnetization` (or `polarization`) with its recoil `mu_r`; each fault
//! at its key.

use std::path::Path;
use std::sync::Arc;

use axicore_solver::material::{
    check_bh_points, BhColumn, BhTable, BhTableFault, Brauer, SaturationLaw, MAX_MU_R,
    MIN_SATURATION,
};
use axicore_solver::{Material, MU0};

use super::materials;
use super::read::read_text;
use super::section::{hint, Section};
use super::CaseError;
use crate::units::Dimension;

/// Largest prescribed magnetization |M0| of a permanent-magnet core, A/m. The strongest
/// magnets (sintered NdFeB, remanence about 1.4 T) reach about 1.1e6 A/m (typical value, from
/// memory); the bound leaves two decades for studies and keeps J0 = μ0 M0 below about 126 T,
/// well inside the supported flux densities (1 kT).
pub const MAX_MAGNETIZATION: f64 = 1e8;

/// What to write when a magnet is given a material other than a linear `mu_r`.
const MAGNET_NEEDS_LINEAR: &str =
    "a prescribed magnetization needs a linear core: give mu_r (the recoil permeability) or nothing";

/// The prescribed magnetization M0 of a permanent-magnet core in A/m: `magnetization` (a
/// field strength) or `polarization` (J0 = μ0 M0, a flux density), at most one; None for a
/// soft core.
pub(super) fn parse_magnetization(s: &Section) -> Result<Option<f64>, CaseError> {
    let m = s.quantity("magnetization", Dimension::FieldStrength)?;
    let j = s.quantity("polarization", Dimension::FluxDensity)?;
    let (key, m0) = match (m, j) {
        (None, None) => return Ok(None),
        (Some(_), Some(_)) => {
            return Err(s.fault(
                "polarization",
                "give either magnetization (A/m) or polarization (T), not both",
            ))
        }
        (Some(m), None) => ("magnetization", m),
        (None, Some(j)) => ("polarization", j / MU0),
    };
    if m0.abs() > MAX_MAGNETIZATION {
        let what = if key == "magnetization" {
            format!("{m0:e} A/m")
        } else {
            format!("{:e} T (M0 = {m0:.4e} A/m)", m0 * MU0)
        };
        return Err(s.fault(
            key,
            &format!("{what} is above the supported |M0| ≤ {MAX_MAGNETIZATION:e} A/m"),
        ));
    }
    Ok(Some(m0))
}

/// Exactly one of: `material` (built-in name), `mu_r` (linear), `[core.bh_curve]` (table),
/// `[core.law]` (analytic law); for a permanent magnet (`magnet`) `mu_r`, the recoil
/// permeability, or nothing (1).
pub(super) fn parse_core_material(
    s: &Section,
    magnet: bool,
) -> Result<(String, Material), CaseError> {
    let given: Vec<&str> = ["material", "mu_r", "bh_curve", "law"]
        .into_iter()
        .filter(|k| s.table.contains_key(*k))
        .collect();
    if magnet {
        if let Some(other) = given.iter().find(|k| **k != "mu_r") {
            return Err(s.fault(other, MAGNET_NEEDS_LINEAR));
        }
        let mu_r = match s.quantity("mu_r", Dimension::Dimensionless)? {
            Some(mu) => linear_mu_r(s, mu)?,
            None => 1.0,
        };
        return Ok((
            format!("permanent magnet, recoil μr = {mu_r}"),
            Material::Linear { mu_r },
        ));
    }
    match given.as_slice() {
        [] => Err(s.fault(
            "material",
            "missing (a built-in name, mu_r = number, [core.bh_curve] or [core.law])",
        )),
        [_, second, ..] => Err(s.fault(
            second,
            &format!(
                "give only one of material, mu_r, bh_curve, law (found {})",
                given.join(" and ")
            ),
        )),
        ["mu_r"] => {
            let mu_r = s.quantity("mu_r", Dimension::Dimensionless)?.unwrap_or(1.0);
            let mu_r = linear_mu_r(s, mu_r)?;
            Ok((format!("linear, μr = {mu_r}"), Material::Linear { mu_r }))
        }
        ["material"] => {
            let name = s.string("material")?.unwrap_or_default();
            match materials::find(&name) {
                Some(m) => Ok((name, m.material())),
                None => Err(s.fault("material", &materials::unknown_material(&name))),
            }
        }
        ["bh_curve"] => {
            let t = s
                .table("bh_curve")?
                .ok_or_else(|| s.fault("bh_curve", "must be a table"))?;
            let (points, lines) = bh_points(&t)?;
            check_bh_points(&points).map_err(|f| table_fault(&t, &f, lines.as_deref()))?;
            let table = BhTable::new(&points).map_err(|e| t.fault("b", &e.to_string()))?;
            Ok((
                "B–H table".into(),
                Material::Saturable(Arc::new(SaturationLaw::Table(table))),
            ))
        }
        _ => {
            let t = s
                .table("law")?
                .ok_or_else(|| s.fault("law", "must be a table"))?;
            let law = parse_law(&t)?;
            let mat = Material::Saturable(Arc::new(law));
            mat.validate()
                .map_err(|e| t.fault("kind", &e.to_string()))?;
            Ok((t.string("kind")?.unwrap_or_default(), mat))
        }
    }
}

/// The points [H, B] of a table, with the CSV line of each when read from a file.
type TablePoints = (Vec<[f64; 2]>, Option<Vec<usize>>);

/// Points [H, B] of a `[core.bh_curve]`: inline arrays `h`, `b` or a CSV `file` (then with
/// the line of each point).
fn bh_points(t: &Section) -> Result<TablePoints, CaseError> {
    t.only(&["h", "b", "file"])?;
    if let Some(file) = t.string("file")? {
        if t.table.contains_key("h") || t.table.contains_key("b") {
            return Err(t.fault("file", "give either file or h and b, not both"));
        }
        let path = bh_file_path(t, &file);
        let text = read_text(&path)
            .map_err(|e| t.fault("file", &format!("cannot read {}: {e}", path.display())))?;
        let rows = crate::bh_csv::parse_rows(&text)
            .map_err(|e| t.fault("file", &format!("{}: {e}", path.display())))?;
        let (lines, points) = rows.into_iter().unzip();
        return Ok((points, Some(lines)));
    }
    let h = t.quantity_list("h", Dimension::FieldStrength)?;
    let b = t.quantity_list("b", Dimension::FluxDensity)?;
    if h.len() != b.len() {
        return Err(t.fault(
            "b",
            &format!("has {} values but h has {}", b.len(), h.len()),
        ));
    }
    Ok((h.into_iter().zip(b).map(|(h, b)| [h, b]).collect(), None))
}

fn bh_file_path(t: &Section, file: &str) -> std::path::PathBuf {
    Path::new(t.file)
        .parent()
        .unwrap_or(Path::new("."))
        .join(file)
}

/// A table fault at its own key: `h[k]` or `b[k]` inline, the file's line and column for a
/// CSV (`lines[k − 1]` is the line of point k).
fn table_fault(t: &Section, f: &BhTableFault, lines: Option<&[usize]>) -> CaseError {
    let column = f.column.unwrap_or(BhColumn::B);
    match (lines, f.point) {
        (None, Some(k)) => {
            let key = if column == BhColumn::H { "h" } else { "b" };
            t.fault(&format!("{key}[{k}]"), &f.message)
        }
        (None, None) => t.fault("b", &f.message),
        (Some(lines), point) => {
            let file = t.string("file").ok().flatten().unwrap_or_default();
            let path = bh_file_path(t, &file);
            let place = match (point.and_then(|k| lines.get(k - 1)), f.column) {
                (Some(line), Some(c)) => {
                    let (n, name) = if c == BhColumn::H { (1, "H") } else { (2, "B") };
                    format!("line {line}, column {n} ({name}): ")
                }
                (Some(line), None) => format!("line {line}: "),
                (None, _) => String::new(),
            };
            t.fault("file", &format!("{}: {place}{}", path.display(), f.message))
        }
    }
}

/// A linear core's `mu_r`, from 1 to the materials' bound.
fn linear_mu_r(s: &Section, mu_r: f64) -> Result<f64, CaseError> {
    check_mu_r(s, "mu_r", mu_r)?;
    if mu_r < 1.0 {
        return Err(s.fault(
            "mu_r",
            &format!(
                "relative permeability {mu_r} is below 1 (not a ferromagnetic or paramagnetic core)"
            ),
        ));
    }
    Ok(mu_r)
}

/// Rejects a relative permeability above the materials' bound, naming the key (the law's own
/// check would name only the law).
fn check_mu_r(s: &Section, key: &str, mu: f64) -> Result<(), CaseError> {
    if mu > MAX_MU_R {
        return Err(s.fault(key, &format!("{mu:e} is above the supported {MAX_MU_R:e}")));
    }
    Ok(())
}

/// An analytic law from `[core.law]`.
fn parse_law(t: &Section) -> Result<SaturationLaw, CaseError> {
    let kind = t.string("kind")?.ok_or_else(|| {
        t.fault(
            "kind",
            "missing (frohlich-kennelly, arctan, knee or brauer)",
        )
    })?;
    let kinds = ["frohlich-kennelly", "arctan", "knee", "brauer"];
    let required = |key: &str, dim| t.quantity(key, dim)?.ok_or_else(|| t.fault(key, "missing"));
    // Each parameter is checked here so that a fault names its own key.
    let saturation = || -> Result<f64, CaseError> {
        let js = required("saturation", Dimension::FluxDensity)?;
        if js <= 0.0 {
            return Err(t.fault("saturation", &format!("{js} T must be positive")));
        }
        // (The law's own check, named here.)
        if js < MIN_SATURATION {
            return Err(t.fault(
                "saturation",
                &format!("{js:e} T is below the supported {MIN_SATURATION} T"),
            ));
        }
        Ok(js)
    };
    let initial = || -> Result<f64, CaseError> {
        let mu = required("initial_mu_r", Dimension::Dimensionless)?;
        if mu <= 1.0 {
            return Err(t.fault("initial_mu_r", &format!("{mu} must be above 1")));
        }
        check_mu_r(t, "initial_mu_r", mu)?;
        Ok(mu)
    };
    Ok(match kind.as_str() {
        "frohlich-kennelly" | "arctan" => {
            t.only(&["kind", "saturation", "initial_mu_r"])?;
            let js = saturation()?;
            let mu_ri = initial()?;
            if kind == "arctan" {
                SaturationLaw::Arctan { js, mu_ri }
            } else {
                SaturationLaw::FrohlichKennelly { js, mu_ri }
            }
        }
        "knee" => {
            t.only(&["kind", "saturation", "initial_mu_r", "max_mu_r"])?;
            let js = saturation()?;
            let mu_i = initial()?;
            let mu_max = required("max_mu_r", Dimension::Dimensionless)?;
            check_mu_r(t, "max_mu_r", mu_max)?;
            if mu_max < mu_i {
                return Err(t.fault(
                    "max_mu_r",
                    &format!("{mu_max} must not be below initial_mu_r = {mu_i}"),
                ));
            }
            SaturationLaw::Knee { js, mu_i, mu_max }
        }
        "brauer" => {
            t.only(&["kind", "k1", "k2", "k3"])?;
            let k1 = required("k1", Dimension::Dimensionless)?;
            let k2 = required("k2", Dimension::Dimensionless)?;
            let k3 = required("k3", Dimension::Dimensionless)?;
            for (key, v) in [("k1", k1), ("k2", k2)] {
                if v <= 0.0 {
                    return Err(t.fault(key, &format!("{v} must be positive")));
                }
            }
            if k3 <= 0.0 {
                return Err(t.fault("k3", &format!("{k3} m/H must be positive")));
            }
            let law = Brauer::new(k1, k2, k3).map_err(|e| t.fault("k3", &e.to_string()))?;
            SaturationLaw::Brauer(law)
        }
        other => {
            return Err(t.fault(
                "kind",
                &format!(
                    "unknown law '{other}'{} ({})",
                    hint(other, &kinds),
                    kinds.join(", ")
                ),
            ))
        }
    })
}
