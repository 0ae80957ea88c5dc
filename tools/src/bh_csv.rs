//! B–H curves as CSV text: two columns, H in A/m and B in T, one point per line.
//!
//! A first line that is not numeric is taken as a header; blank lines and lines starting with
//! `#` are skipped; commas, semicolons or whitespace separate the columns.

/// Parses the points `[H, B]`; the error names the line and what is wrong with it.
pub fn parse(text: &str) -> Result<Vec<[f64; 2]>, String> {
    Ok(parse_rows(text)?.into_iter().map(|(_, p)| p).collect())
}

/// Parses the points with the 1-based line number each came from (for faults found later).
pub fn parse_rows(text: &str) -> Result<Vec<(usize, [f64; 2])>, String> {
    let mut points = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let line = raw.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let cols: Vec<&str> = line
            .split(|c: char| c == ',' || c == ';' || c.is_whitespace())
            .filter(|c| !c.is_empty())
            .collect();
        let nums: Vec<Option<f64>> = cols.iter().map(|c| c.parse::<f64>().ok()).collect();
        if points.is_empty() && nums.iter().any(Option::is_none) && i == first_data_line(text) {
            continue; // header
        }
        match nums.as_slice() {
            [Some(h), Some(b)] if h.is_finite() && b.is_finite() => points.push((i + 1, [*h, *b])),
            _ => {
                if let Some(fix) = decimal_comma_fix(line) {
                    return Err(format!(
                        "line {}: '{line}' looks like ';' between columns and ',' as decimal point: write '{fix}' (',' between the columns, '.' as decimal point)",
                        i + 1
                    ));
                }
                // At most 60 characters of the line: the message stays one readable line.
                let shown: String = line.chars().take(60).collect();
                let more = if line.chars().count() > 60 { "…" } else { "" };
                return Err(format!(
                    "line {}: expected two numbers 'H [A/m], B [T]', found '{shown}{more}'",
                    i + 1
                ));
            }
        }
    }
    if points.is_empty() {
        return Err("no data lines".into());
    }
    Ok(points)
}

/// The line rewritten with '.' decimals and ',' between columns, if it reads as exactly two
/// numbers once its columns are split at ';', tabs or spaces and its commas made points
/// (a spreadsheet export in a locale with decimal commas: "10;0,5").
fn decimal_comma_fix(line: &str) -> Option<String> {
    if !line.contains(',') {
        return None;
    }
    let cols: Vec<String> = line
        .split(|c: char| c == ';' || c.is_whitespace())
        .filter(|c| !c.is_empty())
        .map(|c| c.replace(',', "."))
        .collect();
    let ok = cols.len() == 2
        && cols
            .iter()
            .all(|c| c.parse::<f64>().is_ok_and(f64::is_finite));
    ok.then(|| cols.join(","))
}

/// Index of the first line that is neither blank nor a comment.
fn first_data_line(text: &str) -> usize {
    text.lines()
        .position(|l| {
            let l = l.trim();
            !l.is_empty() && !l.starts_with('#')
        })
        .unwrap_or(0)
}

/// Writes points as CSV with a header.
pub fn write(points: &[[f64; 2]]) -> String {
    let mut out = String::from("H_A_per_m,B_T\n");
    for p in points {
        out.push_str(&format!("{:e},{:e}\n", p[0], p[1]));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_header_comments_and_mixed_separators() {
        let t = "# steel\nH_A_per_m, B_T\n0,0\n100; 0.5\n\n1000 1.2\n";
        assert_eq!(
            parse(t).unwrap(),
            vec![[0.0, 0.0], [100.0, 0.5], [1000.0, 1.2]]
        );
    }

    #[test]
    fn names_the_bad_line() {
        let e = parse("0,0\n100,abc\n").unwrap_err();
        assert!(e.contains("line 2"), "{e}");
        assert!(parse("0,0,1\n").is_err());
        assert!(parse("# only a comment\n").is_err());
    }

    #[test]
    fn semicolons_with_decimal_commas_are_explained_with_the_fix() {
        let e = parse("H;B\n0;0\n10;0,5\n").unwrap_err();
        assert!(e.contains("line 3"), "{e}");
        assert!(e.contains("write '10,0.5'"), "{e}");
        let e = parse("0\t0\n10\t0,5\n").unwrap_err();
        assert!(e.contains("write '10,0.5'"), "{e}");
        // Three plain numbers are three columns, not a decimal comma.
        let e = parse("0,0,1\n").unwrap_err();
        assert!(!e.contains("decimal point"), "{e}");
    }

    #[test]
    fn rows_keep_their_line_numbers() {
        let rows = parse_rows("# c\nH,B\n0,0\n\n5,0.2\n").unwrap();
        assert_eq!(rows, vec![(3, [0.0, 0.0]), (5, [5.0, 0.2])]);
    }

    #[test]
    fn write_then_parse_round_trips() {
        let p = vec![[0.0, 0.0], [12.5, 0.25], [1e4, 1.9]];
        assert_eq!(parse(&write(&p)).unwrap(), p);
    }
}
