//! One small in-place sort for the crate (heapsort: O(n log n) comparisons, no allocation, not
//! stable), used instead of the standard library's sorts.
//!
//! Each generic standard sort a module calls is compiled in full for its element type and
//! comparison: three of them (a spot's members, a convex hull's points, an unknown field's list
//! of names) took 10.5 KB of the page's size-tuned module, and with the Monte Carlo summary's and
//! the simplex's two more, 42 KB of the design worker's speed-tuned one (measured by
//! `scripts/build-web.sh` before and after); this takes a few hundred bytes per use. Its callers
//! order totally (ties broken by an index where equal keys could occur), so its instability never
//! shows and the simplex visits its vertices as the stable sort did. The algorithm is J. W. J.
//! Williams's heapsort with R. W. Floyd's heap construction (Commun. ACM 7, 347 and 701 (1964));
//! n is at most a few tens of thousands (a Monte Carlo run's samples).

/// Sorts `v` ascending by `less` (a strict weak order: `less(a, b)` when `a` goes before `b`).
pub(crate) fn sort_by_less<T>(v: &mut [T], less: impl Fn(&T, &T) -> bool) {
    let sift = |v: &mut [T], mut root: usize, end: usize| loop {
        let mut child = 2 * root + 1;
        if child >= end {
            return;
        }
        if child + 1 < end && less(&v[child], &v[child + 1]) {
            child += 1;
        }
        if !less(&v[root], &v[child]) {
            return;
        }
        v.swap(root, child);
        root = child;
    };
    let n = v.len();
    for start in (0..n / 2).rev() {
        sift(v, start, n);
    }
    for end in (1..n).rev() {
        v.swap(0, end);
        sift(v, 0, end);
    }
}

#[cfg(test)]
mod tests {
    use super::sort_by_less;

    /// Against the standard library's sort on pseudo-random keys with many repeats, every length
    /// up to 64 (the ends of the heap's index arithmetic), and on sorted and reversed input.
    #[test]
    fn orders_as_the_standard_sort_does() {
        let mut state = 12345u64;
        for n in 0..=64usize {
            let mut v: Vec<(u32, usize)> = (0..n)
                .map(|i| {
                    state = state
                        .wrapping_mul(6364136223846793005)
                        .wrapping_add(1442695040888963407);
                    ((state >> 60) as u32, i)
                })
                .collect();
            let mut want = v.clone();
            want.sort();
            sort_by_less(&mut v, |a, b| a < b);
            assert_eq!(v, want, "length {n}");
            let mut up: Vec<usize> = (0..n).collect();
            sort_by_less(&mut up, |a, b| a < b);
            assert!(up.windows(2).all(|w| w[0] < w[1]));
            let mut down: Vec<usize> = (0..n).rev().collect();
            sort_by_less(&mut down, |a, b| a < b);
            assert_eq!(down, up);
        }
    }
}
