//! `SegmentGrid`: a uniform grid of buckets over the lattice listing, per bucket, the segments
//! whose bounding box touches it, so plane growth tests a new segment only against the segments
//! that share a bucket with it.
//!
//! Two segments that meet share a point, which lies in both bounding boxes, so both are listed
//! in the bucket holding that point: searching the buckets of the new segment's bounding box
//! finds every segment it could meet. A segment is named by its upstream node (segments run
//! `node -> parent`); a node listed again after its parent changed (a split) is harmless, since
//! the test reads the node's current segment.

/// Lattice cells per bucket side (a power of two). Segments of the common search radii (up to
/// a few cells) touch one to four buckets, and a bucket lists a few dozen segments.
const BUCKET_SHIFT: u32 = 1;

/// End of a bucket's list.
const END: u32 = u32::MAX;

/// Buckets of segments (see the module comment).
pub(crate) struct SegmentGrid {
    columns: usize,
    rows: usize,
    /// First entry of each bucket's list, row-major; `END` when empty.
    head: Vec<u32>,
    /// `(node, next entry)` per entry.
    entries: Vec<(u32, u32)>,
}

impl SegmentGrid {
    /// An empty grid over a lattice of `width` x `height` cells.
    pub fn new(width: u32, height: u32) -> SegmentGrid {
        let columns = ((width as usize) >> BUCKET_SHIFT) + 1;
        let rows = ((height as usize) >> BUCKET_SHIFT) + 1;
        SegmentGrid {
            columns,
            rows,
            head: vec![END; columns * rows],
            entries: Vec::new(),
        }
    }

    /// Lists the segment of `node` from `(x0, y0)` to `(x1, y1)` (cells) in every bucket its
    /// bounding box touches.
    pub fn insert(&mut self, node: u32, (x0, y0): (f64, f64), (x1, y1): (f64, f64)) {
        let (first_column, last_column) = self.column_span(x0.min(x1), x0.max(x1));
        let (first_row, last_row) = self.row_span(y0.min(y1), y0.max(y1));
        for row in first_row..=last_row {
            for column in first_column..=last_column {
                let bucket = row * self.columns + column;
                let entry = self.entries.len() as u32;
                self.entries.push((node, self.head[bucket]));
                self.head[bucket] = entry;
            }
        }
    }

    /// Calls `visit` with every node listed in a bucket touched by the box `[x0, x1] x [y0,
    /// y1]` (cells), until it returns true; whether one did. A node may come more than once.
    pub fn any_near(
        &self,
        (x0, x1): (f64, f64),
        (y0, y1): (f64, f64),
        mut visit: impl FnMut(u32) -> bool,
    ) -> bool {
        let (first_column, last_column) = self.column_span(x0, x1);
        let (first_row, last_row) = self.row_span(y0, y1);
        for row in first_row..=last_row {
            for column in first_column..=last_column {
                let mut entry = self.head[row * self.columns + column];
                while entry != END {
                    let (node, next) = self.entries[entry as usize];
                    if visit(node) {
                        return true;
                    }
                    entry = next;
                }
            }
        }
        false
    }

    /// The first and last bucket column of the span `[low, high]` of x (clamped to the grid,
    /// which keeps containment: a point of the span lands in a column between the two).
    fn column_span(&self, low: f64, high: f64) -> (usize, usize) {
        (bucket_of(low, self.columns), bucket_of(high, self.columns))
    }

    fn row_span(&self, low: f64, high: f64) -> (usize, usize) {
        (bucket_of(low, self.rows), bucket_of(high, self.rows))
    }
}

/// The bucket holding coordinate `value` (cells), clamped to `0..count`.
fn bucket_of(value: f64, count: usize) -> usize {
    let scaled = (value / f64::from(1u32 << BUCKET_SHIFT)).floor();
    // `as` saturates (NaN gives 0); positions are finite anyway.
    (scaled.max(0.0) as usize).min(count - 1)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every pair of boxes that overlap shares a bucket: a brute-force check over boxes with
    /// ends on a fine grid, edges included (touching boxes overlap).
    #[test]
    fn overlapping_boxes_share_a_bucket() {
        let mut grid = SegmentGrid::new(12, 12);
        let mut boxes = Vec::new();
        for step in 0..40u32 {
            let x0 = f64::from(step % 9) * 1.25;
            let y0 = f64::from(step * 7 % 11) * 0.75;
            let (x1, y1) = (
                x0 + f64::from(step % 3) * 0.5,
                y0 + f64::from(step % 4) * 0.5,
            );
            grid.insert(step, (x1, y0), (x0, y1));
            boxes.push((x0, x1, y0, y1));
        }
        for query in 0..60u32 {
            let qx0 = f64::from(query % 13) * 0.9;
            let qy0 = f64::from(query * 5 % 12) * 0.8;
            let (qx1, qy1) = (qx0 + f64::from(query % 5) * 0.3, qy0 + 0.4);
            for (node, &(x0, x1, y0, y1)) in boxes.iter().enumerate() {
                let overlap = x0 <= qx1 && qx0 <= x1 && y0 <= qy1 && qy0 <= y1;
                if overlap {
                    assert!(
                        grid.any_near((qx0, qx1), (qy0, qy1), |found| found == node as u32),
                        "box {node} missed by query {query}"
                    );
                }
            }
        }
    }
}
