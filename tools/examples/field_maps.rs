//! Renders the field map of every case under `cases/` into a folder, to look at them:
//! `cargo run --release -p axicore --example field_maps -- OUT_DIR [WIDTH_PX]`.
//! Writes `NAME.png`, `NAME.svg` and `NAME-full.png` (mirrored full section) per case and
//! prints the post-processing time with and without the picture.

use std::path::Path;
use std::time::Instant;

use axicore::case::parse_case;
use axicore::pipeline::{run, RunOptions};
use axicore::plot::field_map::{FieldMapOptions, PictureFormat};

fn main() {
    let mut args = std::env::args().skip(1);
    let out = args.next().expect("usage: field_maps OUT_DIR [WIDTH_PX]");
    let width: u32 = args
        .next()
        .map_or(800, |w| w.parse().expect("WIDTH_PX is a number"));
    std::fs::create_dir_all(&out).expect("cannot create OUT_DIR");
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let mut names: Vec<_> = std::fs::read_dir(&cases)
        .expect("cases/ not found")
        .filter_map(|e| e.ok())
        .filter(|e| e.path().join("case.toml").exists())
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    // FIELD_MAPS_ONLY=NAME renders one case.
    if let Ok(only) = std::env::var("FIELD_MAPS_ONLY") {
        names.retain(|n| *n == only);
    }
    for name in names {
        let file = cases.join(&name).join("case.toml");
        let text = std::fs::read_to_string(&file).unwrap();
        let case = parse_case(&text, &file.display().to_string()).unwrap();
        let plain = run(&case, &RunOptions::default()).unwrap();
        println!(
            "{name}: post-processing without a picture {:.2} s",
            plain.report.timings_s.post
        );
        for (suffix, format, mirror) in [
            ("png", PictureFormat::Png, false),
            ("svg", PictureFormat::Svg, false),
            ("full.png", PictureFormat::Png, true),
        ] {
            let opts = RunOptions {
                picture: Some(FieldMapOptions {
                    format,
                    mirror,
                    width_px: width,
                    ..Default::default()
                }),
                ..Default::default()
            };
            let t = Instant::now();
            let outcome = run(&case, &opts).unwrap();
            let total = t.elapsed().as_secs_f64();
            let bytes = outcome.picture.unwrap();
            let path = Path::new(&out).join(format!("{name}.{suffix}"));
            std::fs::write(&path, &bytes).unwrap();
            println!(
                "{name}.{suffix}: {} bytes, run with picture {total:.2} s (post {:.2} s)",
                bytes.len(),
                outcome.report.timings_s.post
            );
        }
    }
}
