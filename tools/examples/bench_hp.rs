//! One large linear hp solve, timed by stage (a benchmark, not a test): the case's corner mesh
//! at a given fineness with every element at degree p, the corner splitting of `moment`.
//! `cargo run --release -p axicore --example bench_hp -- CASE FINENESS DEGREE [LAYERS]`
//! (`tools/bench_hp.sh` runs it under GNU time for the peak memory).

use std::time::Instant;

use axicore::case::parse_case;
use axicore::hp_geometry::discretise_hp;
use axicore_solver::hp::HpModel;

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let usage = "usage: bench_hp CASE FINENESS DEGREE [LAYERS]";
    let path = args.first().expect(usage);
    let fineness: f64 = args
        .get(1)
        .expect(usage)
        .parse()
        .expect("FINENESS is a number");
    let degree: u32 = args
        .get(2)
        .expect(usage)
        .parse()
        .expect("DEGREE is an integer");
    let layers: u32 = args
        .get(3)
        .map_or(9, |s| s.parse().expect("LAYERS is an integer"));
    let text = std::fs::read_to_string(path).expect("cannot read CASE");
    let mut case = parse_case(&text, path).unwrap_or_else(|e| panic!("{e}"));
    case.mesh.fineness = fineness;
    case.mesh.corner_layers = layers;

    let start = Instant::now();
    let (problem, curved) = discretise_hp(&case).unwrap_or_else(|e| panic!("{e}"));
    let t_mesh = start.elapsed().as_secs_f64();
    let nt = problem.mesh.triangles.len();

    let start = Instant::now();
    let model = HpModel::new(problem, &vec![degree; nt], curved).expect("model");
    let t_build = start.elapsed().as_secs_f64();

    let start = Instant::now();
    let sol = model.solve_linear().expect("linear solve");
    let t_solve = start.elapsed().as_secs_f64();
    let moment = model.exterior_moment(&sol).unwrap_or(f64::NAN);

    println!(
        "fineness {fineness} p {degree} layers {layers}: triangles {nt}, unknowns {} (before \
         condensation), equations {} (after), mesh {t_mesh:.3} s, model build {t_build:.3} s, \
         assembly+factorisation+solve {t_solve:.3} s, build+solve {:.3} s, moment {moment:.12e} A·m² \
         (sources {:.12e})",
        model.unknowns(),
        model.equations(),
        t_build + t_solve,
        sol.source_moment,
    );
}
