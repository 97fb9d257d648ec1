//! The noise of the positions of one track from differences of neighbouring samples
//! (pseudo-residuals), for the standard errors of finite differences.

use super::median;

/// Noise standard deviation of the positions of one track (`x` row-major, `dim` columns) from
/// pseudo-residuals, the construction of T. Gasser, L. Sroka and C. Jennen-Steinmetz (1986) with
/// cubic instead of linear interpolation: ε̃ᵢ = Σⱼ wⱼ xⱼ − xᵢ with w the Lagrange weights of the
/// cubic through the two samples on each side, cᵢ² = 1/(1 + Σ wⱼ²), so that cᵢ ε̃ᵢ has the
/// variance σ² of the noise. The scale is robust: σ̂ = 1.4826 × median |cᵢ ε̃ᵢ| over samples and
/// coordinates (the median absolute deviation of a normal sample, P. J. Huber, *Robust
/// Statistics*, 1981), so corners of an exact path and the odd outlier do not count. A path that
/// is locally cubic gives 0 (the linear version sees h²|r″| there). Rows with a non-finite
/// coordinate are skipped. Tracks of 3 or 4 finite rows use the linear (three-point) version; NaN
/// with fewer.
///
/// # Examples
///
/// ```
/// use osculate::uncertainty::difference_noise;
/// // A cubic in t is no noise at all; alternating ±0.1 on uniform times gives the closed form
/// // 1.4826 · (8/3) · 0.1 / √(70/36) (weights −1/6, 2/3, 2/3, −1/6 and |ε̃| = 8/3 · 0.1).
/// let t: Vec<f64> = (0..30).map(|i| i as f64 * 0.5).collect();
/// let cubic: Vec<f64> = t.iter().map(|&s| s * s * s - 2.0 * s).collect();
/// assert!(difference_noise(&t, &cubic, 1).unwrap() < 1e-9);
/// let x: Vec<f64> = (0..30).map(|i| if i % 2 == 0 { 0.1 } else { -0.1 }).collect();
/// let expected = 1.4826 * (8.0 / 3.0) * 0.1 / (70.0f64 / 36.0).sqrt();
/// assert!((difference_noise(&t, &x, 1).unwrap() - expected).abs() < 1e-12);
/// ```
pub fn difference_noise(t: &[f64], x: &[f64], dim: usize) -> crate::Result<f64> {
    use crate::batch::{scan_chunks, CHUNK, PAR_SCAN};
    use rayon::prelude::*;
    let finite = |i: &usize| x[i * dim..(i + 1) * dim].iter().all(|v| v.is_finite());
    let n = t.len();
    // Long tracks are scanned in fixed chunks of rows, in parallel; the pseudo-residuals of the
    // chunks are joined in row order, so the sequence is the one a serial scan gives.
    let chunk_of = |c: usize| c * CHUNK..((c + 1) * CHUNK).min(n);
    let chunks = n.div_ceil(CHUNK);
    // Per chunk: its number of finite rows and its last (up to) 4 finite rows.
    let all_finite = |rows: &std::ops::Range<usize>| {
        let v = &x[rows.start * dim..rows.end * dim];
        v.iter().fold(true, |a, v| a & v.is_finite())
    };
    let tally = |c: usize| {
        let rows = chunk_of(c);
        let count = if all_finite(&rows) {
            rows.len()
        } else {
            rows.clone().filter(finite).count()
        };
        let mut last = [usize::MAX; 4];
        for (slot, r) in last.iter_mut().rev().zip(rows.rev().filter(finite)) {
            *slot = r;
        }
        (count, last)
    };
    let tallies: Vec<(usize, [usize; 4])> = if n > PAR_SCAN {
        scan_chunks(n).map(|c| tally(c.start / CHUNK)).collect()
    } else {
        (0..chunks).map(tally).collect()
    };
    let m: usize = tallies.iter().map(|c| c.0).sum();
    if m < 3 {
        return Ok(f64::NAN);
    }
    let half = if m >= 5 { 2 } else { 1 };
    let width = 2 * half + 1;
    // Long tracks: every stride-th sample (a median of 8192 values is within ~1.5 % of the
    // track's; rows are still read in order so that skipped NaN rows stay skipped).
    let stride = (m - 2 * half).div_ceil(NOISE_SAMPLES).max(1);
    let cap = (m - 2 * half).div_ceil(stride) * dim;
    // Where each chunk starts: finite rows before it, and the last 4 of them (oldest first).
    let mut starts = Vec::with_capacity(chunks);
    let (mut seen, mut last) = (0usize, [usize::MAX; 4]);
    for &(count, tail) in &tallies {
        starts.push((seen, last));
        for &r in tail.iter().skip(4 - count.min(4)) {
            last.copy_within(1.., 0);
            last[3] = r;
        }
        seen += count;
    }
    // The pseudo-residuals of the sample in the middle of `win`, the last `width` finite rows
    // (oldest first) of a window of 5.
    let residual = |win: &[usize; 5], out: &mut Vec<f64>| {
        let rows = &win[5 - width..];
        let i = rows[half];
        let mut nodes = [0usize; 4];
        for (slot, &j) in nodes.iter_mut().zip(rows.iter().filter(|&&j| j != i)) {
            *slot = j;
        }
        let nodes = &nodes[..width - 1];
        let w = lagrange_weights(t, nodes, t[i]);
        let c = 1.0 / (1.0 + w[..nodes.len()].iter().map(|v| v * v).sum::<f64>()).sqrt();
        for d in 0..dim {
            let e: f64 = nodes
                .iter()
                .zip(&w)
                .map(|(&j, wj)| wj * x[j * dim + d])
                .sum::<f64>()
                - x[i * dim + d];
            out.push((c * e).abs());
        }
    };
    // A window ends at the k-th finite row (counted from 1) when k ≥ width and k − width is a
    // multiple of the stride.
    let first_end_after = |seen: usize| {
        if seen < width {
            width
        } else {
            width + (seen + 1 - width).div_ceil(stride) * stride
        }
    };
    let residuals = |c: usize| {
        let (seen, before) = starts[c];
        let rows = chunk_of(c);
        let mut out = Vec::new();
        let mut end = first_end_after(seen);
        if tallies[c].0 == rows.len() {
            // Every row finite: jump from window to window.
            while end <= seen + rows.len() {
                let k = end - seen; // rows of this chunk in the window's history
                let mut win = [0usize; 5];
                for (q, slot) in win.iter_mut().rev().enumerate() {
                    *slot = if q < k {
                        rows.start + k - 1 - q
                    } else {
                        before[3 - (q - k)]
                    };
                }
                residual(&win, &mut out);
                end += stride;
            }
            return out;
        }
        let mut win = [0usize; 5];
        win[1..].copy_from_slice(&before);
        let mut seen = seen;
        for r in rows.filter(finite) {
            win.copy_within(1.., 0);
            win[4] = r;
            seen += 1;
            if seen == end {
                residual(&win, &mut out);
                end += stride;
            }
        }
        out
    };
    let parts: Vec<Vec<f64>> = if n > PAR_SCAN {
        scan_chunks(n).map(|c| residuals(c.start / CHUNK)).collect()
    } else {
        (0..chunks).map(residuals).collect()
    };
    let mut scaled: Vec<f64> = Vec::new();
    scaled
        .try_reserve_exact(cap)
        .map_err(|_| crate::KernelError::OutOfMemory { bytes: cap * 8 })?;
    for p in parts {
        scaled.extend_from_slice(&p);
    }
    Ok(1.4826 * median(&mut scaled))
}

/// Pseudo-residuals used at most per track by [`difference_noise`].
pub const NOISE_SAMPLES: usize = 8192;

/// Lagrange weights at `s` of the polynomial through the times of rows `nodes` (2 or 4 of them):
/// one division per weight.
#[inline]
fn lagrange_weights(t: &[f64], nodes: &[usize], s: f64) -> [f64; 4] {
    let mut w = [0.0; 4];
    let k = nodes.len();
    for a in 0..k {
        let (mut num, mut den) = (1.0, 1.0);
        for b in (0..k).filter(|&b| b != a) {
            num *= s - t[nodes[b]];
            den *= t[nodes[a]] - t[nodes[b]];
        }
        w[a] = num / den;
    }
    w
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn difference_noise_is_zero_on_lines_and_unbiased_on_noise() {
        let t: Vec<f64> = (0..50).map(|i| (i as f64).powf(1.3)).collect();
        let x: Vec<f64> = t
            .iter()
            .flat_map(|&s| [2.0 * s + 1.0, -s * s * s])
            .collect();
        assert!(difference_noise(&t, &x, 2).unwrap() < 1e-9 * 50f64.powf(3.9));
        // A fixed pseudo-random sequence with sample standard deviation s: the estimate is
        // within 20 % of s (n = 4000; its relative standard error is about 2 %).
        let n = 4000;
        let t: Vec<f64> = (0..n)
            .map(|i| i as f64 + 0.3 * ((i * 37) % 7) as f64 / 7.0)
            .collect();
        let mut state = 12345u64;
        let x: Vec<f64> = (0..n)
            .map(|_| {
                state = state
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                (state >> 11) as f64 / (1u64 << 53) as f64 - 0.5
            })
            .collect();
        let mean = x.iter().sum::<f64>() / n as f64;
        let s = (x.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / n as f64).sqrt();
        assert_relative_eq!(difference_noise(&t, &x, 1).unwrap(), s, max_relative = 0.2);
        // A NaN row is skipped: the same as the compacted track.
        let mut holed = x.clone();
        holed[100] = f64::NAN;
        let (tc, xc): (Vec<f64>, Vec<f64>) = t
            .iter()
            .zip(&x)
            .enumerate()
            .filter(|&(i, _)| i != 100)
            .map(|(_, (a, b))| (*a, *b))
            .unzip();
        assert_eq!(
            difference_noise(&t, &holed, 1),
            difference_noise(&tc, &xc, 1)
        );
    }
    /// The one-pass serial scan that `difference_noise` replaced: the reference it must equal.
    fn difference_noise_serial(t: &[f64], x: &[f64], dim: usize) -> crate::Result<f64> {
        let finite = |i: &usize| x[i * dim..(i + 1) * dim].iter().all(|v| v.is_finite());
        let n = t.len();
        let m = (0..n).filter(finite).count();
        if m < 3 {
            return Ok(f64::NAN);
        }
        let half = if m >= 5 { 2 } else { 1 };
        let width = 2 * half + 1;
        // Long tracks: every stride-th sample (a median of 8192 values is within ~1.5 % of the
        // track's; rows are still read in order so that skipped NaN rows stay skipped).
        let stride = (m - 2 * half).div_ceil(NOISE_SAMPLES).max(1);
        let mut scaled = Vec::new();
        let cap = (m - 2 * half).div_ceil(stride) * dim;
        scaled
            .try_reserve_exact(cap)
            .map_err(|_| crate::KernelError::OutOfMemory { bytes: cap * 8 })?;
        // The last `width` finite rows, oldest first; the middle one is the sample tested.
        let mut win = [0usize; 5];
        let mut seen = 0;
        for r in (0..n).filter(finite) {
            win.copy_within(1.., 0);
            win[4] = r;
            seen += 1;
            if seen < width || (seen - width) % stride != 0 {
                continue;
            }
            let rows = &win[5 - width..];
            let i = rows[half];
            let mut nodes = [0usize; 4];
            for (slot, &j) in nodes.iter_mut().zip(rows.iter().filter(|&&j| j != i)) {
                *slot = j;
            }
            let nodes = &nodes[..width - 1];
            let w = lagrange_weights(t, nodes, t[i]);
            let c = 1.0 / (1.0 + w[..nodes.len()].iter().map(|v| v * v).sum::<f64>()).sqrt();
            for d in 0..dim {
                let e: f64 = nodes
                    .iter()
                    .zip(&w)
                    .map(|(&j, wj)| wj * x[j * dim + d])
                    .sum::<f64>()
                    - x[i * dim + d];
                scaled.push((c * e).abs());
            }
        }
        Ok(1.4826 * median(&mut scaled))
    }

    #[test]
    fn chunked_noise_equals_the_serial_scan_on_any_thread_count() {
        // Reference: `difference_noise_serial`; equality is bitwise. Long tracks with NaN rows
        // at chunk ends, a NaN run across a whole chunk, and tracks of 3 and 4 finite rows.
        use crate::batch::{CHUNK, PAR_SCAN};
        let n = 2 * PAR_SCAN + 3 * CHUNK + 11;
        let t: Vec<f64> = (0..n)
            .map(|i| i as f64 * 0.1 + ((i * 7) % 5) as f64 * 0.01)
            .collect();
        let mut x: Vec<f64> = (0..2 * n)
            .map(|i| ((i * 7919) % 1013) as f64 * 1e-3)
            .collect();
        for r in [0, 1, CHUNK - 1, CHUNK, 3 * CHUNK + 2, n - 1] {
            x[2 * r] = f64::NAN;
        }
        for r in 5 * CHUNK - 2..6 * CHUNK + 3 {
            x[2 * r + 1] = f64::INFINITY;
        }
        let pool = |k: usize| {
            rayon::ThreadPoolBuilder::new()
                .num_threads(k)
                .build()
                .unwrap()
        };
        let expected = difference_noise_serial(&t, &x, 2).unwrap();
        assert!(expected > 0.0);
        for threads in [1, 2, 3] {
            let got = pool(threads).install(|| difference_noise(&t, &x, 2).unwrap());
            assert_eq!(got.to_bits(), expected.to_bits());
        }
        // Few finite rows, spread over chunks of a long track.
        for keep in [vec![3, CHUNK + 5, n - 2], vec![3, 4, 2 * CHUNK + 5, n - 2]] {
            let mut sparse = vec![f64::NAN; n];
            for &r in &keep {
                sparse[r] = r as f64 * 0.5;
            }
            let (a, b) = (
                difference_noise(&t, &sparse, 1),
                difference_noise_serial(&t, &sparse, 1),
            );
            assert_eq!(a.unwrap().to_bits(), b.unwrap().to_bits());
        }
    }
}
