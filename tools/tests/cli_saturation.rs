//! The command line for saturating materials: bad B–H curves are input errors (exit 2, one
//! line, no files); a solve that does not converge exits 3 and writes nothing; the material
//! list and curves print. (Exit-code conventions: the README; common practice for CLI tools.)

mod common;

use common::axicore;

fn scratch(name: &str) -> std::path::PathBuf {
    common::scratch_dir("sat", name)
}

fn case_with_law(law: &str) -> String {
    format!(
        r#"
[core]
shape = "rod"
length = "70 mm"
diameter = "8 mm"
{law}
[[winding]]
turns = 1200
current = "3 A"
inner_radius = "4.2 mm"
outer_radius = "6 mm"
length = "60 mm"
[mesh]
fineness = 0.5
"#
    )
}

/// Runs `solve` with --vtk on the case; returns exit code, stderr and the files left behind.
fn solve_case(name: &str, toml: &str, extra: &[(&str, &str)]) -> (i32, String, usize) {
    let dir = scratch(name);
    for (file, text) in extra {
        std::fs::write(dir.join(file), text).unwrap();
    }
    let case = dir.join("case.toml");
    std::fs::write(&case, toml).unwrap();
    let vtk = dir.join("out.vtu");
    let (code, _, err) = axicore(&[
        "solve",
        case.to_str().unwrap(),
        "--vtk",
        vtk.to_str().unwrap(),
    ]);
    let files = std::fs::read_dir(&dir).unwrap().count();
    let _ = std::fs::remove_dir_all(&dir);
    (code, err, files - 1 - extra.len())
}

fn expect_input_error(name: &str, law: &str, needles: &[&str]) {
    let (code, err, written) = solve_case(name, &case_with_law(law), &[]);
    assert_eq!(code, 2, "{name}: {err}");
    assert_eq!(err.trim().lines().count(), 1, "{name}: {err}");
    for n in needles {
        assert!(err.contains(n), "{name}: '{n}' missing in {err}");
    }
    assert_eq!(written, 0, "{name}: files written");
}

#[test]
fn non_monotone_b_h_curve_is_rejected() {
    expect_input_error(
        "nonmono",
        "[core.bh_curve]\nh = [\"10 A/m\", \"100 A/m\", \"1000 A/m\"]\nb = [\"0.5 T\", \"0.4 T\", \"1.5 T\"]",
        &["core.bh_curve", "must increase"],
    );
}

#[test]
fn b_h_curve_below_vacuum_permeability_is_rejected() {
    // B/(μ0 H) = 0.8 at the last point.
    expect_input_error(
        "mu-below-one",
        "[core.bh_curve]\nh = [10, 100, 1e6]\nb = [0.01, 0.1, 1.005]",
        &["core.bh_curve", "1"],
    );
}

#[test]
fn b_h_curve_with_two_points_is_rejected() {
    expect_input_error(
        "two-points",
        "[core.bh_curve]\nh = [10, 100]\nb = [0.5, 1.0]",
        &["core.bh_curve", "3"],
    );
}

#[test]
fn b_h_curve_with_unequal_columns_is_rejected() {
    expect_input_error(
        "unequal",
        "[core.bh_curve]\nh = [10, 100, 1000]\nb = [0.5, 1.0]",
        &["core.bh_curve.b", "3"],
    );
}

#[test]
fn unknown_law_kind_gets_a_hint() {
    expect_input_error(
        "kind",
        "[core.law]\nkind = \"arctg\"\nsaturation = \"1.5 T\"\ninitial_mu_r = 1000",
        &["core.law.kind", "arctan"],
    );
}

#[test]
fn two_material_sources_are_rejected() {
    expect_input_error(
        "two-sources",
        "mu_r = 300\n[core.law]\nkind = \"arctan\"\nsaturation = \"1.5 T\"\ninitial_mu_r = 1000",
        &["core", "only one"],
    );
}

#[test]
fn b_h_curve_from_a_csv_file_is_read_and_bad_lines_are_named() {
    let law = "[core.bh_curve]\nfile = \"curve.csv\"";
    let good = "H_A_per_m,B_T\n0,0\n50,0.6\n200,1.2\n2000,1.6\n20000,1.9\n";
    let (code, err, written) = solve_case("csv-good", &case_with_law(law), &[("curve.csv", good)]);
    assert_eq!((code, written), (0, 1), "{err}");
    let bad = "H_A_per_m,B_T\n0,0\n50,oops\n";
    let (code, err, written) = solve_case("csv-bad", &case_with_law(law), &[("curve.csv", bad)]);
    assert_eq!((code, written), (2, 0), "{err}");
    assert!(
        err.contains("core.bh_curve.file") && err.contains("line 3"),
        "{err}"
    );
}

#[test]
fn non_convergence_exits_3_and_writes_nothing() {
    let toml = case_with_law("material = \"nickel-iron-80\"") + "[solver]\nmax_iterations = 1\n";
    let (code, err, written) = solve_case("no-conv", &toml, &[]);
    assert_eq!(code, 3, "{err}");
    assert!(err.contains("did not converge"), "{err}");
    assert_eq!(written, 0);
}

#[test]
fn materials_list_names_sources_and_prints_curves_as_csv() {
    let (code, out, _) = axicore(&["materials"]);
    assert_eq!(code, 0);
    for name in [
        "pure-iron",
        "low-carbon-steel",
        "silicon-iron",
        "nickel-iron-50",
        "nickel-iron-80",
        "cobalt-iron-49",
        "mnzn-ferrite",
    ] {
        assert!(out.contains(name), "{name} missing");
    }
    assert!(out.contains("from memory"));
    let (code, out, _) = axicore(&["materials", "nickel-iron-80", "--csv"]);
    assert_eq!(code, 0);
    let rows: Vec<(f64, f64)> = out
        .lines()
        .skip(1)
        .map(|l| {
            let mut it = l.split(',').map(|v| v.parse::<f64>().unwrap());
            (it.next().unwrap(), it.next().unwrap())
        })
        .collect();
    assert!(rows.len() > 50);
    assert!(
        rows.windows(2).all(|w| w[1].0 > w[0].0 && w[1].1 > w[0].1),
        "not monotone"
    );
    // Far above the knee B − μ0H approaches the stated 0.78 T.
    let (h, b) = *rows.last().unwrap();
    let j = b - 4e-7 * std::f64::consts::PI * h;
    assert!((j - 0.78).abs() < 0.01, "{j}");
    let (code, _, err) = axicore(&["materials", "unobtainium"]);
    assert_eq!(code, 2, "{err}");
}

#[test]
fn ramp_writes_csv_and_reports_the_knee() {
    let dir = scratch("ramp");
    let case = dir.join("case.toml");
    std::fs::write(&case, case_with_law("material = \"silicon-iron\"")).unwrap();
    let csv = dir.join("m.csv");
    let (code, out, err) = axicore(&[
        "ramp",
        case.to_str().unwrap(),
        "--to",
        "4 A",
        "--steps",
        "6",
        "--csv",
        csv.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("knee "), "{out}");
    assert!(out.contains("saturation onset"), "{out}");
    let text = std::fs::read_to_string(&csv).unwrap();
    assert_eq!(text.lines().count(), 7);
    let (code, _, err) = axicore(&["ramp", case.to_str().unwrap(), "--to", "4 T"]);
    assert_eq!(code, 2, "{err}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn tolerance_run_reports_its_estimate_history_and_why_it_stopped() {
    // The README's JSON keys for error-controlled runs; the node cap is reported, not hidden.
    let (code, out, err) = axicore(&["solve", "--tolerance", "1e-3", "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert!(v["estimated_relative_error"].as_f64().unwrap() <= 1e-3);
    assert_eq!(v["tolerance_reached"], true);
    assert_eq!(v["refinement_stopped_by"], "tolerance");
    assert!(v["convergence_history"].as_array().unwrap().len() >= 2);
    let (code, out, err) = axicore(&[
        "solve",
        "--tolerance",
        "1e-9",
        "--max-nodes",
        "20000",
        "--json",
    ]);
    // A tolerance not reached is its own exit code; the result is still printed, flagged.
    assert_eq!(code, 4, "{err}");
    assert!(err.contains("not reached"), "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["tolerance_reached"], false);
    assert_eq!(v["refinement_stopped_by"], "node_cap");
    let (code, _, err) = axicore(&["solve", "--tolerance", "2"]);
    assert_eq!(code, 2, "{err}");
    let (code, _, err) = axicore(&["solve", "--tolerance", "1e-3", "--refine", "sideways"]);
    assert_eq!(code, 2, "{err}");
}

#[test]
fn history_plot_is_written_even_when_a_cap_stops_after_one_level() {
    let dir = scratch("history");
    let svg = dir.join("h.svg");
    let (code, out, err) = axicore(&[
        "solve",
        "--tolerance",
        "1e-3",
        "--max-nodes",
        "10",
        "--history-svg",
        svg.to_str().unwrap(),
    ]);
    assert_eq!(code, 4, "{err}");
    assert!(out.contains("node cap"), "{out}");
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.starts_with("<svg"), "{}", &text[..text.len().min(80)]);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn json_reports_carry_the_cautions() {
    // The brief's rule: reports carry the cautions (estimates to be confirmed by measurement,
    // winding temperature and insulation limits, standards and qualified review).
    for args in [
        vec!["solve", "--json"],
        vec!["ramp", "--to", "0.1A", "--steps", "2", "--json"],
    ] {
        let (code, out, err) = axicore(&args);
        assert_eq!(code, 0, "{args:?}: {err}");
        let v: serde_json::Value = serde_json::from_str(&out).unwrap();
        let c = v["cautions"].as_str().unwrap_or_default();
        for needle in ["measurement", "insulation", "standards"] {
            assert!(c.contains(needle), "{args:?}: cautions {c:?}");
        }
    }
}
