//! VTK XML UnstructuredGrid (.vtu) output of the (r, z) mesh and its fields.
//!
//! Points are written as (x, y, z) = (r, z, 0): the meridian plane of the axisymmetric model.
//! Files are written to a temporary name and renamed, so a failed write leaves nothing behind.

use std::path::Path;

use vtkio::model::{
    Attribute, Attributes, ByteOrder, CellType, Cells, DataSet, Piece, UnstructuredGridPiece,
    Version, VertexNumbers, Vtk,
};

use crate::field::Solution;
use crate::mesh::FeMesh;
use crate::solve::Model;
use crate::{SolverError, MU0};

/// A named data array: one value per point or cell, `components` values each.
#[derive(Debug, Clone)]
pub struct Array {
    /// Name shown in a viewer.
    pub name: String,
    /// Components per entry (1 scalar, 3 vector).
    pub components: u32,
    /// Values, `components` per entry.
    pub values: Vec<f64>,
}

/// The standard field arrays of a solution: point data (A_φ, flux function) and cell data
/// (region, B, |B|, H, |H|, secant μr, |B|/B_sat and a flag for |B| > `saturated_at`·B_sat,
/// both 0 in materials without saturation), all in SI units named in the array names.
pub fn field_arrays(
    model: &Model,
    sol: &Solution,
    saturated_at: f64,
) -> (Vec<Array>, Vec<Array>, Vec<i32>) {
    let mesh = model.mesh();
    let a_total = sol.nodal_a(model);
    let flux: Vec<f64> = mesh
        .nodes
        .iter()
        .zip(&a_total)
        .map(|(p, a)| 2.0 * std::f64::consts::PI * p[0] * a)
        .collect();
    let points = vec![
        Array {
            name: "A_phi_Wb_per_m".into(),
            components: 1,
            values: a_total,
        },
        // Contours of 2π r A are field lines (flux through the circle of radius r).
        Array {
            name: "flux_Wb".into(),
            components: 1,
            values: flux,
        },
    ];
    let b = sol.element_b(model);
    let mut bv = Vec::with_capacity(3 * b.len());
    let mut bm = Vec::with_capacity(b.len());
    let mut hv = Vec::with_capacity(3 * b.len());
    let mut hm = Vec::with_capacity(b.len());
    let mut mu = Vec::with_capacity(b.len());
    let mut ratio = Vec::with_capacity(b.len());
    let mut flag = Vec::with_capacity(b.len());
    for (e, be) in b.iter().enumerate() {
        let b2 = be[0] * be[0] + be[1] * be[1];
        let mat = model.material(e);
        let nu = mat.nu(b2.sqrt());
        let r = mat.saturation_b().map_or(0.0, |bs| b2.sqrt() / bs);
        ratio.push(r);
        flag.push(if r > saturated_at { 1.0 } else { 0.0 });
        bv.extend_from_slice(&[be[0], be[1], 0.0]);
        bm.push(b2.sqrt());
        hv.extend_from_slice(&[nu * be[0], nu * be[1], 0.0]);
        hm.push(nu * b2.sqrt());
        mu.push(1.0 / (MU0 * nu));
    }
    let cells = vec![
        Array {
            name: "B_T".into(),
            components: 3,
            values: bv,
        },
        Array {
            name: "B_magnitude_T".into(),
            components: 1,
            values: bm,
        },
        Array {
            name: "H_A_per_m".into(),
            components: 3,
            values: hv,
        },
        Array {
            name: "H_magnitude_A_per_m".into(),
            components: 1,
            values: hm,
        },
        Array {
            name: "mu_r".into(),
            components: 1,
            values: mu,
        },
        Array {
            name: "B_over_B_sat".into(),
            components: 1,
            values: ratio,
        },
        Array {
            name: "saturated".into(),
            components: 1,
            values: flag,
        },
    ];
    let region = mesh.tags.iter().map(|&t| t as i32).collect();
    (points, cells, region)
}

/// Writes `mesh` with the given arrays and an Int32 cell array "region" to `path` (.vtu).
pub fn write_vtu(
    path: &Path,
    mesh: &FeMesh,
    point_arrays: &[Array],
    cell_arrays: &[Array],
    region: &[i32],
) -> Result<(), SolverError> {
    let buf = vtu_bytes(mesh, point_arrays, cell_arrays, region)?;
    crate::export::atomic_write(path, &buf).map_err(|e| SolverError::Write {
        path: path.display().to_string(),
        reason: e.to_string(),
    })
}

/// The .vtu file contents for `mesh` with the given arrays and an Int32 cell array "region".
pub fn vtu_bytes(
    mesh: &FeMesh,
    point_arrays: &[Array],
    cell_arrays: &[Array],
    region: &[i32],
) -> Result<Vec<u8>, SolverError> {
    let werr = |reason: String| SolverError::Write {
        path: String::from("(VTK buffer)"),
        reason,
    };
    let points: Vec<f64> = mesh.nodes.iter().flat_map(|p| [p[0], p[1], 0.0]).collect();
    // VTK's quadratic triangle lists the corners, then the nodes of edges 0–1, 1–2, 2–0: the
    // order `FeMesh` keeps.
    let (per_cell, cell_type) = if mesh.order() == 2 {
        (6, CellType::QuadraticTriangle)
    } else {
        (3, CellType::Triangle)
    };
    let connectivity: Vec<u64> = (0..mesh.triangles.len())
        .flat_map(|t| {
            mesh.element_nodes(t)
                .iter()
                .map(|&n| u64::from(n))
                .collect::<Vec<_>>()
        })
        .collect();
    let offsets: Vec<u64> = (1..=mesh.triangles.len() as u64)
        .map(|i| per_cell * i)
        .collect();
    let mut data = Attributes::new();
    for a in point_arrays {
        data.point.push(array_attribute(a));
    }
    data.cell
        .push(Attribute::scalars("region", 1).with_data(region.to_vec()));
    for a in cell_arrays {
        data.cell.push(array_attribute(a));
    }
    let vtk = Vtk {
        version: Version::new_xml(1, 0),
        title: String::from("axicore field (r, z, 0)"),
        byte_order: ByteOrder::LittleEndian,
        file_path: None,
        data: DataSet::UnstructuredGrid {
            meta: None,
            pieces: vec![Piece::Inline(Box::new(UnstructuredGridPiece {
                points: points.into(),
                cells: Cells {
                    cell_verts: VertexNumbers::XML {
                        connectivity,
                        offsets,
                    },
                    types: vec![cell_type; mesh.triangles.len()],
                },
                data,
            }))],
        },
    };
    let mut buf = Vec::new();
    vtk.write_xml(&mut buf).map_err(|e| werr(e.to_string()))?;
    Ok(buf)
}

fn array_attribute(a: &Array) -> Attribute {
    let attr = if a.components == 3 {
        Attribute::vectors(a.name.clone())
    } else {
        Attribute::scalars(a.name.clone(), a.components)
    };
    attr.with_data(a.values.clone())
}
