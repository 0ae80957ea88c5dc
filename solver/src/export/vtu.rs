//! A writer for the VTK XML UnstructuredGrid format (.vtu, an open standard: "VTK File
//! Formats", Kitware, section "XML File Formats").
//!
//! Written here rather than through a general VTK crate because the map needs dataset-level
//! field data with string arrays (case title, region names, units), which the crate we used
//! before could not write. Every data array is inline binary: a little-endian UInt64 byte count
//! followed by the raw values, base64-encoded together (the format's "binary" encoding without
//! compression). Strings are NUL-terminated in one `String` array, as VTK itself writes them.

use base64::Engine;

/// VTK cell type of the 3-node triangle.
pub const VTK_TRIANGLE: u8 = 5;
/// VTK cell type of the 6-node (quadratic) triangle: corners, then the nodes of edges 0–1,
/// 1–2, 2–0.
pub const VTK_QUADRATIC_TRIANGLE: u8 = 22;

/// The values of one data array.
#[derive(Debug, Clone, PartialEq)]
pub enum Values {
    /// 64-bit floats.
    F64(Vec<f64>),
    /// 32-bit signed integers.
    I32(Vec<i32>),
    /// Text entries (one per tuple).
    Text(Vec<String>),
}

impl Values {
    fn len(&self) -> usize {
        match self {
            Values::F64(v) => v.len(),
            Values::I32(v) => v.len(),
            Values::Text(v) => v.len(),
        }
    }
}

/// A named array: `components` values per tuple (point, cell or field entry).
#[derive(Debug, Clone, PartialEq)]
pub struct DataArray {
    /// Name shown in a viewer.
    pub name: String,
    /// Components per tuple (1 scalar, 3 vector).
    pub components: usize,
    /// The values, `components` per tuple.
    pub values: Values,
}

impl DataArray {
    /// A scalar float array.
    pub fn scalars(name: &str, values: Vec<f64>) -> Self {
        Self {
            name: name.into(),
            components: 1,
            values: Values::F64(values),
        }
    }

    /// A 3-component float array from (x, y) pairs (z = 0: the meridian plane).
    pub fn plane_vectors(name: &str, values: &[[f64; 2]]) -> Self {
        Self {
            name: name.into(),
            components: 3,
            values: Values::F64(values.iter().flat_map(|v| [v[0], v[1], 0.0]).collect()),
        }
    }

    /// A scalar Int32 array.
    pub fn integers(name: &str, values: Vec<i32>) -> Self {
        Self {
            name: name.into(),
            components: 1,
            values: Values::I32(values),
        }
    }

    /// A string array (field data).
    pub fn text(name: &str, values: Vec<String>) -> Self {
        Self {
            name: name.into(),
            components: 1,
            values: Values::Text(values),
        }
    }

    /// Number of tuples.
    pub fn tuples(&self) -> usize {
        match &self.values {
            Values::Text(v) => v.len(),
            v => v.len() / self.components.max(1),
        }
    }
}

/// An unstructured grid of triangles in the (x, y) plane with its data.
#[derive(Debug, Clone, Default)]
pub struct Grid {
    /// Point coordinates (x, y); z is written as 0.
    pub points: Vec<[f64; 2]>,
    /// Point ids of every cell, `nodes_per_cell` each.
    pub connectivity: Vec<u32>,
    /// 3 (linear triangles) or 6 (quadratic triangles).
    pub nodes_per_cell: usize,
    /// One tuple per point.
    pub point_data: Vec<DataArray>,
    /// One tuple per cell.
    pub cell_data: Vec<DataArray>,
    /// Dataset-level arrays (any length).
    pub field_data: Vec<DataArray>,
}

/// Why a grid cannot be written.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum VtuError {
    /// An array's tuple count does not match the points or cells.
    #[error("array {name}: {found} tuples, expected {expected}")]
    Length {
        /// Array name.
        name: String,
        /// Tuples found.
        found: usize,
        /// Tuples expected.
        expected: usize,
    },
    /// A cell is neither a 3- nor a 6-node triangle.
    #[error("{0} nodes per cell: only 3- and 6-node triangles are written")]
    CellKind(usize),
    /// A text entry holds a NUL byte, which ends a string in the format.
    #[error("array {0}: text contains a NUL byte")]
    Nul(String),
}

impl Grid {
    /// Number of cells.
    pub fn cells(&self) -> usize {
        self.connectivity.len() / self.nodes_per_cell.max(1)
    }

    /// The .vtu file contents.
    pub fn to_bytes(&self) -> Result<Vec<u8>, VtuError> {
        let cell_type = match self.nodes_per_cell {
            3 => VTK_TRIANGLE,
            6 => VTK_QUADRATIC_TRIANGLE,
            k => return Err(VtuError::CellKind(k)),
        };
        let (np, nc) = (self.points.len(), self.cells());
        for (arrays, expected) in [(&self.point_data, np), (&self.cell_data, nc)] {
            for a in arrays {
                if a.tuples() != expected || a.values.len() != expected * a.components {
                    return Err(VtuError::Length {
                        name: a.name.clone(),
                        found: a.tuples(),
                        expected,
                    });
                }
            }
        }
        let mut out = String::with_capacity(64 + 40 * (np + nc) * 4);
        out.push_str("<?xml version=\"1.0\"?>\n");
        out.push_str(
            "<VTKFile type=\"UnstructuredGrid\" version=\"1.0\" byte_order=\"LittleEndian\" \
             header_type=\"UInt64\">\n<UnstructuredGrid>\n",
        );
        if !self.field_data.is_empty() {
            out.push_str("<FieldData>\n");
            for a in &self.field_data {
                write_array(&mut out, a, true)?;
            }
            out.push_str("</FieldData>\n");
        }
        out.push_str(&format!(
            "<Piece NumberOfPoints=\"{np}\" NumberOfCells=\"{nc}\">\n"
        ));
        for (tag, arrays) in [
            ("PointData", &self.point_data),
            ("CellData", &self.cell_data),
        ] {
            out.push_str(&format!("<{tag}>\n"));
            for a in arrays {
                write_array(&mut out, a, false)?;
            }
            out.push_str(&format!("</{tag}>\n"));
        }
        let coords: Vec<f64> = self.points.iter().flat_map(|p| [p[0], p[1], 0.0]).collect();
        out.push_str("<Points>\n");
        write_array(
            &mut out,
            &DataArray {
                name: "Points".into(),
                components: 3,
                values: Values::F64(coords),
            },
            false,
        )?;
        out.push_str("</Points>\n<Cells>\n");
        let conn: Vec<u8> = self
            .connectivity
            .iter()
            .flat_map(|&i| i64::from(i).to_le_bytes())
            .collect();
        let per = self.nodes_per_cell as i64;
        let offsets: Vec<u8> = (1..=nc as i64)
            .flat_map(|i| (per * i).to_le_bytes())
            .collect();
        let types = vec![cell_type; nc];
        write_raw(&mut out, "Int64", "connectivity", 1, None, &conn);
        write_raw(&mut out, "Int64", "offsets", 1, None, &offsets);
        write_raw(&mut out, "UInt8", "types", 1, None, &types);
        out.push_str("</Cells>\n</Piece>\n</UnstructuredGrid>\n</VTKFile>\n");
        Ok(out.into_bytes())
    }
}

/// Appends one array; `field` arrays carry their tuple count (field data has no points or
/// cells to count them by).
fn write_array(out: &mut String, a: &DataArray, field: bool) -> Result<(), VtuError> {
    let tuples = field.then(|| a.tuples());
    match &a.values {
        Values::F64(v) => {
            let bytes: Vec<u8> = v.iter().flat_map(|x| x.to_le_bytes()).collect();
            write_raw(out, "Float64", &a.name, a.components, tuples, &bytes);
        }
        Values::I32(v) => {
            let bytes: Vec<u8> = v.iter().flat_map(|x| x.to_le_bytes()).collect();
            write_raw(out, "Int32", &a.name, a.components, tuples, &bytes);
        }
        Values::Text(v) => {
            let mut bytes = Vec::new();
            for s in v {
                if s.as_bytes().contains(&0) {
                    return Err(VtuError::Nul(a.name.clone()));
                }
                bytes.extend_from_slice(s.as_bytes());
                bytes.push(0);
            }
            // VTK's reader takes string arrays from an `Array` element, not `DataArray`.
            out.push_str(&format!(
                "<Array type=\"String\" Name=\"{}\" NumberOfTuples=\"{}\" format=\"binary\">",
                escape(&a.name),
                v.len()
            ));
            out.push_str(&encode(&bytes));
            out.push_str("</Array>\n");
        }
    }
    Ok(())
}

fn write_raw(
    out: &mut String,
    kind: &str,
    name: &str,
    components: usize,
    tuples: Option<usize>,
    bytes: &[u8],
) {
    out.push_str(&format!(
        "<DataArray type=\"{kind}\" Name=\"{}\"",
        escape(name)
    ));
    if components != 1 {
        out.push_str(&format!(" NumberOfComponents=\"{components}\""));
    }
    if let Some(n) = tuples {
        out.push_str(&format!(" NumberOfTuples=\"{n}\""));
    }
    out.push_str(" format=\"binary\">");
    out.push_str(&encode(bytes));
    out.push_str("</DataArray>\n");
}

/// The format's binary block: UInt64 byte count, then the bytes, base64 as one stream.
fn encode(bytes: &[u8]) -> String {
    let mut block = Vec::with_capacity(8 + bytes.len());
    block.extend_from_slice(&(bytes.len() as u64).to_le_bytes());
    block.extend_from_slice(bytes);
    base64::engine::general_purpose::STANDARD.encode(block)
}

/// XML attribute escaping for array names.
fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn one_triangle() -> Grid {
        Grid {
            points: vec![[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]],
            connectivity: vec![0, 1, 2],
            nodes_per_cell: 3,
            ..Default::default()
        }
    }

    #[test]
    fn binary_block_is_byte_count_then_data_in_base64() {
        // RFC 4648 §10 test vector "foo" → "Zm9v", here behind the 8-byte count 3.
        let s = encode(b"foo");
        let raw = base64::engine::general_purpose::STANDARD.decode(s).unwrap();
        assert_eq!(&raw[..8], &3u64.to_le_bytes());
        assert_eq!(&raw[8..], b"foo");
    }

    #[test]
    fn mismatched_array_length_is_refused() {
        let mut g = one_triangle();
        g.point_data.push(DataArray::scalars("x", vec![1.0, 2.0]));
        assert!(matches!(
            g.to_bytes(),
            Err(VtuError::Length { found: 2, .. })
        ));
    }

    #[test]
    fn text_with_nul_is_refused_and_names_are_escaped() {
        let mut g = one_triangle();
        g.field_data
            .push(DataArray::text("a<b", vec!["ok".into(), "x\0y".into()]));
        assert_eq!(g.to_bytes(), Err(VtuError::Nul("a<b".into())));
        g.field_data[0] = DataArray::text("a<b", vec!["ok".into()]);
        let text = String::from_utf8(g.to_bytes().unwrap()).unwrap();
        assert!(text.contains("Name=\"a&lt;b\" NumberOfTuples=\"1\""));
    }

    #[test]
    fn cells_carry_the_type_of_their_node_count() {
        let mut g = one_triangle();
        g.nodes_per_cell = 4;
        assert_eq!(g.to_bytes(), Err(VtuError::CellKind(4)));
    }
}
