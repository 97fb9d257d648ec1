//! Rows of many tracks in the caller's order and grouped by track (the kernels' order).
//!
//! A log holds the rows of its tracks interleaved (in time order, say). The kernels want each
//! track's rows together and in time order; the caller wants results on its own rows. [`group`]
//! finds the permutation once (a stable counting sort of the track codes, then a stable sort by
//! time of any track whose rows are not yet in time order) together with its inverse, and
//! [`take_rows`] applies either of them to a column in parallel — the same gather both ways, so
//! no thread ever writes where another does.

use crate::batch::{partition, CHUNK};
use crate::error::{try_filled, KernelError, Result};
use rayon::prelude::*;

/// How the caller's rows split into tracks.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Grouping {
    /// `order[i]` is the caller row of kernel row `i`; `None` when the caller's rows are already
    /// grouped and in time order.
    pub order: Option<Vec<usize>>,
    /// `inverse[r]` is the kernel row of caller row `r` (`None` with `order`).
    pub inverse: Option<Vec<usize>>,
    /// `m + 1` row offsets of the `m` tracks in kernel order (a track may be empty).
    pub offsets: Vec<usize>,
}

/// Group rows by their track code (0 ≤ code < `n_tracks`), keeping the caller's order within a
/// track, then — with `key` (times) — putting each track's rows in order of `key` (stable, so
/// rows with equal keys keep the caller's order).
///
/// Equal to a stable lexicographic sort by (code, key), in O(n) when the rows of every track are
/// already in time order (an ordinary log with its tracks interleaved).
///
/// # Examples
///
/// ```
/// use osculate::grouping::group;
/// // Two tracks interleaved; track 1's rows arrive out of time order.
/// let g = group(&[0, 1, 0, 1], 2, Some(&[0.0, 5.0, 1.0, 4.0][..])).unwrap();
/// assert_eq!(g.order, Some(vec![0, 2, 3, 1]));
/// assert_eq!(g.inverse, Some(vec![0, 3, 1, 2]));
/// assert_eq!(g.offsets, vec![0, 2, 4]);
/// // Already grouped and in time order: no permutation at all.
/// assert_eq!(group(&[0, 0, 1], 2, Some(&[0.0, 1.0, 0.0][..])).unwrap().order, None);
/// ```
pub fn group<K: PartialOrd + Copy + Sync>(
    codes: &[i64],
    n_tracks: usize,
    key: Option<&[K]>,
) -> Result<Grouping> {
    let n = codes.len();
    if let Some(k) = key {
        if k.len() != n {
            return Err(KernelError::Shape {
                argument: "t",
                detail: format!("has {} rows but the track ids have {n}", k.len()),
            });
        }
    }
    let mut counts = try_filled(n_tracks, 0usize)?;
    for (row, &c) in codes.iter().enumerate() {
        match usize::try_from(c).ok().filter(|&c| c < n_tracks) {
            Some(c) => counts[c] += 1,
            None => {
                return Err(KernelError::Shape {
                    argument: "tracks",
                    detail: format!("row {row}: track code {c} outside 0..{n_tracks}"),
                })
            }
        }
    }
    let mut offsets = try_filled(n_tracks + 1, 0usize)?;
    for k in 0..n_tracks {
        offsets[k + 1] = offsets[k] + counts[k];
    }
    let in_order = |i: usize| match key {
        Some(k) => codes[i + 1] > codes[i] || (codes[i + 1] == codes[i] && k[i + 1] >= k[i]),
        None => codes[i + 1] >= codes[i],
    };
    if (0..n.saturating_sub(1)).all(in_order) {
        return Ok(Grouping {
            order: None,
            inverse: None,
            offsets,
        });
    }
    // Stable counting sort of the codes.
    let mut order = try_filled(n, 0usize)?;
    let mut next = counts;
    next.copy_from_slice(&offsets[..n_tracks]);
    for (row, &c) in codes.iter().enumerate() {
        let c = c as usize;
        order[next[c]] = row;
        next[c] += 1;
    }
    if let Some(k) = key {
        // Tracks whose rows are not in time order: a stable sort by time, each on its own.
        partition(&mut order[..], offsets.windows(2).map(|w| w[1] - w[0]))
            .into_par_iter()
            .for_each(|rows| {
                if rows.windows(2).any(|w| k[w[1]] < k[w[0]]) {
                    rows.sort_by(|&a, &b| {
                        k[a].partial_cmp(&k[b]).unwrap_or(std::cmp::Ordering::Equal)
                    });
                }
            });
    }
    let mut inverse = try_filled(n, 0usize)?;
    for (i, &r) in order.iter().enumerate() {
        inverse[r] = i;
    }
    Ok(Grouping {
        order: Some(order),
        inverse: Some(inverse),
        offsets,
    })
}

/// `out[i] = src[index[i]]` for rows of `width` values, in parallel; `index` must hold row
/// numbers of `src` (checked).
///
/// # Examples
///
/// ```
/// use osculate::grouping::take_rows;
/// let src = [10.0, 11.0, 20.0, 21.0, 30.0, 31.0];
/// assert_eq!(take_rows(&src, 2, &[2, 0]).unwrap(), vec![30.0, 31.0, 10.0, 11.0]);
/// assert!(take_rows(&src, 2, &[3]).is_err());
/// ```
pub fn take_rows<T: Copy + Send + Sync + Default>(
    src: &[T],
    width: usize,
    index: &[usize],
) -> Result<Vec<T>> {
    let mut out = try_filled(index.len() * width, T::default())?;
    gather_rows(src, width, index, &mut out)?;
    Ok(out)
}

/// `dst[i] = src[index[i]]` for rows of `width` values, in parallel, into a buffer of
/// `index.len() * width` values; `index` must hold row numbers of `src` (checked).
///
/// # Examples
///
/// ```
/// use osculate::grouping::gather_rows;
/// let mut dst = [0.0; 2];
/// gather_rows(&[1.0, 2.0, 3.0], 1, &[2, 0], &mut dst).unwrap();
/// assert_eq!(dst, [3.0, 1.0]);
/// assert!(gather_rows(&[1.0], 1, &[0, 0], &mut dst[..1]).is_err()); // wrong length
/// ```
pub fn gather_rows<T: Copy + Send + Sync>(
    src: &[T],
    width: usize,
    index: &[usize],
    out: &mut [T],
) -> Result<()> {
    let rows = src.len().checked_div(width).unwrap_or(0);
    if let Some(pos) = index.iter().position(|&r| r >= rows) {
        return Err(KernelError::Shape {
            argument: "index",
            detail: format!("entry {pos} is row {} of {rows}", index[pos]),
        });
    }
    if out.len() != index.len() * width {
        return Err(KernelError::Shape {
            argument: "out",
            detail: format!("has {} values, expected {}", out.len(), index.len() * width),
        });
    }
    if width == 0 {
        return Ok(());
    }
    out.par_chunks_mut(CHUNK * width)
        .zip(index.par_chunks(CHUNK))
        .for_each(|(dst, idx)| {
            if width == 1 {
                for (d, &r) in dst.iter_mut().zip(idx) {
                    *d = src[r];
                }
            } else {
                for (d, &r) in dst.chunks_exact_mut(width).zip(idx) {
                    d.copy_from_slice(&src[r * width..(r + 1) * width]);
                }
            }
        });
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Reference: a stable sort of the rows by (code, key), as numpy.lexsort((key, codes)) does.
    fn reference(codes: &[i64], key: &[f64]) -> Vec<usize> {
        let mut rows: Vec<usize> = (0..codes.len()).collect();
        rows.sort_by(|&a, &b| (codes[a], key[a]).partial_cmp(&(codes[b], key[b])).unwrap());
        rows
    }

    #[test]
    fn equals_a_stable_lexicographic_sort() {
        // A small linear congruential generator (constants from Numerical Recipes, from memory).
        let mut s: u64 = 12345;
        let mut next = || {
            s = s
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (s >> 33) as i64
        };
        for m in [1usize, 3, 17] {
            let codes: Vec<i64> = (0..500).map(|_| next() % m as i64).collect();
            // Few distinct times, so ties occur and stability matters.
            let key: Vec<f64> = (0..500).map(|_| (next() % 40) as f64).collect();
            let g = group(&codes, m, Some(&key[..])).unwrap();
            let order = g.order.clone().unwrap();
            assert_eq!(order, reference(&codes, &key));
            let inv = g.inverse.unwrap();
            assert!(order.iter().enumerate().all(|(i, &r)| inv[r] == i));
            let sorted: Vec<i64> = order.iter().map(|&r| codes[r]).collect();
            assert!(sorted.windows(2).all(|w| w[0] <= w[1]));
            assert_eq!(g.offsets[m], 500);
        }
    }

    #[test]
    fn bad_codes_are_errors() {
        assert!(group::<f64>(&[0, 2], 2, None).is_err());
        assert!(group::<f64>(&[0, -1], 2, None).is_err());
        assert!(group(&[0, 1], 2, Some(&[0.0][..])).is_err());
    }

    #[test]
    fn gather_both_ways_round_trips() {
        let codes = [1i64, 0, 1, 0, 2];
        let g = group::<f64>(&codes, 3, None).unwrap();
        let x: Vec<f64> = (0..10).map(f64::from).collect();
        let k = take_rows(&x, 2, g.order.as_ref().unwrap()).unwrap();
        assert_eq!(k, vec![2.0, 3.0, 6.0, 7.0, 0.0, 1.0, 4.0, 5.0, 8.0, 9.0]);
        assert_eq!(take_rows(&k, 2, g.inverse.as_ref().unwrap()).unwrap(), x);
    }
}
