//! The built-in example's mesh: minimum angle ≥ 25° (the quality target of Ruppert-type
//! refinement, common practice), every triangle counter-clockwise, and the straight-sided
//! region areas (core rod and winding rectangles) exact to 1e-9 relative.

use axicore::case::parse_case;
use axicore::pipeline::discretise;
use axicore::{EXAMPLE_CASE, EXAMPLE_NAME};

#[test]
fn example_mesh_has_quality_orientation_and_exact_region_areas() {
    let case = parse_case(EXAMPLE_CASE, EXAMPLE_NAME).unwrap();
    let d = discretise(&case).unwrap();
    let st = d.mesh.stats();
    assert!(st.min_angle_deg >= 25.0, "{}", st.min_angle_deg);
    for t in 0..d.problem.mesh.triangles.len() {
        assert!(d.problem.mesh.signed_area(t) > 0.0);
    }
    let core = case.core.as_ref().unwrap();
    let exact_core = core.shape.radius() * 2.0 * core.shape.half_length();
    assert!((d.mesh.region_area(1) - exact_core).abs() <= 1e-9 * exact_core);
    let w = &case.windings[0];
    assert!((d.mesh.region_area(2) - w.section_area()).abs() <= 1e-9 * w.section_area());
}
