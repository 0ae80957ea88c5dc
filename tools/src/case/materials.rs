//! Built-in materials: generic soft magnetic classes (never trade names), each a saturating
//! law with a stated saturation polarisation and initial and maximum relative permeability.
//!
//! Permeabilities of soft magnetic alloys depend strongly on composition, processing and
//! annealing; the values below are typical annealed, room-temperature values chosen inside
//! the published ranges — for demos and first sizing only, never for a design decision
//! without a measured curve of the actual lot. Ranges: Bozorth, *Ferromagnetism* (1951);
//! Cullity & Graham, *Introduction to Magnetic Materials*, 2nd ed. (2009) — the individual
//! numbers are typical values, from memory. Class definitions: IEC 60404-8-6 (soft magnetic
//! metallic materials), ASTM A753 (nickel–iron alloys).
//!
//! The curve of each is our three-parameter knee law
//! ([`axicore_solver::material::SaturationLaw::Knee`]), which reproduces Js, μi and μmax
//! exactly and tends to the vacuum slope μ0 above saturation.

use std::sync::Arc;

use axicore_solver::material::SaturationLaw;
use axicore_solver::Material;

/// A named built-in material.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BuiltinMaterial {
    /// Name used in case files.
    pub name: &'static str,
    /// Saturation polarisation Js = μ0 Ms in T.
    pub saturation_t: f64,
    /// Initial relative permeability.
    pub mu_initial: f64,
    /// Maximum relative permeability (max of B/(μ0 H)).
    pub mu_max: f64,
    /// What it stands for and where the numbers come from.
    pub note: &'static str,
}

impl BuiltinMaterial {
    /// The solver's material: the knee law.
    pub fn material(&self) -> Material {
        Material::Saturable(Arc::new(SaturationLaw::Knee {
            js: self.saturation_t,
            mu_i: self.mu_initial,
            mu_max: self.mu_max,
        }))
    }
}

const TABLE: [BuiltinMaterial; 7] = [
    BuiltinMaterial {
        name: "pure-iron",
        saturation_t: 2.15,
        mu_initial: 2000.0,
        mu_max: 10000.0,
        note: "annealed pure iron; Bs 2.15 T, μi 1e3–1e4, μmax 5e3–2e5 (typical values, from memory)",
    },
    BuiltinMaterial {
        name: "low-carbon-steel",
        saturation_t: 2.05,
        mu_initial: 300.0,
        mu_max: 2000.0,
        note: "low-carbon steel; Bs 2.0–2.1 T, μi 200–500, μmax 1e3–5e3 (typical values, from memory)",
    },
    BuiltinMaterial {
        name: "silicon-iron",
        saturation_t: 2.0,
        mu_initial: 1000.0,
        mu_max: 7000.0,
        note: "3% Si-Fe non-oriented; Bs 2.0 T, μi ~1e3, μmax 5e3–1e4 (typical values, from memory)",
    },
    BuiltinMaterial {
        name: "nickel-iron-50",
        saturation_t: 1.55,
        mu_initial: 6000.0,
        mu_max: 80000.0,
        note: "45–50% Ni-Fe; Bs 1.5–1.6 T, μi 4e3–1e4, μmax 5e4–1.5e5 (typical values, from memory)",
    },
    BuiltinMaterial {
        name: "nickel-iron-80",
        saturation_t: 0.78,
        mu_initial: 50000.0,
        mu_max: 250000.0,
        note: "80% Ni-Fe-Mo (ASTM A753 class); Bs 0.75–0.8 T, μi 2e4–1e5, μmax 2e5–5e5 (typical values, from memory)",
    },
    BuiltinMaterial {
        name: "cobalt-iron-49",
        saturation_t: 2.35,
        mu_initial: 1000.0,
        mu_max: 10000.0,
        note: "49Co-49Fe-2V; Bs 2.3–2.4 T, μi ~1e3, μmax 5e3–2e4 (typical values, from memory)",
    },
    BuiltinMaterial {
        name: "mnzn-ferrite",
        saturation_t: 0.45,
        mu_initial: 2000.0,
        mu_max: 3500.0,
        note: "Mn-Zn ferrite; Bs 0.35–0.5 T, μi 1e3–1.5e4, μmax about 1.5–2 μi (typical values, from memory)",
    },
];

/// All built-in materials.
pub fn builtin_materials() -> &'static [BuiltinMaterial] {
    &TABLE
}

/// Looks a material up by name.
pub fn find(name: &str) -> Option<&'static BuiltinMaterial> {
    TABLE.iter().find(|m| m.name == name)
}

/// Why `name` is not a built-in material, with the nearest name and the list, as one phrase.
/// `air` gets its own answer: it was listed once, but the space around the sources needs no
/// name, and a core of μr = 1 is `mu_r = 1`.
pub fn unknown_material(name: &str) -> String {
    if name.eq_ignore_ascii_case("air") || name.eq_ignore_ascii_case("vacuum") {
        return format!(
            "'{name}' is not a core material: everything outside the core and windings is already air; leave out [core] for a winding in air, or write mu_r = 1"
        );
    }
    let names: Vec<&str> = TABLE.iter().map(|m| m.name).collect();
    format!(
        "unknown material '{name}'{}; built-in: {}",
        crate::suggest::hint(name, &names),
        names.join(", ")
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_builtin_law_is_valid_and_saturates_at_its_stated_value() {
        for m in builtin_materials() {
            let mat = m.material();
            mat.validate().unwrap();
            assert!((mat.initial_mu_r() - m.mu_initial).abs() < 1e-9 * m.mu_initial);
            assert_eq!(mat.saturation_b(), Some(m.saturation_t));
            assert!(m.mu_max >= m.mu_initial);
        }
    }

    #[test]
    fn a_misspelt_material_gets_the_nearest_name() {
        let m = unknown_material("nikel-iron-80");
        assert!(m.contains("did you mean 'nickel-iron-80'"), "{m}");
        assert!(m.contains("built-in: pure-iron"), "{m}");
    }

    #[test]
    fn air_is_not_a_listed_material_and_its_message_says_what_to_write() {
        assert!(find("air").is_none());
        let m = unknown_material("air");
        assert!(
            m.contains("leave out [core]") && m.contains("mu_r = 1"),
            "{m}"
        );
    }
}
