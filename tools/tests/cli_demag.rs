//! `axicore demag` through the binary: the study's file is a sweep file (shards merged give
//! the bytes of the whole run), `--from` renders a merged study and refuses a shard, plots and JSON are written,
//! a case's core gets its verdict, bad options are one-line faults with nothing written. No
//! outside source here: the factors themselves are validated in the root package's
//! `tests/demag_factors_chen_brug_goldfarb.rs`.

mod common;

use std::path::Path;

use common::axicore;

fn p(dir: &Path, name: &str) -> String {
    dir.join(name).to_str().unwrap().to_string()
}

/// A small grid: two rods (γ 2 and 8) at χ = 0 and 100, loose tolerance, coarse start.
const GRID: [&str; 8] = [
    "--gamma",
    "2..8:2:log",
    "--chi",
    "0,100",
    "--tolerance",
    "3e-3",
    "--fineness",
    "0.7",
];

fn demag(dir: &Path, extra: &[&str]) -> (i32, String, String) {
    let mut args = vec!["demag", "--quiet"];
    args.extend(GRID);
    args.extend(extra);
    let _ = dir;
    axicore(&args)
}

#[test]
fn a_study_gives_the_same_bytes_in_shards_and_renders_plots_and_json() {
    let dir = common::scratch_dir("demag", "grid");
    let (code, out, err) = demag(&dir, &["--out", &p(&dir, "whole.csv")]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("Nm") && out.contains("miller"), "{out}");
    let whole = std::fs::read(dir.join("whole.csv")).unwrap();
    let text = String::from_utf8_lossy(&whole).to_string();
    assert_eq!(text.lines().count(), 2 + 4, "{text}");
    assert!(text
        .lines()
        .nth(1)
        .unwrap()
        .starts_with("index,gamma,chi,status,shape,Nm,Nm_error,Nf"));
    for k in ["1/2", "2/2"] {
        let name = format!("shard{}.csv", &k[..1]);
        let (code, _, err) = demag(&dir, &["--shard", k, "--out", &p(&dir, &name)]);
        assert_eq!(code, 0, "{err}");
    }
    let (code, _, err) = axicore(&[
        "merge",
        &p(&dir, "shard1.csv"),
        &p(&dir, "shard2.csv"),
        "--out",
        &p(&dir, "merged.csv"),
    ]);
    assert_eq!(code, 0, "{err}");
    assert_eq!(std::fs::read(dir.join("merged.csv")).unwrap(), whole);
    // A shard alone is not a study to render.
    let (code, _, err) = axicore(&["demag", "--from", &p(&dir, "shard1.csv")]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("axicore merge"), "{err}");
    let plots = dir.join("plots");
    std::fs::create_dir_all(&plots).unwrap();
    let (code, _, err) = axicore(&[
        "demag",
        "--from",
        &p(&dir, "merged.csv"),
        "--json",
        &p(&dir, "study.json"),
        "--plots",
        plots.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("study.json")).unwrap()).unwrap();
    let points = json["points"].as_array().unwrap();
    assert_eq!(points.len(), 4);
    for pt in points {
        assert!(pt["nm"].as_f64().unwrap() > 0.0 && pt["nf"].as_f64().unwrap() > 0.0);
    }
    for name in [
        "factors-chi-0.svg",
        "factors-chi-100.svg",
        "deviation-miller.svg",
        "deviation-ellipsoid.svg",
    ] {
        let svg = std::fs::read_to_string(plots.join(name)).unwrap_or_default();
        assert!(
            svg.starts_with("<svg") && svg.contains("length / diameter"),
            "{name}"
        );
    }
}

#[test]
fn the_core_of_a_case_gets_its_verdict_at_chi_zero_and_at_its_operating_point() {
    let dir = common::scratch_dir("demag", "case");
    let case = "title = \"linear rod\"\n[core]\nshape = \"rod\"\nlength = \"40 mm\"\ndiameter = \"8 mm\"\nmu_r = 200\n[[winding]]\nturns = 100\ncurrent = \"10 mA\"\ninner_radius = \"4.5 mm\"\nouter_radius = \"5 mm\"\nlength = \"30 mm\"\n";
    std::fs::write(dir.join("rod.toml"), case).unwrap();
    let (code, out, err) = axicore(&[
        "demag",
        "--quiet",
        &p(&dir, "rod.toml"),
        "--tolerance",
        "3e-3",
    ]);
    assert_eq!(code, 0, "{err}");
    // A linear core's operating-point susceptibility is μr − 1 exactly.
    assert!(
        out.contains("susceptibility at the operating point 1.99"),
        "{out}"
    );
    assert_eq!(
        out.lines()
            .filter(|l| l.trim_start().starts_with("5.0000"))
            .count(),
        2,
        "{out}"
    );
}

#[test]
fn bad_demag_options_are_one_line_faults_and_write_nothing() {
    let dir = common::scratch_dir("demag", "bad");
    for (args, needle) in [
        (vec!["--tolerance", "0"], "--tolerance"),
        (vec!["--chi", "0,abc"], "--chi"),
        (vec!["--gamma", "0..10:3:log"], "--gamma"),
        (vec!["--jobs", "0"], "--jobs"),
    ] {
        let out = p(&dir, "x.csv");
        let mut a = vec!["demag", "--out", out.as_str()];
        a.extend(args);
        let (code, _, err) = axicore(&a);
        assert_eq!(code, 2, "{a:?}: {err}");
        assert_eq!(err.trim().lines().count(), 1, "{err}");
        assert!(err.contains(needle), "{err}");
        assert!(!dir.join("x.csv").exists());
    }
    // Axis values outside the study's bounds are refused before any solve.
    for (args, needle) in [
        (vec!["--chi=-1"], "--chi"),
        (vec!["--chi", "0,nan"], "--chi"),
        (vec!["--bore", "1.2"], "--bore"),
        (vec!["--spheroids", "--bore", "0.5"], "--bore"),
        (vec!["--fineness", "60"], "--fineness"),
        (vec!["--plot-chi", "7"], "--plot-chi"),
    ] {
        let out = p(&dir, "y.csv");
        let mut a = vec!["demag", "--gamma", "2..2:1", "--out", out.as_str()];
        a.extend(args);
        let (code, _, err) = axicore(&a);
        assert_eq!(code, 2, "{a:?}: {err}");
        assert!(err.contains(needle), "{err}");
        assert!(!dir.join("y.csv").exists());
    }
}

#[test]
fn the_committed_study_says_what_the_readme_says() {
    // README "The demagnetization study" quotes counts and deviations of
    // cases/demag-study/study.csv; this keeps them in step when the study is regenerated.
    use axicore::demag::formulas::Formula;
    use axicore::demag::table::read_study;
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
    let text = std::fs::read_to_string(root.join("cases/demag-study/study.csv")).unwrap();
    let rows = read_study(&text, 0.05).unwrap();
    assert_eq!(rows.len(), 900);
    let held = |f: Formula| {
        rows.iter()
            .filter(|r| r.formulas.iter().any(|c| c.formula == f && !c.flagged))
            .count()
    };
    assert_eq!(held(Formula::Ellipsoid), 51);
    assert_eq!(held(Formula::SatoIshii), 44);
    assert_eq!(held(Formula::Miller), 64);
    assert_eq!(held(Formula::FerriteFit), 35);
    assert_eq!(held(Formula::UniformMagnetization), 49);
    let readme = std::fs::read_to_string(root.join("README.md")).unwrap();
    for quoted in ["51 of the 900", "64 of its 630", "35 of the 210"] {
        assert!(readme.contains(quoted), "README no longer says '{quoted}'");
    }
    assert_eq!(rows.iter().filter(|r| !r.tolerance_reached).count(), 5);
}

#[test]
fn rendering_a_study_sets_its_flags_at_the_threshold_asked() {
    // `--from` recomputes the flags from the deviations and error bars at its own threshold,
    // so the counts it prints follow the threshold; JSON names the formulas as the CSV does.
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
    let csv = root.join("cases/demag-study/study.csv");
    let count = |out: &str, pct: &str| -> usize {
        let line = out
            .lines()
            .find(|l| l.contains("ellipsoid of equal L/D"))
            .unwrap_or_else(|| panic!("{out}"));
        assert!(line.contains(&format!("within {pct} %")), "{line}");
        line.split(" at ")
            .nth(1)
            .unwrap()
            .split(' ')
            .next()
            .unwrap()
            .parse()
            .unwrap()
    };
    let (code, tight, err) = axicore(&["demag", "--from", csv.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let (code, loose, err) = axicore(&[
        "demag",
        "--from",
        csv.to_str().unwrap(),
        "--threshold",
        "0.2",
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(count(&loose, "20") > count(&tight, "5"));
    let dir = common::scratch_dir("demag", "names");
    let json = p(&dir, "s.json");
    let (code, _, err) = axicore(&["demag", "--from", csv.to_str().unwrap(), "--json", &json]);
    assert_eq!(code, 0, "{err}");
    let text = std::fs::read_to_string(&json).unwrap();
    for name in ["\"chi0_exact\"", "\"sato_ishii\"", "\"ferrite_fit\""] {
        assert!(text.contains(name), "{name}");
    }
}
