//! The VTK map written by `axicore solve --vtk`, parsed back: cell types, array names and
//! sizes, field data (title, coordinates, region names, units), and the winding's current
//! density against N I / section (Ampère's law in its definition J = N I / S, the case's own
//! data); M = 0 outside the core. The mesh map of `axicore_solver::export::vtk::mesh_map`.
//! The full read-back with the VTK library is `tools/check_vtu.py` (run by `.ci/run`).

use std::collections::HashMap;
use std::path::PathBuf;
use std::process::Command;

use base64::Engine;

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("axicore-vtkmap-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// One decoded array of a .vtu file.
#[derive(Debug)]
enum Decoded {
    F64(Vec<f64>),
    I32(Vec<i32>),
    I64(Vec<i64>),
    U8(Vec<u8>),
    Text(Vec<String>),
}

/// Decoded arrays by (section, name), with their component counts.
type Arrays = HashMap<(String, String), (usize, Decoded)>;

/// Arrays by (section, name): section is FieldData, PointData, CellData, Points or Cells.
/// A deliberately small reader of what our writer emits (inline binary, UInt64 headers).
fn parse_vtu(text: &str) -> Arrays {
    assert!(text.starts_with("<?xml version=\"1.0\"?>"));
    assert!(text.contains("type=\"UnstructuredGrid\""));
    assert!(text.contains("header_type=\"UInt64\""));
    let mut out = HashMap::new();
    let mut section = String::new();
    for line in text.lines() {
        for s in ["FieldData", "PointData", "CellData", "Points", "Cells"] {
            if line.starts_with(&format!("<{s}")) {
                section = s.into();
            }
        }
        if !(line.starts_with("<DataArray ") || line.starts_with("<Array ")) {
            continue;
        }
        let attr = |key: &str| {
            let k = format!(" {key}=\"");
            line.find(&k).map(|i| {
                let rest = &line[i + k.len()..];
                rest[..rest.find('"').unwrap()].to_string()
            })
        };
        let (kind, name) = (attr("type").unwrap(), attr("Name").unwrap());
        let comps = attr("NumberOfComponents").map_or(1, |c| c.parse().unwrap());
        let body = &line[line.find('>').unwrap() + 1..line.rfind("</").unwrap()];
        let raw = base64::engine::general_purpose::STANDARD
            .decode(body)
            .unwrap();
        let len = u64::from_le_bytes(raw[..8].try_into().unwrap()) as usize;
        let data = &raw[8..];
        assert_eq!(len, data.len(), "{name}: header byte count");
        let decoded = match kind.as_str() {
            "Float64" => Decoded::F64(
                data.chunks(8)
                    .map(|c| f64::from_le_bytes(c.try_into().unwrap()))
                    .collect(),
            ),
            "Int32" => Decoded::I32(
                data.chunks(4)
                    .map(|c| i32::from_le_bytes(c.try_into().unwrap()))
                    .collect(),
            ),
            "Int64" => Decoded::I64(
                data.chunks(8)
                    .map(|c| i64::from_le_bytes(c.try_into().unwrap()))
                    .collect(),
            ),
            "UInt8" => Decoded::U8(data.to_vec()),
            "String" => Decoded::Text(
                data.split(|&b| b == 0)
                    .take(data.iter().filter(|&&b| b == 0).count())
                    .map(|s| String::from_utf8(s.to_vec()).unwrap())
                    .collect(),
            ),
            k => panic!("unexpected array type {k}"),
        };
        out.insert((section.clone(), name), (comps, decoded));
    }
    out
}

fn text<'a>(m: &'a Arrays, name: &str) -> &'a [String] {
    match &m[&("FieldData".into(), name.into())].1 {
        Decoded::Text(v) => v,
        d => panic!("{name}: {d:?}"),
    }
}

fn floats<'a>(m: &'a Arrays, sec: &str, name: &str) -> &'a [f64] {
    match &m[&(sec.into(), name.into())].1 {
        Decoded::F64(v) => v,
        d => panic!("{name}: {d:?}"),
    }
}

const COIL: &str = r#"
title = "map test: air coil <&> \"quoted\""
[[winding]]
name = "pick-up"
turns = 500
current = "0.2 A"
inner_radius = "10 mm"
outer_radius = "14 mm"
length = "30 mm"
[mesh]
fineness = 0.5
order = ORDER
"#;

fn solve_map(order: u32) -> (Arrays, serde_json::Value) {
    let dir = scratch(&format!("order{order}"));
    let case = dir.join("coil.toml");
    std::fs::write(&case, COIL.replace("ORDER", &order.to_string())).unwrap();
    let vtu = dir.join("coil.vtu");
    let out = Command::new(env!("CARGO_BIN_EXE_axicore"))
        .args(["solve", case.to_str().unwrap(), "--json", "--vtk"])
        .arg(&vtu)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let map = parse_vtu(&std::fs::read_to_string(&vtu).unwrap());
    let _ = std::fs::remove_dir_all(&dir);
    (map, json)
}

#[test]
fn solve_writes_a_map_with_named_regions_units_and_the_winding_current_density() {
    for (order, cell_type, per) in [(2, 22u8, 6usize), (1, 5, 3)] {
        let (m, json) = solve_map(order);
        let cells = json["triangles"].as_u64().unwrap() as usize;
        let Decoded::U8(types) = &m[&("Cells".into(), "types".into())].1 else {
            panic!("types")
        };
        assert_eq!(types.len(), cells);
        assert!(types.iter().all(|&t| t == cell_type), "order {order}");
        let Decoded::I64(conn) = &m[&("Cells".into(), "connectivity".into())].1 else {
            panic!("connectivity")
        };
        assert_eq!(conn.len(), per * cells);

        assert_eq!(text(&m, "title"), [json["title"].as_str().unwrap()]);
        assert_eq!(text(&m, "region_names"), ["air", "core", "pick-up"]);
        assert!(text(&m, "coordinates")[0].starts_with("x = r (radial) in m, y = z (axial) in m"));
        let units = text(&m, "array_units");
        for (kind, names) in [
            ("point", &axicore_solver::export::vtk::POINT_ARRAYS[..]),
            ("cell", &axicore_solver::export::vtk::CELL_ARRAYS[..]),
        ] {
            for (name, unit, _) in names {
                let section = if kind == "point" {
                    "PointData"
                } else {
                    "CellData"
                };
                assert!(
                    m.contains_key(&(section.into(), name.to_string())),
                    "{name}"
                );
                let entry = format!("{kind} {name} [{unit}]: ");
                assert!(units.iter().any(|u| u.starts_with(&entry)), "{entry}");
            }
        }

        // J·S = N I for the winding (S from the written corners; its edges are straight).
        let Decoded::F64(xyz) = &m[&("Points".into(), "Points".into())].1 else {
            panic!("points")
        };
        let Decoded::I32(region) = &m[&("CellData".into(), "region".into())].1 else {
            panic!("region")
        };
        let j = floats(&m, "CellData", "J_phi_A_per_m2");
        let jw = j[region.iter().position(|&r| r == 2).unwrap()];
        let mut section = 0.0;
        for e in 0..cells {
            let p = |k: usize| {
                let q = conn[per * e + k] as usize;
                [xyz[3 * q], xyz[3 * q + 1]]
            };
            let (a, b, c) = (p(0), p(1), p(2));
            if region[e] == 2 {
                section += 0.5 * ((b[0] - a[0]) * (c[1] - a[1]) - (c[0] - a[0]) * (b[1] - a[1]));
                assert_eq!(j[e], jw, "J not uniform over the winding");
            } else {
                assert_eq!(j[e], 0.0, "current outside the winding");
            }
        }
        let ni = 500.0 * 0.2;
        assert!(
            (jw * section - ni).abs() < 1e-9 * ni,
            "J·S = {} A",
            jw * section
        );
        // No core: M is 0 and μr is 1 everywhere.
        assert!(floats(&m, "CellData", "M_A_per_m")
            .iter()
            .all(|&x| x == 0.0));
        assert!(floats(&m, "CellData", "mu_r").iter().all(|&x| x == 1.0));
        let n_points = floats(&m, "PointData", "B_magnitude_T").len();
        assert_eq!(n_points * 3, xyz.len());
    }
}

#[test]
fn mesh_map_carries_region_ids_and_names_without_field_arrays() {
    let case = axicore::case::parse_case(&COIL.replace("ORDER", "2"), "test case").unwrap();
    let d = axicore::pipeline::discretise(&case).unwrap();
    let bytes = axicore::vtk_map::mesh_vtu(&case, &d.problem.mesh).unwrap();
    let m = parse_vtu(std::str::from_utf8(&bytes).unwrap());
    assert_eq!(text(&m, "region_names"), ["air", "core", "pick-up"]);
    assert_eq!(text(&m, "region_kinds"), ["air", "core", "winding"]);
    let Decoded::I32(region) = &m[&("CellData".into(), "region".into())].1 else {
        panic!("region")
    };
    assert_eq!(region.len(), d.problem.mesh.triangles.len());
    assert!(!m.keys().any(|(s, _)| s == "PointData"));
    let Decoded::F64(xyz) = &m[&("Points".into(), "Points".into())].1 else {
        panic!("points")
    };
    assert_eq!(xyz.len(), 3 * d.problem.mesh.nodes.len());
}
