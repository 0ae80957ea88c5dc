//! Built-in linear materials (generic classes, never trade names).
//!
//! Relative permeabilities of soft magnetic alloys depend strongly on processing; these are
//! typical initial permeabilities of annealed material inside the published ranges, for demos
//! and first sizing only. Sources: ranges from Bozorth, *Ferromagnetism* (1951) and Cullity &
//! Graham, *Introduction to Magnetic Materials* (2009) — values from memory, typical; class
//! definitions in IEC 60404-8-6 and ASTM A753.

/// A named linear material.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BuiltinMaterial {
    /// Name used in case files.
    pub name: &'static str,
    /// Relative permeability used for linear solves.
    pub mu_r: f64,
    /// What it stands for and where the number comes from.
    pub note: &'static str,
}

const TABLE: [BuiltinMaterial; 8] = [
    BuiltinMaterial {
        name: "air",
        mu_r: 1.0,
        note: "vacuum/air",
    },
    BuiltinMaterial {
        name: "pure-iron",
        mu_r: 5000.0,
        note: "annealed pure iron, initial μr 1e3–1e4 (typical value, from memory)",
    },
    BuiltinMaterial {
        name: "low-carbon-steel",
        mu_r: 300.0,
        note: "low-carbon steel, initial μr 200–500 (typical value, from memory)",
    },
    BuiltinMaterial {
        name: "silicon-iron",
        mu_r: 1000.0,
        note: "3% Si-Fe non-oriented, initial μr ~1e3 (typical value, from memory)",
    },
    BuiltinMaterial {
        name: "nickel-iron-50",
        mu_r: 6000.0,
        note: "45–50% Ni-Fe, initial μr 4e3–1e4 (typical value, from memory)",
    },
    BuiltinMaterial {
        name: "nickel-iron-80",
        mu_r: 50000.0,
        note: "80% Ni-Fe-Mo, initial μr 2e4–1e5 (typical value, from memory)",
    },
    BuiltinMaterial {
        name: "cobalt-iron-49",
        mu_r: 1000.0,
        note: "49Co-49Fe-2V, initial μr ~1e3 (typical value, from memory)",
    },
    BuiltinMaterial {
        name: "mnzn-ferrite",
        mu_r: 2000.0,
        note: "Mn-Zn ferrite, initial μr 1e3–1.5e4 (typical value, from memory)",
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
