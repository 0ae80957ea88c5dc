//! Tests of the geometry maps: exactness of the affine map, curved edges exactly on their
//! curves, areas and volumes of revolution against closed forms, Jacobian against differences.

use super::*;
use std::f64::consts::PI;

/// Gauss–Legendre nodes and weights on [0, 1] (Newton on P_n from the Chebyshev guess; the
/// three-term recurrence of Legendre polynomials, Abramowitz & Stegun 22.7.10 [from memory]).
fn gauss_01(n: usize) -> Vec<(f64, f64)> {
    (0..n)
        .map(|i| {
            let mut x = (PI * (i as f64 + 0.75) / (n as f64 + 0.5)).cos();
            let mut dp = 1.0;
            for _ in 0..100 {
                let (mut p0, mut p1) = (1.0, x);
                for k in 2..=n {
                    let p2 = ((2 * k - 1) as f64 * x * p1 - (k - 1) as f64 * p0) / k as f64;
                    p0 = p1;
                    p1 = p2;
                }
                dp = n as f64 * (x * p1 - p0) / (x * x - 1.0);
                let step = p1 / dp;
                x -= step;
                if step.abs() < 1e-16 {
                    break;
                }
            }
            let w = 2.0 / ((1.0 - x * x) * dp * dp);
            (0.5 * (1.0 + x), 0.5 * w)
        })
        .collect()
}

/// ∫ f(x) dA over the element, by a collapsed tensor Gauss rule (ξ = u, η = (1 − u) v): with
/// 24 points per direction it integrates the smooth (trigonometric) integrands of blended maps
/// to rounding.
fn integrate(map: &ElementMap, f: impl Fn(Point) -> f64) -> f64 {
    let g = gauss_01(24);
    let mut s = 0.0;
    for &(u, wu) in &g {
        for &(v, wv) in &g {
            let (xi, eta) = (u, (1.0 - u) * v);
            s += wu * wv * (1.0 - u) * map.jacobian(xi, eta).det() * f(map.position(xi, eta));
        }
    }
    s
}

/// Fan of triangles (centre, P_k, P_k+1) with P_k = the curve point at `angles[k]`, its arc
/// declared curved; triangle k has its vertices rotated by k so the arc is local edge 1, 0,
/// 2, ... in turn. Points at r = 0 within rounding are put exactly on the axis, as the mesher
/// does.
fn fan(curve: Curve, centre: Point, angles: &[f64]) -> Vec<ElementMap> {
    let on = |th: f64| {
        let mut p = curve.point(th);
        if p[0].abs() < 1e-15 {
            p[0] = 0.0;
        }
        p
    };
    (0..angles.len() - 1)
        .map(|k| {
            let v = [centre, on(angles[k]), on(angles[k + 1])];
            let curves = [None, Some(curve), None];
            let s = k % 3;
            let rot = |i: usize| (i + s) % 3;
            ElementMap::new(
                [v[rot(0)], v[rot(1)], v[rot(2)]],
                [curves[rot(0)], curves[rot(1)], curves[rot(2)]],
                k,
            )
            .unwrap()
        })
        .collect()
}

fn half_turn(n: usize) -> Vec<f64> {
    (0..=n)
        .map(|k| -0.5 * PI + PI * k as f64 / n as f64)
        .collect()
}

/// Points of local edge k at parameter t (from local vertex k to (k + 1) % 3).
fn on_edge(k: usize, t: f64) -> (f64, f64) {
    match k {
        0 => (t, 0.0),
        1 => (1.0 - t, t),
        _ => (0.0, 1.0 - t),
    }
}

fn blended(map: &ElementMap) -> &Blended {
    match map {
        ElementMap::Blended(b) => b,
        ElementMap::Affine(_) => panic!("expected a blended map"),
    }
}

#[test]
fn affine_map_reproduces_linear_interpolation_exactly() {
    let c = [[0.1, -0.3], [0.7, 0.2], [0.25, 0.9]];
    let map = ElementMap::new(c, [None; 3], 0).unwrap();
    assert!(map.is_affine());
    for (k, &(xi, eta)) in [(0.0, 0.0), (1.0, 0.0), (0.0, 1.0)].iter().enumerate() {
        assert_eq!(map.position(xi, eta), c[k]);
    }
    for &(xi, eta) in &[(0.2, 0.3), (0.6, 0.1), (1.0 / 3.0, 1.0 / 3.0)] {
        let l = [1.0 - xi - eta, xi, eta];
        let x = map.position(xi, eta);
        for i in 0..2 {
            let want = l[0] * c[0][i] + l[1] * c[1][i] + l[2] * c[2][i];
            assert!((x[i] - want).abs() < 1e-16, "{x:?}");
        }
    }
    let j = map.jacobian(0.3, 0.3);
    let area = 0.5
        * ((c[1][0] - c[0][0]) * (c[2][1] - c[0][1]) - (c[2][0] - c[0][0]) * (c[1][1] - c[0][1]));
    assert!((j.det() - 2.0 * area).abs() < 1e-16);
    // The gradient of the linear function f = 3r − 2z, from its reference gradient.
    let f = |p: Point| 3.0 * p[0] - 2.0 * p[1];
    let g_ref = [f(c[1]) - f(c[0]), f(c[2]) - f(c[0])];
    let g = j.physical_gradient(g_ref);
    assert!(
        (g[0] - 3.0).abs() < 1e-14 && (g[1] + 2.0).abs() < 1e-14,
        "{g:?}"
    );
    // Clockwise or degenerate triangles are refused.
    assert!(matches!(
        ElementMap::new([c[0], c[2], c[1]], [None; 3], 4),
        Err(SolverError::FoldedElement { element: 4, .. })
    ));
}

#[test]
fn curved_edges_lie_exactly_on_circles_and_ellipses_and_straight_edges_stay_straight() {
    let curves = [
        Curve::Circle {
            centre: [0.0, 0.0],
            radius: 0.035,
        },
        // Off the axis: the circles of a torus-like outline are not excluded.
        Curve::Circle {
            centre: [0.4, -0.1],
            radius: 0.15,
        },
        // A prolate spheroid (axis ratio 5).
        Curve::Ellipse {
            centre: [0.0, 0.02],
            semi_r: 0.004,
            semi_z: 0.02,
        },
    ];
    for curve in curves {
        let (c, _, _) = curve.axes();
        for map in fan(curve, c, &[-1.2, -0.5, 0.1, 0.8, 1.3]) {
            let b = blended(&map);
            for k in 0..3 {
                let (v0, v1) = (b.corners[k], b.corners[(k + 1) % 3]);
                let len = (v1[0] - v0[0]).hypot(v1[1] - v0[1]);
                for i in 0..=20 {
                    let t = i as f64 / 20.0;
                    let (xi, eta) = on_edge(k, t);
                    let x = map.position(xi, eta);
                    if b.arcs[k].is_some() {
                        // Distance to the curve (level over its gradient, first order),
                        // relative to the size of the coordinates, which sets their rounding.
                        let (c, a, b) = curve.axes();
                        let grad =
                            (2.0 * (x[0] - c[0]) / (a * a)).hypot(2.0 * (x[1] - c[1]) / (b * b));
                        let scale = x[0].abs().max(x[1].abs()).max(a).max(b);
                        let off = curve.level(x) / grad / scale;
                        assert!(off.abs() < 1e-15, "edge {k} t {t}: {off:e}");
                    } else {
                        // Straight and linearly parametrised: the chord point at t.
                        let chord = [v0[0] + t * (v1[0] - v0[0]), v0[1] + t * (v1[1] - v0[1])];
                        let off = (x[0] - chord[0]).hypot(x[1] - chord[1]);
                        assert!(off < 1e-15 * len, "edge {k} t {t}: {off:e}");
                    }
                }
            }
        }
    }
}

#[test]
fn quarter_disc_area_and_ball_volume_match_closed_forms() {
    // Elementary closed forms: quarter disc π R²/4; ball of radius R, the half disc revolved
    // about the axis, 4/3 π R³ (Archimedes).
    let r = 0.035;
    let circle = Curve::Circle {
        centre: [0.0, 0.0],
        radius: r,
    };
    let maps = fan(circle, [0.0, 0.0], &half_turn(4));
    let area: f64 = maps[2..].iter().map(|m| integrate(m, |_| 1.0)).sum();
    let exact_area = PI * r * r / 4.0;
    assert!(
        (area / exact_area - 1.0).abs() < 1e-13,
        "area {area} vs {exact_area}"
    );
    let volume: f64 = maps.iter().map(|m| integrate(m, |x| 2.0 * PI * x[0])).sum();
    let exact_volume = 4.0 / 3.0 * PI * r.powi(3);
    assert!(
        (volume / exact_volume - 1.0).abs() < 1e-13,
        "volume {volume} vs {exact_volume}"
    );
}

#[test]
fn quarter_ellipse_area_and_spheroid_volume_match_closed_forms() {
    // Quarter ellipse π a c / 4; spheroid of semi-axes a (radial) and c (axial) 4/3 π a² c
    // (elementary: the ball scaled along z).
    for (a, c) in [(0.004, 0.02), (0.03, 0.01)] {
        let e = Curve::Ellipse {
            centre: [0.0, 0.05],
            semi_r: a,
            semi_z: c,
        };
        let maps = fan(e, [0.0, 0.05], &half_turn(6));
        let area: f64 = maps[3..].iter().map(|m| integrate(m, |_| 1.0)).sum();
        let exact_area = PI * a * c / 4.0;
        assert!(
            (area / exact_area - 1.0).abs() < 1e-13,
            "{area} vs {exact_area}"
        );
        let volume: f64 = maps.iter().map(|m| integrate(m, |x| 2.0 * PI * x[0])).sum();
        let exact_volume = 4.0 / 3.0 * PI * a * a * c;
        assert!(
            (volume / exact_volume - 1.0).abs() < 1e-13,
            "{volume} vs {exact_volume}"
        );
    }
}

#[test]
fn off_axis_disc_revolves_to_the_pappus_torus_volume() {
    // Pappus's centroid theorem: a disc of radius R whose centre is at radius r0 sweeps the
    // volume 2π r0 · π R².
    let (r0, rr) = (0.3, 0.1);
    let circle = Curve::Circle {
        centre: [r0, 0.2],
        radius: rr,
    };
    let angles: Vec<f64> = (0..=7).map(|k| 2.0 * PI * k as f64 / 7.0 - 0.3).collect();
    let maps = fan(circle, [r0, 0.2], &angles);
    let volume: f64 = maps.iter().map(|m| integrate(m, |x| 2.0 * PI * x[0])).sum();
    let exact = 2.0 * PI * r0 * PI * rr * rr;
    assert!((volume / exact - 1.0).abs() < 1e-13, "{volume} vs {exact}");
}

#[test]
fn triangle_with_two_curved_edges_covers_the_circular_segment() {
    // Quarter disc = straight triangle (O, P0, P2) + the segment cut off by the chord P0–P2,
    // meshed as one triangle (P0, P1, P2) whose edges P0–P1 and P1–P2 follow the circle.
    // Segment area R²/2 (α − sin α) for the chord's angle α (elementary).
    let r = 2.0;
    let circle = Curve::Circle {
        centre: [0.0, 0.0],
        radius: r,
    };
    let (p0, p1, p2) = (circle.point(0.0), circle.point(0.6), [0.0, r]);
    let seg = ElementMap::new([p0, p1, p2], [Some(circle), Some(circle), None], 0).unwrap();
    let tri = ElementMap::new([[0.0, 0.0], p0, p2], [None; 3], 1).unwrap();
    let area = integrate(&seg, |_| 1.0);
    let alpha = 0.5 * PI;
    let exact = 0.5 * r * r * (alpha - alpha.sin());
    assert!((area / exact - 1.0).abs() < 1e-13, "{area} vs {exact}");
    let total = area + integrate(&tri, |_| 1.0);
    assert!((total / (PI * r * r / 4.0) - 1.0).abs() < 1e-13);
    // Both curved edges exact, the chord straight.
    for i in 0..=10 {
        let t = i as f64 / 10.0;
        for k in 0..2 {
            let (xi, eta) = on_edge(k, t);
            assert!(circle.level(seg.position(xi, eta)).abs() < 1e-15);
        }
        let x = seg.position(0.0, 1.0 - t);
        assert!((x[0] + x[1] - r).abs() < 1e-15 * r, "{x:?}");
    }
}

#[test]
fn jacobian_matches_central_differences_of_the_position() {
    let e = Curve::Ellipse {
        centre: [0.0, 0.0],
        semi_r: 1.0,
        semi_z: 2.5,
    };
    let (p0, p1, p2) = (e.point(-0.4), e.point(0.3), e.point(0.9));
    let maps = [
        ElementMap::new([p0, p1, p2], [Some(e), Some(e), None], 0).unwrap(),
        ElementMap::new([[0.0, 0.0], p0, p1], [None, Some(e), None], 1).unwrap(),
    ];
    let h = 1e-6;
    for map in &maps {
        for &(xi, eta) in &[(0.2, 0.2), (0.05, 0.9), (0.7, 0.01), (1.0 / 3.0, 1.0 / 3.0)] {
            let j = map.jacobian(xi, eta);
            let dx = [map.position(xi + h, eta), map.position(xi - h, eta)];
            let dy = [map.position(xi, eta + h), map.position(xi, eta - h)];
            for i in 0..2 {
                let fd = [
                    (dx[0][i] - dx[1][i]) / (2.0 * h),
                    (dy[0][i] - dy[1][i]) / (2.0 * h),
                ];
                for c in 0..2 {
                    assert!((j.m[i][c] - fd[c]).abs() < 1e-8, "{:?} vs {fd:?}", j.m[i]);
                }
            }
            // The inverse is one.
            let inv = j.inverse();
            for a in 0..2 {
                for b in 0..2 {
                    let p: f64 = (0..2).map(|c| j.m[a][c] * inv[c][b]).sum();
                    assert!((p - if a == b { 1.0 } else { 0.0 }).abs() < 1e-14);
                }
            }
        }
    }
}

#[test]
fn an_arc_bulging_past_the_opposite_vertex_is_refused_as_folded() {
    // The arc from −30° to 30° of the unit circle reaches r = 1 from its chord at r = 0.866; a
    // vertex at r = 0.95 in front of it lies inside the bulge, so the element turns inside out.
    // At r = 2 the element is sound (interior angles of about 36° at the arc's ends).
    let circle = Curve::Circle {
        centre: [0.0, 0.0],
        radius: 1.0,
    };
    let (a, b) = (
        circle.point((-30f64).to_radians()),
        circle.point(30f64.to_radians()),
    );
    let curves = [None, None, Some(circle)];
    assert!(matches!(
        ElementMap::new([a, [0.95, 0.0], b], curves, 11),
        Err(SolverError::FoldedElement { element: 11, .. })
    ));
    assert!(ElementMap::new([a, [2.0, 0.0], b], curves, 11).is_ok());
}

#[test]
fn tip_elements_of_a_slender_spheroid_map_without_folding() {
    // The arcs are parametrised by the angle, not arc length, and near the tip of a slender
    // spheroid (axis ratio 100, tip curvature radius a²/c = 0.01) the speed along an arc
    // changes by orders of magnitude. Boundary elements from the tip outwards, edges from
    // 1e-3 to 15 (0.001 to 0.4 rad of angle), the inner vertex on the chord's inward normal
    // at 0.3 or 0.8 chord lengths, must still map one-to-one and keep the edge on the curve.
    let (a, c) = (1.0, 100.0);
    let e = Curve::Ellipse {
        centre: [0.0, 0.0],
        semi_r: a,
        semi_z: c,
    };
    for dth in [0.001, 0.01, 0.1, 0.4] {
        for start in [0.0, 0.05, 0.2] {
            let mut p0 = e.point(0.5 * PI - start);
            if start == 0.0 {
                p0[0] = 0.0; // the tip is on the axis
            }
            let p1 = e.point(0.5 * PI - start - dth);
            let (dx, dz) = (p1[0] - p0[0], p1[1] - p0[1]);
            let len = dx.hypot(dz);
            // Going down the flank from p0 to p1, the inward normal (toward the axis) is on
            // the right: (dz, −dx)/len has r < 0.
            let n = [dz / len, -dx / len];
            for depth in [0.3, 0.8] {
                let m = [0.5 * (p0[0] + p1[0]), 0.5 * (p0[1] + p1[1])];
                let q = [
                    (m[0] + depth * len * n[0]).max(0.0),
                    m[1] + depth * len * n[1],
                ];
                let map = ElementMap::new([p1, p0, q], [Some(e), None, None], 0)
                    .unwrap_or_else(|err| panic!("span {dth} from {start}: {err}"));
                let x = map.position(0.5, 0.0);
                assert!(e.level(x).abs() < 1e-14, "{}", e.level(x));
            }
        }
    }
}
