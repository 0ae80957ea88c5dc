//! Messages for faults that show only after parsing (a mesh over its node cap, a ramp with
//! nothing to ramp), worded from what the case file said so that they name the key to fix.

use super::Case;

/// A length this many times the median of the case's lengths is taken for a unit slip: real
/// rod-core coils span a factor of a few tens between wire layer and core length, while a
/// "60" meant as 60 mm is a thousand times too long (common practice, our own threshold).
const SUSPECT_RATIO: f64 = 50.0;

/// Fineness above which a capped mesh is blamed on `mesh.fineness` (the element count grows
/// like its square; 8 is already 64× the default).
const SUSPECT_FINENESS: f64 = 8.0;

impl Case {
    /// The one-line message (with `file:` in front) for a mesh that would need more than
    /// `limit` nodes, naming the likeliest key: a length far larger than the others (said to
    /// be read as metres when it was a plain number), else a high `mesh.fineness`, else
    /// `mesh.max_nodes` itself.
    pub fn explain_too_many_nodes(&self, file: &str, limit: usize) -> String {
        let need = format!("the mesh would need more than {limit} nodes");
        if let Some(g) = self.suspect_length() {
            let metres = trim(g.metres);
            return if g.plain {
                format!(
                    "{file}: {}: {need}; {metres} has no unit and is read as {metres} m (plain numbers are metres): write e.g. \"{metres} mm\"",
                    g.key
                )
            } else {
                format!(
                    "{file}: {}: {need}; {metres} m is {:.0}× the median length of the case: check its unit",
                    g.key,
                    g.metres / self.median_length()
                )
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

    /// The length that stands out: the largest ratio to the median of all nonzero lengths,
    /// if at least [`SUSPECT_RATIO`]. With fewer than three lengths there is no median to
    /// stand out from, and the largest plain-number length is taken if it exceeds 1 m.
    fn suspect_length(&self) -> Option<&super::GivenLength> {
        let nonzero = || self.given_lengths.iter().filter(|g| g.metres != 0.0);
        let largest = nonzero().max_by(|a, b| a.metres.abs().total_cmp(&b.metres.abs()))?;
        if nonzero().count() < 3 {
            return (largest.plain && largest.metres.abs() > 1.0).then_some(largest);
        }
        (largest.metres.abs() >= SUSPECT_RATIO * self.median_length()).then_some(largest)
    }

    fn median_length(&self) -> f64 {
        let mut v: Vec<f64> = self
            .given_lengths
            .iter()
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
