//! `axicore moment` through the binary: a linear case reaches its tolerance with the estimate
//! reported per degree, the JSON carries the sequence, a degree cap that stops it first is exit
//! 4 with the result flagged, a saturating core goes through Newton at every degree, and bad
//! options are one-line faults with exit 2. No outside source here: the estimate's reliability against closed forms
//! is checked in the root package's `tests/hp_degree_error_control.rs`.

mod common;

use common::axicore;

fn case_file(name: &str, text: &str) -> String {
    let dir = common::scratch_dir("moment", name);
    let path = dir.join("case.toml");
    std::fs::write(&path, text).unwrap();
    path.to_str().unwrap().to_string()
}

/// A demo rod of linear material in a winding (small, coarse).
const ROD: &str = r#"
title = "linear demo rod"
[core]
shape = "rod"
length = "40 mm"
diameter = "8 mm"
mu_r = 2000
[[winding]]
turns = 500
current = "20 mA"
inner_radius = "4.5 mm"
outer_radius = "5.5 mm"
length = "30 mm"
[mesh]
fineness = 0.125
"#;

#[test]
fn a_linear_rod_meets_its_tolerance_and_reports_the_degree_sequence() {
    let case = case_file("rod", ROD);
    let (code, out, err) = axicore(&["moment", &case, "--tolerance", "1e-6", "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["reached"], true);
    let est = v["estimate_rel"].as_f64().unwrap();
    assert!(est <= 1e-6, "{est}");
    let steps = v["steps"].as_array().unwrap();
    assert!(steps.len() >= 3, "{steps:?}");
    let (m, check) = (
        v["dipole_moment_Am2"].as_f64().unwrap(),
        v["dipole_check_Am2"].as_f64().unwrap(),
    );
    // The exterior's and the sources' moments agree to the estimate.
    assert!((m - check).abs() <= 10.0 * est * m.abs(), "{m} vs {check}");
    // The summary names the result with its unit and the cautions.
    let (code, out, _) = axicore(&["moment", &case, "--tolerance", "1e-6"]);
    assert_eq!(code, 0);
    assert!(out.contains("A·m²") && out.contains("measurement"), "{out}");
}

#[test]
fn a_degree_cap_before_the_tolerance_is_exit_4_with_the_result_flagged() {
    let case = case_file("cap", ROD);
    let (code, out, _) = axicore(&["moment", &case, "--tolerance", "1e-12", "--max-degree", "4"]);
    assert_eq!(code, 4, "{out}");
    assert!(out.contains("NOT reached"), "{out}");
}

#[test]
fn a_saturating_core_is_solved_by_newton_at_every_degree() {
    // The demo rod with the arctangent law (Js 1.5 T, μri 1000) at a current near its knee.
    let sat = ROD
        .replace(
            "mu_r = 2000",
            "[core.law]\nkind = \"arctan\"\nsaturation = \"1.5 T\"\ninitial_mu_r = 1000",
        )
        .replace("20 mA", "2 A");
    let case = case_file("sat", &sat);
    let (code, out, err) = axicore(&["moment", &case, "--tolerance", "1e-5", "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let steps = v["steps"].as_array().unwrap();
    assert!(
        steps
            .iter()
            .all(|s| s["newton_iterations"].as_u64().unwrap() > 0),
        "{steps:?}"
    );
    assert!(v["estimate_rel"].as_f64().unwrap() <= 1e-5);
}

#[test]
fn bad_options_are_one_line_faults() {
    let case = case_file("bad", ROD);
    for bad in ["0", "-1e-3", "2", "nan"] {
        let (code, _, err) = axicore(&["moment", &case, "--tolerance", bad]);
        assert_eq!(code, 2, "{bad}: {err}");
        assert_eq!(err.trim().lines().count(), 1, "{err}");
    }
    let (code, _, err) = axicore(&["moment", &case, "--max-degree", "11"]);
    assert_eq!(code, 2, "{err}");
}
