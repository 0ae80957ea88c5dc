//! The part of the (r, z) plane a field map shows, and its mapping onto picture pixels.
//!
//! The picture keeps r and z at one scale (1:1). A window longer in z than in r is drawn with z
//! horizontal, so a slender rod lies along the picture's width; otherwise r is horizontal. A
//! mirrored view shows the full meridian section, −r1 … r1.

use axicore_solver::mesh::Point;

/// A window in the (r, z) half-plane, in m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Window {
    /// Smallest radius shown, m (≥ 0).
    pub r0: f64,
    /// Largest radius shown, m.
    pub r1: f64,
    /// Lowest axial position shown, m.
    pub z0: f64,
    /// Highest axial position shown, m.
    pub z1: f64,
}

impl Window {
    /// Whether `p` (r ≥ 0, z) lies inside the window, edges included.
    pub fn contains(&self, p: Point) -> bool {
        (self.r0..=self.r1).contains(&p[0]) && (self.z0..=self.z1).contains(&p[1])
    }

    /// Larger of the two side lengths, m.
    pub fn size(&self) -> f64 {
        (self.r1 - self.r0).max(self.z1 - self.z0)
    }
}

/// The window as drawn: which coordinate runs horizontally, mirroring, and the pixel grid of
/// the plotting area (pixel centres at half-integer positions).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct View {
    /// The window in the half-plane.
    pub window: Window,
    /// z runs horizontally (left to right), r vertically (upwards); else r horizontally.
    pub z_horizontal: bool,
    /// Show −r as well (full section).
    pub mirror: bool,
    /// Plotting area in pixels (width, height).
    pub pixels: (u32, u32),
}

impl View {
    /// Range of the signed radius shown: r0…r1, or −r1…r1 when mirrored.
    pub fn r_range(&self) -> (f64, f64) {
        if self.mirror {
            (-self.window.r1, self.window.r1)
        } else {
            (self.window.r0, self.window.r1)
        }
    }

    /// Horizontal and vertical world ranges (m) of the plotting area.
    pub fn ranges(&self) -> ((f64, f64), (f64, f64)) {
        let zr = (self.window.z0, self.window.z1);
        if self.z_horizontal {
            (zr, self.r_range())
        } else {
            (self.r_range(), zr)
        }
    }

    /// World extent (horizontal, vertical) in m.
    pub fn extent(&self) -> (f64, f64) {
        let ((h0, h1), (v0, v1)) = self.ranges();
        (h1 - h0, v1 - v0)
    }

    /// Metres per pixel (the same both ways).
    pub fn pixel_size(&self) -> f64 {
        self.extent().0 / self.pixels.0 as f64
    }

    /// The point (signed r, z) at continuous pixel position (x right, y down).
    pub fn world(&self, x: f64, y: f64) -> Point {
        let ((h0, h1), (v0, v1)) = self.ranges();
        let h = h0 + (h1 - h0) * x / self.pixels.0 as f64;
        let v = v1 - (v1 - v0) * y / self.pixels.1 as f64;
        if self.z_horizontal {
            [v, h]
        } else {
            [h, v]
        }
    }

    /// Continuous pixel position (x right, y down) of the point (signed r, z).
    pub fn pixel(&self, p: Point) -> (f64, f64) {
        let ((h0, h1), (v0, v1)) = self.ranges();
        let (h, v) = self.hv(p);
        (
            (h - h0) / (h1 - h0) * self.pixels.0 as f64,
            (v1 - v) / (v1 - v0) * self.pixels.1 as f64,
        )
    }

    /// Horizontal and vertical world coordinates of (signed r, z).
    pub fn hv(&self, p: Point) -> (f64, f64) {
        if self.z_horizontal {
            (p[1], p[0])
        } else {
            (p[0], p[1])
        }
    }

    /// The copies of a half-plane point that the view shows: itself, and its mirror image.
    pub fn copies(&self, p: Point) -> impl Iterator<Item = Point> {
        let mirror = self.mirror.then_some([-p[0], p[1]]);
        std::iter::once(p).chain(mirror)
    }

    /// The half-plane window the view needs evaluated (mirrored: 0…r1).
    pub fn half_plane(&self) -> Window {
        let mut w = self.window;
        if self.mirror {
            w.r0 = 0.0;
        }
        w
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn view(z_horizontal: bool, mirror: bool) -> View {
        View {
            window: Window {
                r0: 0.0,
                r1: 0.01,
                z0: -0.02,
                z1: 0.02,
            },
            z_horizontal,
            mirror,
            pixels: (400, 200),
        }
    }

    #[test]
    fn pixel_and_world_are_inverse_in_both_orientations() {
        for (zh, m) in [(true, false), (true, true), (false, false), (false, true)] {
            let v = view(zh, m);
            for p in [[0.004, -0.013], [0.0, 0.0], [0.01, 0.02]] {
                let (x, y) = v.pixel(p);
                let q = v.world(x, y);
                assert!((q[0] - p[0]).abs() < 1e-15 && (q[1] - p[1]).abs() < 1e-15);
            }
        }
    }

    #[test]
    fn z_horizontal_puts_the_axis_at_the_bottom_or_the_middle_when_mirrored() {
        assert_eq!(view(true, false).pixel([0.0, 0.0]), (200.0, 200.0));
        assert_eq!(view(true, true).pixel([0.0, 0.0]), (200.0, 100.0));
        assert_eq!(view(false, true).ranges().0, (-0.01, 0.01));
    }
}
