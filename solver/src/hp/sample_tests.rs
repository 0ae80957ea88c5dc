use std::collections::BTreeMap;
use std::f64::consts::PI;

use super::*;
use crate::hp::curve::Curve;
use crate::hp::curved_edges::CurvedEdge;
use crate::material::Material;
use crate::mesh::FeMesh;
use crate::problem::{Problem, RegionProps};

/// Radius of the inner region (tag 1) and of the outer circle, m.
const A_IN: f64 = 0.5;
const R_OUT: f64 = 1.0;

/// The half disc ρ < 1 (r ≥ 0): `n` sectors, each a triangle of the inner fan ρ < 0.5 (tag 1,
/// linear μr 50) and two of the ring outside it (tag 0); both circles exact curved edges (the
/// inner one declared from both sides), vertices equally spaced in angle. Axis and outer circle
/// fixed; a uniform background B0 drives the field.
fn half_disc(n: usize, degrees: impl Fn(usize) -> u32) -> HpModel {
    let angle = |i: usize| -PI / 2.0 + PI * i as f64 / n as f64;
    let mut nodes = vec![[0.0, 0.0]];
    for rho in [A_IN, R_OUT] {
        for i in 0..=n {
            let t = angle(i);
            let r = if i == 0 || i == n { 0.0 } else { rho * t.cos() };
            nodes.push([r, rho * t.sin()]);
        }
    }
    let inn = |i: usize| (1 + i) as u32;
    let out = |i: usize| (2 + n + i) as u32;
    let (mut triangles, mut tags, mut curved) = (Vec::new(), Vec::new(), Vec::new());
    let mut add = |tri: [u32; 3], tag: u32, edge: usize, radius: f64| {
        curved.push(CurvedEdge {
            element: triangles.len(),
            local_edge: edge,
            curve: Curve::Circle {
                centre: [0.0, 0.0],
                radius,
            },
        });
        triangles.push(tri);
        tags.push(tag);
    };
    for i in 0..n {
        add([0, inn(i), inn(i + 1)], 1, 1, A_IN);
        add([inn(i), out(i), out(i + 1)], 0, 1, R_OUT);
        add([inn(i), out(i + 1), inn(i + 1)], 0, 2, A_IN);
    }
    let fixed = nodes
        .iter()
        .enumerate()
        .filter(|(_, p)| p[0] == 0.0 || (p[0].hypot(p[1]) - R_OUT).abs() < 1e-12)
        .map(|(k, _)| (k as u32, 0.0))
        .collect();
    let core = RegionProps {
        material: Material::Linear { mu_r: 50.0 },
        current_density: 0.0,
        polarization: 0.0,
    };
    let nt = triangles.len();
    let problem = Problem {
        mesh: FeMesh {
            nodes,
            triangles,
            tags,
            mid: Vec::new(),
        },
        regions: vec![RegionProps::air(), core],
        fixed,
        background_b: 1e-3,
        exact_exterior: None,
    };
    let degrees: Vec<u32> = (0..nt).map(degrees).collect();
    HpModel::new(problem, &degrees, curved).unwrap()
}

fn signed_area(s: &SampledField, c: usize) -> f64 {
    let [a, b, d] = s.triangles[c].map(|i| s.points[i as usize]);
    0.5 * ((b[0] - a[0]) * (d[1] - a[1]) - (d[0] - a[0]) * (b[1] - a[1]))
}

#[test]
fn sampled_a_is_the_models_own_value_from_every_element_holding_the_point() {
    // Mixed degrees, so neighbours of different p share lattice points.
    let m = half_disc(4, |t| [2, 4, 3][t % 3]);
    let sol = m.solve_linear().unwrap();
    let s = m.sample(&sol, MIN_DIVISIONS).unwrap();
    assert_eq!(s.divisions, 4, "k = p_max");
    let scale = s.a.iter().fold(0.0f64, |x, a| x.max(a.abs()));
    assert!(scale > 0.0);
    let loc = m.locator();
    for (i, &x) in s.points.iter().enumerate() {
        let holding = loc.containing(&m.mesh, &m.maps, x);
        assert!(!holding.is_empty(), "point {i} {x:?} outside the mesh");
        for l in holding {
            let v = m.value_in(&sol, l, x[0]).unwrap();
            assert!(
                (v.a - s.a[i]).abs() <= 1e-12 * scale,
                "point {i} {x:?}, element {}: {} vs {}",
                l.element,
                v.a,
                s.a[i]
            );
        }
    }
    // B of each sub-triangle is its element's value at the mapped reference centroid, read
    // back by the located route; that point lies inside the (chord) sub-triangle.
    for c in 0..s.triangles.len() {
        let t = s.element[c] as usize;
        let x = s.at[c];
        let v = m.value_at(&sol, &loc, x).unwrap();
        assert_eq!(
            v.located.element, t,
            "cell {c}: centroid in another element"
        );
        let bs = v.b[0].hypot(v.b[1]);
        let db = (v.b[0] - s.b[c][0]).hypot(v.b[1] - s.b[c][1]);
        assert!(db <= 1e-10 * bs, "cell {c}: {:?} vs {:?}", v.b, s.b[c]);
        let [a, b, d] = s.triangles[c].map(|i| s.points[i as usize]);
        let l = crate::locate::barycentric([a, b, d], x);
        assert!(l.iter().all(|&l| l > 0.0), "cell {c}: {l:?}");
        assert_eq!(s.tag[c], m.mesh.tags[t]);
        assert_eq!(s.degree[c], m.dofs.element(t).degree);
        let want = if s.tag[c] == 1 { 50.0 } else { 1.0 };
        assert!((s.mu_r[c] - want).abs() < 1e-12 * want, "{}", s.mu_r[c]);
        let nu = 1.0 / (crate::constants::MU0 * want);
        assert!((s.h[c][1] - nu * s.b[c][1]).abs() <= 1e-12 * nu * bs);
    }
}

#[test]
fn sub_mesh_is_conforming_with_every_interior_sub_edge_shared_by_two_sub_triangles() {
    let m = half_disc(5, |t| [2, 3, 5][t % 3]);
    let sol = m.solve_linear().unwrap();
    let s = m.sample(&sol, MIN_DIVISIONS).unwrap();
    let k = s.divisions;
    assert_eq!(k, 5);
    assert_eq!(s.triangles.len(), m.mesh.triangles.len() * k * k);
    let mut edges: BTreeMap<[u32; 2], usize> = BTreeMap::new();
    for (c, tri) in s.triangles.iter().enumerate() {
        assert!(signed_area(&s, c) > 0.0, "cell {c} folded or clockwise");
        for e in 0..3 {
            let (a, b) = (tri[e], tri[(e + 1) % 3]);
            *edges.entry([a.min(b), a.max(b)]).or_default() += 1;
        }
    }
    let on_boundary = |p: Point| p[0] == 0.0 || (p[0].hypot(p[1]) - R_OUT).abs() < 1e-12;
    for (e, &count) in &edges {
        let [a, b] = e.map(|i| s.points[i as usize]);
        match count {
            2 => {}
            1 => assert!(
                on_boundary(a) && on_boundary(b),
                "open sub-edge {a:?}–{b:?} inside the domain"
            ),
            _ => panic!("sub-edge {a:?}–{b:?} in {count} sub-triangles"),
        }
    }
    // Euler's formula of a triangulated disc, V − E + F = 1: no duplicated points either.
    let euler = s.points.len() as i64 - edges.len() as i64 + s.triangles.len() as i64;
    assert_eq!(euler, 1);
    // Every point is used.
    let mut used = vec![false; s.points.len()];
    for tri in &s.triangles {
        for &i in tri {
            used[i as usize] = true;
        }
    }
    assert!(used.iter().all(|&u| u));
}

#[test]
fn sub_triangles_cover_the_exact_half_disc_and_its_sphere_as_k_grows() {
    // The outline of the sub-mesh is the axis and N = n k chords of the unit circle at equal
    // angles θ = π/N (the blended map puts edge points on the arc, linear in its angle). So
    // the sub-triangles must add up to that polygon: area (N/2) R² sin θ (a fan of triangles
    // of area ½ R² sin θ, elementary geometry), and revolved about the axis, by Pappus's
    // centroid theorem (volume = 2π r̄ A, from memory), Σ 2π (r_i + r_{i+1})/3 · ½ R² sin θ.
    // Both tend to the exact half disc π R²/2 and sphere 4π R³/3 like θ²/6.
    let n = 4;
    let m = half_disc(n, |_| 2);
    let sol = m.solve_linear().unwrap();
    let mut last = f64::INFINITY;
    for min in [2, 4, 8, 16, 32] {
        let s = m.sample(&sol, min).unwrap();
        assert_eq!(s.divisions, min);
        let (mut area, mut volume) = (0.0, 0.0);
        for c in 0..s.triangles.len() {
            let a = signed_area(&s, c);
            let rbar = s.triangles[c]
                .iter()
                .map(|&i| s.points[i as usize][0])
                .sum::<f64>()
                / 3.0;
            area += a;
            volume += 2.0 * PI * rbar * a;
        }
        let big_n = n * min;
        let theta = PI / big_n as f64;
        let poly_area = 0.5 * big_n as f64 * R_OUT * R_OUT * theta.sin();
        let poly_volume: f64 = (0..big_n)
            .map(|i| {
                let r = |i: usize| R_OUT * (-PI / 2.0 + i as f64 * theta).cos();
                2.0 * PI * (r(i) + r(i + 1)) / 3.0 * 0.5 * R_OUT * R_OUT * theta.sin()
            })
            .sum();
        assert!(
            (area - poly_area).abs() < 1e-13,
            "k = {min}: {area} vs {poly_area}"
        );
        assert!((volume - poly_volume).abs() < 1e-13, "k = {min}");
        let err_area = (PI / 2.0 - area) / (PI / 2.0);
        let err_volume = (4.0 / 3.0 * PI - volume) / (4.0 / 3.0 * PI);
        // Chords lie inside the circle; both deficits shrink like θ²/6 (within a factor 2).
        assert!(
            err_area > 0.0 && err_area < theta * theta / 6.0 * 1.01,
            "{err_area}"
        );
        assert!(
            err_volume > 0.0 && err_volume < theta * theta / 3.0,
            "{err_volume}"
        );
        assert!(err_area < last / 3.9, "{err_area} after {last}");
        last = err_area;
    }
    // At k = 32 (N = 128) the half disc is covered to 1e-4 of its area.
    assert!(last < 1.01e-4, "{last}");
}
