//! Reading a case from TOML text with strict key checking and unit-aware values.

use std::cell::RefCell;
use std::path::Path;

use super::read::read_text;

use axicore_mesher::{MAX_ANGLE_FLOOR_DEG, MAX_GRADED_LAYERS};
use axicore_solver::NewtonSettings;

use toml::{Table, Value};

use super::core_material::{parse_core_material, parse_magnetization};
use super::section::{hint, Section};
use super::validate::validate;
use super::{Case, CaseError, Core, CoreShape, Edge, MeshControls, Winding};
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

/// What to write when the case file holds nothing to read.
const EMPTY_HINT: &str =
    "the case file is empty: start from the built-in example with `axicore example > my.toml`";

/// Parses case text; `file` names it in error messages.
pub fn parse_case(text: &str, file: &str) -> Result<Case, CaseError> {
    let root: Table = text
        .parse()
        .map_err(|e: toml::de::Error| syntax_error(text, file, &e))?;
    if root.is_empty() {
        return Err(CaseError::Key {
            file: file.to_string(),
            key: "(file)".into(),
            fault: EMPTY_HINT.into(),
        });
    }
    let lengths = RefCell::new(Vec::new());
    let top = Section::root(file, &root, &lengths);
    top.renamed(&[(
        "air",
        "surroundings",
        " (radius stays radius; boundary is now edge: open → exact, truncated → fixed)",
    )])?;
    top.only(&[
        "title",
        "core",
        "winding",
        "background",
        "surroundings",
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
                windings.push(parse_winding(&top.child(key, t), i)?);
            }
        }
        Some(Value::Table(t)) => {
            windings.push(parse_winding(&top.child("winding[1]".into(), t), 0)?)
        }
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
    let (surroundings_radius, edge) = match top.table("surroundings")? {
        Some(s) => parse_surroundings(&s)?,
        None => (None, Edge::Exact),
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
        surroundings_radius,
        edge,
        given_lengths: lengths.into_inner(),
        mesh,
        newton,
    };
    validate(&case, file)?;
    Ok(case)
}

/// A TOML syntax fault at the line and column where the parser found it (for a fault inside
/// a nested or inline table too: the span is the offending value's, not the table's).
fn syntax_error(text: &str, file: &str, e: &toml::de::Error) -> CaseError {
    // toml 0.9 reports a dotted key or table header nested beyond its limit without a span
    // (it said line 1, column 1): the deepest dotted key is then the place.
    let (line, column) = e
        .span()
        .map(|s| line_col(text, s.start))
        .or_else(|| deepest_key_line(text))
        .unwrap_or((1, 1));
    CaseError::Syntax {
        file: file.to_string(),
        line,
        column,
        reason: e.message().trim().replace('\n', " "),
    }
}

/// `[surroundings]`: the radius of the meshed ball and how its edge is closed.
fn parse_surroundings(s: &Section) -> Result<(Option<f64>, Edge), CaseError> {
    s.renamed(&[("boundary", "edge", " (open → exact, truncated → fixed)")])?;
    s.only(&["radius", "edge"])?;
    let edge = match s.string("edge")?.as_deref() {
        None | Some("exact") => Edge::Exact,
        Some("fixed") => Edge::Fixed,
        Some(old @ ("open" | "truncated")) => {
            let new = if old == "open" { "exact" } else { "fixed" };
            return Err(s.fault("edge", &format!("'{old}' is now called '{new}'")));
        }
        Some(other) => {
            return Err(s.fault(
                "edge",
                &format!(
                    "unknown edge '{other}'{} (exact or fixed)",
                    hint(other, &["exact", "fixed"])
                ),
            ))
        }
    };
    Ok((s.positive("radius", Dimension::Length)?, edge))
}

/// Supported length/diameter of a core.
const MIN_ASPECT: f64 = 1e-3;
const MAX_ASPECT: f64 = 1e4;

fn parse_core(s: &Section) -> Result<Core, CaseError> {
    let shape_name = s
        .string("shape")?
        .ok_or_else(|| s.fault("shape", "missing (rod, tube, sphere or spheroid)"))?;
    let common = [
        "shape",
        "centre",
        "material",
        "mu_r",
        "bh_curve",
        "law",
        "magnetization",
        "polarization",
    ];
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
    let magnetization = parse_magnetization(s)?;
    let (material_name, material) = parse_core_material(s, magnetization.is_some())?;
    Ok(Core {
        shape,
        centre,
        material_name,
        material,
        magnetization,
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
    s.renamed(&[("min_angle", "angle_floor", "")])?;
    s.only(&[
        "fineness",
        "core_size",
        "winding_size",
        "corner_size",
        "far_size",
        "grading",
        "angle_floor",
        "arc_tolerance",
        "max_nodes",
        "order",
        "corner_layers",
    ])?;
    let d = MeshControls::default();
    let order = match s.quantity("order", Dimension::Dimensionless)? {
        None => d.order,
        Some(o) if o == 1.0 || o == 2.0 => o as usize,
        Some(o) => return Err(s.fault("order", &format!("{o} must be 1 or 2"))),
    };
    let angle_floor_deg = s
        .positive("angle_floor", Dimension::Dimensionless)?
        .unwrap_or(d.angle_floor_deg);
    if angle_floor_deg > MAX_ANGLE_FLOOR_DEG {
        return Err(s.fault(
            "angle_floor",
            &format!("above {MAX_ANGLE_FLOOR_DEG} degrees refinement may not terminate; use ≤ {MAX_ANGLE_FLOOR_DEG}"),
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
    // The mesher takes at most MAX_GRADED_LAYERS; a fraction would mean nothing.
    let corner_layers = match s.quantity("corner_layers", Dimension::Dimensionless)? {
        None => d.corner_layers,
        Some(n) if n.fract() == 0.0 && (0.0..=MAX_GRADED_LAYERS as f64).contains(&n) => n as u32,
        Some(n) => {
            return Err(s.fault(
                "corner_layers",
                &format!("{n} must be a whole number from 0 to {MAX_GRADED_LAYERS}"),
            ))
        }
    };
    Ok(MeshControls {
        fineness,
        core_size: s.positive("core_size", Dimension::Length)?,
        winding_size: s.positive("winding_size", Dimension::Length)?,
        corner_size: s.positive("corner_size", Dimension::Length)?,
        far_size: s.positive("far_size", Dimension::Length)?,
        grading,
        angle_floor_deg,
        arc_tolerance,
        max_nodes,
        order,
        corner_layers,
    })
}

/// Line and column (1-based) of the key or table header with the most dotted parts, if any
/// has more than one.
fn deepest_key_line(text: &str) -> Option<(usize, usize)> {
    let mut best: Option<(usize, usize, usize)> = None;
    for (i, raw) in text.lines().enumerate() {
        let line = raw.trim_start();
        let key = if line.starts_with('[') {
            line.trim_start_matches('[').split(']').next().unwrap_or("")
        } else {
            line.split('=').next().unwrap_or("")
        };
        let mut quoted = None;
        let mut dots = 0;
        for c in key.chars() {
            match (quoted, c) {
                (None, '"' | '\'') => quoted = Some(c),
                (Some(q), c) if c == q => quoted = None,
                (None, '.') => dots += 1,
                _ => {}
            }
        }
        if dots > 0 && best.is_none_or(|(d, _, _)| dots > d) {
            best = Some((dots, i + 1, raw.len() - line.len() + 1));
        }
    }
    best.map(|(_, line, column)| (line, column))
}

fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let before = &text[..offset.min(text.len())];
    let line = before.matches('\n').count() + 1;
    let column = before.len() - before.rfind('\n').map_or(0, |i| i + 1) + 1;
    (line, column)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn syntax_line(text: &str) -> (usize, String) {
        match parse_case(text, "c.toml").unwrap_err() {
            CaseError::Syntax { line, reason, .. } => (line, reason),
            other => panic!("not a syntax fault: {other}"),
        }
    }

    #[test]
    fn a_fault_in_a_nested_or_inline_table_is_reported_at_its_line() {
        let law = "title = \"t\"\n[core]\nshape = \"rod\"\n[core.law]\nkind = \"knee\"\nsaturation = 1.5 T\n";
        assert_eq!(syntax_line(law).0, 6);
        let curve = "[core]\nshape = \"rod\"\n\n[core.bh_curve]\nh = [0, 100]\nb = [0, 1.0 1.5]\n";
        assert_eq!(syntax_line(curve).0, 6);
        let inline = "[core]\nshape = \"rod\"\nlaw = { kind = \"knee\", saturation = 1.5 T }\n";
        assert_eq!(syntax_line(inline).0, 3);
    }

    #[test]
    fn a_table_nested_beyond_the_parser_limit_is_reported_at_its_header() {
        let deep = format!("title = \"t\"\n\n[{}]\nb = 1\n", vec!["a"; 300].join("."));
        let (line, reason) = syntax_line(&deep);
        assert_eq!(line, 3, "{reason}");
        let dotted = format!("title = \"t\"\n{} = 1\n", vec!["a"; 300].join("."));
        assert_eq!(syntax_line(&dotted).0, 2);
    }

    #[test]
    fn an_empty_file_suggests_starting_from_the_example() {
        for text in ["", "\n\n", "# only a comment\n"] {
            let e = parse_case(text, "c.toml").unwrap_err().to_string();
            assert!(e.contains("axicore example > my.toml"), "{e}");
        }
    }
}
