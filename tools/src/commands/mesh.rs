//! `axicore mesh`: mesh a case and report the mesh's statistics.

use std::fmt::Write as _;
use std::path::PathBuf;

use clap::Args;
use serde_json::json;

use super::args::{self, case_name, load};
use super::failure::{run_failure, EXIT_OK};
use super::{emit, Failure};
use crate::output;
use crate::pipeline::{corner_quality, discretise};
use crate::vtk_map::region_name;

/// Options of `axicore mesh`.
#[derive(Args, Debug)]
pub struct MeshArgs {
    /// Case file (TOML); the built-in example when omitted.
    case: Option<PathBuf>,
    /// Write the mesh with region ids to this VTK XML file (.vtu).
    #[arg(long, value_name = "FILE")]
    vtk: Option<PathBuf>,
    /// Print the statistics as JSON.
    #[arg(long)]
    json: bool,
}

/// Runs `axicore mesh`; prints only after its file is written.
pub fn mesh(a: MeshArgs) -> Result<u8, Failure> {
    let file = case_name(a.case.as_deref());
    if let Some(v) = &a.vtk {
        args::check_outputs(&[("--vtk", v)], a.case.as_deref())?;
    }
    let case = load(a.case.as_deref())?;
    let d = discretise(&case).map_err(|e| run_failure(e, &case, &file))?;
    let mut st = d.mesh.stats();
    (st.min_angle_deg, st.max_aspect_ratio) = corner_quality(&d.problem.mesh);
    let fe_nodes = d.problem.mesh.nodes.len();
    let order = d.problem.mesh.order();
    let regions: Vec<(u32, String, usize)> = st
        .triangles_per_tag
        .iter()
        .map(|&(tag, n)| (tag, region_name(&case, tag), n))
        .collect();

    if let Some(path) = a.vtk {
        let bytes = crate::vtk_map::mesh_vtu(&case, &d.problem.mesh).map_err(Failure::other)?;
        output::write_all(&[(path, bytes)]).map_err(Failure::other)?;
    }

    let text = if a.json {
        let v = json!({
            "title": case.title,
            "order": order,
            "nodes": fe_nodes,
            "corner_nodes": st.nodes,
            "triangles": st.triangles,
            "regions": regions.iter().map(|(tag, name, n)| json!({
                "id": tag, "name": name, "triangles": n
            })).collect::<Vec<_>>(),
            "smallest_angle_deg": st.min_angle_deg,
            "max_aspect_ratio": st.max_aspect_ratio,
        });
        serde_json::to_string_pretty(&v).map_err(Failure::other)? + "\n"
    } else {
        let mut s = String::new();
        let _ = writeln!(s, "{}", case.title);
        if order == 2 {
            let _ = writeln!(
                s,
                "nodes          {fe_nodes} (second order: {} corners, {} mid-edge)",
                st.nodes,
                fe_nodes - st.nodes
            );
        } else {
            let _ = writeln!(s, "nodes          {fe_nodes} (first order)");
        }
        let _ = writeln!(s, "triangles      {}", st.triangles);
        for (tag, name, n) in &regions {
            let _ = writeln!(s, "  region {tag} ({name}): {n}");
        }
        let _ = writeln!(s, "smallest angle {:.2}°", st.min_angle_deg);
        let _ = writeln!(s, "worst aspect   {:.3}", st.max_aspect_ratio);
        s
    };
    emit(&text);
    Ok(EXIT_OK)
}
