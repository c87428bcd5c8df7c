//! Whole families with the machine-word paths of the Selmer stage on and
//! off (`crate::arith::word`): the typed reports must be equal, field by
//! field (local data, local images with their evidence, Selmer groups,
//! bounds, points). Test-only module.

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use crate::arith::word::set_word_paths;
    use crate::descent::{descend, DescentOptions};
    use crate::family::Family;

    fn sweep(family: &Family, options: &DescentOptions) -> usize {
        let mut compared = 0;
        for m in family.members() {
            let on = descend(&m.curve, options);
            let old = set_word_paths(false);
            let off = descend(&m.curve, options);
            set_word_paths(old);
            assert_eq!(on, off, "word paths change the descent of {}", m.line());
            compared += usize::from(on.is_ok());
        }
        compared
    }

    /// Congruent-number curves y² = x³ − n²x, square-free n ≤ 3000, first
    /// descent only; n ≤ 150 with the default options (search, 4-coverings,
    /// analytic side).
    #[test]
    fn congruent_family_same_with_and_without_words() {
        let local = DescentOptions::default().local_conditions_only();
        let f = Family::congruent_numbers(1, 3000).unwrap();
        assert_eq!(sweep(&f, &local), f.count() as usize);
        let f = Family::congruent_numbers(1, 150).unwrap();
        assert_eq!(sweep(&f, &DescentOptions::default()), f.count() as usize);
    }

    /// Every non-singular y² = x³ + ax² + bx with |a|, |b| ≤ 30 in the
    /// first descent, and |a|, |b| ≤ 8 with the default options.
    #[test]
    fn coefficient_box_same_with_and_without_words() {
        let local = DescentOptions::default().local_conditions_only();
        let f = Family::pair_box(30).unwrap();
        assert_eq!(sweep(&f, &local), f.count() as usize);
        let f = Family::pair_box(8).unwrap();
        assert_eq!(sweep(&f, &DescentOptions::default()), f.count() as usize);
    }
}
