//! Points of a map written per region: a node shared by several regions gets one copy in each.
//!
//! B is discontinuous across a material interface (its tangential part jumps by the
//! permeability ratio), and so are H, μr and the saturation ratio. A single value per node on
//! a core surface would blend two different fields. With one copy of the node per region, each
//! region's cells interpolate that region's own recovered field up to its boundary.

use crate::mesh::{FeMesh, Point};

/// The written points and the cells' connectivity into them.
#[derive(Debug, Clone, PartialEq)]
pub struct RegionPoints {
    /// Mesh node of each written point.
    pub node: Vec<u32>,
    /// Region tag of each written point.
    pub tag: Vec<u32>,
    /// An element of that region holding the node (the lowest-numbered one), for evaluation.
    pub element: Vec<u32>,
    /// Written point ids of every element's nodes (3 or 6 per element, in element order).
    pub connectivity: Vec<u32>,
}

impl RegionPoints {
    /// Copies every node once per region that uses it: points ordered by region tag, then by
    /// node number (deterministic, independent of threads).
    pub fn new(mesh: &FeMesh) -> Self {
        let nt = mesh.tag_count();
        let nn = mesh.nodes.len();
        // first[tag * nn + node] = lowest element of `tag` holding `node` (u32::MAX: none).
        // Dense is fine: there are a handful of regions.
        let mut first = vec![u32::MAX; nt * nn];
        for e in (0..mesh.triangles.len()).rev() {
            let tag = mesh.tags[e] as usize;
            for &n in mesh.element_nodes(e).iter() {
                first[tag * nn + n as usize] = e as u32;
            }
        }
        let mut id = vec![u32::MAX; nt * nn];
        let (mut node, mut tag, mut element) = (Vec::new(), Vec::new(), Vec::new());
        for t in 0..nt {
            for n in 0..nn {
                let e = first[t * nn + n];
                if e != u32::MAX {
                    id[t * nn + n] = node.len() as u32;
                    node.push(n as u32);
                    tag.push(t as u32);
                    element.push(e);
                }
            }
        }
        let connectivity = (0..mesh.triangles.len())
            .flat_map(|e| {
                let t = mesh.tags[e] as usize;
                mesh.element_nodes(e)
                    .iter()
                    .map(|&n| id[t * nn + n as usize])
                    .collect::<Vec<_>>()
            })
            .collect();
        Self {
            node,
            tag,
            element,
            connectivity,
        }
    }

    /// Number of written points.
    pub fn len(&self) -> usize {
        self.node.len()
    }

    /// Whether there are no points.
    pub fn is_empty(&self) -> bool {
        self.node.is_empty()
    }

    /// Coordinates (r, z) of the written points, m.
    pub fn coordinates(&self, mesh: &FeMesh) -> Vec<Point> {
        self.node.iter().map(|&n| mesh.nodes[n as usize]).collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Two squares side by side, each split in two triangles; left tag 0, right tag 1.
    fn two_regions() -> FeMesh {
        FeMesh {
            nodes: vec![
                [0.0, 0.0],
                [1.0, 0.0],
                [2.0, 0.0],
                [0.0, 1.0],
                [1.0, 1.0],
                [2.0, 1.0],
            ],
            triangles: vec![[0, 1, 4], [0, 4, 3], [1, 2, 5], [1, 5, 4]],
            tags: vec![0, 0, 1, 1],
            mid: Vec::new(),
        }
    }

    #[test]
    fn interface_nodes_are_copied_once_per_region() {
        let mesh = two_regions();
        let rp = RegionPoints::new(&mesh);
        // Nodes 1 and 4 lie on the interface r = 1: 6 nodes + 2 copies.
        assert_eq!(rp.len(), 8);
        assert_eq!(rp.node, vec![0, 1, 3, 4, 1, 2, 4, 5]);
        assert_eq!(rp.tag, vec![0, 0, 0, 0, 1, 1, 1, 1]);
        // Every cell references points of its own region, at its own nodes.
        for e in 0..mesh.triangles.len() {
            for k in 0..3 {
                let p = rp.connectivity[3 * e + k] as usize;
                assert_eq!(rp.tag[p], mesh.tags[e]);
                assert_eq!(rp.node[p], mesh.triangles[e][k]);
            }
        }
        // The evaluating element holds the node and belongs to the point's region.
        for p in 0..rp.len() {
            let e = rp.element[p] as usize;
            assert_eq!(mesh.tags[e], rp.tag[p]);
            assert!(mesh.triangles[e].contains(&rp.node[p]));
        }
    }

    #[test]
    fn a_single_region_keeps_the_mesh_numbering() {
        let mut mesh = two_regions();
        mesh.tags = vec![0; 4];
        let rp = RegionPoints::new(&mesh);
        assert_eq!(rp.node, (0..6).collect::<Vec<u32>>());
        let flat: Vec<u32> = mesh.triangles.iter().flatten().copied().collect();
        assert_eq!(rp.connectivity, flat);
    }
}
