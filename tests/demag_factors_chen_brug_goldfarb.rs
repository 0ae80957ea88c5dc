//! The demagnetization study's factors against closed forms and published behaviour.
//!
//! * χ = 0 rods (prescribed uniform magnetization): Nm and Nf against the closed forms of
//!   references.md §1 (Nm: inductance analogy, Moskowitz & Della Torre, IEEE Trans. Magn. 2,
//!   1966; Nf: the Bessel-integral form of the charge picture; definitions Chen, Brug &
//!   Goldfarb, IEEE Trans. Magn. 27(4), 3601, 1991).
//! * Spheroids at any χ: both factors equal Osborn's N (Phys. Rev. 67, 351, 1945), 1/3 for
//!   the sphere.
//! * Chen, Brug & Goldfarb (1991), qualitative: Nm falls as χ rises at every γ; Nf rises with
//!   χ for γ ≥ 2; both tend to the χ = 0 values as χ → 0.
//! * Every point's true error within 3× its estimate where a closed form exists.

use axicore::study::demag::{DemagStudy, Elements, Family};
use axicore_formulas as reference;

/// The study as `axicore demag` runs it by default (hierarchical elements).
fn study(family: Family, tolerance: f64) -> DemagStudy {
    DemagStudy {
        family,
        tolerance,
        threshold: 0.05,
        fineness: 1.0,
        max_nodes: 2_000_000,
        elements: Elements::Hierarchical,
    }
}

#[test]
fn uniformly_magnetized_rods_match_the_closed_form_factors() {
    // references.md §1 closed forms; the issue asks 1e-4 relative (Nf 1e-3 where below 1e-3)
    // at γ = 0.5 … 100. γ = 50 and 100 are the slender rods whose Nf (5e-5 at γ = 100, a
    // small difference of nearly equal fields) the second-order elements missed by per cents.
    let s = study(Family::Cylinder, 3e-5);
    for gamma in [0.5, 1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0] {
        let p = s.solve_point(gamma, 0.0, 0.0).unwrap();
        let f = p.factors;
        let (nm, nf) = (reference::rod_nm_chi0(gamma), reference::rod_nf_chi0(gamma));
        let (em, ef) = ((f.nm - nm).abs(), (f.nf - nf).abs());
        let nf_tol = if nf < 1e-3 { 1e-3 } else { 1e-4 };
        assert!(
            em <= 1e-4 * nm,
            "γ {gamma}: Nm {} vs {nm} ({:.1e})",
            f.nm,
            em / nm
        );
        assert!(
            ef <= nf_tol * nf,
            "γ {gamma}: Nf {} vs {nf} ({:.1e})",
            f.nf,
            ef / nf
        );
        // The estimate bounds the true error (the issue allows a factor 3; the degree
        // sequence's estimate is an upper bound).
        assert!(
            em <= 3.0 * f.nm_error.unwrap(),
            "γ {gamma}: Nm error {em:.1e} vs estimate {:?}",
            f.nm_error
        );
        assert!(
            ef <= 3.0 * f.nf_error.unwrap(),
            "γ {gamma}: Nf error {ef:.1e} vs estimate {:?}",
            f.nf_error
        );
    }
}

#[test]
fn spheroid_factors_equal_osborns_at_every_susceptibility() {
    // Osborn (1945): a spheroid magnetizes uniformly, so Nm = Nf = N at every χ; 1/3 for the
    // sphere (references.md §2, check #7).
    // At χ = 1 the factor's error is (N + 1/χ) ≈ 1.2 times the moment's (δNm = (Nm + 1/χ)
    // δm/m), so the moment is asked to 5e-6 for N to 1e-5.
    let s = study(Family::Spheroid, 5e-6);
    for m in [1.0, 2.0, 10.0] {
        let n = reference::spheroid_demag_factor(m);
        for chi in [0.0, 1.0, 1e3, 1e6] {
            let f = s.solve_point(m, chi, 0.0).unwrap().factors;
            for (what, v, e) in [("Nm", f.nm, f.nm_error), ("Nf", f.nf, f.nf_error)] {
                let err = (v - n).abs();
                assert!(err <= 1e-5, "m {m} χ {chi}: {what} {v} vs {n} ({err:.1e})");
                assert!(
                    err <= 3.0 * e.unwrap().max(1e-9),
                    "m {m} χ {chi}: {what} error {err:.1e} vs estimate {e:?}"
                );
            }
        }
    }
}

#[test]
fn rod_factors_follow_the_published_trends_in_susceptibility() {
    // Chen, Brug & Goldfarb (1991), Figs. of Nm and Nf against χ: Nm decreases with χ at
    // every γ; Nf increases with χ for γ ≥ 2.
    let s = study(Family::Cylinder, 1e-3);
    for gamma in [0.5, 2.0, 10.0] {
        let f: Vec<_> = [0.0, 1.0, 100.0, 1e4]
            .iter()
            .map(|&chi| s.solve_point(gamma, chi, 0.0).unwrap().factors)
            .collect();
        for w in f.windows(2) {
            let bar = |a: Option<f64>, b: Option<f64>| 3.0 * (a.unwrap_or(0.0) + b.unwrap_or(0.0));
            assert!(
                w[1].nm < w[0].nm + bar(w[0].nm_error, w[1].nm_error),
                "γ {gamma}: Nm rises from χ {} to {}",
                w[0].chi,
                w[1].chi
            );
            if gamma >= 2.0 {
                assert!(
                    w[1].nf > w[0].nf - bar(w[0].nf_error, w[1].nf_error),
                    "γ {gamma}: Nf falls from χ {} to {}",
                    w[0].chi,
                    w[1].chi
                );
            }
        }
    }
}

#[test]
fn small_susceptibility_runs_approach_the_prescribed_magnetization_factors() {
    // Continuity at χ → 0 (Chen, Brug & Goldfarb 1991): the χ = 0 route (prescribed
    // magnetization) and a small-χ linear run agree within their error estimates plus the
    // O(χ) change of the factors themselves.
    // At χ = 1e-3 the factors' errors are 1000 times the moment's, so that run asks 1e-7.
    let (coarse, fine) = (study(Family::Cylinder, 1e-4), study(Family::Cylinder, 1e-7));
    for gamma in [1.0, 5.0] {
        let zero = coarse.solve_point(gamma, 0.0, 0.0).unwrap().factors;
        let small = fine.solve_point(gamma, 1e-3, 0.0).unwrap().factors;
        for (what, a, b, ea, eb) in [
            ("Nm", zero.nm, small.nm, zero.nm_error, small.nm_error),
            ("Nf", zero.nf, small.nf, zero.nf_error, small.nf_error),
        ] {
            // dN/dχ is of order N at χ ~ 1 (Chen et al. 1991 tables), so χ = 1e-3 moves N by
            // about 1e-3 N.
            let allowed = 3.0 * (ea.unwrap() + eb.unwrap()) + 2e-3 * a;
            assert!(
                (a - b).abs() <= allowed,
                "γ {gamma}: {what} χ=0 {a} vs χ=1e-3 {b} (allowed {allowed:.1e})"
            );
        }
    }
}

#[test]
fn solve_reports_a_linear_cores_factors_whether_a_background_or_a_winding_drives_it() {
    // Osborn (1945): the m = 10 spheroid's factors are N = 0.0202859 both ways, whether read
    // off the case's own uniform-field solve or off the companion solve of a winding case.
    use axicore::case::parse_case;
    use axicore::pipeline::{run, RunOptions};
    let n = reference::prolate_demag_factor(10.0);
    let alone = "[core]\nshape = \"spheroid\"\nlength = \"100 mm\"\ndiameter = \"10 mm\"\nmu_r = 1000\n[background]\nb_axial = \"1 mT\"\n";
    let wound = "[core]\nshape = \"spheroid\"\nlength = \"100 mm\"\ndiameter = \"10 mm\"\nmu_r = 1000\n[[winding]]\nturns = 100\ncurrent = \"10 mA\"\ninner_radius = \"6 mm\"\nouter_radius = \"7 mm\"\nlength = \"40 mm\"\n";
    for text in [alone, wound] {
        let case = parse_case(text, "spheroid.toml").unwrap();
        let r = run(&case, &RunOptions::default()).unwrap().report;
        let df = r.core.unwrap().demagnetizing_factors.unwrap();
        for v in [df.factors.nm, df.factors.nf] {
            assert!((v - n).abs() <= 2e-4 * n, "{}: {v} vs {n}", df.from);
        }
        assert!(
            df.formulas.iter().any(|d| !d.flagged),
            "the ellipsoid formula is exact here"
        );
    }
}
