//! `DrawOrder`: the raster's copy of the screen entries (`DrawLine`: ends, width, index) in an
//! order where neighbours lie close together, kept up to date as entries are appended and
//! their widths change, without sorting everything again.
//!
//! The order is a function of the entries alone: entries are bucketed by the cell of an
//! absolute square grid that holds their midpoints, whose side is the smallest power of two
//! that spans the midpoints' bounding box in at most `GRID_CELLS` cells; buckets come row by
//! row, and each holds its entries by increasing index. An entry appended with a higher index
//! joins the end of its bucket, so appending gives the order built afresh, unless the side
//! changes (the box has doubled), which rebuilds it.

use std::collections::HashMap;
use std::hash::{BuildHasherDefault, Hasher};

/// One entry as the raster reads it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DrawLine {
    /// `x0, y0, x1, y1`, physical units.
    pub ends: [f32; 4],
    /// Drawn width, physical units.
    pub width: f32,
    /// The entry's index (for its colour).
    pub index: u32,
}

/// Grid cells across the wider side of the midpoints' box at most: small enough that a bucket
/// holds many lines, fine enough that consecutive lines touch nearby pixels.
const GRID_CELLS: f64 = 128.0;

/// The bucket of entries whose midpoint is not finite: drawn last.
const NOT_FINITE: (i64, i64) = (i64::MAX, i64::MAX);

/// Where the raster stands in a `DrawOrder`: the next bucket (position in the drawing order)
/// and the next line in it.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct DrawCursor {
    bucket: usize,
    line: usize,
}

/// The entries in drawing order (see the module comment).
#[derive(Default)]
pub struct DrawOrder {
    /// Side of a grid cell in physical units (a power of two); 0 before any finite midpoint.
    side: f64,
    /// Bounding box of the finite midpoints: `low_x, low_y, high_x, high_y`.
    bounds: Option<[f64; 4]>,
    /// Lines of each bucket, by increasing index.
    buckets: Vec<Vec<DrawLine>>,
    /// Grid cell `(row, column)` of each bucket.
    keys: Vec<(i64, i64)>,
    /// Buckets in drawing order (by key, row by row).
    sorted: Vec<u32>,
    bucket_of: HashMap<(i64, i64), u32, BuildHasherDefault<KeyHasher>>,
    /// `(bucket, position in it)` of each entry placed so far.
    place: Vec<(u32, u32)>,
}

impl DrawOrder {
    /// Number of entries placed.
    pub fn len(&self) -> usize {
        self.place.len()
    }

    /// Whether no entry is placed.
    pub fn is_empty(&self) -> bool {
        self.place.is_empty()
    }

    /// Forgets every entry, keeping the allocations that can be kept.
    pub fn clear(&mut self) {
        self.side = 0.0;
        self.bounds = None;
        self.buckets.clear();
        self.keys.clear();
        self.sorted.clear();
        self.bucket_of.clear();
        self.place.clear();
    }

    /// Places the entries from `len()` on (`ends`: four per entry, `widths`: one per entry):
    /// the order is then what `rebuild` gives for every entry.
    pub fn extend(&mut self, ends: &[f32], widths: &[f32]) {
        let count = widths.len().min(ends.len() / 4);
        let first = self.place.len();
        if first >= count {
            return;
        }
        let mut bounds = self.bounds;
        for index in first..count {
            if let Some([x, y]) = midpoint(ends, index) {
                bounds = Some(match bounds {
                    None => [x, y, x, y],
                    Some([low_x, low_y, high_x, high_y]) => [
                        if x < low_x { x } else { low_x },
                        if y < low_y { y } else { low_y },
                        if x > high_x { x } else { high_x },
                        if y > high_y { y } else { high_y },
                    ],
                });
            }
        }
        if side_for(bounds) != self.side {
            self.rebuild(ends, widths);
            return;
        }
        self.bounds = bounds;
        for index in first..count {
            self.place_entry(ends, widths, index);
        }
    }

    /// Places every entry afresh.
    pub fn rebuild(&mut self, ends: &[f32], widths: &[f32]) {
        self.clear();
        let count = widths.len().min(ends.len() / 4);
        let mut bounds: Option<[f64; 4]> = None;
        for index in 0..count {
            if let Some([x, y]) = midpoint(ends, index) {
                bounds = Some(match bounds {
                    None => [x, y, x, y],
                    Some([low_x, low_y, high_x, high_y]) => [
                        if x < low_x { x } else { low_x },
                        if y < low_y { y } else { low_y },
                        if x > high_x { x } else { high_x },
                        if y > high_y { y } else { high_y },
                    ],
                });
            }
        }
        self.bounds = bounds;
        self.side = side_for(bounds);
        for index in 0..count {
            self.place_entry(ends, widths, index);
        }
    }

    /// Sets the width of entry `index`, if it is placed.
    pub fn set_width(&mut self, index: usize, width: f32) {
        if let Some(&(bucket, line)) = self.place.get(index) {
            self.buckets[bucket as usize][line as usize].width = width;
        }
    }

    /// Every line in drawing order.
    pub fn lines(&self) -> impl Iterator<Item = &DrawLine> + '_ {
        self.sorted
            .iter()
            .flat_map(move |&bucket| self.buckets[bucket as usize].iter())
    }

    /// The cursor `count` lines past `cursor` (or at the end), and how many lines lie between.
    pub fn advance(&self, cursor: DrawCursor, count: usize) -> (DrawCursor, usize) {
        let mut cursor = cursor;
        let mut done = 0;
        while done < count && cursor.bucket < self.sorted.len() {
            let length = self.buckets[self.sorted[cursor.bucket] as usize].len();
            let end = length.min(cursor.line.saturating_add(count - done));
            done += end - cursor.line.min(end);
            cursor.line = end;
            if cursor.line >= length {
                cursor.bucket += 1;
                cursor.line = 0;
            }
        }
        (cursor, done)
    }

    /// The lines from cursor `start` up to cursor `end` (from `advance`), in drawing order, as
    /// runs of consecutive lines of one bucket each.
    pub fn runs_between(
        &self,
        start: DrawCursor,
        end: DrawCursor,
        mut run: impl FnMut(&[DrawLine]),
    ) {
        let last = end.bucket.min(self.sorted.len().saturating_sub(1));
        for position in start.bucket..=last {
            let Some(&bucket) = self.sorted.get(position) else {
                break;
            };
            let lines = &self.buckets[bucket as usize];
            let from = if position == start.bucket {
                start.line
            } else {
                0
            };
            let to = if position == end.bucket {
                end.line.min(lines.len())
            } else {
                lines.len()
            };
            if from < to {
                run(&lines[from..to]);
            }
        }
    }

    fn place_entry(&mut self, ends: &[f32], widths: &[f32], index: usize) {
        let key = match midpoint(ends, index) {
            Some([x, y]) if self.side > 0.0 => (
                libm::floor(y / self.side) as i64,
                libm::floor(x / self.side) as i64,
            ),
            _ => NOT_FINITE,
        };
        let bucket = match self.bucket_of.get(&key) {
            Some(&bucket) => bucket,
            None => {
                let bucket = self.buckets.len() as u32;
                self.buckets.push(Vec::new());
                self.keys.push(key);
                self.bucket_of.insert(key, bucket);
                let keys = &self.keys;
                let at = self
                    .sorted
                    .partition_point(|&other| keys[other as usize] < key);
                self.sorted.insert(at, bucket);
                bucket
            }
        };
        let lines = &mut self.buckets[bucket as usize];
        self.place.push((bucket, lines.len() as u32));
        let at = 4 * index;
        lines.push(DrawLine {
            ends: [ends[at], ends[at + 1], ends[at + 2], ends[at + 3]],
            width: widths[index],
            index: index as u32,
        });
    }
}

/// A multiplicative hash of grid cells (Fibonacci hashing, Knuth, TAOCP vol. 3, 6.4): the
/// keys are small integers that no one chooses, so the default hasher's defence against
/// chosen keys buys nothing here.
#[derive(Default)]
struct KeyHasher(u64);

impl Hasher for KeyHasher {
    fn finish(&self) -> u64 {
        self.0
    }

    fn write(&mut self, bytes: &[u8]) {
        for &byte in bytes {
            self.write_u64(u64::from(byte));
        }
    }

    fn write_i64(&mut self, value: i64) {
        self.write_u64(value as u64);
    }

    fn write_u64(&mut self, value: u64) {
        self.0 = (self.0.rotate_left(29) ^ value).wrapping_mul(0x9e37_79b9_7f4a_7c15);
    }
}

/// The midpoint of entry `index`, if finite.
fn midpoint(ends: &[f32], index: usize) -> Option<[f64; 2]> {
    let at = 4 * index;
    let x = (ends[at] as f64 + ends[at + 2] as f64) * 0.5;
    let y = (ends[at + 1] as f64 + ends[at + 3] as f64) * 0.5;
    (x.is_finite() && y.is_finite()).then_some([x, y])
}

/// The grid side for midpoints within `bounds`: the smallest power of two `2^k` (k from -60 to
/// 60) with the wider span at most `GRID_CELLS` sides; 0 without bounds.
fn side_for(bounds: Option<[f64; 4]>) -> f64 {
    let Some([low_x, low_y, high_x, high_y]) = bounds else {
        return 0.0;
    };
    let span = if high_x - low_x > high_y - low_y {
        high_x - low_x
    } else {
        high_y - low_y
    };
    let mut side = libm::ldexp(1.0, -60);
    while span > side * GRID_CELLS && side < libm::ldexp(1.0, 60) {
        side *= 2.0;
    }
    side
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A line's fields by their bits (a NaN end equals itself).
    fn bits(line: &DrawLine) -> ([u32; 4], u32, u32) {
        (
            line.ends.map(f32::to_bits),
            line.width.to_bits(),
            line.index,
        )
    }

    /// Ends of `count` short lines along a spiral (the box grows as lines are added).
    fn spiral(count: usize) -> (Vec<f32>, Vec<f32>) {
        let mut ends = Vec::new();
        for index in 0..count {
            let angle = index as f32 * 0.37;
            let radius = 0.05 * index as f32;
            let (x, y) = (radius * angle.cos(), radius * angle.sin());
            ends.extend_from_slice(&[x, y, x + 0.3, y - 0.2]);
        }
        ends.extend_from_slice(&[f32::NAN, 0.0, 1.0, 1.0]);
        let widths = (0..=count).map(|index| index as f32 * 0.01).collect();
        (ends, widths)
    }

    /// Appended a few at a time, the order equals the one built afresh, entry for entry, and
    /// holds every entry once; lines of one bucket come by increasing index.
    #[test]
    fn appending_gives_the_order_built_afresh() {
        let (ends, widths) = spiral(3000);
        let mut fresh = DrawOrder::default();
        fresh.rebuild(&ends, &widths);
        let mut grown = DrawOrder::default();
        let mut count = 0;
        for step in [1usize, 2, 5, 40, 300, 7, 1000, 1646] {
            count += step;
            grown.extend(&ends[..4 * count], &widths[..count]);
            let mut partial = DrawOrder::default();
            partial.rebuild(&ends[..4 * count], &widths[..count]);
            assert!(
                grown.lines().map(bits).eq(partial.lines().map(bits)),
                "after {count} entries"
            );
        }
        assert_eq!(count, 3001);
        assert!(grown.lines().map(bits).eq(fresh.lines().map(bits)));
        let mut seen: Vec<u32> = grown.lines().map(|line| line.index).collect();
        assert_eq!(
            seen.last(),
            Some(&3000),
            "the non-finite midpoint comes last"
        );
        seen.sort_unstable();
        assert!(seen.iter().copied().eq(0..3001));
    }

    /// Widths set after placing reach the lines; a cursor visits every line once, in order,
    /// whatever the slice.
    #[test]
    fn widths_follow_and_cursors_visit_in_order() {
        let (ends, mut widths) = spiral(500);
        let mut order = DrawOrder::default();
        order.extend(&ends, &widths);
        widths[17] = 9.0;
        order.set_width(17, 9.0);
        let all: Vec<_> = order.lines().map(bits).collect();
        assert!(order
            .lines()
            .any(|line| line.index == 17 && line.width == 9.0));
        for slice in [1usize, 3, 64, 1000] {
            let mut cursor = DrawCursor::default();
            let mut visited = Vec::new();
            loop {
                let (next, count) = order.advance(cursor, slice);
                if count == 0 {
                    break;
                }
                let before = visited.len();
                order.runs_between(cursor, next, |run| visited.extend(run.iter().map(bits)));
                assert_eq!(visited.len() - before, count);
                cursor = next;
            }
            assert_eq!(visited, all, "slices of {slice}");
        }
    }
}
