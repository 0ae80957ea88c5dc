//! "Did you mean" for every word a user types against a fixed list: case-file keys, shapes,
//! laws, materials and unit symbols. One helper, so all messages suggest the same way.

/// " (did you mean 'x'?)" when a known word is near `word` (see [`nearest`]), else "".
pub fn hint(word: &str, known: &[&str]) -> String {
    nearest(word, known, 2)
        .map(|k| format!(" (did you mean '{k}'?)"))
        .unwrap_or_default()
}

/// The known word nearest to `word`: a case-insensitive equal first (a word differing only in
/// case is almost always meant: "ma" for "mA"), then the smallest edit distance up to
/// `max_distance` (or a third of the known word's length, if larger). Ties go to the word whose
/// case differs least, then to the first in alphabetical order.
pub fn nearest<'a>(word: &str, known: &[&'a str], max_distance: usize) -> Option<&'a str> {
    let lower = word.to_lowercase();
    known
        .iter()
        .map(|k| {
            let d = edit_distance(&lower, &k.to_lowercase());
            (d, edit_distance(word, k), *k)
        })
        .filter(|&(d, _, k)| d <= max_distance.max(k.chars().count() / 3))
        .min()
        .map(|(_, _, k)| k)
}

/// Levenshtein distance in characters.
fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().collect();
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for i in 1..=a.len() {
        let mut cur = vec![i; b.len() + 1];
        for j in 1..=b.len() {
            let sub = prev[j - 1] + usize::from(a[i - 1] != b[j - 1]);
            cur[j] = sub.min(prev[j] + 1).min(cur[j - 1] + 1);
        }
        prev = cur;
    }
    prev[b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_word_differing_only_in_case_is_suggested_before_nearer_spellings() {
        // "ma": "mA" and "MA" are both equal ignoring case; "mA" differs in one letter only.
        assert_eq!(nearest("ma", &["A", "MA", "kA", "mA", "nA"], 1), Some("mA"));
        assert_eq!(nearest("LENGTH", &["length", "lengths"], 2), Some("length"));
    }

    #[test]
    fn far_words_get_no_suggestion() {
        assert_eq!(nearest("furlong", &["m", "mm", "km"], 1), None);
        assert_eq!(
            hint("lenght", &["length", "diameter"]),
            " (did you mean 'length'?)"
        );
        assert_eq!(hint("xyz", &["length", "diameter"]), "");
    }
}
