//! The field-map picture of a solved case: a PNG of the stated size that is not blank, whose
//! colour map reaches both ends of viridis, with flux lines; a zoom that changes the picture;
//! an SVG with its title, axes in mm and the colour bar in T; the colour at the core centre
//! matching the solver's |B| there; and the same bytes for any thread count.

use axicore::case::{parse_case, Case};
use axicore::pipeline::{run, Outcome, RunOptions};
use axicore::plot::colormap::viridis;
use axicore::plot::field_map::{FieldMapOptions, MapScale, PictureFormat};
use axicore::plot::view::Window;

fn example() -> Case {
    parse_case(axicore::EXAMPLE_CASE, axicore::EXAMPLE_NAME).unwrap()
}

fn picture(case: &Case, opts: FieldMapOptions) -> Outcome {
    let opts = RunOptions {
        picture: Some(opts),
        ..Default::default()
    };
    run(case, &opts).unwrap()
}

/// Decoded 8-bit RGB picture.
struct Rgb {
    width: u32,
    height: u32,
    data: Vec<u8>,
}

impl Rgb {
    fn at(&self, x: u32, y: u32) -> [u8; 3] {
        let k = 3 * (y as usize * self.width as usize + x as usize);
        [self.data[k], self.data[k + 1], self.data[k + 2]]
    }
}

fn decode(png_bytes: &[u8]) -> Rgb {
    let decoder = png::Decoder::new(png_bytes);
    let mut reader = decoder.read_info().unwrap();
    let mut data = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut data).unwrap();
    assert_eq!(info.color_type, png::ColorType::Rgb);
    assert_eq!(info.bit_depth, png::BitDepth::Eight);
    data.truncate(info.buffer_size());
    Rgb {
        width: info.width,
        height: info.height,
        data,
    }
}

fn distance(a: [u8; 3], b: [u8; 3]) -> i32 {
    (0..3)
        .map(|i| (a[i] as i32 - b[i] as i32).abs())
        .max()
        .unwrap()
}

/// Pixels of the plotting area: the rectangle inside the thin dark frame, found as the
/// largest run of viridis-like pixels on the middle row and column.
fn plot_pixels(img: &Rgb) -> Vec<[u8; 3]> {
    // The layout puts the plotting area 66 px from the left and 64 px from the top
    // (field_map.rs); stay a few pixels inside and left of the colour bar (124 px wide).
    let mut out = Vec::new();
    for y in 68..img.height - 56 {
        for x in 70..img.width - 128 {
            out.push(img.at(x, y));
        }
    }
    out
}

#[test]
fn png_of_the_example_has_its_size_a_full_colour_range_and_flux_lines() {
    let case = example();
    let outcome = picture(&case, FieldMapOptions::default());
    let img = decode(outcome.picture.as_ref().unwrap());
    assert_eq!(img.width, 800);
    assert!((250..=1200).contains(&img.height), "height {}", img.height);
    let plot = plot_pixels(&img);
    let mut colours: Vec<[u8; 3]> = plot.clone();
    colours.sort();
    colours.dedup();
    assert!(
        colours.len() > 200,
        "only {} colours: blank picture",
        colours.len()
    );
    // Both ends of the map are used: the field spans the 3 decades of the log scale.
    let near = |c: [u8; 3]| plot.iter().filter(|&&p| distance(p, c) <= 6).count();
    let (low, high) = (near(viridis(0.0)), near(viridis(1.0)));
    assert!(low > 100, "{low} pixels at the low end of the map");
    assert!(high > 100, "{high} pixels at the high end of the map");
    // Flux lines are drawn white over dark colours and near-black over light ones; viridis
    // has neither (its darkest red is 68, its lightest blue 37 at full red and green).
    let white = plot.iter().filter(|p| p.iter().all(|&c| c >= 200)).count();
    let black = plot.iter().filter(|p| p.iter().all(|&c| c <= 40)).count();
    assert!(white > 500, "{white} white flux-line pixels");
    assert!(black > 100, "{black} dark flux-line pixels");
}

#[test]
fn a_zoomed_and_a_mirrored_picture_differ_from_the_default() {
    let case = example();
    let base = picture(&case, FieldMapOptions::default()).picture.unwrap();
    let zoom = FieldMapOptions {
        window: Some(Window {
            r0: 0.0,
            r1: 0.008,
            z0: 0.025,
            z1: 0.045,
        }),
        ..Default::default()
    };
    let zoomed = picture(&case, zoom).picture.unwrap();
    assert_ne!(base, zoomed);
    let z = decode(&zoomed);
    assert_eq!(z.width, 800);
    let mirrored = FieldMapOptions {
        mirror: true,
        ..Default::default()
    };
    let m = decode(&picture(&case, mirrored).picture.unwrap());
    let b = decode(&base);
    assert!(
        m.height > b.height,
        "the full section is taller: {} vs {}",
        m.height,
        b.height
    );
}

#[test]
fn svg_carries_title_axes_in_mm_and_the_colour_bar_in_tesla() {
    let case = example();
    let opts = FieldMapOptions {
        format: PictureFormat::Svg,
        ..Default::default()
    };
    let svg = String::from_utf8(picture(&case, opts).picture.unwrap()).unwrap();
    assert!(svg.starts_with("<svg"), "{}", &svg[..60.min(svg.len())]);
    assert!(svg.trim_end().ends_with("</svg>"));
    assert!(svg.contains("small-satellite torquer rod"), "title missing");
    assert!(
        svg.contains("z / mm") && svg.contains("r / mm"),
        "axis names missing"
    );
    assert!(svg.contains("|B| / T"), "colour bar label missing");
    // Plotters writes each text on its own line between the tags.
    assert!(
        svg.contains("\n0.01\n") && svg.contains("\n0.001\n"),
        "colour bar ticks missing"
    );
    assert!(
        svg.contains("1200 turns at 40 mA"),
        "operating current missing"
    );
    assert!(
        svg.contains("data:image/png;base64,"),
        "colour map image missing"
    );
    assert!(svg.contains("<polyline"), "flux lines missing");
    // A tick label in mm on the z axis: the rod is 70 mm long, the window reaches past ±35 mm.
    assert!(
        svg.contains("\n20\n") && svg.contains("\n-20\n"),
        "z ticks missing"
    );
}

#[test]
fn colour_at_the_core_centre_is_that_of_the_solved_field() {
    let case = example();
    // A linear scale from 0 to a fixed top, so the colour encodes |B| directly.
    let top = 1.0;
    let opts = FieldMapOptions {
        scale: MapScale::Linear,
        b_max_t: Some(top),
        window: Some(Window {
            r0: 0.0,
            r1: 0.02,
            z0: -0.04,
            z1: 0.04,
        }),
        ..Default::default()
    };
    let outcome = picture(&case, opts);
    let img = decode(outcome.picture.as_ref().unwrap());
    let b = outcome.report.core.as_ref().unwrap().b_centre_T;
    assert!(b > 0.05 && b < top, "core centre |B| = {b} T");
    // The window is 80 mm in z across the plotting area (800 − 66 − 124 = 610 px); z = 0 lies at
    // its middle, r = 0 on its lower edge: take the pixel 0.5 mm above the axis.
    let pw = 800 - 66 - 124;
    let ph = img.height - 64 - 52;
    let x = 66 + pw / 2;
    let px_per_mm = pw as f64 / 80.0;
    let y = 64 + ph - (0.5 * px_per_mm).round() as u32;
    let got = img.at(x, y);
    let expected = viridis(b / top);
    assert!(
        distance(got, expected) <= 4,
        "pixel {got:?} against {expected:?} for |B| = {b} T"
    );
}

#[test]
fn picture_bytes_do_not_depend_on_the_thread_count() {
    let case = example();
    let one = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap();
    let two = rayon::ThreadPoolBuilder::new()
        .num_threads(2)
        .build()
        .unwrap();
    let a = one.install(|| picture(&case, FieldMapOptions::default()).picture.unwrap());
    let b = two.install(|| picture(&case, FieldMapOptions::default()).picture.unwrap());
    assert!(a == b, "PNG differs between 1 and 2 threads");
}

#[test]
fn bad_picture_options_are_refused_before_drawing() {
    let case = example();
    let bad = [
        FieldMapOptions {
            width_px: 10,
            ..Default::default()
        },
        FieldMapOptions {
            flux_lines: 0,
            ..Default::default()
        },
        FieldMapOptions {
            window: Some(Window {
                r0: 0.0,
                r1: -1.0,
                z0: 0.0,
                z1: 1.0,
            }),
            ..Default::default()
        },
        FieldMapOptions {
            window: Some(Window {
                r0: 5.0,
                r1: 6.0,
                z0: 5.0,
                z1: 6.0,
            }),
            ..Default::default()
        },
    ];
    for opts in bad {
        assert!(
            opts.validate().is_err() || {
                let r = RunOptions {
                    picture: Some(opts.clone()),
                    ..Default::default()
                };
                run(&case, &r).is_err()
            },
            "{opts:?} accepted"
        );
    }
    assert!(PictureFormat::from_path("map.jpg".as_ref()).is_err());
    assert_eq!(
        PictureFormat::from_path("map.SVG".as_ref()).unwrap(),
        PictureFormat::Svg
    );
}
