//! Inversion of a strictly increasing scalar law y = f(x) on a bracket.

/// Solves f(x) = `target` for x in [`lo`, `hi`], where `f` returns (f(x), f'(x)), f is strictly
/// increasing and f(lo) ≤ target ≤ f(hi). Newton steps that leave the shrinking bracket are
/// replaced by bisection, so the iteration always converges; it stops at the resolution of f64.
pub fn solve_increasing(
    f: impl Fn(f64) -> (f64, f64),
    target: f64,
    mut lo: f64,
    mut hi: f64,
    guess: f64,
) -> f64 {
    let mut x = guess.clamp(lo, hi);
    for _ in 0..200 {
        let (y, dy) = f(x);
        let g = y - target;
        if g == 0.0 {
            return x;
        }
        if g > 0.0 {
            hi = x;
        } else {
            lo = x;
        }
        let newton = x - g / dy;
        let next = if dy > 0.0 && newton > lo && newton < hi {
            newton
        } else {
            0.5 * (lo + hi)
        };
        // Converged when the step is at the rounding level of x.
        if (next - x).abs() <= 4.0 * f64::EPSILON * x.abs().max(f64::MIN_POSITIVE) {
            return next;
        }
        if hi - lo <= 4.0 * f64::EPSILON * hi.abs() {
            return next;
        }
        x = next;
    }
    x
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn inverts_a_cubic_to_rounding_accuracy() {
        let f = |x: f64| (x * x * x + x, 3.0 * x * x + 1.0);
        let x = solve_increasing(f, 10.0, 0.0, 10.0, 0.0);
        assert!((x - 2.0).abs() < 1e-15, "{x}");
    }

    #[test]
    fn survives_a_flat_start_by_bisection() {
        // f' = 0 at the guess: Newton is undefined, bisection takes over.
        let f = |x: f64| (x * x * x, 3.0 * x * x);
        let x = solve_increasing(f, 8.0, 0.0, 100.0, 0.0);
        assert!((x - 2.0).abs() < 1e-14, "{x}");
    }
}
