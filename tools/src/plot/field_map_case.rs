//! The field map of a solved case: its caption (title and operating point) and the call the
//! pipeline makes.

use axicore_solver::{Model, Solution};

use super::field_map::{self, Caption, FieldMapError, FieldMapOptions};
use super::field_map_draw::si;
use super::field_source::SolvedField;
use crate::case::Case;

/// Title and operating point of `case`: each winding's turns and current, and the background.
pub fn caption(case: &Case) -> Caption {
    let mut parts: Vec<String> = case
        .windings
        .iter()
        .map(|w| {
            let turns = if w.turns.fract() == 0.0 {
                format!("{}", w.turns)
            } else {
                format!("{:.3}", w.turns)
            };
            let name = match w.name.as_str() {
                "" => "winding".to_string(),
                n if n.starts_with("winding") => n.to_string(),
                n => format!("winding {n}"),
            };
            format!("{name}: {turns} turns at {}", si(w.current, "A"))
        })
        .collect();
    if case.background_b != 0.0 {
        parts.push(format!(
            "uniform B0 = {} along z",
            si(case.background_b, "T")
        ));
    }
    if parts.is_empty() {
        parts.push("no source".to_string());
    }
    Caption {
        title: case.title.clone(),
        operating: parts.join("; "),
    }
}

/// The picture file's bytes for the field `sol` of `case` on `model`.
pub fn render_case(
    model: &Model,
    sol: &Solution,
    case: &Case,
    opts: &FieldMapOptions,
) -> Result<Vec<u8>, FieldMapError> {
    field_map::render(&SolvedField::new(model, sol), &caption(case), opts)
}
