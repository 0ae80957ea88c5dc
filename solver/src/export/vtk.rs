//! The VTK map of a solution (.vtu): what each array holds, in which unit.
//!
//! Points are (x, y, z) = (r, z, 0): the meridian half-plane of the axisymmetric model, in m.
//! Point data is the recovered (smooth) field, written per region (see [`RegionPoints`]); cell
//! data holds what is constant per element (region, current density) or follows from the
//! element's volume-mean B (magnetization, μr, saturation). Field data carries the case title,
//! the meaning of the coordinates, region names and the unit of every array, so the file says
//! what it holds without this program.

use rayon::prelude::*;

use super::region_points::RegionPoints;
use super::vtu::{DataArray, Grid, VtuError};
use crate::adjacency::Patches;
use crate::constants::MU0;
use crate::error::SolverError;
use crate::mesh::FeMesh;
use crate::solution::Solution;
use crate::solve::Model;

/// What the solver does not know about a case: its title and region names, and any further
/// field-data entries the caller wants in the file.
#[derive(Debug, Clone, Default)]
pub struct MapLabels {
    /// Case title.
    pub title: String,
    /// Region names indexed by region id (tag); missing ones are written as "region N".
    pub region_names: Vec<String>,
    /// Extra field-data arrays (e.g. winding currents), written after the standard ones.
    pub extra: Vec<DataArray>,
}

/// Coordinate meaning written into every map.
pub const COORDINATES: &str = "x = r (radial) in m, y = z (axial) in m, z = 0: the meridian \
    half-plane r >= 0 of a body of revolution about the y axis";

/// The point arrays of a field map: (name, unit, meaning).
pub const POINT_ARRAYS: [(&str, &str, &str); 9] = [
    ("B_T", "T", "flux density vector (B_r, B_z, 0), recovered"),
    ("B_r_T", "T", "radial flux density B_r, recovered"),
    ("B_z_T", "T", "axial flux density B_z, recovered"),
    ("B_magnitude_T", "T", "|B|, recovered"),
    (
        "H_A_per_m",
        "A/m",
        "field strength vector (H_r, H_z, 0) = nu (B - J0 e_z), J0 a magnet's polarization (0 elsewhere)",
    ),
    ("H_magnitude_A_per_m", "A/m", "|H|"),
    (
        "mu_r",
        "1",
        "secant relative permeability |B - J0 e_z|/(mu0 |H|) (a magnet's recoil permeability)",
    ),
    ("A_phi_Wb_per_m", "Wb/m", "azimuthal vector potential A_phi"),
    (
        "flux_function_Wb",
        "Wb",
        "2 pi r A_phi: flux through the circle of radius r at height z; its contours are field lines",
    ),
];

/// The cell arrays of a field map: (name, unit, meaning).
pub const CELL_ARRAYS: [(&str, &str, &str); 6] = [
    (
        "region",
        "1",
        "region id (Int32); names in field data region_names",
    ),
    (
        "J_phi_A_per_m2",
        "A/m^2",
        "azimuthal current density of the winding (N I / section)",
    ),
    (
        "M_A_per_m",
        "A/m",
        "magnetization vector (M_r, M_z, 0) = B/mu0 - H of the element's mean B",
    ),
    (
        "mu_r",
        "1",
        "secant relative permeability at the element's mean |B|",
    ),
    (
        "B_over_B_sat",
        "1",
        "element mean |B| over the material's saturation flux density (0: none)",
    ),
    (
        "saturated",
        "1",
        "Int32 flag: 1 where B_over_B_sat exceeds the saturation threshold",
    ),
];

/// The field map of a solution: the .vtu file contents. `j_elem` is the current density of
/// every element (A/m²) the field was solved for; `saturated_at` the fraction of the saturation
/// flux density above which a cell is flagged.
pub fn field_map(
    model: &Model,
    sol: &Solution,
    j_elem: &[f64],
    saturated_at: f64,
    labels: &MapLabels,
) -> Result<Vec<u8>, SolverError> {
    field_grid(model, sol, j_elem, saturated_at, labels)?
        .to_bytes()
        .map_err(buffer_error)
}

/// The grid behind [`field_map`] (points per region, all arrays).
pub fn field_grid(
    model: &Model,
    sol: &Solution,
    j_elem: &[f64],
    saturated_at: f64,
    labels: &MapLabels,
) -> Result<Grid, SolverError> {
    let mesh = model.mesh();
    if j_elem.len() != mesh.triangles.len() {
        return Err(buffer_error(VtuError::Length {
            name: "J_phi_A_per_m2".into(),
            found: j_elem.len(),
            expected: mesh.triangles.len(),
        }));
    }
    let rp = RegionPoints::new(mesh);
    let points = point_arrays(model, sol, &rp);
    let cells = cell_arrays(model, sol, j_elem, saturated_at);
    let mut field = standard_field_data(mesh, labels, true);
    field.push(DataArray::scalars(
        "saturation_threshold",
        vec![saturated_at],
    ));
    field.extend(labels.extra.iter().cloned());
    Ok(Grid {
        points: rp.coordinates(mesh),
        connectivity: rp.connectivity,
        nodes_per_cell: 3 * mesh.order(),
        point_data: points,
        cell_data: cells,
        field_data: field,
    })
}

/// A map of the mesh alone: cell data "region", field data with title, coordinates and
/// region names. Points are the mesh nodes (no field, so nothing to write per region).
pub fn mesh_map(mesh: &FeMesh, labels: &MapLabels) -> Result<Vec<u8>, SolverError> {
    let mut field = standard_field_data(mesh, labels, false);
    field.extend(labels.extra.iter().cloned());
    Grid {
        points: mesh.nodes.clone(),
        connectivity: connectivity(mesh),
        nodes_per_cell: 3 * mesh.order(),
        point_data: Vec::new(),
        cell_data: vec![region_array(mesh)],
        field_data: field,
    }
    .to_bytes()
    .map_err(buffer_error)
}

/// A data array of [`vtu_bytes`]: one value per point or cell, `components` values each.
#[derive(Debug, Clone)]
pub struct Array {
    /// Name shown in a viewer.
    pub name: String,
    /// Components per entry (1 scalar, 3 vector).
    pub components: u32,
    /// Values, `components` per entry.
    pub values: Vec<f64>,
}

/// The mesh with the given arrays and an Int32 cell array "region", on the mesh nodes, without
/// names (kept for callers that have none; [`mesh_map`] and [`field_map`] say more).
pub fn vtu_bytes(
    mesh: &FeMesh,
    point_arrays: &[Array],
    cell_arrays: &[Array],
    region: &[i32],
) -> Result<Vec<u8>, SolverError> {
    let convert = |a: &Array| DataArray {
        name: a.name.clone(),
        components: a.components as usize,
        values: super::vtu::Values::F64(a.values.clone()),
    };
    let mut cell_data = vec![DataArray::integers("region", region.to_vec())];
    cell_data.extend(cell_arrays.iter().map(convert));
    Grid {
        points: mesh.nodes.clone(),
        connectivity: connectivity(mesh),
        nodes_per_cell: 3 * mesh.order(),
        point_data: point_arrays.iter().map(convert).collect(),
        cell_data,
        field_data: vec![DataArray::text("coordinates", vec![COORDINATES.into()])],
    }
    .to_bytes()
    .map_err(buffer_error)
}

fn buffer_error(e: VtuError) -> SolverError {
    SolverError::Write {
        path: String::from("(VTK buffer)"),
        reason: e.to_string(),
    }
}

fn connectivity(mesh: &FeMesh) -> Vec<u32> {
    (0..mesh.triangles.len())
        .flat_map(|e| mesh.element_nodes(e).iter().copied().collect::<Vec<_>>())
        .collect()
}

fn region_array(mesh: &FeMesh) -> DataArray {
    DataArray::integers("region", mesh.tags.iter().map(|&t| t as i32).collect())
}

/// Region names by id for every tag of `mesh` and every name of `labels` (missing ones as
/// "region N").
pub(crate) fn region_names(mesh: &FeMesh, labels: &MapLabels) -> Vec<String> {
    let n = mesh.tag_count().max(labels.region_names.len());
    (0..n)
        .map(|t| {
            labels
                .region_names
                .get(t)
                .cloned()
                .unwrap_or_else(|| format!("region {t}"))
        })
        .collect()
}

/// Title, coordinates, region ids and names, array units and notes.
fn standard_field_data(mesh: &FeMesh, labels: &MapLabels, with_field: bool) -> Vec<DataArray> {
    let names = region_names(mesh, labels);
    let n = names.len();
    let mut units = Vec::new();
    if with_field {
        for (name, unit, meaning) in POINT_ARRAYS {
            units.push(format!("point {name} [{unit}]: {meaning}"));
        }
        for (name, unit, meaning) in CELL_ARRAYS {
            units.push(format!("cell {name} [{unit}]: {meaning}"));
        }
    } else {
        let (name, unit, meaning) = CELL_ARRAYS[0];
        units.push(format!("cell {name} [{unit}]: {meaning}"));
    }
    let mut notes = vec![String::from(
        "points are (r, z, 0); SI units throughout; the model is axisymmetric (fields are the same at every azimuth)",
    )];
    if with_field {
        notes.push(String::from(
            "point data is written per region: a node on a region interface has one copy per \
             region, and each region's cells use their own copy, because B, H and mu_r jump \
             across material interfaces",
        ));
        notes.push(String::from(
            "recovered = least-squares fit of the nodal A_phi over the element patch of one \
             region (superconvergent patch recovery), the element value where the patch is too small",
        ));
    }
    vec![
        DataArray::text("title", vec![labels.title.clone()]),
        DataArray::text("coordinates", vec![COORDINATES.into()]),
        DataArray::integers("region_ids", (0..n as i32).collect()),
        DataArray::text("region_names", names),
        DataArray::text("array_units", units),
        DataArray::text("notes", notes),
    ]
}

/// Total B at mesh node `node` from element `e` alone (the fallback of the patch fit).
fn element_b_at_node(model: &Model, sol: &Solution, e: usize, node: u32) -> [f64; 2] {
    let mesh = model.mesh();
    let nodes = mesh.element_nodes(e);
    let k = nodes.iter().position(|&n| n == node).unwrap_or(0);
    // Barycentric coordinates of the corners and of the mid-edge nodes 0–1, 1–2, 2–0.
    const AT: [[f64; 3]; 6] = crate::element::tri6::NODES;
    let g = &model.geometry()[e];
    let av = sol.element_values(model, e);
    let r = mesh.nodes[node as usize][0];
    if r > 0.0 {
        let b = g.b_at_bary(&av, AT[k], r);
        [b[0], b[1] + sol.b0]
    } else {
        // On the axis A/r → ∂A/∂r, so B_z = 2 ∂A/∂r (elements there use the plain basis).
        let [da_dr, da_dz] = g.plain_gradient(&av, AT[k]);
        [-da_dz, 2.0 * da_dr + sol.b0]
    }
}

fn point_arrays(model: &Model, sol: &Solution, rp: &RegionPoints) -> Vec<DataArray> {
    let mesh = model.mesh();
    let patches = Patches::new(mesh);
    let a_nodal = sol.nodal_a(model);
    // One patch fit per written point, centred on its node and kept to its region. Each is
    // independent: an indexed parallel collect keeps the order, so the values are bitwise the
    // same for any thread count.
    let b: Vec<[f64; 2]> = (0..rp.len())
        .into_par_iter()
        .map(|p| {
            let (e, n) = (rp.element[p] as usize, rp.node[p]);
            patches
                .b_at_qr(model, sol, e, mesh.nodes[n as usize])
                .unwrap_or_else(|| element_b_at_node(model, sol, e, n))
        })
        .collect();
    let np = rp.len();
    let (mut br, mut bz, mut bm) = (vec![0.0; np], vec![0.0; np], vec![0.0; np]);
    let (mut h, mut hm, mut mu) = (vec![[0.0; 2]; np], vec![0.0; np], vec![0.0; np]);
    let (mut a, mut flux) = (vec![0.0; np], vec![0.0; np]);
    for p in 0..np {
        let props = model.region(rp.tag[p]);
        let mag = b[p][0].hypot(b[p][1]);
        let n = rp.node[p] as usize;
        br[p] = b[p][0];
        bz[p] = b[p][1];
        bm[p] = mag;
        let (bl, nu) = (props.law_b(b[p]), props.nu(b[p]));
        h[p] = [nu * bl[0], nu * bl[1]];
        hm[p] = nu * bl[0].hypot(bl[1]);
        mu[p] = 1.0 / (MU0 * nu);
        a[p] = a_nodal[n];
        flux[p] = 2.0 * std::f64::consts::PI * mesh.nodes[n][0] * a_nodal[n];
    }
    let [n_b, n_br, n_bz, n_bm, n_h, n_hm, n_mu, n_a, n_flux] = POINT_ARRAYS.map(|x| x.0);
    vec![
        DataArray::plane_vectors(n_b, &b),
        DataArray::scalars(n_br, br),
        DataArray::scalars(n_bz, bz),
        DataArray::scalars(n_bm, bm),
        DataArray::plane_vectors(n_h, &h),
        DataArray::scalars(n_hm, hm),
        DataArray::scalars(n_mu, mu),
        DataArray::scalars(n_a, a),
        DataArray::scalars(n_flux, flux),
    ]
}

fn cell_arrays(model: &Model, sol: &Solution, j_elem: &[f64], saturated_at: f64) -> Vec<DataArray> {
    let mesh = model.mesh();
    let b = sol.element_b(model);
    let ne = b.len();
    let (mut m, mut mu) = (vec![[0.0; 2]; ne], vec![0.0; ne]);
    let (mut ratio, mut flag) = (vec![0.0; ne], vec![0; ne]);
    for (e, be) in b.iter().enumerate() {
        let props = model.element_props(e);
        let mag = be[0].hypot(be[1]);
        // M = B/μ0 − H = (1/μ0 − ν) B + ν J0 e_z: exactly 0 in vacuum.
        m[e] = props.magnetization(*be);
        mu[e] = props.secant_mu_r(*be);
        ratio[e] = props.material.saturation_b().map_or(0.0, |bs| mag / bs);
        flag[e] = i32::from(ratio[e] > saturated_at);
    }
    let [n_region, n_j, n_m, n_mu, n_ratio, n_flag] = CELL_ARRAYS.map(|x| x.0);
    debug_assert_eq!(n_region, "region");
    vec![
        region_array(mesh),
        DataArray::scalars(n_j, j_elem.to_vec()),
        DataArray::plane_vectors(n_m, &m),
        DataArray::scalars(n_mu, mu),
        DataArray::scalars(n_ratio, ratio),
        DataArray::integers(n_flag, flag),
    ]
}
