//! "Did you mean" suggestions by edit distance.

pub fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut cur = vec![i + 1; b.len() + 1];
        for (j, &cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != cb);
            cur[j + 1] = sub.min(prev[j + 1] + 1).min(cur[j] + 1);
        }
        prev = cur;
    }
    prev[b.len()]
}

/// The closest candidate within a distance that still reads as a typo.
pub fn closest<'a>(word: &str, candidates: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    // Short names are one edit away from everything: only a case slip counts there.
    let n = word.chars().count();
    let limit = if n >= 3 { (n / 3).max(1) } else { 0 };
    candidates
        .into_iter()
        .map(|c| (edit_distance(&word.to_lowercase(), &c.to_lowercase()), c))
        .filter(|&(d, _)| d <= limit)
        .min()
        .map(|(_, c)| c)
}

#[cfg(test)]
mod tests {
    #[test]
    fn typos_find_their_word() {
        assert_eq!(super::closest("thetta", ["theta", "tau", "genus"]), Some("theta"));
        assert_eq!(super::closest("gens", ["theta", "tau", "genus"]), Some("genus"));
        assert_eq!(super::closest("zzzzzz", ["theta", "tau"]), None);
    }
}
