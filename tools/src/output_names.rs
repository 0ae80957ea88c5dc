//! File-name extensions of output paths: a name that promises another format than the one
//! written is refused before any work, with the name to use.
//!
//! Why: `--vtk field.vtk` wrote a VTK XML file under the legacy format's extension, and
//! readers that choose their parser by extension then fail on it; `--svg m.csv --csv m.svg`
//! (swapped) wrote each file under the other's name.

use std::path::Path;

/// Extensions of the formats this program reads or writes; an output named with one of these
/// that is not its own is a mix-up. Other extensions (or none) are the user's choice.
const OUR_EXTENSIONS: [&str; 8] = ["vtu", "vtk", "csv", "svg", "png", "json", "toml", "txt"];

/// Checks that `path`, given with `option`, does not carry the extension of another format
/// than `expected` (lower case, without the dot; the first is the one suggested). The error
/// is one phrase naming the option, the path and the name to use.
pub fn check_extension(option: &str, path: &Path, expected: &[&str]) -> Result<(), String> {
    let Some(ext) = path.extension().and_then(|e| e.to_str()) else {
        return Ok(());
    };
    let ext = ext.to_ascii_lowercase();
    if expected.contains(&ext.as_str()) || !OUR_EXTENSIONS.contains(&ext.as_str()) {
        return Ok(());
    }
    let want = expected.first().copied().unwrap_or("");
    let renamed = path.with_extension(want);
    let why = if ext == "vtk" && want == "vtu" {
        "'.vtk' is the legacy VTK format, but this file is VTK XML (an unstructured grid)".into()
    } else {
        format!("'.{ext}' is not the format {option} writes")
    };
    Err(format!(
        "{option}: {}: {why}; name it {}",
        path.display(),
        renamed.display()
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_legacy_vtk_extension_is_refused_with_the_vtu_name() {
        let e = check_extension("--vtk", Path::new("out/field.vtk"), &["vtu"]).unwrap_err();
        assert!(e.starts_with("--vtk: out/field.vtk: "), "{e}");
        assert!(
            e.contains("legacy") && e.ends_with("name it out/field.vtu"),
            "{e}"
        );
        let e = check_extension("--vtk", Path::new("FIELD.VTK"), &["vtu"]).unwrap_err();
        assert!(e.contains("name it FIELD.vtu"), "{e}");
    }

    #[test]
    fn swapped_outputs_are_refused_but_names_of_the_users_own_pass() {
        let e = check_extension("--svg", Path::new("m.csv"), &["svg"]).unwrap_err();
        assert!(
            e.contains("'.csv' is not the format --svg writes; name it m.svg"),
            "{e}"
        );
        for (option, name, expected) in [
            ("--vtk", "field.vtu", &["vtu"][..]),
            ("--csv", "line.CSV", &["csv"][..]),
            ("--csv", "line.dat", &["csv"][..]),
            ("--csv", "line", &["csv"][..]),
            ("--picture", "map.png", &["png", "svg"][..]),
        ] {
            assert!(
                check_extension(option, Path::new(name), expected).is_ok(),
                "{name}"
            );
        }
    }
}
