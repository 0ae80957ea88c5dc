//! The human-readable summary of one solve.

use std::fmt::Write as _;

use super::format::{input, mm, point_mm, sig};
use super::Report;

/// Cautions printed with every summary.
pub const CAUTIONS: &str = "\
Cautions: these are model estimates (axisymmetric, single-valued B–H law: no hysteresis,
anisotropy, eddy currents or temperature effects; built-in material curves are typical
values, not data of your lot). Confirm by measurement before relying on them. Check winding
temperature rise and insulation limits separately. Flight hardware is subject to the
applicable standards and to qualified review.";

/// The human-readable summary; results to `digits` significant digits (about four, more
/// when an error estimate says the moment is known better).
pub fn summary(r: &Report, show_timings: bool, digits: usize) -> String {
    let d = digits;
    let mut s = String::new();
    let _ = writeln!(s, "{}", r.title);
    let _ = writeln!(s, "{}", "=".repeat(r.title.chars().count().max(8)));
    if let Some(c) = &r.core {
        let _ = writeln!(
            s,
            "core      {} — {} (initial μr = {}{})",
            c.shape,
            c.material,
            input(c.initial_mu_r),
            c.saturation_b_T
                .map_or(String::new(), |b| format!(", saturation {} T", input(b)))
        );
        if let (Some(m), Some(mu)) = (c.prescribed_magnetization_A_per_m, c.recoil_mu_r) {
            let _ = writeln!(
                s,
                "magnet    M0 = {} A/m along +z prescribed (J0 = μ0 M0 = {} T), recoil μr = {}",
                sig(m, d),
                sig(axicore_solver::MU0 * m, d),
                input(mu)
            );
        }
    } else {
        let _ = writeln!(s, "core      none (air-core)");
    }
    for w in &r.windings {
        let _ = writeln!(
            s,
            "winding   {}: {} turns at {} A ({} A/mm² over its section)",
            w.name,
            input(w.turns),
            input(w.current_A),
            sig(w.current_density_A_per_mm2, 3)
        );
    }
    if r.background_b_T != 0.0 {
        let _ = writeln!(
            s,
            "field     uniform background B_z = {} T",
            input(r.background_b_T)
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "Dipole moment");
    let _ = writeln!(
        s,
        "  total                    {:>12} A·m²",
        sig(r.dipole_moment_Am2, d)
    );
    let _ = writeln!(
        s,
        "  from winding currents    {:>12} A·m²",
        sig(r.winding_dipole_moment_Am2, d)
    );
    let _ = writeln!(
        s,
        "  from core magnetisation  {:>12} A·m²",
        sig(r.core_dipole_moment_Am2, d)
    );
    let _ = writeln!(
        s,
        "  field-route check        {:>12} A·m²  (ball of radius {}; differs by {:.1e})",
        sig(r.dipole_check_Am2, d),
        mm(r.ball_radius_m),
        r.dipole_estimator_difference
    );
    match (&r.core, r.moment_gain) {
        (None, _) => {
            let _ = writeln!(s, "  moment gain              no core");
        }
        (Some(_), Some(g)) => {
            let _ = writeln!(
                s,
                "  moment gain              {:>12}       (moment with the core ÷ the windings' own)",
                sig(g, d)
            );
        }
        (Some(_), None) => {
            let _ = writeln!(s, "  moment gain              n/a (no winding current)");
        }
    }
    if let Some(c) = &r.core {
        let _ = writeln!(s);
        let _ = writeln!(
            s,
            "Core (length/diameter {})",
            sig(c.length_over_diameter, 4)
        );
        if let Some(mu) = c.apparent_permeability {
            let _ = writeln!(
                s,
                "  apparent permeability    {:>12}       ⟨B_z⟩/(μ0 ⟨H_applied⟩) over the core volume",
                sig(mu, d)
            );
        }
        let _ = writeln!(
            s,
            "  ellipsoid estimate       {:>12}       μr/(1 + N(μr − 1)), N = {} of the ellipsoid of the same L/D (Osborn 1945){}",
            sig(c.ellipsoid_apparent_permeability, 4),
            sig(c.ellipsoid_demagnetizing_factor, 4),
            if c.saturation_b_T.is_some() {
                "; initial μr, small-signal"
            } else {
                ""
            }
        );
        if let Some(df) = &c.demagnetizing_factors {
            let f = &df.factors;
            let _ = writeln!(
                s,
                "  demagnetizing factors    Nm {} (volume), Nf {} (mid-plane); {}",
                sig(f.nm, 4),
                sig(f.nf, 4),
                df.from
            );
            let cells: Vec<String> = df
                .formulas
                .iter()
                .map(|d| {
                    let (n, dev) = if d.formula.targets_fluxmetric() {
                        (d.n_for_nf, d.vs_nf)
                    } else {
                        (d.n_for_nm, d.vs_nm)
                    };
                    format!(
                        "{} {} ({:+.1} %{})",
                        d.formula.name(),
                        sig(n, 4),
                        100.0 * dev,
                        if d.flagged { ", off" } else { "" }
                    )
                })
                .collect();
            let _ = writeln!(
                s,
                "  formulas for N           {} — against Nf for ferrite_fit, Nm otherwise; off: beyond {:.0} %",
                cells.join(", "),
                100.0 * crate::demag::case::REPORT_THRESHOLD
            );
        }
        if let Some(n) = c.effective_demagnetizing_factor {
            let _ = writeln!(
                s,
                "  effective demag. factor  {:>12}       the N that gives the solved apparent permeability",
                sig(n, 4)
            );
        }
        let _ = writeln!(
            s,
            "  |B| at the core centre   {:>12} T     at {}",
            sig(c.b_centre_T, d),
            point_mm(c.b_centre_at_m)
        );
        if let (Some(b), Some(at)) = (c.max_b_T, c.max_b_at_m) {
            let _ = writeln!(
                s,
                "  peak |B| in the core     {:>12} T     at {}, corners ±{} excluded",
                sig(b, d),
                point_mm(at),
                mm(c.max_b_corner_exclusion_m)
            );
        }
        if let (Some(ratio), Some(frac), Some(place)) = (
            c.max_b_over_saturation,
            c.saturated_fraction,
            c.peak_location.as_ref(),
        ) {
            let _ = writeln!(
                s,
                "  saturation               peak |B| is {:.1} % of B_sat, in {place} (where the core saturates first)\n                           {:.1} % of the core volume above 90 % of B_sat",
                100.0 * ratio,
                100.0 * frac
            );
        }
        if let Some(fc) = r.flux_concentration {
            let _ = writeln!(
                s,
                "  flux concentration       {:>12}       |B| at the core centre ÷ the background B0",
                sig(fc, d)
            );
        }
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "Field");
    let _ = writeln!(
        s,
        "  B_z at the origin        {:>12} T",
        sig(r.b_origin_T, d)
    );
    let _ = writeln!(s, "  stored energy            {:>12} J", sig(r.energy_J, d));
    for p in &r.points {
        let _ = writeln!(
            s,
            "  at {}: B = ({}, {}) T, H = ({}, {}) A/m, μr = {}{}",
            point_mm([p.r_m, p.z_m]),
            sig(p.b_r_T, d),
            sig(p.b_z_T, d),
            sig(p.h_r_A_per_m, d),
            sig(p.h_z_A_per_m, d),
            sig(p.mu_r, d),
            if p.low_accuracy_near_axis {
                "  [near the axis beside a core: low accuracy, see README]"
            } else {
                ""
            }
        );
    }
    if !r.windings.is_empty() {
        s.push_str(&winding_table(r, d));
    }
    let _ = writeln!(s);
    if let Some(h) = &r.residual_history {
        let _ = writeln!(
            s,
            "Solver    Newton converged in {} iterations{}{}; relative residuals {}",
            r.newton_iterations,
            if r.newton_start_iterations > 0 {
                format!(
                    " (from a first-order start of {} iterations)",
                    r.newton_start_iterations
                )
            } else {
                String::new()
            },
            if r.newton_local_iterations > 0 {
                format!(
                    ", {} local ones on the knee elements",
                    r.newton_local_iterations
                )
            } else {
                String::new()
            },
            h.iter()
                .map(|v| format!("{v:.1e}"))
                .collect::<Vec<_>>()
                .join(" → ")
        );
    }
    let _ = writeln!(
        s,
        "Mesh      {} nodes, {} triangles (core {}, windings {}, air {}), {} unknowns",
        r.nodes,
        r.triangles,
        r.mesh.triangles_core,
        r.mesh.triangles_windings.iter().sum::<usize>(),
        r.mesh.triangles_air,
        r.unknowns
    );
    let _ = writeln!(
        s,
        "          smallest angle {:.1}°, worst aspect ratio {:.2}, surroundings radius {}",
        r.mesh.smallest_angle_deg,
        r.mesh.max_aspect_ratio,
        mm(r.surroundings_radius_m)
    );
    if show_timings {
        let t = &r.timings_s;
        let _ = writeln!(
            s,
            "Time      mesh {:.3} s, assemble+factor {:.3} s, solve {:.3} s, post {:.3} s, total {:.3} s",
            t.mesh, t.assemble_factor, t.solve, t.post, t.total()
        );
    }
    let _ = writeln!(s);
    for c in &r.case_cautions {
        let _ = writeln!(s, "CAUTION   {c}");
    }
    s.push_str(CAUTIONS);
    s.push('\n');
    s
}

/// The windings' circuit figures, one row each: current density, flux linkage (with the
/// background's share apart), inductances, and the sensitivity to a background field.
fn winding_table(r: &Report, d: usize) -> String {
    let mut s = String::new();
    let background = r.background_b_T != 0.0;
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "Windings (Ψ flux linkage; L_inc = dΨ/dI at this operating point; L_sec = Ψ_own/I)"
    );
    let _ = write!(
        s,
        "  {:<16} {:>12} {:>12}",
        "winding", "Ψ_own/Wb", "L_inc/H"
    );
    if background {
        let _ = writeln!(s, " {:>14} {:>16}", "Ψ_backgr./Wb", "S/(V/(T·Hz))");
    } else {
        let _ = writeln!(s, " {:>12}", "L_sec/H");
    }
    for w in &r.windings {
        let opt = |v: Option<f64>| v.map_or("-".to_string(), |x| sig(x, d));
        let _ = write!(
            s,
            "  {:<16} {:>12} {:>12}",
            w.name,
            sig(w.own_flux_linkage_Wb, d),
            opt(w.incremental_inductance_H)
        );
        if background {
            let _ = writeln!(
                s,
                " {:>14} {:>16}",
                opt(w.background_flux_linkage_Wb),
                opt(w.sensitivity_V_per_T_Hz)
            );
        } else {
            let _ = writeln!(s, " {:>12}", opt(w.secant_inductance_H));
        }
    }
    if background {
        let _ = writeln!(
            s,
            "  S = 2π Ψ_background/B0: open-circuit EMF per tesla and hertz of a slow axial field (no eddy currents, well below the winding's resonance)"
        );
    }
    if let Some(m) = r.inductance_matrix_H.as_ref().filter(|m| m.len() > 1) {
        let _ = writeln!(s, "  mutual inductances dΨ_i/dI_k / H:");
        for (i, row) in m.iter().enumerate() {
            let cells: Vec<String> = row.iter().map(|v| format!("{:>12}", sig(*v, d))).collect();
            let _ = writeln!(s, "    {:<14} {}", r.windings[i].name, cells.join(" "));
        }
    }
    s
}
