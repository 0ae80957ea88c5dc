//! `axicore materials`: the built-in materials, or one material's B–H curve as a table,
//! CSV or plot.

use std::fmt::Write as _;
use std::path::PathBuf;

use clap::Args;

use super::failure::EXIT_OK;
use super::{emit, Failure};
use crate::case::{builtin_materials, find_material, unknown_material, BuiltinMaterial};
use crate::output;
use crate::plot::materials::bh_svg;

/// Options of `axicore materials`.
#[derive(Args, Debug)]
pub struct MaterialsArgs {
    /// A built-in material name: print its curve.
    name: Option<String>,
    /// Print the curve as CSV (H in A/m, B in T).
    #[arg(long)]
    csv: bool,
    /// Draw B(H) and μr(H) of the material as an SVG plot.
    #[arg(long, value_name = "FILE")]
    svg: Option<PathBuf>,
}

/// Runs `axicore materials`.
pub fn materials(a: MaterialsArgs) -> Result<u8, Failure> {
    let Some(name) = a.name else {
        if a.csv || a.svg.is_some() {
            return Err(Failure::input(
                "materials: --csv and --svg need a material name, e.g. axicore materials pure-iron --csv",
            ));
        }
        let mut s = String::new();
        let _ = writeln!(
            s,
            "{:<18} {:>6} {:>9} {:>9}  source",
            "name", "Bs/T", "μ_initial", "μ_max"
        );
        for m in builtin_materials() {
            let _ = writeln!(
                s,
                "{:<18} {:>6} {:>9} {:>9}  {}",
                m.name, m.saturation_t, m.mu_initial, m.mu_max, m.note
            );
        }
        emit(&s);
        return Ok(EXIT_OK);
    };
    let Some(m) = find_material(&name) else {
        return Err(Failure::input(unknown_material(&name)));
    };
    if let Some(path) = &a.svg {
        super::args::check_outputs(&[("--svg", path.as_path())], None)?;
    }
    let points = curve_points(m);
    if let Some(path) = a.svg {
        let svg = bh_svg(m.name, m.note, &points).map_err(Failure::other)?;
        output::write_all(&[(path, svg.into_bytes())]).map_err(Failure::other)?;
    }
    if a.csv {
        emit(&crate::bh_csv::write(&points));
    } else {
        let mut s = String::new();
        let _ = writeln!(s, "{} — {}", m.name, m.note);
        let _ = writeln!(s, "{:>14} {:>10} {:>12}", "H/(A/m)", "B/T", "μr = B/μ0H");
        for p in points.iter().skip(1).step_by(6) {
            let _ = writeln!(
                s,
                "{:>14.4e} {:>10.5} {:>12.1}",
                p[0],
                p[1],
                p[1] / (axicore_solver::MU0 * p[0])
            );
        }
        emit(&s);
    }
    Ok(EXIT_OK)
}

/// (H in A/m, B in T) from H = 0 and then logarithmically from 0.1 A/m to 1e6 A/m: the knee
/// of a high-permeability alloy sits at a few A/m.
pub fn curve_points(m: &BuiltinMaterial) -> Vec<[f64; 2]> {
    let law = m.material();
    std::iter::once([0.0, 0.0])
        .chain((0..=120).map(|i| {
            let h = 10f64.powf(-1.0 + 7.0 * i as f64 / 120.0);
            [h, law.b_of_h(h)]
        }))
        .collect()
}
