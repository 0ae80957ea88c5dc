//! Reading a case from TOML text with strict key checking and unit-aware values.

use std::path::Path;
use std::sync::Arc;

use axicore_solver::material::{BhTable, Brauer, SaturationLaw, MAX_MU_R, MIN_SATURATION};
use axicore_solver::{Material, NewtonSettings};

use toml::{Table, Value};

use super::materials;
use super::section::{hint, Section};
use super::validate::validate;
use super::{Case, CaseError, Core, CoreShape, MeshControls, Winding};
use crate::units::Dimension;

/// Reads and parses a case file.
pub fn read_case_file(path: &Path) -> Result<Case, CaseError> {
    let file = path.display().to_string();
    let text = read_text(path).map_err(|reason| CaseError::Read {
        file: file.clone(),
        reason,
    })?;
    parse_case(&text, &file)
}

/// Largest case or B–H file read, bytes (a 5000-point table is ~100 kB).
const MAX_INPUT_BYTES: u64 = 16 << 20;

/// The text of a regular file of at most [`MAX_INPUT_BYTES`]. Why the checks: a named pipe
/// blocked the read for ever and `/dev/zero` filled the memory until the process was killed.
fn read_text(path: &Path) -> Result<String, String> {
    use std::io::Read;
    let meta = std::fs::metadata(path).map_err(|e| e.to_string())?;
    if !meta.is_file() {
        return Err("not a regular file".into());
    }
    let mut bytes = Vec::new();
    std::fs::File::open(path)
        .and_then(|f| f.take(MAX_INPUT_BYTES + 1).read_to_end(&mut bytes))
        .map_err(|e| e.to_string())?;
    if bytes.len() as u64 > MAX_INPUT_BYTES {
        return Err(format!("larger than {} MiB", MAX_INPUT_BYTES >> 20));
    }
    String::from_utf8(bytes).map_err(|_| "stream did not contain valid UTF-8".into())
}

/// Parses case text; `file` names it in error messages.
pub fn parse_case(text: &str, file: &str) -> Result<Case, CaseError> {
    let root: Table = text.parse().map_err(|e: toml::de::Error| {
        let (line, column) = e.span().map(|s| line_col(text, s.start)).unwrap_or((1, 1));
        CaseError::Syntax {
            file: file.to_string(),
            line,
            column,
            reason: e.message().replace('\n', " "),
        }
    })?;
    let top = Section::new(file, String::new(), &root);
    top.only(&[
        "title",
        "core",
        "winding",
        "background",
        "air",
        "mesh",
        "solver",
    ])?;
    let title = top
        .string("title")?
        .unwrap_or_else(|| "untitled case".into());
    let core = match top.table("core")? {
        Some(s) => Some(parse_core(&s)?),
        None => None,
    };
    let mut windings = Vec::new();
    match root.get("winding") {
        None => {}
        Some(Value::Array(items)) => {
            for (i, item) in items.iter().enumerate() {
                let key = format!("winding[{}]", i + 1);
                let Value::Table(t) = item else {
                    return Err(top.fault(&key, "must be a table ([[winding]])"));
                };
                windings.push(parse_winding(&Section::new(file, key, t), i)?);
            }
        }
        Some(Value::Table(t)) => windings.push(parse_winding(
            &Section::new(file, "winding[1]".into(), t),
            0,
        )?),
        Some(_) => return Err(top.fault("winding", "must be a [[winding]] table")),
    }
    let background_b = match top.table("background")? {
        Some(s) => {
            s.only(&["b_axial"])?;
            s.quantity("b_axial", Dimension::FluxDensity)?
                .unwrap_or(0.0)
        }
        None => 0.0,
    };
    let (air_radius, open_boundary) = match top.table("air")? {
        Some(s) => {
            s.only(&["radius", "boundary"])?;
            let open = match s.string("boundary")?.as_deref() {
                None | Some("open") => true,
                Some("truncated") => false,
                Some(other) => {
                    return Err(s.fault(
                        "boundary",
                        &format!(
                            "unknown boundary '{other}'{} (open or truncated)",
                            hint(other, &["open", "truncated"])
                        ),
                    ))
                }
            };
            (s.positive("radius", Dimension::Length)?, open)
        }
        None => (None, true),
    };
    let mesh = match top.table("mesh")? {
        Some(s) => parse_mesh(&s)?,
        None => MeshControls::default(),
    };
    let newton = match top.table("solver")? {
        Some(s) => parse_solver(&s)?,
        None => NewtonSettings::default(),
    };
    let case = Case {
        title,
        core,
        windings,
        background_b,
        air_radius,
        open_boundary,
        mesh,
        newton,
    };
    validate(&case, file)?;
    Ok(case)
}

/// Supported length/diameter of a core.
const MIN_ASPECT: f64 = 1e-3;
const MAX_ASPECT: f64 = 1e4;

fn parse_core(s: &Section) -> Result<Core, CaseError> {
    let shape_name = s
        .string("shape")?
        .ok_or_else(|| s.fault("shape", "missing (rod, tube, sphere or spheroid)"))?;
    let common = ["shape", "centre", "material", "mu_r", "bh_curve", "law"];
    let with = |extra: &[&'static str]| -> Vec<&'static str> {
        common
            .iter()
            .copied()
            .chain(extra.iter().copied())
            .collect()
    };
    let shape = match shape_name.as_str() {
        "rod" => {
            s.only(&with(&["length", "diameter"]))?;
            CoreShape::Rod {
                length: s.required_positive("length", Dimension::Length)?,
                diameter: s.required_positive("diameter", Dimension::Length)?,
            }
        }
        "tube" => {
            s.only(&with(&["length", "diameter", "bore"]))?;
            CoreShape::Tube {
                length: s.required_positive("length", Dimension::Length)?,
                diameter: s.required_positive("diameter", Dimension::Length)?,
                bore: s.required_positive("bore", Dimension::Length)?,
            }
        }
        "sphere" => {
            s.only(&with(&["diameter"]))?;
            CoreShape::Sphere {
                diameter: s.required_positive("diameter", Dimension::Length)?,
            }
        }
        "spheroid" => {
            s.only(&with(&["length", "diameter"]))?;
            CoreShape::Spheroid {
                length: s.required_positive("length", Dimension::Length)?,
                diameter: s.required_positive("diameter", Dimension::Length)?,
            }
        }
        other => {
            return Err(s.fault(
                "shape",
                &format!(
                    "unknown shape '{other}'{} (rod, tube, sphere or spheroid)",
                    hint(other, &["rod", "tube", "sphere", "spheroid"])
                ),
            ))
        }
    };
    if let CoreShape::Rod { length, diameter }
    | CoreShape::Tube {
        length, diameter, ..
    }
    | CoreShape::Spheroid { length, diameter } = shape
    {
        // A plausibility bound (slender search-coil cores reach L/D of a few hundred): a
        // 100 m × 1 µm spheroid ran for minutes in the mesher or failed there.
        let ratio = length / diameter;
        if !(MIN_ASPECT..=MAX_ASPECT).contains(&ratio) {
            return Err(s.fault(
                "length",
                &format!(
                    "length/diameter = {ratio:.3e} is outside the supported {MIN_ASPECT:e} – {MAX_ASPECT:e}"
                ),
            ));
        }
    }
    let centre = s.quantity("centre", Dimension::Length)?.unwrap_or(0.0);
    let (material_name, material) = parse_core_material(s)?;
    Ok(Core {
        shape,
        centre,
        material_name,
        material,
    })
}

/// Exactly one of: `material` (built-in name), `mu_r` (linear), `[core.bh_curve]` (table),
/// `[core.law]` (analytic law).
fn parse_core_material(s: &Section) -> Result<(String, Material), CaseError> {
    let given: Vec<&str> = ["material", "mu_r", "bh_curve", "law"]
        .into_iter()
        .filter(|k| s.table.contains_key(*k))
        .collect();
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
            check_mu_r(s, "mu_r", mu_r)?;
            if mu_r < 1.0 {
                return Err(s.fault(
                    "mu_r",
                    &format!("relative permeability {mu_r} is below 1 (not a ferromagnetic or paramagnetic core)"),
                ));
            }
            Ok((format!("linear, μr = {mu_r}"), Material::Linear { mu_r }))
        }
        ["material"] => {
            let name = s.string("material")?.unwrap_or_default();
            match materials::find(&name) {
                Some(m) => Ok((name, m.material())),
                None => {
                    let names: Vec<&str> = materials::builtin_materials()
                        .iter()
                        .map(|m| m.name)
                        .collect();
                    Err(s.fault(
                        "material",
                        &format!(
                            "unknown material '{name}'{}; built-in: {}",
                            hint(&name, &names),
                            names.join(", ")
                        ),
                    ))
                }
            }
        }
        ["bh_curve"] => {
            let t = s
                .table("bh_curve")?
                .ok_or_else(|| s.fault("bh_curve", "must be a table"))?;
            let points = bh_points(&t)?;
            let key = if t.table.contains_key("file") {
                "file"
            } else {
                "b"
            };
            let table = BhTable::new(&points).map_err(|e| t.fault(key, &e.to_string()))?;
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

/// Points [H, B] of a `[core.bh_curve]`: inline arrays `h`, `b` or a CSV `file`.
fn bh_points(t: &Section) -> Result<Vec<[f64; 2]>, CaseError> {
    t.only(&["h", "b", "file"])?;
    if let Some(file) = t.string("file")? {
        if t.table.contains_key("h") || t.table.contains_key("b") {
            return Err(t.fault("file", "give either file or h and b, not both"));
        }
        let base = Path::new(t.file).parent().unwrap_or(Path::new("."));
        let path = base.join(&file);
        let text = read_text(&path)
            .map_err(|e| t.fault("file", &format!("cannot read {}: {e}", path.display())))?;
        return crate::bh_csv::parse(&text)
            .map_err(|e| t.fault("file", &format!("{}: {e}", path.display())));
    }
    let h = t.quantity_list("h", Dimension::FieldStrength)?;
    let b = t.quantity_list("b", Dimension::FluxDensity)?;
    if h.len() != b.len() {
        return Err(t.fault(
            "b",
            &format!("has {} values but h has {}", b.len(), h.len()),
        ));
    }
    Ok(h.into_iter().zip(b).map(|(h, b)| [h, b]).collect())
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

fn parse_winding(s: &Section, index: usize) -> Result<Winding, CaseError> {
    s.only(&[
        "name",
        "turns",
        "current",
        "inner_radius",
        "outer_radius",
        "length",
        "centre",
    ])?;
    let turns = s
        .quantity("turns", Dimension::Dimensionless)?
        .ok_or_else(|| s.fault("turns", "missing"))?;
    if turns <= 0.0 {
        return Err(s.fault("turns", &format!("{turns} must be positive")));
    }
    // A plausibility bound, far beyond any real winding (common practice: fine-wire search
    // coils stay below 1e6 turns).
    if turns > 1e9 {
        return Err(s.fault("turns", &format!("{turns:e} is above the supported 1e9")));
    }
    let inner_radius = s
        .quantity("inner_radius", Dimension::Length)?
        .ok_or_else(|| s.fault("inner_radius", "missing"))?;
    if inner_radius > 0.0 {
        crate::units::check_size(inner_radius).map_err(|e| s.fault("inner_radius", &e))?;
    }
    if inner_radius < 0.0 {
        return Err(s.fault("inner_radius", "must not be negative"));
    }
    Ok(Winding {
        name: s
            .string("name")?
            .unwrap_or_else(|| format!("winding {}", index + 1)),
        turns,
        current: s
            .quantity("current", Dimension::Current)?
            .ok_or_else(|| s.fault("current", "missing"))?,
        inner_radius,
        outer_radius: s.required_positive("outer_radius", Dimension::Length)?,
        length: s.required_positive("length", Dimension::Length)?,
        centre: s.quantity("centre", Dimension::Length)?.unwrap_or(0.0),
    })
}

fn parse_solver(s: &Section) -> Result<NewtonSettings, CaseError> {
    s.only(&["residual_tolerance", "update_tolerance", "max_iterations"])?;
    let d = NewtonSettings::default();
    let tol = |key: &str, default: f64| -> Result<f64, CaseError> {
        match s.positive(key, Dimension::Dimensionless)? {
            Some(v) if v >= 1.0 => Err(s.fault(key, &format!("{v} must be below 1 (relative)"))),
            Some(v) => Ok(v),
            None => Ok(default),
        }
    };
    let max_iterations = match s.positive("max_iterations", Dimension::Dimensionless)? {
        Some(n) if n.fract() != 0.0 || n > 1000.0 => {
            return Err(s.fault("max_iterations", "must be a whole number ≤ 1000"))
        }
        Some(n) => n as usize,
        None => d.max_iterations,
    };
    Ok(NewtonSettings {
        residual_tol: tol("residual_tolerance", d.residual_tol)?,
        update_tol: tol("update_tolerance", d.update_tol)?,
        max_iterations,
    })
}

fn parse_mesh(s: &Section) -> Result<MeshControls, CaseError> {
    s.only(&[
        "fineness",
        "core_size",
        "winding_size",
        "corner_size",
        "far_size",
        "grading",
        "min_angle",
        "arc_tolerance",
        "max_nodes",
        "order",
    ])?;
    let d = MeshControls::default();
    let order = match s.quantity("order", Dimension::Dimensionless)? {
        None => d.order,
        Some(o) if o == 1.0 || o == 2.0 => o as usize,
        Some(o) => return Err(s.fault("order", &format!("{o} must be 1 or 2"))),
    };
    let min_angle_deg = s
        .positive("min_angle", Dimension::Dimensionless)?
        .unwrap_or(d.min_angle_deg);
    if min_angle_deg > 30.0 {
        return Err(s.fault(
            "min_angle",
            "above 30 degrees refinement may not terminate; use ≤ 30",
        ));
    }
    let arc_tolerance = s.positive("arc_tolerance", Dimension::Dimensionless)?;
    // Below 1e-10 the polygon of a curved outline needs more segments than any mesh cap allows
    // (1e-300 overflowed the segment count).
    if arc_tolerance.is_some_and(|t| !(1e-10..=0.05).contains(&t)) {
        return Err(s.fault(
            "arc_tolerance",
            "must be from 1e-10 to 0.05 (relative chord sagitta)",
        ));
    }
    let fineness = s
        .positive("fineness", Dimension::Dimensionless)?
        .unwrap_or(1.0);
    if fineness > 50.0 {
        return Err(s.fault("fineness", "must be ≤ 50"));
    }
    let grading = s.positive("grading", Dimension::Dimensionless)?;
    if grading.is_some_and(|g| g > 2.0) {
        return Err(s.fault("grading", "must be ≤ 2"));
    }
    let max_nodes = match s.positive("max_nodes", Dimension::Dimensionless)? {
        Some(n) if n < 100.0 => return Err(s.fault("max_nodes", "must be at least 100")),
        Some(n) => n as usize,
        None => d.max_nodes,
    };
    Ok(MeshControls {
        fineness,
        core_size: s.positive("core_size", Dimension::Length)?,
        winding_size: s.positive("winding_size", Dimension::Length)?,
        corner_size: s.positive("corner_size", Dimension::Length)?,
        far_size: s.positive("far_size", Dimension::Length)?,
        grading,
        min_angle_deg,
        arc_tolerance,
        max_nodes,
        order,
    })
}

fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let before = &text[..offset.min(text.len())];
    let line = before.matches('\n').count() + 1;
    let column = before.len() - before.rfind('\n').map_or(0, |i| i + 1) + 1;
    (line, column)
}
