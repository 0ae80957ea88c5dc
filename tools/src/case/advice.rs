//! Messages for faults that show only after parsing (a mesh over its node cap, a ramp with
//! nothing to ramp), worded from what the case file said so that they name the key to fix.

use super::Case;

/// A core or winding length this many times the next largest one is taken for a unit slip:
/// the long dimensions of a rod-core coil (core and winding length, a position) come within
/// a few times of each other, while a "60" meant as 60 mm is a thousand times the core; an
/// element size this factor squared below the median length is taken for one too. Our own
/// thresholds, set from the cases in `cases/` (largest to next largest: 1.07× to 5× where a
/// case has three lengths or more; 10× for the spheroid's two).
const SUSPECT_RATIO: f64 = 20.0;

/// Fineness above which a capped mesh is blamed on `mesh.fineness` (the element count grows
/// like its square; 8 is already 64× the default).
const SUSPECT_FINENESS: f64 = 8.0;

impl Case {
    /// The one-line message (with `file:` in front) for a mesh that would need more than
    /// `limit` nodes, naming the likeliest key: a core or winding length far larger than the
    /// others (said to be read as metres when it was a plain number), an element size far
    /// below them, a high `mesh.fineness`, else `mesh.max_nodes` itself.
    pub fn explain_too_many_nodes(&self, file: &str, limit: usize) -> String {
        let need = format!("the mesh would need more than {limit} nodes");
        let median = self.median_length();
        if let Some(g) = self.suspect_length() {
            let metres = trim(g.metres);
            return match (g.plain, g.metres.abs() > median) {
                (true, true) => format!(
                    "{file}: {}: {need}; {metres} has no unit and is read as {metres} m (plain numbers are metres): write e.g. \"{metres} mm\"",
                    g.key
                ),
                (false, true) => format!(
                    "{file}: {}: {need}; {metres} m is over {SUSPECT_RATIO}× every other length of the core and windings: check its unit",
                    g.key
                ),
                (_, false) => format!(
                    "{file}: {}: {need}; the element size {metres} m is 1/{:.0} of the median length of the core and windings: check its unit",
                    g.key,
                    median / g.metres
                ),
            };
        }
        if self.mesh.fineness > SUSPECT_FINENESS {
            return format!(
                "{file}: mesh.fineness: {need} at fineness {}; lower it or raise mesh.max_nodes",
                self.mesh.fineness
            );
        }
        format!(
            "{file}: mesh.max_nodes: {need}; raise mesh.max_nodes or lower mesh.fineness (lengths look consistent: check their units if in doubt, plain numbers are metres)"
        )
    }

    /// The length that stands out: the largest core or winding length, if at least
    /// [`SUSPECT_RATIO`] times the next largest; else an element size (`mesh.*`) below
    /// 1/[`SUSPECT_RATIO`]² of their median. The surroundings' radius is never
    /// blamed: graded elements make a large one cheap. With fewer than three lengths there is
    /// no median to stand out from, and only a plain-number length above 1 m is taken.
    fn suspect_length(&self) -> Option<&super::GivenLength> {
        let geometry = || self.geometry_lengths().filter(|g| g.metres != 0.0);
        let largest = geometry().max_by(|a, b| a.metres.abs().total_cmp(&b.metres.abs()))?;
        if geometry().count() < 3 {
            return (largest.plain && largest.metres.abs() > 1.0).then_some(largest);
        }
        let next = geometry()
            .filter(|g| !std::ptr::eq(*g, largest))
            .map(|g| g.metres.abs())
            .fold(0.0, f64::max);
        if largest.metres.abs() >= SUSPECT_RATIO * next {
            return Some(largest);
        }
        let median = self.median_length();
        self.given_lengths
            .iter()
            .filter(|g| g.key.starts_with("mesh."))
            .filter(|g| g.metres * SUSPECT_RATIO * SUSPECT_RATIO <= median)
            .min_by(|a, b| a.metres.total_cmp(&b.metres))
    }

    /// Lengths of the core and windings (not element sizes, not the surroundings).
    fn geometry_lengths(&self) -> impl Iterator<Item = &super::GivenLength> {
        self.given_lengths
            .iter()
            .filter(|g| g.key.starts_with("core.") || g.key.starts_with("winding["))
    }

    fn median_length(&self) -> f64 {
        let mut v: Vec<f64> = self
            .geometry_lengths()
            .map(|g| g.metres.abs())
            .filter(|&m| m != 0.0)
            .collect();
        v.sort_by(f64::total_cmp);
        v.get(v.len() / 2).copied().unwrap_or(0.0)
    }

    /// Whether `axicore ramp` can run this case: it scales the current of the first winding,
    /// which must exist and carry a nonzero current. The error is one line naming the file
    /// and the key.
    pub fn check_rampable(&self, file: &str) -> Result<(), String> {
        match self.windings.first() {
            None => Err(format!(
                "{file}: winding: ramp scales the current of the first [[winding]], and the case has none; add one (a background field alone has no current to ramp)"
            )),
            Some(w) if w.current == 0.0 => Err(format!(
                "{file}: winding[1].current: ramp scales the first winding's current, which is 0 here; give it a nonzero current (its sign sets the direction)"
            )),
            Some(_) => Ok(()),
        }
    }
}

/// A length in m without float noise (0.1 + 0.2 style tails), for messages.
fn trim(x: f64) -> String {
    let s = format!("{x:.9}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    s.to_string()
}

#[cfg(test)]
mod tests {
    use crate::case::parse_case;

    const ROD: &str = r#"
[core]
shape = "rod"
length = "70 mm"
diameter = "8 mm"
mu_r = 1000
[[winding]]
turns = 100
current = "40 mA"
inner_radius = "4.2 mm"
outer_radius = "6 mm"
length = "60 mm"
"#;

    #[test]
    fn a_plain_number_length_far_above_the_others_is_named_as_read_in_metres() {
        let case = parse_case(&ROD.replace("\"60 mm\"", "60"), "c.toml").unwrap();
        let m = case.explain_too_many_nodes("c.toml", 20000);
        assert!(m.starts_with("c.toml: winding[1].length: "), "{m}");
        assert!(m.contains("read as 60 m") && m.contains("\"60 mm\""), "{m}");
    }

    #[test]
    fn a_length_with_a_wrong_unit_is_named_with_its_ratio() {
        let case = parse_case(&ROD.replace("\"70 mm\"", "\"70 m\""), "c.toml").unwrap();
        let m = case.explain_too_many_nodes("c.toml", 20000);
        assert!(
            m.contains("core.length") && m.contains("check its unit"),
            "{m}"
        );
    }

    #[test]
    fn plain_numbers_in_metres_that_fit_the_case_are_not_blamed() {
        let case = parse_case(&ROD.replace("\"60 mm\"", "0.06"), "c.toml").unwrap();
        assert!(case.given_lengths.iter().any(|g| g.plain));
        let m = case.explain_too_many_nodes("c.toml", 20000);
        assert!(m.starts_with("c.toml: mesh.max_nodes: "), "{m}");
        let fine = parse_case(&format!("{ROD}[mesh]\nfineness = 20\n"), "c.toml").unwrap();
        let m = fine.explain_too_many_nodes("c.toml", 20000);
        assert!(m.starts_with("c.toml: mesh.fineness: "), "{m}");
        // A surroundings radius 60× the median is ordinary (the fixed edge's default is 20×
        // the source radius) and is not blamed.
        let wide = format!("{ROD}[surroundings]\nradius = \"0.5 m\"\nedge = \"fixed\"\n");
        let m = parse_case(&wide, "c.toml")
            .unwrap()
            .explain_too_many_nodes("c.toml", 20000);
        assert!(m.starts_with("c.toml: mesh.max_nodes: "), "{m}");
    }

    #[test]
    fn a_slender_core_is_not_taken_for_a_unit_slip() {
        // L/D = 300 (search-coil cores reach a few hundred): the core length is 300× the
        // median length but only 1.2× the winding's.
        let slender = r#"
[core]
shape = "rod"
length = "300 mm"
diameter = "1 mm"
mu_r = 1000
[[winding]]
turns = 100
current = "1 mA"
inner_radius = "0.6 mm"
outer_radius = "0.8 mm"
length = "250 mm"
"#;
        let m = parse_case(slender, "c.toml")
            .unwrap()
            .explain_too_many_nodes("c.toml", 20000);
        assert!(m.starts_with("c.toml: mesh.max_nodes: "), "{m}");
    }

    #[test]
    fn an_element_size_far_below_the_geometry_is_named() {
        let tiny = format!("{ROD}[mesh]\ncore_size = \"1 um\"\n");
        let m = parse_case(&tiny, "c.toml")
            .unwrap()
            .explain_too_many_nodes("c.toml", 20000);
        assert!(m.starts_with("c.toml: mesh.core_size: "), "{m}");
        assert!(m.contains("check its unit"), "{m}");
    }

    #[test]
    fn ramp_on_a_case_without_a_winding_names_the_file_and_key() {
        let field_only = "[core]\nshape = \"sphere\"\ndiameter = \"10 mm\"\nmu_r = 100\n[background]\nb_axial = \"1 mT\"\n";
        let case = parse_case(field_only, "f.toml").unwrap();
        let e = case.check_rampable("f.toml").unwrap_err();
        assert!(e.starts_with("f.toml: winding: "), "{e}");
        let zero = parse_case(&ROD.replace("\"40 mA\"", "0"), "c.toml").unwrap();
        let e = zero.check_rampable("c.toml").unwrap_err();
        assert!(e.starts_with("c.toml: winding[1].current: "), "{e}");
        assert!(parse_case(ROD, "c.toml")
            .unwrap()
            .check_rampable("c.toml")
            .is_ok());
    }
}
