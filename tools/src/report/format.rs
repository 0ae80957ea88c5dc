//! Numbers as a specialist reads them: results to a stated number of significant digits,
//! inputs without binary floating-point noise, positions in mm.

/// `x` to `digits` significant digits (trailing zeros kept: they state the precision);
/// plain decimals from 1e-3 to 1e6, scientific notation outside.
pub fn sig(x: f64, digits: usize) -> String {
    let digits = digits.clamp(1, 17);
    if !x.is_finite() {
        return format!("{x}");
    }
    if x == 0.0 {
        return "0".into();
    }
    let exponent = x.abs().log10().floor() as i32;
    // Rounding can carry into the next decade (9.9996 → 10.00): decide on the rounded value.
    let rounded: f64 = format!("{:.*e}", digits - 1, x).parse().unwrap_or(x);
    let exponent = if rounded.abs() >= 10f64.powi(exponent + 1) {
        exponent + 1
    } else {
        exponent
    };
    if (-3..6).contains(&exponent) {
        let decimals = (digits as i32 - 1 - exponent).max(0) as usize;
        format!("{rounded:.decimals$}")
    } else {
        format!("{:.*e}", digits - 1, x)
    }
}

/// An input value as the user wrote it: the shortest decimal that rounds to it at 12
/// significant digits (0.036000000000000004 → "0.036").
pub fn input(x: f64) -> String {
    if !x.is_finite() || x == 0.0 {
        return format!("{x}");
    }
    let rounded: f64 = format!("{x:.11e}").parse().unwrap_or(x);
    let a = rounded.abs();
    if (1e-4..1e9).contains(&a) {
        let s = format!("{rounded:.12}");
        let s = s.trim_end_matches('0').trim_end_matches('.');
        s.to_string()
    } else {
        format!("{rounded:e}")
    }
}

/// A length in m shown in mm to 0.01 mm (cores below 10 m), e.g. "36.00 mm".
pub fn mm(x: f64) -> String {
    if x.abs() < 10.0 {
        format!("{:.2} mm", x * 1e3)
    } else {
        format!("{} m", sig(x, 4))
    }
}

/// A point (r, z) in m as "(r, z) = (a, b) mm".
pub fn point_mm(p: [f64; 2]) -> String {
    if p[0].abs().max(p[1].abs()) < 10.0 {
        format!("(r, z) = ({:.2}, {:.2}) mm", p[0] * 1e3, p[1] * 1e3)
    } else {
        format!("(r, z) = ({}, {}) m", sig(p[0], 4), sig(p[1], 4))
    }
}

/// Significant digits that match an estimated relative error: about four, more when the
/// estimate says the moment is known better (1e-6 → 7).
pub fn digits_for(relative_error: Option<f64>) -> usize {
    match relative_error {
        Some(e) if e > 0.0 && e.is_finite() => ((-e.log10()).ceil() as usize + 1).clamp(4, 12),
        _ => 4,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sig_rounds_and_keeps_stated_precision() {
        assert_eq!(sig(0.036000000000000004, 4), "0.03600");
        assert_eq!(sig(4.0999999999999995e-3, 4), "0.004100");
        assert_eq!(sig(9.99996, 4), "10.00");
        assert_eq!(sig(123456.7, 4), "123500");
        assert_eq!(sig(1.23456e-7, 4), "1.235e-7");
        assert_eq!(sig(-2.5e9, 3), "-2.50e9");
        assert_eq!(sig(0.0, 4), "0");
    }

    #[test]
    fn input_drops_float_noise() {
        assert_eq!(input(0.036000000000000004), "0.036");
        assert_eq!(input(4.0999999999999995e-3), "0.0041");
        assert_eq!(input(1200.0), "1200");
        assert_eq!(input(0.05), "0.05");
        assert_eq!(input(2.5e-12), "2.5e-12");
    }

    #[test]
    fn positions_in_mm_to_a_hundredth() {
        assert_eq!(point_mm([0.0041, -0.036]), "(r, z) = (4.10, -36.00) mm");
        assert_eq!(mm(0.070), "70.00 mm");
    }

    #[test]
    fn digits_follow_the_estimate() {
        assert_eq!(digits_for(None), 4);
        assert_eq!(digits_for(Some(1e-3)), 4);
        assert_eq!(digits_for(Some(1e-6)), 7);
        assert_eq!(digits_for(Some(3e-5)), 6);
    }
}
