//! A perceptually uniform colour map (viridis) and the value-to-colour scales of the field map.
//!
//! Viridis: S. van der Walt, N. Smith and E. Firing (2015), the default colour map of matplotlib
//! from version 2.0, released under CC0 (BIDS `colormap`, data as in matplotlib's
//! `_cm_listed.py`). Its lightness rises monotonically and nearly linearly in CAM02-UCS, so equal
//! steps in value read as equal steps in colour, also in grey-scale print and for the common
//! colour-vision deficiencies. The table below holds every eighth of the 256 published entries
//! (0, 8, …, 248) and the last one (255); linear interpolation between them stays within one
//! unit of 8-bit colour of the full table, as viridis is smooth.

/// Viridis entries 0, 8, 16, …, 248 and 255 of the 256-entry table, RGB in 0…1.
const VIRIDIS: [[f64; 3]; 33] = [
    [0.267004, 0.004874, 0.329415],
    [0.277018, 0.050344, 0.375715],
    [0.282327, 0.094955, 0.417331],
    [0.282884, 0.135920, 0.453427],
    [0.278826, 0.175490, 0.483397],
    [0.270595, 0.214069, 0.507052],
    [0.258965, 0.251537, 0.524736],
    [0.244972, 0.287675, 0.537260],
    [0.229739, 0.322361, 0.545706],
    [0.214298, 0.355619, 0.551184],
    [0.199430, 0.387607, 0.554642],
    [0.185556, 0.418570, 0.556753],
    [0.172719, 0.448791, 0.557885],
    [0.160665, 0.478540, 0.558115],
    [0.149039, 0.508051, 0.557250],
    [0.137770, 0.537492, 0.554906],
    [0.127568, 0.566949, 0.550556],
    [0.120565, 0.596422, 0.543611],
    [0.120638, 0.625828, 0.533488],
    [0.132268, 0.655014, 0.519661],
    [0.157851, 0.683765, 0.501686],
    [0.196571, 0.711827, 0.479221],
    [0.246070, 0.738910, 0.452024],
    [0.304148, 0.764704, 0.419943],
    [0.369214, 0.788888, 0.382914],
    [0.440137, 0.811138, 0.340967],
    [0.515992, 0.831158, 0.294279],
    [0.595839, 0.848717, 0.243329],
    [0.678489, 0.863742, 0.189503],
    [0.762373, 0.876424, 0.137064],
    [0.845561, 0.887322, 0.099702],
    [0.926106, 0.897330, 0.104071],
    [0.993248, 0.906157, 0.143936],
];

/// Viridis at `t` in 0…1 (clamped; NaN gives the low end), as 8-bit RGB.
pub fn viridis(t: f64) -> [u8; 3] {
    let t = if t.is_nan() { 0.0 } else { t.clamp(0.0, 1.0) };
    // Position in the 256-entry table; the sampled entries sit at 8k, the last at 255.
    let x = t * 255.0;
    let k = ((x / 8.0).floor() as usize).min(VIRIDIS.len() - 2);
    let (x0, x1) = (
        8.0 * k as f64,
        if k + 1 == 32 {
            255.0
        } else {
            8.0 * (k + 1) as f64
        },
    );
    let w = ((x - x0) / (x1 - x0)).clamp(0.0, 1.0);
    let (a, b) = (VIRIDIS[k], VIRIDIS[k + 1]);
    let c = |i: usize| ((a[i] + w * (b[i] - a[i])) * 255.0).round() as u8;
    [c(0), c(1), c(2)]
}

/// How |B| maps onto the colour map: values outside `lo..hi` are clipped to its ends.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ColourScale {
    /// Equal steps in value, from `lo` to `hi` (T).
    Linear {
        /// Value at the low end, T.
        lo: f64,
        /// Value at the high end, T.
        hi: f64,
    },
    /// Equal steps in log10 of the value, from `lo` > 0 to `hi` (T).
    Log {
        /// Value at the low end, T (> 0).
        lo: f64,
        /// Value at the high end, T.
        hi: f64,
    },
}

impl ColourScale {
    /// Low and high ends in T.
    pub fn range(&self) -> (f64, f64) {
        match *self {
            Self::Linear { lo, hi } | Self::Log { lo, hi } => (lo, hi),
        }
    }

    /// Position of `v` on the map, 0…1 (clamped).
    pub fn position(&self, v: f64) -> f64 {
        let t = match *self {
            Self::Linear { lo, hi } => (v - lo) / (hi - lo),
            Self::Log { lo, hi } => (v.max(f64::MIN_POSITIVE).ln() - lo.ln()) / (hi.ln() - lo.ln()),
        };
        if t.is_nan() {
            0.0
        } else {
            t.clamp(0.0, 1.0)
        }
    }

    /// Colour of `v`.
    pub fn colour(&self, v: f64) -> [u8; 3] {
        viridis(self.position(v))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn viridis_ends_and_middle_match_the_published_table() {
        // Entries 0, 128 and 255 of matplotlib's viridis (van der Walt, Smith & Firing 2015).
        let to8 = |c: [f64; 3]| c.map(|x| (x * 255.0).round() as u8);
        assert_eq!(viridis(0.0), to8([0.267004, 0.004874, 0.329415]));
        assert_eq!(viridis(128.0 / 255.0), to8([0.127568, 0.566949, 0.550556]));
        assert_eq!(viridis(1.0), to8([0.993248, 0.906157, 0.143936]));
    }

    #[test]
    fn viridis_lightness_rises_monotonically() {
        // Rec. 709 luma as a stand-in for lightness: it must never fall along the map.
        let luma = |c: [u8; 3]| 0.2126 * c[0] as f64 + 0.7152 * c[1] as f64 + 0.0722 * c[2] as f64;
        let mut last = -1.0;
        for i in 0..=1000 {
            let l = luma(viridis(i as f64 / 1000.0));
            assert!(l >= last - 0.6, "luma falls at {i}: {l} < {last}");
            last = l;
        }
    }

    #[test]
    fn log_scale_puts_each_decade_at_equal_steps_and_clips() {
        let s = ColourScale::Log { lo: 1e-3, hi: 1.0 };
        assert!((s.position(1e-2) - 1.0 / 3.0).abs() < 1e-12);
        assert!((s.position(1e-1) - 2.0 / 3.0).abs() < 1e-12);
        assert_eq!(s.position(1e-9), 0.0);
        assert_eq!(s.position(0.0), 0.0);
        assert_eq!(s.position(5.0), 1.0);
        let l = ColourScale::Linear { lo: 0.0, hi: 2.0 };
        assert_eq!(l.position(0.5), 0.25);
        assert_eq!(l.position(f64::NAN), 0.0);
    }
}
