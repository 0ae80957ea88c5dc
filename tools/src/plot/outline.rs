//! Region outlines of a mesh: the edges between triangles of different region tags, traced
//! along curved (second-order) edges, for drawing the core and windings over a field map.

use std::collections::HashMap;

use axicore_solver::mesh::Point;

use super::field_source::FieldSource;

/// Points per curved edge (a straight edge needs only its ends).
const CURVED_EDGE_POINTS: usize = 5;

/// One outline edge: the region tags on its two sides (smaller first) and its points.
#[derive(Debug, Clone, PartialEq)]
pub struct OutlineEdge {
    /// Region tags on the two sides, smaller first.
    pub tags: (u32, u32),
    /// Points along the edge, (r, z) in m.
    pub points: Vec<Point>,
}

/// Every edge shared by two triangles of different tags, in element order.
pub fn region_edges(src: &dyn FieldSource) -> Vec<OutlineEdge> {
    let mesh = src.mesh();
    let quadratic = mesh.order() == 2;
    // Edge (a, b), a < b → first element seen with it and the local edge index.
    let mut first: HashMap<(u32, u32), (usize, usize)> = HashMap::new();
    let mut out = Vec::new();
    for (e, tri) in mesh.triangles.iter().enumerate() {
        for k in 0..3 {
            let (a, b) = (tri[k], tri[(k + 1) % 3]);
            let key = (a.min(b), a.max(b));
            match first.get(&key) {
                None => {
                    first.insert(key, (e, k));
                }
                Some(&(f, _)) if mesh.tags[f] != mesh.tags[e] => {
                    let (ta, tb) = (mesh.tags[f], mesh.tags[e]);
                    let n = if quadratic { CURVED_EDGE_POINTS } else { 2 };
                    let points = (0..n)
                        .map(|i| {
                            let t = i as f64 / (n - 1) as f64;
                            let mut l = [0.0; 3];
                            l[k] = 1.0 - t;
                            l[(k + 1) % 3] = t;
                            src.position(e, l)
                        })
                        .collect();
                    out.push(OutlineEdge {
                        tags: (ta.min(tb), ta.max(tb)),
                        points,
                    });
                }
                Some(_) => {}
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use axicore_solver::FeMesh;

    struct Mesh(FeMesh);
    impl FieldSource for Mesh {
        fn mesh(&self) -> &FeMesh {
            &self.0
        }
        fn b_abs(&self, _: usize, _: [f64; 3], _: Point) -> f64 {
            0.0
        }
        fn flux(&self, _: usize, _: [f64; 3], _: Point) -> f64 {
            0.0
        }
    }

    #[test]
    fn only_the_edge_between_two_tags_is_an_outline() {
        // Two squares side by side, four triangles; the left square is region 1.
        let m = Mesh(FeMesh {
            nodes: vec![
                [0.0, 0.0],
                [1.0, 0.0],
                [2.0, 0.0],
                [0.0, 1.0],
                [1.0, 1.0],
                [2.0, 1.0],
            ],
            triangles: vec![[0, 1, 4], [0, 4, 3], [1, 2, 5], [1, 5, 4]],
            tags: vec![1, 1, 0, 0],
            mid: vec![],
        });
        let edges = region_edges(&m);
        assert_eq!(edges.len(), 1);
        assert_eq!(edges[0].tags, (0, 1));
        let mut pts = edges[0].points.clone();
        pts.sort_by(|a, b| a.partial_cmp(b).unwrap());
        assert_eq!(pts, vec![[1.0, 0.0], [1.0, 1.0]]);
    }
}
