//! The demagnetization study: Nm and Nf of rods, tubes or spheroids over a grid of
//! length/diameter γ, susceptibility χ and bore/diameter β, each point an independent field
//! solve of a core alone in a uniform axial field (χ > 0) or uniformly magnetized (χ = 0),
//! refined until its factors' source quantities are known to the tolerance, and compared
//! with the formulas users substitute (see [`crate::demag::formulas`]). Runs on the sweep
//! engine, so it resumes, runs in parallel and in shards like any sweep.

use toml::Value;

use super::grid::{self, Axis};
use super::sweep::PointStudy;
use crate::accuracy::{self, Caps, Goal, Refine};
use crate::case::parse_case;
use crate::demag::averages::CoreAverages;
use crate::demag::factors::{self, Drive, Factors, SourceErrors};
use crate::demag::formulas::{deviations, Body, Formula};
use crate::pipeline::RunOptions;
use crate::report::Report;

/// Diameter of every study core, m: the factors depend only on proportions and χ.
pub const DIAMETER: f64 = 0.01;
/// Background flux density of the χ > 0 points, T (the factors of a linear core do not
/// depend on it).
pub const B0: f64 = 1e-3;
/// Prescribed magnetization of the χ = 0 points, A/m.
pub const M0: f64 = 1e5;

/// Axis names of the study grid.
pub const GAMMA: &str = "gamma";
/// Susceptibility axis.
pub const CHI: &str = "chi";
/// Bore/diameter axis.
pub const BETA: &str = "bore_ratio";

/// Which family of core shapes the study solves.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Family {
    /// Rods, and tubes where the bore ratio is above 0.
    Cylinder,
    /// Spheroids of axis ratio γ (the closed form is exact: a check of the method).
    Spheroid,
}

/// The study: what each point solves and how its row is written.
#[derive(Debug, Clone)]
pub struct DemagStudy {
    /// Core family.
    pub family: Family,
    /// Estimated relative error asked of each point's source quantities.
    pub tolerance: f64,
    /// Deviations above this (relative) are flagged.
    pub threshold: f64,
    /// Mesh fineness of the first level.
    pub fineness: f64,
    /// Node cap per solve.
    pub max_nodes: usize,
    /// The elements each point is solved with.
    pub elements: Elements,
}

/// The elements a study solves its points with.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Elements {
    /// Hierarchical elements of rising degree on exact geometry (see `demag_hp`).
    Hierarchical,
    /// Second-order elements refined in h (`fineness`, `max_nodes` apply).
    SecondOrder,
}

/// One solved point.
#[derive(Debug, Clone, PartialEq)]
pub struct PointResult {
    /// The core's factors with their error bars.
    pub factors: Factors,
    /// Unknowns of the finest level.
    pub unknowns: usize,
    /// Refinement levels solved.
    pub levels: usize,
    /// Whether every goal met the tolerance.
    pub reached: bool,
}

/// The body of a point.
pub fn body(family: Family, gamma: f64, beta: f64) -> Body {
    match family {
        Family::Spheroid => Body::Spheroid { gamma },
        Family::Cylinder if beta > 0.0 => Body::Tube { gamma, beta },
        Family::Cylinder => Body::Rod { gamma },
    }
}

/// The case text of one point: the core alone, D = 10 mm, in 1 mT (χ > 0) or magnetized
/// (χ = 0); second-order elements, the exact exterior.
pub fn point_case(body: Body, chi: f64, fineness: f64, max_nodes: usize) -> String {
    let d = DIAMETER;
    let length = body.gamma() * d;
    let shape = match body {
        Body::Rod { .. } => "shape = \"rod\"".to_string(),
        Body::Tube { beta, .. } => format!("shape = \"tube\"\nbore = {:e}", beta * d),
        Body::Spheroid { .. } => "shape = \"spheroid\"".to_string(),
    };
    let source = if chi > 0.0 {
        format!("mu_r = {:e}\n\n[background]\nb_axial = {B0:e}", 1.0 + chi)
    } else {
        format!("magnetization = \"{M0:e} A/m\"")
    };
    format!(
        "title = \"demagnetization study point\"\n\n[core]\n{shape}\nlength = {length:e}\ndiameter = {d:e}\n{source}\n\n[mesh]\nfineness = {fineness:e}\nmax_nodes = {max_nodes}\n"
    )
}

/// A goal; the mid-plane quantities are point values of A (see [`Goal`]).
fn goal(of: fn(&Report) -> f64, point_value: bool) -> Goal {
    Goal { of, point_value }
}

fn core_moment(r: &Report) -> f64 {
    r.core_dipole_moment_Am2
}

fn mid_flux(r: &Report) -> f64 {
    r.core.as_ref().map_or(f64::NAN, |c| c.mid_plane_flux_Wb)
}

fn mean_h(r: &Report) -> f64 {
    r.core.as_ref().map_or(f64::NAN, |c| c.average_h_z_A_per_m)
}

fn mid_h(r: &Report) -> f64 {
    averages_of(r).map_or(f64::NAN, |a| factors::magnetized_mid_h(&a))
}

/// The core averages read back from a report.
pub fn averages_of(r: &Report) -> Option<CoreAverages> {
    let c = r.core.as_ref()?;
    Some(CoreAverages {
        volume_m3: c.volume_m3,
        b_z: c.average_b_z_T,
        m_z: r.core_dipole_moment_Am2 / c.volume_m3,
        mid_flux: c.mid_plane_flux_Wb,
        mid_area: c.mid_plane_area_m2,
    })
}

/// Largest susceptibility a point may have (the case file's μr cap is 1e7).
pub const MAX_CHI: f64 = 1e7 - 1.0;

/// Checks one axis value: γ within the case file's L/D bounds (1e-3 … 1e4), χ from 0 to
/// [`MAX_CHI`], β from 0 to 0.95 (and 0 for spheroids).
pub fn check_value(family: Family, key: &str, x: f64) -> Result<(), String> {
    let ok = match key {
        GAMMA => x.is_finite() && (1e-3..=1e4).contains(&x),
        CHI => x.is_finite() && (0.0..=MAX_CHI).contains(&x),
        BETA => {
            x.is_finite() && (0.0..=0.95).contains(&x) && (family == Family::Cylinder || x == 0.0)
        }
        _ => false,
    };
    if ok {
        return Ok(());
    }
    Err(match key {
        GAMMA => format!("{x} must be a length/diameter from 1e-3 to 1e4"),
        CHI => format!("{x} must be a susceptibility from 0 to {MAX_CHI:e}"),
        BETA if family == Family::Spheroid => "spheroids have no bore".to_string(),
        _ => format!("{x} must be a bore/diameter ratio from 0 to 0.95"),
    })
}

impl DemagStudy {
    /// Solves one point of the grid.
    pub fn solve_point(&self, gamma: f64, chi: f64, beta: f64) -> Result<PointResult, String> {
        if self.elements == Elements::Hierarchical {
            return self.solve_point_hp(gamma, chi, beta);
        }
        check_value(self.family, GAMMA, gamma).map_err(|e| format!("gamma: {e}"))?;
        check_value(self.family, CHI, chi).map_err(|e| format!("chi: {e}"))?;
        check_value(self.family, BETA, beta).map_err(|e| format!("bore_ratio: {e}"))?;
        let body = body(self.family, gamma, beta);
        let text = point_case(body, chi, self.fineness, self.max_nodes);
        let case = parse_case(&text, "(study point)").map_err(|e| e.to_string())?;
        let (drive, goals): (Drive, [Goal; 2]) = if chi > 0.0 {
            let h0 = B0 / axicore_solver::MU0;
            (
                Drive::Uniform { h0, chi },
                [goal(core_moment, false), goal(mid_flux, true)],
            )
        } else {
            (Drive::Magnetized, [goal(mean_h, false), goal(mid_h, true)])
        };
        let caps = Caps {
            max_nodes: self.max_nodes,
            max_seconds: None,
        };
        let c = accuracy::run_to_goals(
            &case,
            &RunOptions::default(),
            self.tolerance,
            caps,
            Refine::Uniform,
            &goals,
            &mut |_| {},
        )
        .map_err(|e| e.to_string())?;
        let report = &c.outcome.report;
        let avg = averages_of(report).ok_or("the point has no core")?;
        let finite = |e: f64| e.is_finite().then_some(e);
        let err = SourceErrors {
            volume: c.history.goal_errors.first().copied().and_then(finite),
            mid: c.history.goal_errors.get(1).copied().and_then(finite),
        };
        Ok(PointResult {
            factors: factors::factors(drive, &avg, err),
            unknowns: report.unknowns,
            levels: c.history.levels.len(),
            reached: c.history.reached,
        })
    }

    /// The axis values of a point as (γ, χ, β).
    fn values(axes: &[&Value]) -> Result<(f64, f64, f64), String> {
        let num = |v: &Value| match v {
            Value::Float(x) => Ok(*x),
            Value::Integer(i) => Ok(*i as f64),
            Value::String(s) => s
                .trim()
                .parse::<f64>()
                .map_err(|_| format!("'{s}' is not a number")),
            other => Err(format!("'{other}' is not a number")),
        };
        let gamma = num(axes.first().ok_or("no gamma")?)?;
        let chi = num(axes.get(1).ok_or("no chi")?)?;
        let beta = axes.get(2).map(|v| num(v)).transpose()?.unwrap_or(0.0);
        Ok((gamma, chi, beta))
    }
}

/// Columns of a study row after `status`, before the formulas' columns.
const FACTOR_COLUMNS: &str =
    "shape,Nm,Nm_error,Nf,Nf_error,chi_app_moment,chi_app_mid,tolerance_reached,levels,unknowns";

/// Per formula: its N (for Nm; for Nf where it differs), its deviation from Nm and Nf, the
/// moment it predicts relative to the solved one, and the flag.
const FORMULA_COLUMNS: [&str; 6] = ["N_for_Nm", "N_for_Nf", "vs_Nm", "vs_Nf", "moment", "flag"];

/// All quantity columns of a study row, `status` first.
pub fn columns() -> String {
    let mut c = format!("status,{FACTOR_COLUMNS}");
    for f in Formula::ALL {
        for k in FORMULA_COLUMNS {
            c.push_str(&format!(",{}_{k}", f.name()));
        }
    }
    c
}

/// A number cell: 10 significant digits, empty when not a number.
fn num(x: f64) -> String {
    if x.is_finite() {
        format!("{x:.9e}")
    } else {
        String::new()
    }
}

impl PointStudy for DemagStudy {
    fn definition(&self) -> String {
        match self.elements {
            Elements::SecondOrder => format!(
                "demag family={:?} tolerance={:e} threshold={:e} fineness={:e} max_nodes={}",
                self.family, self.tolerance, self.threshold, self.fineness, self.max_nodes
            ),
            Elements::Hierarchical => format!(
                "demag family={:?} tolerance={:e} threshold={:e} elements=hp max_nodes={}",
                self.family, self.tolerance, self.threshold, self.max_nodes
            ),
        }
    }

    fn columns(&self) -> String {
        columns()
    }

    fn solve(&self, values: &[&Value]) -> Result<String, String> {
        let (gamma, chi, beta) = Self::values(values)?;
        let p = self.solve_point(gamma, chi, beta)?;
        let f = &p.factors;
        let opt = |e: Option<f64>| e.map_or(String::new(), num);
        let shape = match body(self.family, gamma, beta) {
            Body::Rod { .. } => "rod",
            Body::Tube { .. } => "tube",
            Body::Spheroid { .. } => "spheroid",
        };
        let mut row = format!(
            "{shape},{},{},{},{},{},{},{},{},{}",
            num(f.nm),
            opt(f.nm_error),
            num(f.nf),
            opt(f.nf_error),
            num(f.chi_app_m),
            num(f.chi_app_f),
            p.reached,
            p.levels,
            p.unknowns
        );
        let devs = deviations(body(self.family, gamma, beta), f, self.threshold);
        for formula in Formula::ALL {
            match devs.iter().find(|d| d.formula == formula) {
                Some(d) => row.push_str(&format!(
                    ",{},{},{},{},{},{}",
                    num(d.n_for_nm),
                    num(d.n_for_nf),
                    num(d.vs_nm),
                    num(d.vs_nf),
                    num(d.moment),
                    if d.flagged { "yes" } else { "no" }
                )),
                None => row.push_str(",,,,,,"),
            }
        }
        Ok(row)
    }
}

/// The default grid: γ from 0.1 to 1000 (13 points, log), χ = 0 then 1 … 1e6 (one per decade),
/// rods.
pub fn default_axes() -> Vec<Axis> {
    vec![
        grid::parse_range(&format!("{GAMMA}=0.1..1000:13:log")).expect("valid default"),
        chi_axis(&[0.0, 1.0, 10.0, 100.0, 1e3, 1e4, 1e5, 1e6]),
    ]
}

/// A χ axis of listed values.
pub fn chi_axis(values: &[f64]) -> Axis {
    Axis {
        key: CHI.to_string(),
        values: values.iter().map(|&x| Value::Float(x)).collect(),
    }
}
