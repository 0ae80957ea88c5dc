//! The case's labels for the VTK map: title, region names and materials, winding data.
//!
//! The solver writes the arrays (`axicore_solver::export::vtk`); only this crate knows what the
//! regions are called. Region ids: 0 air, 1 core, 2 + k winding k (see [`crate::geometry`]).

use axicore_solver::export::vtk::{self, MapLabels};
use axicore_solver::export::vtu::DataArray;
use axicore_solver::{FeMesh, Model, Solution, SolverError};

use crate::case::Case;
use crate::geometry::{winding_tag, AIR_TAG, CORE_TAG};

/// Name of region `tag` of `case`: "air", "core" or the winding's name from the case.
pub fn region_name(case: &Case, tag: u32) -> String {
    match tag {
        AIR_TAG => "air".into(),
        CORE_TAG => "core".into(),
        t => (0..case.windings.len())
            .find(|&k| winding_tag(k) == t)
            .map_or_else(|| format!("region {t}"), |k| case.windings[k].name.clone()),
    }
}

/// Kind of region `tag`: "air", "core" or "winding" (a winding may be called anything).
pub fn region_kind(tag: u32) -> &'static str {
    match tag {
        AIR_TAG => "air",
        CORE_TAG => "core",
        _ => "winding",
    }
}

/// Title, region names (by id) and the case's winding and material data as field data.
pub fn labels(case: &Case) -> MapLabels {
    let n = 2 + case.windings.len();
    let region_names = (0..n as u32).map(|t| region_name(case, t)).collect();
    let mut materials = vec![String::from("air"); n];
    materials[CORE_TAG as usize] = case.core.as_ref().map_or_else(
        || "(no core in this case)".into(),
        |c| c.material_name.clone(),
    );
    for k in 0..case.windings.len() {
        materials[winding_tag(k) as usize] = "winding (non-magnetic, mu_r = 1)".into();
    }
    let winding = |f: &dyn Fn(&crate::case::Winding) -> f64| -> Vec<f64> {
        case.windings.iter().map(f).collect()
    };
    MapLabels {
        title: case.title.clone(),
        region_names,
        extra: vec![
            DataArray::text(
                "region_kinds",
                (0..n as u32).map(|t| region_kind(t).into()).collect(),
            ),
            DataArray::text("region_materials", materials),
            DataArray::scalars("winding_turns", winding(&|w| w.turns)),
            DataArray::scalars("winding_current_A", winding(&|w| w.current)),
            DataArray::scalars("background_B_z_T", vec![case.background_b]),
            DataArray::text(
                "program",
                vec![format!("axicore {}", env!("CARGO_PKG_VERSION"))],
            ),
        ],
    }
}

/// The field map (.vtu bytes) of a solved case: `j_elem` the element current densities the
/// field was solved for (A/m²), `saturated_at` the flagged fraction of B_sat.
pub fn field_vtu(
    case: &Case,
    model: &Model,
    sol: &Solution,
    j_elem: &[f64],
    saturated_at: f64,
) -> Result<Vec<u8>, SolverError> {
    vtk::field_map(model, sol, j_elem, saturated_at, &labels(case))
}

/// The mesh map (.vtu bytes, region ids and names only) of `mesh` built for `case`: what
/// `axicore mesh --vtk` writes.
pub fn mesh_vtu(case: &Case, mesh: &FeMesh) -> Result<Vec<u8>, SolverError> {
    vtk::mesh_map(mesh, &labels(case))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn regions_are_named_by_id_with_winding_names_from_the_case() {
        let case = crate::case::parse_case(crate::EXAMPLE_CASE, "example").unwrap();
        let l = labels(&case);
        assert_eq!(l.region_names[0], "air");
        assert_eq!(l.region_names[1], "core");
        assert_eq!(l.region_names[2], case.windings[0].name);
        let kinds = &l.extra[0];
        assert_eq!(kinds.name, "region_kinds");
        assert_eq!(l.region_names.len(), 2 + case.windings.len());
    }
}
