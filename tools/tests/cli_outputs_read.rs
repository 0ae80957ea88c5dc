//! What the user reads: the summary's figures say what they mean, plots carry titles, units and
//! ticks, the command line answers mistakes in one line, and progress stays off pipes.
//!
//! Sources: the current-density caution is common practice (a few A/mm² for a continuous
//! enamelled winding); the linear-core caution's 2.5 T sits above the highest saturation of
//! common soft alloys (cobalt–iron ≈ 2.4 T, from memory, Bozorth 1951). The rest checks the
//! program's own definitions (README).

mod common;

use common::axicore;

fn scratch(name: &str) -> std::path::PathBuf {
    common::scratch_dir("read", name)
}

/// The built-in example with its first `from` replaced by `to`, written to `dir/case.toml`.
fn example_with(dir: &std::path::Path, from: &str, to: &str) -> String {
    let (_, text, _) = axicore(&["example"]);
    assert!(text.contains(from), "{from}");
    let path = dir.join("case.toml");
    std::fs::write(&path, text.replacen(from, to, 1)).unwrap();
    path.to_str().unwrap().to_string()
}

#[test]
fn summary_reports_the_apparent_permeability_beside_the_ellipsoid_estimate_and_no_float_noise() {
    let (code, out, err) = axicore(&["solve"]);
    assert_eq!(code, 0, "{err}");
    for needle in [
        "moment gain",
        "apparent permeability",
        "ellipsoid estimate",
        "Osborn 1945",
        "A/mm² over its section",
        "Windings (Ψ flux linkage",
        "(r, z) = (0.00, 0.00) mm",
    ] {
        assert!(out.contains(needle), "missing {needle:?}:\n{out}");
    }
    // No binary floating-point noise such as 0.036000000000000004 or 4.0999999999999995.
    assert!(!out.contains("00000000"), "{out}");
    assert!(!out.contains("99999999"), "{out}");
}

#[test]
fn an_air_coil_prints_no_core_instead_of_a_gain_of_one() {
    let (code, out, err) = axicore(&["solve", "../cases/thick-air-coil/case.toml"]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("moment gain              no core"), "{out}");
    assert!(!out.contains("apparent permeability"), "{out}");
}

#[test]
fn a_background_field_gets_its_flux_share_and_a_sensitivity_not_an_inductance() {
    let (code, out, err) = axicore(&["solve", "../cases/search-coil-core/case.toml", "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert!(
        v["secant_inductance_H"].is_null(),
        "Ψ/I with a background is no inductance"
    );
    let w = &v["windings"][0];
    let (psi, own, bg) = (
        w["flux_linkage_Wb"].as_f64().unwrap(),
        w["own_flux_linkage_Wb"].as_f64().unwrap(),
        w["background_flux_linkage_Wb"].as_f64().unwrap(),
    );
    assert!(
        (psi - own - bg).abs() <= 1e-12 * psi.abs(),
        "{psi} {own} {bg}"
    );
    // S = 2π Ψ_background / B0 (README definition).
    let b0 = v["background_b_T"].as_f64().unwrap();
    let s = w["sensitivity_V_per_T_Hz"].as_f64().unwrap();
    assert!((s - 2.0 * std::f64::consts::PI * bg / b0).abs() < 1e-12 * s.abs());
    assert!(v["flux_concentration"].as_f64().unwrap() > 100.0);
}

#[test]
fn forty_amperes_meant_as_forty_milliamperes_gets_a_current_density_caution() {
    let dir = scratch("forty");
    let case = example_with(&dir, r#"current = "40 mA""#, "current = 40");
    let (code, out, err) = axicore(&["solve", &case, "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let cautions = v["case_cautions"].as_array().unwrap();
    assert!(
        cautions
            .iter()
            .any(|c| c.as_str().unwrap().contains("A/mm²")),
        "{cautions:?}"
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_magnet_alone_reports_its_magnetization_and_no_figure_that_needs_a_drive() {
    // A permanent-magnet core without winding or background is a case of its own; figures
    // that need an applied field or a winding are null, never NaN (README, JSON keys).
    let dir = scratch("magnet");
    let case = dir.join("case.toml");
    std::fs::write(
        &case,
        "[core]\nshape = \"rod\"\nlength = \"20 mm\"\ndiameter = \"10 mm\"\n\
         polarization = \"-1.2 T\"\nmu_r = 1.05\n[mesh]\nfineness = 0.5\n",
    )
    .unwrap();
    let case = case.to_str().unwrap();
    let (code, out, err) = axicore(&["solve", case, "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let c = &v["core"];
    let m0 = c["prescribed_magnetization_A_per_m"].as_f64().unwrap();
    assert!((m0 + 1.2 / (4e-7 * std::f64::consts::PI)).abs() < 1e-9 * m0.abs());
    assert_eq!(c["recoil_mu_r"].as_f64(), Some(1.05));
    for key in [
        "moment_gain",
        "inductance_H",
        "secant_inductance_H",
        "flux_concentration",
    ] {
        assert!(v[key].is_null(), "{key}: {}", v[key]);
    }
    assert!(c["apparent_permeability"].is_null() && c["effective_demagnetizing_factor"].is_null());
    // Magnetised along −z: a negative moment, and ⟨B_z⟩ between −J0 and 0.
    assert!(v["dipole_moment_Am2"].as_f64().unwrap() < 0.0);
    let b = c["average_b_z_T"].as_f64().unwrap();
    assert!(b < 0.0 && b > -1.2, "{b}");
    let (code, out, err) = axicore(&["solve", case]);
    assert_eq!(code, 0, "{err}");
    assert!(
        out.contains("magnet    M0 = -954900 A/m along +z prescribed"),
        "{out}"
    );
    assert!(!out.contains("NaN"), "{out}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_linear_core_driven_past_any_real_material_gets_a_caution() {
    let dir = scratch("linear");
    let case = example_with(&dir, r#"material = "nickel-iron-80""#, "mu_r = 50000");
    let text = std::fs::read_to_string(&case).unwrap();
    std::fs::write(
        &case,
        text.replacen(r#"current = "40 mA""#, r#"current = "3 A""#, 1),
    )
    .unwrap();
    let (code, out, err) = axicore(&["solve", &case]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("CAUTION   core: a linear core"), "{out}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn plots_carry_titles_units_ticks_and_marks() {
    let dir = scratch("plots");
    let ramp = dir.join("ramp.svg");
    let (code, _, err) = axicore(&[
        "ramp",
        "--to",
        "2A",
        "--steps",
        "8",
        "--svg",
        ramp.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let svg = std::fs::read_to_string(&ramp).unwrap();
    for needle in [
        "torquer rod",
        "current of the first winding / A",
        "knee",
        "90 % of B_sat",
    ] {
        assert!(svg.contains(needle), "ramp plot lacks {needle:?}");
    }
    let history = dir.join("history.svg");
    let (code, _, err) = axicore(&[
        "solve",
        "--tolerance",
        "1e-3",
        "--history-svg",
        history.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let svg = std::fs::read_to_string(&history).unwrap();
    for needle in [
        "relative error",
        "tolerance 1e-3",
        "Dipole moment per level",
        "unknowns",
    ] {
        assert!(svg.contains(needle), "history plot lacks {needle:?}");
    }
    // Log axes run over whole decades, so decade tick labels are always there.
    let labels: Vec<&str> = svg.lines().map(str::trim).collect();
    assert!(
        labels.contains(&"0.001") || labels.contains(&"1e-3"),
        "no decade tick"
    );
    // The moment panel's ticks tell the levels apart (they differ in the fifth digit).
    let moment_ticks: Vec<&&str> = labels.iter().filter(|l| l.starts_with("0.108")).collect();
    let distinct: std::collections::BTreeSet<_> = moment_ticks.iter().collect();
    assert!(
        distinct.len() == moment_ticks.len() && distinct.len() > 1,
        "{moment_ticks:?}"
    );
    let bh = dir.join("bh.svg");
    let (code, _, err) = axicore(&["materials", "silicon-iron", "--svg", bh.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let svg = std::fs::read_to_string(&bh).unwrap();
    for needle in [
        "field strength H / (A/m)",
        "flux density B / T",
        "μr = B/(μ0 H)",
    ] {
        assert!(svg.contains(needle), "B–H plot lacks {needle:?}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn the_picture_option_writes_a_png_and_refuses_other_extensions_before_work() {
    let dir = scratch("picture");
    let png = dir.join("map.png");
    let (code, _, err) = axicore(&[
        "solve",
        "--picture",
        png.to_str().unwrap(),
        "--picture-mirror",
    ]);
    assert_eq!(code, 0, "{err}");
    let bytes = std::fs::read(&png).unwrap();
    assert_eq!(&bytes[1..4], b"PNG");
    let bad = dir.join("map.jpg");
    let (code, out, err) = axicore(&["solve", "--picture", bad.to_str().unwrap()]);
    assert_eq!(code, 2, "{err}");
    assert!(out.is_empty() && err.lines().count() == 1, "{err}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn command_line_mistakes_get_one_line_with_a_suggestion() {
    let (code, _, err) = axicore(&[]);
    assert_eq!(code, 2);
    assert!(
        err.starts_with("usage: axicore") && err.lines().count() == 1,
        "{err}"
    );
    let (code, _, err) = axicore(&["slove"]);
    assert_eq!(code, 2);
    assert!(err.contains("'solve'") && err.lines().count() == 1, "{err}");
    let (code, _, err) = axicore(&["solve", "--tolerence", "1e-3"]);
    assert_eq!(code, 2);
    assert!(
        err.contains("--tolerance") && err.lines().count() == 1,
        "{err}"
    );
    let (code, _, err) = axicore(&["materials", "--csv"]);
    assert_eq!(code, 2);
    assert!(err.contains("need a material name"), "{err}");
}

#[test]
fn progress_stays_off_a_piped_standard_error() {
    // Standard error is a pipe here: the bar is hidden, so nothing but a clean exit.
    let (code, _, err) = axicore(&["ramp", "--to", "0.1A", "--steps", "3"]);
    assert_eq!(code, 0, "{err}");
    assert!(err.is_empty(), "{err:?}");
}

#[test]
fn mesh_json_names_its_regions_and_counts_agree_with_the_solve() {
    let (code, out, err) = axicore(&["mesh", "--json"]);
    assert_eq!(code, 0, "{err}");
    let m: serde_json::Value = serde_json::from_str(&out).unwrap();
    let names: Vec<&str> = m["regions"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["name"].as_str().unwrap())
        .collect();
    assert_eq!(names, ["air", "core", "main"]);
    let (_, out, _) = axicore(&["solve", "--json"]);
    let s: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(m["nodes"], s["nodes"]);
    assert_eq!(m["triangles"], s["triangles"]);
}
