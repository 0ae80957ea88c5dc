//! Tests of the hp dof numbering on hand-built meshes (the solver crate does not depend on the
//! mesher).

use super::*;
use crate::quadratic::{elevate, Outline};

/// nr × nz rectangles of 1 m × 1 m from r = 0, each split into two counter-clockwise triangles,
/// the diagonal alternating so that edges meet the elements in every orientation.
fn grid(nr: u32, nz: u32) -> FeMesh {
    let n = |i: u32, j: u32| j * (nr + 1) + i;
    let mut nodes = Vec::new();
    for j in 0..=nz {
        for i in 0..=nr {
            nodes.push([i as f64, j as f64]);
        }
    }
    let mut triangles = Vec::new();
    for j in 0..nz {
        for i in 0..nr {
            let (a, b, c, d) = (n(i, j), n(i + 1, j), n(i + 1, j + 1), n(i, j + 1));
            if (i + j) % 2 == 0 {
                triangles.extend([[a, b, c], [a, c, d]]);
            } else {
                triangles.extend([[a, b, d], [b, c, d]]);
            }
        }
    }
    FeMesh {
        tags: vec![0; triangles.len()],
        nodes,
        triangles,
        mid: Vec::new(),
    }
}

/// A fan of n triangles filling the half disc of radius 1 about the origin (centre and both
/// poles on the axis).
fn half_disc(n: u32) -> FeMesh {
    let mut nodes = vec![[0.0, 0.0]];
    for k in 0..=n {
        let th = std::f64::consts::PI * k as f64 / n as f64;
        nodes.push([th.sin().abs(), th.cos()]);
    }
    nodes[1][0] = 0.0;
    nodes[n as usize + 1][0] = 0.0;
    let triangles: Vec<[u32; 3]> = (0..n).map(|k| [0, k + 2, k + 1]).collect();
    FeMesh {
        tags: vec![0; triangles.len()],
        nodes,
        triangles,
        mid: Vec::new(),
    }
}

/// Elements sharing each edge, by brute force over the triangles.
fn sharing(mesh: &FeMesh, dofs: &HpDofs) -> Vec<Vec<(usize, usize)>> {
    let mut out = vec![Vec::new(); dofs.edges().len()];
    for (t, tri) in mesh.triangles.iter().enumerate() {
        for k in 0..3 {
            let e = dofs.edge_id(tri[k], tri[(k + 1) % 3]).unwrap();
            out[e].push((t, k));
        }
    }
    out
}

#[test]
fn uniform_degree_counts_match_vertices_edges_and_cells() {
    // V + E (p − 1) + T (p − 1)(p − 2)/2 (the hierarchical H1 space), each element's local
    // list of (p + 1)(p + 2)/2 functions = the dimension of the polynomials of degree p
    // (elementary), and Euler's V − E + T = 1 for a mesh of a disc-like domain.
    for mesh in [grid(4, 3), grid(1, 1), half_disc(7)] {
        let (v, t) = (mesh.nodes.len(), mesh.triangles.len());
        for p in 1..=8u32 {
            let dofs = HpDofs::new(&mesh, &vec![p; t]).unwrap();
            let e = dofs.edges().len();
            assert_eq!(v as i64 - e as i64 + t as i64, 1);
            let q = p as usize;
            assert_eq!(
                dofs.n_dofs(),
                v + e * (q - 1) + t * (q - 1) * (q.max(2) - 2) / 2
            );
            assert_eq!(dofs.n_vertex_dofs(), v);
            let mut seen = vec![0usize; dofs.n_dofs()];
            for el in 0..t {
                let l2g = dofs.local_to_global(el);
                assert_eq!(l2g.len(), (q + 1) * (q + 2) / 2);
                assert_eq!(dofs.element(el).len(), l2g.len());
                for &d in l2g {
                    seen[d as usize] += 1;
                }
                // The cell functions close the local list and are the element's own range.
                let cells = &l2g[dofs.element(el).cell_range()];
                assert!(cells.iter().copied().eq(dofs.cell_dofs(el)));
            }
            assert!(seen.iter().all(|&s| s > 0), "a dof no element uses");
            let cell_range = dofs.cell_dof_range();
            assert_eq!(cell_range.len(), t * cell_count(p));
            assert!(cell_range.clone().all(|d| seen[d] == 1));
        }
    }
}

#[test]
fn reversed_flags_follow_global_vertex_numbers_and_neighbours_share_edge_dofs() {
    let mesh = grid(5, 4);
    let t = mesh.triangles.len();
    let dofs = HpDofs::new(&mesh, &vec![5; t]).unwrap();
    for (el, tri) in mesh.triangles.iter().enumerate() {
        let e = dofs.element(el);
        for k in 0..3 {
            let (a, b) = (tri[k], tri[(k + 1) % 3]);
            assert_eq!(e.reversed[k], a > b);
            assert_eq!(dofs.edges()[e.edges[k] as usize], [a.min(b), a.max(b)]);
        }
        // Vertex functions first, in local vertex order.
        let l2g = dofs.local_to_global(el);
        for k in 0..3 {
            assert_eq!(Some(l2g[k]), dofs.vertex_dof(tri[k]));
        }
    }
    let mut interior = 0;
    for (e, sides) in sharing(&mesh, &dofs).iter().enumerate() {
        assert!(matches!(sides.len(), 1 | 2));
        if let [(t0, k0), (t1, k1)] = sides[..] {
            interior += 1;
            let (s0, s1) = (dofs.element(t0), dofs.element(t1));
            // Counter-clockwise neighbours run along a shared edge in opposite directions:
            // exactly one of them against the global orientation.
            assert!(s0.reversed[k0] != s1.reversed[k1]);
            // Both see the edge's dofs, in the same (degree) order.
            let l0 = &dofs.local_to_global(t0)[s0.edge_range(k0)];
            let l1 = &dofs.local_to_global(t1)[s1.edge_range(k1)];
            assert_eq!(l0, l1);
            assert!(l0.iter().copied().eq(dofs.edge_dofs(e)));
        }
    }
    // Every edge but the 2 (5 + 4) of the rectangle's outline is shared by two triangles.
    assert_eq!(interior, dofs.edges().len() - 2 * (5 + 4));
}

#[test]
fn minimum_rule_gives_shared_edges_the_lower_degree() {
    // Two triangles of a unit square, p = 2 and p = 5, sharing the diagonal 0–2.
    let mesh = FeMesh {
        nodes: vec![[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]],
        triangles: vec![[0, 1, 2], [0, 2, 3]],
        tags: vec![0, 0],
        mid: Vec::new(),
    };
    let dofs = HpDofs::new(&mesh, &[2, 5]).unwrap();
    let diag = dofs.edge_id(2, 0).unwrap();
    assert_eq!(dofs.edge_degree(diag), 2);
    let e1 = dofs.element(1);
    assert_eq!(e1.edge_degree, [2, 5, 5]);
    assert_eq!(e1.edge_range(0), 3..4);
    assert_eq!(e1.edge_range(1), 4..8);
    assert_eq!(e1.edge_range(2), 8..12);
    assert_eq!(e1.cell_range(), 12..18);
    assert_eq!(dofs.element(0).len(), 6);
    // 4 vertices + edges (1 shared + 2·1 + 2·4) + cells (0 + 6).
    assert_eq!(dofs.n_dofs(), 4 + 11 + 6);

    // Mixed degrees on a grid: every edge takes the smallest degree of its elements.
    let mesh = grid(6, 5);
    let t = mesh.triangles.len();
    let degrees: Vec<u32> = (0..t as u32).map(|k| 1 + (k * 7 + k / 3) % 8).collect();
    let dofs = HpDofs::new(&mesh, &degrees).unwrap();
    let mut total = mesh.nodes.len();
    for (e, sides) in sharing(&mesh, &dofs).iter().enumerate() {
        let min = sides.iter().map(|&(el, _)| degrees[el]).min().unwrap();
        assert_eq!(dofs.edge_degree(e), min);
        total += min as usize - 1;
        for &(el, k) in sides {
            assert_eq!(dofs.element(el).edge_degree[k], min);
        }
    }
    total += degrees.iter().map(|&p| cell_count(p)).sum::<usize>();
    assert_eq!(dofs.n_dofs(), total);
    for el in 0..t {
        assert_eq!(dofs.local_to_global(el).len(), dofs.element(el).len());
    }
}

#[test]
fn axis_edges_and_vertices_are_found_and_fixed() {
    let (nr, nz) = (3, 4);
    let mesh = grid(nr, nz);
    let p = 4;
    let dofs = HpDofs::new(&mesh, &vec![p; mesh.triangles.len()]).unwrap();
    let axis = dofs.axis_edges(&mesh);
    assert_eq!(axis.len(), nz as usize);
    for &e in &axis {
        assert!(dofs.edges()[e].iter().all(|&v| v % (nr + 1) == 0));
    }
    let vertices = dofs.axis_vertices(&mesh);
    assert_eq!(vertices, (0..=nz).map(|j| j * (nr + 1)).collect::<Vec<_>>());
    let fixed = dofs.fixed_mask(&[], &axis).unwrap();
    let n_fixed = fixed.iter().filter(|&&f| f).count();
    assert_eq!(n_fixed, (nz as usize + 1) + nz as usize * (p as usize - 1));
    // Fixing the vertices as well changes nothing: the edges fixed their ends already.
    assert_eq!(dofs.fixed_mask(&vertices, &axis).unwrap(), fixed);
    for &e in &axis {
        assert!(dofs.edge_dofs(e).all(|d| fixed[d as usize]));
    }
    // The fan touches the axis along its two spokes 0–1 and 0–(n+1).
    let fan = half_disc(6);
    let fd = HpDofs::new(&fan, &[3; 6]).unwrap();
    let spokes: Vec<[u32; 2]> = fd.axis_edges(&fan).iter().map(|&e| fd.edges()[e]).collect();
    assert_eq!(spokes, [[0, 1], [0, 7]]);
    assert!(matches!(
        dofs.fixed_mask(&[999], &[]),
        Err(SolverError::NotInSpace { what: "vertex", .. })
    ));
    assert!(matches!(
        dofs.fixed_mask(&[], &[dofs.edges().len()]),
        Err(SolverError::NotInSpace { what: "edge", .. })
    ));
}

#[test]
fn numbering_is_deterministic_and_independent_of_triangle_order_for_vertices_and_edges() {
    let mesh = grid(5, 5);
    let t = mesh.triangles.len();
    let degrees: Vec<u32> = (0..t as u32).map(|k| 2 + k % 4).collect();
    let a = HpDofs::new(&mesh, &degrees).unwrap();
    assert_eq!(a, HpDofs::new(&mesh, &degrees).unwrap());
    // The same triangles listed backwards, each starting at another corner: vertex and edge
    // numbers depend on the vertex pairs only, not on the order the triangles come in.
    let mut shuffled = mesh.clone();
    shuffled.triangles = mesh
        .triangles
        .iter()
        .rev()
        .enumerate()
        .map(|(i, tri)| [0, 1, 2].map(|k| tri[(k + i) % 3]))
        .collect();
    let rev_degrees: Vec<u32> = degrees.iter().rev().copied().collect();
    let b = HpDofs::new(&shuffled, &rev_degrees).unwrap();
    assert_eq!(a.edges(), b.edges());
    for e in 0..a.edges().len() {
        assert_eq!(a.edge_dofs(e), b.edge_dofs(e));
    }
    for v in 0..mesh.nodes.len() as u32 {
        assert_eq!(a.vertex_dof(v), b.vertex_dof(v));
    }
    assert_eq!(a.n_dofs(), b.n_dofs());
}

#[test]
fn mid_nodes_of_a_second_order_mesh_are_ignored() {
    let first = half_disc(8);
    let outline = Outline::Ellipse {
        centre_z: 0.0,
        semi_r: 1.0,
        semi_z: 1.0,
    };
    let (second, added) = elevate(&first, &[outline], 5.0);
    let degrees = vec![3; first.triangles.len()];
    let (a, b) = (
        HpDofs::new(&first, &degrees).unwrap(),
        HpDofs::new(&second, &degrees).unwrap(),
    );
    assert_eq!(a.n_dofs(), b.n_dofs());
    assert_eq!(a.edges(), b.edges());
    for k in 0..added.len() {
        assert_eq!(b.vertex_dof((first.nodes.len() + k) as u32), None);
    }
}

#[test]
fn bad_degrees_and_edges_of_three_triangles_are_refused() {
    let mesh = grid(1, 1);
    for degrees in [vec![0, 2], vec![2], vec![2, MAX_DEGREE + 1], vec![2, 2, 2]] {
        assert!(matches!(
            HpDofs::new(&mesh, &degrees),
            Err(SolverError::BadDegree { .. })
        ));
    }
    // Three triangles on the edge 0–1 (two of them overlapping).
    let mesh = FeMesh {
        nodes: vec![[0.0, 0.0], [1.0, 0.0], [0.5, 1.0], [0.5, -1.0], [0.3, 2.0]],
        triangles: vec![[0, 1, 2], [1, 0, 3], [0, 1, 4]],
        tags: vec![0; 3],
        mid: Vec::new(),
    };
    assert!(matches!(
        HpDofs::new(&mesh, &[2; 3]),
        Err(SolverError::NonManifoldEdge {
            a: 0,
            b: 1,
            count: 3
        })
    ));
}
