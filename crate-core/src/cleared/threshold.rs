//! Grey-level thresholds: Otsu's global threshold (`otsu_threshold`) over a histogram of 8-bit
//! values, and the local mean threshold (`local_mean_below`) over a square window by an
//! integral image, over
//! a region's pixels only.

/// Number of grey levels of an 8-bit image.
pub const GREY_LEVELS: usize = 256;

/// Counts of each grey level among the pixels where `keep` is true (all when `keep` is
/// `None`).
pub fn histogram(pixels: &[u8], keep: Option<&[bool]>) -> [u64; GREY_LEVELS] {
    let mut counts = [0u64; GREY_LEVELS];
    match keep {
        Some(keep) => {
            for (&value, &kept) in pixels.iter().zip(keep) {
                counts[value as usize] += u64::from(kept);
            }
        }
        None => {
            for &value in pixels {
                counts[value as usize] += 1;
            }
        }
    }
    counts
}

/// Otsu's threshold (Otsu 1979, "A threshold selection method from gray-level histograms",
/// IEEE Trans. SMC 9(1), equations 14-18): the grey level `t` that maximises the
/// between-class variance `w1(t) w2(t) (m1(t) - m2(t))^2` of the classes `<= t` and `> t`,
/// over the levels from the lowest to the highest present (empty levels between them
/// included). Ties go to the lowest level. Pixels above the threshold are one class, pixels
/// at or below it the other. `None` when the histogram is empty; the only level present when
/// there is one.
///
/// The sums are formed in the same order as scikit-image's `threshold_otsu` for integer
/// images (cumulative sums from each end in `f64`), so the two agree exactly, ties included.
pub fn otsu_threshold(counts: &[u64; GREY_LEVELS]) -> Option<u8> {
    let low = counts.iter().position(|&count| count > 0)?;
    let high = counts.iter().rposition(|&count| count > 0)?;
    if low == high {
        return Some(low as u8);
    }
    let levels = &counts[low..=high];
    let n = levels.len();
    // Cumulative counts and value sums from the low end (class 1) and the high end (class 2).
    let mut weight_low = vec![0u64; n];
    let mut sum_low = vec![0.0f64; n];
    let (mut weight, mut sum) = (0u64, 0.0f64);
    for (index, &count) in levels.iter().enumerate() {
        weight += count;
        sum += count as f64 * (low + index) as f64;
        weight_low[index] = weight;
        sum_low[index] = sum;
    }
    let mut weight_high = vec![0u64; n];
    let mut sum_high = vec![0.0f64; n];
    let (mut weight, mut sum) = (0u64, 0.0f64);
    for index in (0..n).rev() {
        weight += levels[index];
        sum += levels[index] as f64 * (low + index) as f64;
        weight_high[index] = weight;
        sum_high[index] = sum;
    }
    let mut best = (0usize, f64::NEG_INFINITY);
    for index in 0..n - 1 {
        let mean_low = sum_low[index] / weight_low[index] as f64;
        let mean_high = sum_high[index + 1] / weight_high[index + 1] as f64;
        let difference = mean_low - mean_high;
        let variance =
            (weight_low[index] * weight_high[index + 1]) as f64 * (difference * difference);
        // NaN (an empty class cannot happen at the ends, since both end levels are present)
        // never wins.
        if variance > best.1 {
            best = (index, variance);
        }
    }
    Some((low + best.0) as u8)
}

/// Marks the pixels of `region` darker than the mean of the region's pixels in the
/// `window x window` square around them minus `offset` grey levels (the square is cut at the
/// image's edges; `window` is made odd). Only the region's pixels enter the means, so a leaf's
/// edge against a bright background does not read as a vein. Sums come from integral images
/// (summed-area tables; Crow 1984, "Summed-area tables for texture mapping", SIGGRAPH), so
/// the time does not depend on the window.
pub fn local_mean_below(
    pixels: &[u8],
    region: &[bool],
    width: usize,
    height: usize,
    window: usize,
    offset: f64,
) -> Vec<bool> {
    let half = window / 2;
    let stride = width + 1;
    let mut sums = vec![0u64; stride * (height + 1)];
    let mut counts = vec![0u32; stride * (height + 1)];
    for y in 0..height {
        let (mut row_sum, mut row_count) = (0u64, 0u32);
        for x in 0..width {
            let index = y * width + x;
            if region[index] {
                row_sum += u64::from(pixels[index]);
                row_count += 1;
            }
            sums[(y + 1) * stride + x + 1] = sums[y * stride + x + 1] + row_sum;
            counts[(y + 1) * stride + x + 1] = counts[y * stride + x + 1] + row_count;
        }
    }
    let mut below = vec![false; width * height];
    for y in 0..height {
        let (y0, y1) = (y.saturating_sub(half), (y + half + 1).min(height));
        for x in 0..width {
            let index = y * width + x;
            if !region[index] {
                continue;
            }
            let (x0, x1) = (x.saturating_sub(half), (x + half + 1).min(width));
            let box_of = |table: &[u64]| {
                table[y1 * stride + x1] + table[y0 * stride + x0]
                    - table[y0 * stride + x1]
                    - table[y1 * stride + x0]
            };
            let sum = box_of(&sums);
            let count = counts[y1 * stride + x1] + counts[y0 * stride + x0]
                - counts[y0 * stride + x1]
                - counts[y1 * stride + x0];
            // The pixel itself is in the region, so count >= 1.
            below[index] = f64::from(pixels[index]) < sum as f64 / f64::from(count) - offset;
        }
    }
    below
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Two equal spikes at 10 and 200: every level from 10 to 199 splits them alike, so the
    /// first, 10, wins (ties go to the lowest level); with a third spike the split moves.
    #[test]
    fn otsu_splits_two_spikes_at_the_lower_one() {
        let mut counts = [0u64; GREY_LEVELS];
        counts[10] = 50;
        counts[200] = 50;
        assert_eq!(otsu_threshold(&counts), Some(10));
        assert_eq!(otsu_threshold(&[0; GREY_LEVELS]), None);
        let mut one = [0u64; GREY_LEVELS];
        one[77] = 3;
        assert_eq!(otsu_threshold(&one), Some(77));
    }

    /// A flat image has no pixel below its own mean; a dark dot on it does.
    #[test]
    fn local_mean_finds_a_dark_dot() {
        let mut pixels = vec![200u8; 25];
        pixels[12] = 20;
        let below = local_mean_below(&pixels, &[true; 25], 5, 5, 3, 10.0);
        assert_eq!(below.iter().filter(|&&b| b).count(), 1);
        assert!(below[12]);
    }
}
