//! Bad input never panics: one line naming the file, the key and the fault, exit code 2, and
//! no output files. One test per fault class (issue list; common practice for CLI tools).

use std::path::PathBuf;
use std::process::Command;

/// Writes `toml` as case.toml (and `extra` files beside it) into a fresh directory and runs
/// `axicore solve` on it with a VTK output there.
fn run_case(name: &str, toml: &str, extra: &[(&str, &str)]) -> (i32, String, PathBuf) {
    let dir = std::env::temp_dir().join(format!("axicore-bad-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let case = dir.join("case.toml");
    std::fs::write(&case, toml).unwrap();
    for (file, text) in extra {
        std::fs::write(dir.join(file), text).unwrap();
    }
    let vtk = dir.join("out.vtu");
    let out = Command::new(env!("CARGO_BIN_EXE_axicore"))
        .args([
            "solve",
            case.to_str().unwrap(),
            "--vtk",
            vtk.to_str().unwrap(),
        ])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr).to_string();
    (out.status.code().unwrap_or(-1), err, dir)
}

const GOOD: &str = r#"
[core]
shape = "rod"
length = "70 mm"
diameter = "8 mm"
material = "nickel-iron-80"
[[winding]]
turns = 100
current = "40 mA"
inner_radius = "4.2 mm"
outer_radius = "6 mm"
length = "60 mm"
"#;

fn expect_fault(name: &str, toml: &str, needles: &[&str]) {
    expect_fault_with(name, toml, &[], needles);
}

/// [`expect_fault`] with `extra` input files beside the case (a B–H CSV).
fn expect_fault_with(name: &str, toml: &str, extra: &[(&str, &str)], needles: &[&str]) {
    let (code, err, dir) = run_case(name, toml, extra);
    assert_eq!(code, 2, "{name}: exit code {code}, stderr {err}");
    assert_eq!(err.trim().lines().count(), 1, "{name}: not one line: {err}");
    assert!(err.contains("case.toml"), "{name}: file not named: {err}");
    for n in needles {
        assert!(err.contains(n), "{name}: '{n}' missing in: {err}");
    }
    assert!(!err.contains("panicked"), "{name}: {err}");
    let leftovers: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(
        leftovers.len(),
        1 + extra.len(),
        "{name}: output written: {leftovers:?}"
    );
    let _ = std::fs::remove_dir_all(&dir);
}

/// Runs `axicore ARGS`, asserts exit code 2 with a one-line message, and returns it.
fn expect_option_fault(args: &[&str]) -> String {
    let out = Command::new(env!("CARGO_BIN_EXE_axicore"))
        .args(args)
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr).to_string();
    assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
    assert_eq!(err.trim().lines().count(), 1, "{args:?}: {err}");
    err
}

#[test]
fn malformed_toml_is_reported_with_line_and_column() {
    expect_fault("syntax", "[core\nshape = 1", &["line 1", "malformed TOML"]);
}

#[test]
fn unknown_key_gets_a_did_you_mean_hint() {
    expect_fault(
        "unknown",
        &GOOD.replace("length = \"70 mm\"", "lenght = \"70 mm\""),
        &["core.lenght", "did you mean 'length'"],
    );
}

#[test]
fn missing_required_key_is_named() {
    expect_fault(
        "missing",
        &GOOD.replace("turns = 100\n", ""),
        &["winding[1].turns", "missing"],
    );
}

#[test]
fn unknown_unit_is_named() {
    expect_fault(
        "unit",
        &GOOD.replace("\"40 mA\"", "\"40 furlong\""),
        &["winding[1].current", "unknown unit 'furlong'"],
    );
}

#[test]
fn unit_of_the_wrong_dimension_is_named() {
    expect_fault(
        "dimension",
        &GOOD.replace("\"40 mA\"", "\"40 mT\""),
        &["winding[1].current", "flux density"],
    );
}

#[test]
fn zero_negative_and_non_finite_sizes_are_refused() {
    expect_fault(
        "zero",
        &GOOD.replace("\"8 mm\"", "\"0 mm\""),
        &["core.diameter", "positive"],
    );
    expect_fault(
        "negative",
        &GOOD.replace("\"60 mm\"", "\"-60 mm\""),
        &["winding[1].length", "positive"],
    );
    expect_fault(
        "nan",
        &GOOD.replace("\"70 mm\"", "nan"),
        &["core.length", "finite"],
    );
}

#[test]
fn relative_permeability_below_one_is_refused() {
    expect_fault(
        "mu",
        &GOOD.replace("material = \"nickel-iron-80\"", "mu_r = 0.5"),
        &["core.mu_r", "below 1"],
    );
}

#[test]
fn a_prescribed_magnetization_given_twice_or_with_a_saturating_material_is_refused() {
    // A magnet's law is B = μ0 μr H + μ0 M0 e_z: one M0 (in A/m or as J0 = μ0 M0 in T), a
    // linear recoil μr, |M0| ≤ 1e8 A/m (README, case-file reference).
    let magnet = GOOD.replace(
        "material = \"nickel-iron-80\"",
        "magnetization = \"800 kA/m\"",
    );
    let linear = "a prescribed magnetization needs a linear core";
    expect_fault(
        "magnet-twice",
        &magnet.replace("[[winding]]", "polarization = \"1 T\"\n[[winding]]"),
        &["core.polarization", "not both"],
    );
    expect_fault(
        "magnet-material",
        &magnet.replace("[[winding]]", "material = \"pure-iron\"\n[[winding]]"),
        &["core.material", linear, "mu_r"],
    );
    let law = "[core.law]\nkind = \"arctan\"\nsaturation = \"1.5 T\"\ninitial_mu_r = 1000\n";
    expect_fault(
        "magnet-law",
        &magnet.replace("[[winding]]", &format!("{law}[[winding]]")),
        &["core.law", linear],
    );
    let curve = "[core.bh_curve]\nh = [0, 100]\nb = [0, 1]\n";
    expect_fault(
        "magnet-curve",
        &magnet.replace("[[winding]]", &format!("{curve}[[winding]]")),
        &["core.bh_curve", linear],
    );
    expect_fault(
        "magnet-huge",
        &magnet.replace("800 kA/m", "2e8 A/m"),
        &["core.magnetization", "1e8 A/m"],
    );
    expect_fault(
        "magnet-huge-j",
        &GOOD.replace("material = \"nickel-iron-80\"", "polarization = \"-300 T\""),
        &["core.polarization", "1e8 A/m"],
    );
    expect_fault(
        "magnet-recoil",
        &magnet.replace("[[winding]]", "mu_r = 0.9\n[[winding]]"),
        &["core.mu_r", "below 1"],
    );
    // Zero is a magnetization (a sweep may pass through it), but then nothing drives the field.
    let alone = magnet
        .split("[[winding]]")
        .next()
        .unwrap()
        .replace("800 kA/m", "0 A/m");
    expect_fault(
        "magnet-zero",
        &alone,
        &["background.b_axial", "nothing drives the field"],
    );
}

#[test]
fn winding_overlapping_the_core_is_refused() {
    expect_fault(
        "overlap-core",
        &GOOD.replace("\"4.2 mm\"", "\"3 mm\""),
        &["winding[1]", "overlaps the core"],
    );
}

#[test]
fn overlapping_windings_are_refused() {
    let two = format!("{GOOD}\n[[winding]]\nturns = 10\ncurrent = \"1 A\"\ninner_radius = \"5 mm\"\nouter_radius = \"7 mm\"\nlength = \"10 mm\"\n");
    expect_fault(
        "overlap-windings",
        &two,
        &["winding[2]", "overlaps winding"],
    );
}

#[test]
fn sources_reaching_beyond_the_surroundings_are_refused() {
    expect_fault(
        "surroundings",
        &format!("{GOOD}\n[surroundings]\nradius = \"40 mm\"\n"),
        &["surroundings.radius", "too small"],
    );
}

#[test]
fn unknown_material_is_refused_with_a_hint() {
    expect_fault(
        "material",
        &GOOD.replace("nickel-iron-80", "nikel-iron-80"),
        &["core.material", "did you mean 'nickel-iron-80'"],
    );
}

#[test]
fn a_length_without_its_unit_that_explodes_the_mesh_is_an_input_fault() {
    // "100" is 100 m (plain numbers are SI): the mesh would blow through the node cap, which
    // is reported as bad input naming the key to check, before any file is written.
    expect_fault(
        "unitless",
        &format!(
            "{}\n[mesh]\nmax_nodes = 20000\n",
            GOOD.replace("length = \"60 mm\"", "length = \"100\"")
        ),
        &["winding[1].length", "read as 100 m"],
    );
}

#[test]
fn a_legacy_vtk_extension_is_refused_with_the_name_to_use() {
    let dir = std::env::temp_dir().join(format!("axicore-legacy-vtk-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out = dir.join("field.vtk");
    let run = std::process::Command::new(env!("CARGO_BIN_EXE_axicore"))
        .args(["solve", "--vtk", out.to_str().unwrap()])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&run.stderr);
    assert_eq!(run.status.code(), Some(2), "{err}");
    assert!(
        err.contains("field.vtu") && err.lines().count() == 1,
        "{err}"
    );
    assert!(!out.exists() && run.stdout.is_empty());
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn element_orders_other_than_one_or_two_are_refused_as_such() {
    for (name, order) in [
        ("order0", "0"),
        ("order-1", "-1"),
        ("order3", "3"),
        ("order1.5", "1.5"),
    ] {
        expect_fault(
            name,
            &format!("{GOOD}[mesh]\norder = {order}\n"),
            &["mesh.order", "must be 1 or 2"],
        );
    }
}

#[test]
fn corner_layers_other_than_whole_numbers_up_to_the_mesher_cap_are_refused() {
    // The mesher takes at most axicore_mesher::MAX_GRADED_LAYERS (16) layers.
    for (name, layers) in [
        ("layers-1", "-1"),
        ("layers17", "17"),
        ("layers2.5", "2.5"),
        ("layers-mm", "\"3 mm\""),
    ] {
        expect_fault(
            name,
            &format!("{GOOD}[mesh]\ncorner_layers = {layers}\n"),
            &["mesh.corner_layers"],
        );
    }
}

#[test]
fn probe_points_outside_the_mesh_name_their_option_and_write_nothing() {
    // The built-in example's air region ends about 0.11 m from the origin.
    let dir = std::env::temp_dir().join(format!("axicore-bad-probe-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let csv = dir.join("line.csv");
    for (args, option) in [
        (vec!["solve", "--point", "1 m, 0 m"], "--point"),
        (
            vec![
                "solve",
                "--line",
                "0,0:1 m,0:5",
                "--csv",
                csv.to_str().unwrap(),
            ],
            "--line",
        ),
    ] {
        let err = expect_option_fault(&args);
        assert!(err.contains(option) && err.contains("outside"), "{err}");
        assert!(!csv.exists(), "{args:?} wrote {csv:?}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn finite_but_absurd_magnitudes_are_refused_with_the_key() {
    // 1e308 m overflowed the air sphere and 1e-300 m fell below the triangulator's
    // resolution: both failed inside the mesher with exit code 1 and no key named.
    let length = "length = \"70 mm\"";
    let nickel = "material = \"nickel-iron-80\"";
    for (name, from, to, key, fault) in [
        (
            "huge-length",
            length,
            "length = \"1e308 mm\"",
            "core.length",
            "above the supported magnitude 1 km",
        ),
        (
            "tiny-length",
            length,
            "length = \"1e-300 mm\"",
            "core.length",
            "below the supported size 1 µm",
        ),
        (
            "huge-current",
            "\"40 mA\"",
            "1e308",
            "winding[1].current",
            "above the supported magnitude 1 MA",
        ),
        (
            "huge-turns",
            "turns = 100",
            "turns = 1e308",
            "winding[1].turns",
            "above the supported 1e9",
        ),
        (
            "huge-mu",
            nickel,
            "mu_r = 1e308",
            "core.mu_r",
            "above the supported 1e7",
        ),
        (
            "tiny-inner-radius",
            "\"4.2 mm\"",
            "1e-300",
            "winding[1].inner_radius",
            "below the supported size",
        ),
    ] {
        expect_fault(name, &GOOD.replace(from, to), &[key, fault]);
    }
}

#[test]
fn absurd_option_values_are_refused_by_option() {
    // `--to 1e308A` reached Newton as a NaN residual (exit code 3); `--threads` is capped at
    // 1024 (a larger pool only costs start-up time).
    for (args, needle) in [
        (vec!["ramp", "--to", "1e308A"], "--to: 1e308 A is above"),
        (
            vec!["solve", "--threads", "100000"],
            "--threads: 100000 must be from 1 to 1024",
        ),
        (
            vec!["solve", "--point", "1e308,0"],
            "--point: 1e308 m is above",
        ),
    ] {
        let err = expect_option_fault(&args);
        assert!(err.contains(needle), "{args:?}: {err}");
    }
}

#[test]
fn bad_output_paths_are_refused_before_any_work_and_write_nothing() {
    // Found only when writing, a bad path cost the whole solve (exit code 1) and could leave
    // the outputs renamed before it; `--vtk CASE` overwrote the case file.
    let dir = std::env::temp_dir().join(format!("axicore-bad-out-{}", std::process::id()));
    std::fs::create_dir_all(dir.join("sub")).unwrap();
    let case = dir.join("case.toml");
    std::fs::write(&case, GOOD).unwrap();
    let p = |name: &str| dir.join(name).to_str().unwrap().to_string();
    let (c, vtu, sub, missing) = (p("case.toml"), p("a.vtu"), p("sub"), p("none/x.vtu"));
    // A solve writing the VTK file to a.vtu and the --line samples to `csv`.
    let line_to = |csv: &str| -> Vec<String> {
        [
            "solve",
            &c,
            "--vtk",
            &vtu,
            "--line",
            "0,0:1mm,0:3",
            "--csv",
            csv,
        ]
        .map(String::from)
        .to_vec()
    };
    let args_of = |v: &[&str]| v.iter().map(|a| a.to_string()).collect::<Vec<_>>();
    for (args, needle) in [
        (args_of(&["solve", &c, "--vtk", &missing]), "does not exist"),
        (
            args_of(&["solve", &c, "--vtk", &c]),
            "would overwrite the case file",
        ),
        (line_to(&sub), "is a directory"),
        (line_to(&vtu), "is also the --vtk file"),
        (
            args_of(&["ramp", &c, "--to", "1A", "--csv", &vtu, "--svg", &sub]),
            "is a directory",
        ),
        (args_of(&["mesh", &c, "--vtk", &missing]), "does not exist"),
    ] {
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let err = expect_option_fault(&args);
        assert!(err.contains(needle), "{args:?}: {err}");
        let mut names: Vec<_> = std::fs::read_dir(&dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().into_string().unwrap())
            .collect();
        names.sort();
        assert_eq!(names, ["case.toml", "sub"], "{args:?} wrote files");
        assert_eq!(std::fs::read_to_string(&case).unwrap(), GOOD);
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn malformed_options_are_one_line_faults() {
    // clap's own messages carry a usage block and tips over 3–7 lines.
    for (args, needle) in [
        (vec!["solve", "--threads", "abc"], "--threads"),
        (vec!["ramp"], "--to <CURRENT>"),
        (vec!["solve", "--bogus"], "--bogus"),
        (vec!["frobnicate"], "frobnicate"),
    ] {
        let err = expect_option_fault(&args);
        assert!(err.contains(needle), "{args:?}: {err}");
    }
}

#[test]
fn inputs_that_are_not_regular_files_are_refused_without_reading_them() {
    // `/dev/zero` as a B–H file filled the memory until the process was killed; a named pipe
    // as the case blocked for ever.
    expect_fault(
        "dev-zero",
        &GOOD.replace(
            "material = \"nickel-iron-80\"",
            "[core.bh_curve]\nfile = \"/dev/zero\"",
        ),
        &["core.bh_curve.file", "not a regular file"],
    );
    let dir = std::env::temp_dir();
    let err = expect_option_fault(&["solve", dir.to_str().unwrap()]);
    assert!(err.contains("not a regular file"), "{err}");
}

#[test]
fn keys_of_the_earlier_schema_are_refused_with_their_new_names() {
    for (name, case, needles) in [
        (
            "old-min-angle",
            format!("{GOOD}[mesh]\nmin_angle = 25\n"),
            &["mesh.min_angle: renamed to mesh.angle_floor"][..],
        ),
        (
            "old-air",
            format!("{GOOD}[air]\nradius = \"0.5 m\"\n"),
            &["air: renamed to surroundings", "open → exact"][..],
        ),
        (
            "old-boundary",
            format!("{GOOD}[surroundings]\nboundary = \"open\"\n"),
            &["surroundings.boundary: renamed to surroundings.edge"][..],
        ),
        (
            "old-truncated",
            format!("{GOOD}[surroundings]\nedge = \"truncated\"\n"),
            &["surroundings.edge: 'truncated' is now called 'fixed'"][..],
        ),
        (
            "air-material",
            GOOD.replace("nickel-iron-80", "air"),
            &["core.material", "leave out [core]", "mu_r = 1"][..],
        ),
    ] {
        expect_fault(name, &case, needles);
    }
}

#[test]
fn a_unit_typed_in_the_wrong_case_gets_a_did_you_mean() {
    expect_fault(
        "unit-case",
        &GOOD.replace("\"40 mA\"", "\"40 ma\""),
        &[
            "winding[1].current",
            "unknown unit 'ma' (did you mean 'mA'?)",
        ],
    );
}

#[test]
fn a_decimal_comma_in_a_quantity_is_explained() {
    expect_fault(
        "decimal-comma",
        &GOOD.replace("\"4.2 mm\"", "\"4,2 mm\""),
        &["winding[1].inner_radius", "decimal comma: write 4.2 mm"],
    );
}

#[test]
fn a_csv_with_semicolons_and_decimal_commas_is_explained() {
    let case = GOOD.replace(
        "material = \"nickel-iron-80\"",
        "[core.bh_curve]\nfile = \"curve.csv\"",
    );
    expect_fault_with(
        "csv-comma",
        &case,
        &[("curve.csv", "H;B\n0;0\n10;0,5\n100;1,2\n")],
        &["core.bh_curve.file", "line 3", "write '10,0.5'"],
    );
}

#[test]
fn an_empty_case_file_suggests_the_example() {
    expect_fault("empty", "\n# nothing yet\n", &["axicore example > my.toml"]);
}

#[test]
fn a_non_monotone_table_names_the_column_and_point_at_fault() {
    let inline = |h: &str, b: &str| {
        GOOD.replace(
            "material = \"nickel-iron-80\"",
            &format!("[core.bh_curve]\nh = {h}\nb = {b}"),
        )
    };
    expect_fault(
        "h-back",
        &inline("[100, 300, 200, 1000]", "[0.5, 0.8, 0.9, 1.2]"),
        &["core.bh_curve.h[3]", "H must increase strictly"],
    );
    expect_fault(
        "b-back",
        &inline("[100, 200, 300, 1000]", "[0.5, 0.8, 0.7, 1.2]"),
        &["core.bh_curve.b[3]", "B must increase strictly"],
    );
    let csv = GOOD.replace(
        "material = \"nickel-iron-80\"",
        "[core.bh_curve]\nfile = \"curve.csv\"",
    );
    expect_fault_with(
        "csv-back",
        &csv,
        &[(
            "curve.csv",
            "H_A_per_m,B_T\n100,0.5\n200,0.8\n300,0.7\n1000,1.2\n",
        )],
        &[
            "core.bh_curve.file",
            "line 4, column 2 (B)",
            "B must increase",
        ],
    );
}

#[test]
fn a_syntax_fault_in_a_nested_table_names_its_own_line() {
    let law = GOOD.replace(
        "material = \"nickel-iron-80\"",
        "[core.law]\nkind = \"knee\"\nsaturation = 1.5 T",
    );
    let line = law.lines().position(|l| l.contains("1.5 T")).unwrap() + 1;
    expect_fault(
        "nested-law",
        &law,
        &[&format!("line {line},"), "malformed TOML"],
    );
    let deep = format!("{GOOD}\n[{}]\nb = 1\n", vec!["a"; 200].join("."));
    let line = deep.lines().position(|l| l.starts_with("[a.a")).unwrap() + 1;
    expect_fault("nested-deep", &deep, &[&format!("line {line},")]);
}
