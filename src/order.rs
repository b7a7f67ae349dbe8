//! Sorting the core's short lists through one instance of std's stable sort.
//!
//! Every `sort_by` on another element type or with another comparator compiles
//! its own copy of std's sort, some 3–5 KB of wasm each, and the page's size
//! budget is tight; the lists here are short (candidates, poles, noise shares,
//! trials), so the indices are ordered once, by a comparator behind a `&dyn`,
//! and the items moved into that order.
//!
//! ```
//! let mut poles: Vec<f64> = vec![3.0, -1.0, 2.0];
//! halfrail::order::sort_by(&mut poles, |a, b| a.abs().total_cmp(&b.abs()));
//! assert_eq!(poles, [-1.0, 2.0, 3.0]);
//! ```

use std::cmp::Ordering;

/// `0..n` in the order `compare` gives their items, equal ones kept in place.
fn order(n: usize, compare: &dyn Fn(usize, usize) -> Ordering) -> Vec<usize> {
    let mut indices: Vec<usize> = (0..n).collect();
    #[allow(clippy::disallowed_methods)] // the one instance
    indices.sort_by(|&a, &b| compare(a, b));
    indices
}

/// Sorts `items` by `compare`, stably: what `slice::sort_by` does.
pub fn sort_by<T>(items: &mut [T], compare: impl Fn(&T, &T) -> Ordering) {
    let from = order(items.len(), &|a, b| compare(&items[a], &items[b]));
    permute(items, from);
}

/// Sorts numbers ascending, by `f64::total_cmp`.
pub fn sort_numbers(values: &mut [f64]) {
    sort_by(values, f64::total_cmp);
}

/// Puts the item at `from[i]` at `i`, in place: each cycle of the permutation is
/// walked once, by swaps.
fn permute<T>(items: &mut [T], mut from: Vec<usize>) {
    for start in 0..items.len() {
        let mut i = start;
        while from[i] != start {
            let j = from[i];
            items.swap(i, j);
            from[i] = i;
            i = j;
        }
        from[i] = i;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn agrees_with_std_and_is_stable() {
        // A pseudo-random list with many equal keys: std's stable sort is the reference.
        let mut x: u64 = 0x2545_F491_4F6C_DD1D;
        let mut items: Vec<(u8, usize)> = (0..500)
            .map(|i| {
                x ^= x << 13;
                x ^= x >> 7;
                x ^= x << 17;
                ((x % 7) as u8, i)
            })
            .collect();
        let mut reference = items.clone();
        reference.sort_by(|a, b| a.0.cmp(&b.0));
        sort_by(&mut items, |a, b| a.0.cmp(&b.0));
        assert_eq!(items, reference);
        let mut numbers = vec![2.0, f64::NEG_INFINITY, -0.0, 0.0, 1e-300, -5.0];
        sort_numbers(&mut numbers);
        assert_eq!(format!("{numbers:?}"), "[-inf, -5.0, -0.0, 0.0, 1e-300, 2.0]");
        // Long cycles, and a list already in order.
        let mut reversed: Vec<u32> = (0..1000).rev().collect();
        sort_by(&mut reversed, u32::cmp);
        assert!(reversed.iter().enumerate().all(|(i, &v)| v == i as u32));
        sort_by(&mut reversed, u32::cmp);
        assert!(reversed.iter().enumerate().all(|(i, &v)| v == i as u32));
    }
}
