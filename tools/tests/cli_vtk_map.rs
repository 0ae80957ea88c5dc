//! The VTK map written by `axicore solve --vtk`, parsed back: cell types, array names and
//! sizes, field data (title, coordinates, region names, units), and the winding's current
//! density against N I / section (Ampère's law in its definition J = N I / S, the case's own
//! data); M = 0 outside the core. The mesh map of `axicore_solver::export::vtk::mesh_map`.
//! The hp map of `axicore moment --vtk` (linear sub-triangles): arrays, units, the degree and
//! divisions, μr by region, and the core's and winding's sections against the case's sizes.
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

/// A linear rod in a winding for `axicore moment` (small, coarse).
const ROD: &str = r#"
title = "hp map rod"
[core]
shape = "rod"
length = "40 mm"
diameter = "8 mm"
mu_r = 2000
[[winding]]
name = "main"
turns = 500
current = "20 mA"
inner_radius = "4.5 mm"
outer_radius = "5.5 mm"
length = "30 mm"
[mesh]
fineness = 0.125
"#;

fn ints<'a>(m: &'a Arrays, sec: &str, name: &str) -> &'a [i32] {
    match &m[&(sec.into(), name.into())].1 {
        Decoded::I32(v) => v,
        d => panic!("{name}: {d:?}"),
    }
}

#[test]
fn moment_writes_the_hp_field_on_linear_sub_triangles_with_its_arrays_and_units() {
    use axicore_solver::export::hp_map::{HP_CELL_ARRAYS, HP_POINT_ARRAYS};
    let dir = scratch("moment");
    let case = dir.join("rod.toml");
    std::fs::write(&case, ROD).unwrap();
    let vtu = dir.join("rod.vtu");
    let out = Command::new(env!("CARGO_BIN_EXE_axicore"))
        .args(["moment", case.to_str().unwrap(), "--tolerance", "1e-4"])
        .args(["--json", "--vtk"])
        .arg(&vtu)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let degree = json["degree"].as_i64().unwrap() as i32;
    let m = parse_vtu(&std::fs::read_to_string(&vtu).unwrap());
    let _ = std::fs::remove_dir_all(&dir);

    let Decoded::U8(types) = &m[&("Cells".into(), "types".into())].1 else {
        panic!("types")
    };
    assert!(types.iter().all(|&t| t == 5), "linear triangles only");
    let cells = types.len();
    let Decoded::I64(conn) = &m[&("Cells".into(), "connectivity".into())].1 else {
        panic!("connectivity")
    };
    assert_eq!(conn.len(), 3 * cells);
    let Decoded::F64(xyz) = &m[&("Points".into(), "Points".into())].1 else {
        panic!("points")
    };
    let points = xyz.len() / 3;
    assert!(conn.iter().all(|&i| (0..points as i64).contains(&i)));

    assert_eq!(text(&m, "title"), ["hp map rod"]);
    assert_eq!(text(&m, "region_names"), ["air", "core", "main"]);
    let units = text(&m, "array_units");
    for (kind, section, table) in [
        ("point", "PointData", &HP_POINT_ARRAYS[..]),
        ("cell", "CellData", &HP_CELL_ARRAYS[..]),
    ] {
        for (name, unit, _) in table {
            assert!(
                m.contains_key(&(section.into(), name.to_string())),
                "{name}"
            );
            let entry = format!("{kind} {name} [{unit}]: ");
            assert!(units.iter().any(|u| u.starts_with(&entry)), "{entry}");
        }
    }
    // k × k sub-triangles per element, k at least the final degree.
    let k = ints(&m, "FieldData", "divisions")[0];
    assert!(k >= degree, "k = {k}, p = {degree}");
    assert!(ints(&m, "CellData", "degree").iter().all(|&p| p == degree));
    let element = ints(&m, "CellData", "element");
    let elements = *element.iter().max().unwrap() as usize + 1;
    assert_eq!(cells, elements * (k * k) as usize);

    // Sections of the core (4 mm × 40 mm in the half plane) and of the winding (1 mm × 30 mm)
    // from the written triangles: the case's own sizes (their outlines are straight).
    let region = ints(&m, "CellData", "region");
    let mut section = [0.0f64; 3];
    for c in 0..cells {
        let p = |j: usize| {
            let q = conn[3 * c + j] as usize;
            [xyz[3 * q], xyz[3 * q + 1]]
        };
        let (a, b, d) = (p(0), p(1), p(2));
        let area = 0.5 * ((b[0] - a[0]) * (d[1] - a[1]) - (d[0] - a[0]) * (b[1] - a[1]));
        assert!(area > 0.0, "cell {c} folded");
        section[region[c] as usize] += area;
    }
    assert!((section[1] - 160e-6).abs() < 1e-12 * 160e-6, "{section:?}");
    assert!((section[2] - 30e-6).abs() < 1e-12 * 30e-6, "{section:?}");
    // μr by region, H = B/(μ0 μr), flux function 2π r A.
    let mu = floats(&m, "CellData", "mu_r");
    let (bz, hz) = (
        floats(&m, "CellData", "B_z_T"),
        floats(&m, "CellData", "H_A_per_m"),
    );
    for c in 0..cells {
        let want = if region[c] == 1 { 2000.0 } else { 1.0 };
        assert_eq!(mu[c], want);
        let h = bz[c] / (4e-7 * std::f64::consts::PI * want);
        assert!((hz[3 * c + 1] - h).abs() <= 1e-9 * h.abs().max(1e-9));
    }
    let (a, flux) = (
        floats(&m, "PointData", "A_phi_Wb_per_m"),
        floats(&m, "PointData", "flux_function_Wb"),
    );
    assert_eq!(a.len(), points);
    for i in 0..points {
        let f = 2.0 * std::f64::consts::PI * xyz[3 * i] * a[i];
        assert!((flux[i] - f).abs() <= 1e-14 * f.abs().max(1e-30));
    }
}

#[test]
fn moment_refuses_a_bad_map_path_with_exit_2_and_writes_nothing() {
    let dir = scratch("moment-bad");
    let case = dir.join("rod.toml");
    std::fs::write(&case, ROD).unwrap();
    let missing = dir.join("no-such-dir").join("rod.vtu");
    let wrong = dir.join("rod.vtk");
    for (path, says) in [
        (missing.as_path(), "no-such-dir"),
        (wrong.as_path(), ".vtu"),
        (dir.as_path(), "directory"),
    ] {
        let out = Command::new(env!("CARGO_BIN_EXE_axicore"))
            .args([
                "moment",
                case.to_str().unwrap(),
                "--tolerance",
                "1e-4",
                "--vtk",
            ])
            .arg(path)
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{path:?}: {err}");
        assert_eq!(err.trim().lines().count(), 1, "{err}");
        assert!(err.contains("--vtk") && err.contains(says), "{err}");
        assert!(out.stdout.is_empty(), "no result printed");
        let left: Vec<_> = std::fs::read_dir(&dir)
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(left, ["rod.toml"], "{path:?}: files left {left:?}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}
