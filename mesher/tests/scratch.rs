use spade::*;
fn run(t: [f64; 2], la: f64, lb: f64, th: f64, box_: f64) -> (bool, usize) {
    let a = [t[0] + la, t[1]];
    let b = [t[0] + lb * th.cos(), t[1] + lb * th.sin()];
    let verts = vec![Point2::new(0.0, 0.0), Point2::new(box_, 0.0), Point2::new(box_, box_), Point2::new(0.0, box_), Point2::new(t[0], t[1]), Point2::new(a[0], a[1]), Point2::new(b[0], b[1])];
    let edges = if t[0] == 0.0 { vec![[0, 1], [1, 2], [2, 3], [3, 4], [4, 0], [4, 5], [4, 6]] } else { vec![[0, 1], [1, 2], [2, 3], [3, 0], [4, 5], [4, 6]] };
    let mut cdt = ConstrainedDelaunayTriangulation::<Point2<f64>>::bulk_load_cdt(verts, edges).unwrap();
    let r = cdt.refine(RefinementParameters::new().with_angle_limit(AngleLimit::from_deg(25.0)).with_max_additional_vertices(50_000));
    (r.refinement_complete, cdt.num_vertices())
}
#[test]
fn scratch() {
    let th = 0.05f64.to_radians();
    for ratio in [1.0, 1.5, 2.0, 2.5, 2.66, 3.0, 4.0] {
        println!("unit box ratio {ratio}: {:?}   on hull: {:?}", run([0.3, 0.5], 0.1, 0.1 * ratio, th, 1.0), run([0.0, 0.5], 0.1, 0.1 * ratio, th, 1.0));
    }
    for deg in [0.05, 0.1, 0.2, 0.5, 1.0, 2.0, 5.0, 10.0, 20.0] {
        let th = (deg as f64).to_radians();
        let mut nf = 0; let mut worst = 0;
        for k in 0..40 { let ratio = 1.0 + 0.1 * k as f64; let (ok, n) = run([0.0, 0.5], 0.05, 0.05 * ratio, th, 1.0); if !ok { nf += 1 } else { worst = worst.max(n) } }
        println!("on hull {deg}°: {nf}/40 ran out, worst completed {worst}");
    }
    for deg in [0.05, 0.1, 0.2, 0.5, 1.0, 2.0, 5.0] {
        let th = (deg as f64).to_radians();
        let mut nf = 0; let mut worst = 0;
        for k in 0..40 { let ratio = 1.0 + 0.1 * k as f64; let (ok, n) = run([0.3, 0.5], 0.05, 0.05 * ratio, th, 1.0); if !ok { nf += 1 } else { worst = worst.max(n) } }
        println!("{deg}°: {nf}/100 ran out, worst completed {worst}");
    }
}
