//! Many pseudo-random layouts on a coarse grid, so that touching, collinear and crossing outlines are
//! common: every spec must either mesh with all invariants or give a typed validation error (overlap,
//! arc crossing, cusp), never a panic, a triangulator failure or a runaway refinement.

mod common;

use axicore_mesher::{build_mesh, MeshError, MeshSpec, Region, Shape};
use common::*;

/// Small linear congruential generator (Knuth's MMIX constants, from memory): deterministic, no crate.
struct Lcg(u64);

impl Lcg {
    fn next(&mut self) -> u64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        self.0 >> 33
    }

    /// A multiple of 5 mm in [lo, hi] mm.
    fn grid(&mut self, lo: i64, hi: i64) -> f64 {
        let steps = (hi - lo) / 5 + 1;
        (lo + 5 * (self.next() as i64 % steps)) as f64 * 1e-3
    }
}

fn random_spec(rng: &mut Lcg) -> MeshSpec {
    let mut spec = MeshSpec::new(0.2, AIR);
    spec.far_size = 0.05;
    let count = 1 + rng.next() % 4;
    for k in 0..count {
        let shape = if rng.next().is_multiple_of(4) {
            let radial = rng.grid(5, 30);
            Shape::HalfEllipse {
                z_centre: rng.grid(-40, 40),
                radial,
                axial: rng.grid(5, 30),
            }
        } else {
            let r_min = if rng.next().is_multiple_of(3) {
                0.0
            } else {
                rng.grid(0, 30)
            };
            let z_min = rng.grid(-50, 40);
            Shape::Rect {
                r_min,
                r_max: r_min + rng.grid(5, 20),
                z_min,
                z_max: z_min + rng.grid(5, 30),
            }
        };
        spec.regions.push(Region {
            tag: k as u32 + 1,
            shape,
            size: 4e-3,
        });
    }
    if rng.next().is_multiple_of(3) {
        spec.interior_arcs.push(rng.grid(10, 100));
    }
    spec
}

/// For rectangle-only specs: whether some pair shares area. Grid values differ by 5 mm or by rounding
/// only, so anything thinner than 1 µm is rounding and counts as touching (the mesher merges within
/// 1e-12 · R).
fn rectangles_overlap(spec: &MeshSpec) -> Option<bool> {
    let mut boxes = Vec::new();
    for region in &spec.regions {
        match region.shape {
            Shape::Rect {
                r_min,
                r_max,
                z_min,
                z_max,
            } => boxes.push([r_min, r_max, z_min, z_max]),
            Shape::HalfEllipse { .. } => return None,
        }
    }
    let overlap = |a: &[f64; 4], b: &[f64; 4]| {
        a[1].min(b[1]) - a[0].max(b[0]) > 1e-6 && a[3].min(b[3]) - a[2].max(b[2]) > 1e-6
    };
    Some((0..boxes.len()).any(|i| (i + 1..boxes.len()).any(|j| overlap(&boxes[i], &boxes[j]))))
}

#[test]
fn random_layouts_mesh_or_fail_with_a_validation_error() {
    let mut rng = Lcg(20_240_601);
    let (mut meshed, mut rejected) = (0, 0);
    for case in 0..300 {
        let spec = random_spec(&mut rng);
        let result = build_mesh(&spec);
        if let (Some(expected), true) = (rectangles_overlap(&spec), spec.interior_arcs.is_empty()) {
            assert_eq!(
                matches!(result, Err(MeshError::Overlap { .. })),
                expected,
                "case {case}: {spec:?}"
            );
        }
        match result {
            Ok(mesh) => {
                check_invariants(&mesh, &spec);
                for region in &spec.regions {
                    if matches!(region.shape, Shape::Rect { .. }) {
                        let exact = region.shape.exact_area();
                        let tagged: f64 = (0..mesh.triangles.len())
                            .filter(|&t| mesh.tags[t] == region.tag)
                            .map(|t| mesh.triangle_area(t))
                            .sum();
                        assert!(
                            (tagged - exact).abs() <= 1e-9 * exact,
                            "case {case}: {spec:?}"
                        );
                    }
                }
                if rectangles_overlap(&spec).is_some() && spec.interior_arcs.is_empty() {
                    // Rectangles and the half-disc meet at right angles or wider: 25° is reachable.
                    let stats = mesh.stats();
                    assert!(stats.min_angle_deg >= 25.0, "case {case}: {stats:?}");
                }
                meshed += 1;
            }
            Err(
                MeshError::Overlap { .. }
                | MeshError::ArcCrossesRegion { .. }
                | MeshError::SmallInputAngle { .. },
            ) => rejected += 1,
            Err(e) => panic!("case {case}: unexpected {e:?} for {spec:?}"),
        }
    }
    println!("meshed {meshed}, rejected {rejected}");
    // Both outcomes must be exercised for the test to mean anything.
    assert!(
        meshed > 50 && rejected > 50,
        "meshed {meshed}, rejected {rejected}"
    );
}
