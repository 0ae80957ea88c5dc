//! The VTK map of an hp solution (.vtu): the field sampled on linear sub-triangles
//! ([`crate::hp::sample`]), k² per element with k at least the highest degree.
//!
//! Points are (x, y, z) = (r, z, 0) as in [`super::vtk`]. A_φ is continuous, so it is point
//! data on merged points (exact values of the solution there); B is discontinuous across
//! elements, so B and what follows from it are cell data, one value per sub-triangle (the
//! element's own B at the sub-triangle's mapped reference centroid). Field data carries the
//! title, coordinates, region names, units, the divisions k and how the map was sampled.

use super::vtk::{region_names, MapLabels, COORDINATES};
use super::vtu::{DataArray, Grid, VtuError};
use crate::error::SolverError;
use crate::hp::model::{HpModel, HpSolution};
use crate::hp::sample::SampledField;

/// The point arrays of an hp map: (name, unit, meaning).
pub const HP_POINT_ARRAYS: [(&str, &str, &str); 2] = [
    (
        "A_phi_Wb_per_m",
        "Wb/m",
        "azimuthal vector potential A_phi of the hp solution at the point (background included)",
    ),
    (
        "flux_function_Wb",
        "Wb",
        "2 pi r A_phi: flux through the circle of radius r at height z; its contours are field lines",
    ),
];

/// The cell arrays of an hp map: (name, unit, meaning).
pub const HP_CELL_ARRAYS: [(&str, &str, &str); 10] = [
    (
        "region",
        "1",
        "region id (Int32); names in field data region_names",
    ),
    (
        "element",
        "1",
        "Int32: the hp element the sub-triangle belongs to",
    ),
    (
        "degree",
        "1",
        "Int32: polynomial degree p of that element",
    ),
    (
        "B_T",
        "T",
        "flux density vector (B_r, B_z, 0) of the element at the sub-triangle's centroid",
    ),
    ("B_r_T", "T", "radial flux density B_r at the centroid"),
    ("B_z_T", "T", "axial flux density B_z at the centroid"),
    ("B_magnitude_T", "T", "|B| at the centroid"),
    (
        "H_A_per_m",
        "A/m",
        "field strength vector (H_r, H_z, 0) = nu (B - J0 e_z), J0 a magnet's polarization (0 elsewhere)",
    ),
    ("H_magnitude_A_per_m", "A/m", "|H| at the centroid"),
    (
        "mu_r",
        "1",
        "secant relative permeability |B - J0 e_z|/(mu0 |H|) (a magnet's recoil permeability)",
    ),
];

/// The .vtu file contents of `sol` sampled with at least `min_divisions` per element side.
pub fn hp_field_map(
    model: &HpModel,
    sol: &HpSolution,
    min_divisions: usize,
    labels: &MapLabels,
) -> Result<Vec<u8>, SolverError> {
    let s = model.sample(sol, min_divisions)?;
    hp_field_grid(model, &s, labels)?
        .to_bytes()
        .map_err(buffer_error)
}

/// The grid behind [`hp_field_map`] for an already sampled field `s` of `model`.
pub fn hp_field_grid(
    model: &HpModel,
    s: &SampledField,
    labels: &MapLabels,
) -> Result<Grid, SolverError> {
    let flux: Vec<f64> = s
        .points
        .iter()
        .zip(&s.a)
        .map(|(p, a)| 2.0 * std::f64::consts::PI * p[0] * a)
        .collect();
    let [n_a, n_flux] = HP_POINT_ARRAYS.map(|x| x.0);
    let point_data = vec![
        DataArray::scalars(n_a, s.a.clone()),
        DataArray::scalars(n_flux, flux),
    ];
    let ints = |v: &[u32]| v.iter().map(|&x| x as i32).collect::<Vec<i32>>();
    let norm = |v: &[[f64; 2]]| v.iter().map(|x| x[0].hypot(x[1])).collect::<Vec<f64>>();
    let [n_region, n_element, n_degree, n_b, n_br, n_bz, n_bm, n_h, n_hm, n_mu] =
        HP_CELL_ARRAYS.map(|x| x.0);
    let cell_data = vec![
        DataArray::integers(n_region, ints(&s.tag)),
        DataArray::integers(n_element, ints(&s.element)),
        DataArray::integers(n_degree, ints(&s.degree)),
        DataArray::plane_vectors(n_b, &s.b),
        DataArray::scalars(n_br, s.b.iter().map(|b| b[0]).collect()),
        DataArray::scalars(n_bz, s.b.iter().map(|b| b[1]).collect()),
        DataArray::scalars(n_bm, norm(&s.b)),
        DataArray::plane_vectors(n_h, &s.h),
        DataArray::scalars(n_hm, norm(&s.h)),
        DataArray::scalars(n_mu, s.mu_r.clone()),
    ];
    let names = region_names(model.mesh(), labels);
    let mut units = Vec::new();
    for (kind, table) in [
        ("point", &HP_POINT_ARRAYS[..]),
        ("cell", &HP_CELL_ARRAYS[..]),
    ] {
        for (name, unit, meaning) in table {
            units.push(format!("{kind} {name} [{unit}]: {meaning}"));
        }
    }
    let k = s.divisions;
    let notes = vec![
        String::from(
            "points are (r, z, 0); SI units throughout; the model is axisymmetric (fields are \
             the same at every azimuth)",
        ),
        format!(
            "hierarchical elements of degree p sampled on a conforming sub-mesh of linear \
             triangles: each element cut into {k} x {k} sub-triangles on a regular lattice of its \
             reference triangle (k = {k} >= the highest degree, so the points determine each \
             element's polynomial A_phi), points mapped through the element's exact curved map"
        ),
        String::from(
            "A_phi is point data (continuous; points on shared edges merged; the solution's own values \
             there); B, H and mu_r are cell data, the element's own value at each \
             sub-triangle's centroid, because B jumps across element edges and material \
             interfaces",
        ),
    ];
    let mut field = vec![
        DataArray::text("title", vec![labels.title.clone()]),
        DataArray::text("coordinates", vec![COORDINATES.into()]),
        DataArray::integers("region_ids", (0..names.len() as i32).collect()),
        DataArray::text("region_names", names),
        DataArray::text("array_units", units),
        DataArray::text("notes", notes),
        DataArray::integers("divisions", vec![k as i32]),
    ];
    field.extend(labels.extra.iter().cloned());
    Ok(Grid {
        points: s.points.clone(),
        connectivity: s.triangles.iter().flatten().copied().collect(),
        nodes_per_cell: 3,
        point_data,
        cell_data,
        field_data: field,
    })
}

fn buffer_error(e: VtuError) -> SolverError {
    SolverError::Write {
        path: String::from("(VTK buffer)"),
        reason: e.to_string(),
    }
}
