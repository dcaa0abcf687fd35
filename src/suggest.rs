//! Did-you-mean: the one place that decides whether a mistyped word is close
//! enough to a known one to suggest it.
//!
//! Used for design-file keys, tables and choices, rule profile names, sweep
//! keys and metrics, and starter template names. The distance is the
//! Damerau-Levenshtein edit distance (insertions, deletions, substitutions
//! and swaps of neighbouring characters, counted in characters): a
//! candidate is close enough when at most `max(2, len / 3)` edits away,
//! where `len` is the candidate's length in bytes.
//!
//! ```
//! use coilwright::suggest::closest;
//! let keys = ["trace_width", "clearance", "layers"];
//! assert_eq!(closest("trace_widht", keys), Some("trace_width"));
//! assert_eq!(closest("colour", keys), None);
//! ```

/// The candidate nearest to `word`, if it is close enough to be a typo of
/// it; the first of equally near candidates.
pub fn closest<'c>(word: &str, candidates: impl IntoIterator<Item = &'c str>) -> Option<&'c str> {
    candidates
        .into_iter()
        .map(|c| (strsim::damerau_levenshtein(word, c), c))
        .filter(|(d, c)| *d <= 2.max(c.len() / 3))
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c)
}

#[cfg(test)]
mod tests {
    use super::closest;

    #[test]
    fn typos_are_found_and_strangers_are_not() {
        let names = ["standard", "fine", "cautious"];
        assert_eq!(closest("standart", names), Some("standard"));
        assert_eq!(closest("standrd", names), Some("standard"));
        assert_eq!(closest("zzz", names), None);
        let metrics = ["temperature_c", "force_n", "trace_length_mm"];
        assert_eq!(closest("tempreature_c", metrics), Some("temperature_c"));
        assert_eq!(closest("forse_n", metrics), Some("force_n"));
        assert_eq!(closest("trace_lenght_mm", metrics), Some("trace_length_mm"));
    }

    #[test]
    fn the_first_of_equals_wins() {
        assert_eq!(closest("ab", ["ax", "ay"]), Some("ax"));
        assert_eq!(closest("x", std::iter::empty()), None);
    }
}
