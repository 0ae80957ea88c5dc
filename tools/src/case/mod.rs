//! The case file: our own TOML schema, read into typed values in SI units.
//!
//! See the README ("Case-file reference") for every key. Parsing is strict: unknown keys,
//! missing keys, bad units and impossible geometry are reported as one line naming the file,
//! the key and the fault.

mod advice;
mod core_material;
mod materials;
mod parse;
mod read;
mod section;
mod validate;

pub use materials::{builtin_materials, find as find_material, unknown_material, BuiltinMaterial};
pub use parse::{parse_case, read_case_file};
pub use read::read_case_text;
pub use validate::{
    AUTO_EXACT_RADIUS_FACTOR, AUTO_FIXED_RADIUS_FACTOR, BALL_FACTOR, MIN_SURROUNDINGS_FACTOR,
};

use std::fmt;

/// A whole case, SI units.
#[derive(Debug, Clone, PartialEq)]
pub struct Case {
    /// Free text shown in reports.
    pub title: String,
    /// The ferromagnetic core, if any.
    pub core: Option<Core>,
    /// The windings (may be empty when a background field drives the problem).
    pub windings: Vec<Winding>,
    /// Uniform background flux density along +z, in T.
    pub background_b: f64,
    /// Radius of the meshed surroundings (the ball around the sources), in m; None = automatic.
    pub surroundings_radius: Option<f64>,
    /// How the meshed surroundings end: exactly joined to the unbounded space, or A fixed.
    pub edge: Edge,
    /// Every length the file gave, with its key, in the order read (for messages that must
    /// point at a likely unit slip; see [`Case::explain_too_many_nodes`]).
    pub given_lengths: Vec<GivenLength>,
    /// Mesh controls.
    pub mesh: MeshControls,
    /// Stopping rules of the nonlinear iteration (used only with saturating materials).
    pub newton: axicore_solver::NewtonSettings,
}

/// How the meshed surroundings end (`surroundings.edge`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Edge {
    /// `exact`: the unbounded space beyond the ball is joined exactly (its multipole energy
    /// is added on the ball's sphere), so results do not depend on where the mesh ends.
    Exact,
    /// `fixed`: the potential is held at the background's B0 r/2 on the ball's sphere (the
    /// reaction field is cut off there; the moment carries a bias of order (source/ball)³).
    Fixed,
}

impl Edge {
    /// Name used in the case file.
    pub fn keyword(self) -> &'static str {
        match self {
            Edge::Exact => "exact",
            Edge::Fixed => "fixed",
        }
    }
}

/// A length as the case file gave it.
#[derive(Debug, Clone, PartialEq)]
pub struct GivenLength {
    /// Dotted key path, e.g. `winding[1].length`.
    pub key: String,
    /// Value in m.
    pub metres: f64,
    /// True when written without a unit (a plain number, read as metres).
    pub plain: bool,
}

/// The core: shape, axial position of its centre and material.
#[derive(Debug, Clone, PartialEq)]
pub struct Core {
    /// Shape and dimensions.
    pub shape: CoreShape,
    /// Axial position of the centre, in m.
    pub centre: f64,
    /// Material name as given, or what kind of custom law it is.
    pub material_name: String,
    /// The magnetic law of the core (linear or saturating); for a permanent magnet the linear
    /// recoil law.
    pub material: axicore_solver::Material,
    /// Prescribed uniform axial magnetization M0 of a permanent-magnet core, A/m (negative:
    /// along −z); None for a soft core. The law is then B = μ0 μr H + μ0 M0 e_z.
    pub magnetization: Option<f64>,
}

impl Core {
    /// The prescribed polarization J0 = μ0 M0 along +z, T (0 for a soft core).
    pub fn polarization(&self) -> f64 {
        self.magnetization.map_or(0.0, |m| axicore_solver::MU0 * m)
    }
}

/// Core shapes, all dimensions in m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CoreShape {
    /// Solid cylinder.
    Rod {
        /// Length along the axis.
        length: f64,
        /// Outer diameter.
        diameter: f64,
    },
    /// Hollow cylinder.
    Tube {
        /// Length along the axis.
        length: f64,
        /// Outer diameter.
        diameter: f64,
        /// Inner (bore) diameter.
        bore: f64,
    },
    /// Sphere.
    Sphere {
        /// Diameter.
        diameter: f64,
    },
    /// Prolate or oblate spheroid with its symmetry axis on the coil axis.
    Spheroid {
        /// Length along the axis (polar diameter).
        length: f64,
        /// Equatorial diameter.
        diameter: f64,
    },
}

impl CoreShape {
    /// Outer radius in m.
    pub fn radius(&self) -> f64 {
        match *self {
            CoreShape::Rod { diameter, .. }
            | CoreShape::Tube { diameter, .. }
            | CoreShape::Sphere { diameter }
            | CoreShape::Spheroid { diameter, .. } => 0.5 * diameter,
        }
    }

    /// Half-length along the axis in m.
    pub fn half_length(&self) -> f64 {
        match *self {
            CoreShape::Rod { length, .. }
            | CoreShape::Tube { length, .. }
            | CoreShape::Spheroid { length, .. } => 0.5 * length,
            CoreShape::Sphere { diameter } => 0.5 * diameter,
        }
    }

    /// Exact volume in m³.
    pub fn volume(&self) -> f64 {
        use std::f64::consts::PI;
        match *self {
            CoreShape::Rod { length, diameter } => PI * 0.25 * diameter * diameter * length,
            CoreShape::Tube {
                length,
                diameter,
                bore,
            } => PI * 0.25 * (diameter * diameter - bore * bore) * length,
            CoreShape::Sphere { diameter } => PI * diameter.powi(3) / 6.0,
            CoreShape::Spheroid { length, diameter } => PI * diameter * diameter * length / 6.0,
        }
    }

    /// Name used in the case file.
    pub fn keyword(&self) -> &'static str {
        match self {
            CoreShape::Rod { .. } => "rod",
            CoreShape::Tube { .. } => "tube",
            CoreShape::Sphere { .. } => "sphere",
            CoreShape::Spheroid { .. } => "spheroid",
        }
    }
}

/// A winding of rectangular cross-section with uniform current density.
#[derive(Debug, Clone, PartialEq)]
pub struct Winding {
    /// Label for reports.
    pub name: String,
    /// Number of turns.
    pub turns: f64,
    /// Current per turn in A (sign gives direction: positive drives +z inside).
    pub current: f64,
    /// Inner radius in m.
    pub inner_radius: f64,
    /// Outer radius in m.
    pub outer_radius: f64,
    /// Axial length in m.
    pub length: f64,
    /// Axial position of the centre in m.
    pub centre: f64,
}

impl Winding {
    /// Cross-section area in the (r, z) plane, m².
    pub fn section_area(&self) -> f64 {
        (self.outer_radius - self.inner_radius) * self.length
    }

    /// Uniform azimuthal current density N I / S in A/m².
    pub fn current_density(&self) -> f64 {
        self.turns * self.current / self.section_area()
    }

    /// Dipole moment of the winding alone in air: N I π (a1² + a1 a2 + a2²)/3, in A·m²
    /// (∫ π r² J dA over the section).
    pub fn air_moment(&self) -> f64 {
        let (a1, a2) = (self.inner_radius, self.outer_radius);
        self.turns * self.current * std::f64::consts::PI * (a1 * a1 + a1 * a2 + a2 * a2) / 3.0
    }
}

/// Mesh controls: one knob plus expert overrides (all sizes in m).
#[derive(Debug, Clone, PartialEq)]
pub struct MeshControls {
    /// Overall refinement factor: 2 halves every element size.
    pub fineness: f64,
    /// Element size inside the core.
    pub core_size: Option<f64>,
    /// Element size inside windings.
    pub winding_size: Option<f64>,
    /// Element size at the core's sharp corners.
    pub corner_size: Option<f64>,
    /// Largest element size anywhere.
    pub far_size: Option<f64>,
    /// Size growth per unit distance from a refined feature.
    pub grading: Option<f64>,
    /// No triangle angle below this, in degrees (`mesh.angle_floor`).
    pub angle_floor_deg: f64,
    /// Relative chord sagitta allowed on curved boundaries.
    pub arc_tolerance: Option<f64>,
    /// Node cap.
    pub max_nodes: usize,
    /// Element order: 1 (3-node) or 2 (6-node, curved edges on curved outlines).
    pub order: usize,
    /// Layers of geometric grading toward every singular point of the geometry
    /// ([`crate::geometry::singular_points`]); 0 (the default) leaves the corners' usual
    /// refinement (`mesh.corner_layers`).
    pub corner_layers: u32,
}

impl MeshControls {
    /// Relative chord sagitta of curved outlines: given, or 1e-4/fineness² for first-order
    /// elements, so that the geometric error of the polygon (of the order of the sagitta)
    /// shrinks like their discretisation error (h²) instead of freezing at one value. Curved
    /// second-order elements follow the outline itself (their geometric error is of the order
    /// of the sagitta squared), so they take 1e-2/fineness², at most 1e-2, and let the element
    /// sizes decide: with 1e-4 the polygon's short segments fixed the mesh of a sphere whatever
    /// the fineness (4.3k unknowns at fineness 0.5 to 1, moment error 6.3e-5 at each); above
    /// 1e-2 the tips of a slender spheroid were too coarse (axis ratio 10 at fineness 0.7:
    /// −3.6e-3 with 2e-2, −2.3e-4 with 1e-2).
    pub fn effective_arc_tolerance(&self) -> f64 {
        let default = if self.order == 2 {
            1e-2 / self.fineness.max(1.0).powi(2)
        } else {
            1e-4 / (self.fineness * self.fineness)
        };
        self.arc_tolerance.unwrap_or(default).min(0.05)
    }
}

impl Default for MeshControls {
    fn default() -> Self {
        Self {
            fineness: 1.0,
            core_size: None,
            winding_size: None,
            corner_size: None,
            far_size: None,
            grading: None,
            angle_floor_deg: 25.0,
            arc_tolerance: None,
            max_nodes: 2_000_000,
            order: 2,
            corner_layers: 0,
        }
    }
}

/// A fault in a case file: which file, which key, what is wrong.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CaseError {
    /// The file could not be read.
    #[error("{file}: cannot read: {reason}")]
    Read {
        /// File path.
        file: String,
        /// OS error text.
        reason: String,
    },
    /// The file is not valid TOML.
    #[error("{file}: line {line}, column {column}: malformed TOML: {reason}")]
    Syntax {
        /// File path.
        file: String,
        /// 1-based line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// Parser message.
        reason: String,
    },
    /// A key is unknown, missing or has a bad value.
    #[error("{file}: {key}: {fault}")]
    Key {
        /// File path.
        file: String,
        /// Dotted key path, e.g. `winding[1].current` (windings counted from 1).
        key: String,
        /// What is wrong.
        fault: String,
    },
}

impl fmt::Display for CoreShape {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mm = |x: f64| crate::report::format::input(x * 1e3);
        match *self {
            CoreShape::Rod { length, diameter } => {
                write!(
                    f,
                    "rod, {} mm long, {} mm diameter",
                    mm(length),
                    mm(diameter)
                )
            }
            CoreShape::Tube {
                length,
                diameter,
                bore,
            } => write!(
                f,
                "tube, {} mm long, {} mm outer / {} mm bore diameter",
                mm(length),
                mm(diameter),
                mm(bore)
            ),
            CoreShape::Sphere { diameter } => write!(f, "sphere, {} mm diameter", mm(diameter)),
            CoreShape::Spheroid { length, diameter } => write!(
                f,
                "spheroid, {} mm long, {} mm equatorial diameter",
                mm(length),
                mm(diameter)
            ),
        }
    }
}
