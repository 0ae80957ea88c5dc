//! Cautions particular to a case: figures that are numerically right but physically
//! doubtful, printed with the summary and carried in the JSON.

use super::{CoreReport, WindingReport};
use crate::case::Case;

/// Overall current density (over the winding section) above which a caution is printed,
/// A/mm². Common practice: enamelled windings without forced cooling carry a few A/mm²
/// continuously, less in vacuum where only conduction and radiation remove the heat.
pub const CURRENT_DENSITY_CAUTION_A_PER_MM2: f64 = 4.0;

/// Peak |B| in a linear (constant-μr) core above which a caution is printed, T: no soft
/// magnetic material stays linear there (the highest saturation of common alloys, cobalt–iron,
/// is about 2.4 T; from memory, Bozorth 1951).
pub const LINEAR_CORE_CAUTION_T: f64 = 2.5;

/// The cautions of a solved case.
pub fn case_cautions(
    case: &Case,
    core: Option<&CoreReport>,
    windings: &[WindingReport],
) -> Vec<String> {
    let mut out = Vec::new();
    for w in windings {
        let j = w.current_density_A_per_mm2.abs();
        if j > CURRENT_DENSITY_CAUTION_A_PER_MM2 {
            out.push(format!(
                "winding {}: {j:.3} A/mm² over its section is above {CURRENT_DENSITY_CAUTION_A_PER_MM2} A/mm² (common practice for a continuous enamelled winding; less in vacuum): check the heating, and that the current is in A as meant",
                w.name
            ));
        }
    }
    if let (Some(c), Some(core_case)) = (core, &case.core) {
        let peak = c.max_b_T.unwrap_or(c.b_centre_T);
        // (A permanent magnet's linear law is its recoil line, not a soft core's idealisation.)
        let soft = core_case.magnetization.is_none();
        if soft
            && core_case.material.is_linear()
            && c.initial_mu_r > 1.0
            && peak > LINEAR_CORE_CAUTION_T
        {
            out.push(format!(
                "core: a linear core (constant μr) at a peak |B| of {peak:.3} T, beyond what any soft magnetic material carries ({LINEAR_CORE_CAUTION_T} T): give the core a saturating law (material, law or bh_curve)"
            ));
        }
    }
    out
}
