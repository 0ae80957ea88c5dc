//! The 6-node (second-order) triangle, isoparametric.
//!
//! ```text
//!   z
//!   ^     2
//!   |     | \
//!   |     5   4
//!   |     |     \
//!   |     0 --3-- 1
//!   +-----------------> r
//! ```
//! Corner shape functions N_i = λ_i(2λ_i − 1), mid-edge ones N_{3+k} = 4 λ_k λ_{k+1} (edge k
//! runs from corner k to corner k + 1). The same functions map the reference triangle onto the
//! element, so a mid-edge node moved onto a circle or an ellipse gives a curved edge that
//! follows it to O(h³) (isoparametric elements; Zienkiewicz & Taylor, *The Finite Element
//! Method*, vol. 1, §9).
//!
//! Air nodes away from the axis use the flux basis N_i·r_i/r (blended near the axis, see
//! [`super::tri3`]) as at first order: rA quadratic holds both the uniform field and the 1/r
//! potential beside a slender core exactly, where plain quadratic A left the built-in search
//! coil 1 % low. Magnetic elements use the plain basis.

/// Barycentric coordinates of the six nodes (corners, then mid-edge nodes).
pub const NODES: [[f64; 3]; 6] = [
    [1.0, 0.0, 0.0],
    [0.0, 1.0, 0.0],
    [0.0, 0.0, 1.0],
    [0.5, 0.5, 0.0],
    [0.0, 0.5, 0.5],
    [0.5, 0.0, 0.5],
];

/// Shape function values N_i at barycentric coordinates `l`.
#[inline]
pub fn values(l: [f64; 3]) -> [f64; 6] {
    let [l0, l1, l2] = l;
    [
        l0 * (2.0 * l0 - 1.0),
        l1 * (2.0 * l1 - 1.0),
        l2 * (2.0 * l2 - 1.0),
        4.0 * l0 * l1,
        4.0 * l1 * l2,
        4.0 * l2 * l0,
    ]
}

/// Reference gradients (∂N_i/∂ξ, ∂N_i/∂η) at barycentric `l`, with ξ = λ1, η = λ2.
#[inline]
pub fn reference_gradients(l: [f64; 3]) -> [[f64; 2]; 6] {
    let [l0, l1, l2] = l;
    let d0 = 4.0 * l0 - 1.0;
    [
        [-d0, -d0],
        [4.0 * l1 - 1.0, 0.0],
        [0.0, 4.0 * l2 - 1.0],
        [4.0 * (l0 - l1), -4.0 * l1],
        [4.0 * l2, 4.0 * l1],
        [-4.0 * l2, 4.0 * (l0 - l2)],
    ]
}

/// Jacobian inverse ∂(ξ, η)/∂(r, z) (rows ξ, η) and determinant of the map through the six
/// nodes `p` at barycentric `l`.
#[inline]
pub fn inverse_jacobian(p: &[[f64; 2]; 6], l: [f64; 3]) -> ([[f64; 2]; 2], f64) {
    let g = reference_gradients(l);
    let (mut r_xi, mut r_eta, mut z_xi, mut z_eta) = (0.0, 0.0, 0.0, 0.0);
    for i in 0..6 {
        r_xi += p[i][0] * g[i][0];
        r_eta += p[i][0] * g[i][1];
        z_xi += p[i][1] * g[i][0];
        z_eta += p[i][1] * g[i][1];
    }
    let det = r_xi * z_eta - r_eta * z_xi;
    (
        [[z_eta / det, -r_eta / det], [-z_xi / det, r_xi / det]],
        det,
    )
}

/// Physical point of barycentric `l` under the map through the six nodes `p`.
#[inline]
pub fn position(p: &[[f64; 2]; 6], l: [f64; 3]) -> [f64; 2] {
    let n = values(l);
    let mut x = [0.0; 2];
    for i in 0..6 {
        x[0] += n[i] * p[i][0];
        x[1] += n[i] * p[i][1];
    }
    x
}

/// Physical gradients (∂N_i/∂r, ∂N_i/∂z) from reference ones and the inverse Jacobian.
#[inline]
pub fn physical_gradient(g: [f64; 2], jinv: &[[f64; 2]; 2]) -> [f64; 2] {
    [
        g[0] * jinv[0][0] + g[1] * jinv[1][0],
        g[0] * jinv[0][1] + g[1] * jinv[1][1],
    ]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shape_functions_are_nodal_and_a_partition_of_unity() {
        for (j, l) in NODES.iter().enumerate() {
            let n = values(*l);
            for (i, v) in n.iter().enumerate() {
                let want = if i == j { 1.0 } else { 0.0 };
                assert!((v - want).abs() < 1e-15);
            }
        }
        let n = values([0.2, 0.3, 0.5]);
        assert!((n.iter().sum::<f64>() - 1.0).abs() < 1e-15);
    }

    #[test]
    fn reference_gradients_match_finite_differences() {
        let l = [0.2, 0.3, 0.5];
        let h = 1e-6;
        let g = reference_gradients(l);
        let f = |xi: f64, eta: f64| values([1.0 - xi - eta, xi, eta]);
        for i in 0..6 {
            let dxi = (f(l[1] + h, l[2])[i] - f(l[1] - h, l[2])[i]) / (2.0 * h);
            let deta = (f(l[1], l[2] + h)[i] - f(l[1], l[2] - h)[i]) / (2.0 * h);
            assert!((g[i][0] - dxi).abs() < 1e-8 && (g[i][1] - deta).abs() < 1e-8);
        }
    }

    #[test]
    fn a_quadratic_function_is_reproduced_with_its_gradient_and_a_curved_map_stays_valid() {
        // Curved element: mid node 4 pushed outwards. f = 1 + 2r − z + r² − 3rz + z².
        let mut p = [
            [1.0, 0.0],
            [2.0, 0.2],
            [1.2, 1.1],
            [0.0; 2],
            [0.0; 2],
            [0.0; 2],
        ];
        for k in 0..3 {
            let (a, b) = (p[k], p[(k + 1) % 3]);
            p[3 + k] = [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])];
        }
        p[4][0] += 0.05;
        let f =
            |x: [f64; 2]| 1.0 + 2.0 * x[0] - x[1] + x[0] * x[0] - 3.0 * x[0] * x[1] + x[1] * x[1];
        let grad = |x: [f64; 2]| {
            [
                2.0 + 2.0 * x[0] - 3.0 * x[1],
                -1.0 - 3.0 * x[0] + 2.0 * x[1],
            ]
        };
        // A quadratic in (r, z) is not in the isoparametric space of a curved element, but a
        // function defined through the map is: check the map's own consistency instead, with
        // f evaluated at mapped points and nodal values at the nodes on a straight element.
        let mut straight = p;
        straight[4] = [0.5 * (p[1][0] + p[2][0]), 0.5 * (p[1][1] + p[2][1])];
        let v = straight.map(f);
        let l = [0.25, 0.35, 0.4];
        let x = position(&straight, l);
        let n = values(l);
        let val: f64 = (0..6).map(|i| n[i] * v[i]).sum();
        assert!((val - f(x)).abs() < 1e-12);
        let (jinv, det) = inverse_jacobian(&straight, l);
        assert!(det > 0.0);
        let g = reference_gradients(l);
        let mut d = [0.0; 2];
        for i in 0..6 {
            let gi = physical_gradient(g[i], &jinv);
            d[0] += v[i] * gi[0];
            d[1] += v[i] * gi[1];
        }
        let want = grad(x);
        assert!((d[0] - want[0]).abs() < 1e-11 && (d[1] - want[1]).abs() < 1e-11);
        // The curved map still has a positive Jacobian and passes through its mid node.
        let (_, det_c) = inverse_jacobian(&p, [0.0, 0.5, 0.5]);
        assert!(det_c > 0.0);
        let m = position(&p, [0.0, 0.5, 0.5]);
        assert!((m[0] - p[4][0]).abs() < 1e-15 && (m[1] - p[4][1]).abs() < 1e-15);
    }
}
