//! Physical quantities with units at the boundary: "70 mm", "50 mA", "1 mT", "2.5e-3 m".
//!
//! A bare number is read in SI base units. A string is a number, optional spaces and a unit
//! symbol made of an optional SI prefix and a base symbol of the expected dimension.

use std::fmt;

/// The physical dimension a key expects.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Dimension {
    /// Metres.
    Length,
    /// Amperes.
    Current,
    /// Teslas.
    FluxDensity,
    /// Amperes per metre.
    FieldStrength,
    /// No unit.
    Dimensionless,
}

impl fmt::Display for Dimension {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Dimension::Length => "a length (m)",
            Dimension::Current => "a current (A)",
            Dimension::FluxDensity => "a flux density (T)",
            Dimension::FieldStrength => "a field strength (A/m)",
            Dimension::Dimensionless => "a plain number",
        })
    }
}

/// The largest magnitude a case or option accepts for a quantity of dimension `dim`, in SI,
/// and as printed; lengths that are sizes (not positions) must also reach [`SMALLEST_SIZE`].
/// Why bounds at all: a length of 1e300 m or 1e-300 m is finite but overflows the derived
/// sizes (air sphere, current density) or falls below the triangulator's coordinate
/// resolution, and failed deep inside the mesher or solver with a message naming no key. The
/// bounds are ours (common practice: decades beyond the rod-core coils this program is for,
/// from micro sensor cores to metre-long torquer rods).
pub fn largest_magnitude(dim: Dimension) -> Option<(f64, &'static str)> {
    match dim {
        Dimension::Length => Some((1e3, "1 km")),
        Dimension::Current => Some((1e6, "1 MA")),
        Dimension::FluxDensity => Some((1e3, "1 kT")),
        Dimension::FieldStrength => Some((1e12, "1e12 A/m")),
        Dimension::Dimensionless => None,
    }
}

/// Smallest size (a length, diameter, radius or element size) accepted, m.
pub const SMALLEST_SIZE: f64 = 1e-6;

/// Rejects a value above the largest magnitude of its dimension (see [`largest_magnitude`]);
/// the error is a short phrase for messages.
pub fn check_magnitude(v: f64, dim: Dimension) -> Result<(), String> {
    match largest_magnitude(dim) {
        Some((hi, text)) if v.abs() > hi => Err(format!(
            "{v:e} {} is above the supported magnitude {text}",
            bases(dim).first().map_or("", |b| b.0)
        )),
        _ => Ok(()),
    }
}

/// Rejects a size below [`SMALLEST_SIZE`].
pub fn check_size(v: f64) -> Result<(), String> {
    if v < SMALLEST_SIZE {
        Err(format!("{v:e} m is below the supported size 1 µm"))
    } else {
        Ok(())
    }
}

/// [`parse`], then [`check_magnitude`].
pub fn parse_supported(text: &str, dim: Dimension) -> Result<f64, String> {
    let v = parse(text, dim)?;
    check_magnitude(v, dim)?;
    Ok(v)
}

/// SI prefixes accepted in front of a base symbol.
const PREFIXES: [(&str, f64); 8] = [
    ("n", 1e-9),
    ("u", 1e-6),
    ("µ", 1e-6),
    ("μ", 1e-6),
    ("m", 1e-3),
    ("c", 1e-2),
    ("k", 1e3),
    ("M", 1e6),
];

/// Base symbols per dimension, with their factor to SI.
fn bases(dim: Dimension) -> &'static [(&'static str, f64)] {
    match dim {
        Dimension::Length => &[("m", 1.0)],
        Dimension::Current => &[("A", 1.0)],
        // gauss is CGS but still printed on many sensor data sheets; 1 G = 1e-4 T exactly.
        Dimension::FluxDensity => &[("T", 1.0), ("G", 1e-4)],
        // 1 Oe = 1000/(4π) A/m (CGS-Gaussian, exact by definition).
        Dimension::FieldStrength => &[("A/m", 1.0), ("Oe", 250.0 / std::f64::consts::PI)],
        Dimension::Dimensionless => &[],
    }
}

/// Which dimension a unit symbol belongs to, if any (for "wrong dimension" messages).
fn dimension_of(unit: &str) -> Option<Dimension> {
    [
        Dimension::FieldStrength,
        Dimension::Length,
        Dimension::Current,
        Dimension::FluxDensity,
    ]
    .into_iter()
    .find(|&d| factor(unit, d).is_some())
}

/// SI factor of `unit` for dimension `dim`, if it is a valid symbol of that dimension.
fn factor(unit: &str, dim: Dimension) -> Option<f64> {
    for &(base, f) in bases(dim) {
        if unit == base {
            return Some(f);
        }
        if let Some(prefix) = unit.strip_suffix(base) {
            // "cm" is fine, "cA" or "cT" are not in use: allow centi for lengths only.
            if prefix == "c" && dim != Dimension::Length {
                continue;
            }
            if let Some(&(_, p)) = PREFIXES.iter().find(|(s, _)| *s == prefix) {
                return Some(p * f);
            }
        }
    }
    None
}

/// Parses a quantity string of dimension `dim` into SI. Errors are short phrases for messages.
pub fn parse(text: &str, dim: Dimension) -> Result<f64, String> {
    let s = text.trim();
    let split = s
        .char_indices()
        .find(|&(i, c)| {
            c.is_alphabetic() && !((c == 'e' || c == 'E') && looks_like_exponent(s, i))
                || c == 'µ'
                || c == 'μ'
        })
        .map_or(s.len(), |(i, _)| i);
    let (num, unit) = (s[..split].trim(), s[split..].trim());
    let value: f64 = num.parse().map_err(|_| not_a_number(text, num, unit))?;
    if !value.is_finite() {
        return Err(format!("'{text}' is not finite"));
    }
    if unit.is_empty() {
        return Ok(value);
    }
    if dim == Dimension::Dimensionless {
        return Err(format!(
            "'{text}' has a unit, but a plain number is expected"
        ));
    }
    match factor(unit, dim) {
        Some(f) => Ok(value * f),
        None => match dimension_of(unit) {
            Some(other) => Err(format!("unit '{unit}' is {other}, but {dim} is expected")),
            None => Err(format!(
                "unknown unit '{unit}'{} (expected {dim})",
                unit_hint(unit, dim)
            )),
        },
    }
}

/// The fault of a number part that does not parse, recognising a decimal comma ("4,2 mm").
fn not_a_number(text: &str, num: &str, unit: &str) -> String {
    let dotted = num.replace(',', ".");
    if num.matches(',').count() == 1 && dotted.parse::<f64>().is_ok() {
        let unit = if unit.is_empty() {
            String::new()
        } else {
            format!(" {unit}")
        };
        return format!("'{text}' has a decimal comma: write {dotted}{unit}");
    }
    format!("'{text}' is not a number followed by a unit")
}

/// " (did you mean 'mA'?)" for a unit symbol one letter or one letter's case away from a
/// symbol of `dim` (the shared [`crate::suggest`] rule, held to distance 1: unit symbols are
/// short, and a looser match suggests metres for "in" or "ft").
fn unit_hint(unit: &str, dim: Dimension) -> String {
    let mut symbols: Vec<String> = Vec::new();
    for &(base, _) in bases(dim) {
        symbols.push(base.to_string());
        for &(prefix, _) in &PREFIXES {
            let symbol = format!("{prefix}{base}");
            // Megametres are never meant (above the supported 1 km): "MM" is millimetres.
            if factor(&symbol, dim).is_some() && symbol != "Mm" {
                symbols.push(symbol);
            }
        }
    }
    let known: Vec<&str> = symbols.iter().map(String::as_str).collect();
    crate::suggest::nearest(unit, &known, 1)
        .map(|k| format!(" (did you mean '{k}'?)"))
        .unwrap_or_default()
}

/// True if the 'e' at byte `i` is an exponent marker (digit before, digit or sign after).
fn looks_like_exponent(s: &str, i: usize) -> bool {
    let before = s[..i]
        .chars()
        .last()
        .is_some_and(|c| c.is_ascii_digit() || c == '.');
    let after = s[i + 1..]
        .chars()
        .next()
        .is_some_and(|c| c.is_ascii_digit() || c == '-' || c == '+');
    before && after
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lengths_with_prefixes_and_exponents() {
        assert_eq!(parse("70 mm", Dimension::Length).unwrap(), 0.07);
        assert_eq!(parse("2.5e-3 m", Dimension::Length).unwrap(), 2.5e-3);
        assert_eq!(parse("2.5e-3m", Dimension::Length).unwrap(), 2.5e-3);
        assert!((parse("12cm", Dimension::Length).unwrap() - 0.12).abs() < 1e-15);
        assert!((parse("3 µm", Dimension::Length).unwrap() - 3e-6).abs() < 1e-20);
        assert_eq!(parse("0.5", Dimension::Length).unwrap(), 0.5);
    }

    #[test]
    fn currents_and_flux_densities() {
        assert!((parse("50 mA", Dimension::Current).unwrap() - 0.05).abs() < 1e-15);
        assert!((parse("1 mT", Dimension::FluxDensity).unwrap() - 1e-3).abs() < 1e-18);
        assert!((parse("30 uT", Dimension::FluxDensity).unwrap() - 3e-5).abs() < 1e-18);
        assert!((parse("0.5 G", Dimension::FluxDensity).unwrap() - 5e-5).abs() < 1e-18);
        assert!((parse("2 kA/m", Dimension::FieldStrength).unwrap() - 2e3).abs() < 1e-9);
        assert!(
            (parse("1 Oe", Dimension::FieldStrength).unwrap() - 79.577_471_545_947_67).abs() < 1e-9
        );
    }

    #[test]
    fn wrong_dimension_and_unknown_units_are_named() {
        let e = parse("1 mT", Dimension::Current).unwrap_err();
        assert!(e.contains("flux density") && e.contains("current"), "{e}");
        let e = parse("3 furlong", Dimension::Length).unwrap_err();
        assert!(e.contains("unknown unit 'furlong'"), "{e}");
        assert!(parse("abc", Dimension::Length).is_err());
        assert!(parse("inf m", Dimension::Length).is_err());
        assert!(parse("5 cA", Dimension::Current).is_err());
    }

    #[test]
    fn a_unit_in_the_wrong_case_or_one_letter_off_gets_a_did_you_mean() {
        let e = parse("40 ma", Dimension::Current).unwrap_err();
        assert!(e.contains("unknown unit 'ma' (did you mean 'mA'?)"), "{e}");
        let e = parse("3 MM", Dimension::Length).unwrap_err();
        assert!(e.contains("did you mean 'mm'?"), "{e}");
        let e = parse("2 kam", Dimension::FieldStrength).unwrap_err();
        assert!(e.contains("did you mean 'kA/m'?"), "{e}");
        let e = parse("1 mt", Dimension::FluxDensity).unwrap_err();
        assert!(e.contains("did you mean 'mT'?"), "{e}");
        let e = parse("5 in", Dimension::Length).unwrap_err();
        assert!(!e.contains("did you mean"), "{e}");
    }

    #[test]
    fn a_decimal_comma_is_recognised_and_the_fix_written_out() {
        let e = parse("4,2 mm", Dimension::Length).unwrap_err();
        assert!(e.contains("decimal comma: write 4.2 mm"), "{e}");
        let e = parse("0,5", Dimension::Dimensionless).unwrap_err();
        assert!(e.contains("decimal comma: write 0.5"), "{e}");
        let e = parse("1,000,000 mm", Dimension::Length).unwrap_err();
        assert!(e.contains("not a number"), "{e}");
    }
}
