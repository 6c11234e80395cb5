//! Plane growth: whether a new segment would cross or run over an existing one, and the
//! cheapest attachment of a cell that crosses nothing.

use super::*;

impl Growth {
    /// The point a cell would join for `attachment`: a node, or a point inside a segment.
    pub(super) fn attachment_point(&self, attachment: Attachment) -> (f64, f64) {
        if attachment.segment_parent == NONE {
            let node = &self.nodes[attachment.target as usize];
            (node.x, node.y)
        } else {
            let anchor = self.segment_anchor(attachment.target, attachment.along);
            (anchor.x, anchor.y)
        }
    }

    /// Whether the segment from `(cx, cy)` to the attachment's point would cross, touch or run
    /// over a segment of the network other than at the attachment point itself.
    ///
    /// A segment that meets the new one shares a point with it, so it is listed in a bucket of
    /// the segment grid that the new segment's bounding box touches (`SegmentGrid`); the box is
    /// widened by `BOX_SLACK` so that an attachment point computed inside a segment, which
    /// may lie a rounding error off that segment's box, is covered too.
    pub(super) fn crosses_network(&self, cx: f64, cy: f64, attachment: Attachment) -> bool {
        let Some(grid) = &self.segment_grid else {
            return false;
        };
        let (ax, ay) = self.attachment_point(attachment);
        let new = Piece {
            from: (cx, cy),
            to: (ax, ay),
        };
        grid.any_near(
            (cx.min(ax) - BOX_SLACK, cx.max(ax) + BOX_SLACK),
            (cy.min(ay) - BOX_SLACK, cy.max(ay) + BOX_SLACK),
            |node| self.segment_conflicts(node, &new, attachment),
        )
    }

    /// Whether the segment `node -> parent` conflicts with the new segment joining
    /// `attachment`. A segment ending at the joined node shares that end: it conflicts only when
    /// the new segment runs along it.
    fn segment_conflicts(&self, node: u32, new: &Piece, attachment: Attachment) -> bool {
        let parent = self.parent[node as usize];
        if parent == NO_PARENT {
            return false;
        }
        let (near, far) = (&self.nodes[node as usize], &self.nodes[parent as usize]);
        let (near, far) = ((near.x, near.y), (far.x, far.y));
        if attachment.segment_parent != NONE {
            // The split segment is the one joined; after the split its two halves end at the
            // junction, which lies on the new segment's end.
            if node == attachment.target && parent == attachment.segment_parent {
                return runs_along(new, near) || runs_along(new, far);
            }
            return pieces_meet(
                new,
                &Piece {
                    from: near,
                    to: far,
                },
            );
        }
        let joined = attachment.target;
        if node == joined {
            return runs_along(new, far);
        }
        if parent == joined {
            return runs_along(new, near);
        }
        pieces_meet(
            new,
            &Piece {
                from: near,
                to: far,
            },
        )
    }

    /// The cheapest attachment of `cell` that crosses no segment, from every node and segment
    /// within reach; ties go to the earlier candidate, as in `best_from_scratch`.
    pub(super) fn best_plane_attachment(&mut self, cell: usize) -> Option<(f64, Attachment)> {
        let mut candidates = std::mem::take(&mut self.scratch_candidates);
        candidates.clear();
        self.candidates_of(cell, &mut candidates);
        // A stable sort keeps the enumeration order among equal costs.
        candidates.sort_by(|a, b| a.0.total_cmp(&b.0));
        let (cx, cy) = self.lattice.position(cell);
        let found = candidates
            .iter()
            .copied()
            .find(|&(_, attachment)| !self.crosses_network(cx, cy, attachment));
        self.scratch_candidates = candidates;
        found
    }

    /// Lists the segment `node -> parent` in the segment grid (plane growth only).
    pub(super) fn note_segment(&mut self, node: u32) {
        let parent = self.parent[node as usize];
        let Some(grid) = &mut self.segment_grid else {
            return;
        };
        if parent == NO_PARENT {
            return;
        }
        let (n, p) = (node as usize, parent as usize);
        let (near, far) = (&self.nodes[n], &self.nodes[p]);
        grid.insert(node, (near.x, near.y), (far.x, far.y));
    }
}

/// Cells by which the search box of `crosses_network` is widened on each side: far above the
/// rounding error of a point interpolated on a segment, far below a bucket.
const BOX_SLACK: f64 = 1e-6;

/// A straight piece between two points, in cells.
struct Piece {
    from: (f64, f64),
    to: (f64, f64),
}

/// Twice the signed area of the triangle `a b c`: positive when `c` lies left of `a -> b`.
fn orientation(a: (f64, f64), b: (f64, f64), c: (f64, f64)) -> f64 {
    (b.0 - a.0) * (c.1 - a.1) - (b.1 - a.1) * (c.0 - a.0)
}

/// Whether `point`, on the line through `piece`, lies within the piece's bounding box.
fn within_box(piece: &Piece, point: (f64, f64)) -> bool {
    point.0 >= piece.from.0.min(piece.to.0)
        && point.0 <= piece.from.0.max(piece.to.0)
        && point.1 >= piece.from.1.min(piece.to.1)
        && point.1 <= piece.from.1.max(piece.to.1)
}

/// Whether two pieces cross or touch (an end on the other piece counts), by the orientation
/// test of computational geometry (Cormen et al., Introduction to Algorithms, 3rd ed.,
/// section 33.1, SEGMENTS-INTERSECT).
fn pieces_meet(a: &Piece, b: &Piece) -> bool {
    // Pieces whose bounding boxes are apart cannot meet (the common quick rejection).
    if a.from.0.max(a.to.0) < b.from.0.min(b.to.0)
        || b.from.0.max(b.to.0) < a.from.0.min(a.to.0)
        || a.from.1.max(a.to.1) < b.from.1.min(b.to.1)
        || b.from.1.max(b.to.1) < a.from.1.min(a.to.1)
    {
        return false;
    }
    let d1 = orientation(b.from, b.to, a.from);
    let d2 = orientation(b.from, b.to, a.to);
    let d3 = orientation(a.from, a.to, b.from);
    let d4 = orientation(a.from, a.to, b.to);
    if ((d1 > 0.0 && d2 < 0.0) || (d1 < 0.0 && d2 > 0.0))
        && ((d3 > 0.0 && d4 < 0.0) || (d3 < 0.0 && d4 > 0.0))
    {
        return true;
    }
    (d1 == 0.0 && within_box(b, a.from))
        || (d2 == 0.0 && within_box(b, a.to))
        || (d3 == 0.0 && within_box(a, b.from))
        || (d4 == 0.0 && within_box(a, b.to))
}

/// For a segment that shares the new piece's end `new.to`: whether its other end `other`
/// lies on the new piece, or the new piece's start lies on it (the two would overlap).
fn runs_along(new: &Piece, other: (f64, f64)) -> bool {
    if other == new.to {
        return false;
    }
    if orientation(new.from, new.to, other) != 0.0 {
        return false;
    }
    // Collinear: they overlap when `other` and `new.from` lie on the same side of the shared end.
    let along_new = (new.from.0 - new.to.0, new.from.1 - new.to.1);
    let along_other = (other.0 - new.to.0, other.1 - new.to.1);
    along_new.0 * along_other.0 + along_new.1 * along_other.1 > 0.0
}

#[cfg(test)]
mod tests {
    use super::*;

    fn piece(a: (f64, f64), b: (f64, f64)) -> Piece {
        Piece { from: a, to: b }
    }

    // Hand-drawn cases of SEGMENTS-INTERSECT (Cormen et al. 2009, section 33.1).
    #[test]
    fn crossing_touching_and_apart() {
        assert!(pieces_meet(
            &piece((0.0, 0.0), (2.0, 2.0)),
            &piece((0.0, 2.0), (2.0, 0.0))
        ));
        assert!(!pieces_meet(
            &piece((0.0, 0.0), (1.0, 0.0)),
            &piece((0.0, 1.0), (1.0, 1.0))
        ));
        // An end on the other piece's interior touches.
        assert!(pieces_meet(
            &piece((0.0, 0.0), (2.0, 0.0)),
            &piece((1.0, 0.0), (1.0, 3.0))
        ));
        // Collinear and disjoint.
        assert!(!pieces_meet(
            &piece((0.0, 0.0), (1.0, 0.0)),
            &piece((2.0, 0.0), (3.0, 0.0))
        ));
        // Collinear and overlapping.
        assert!(pieces_meet(
            &piece((0.0, 0.0), (2.0, 0.0)),
            &piece((1.0, 0.0), (3.0, 0.0))
        ));
        // Lines cross but the pieces stop short.
        assert!(!pieces_meet(
            &piece((0.0, 0.0), (1.0, 1.0)),
            &piece((3.0, 0.0), (2.0, 1.0))
        ));
    }

    #[test]
    fn shared_end_conflicts_only_when_running_along() {
        let new = piece((0.0, 0.0), (2.0, 0.0));
        assert!(runs_along(&new, (1.0, 0.0)));
        assert!(!runs_along(&new, (3.0, 0.0)));
        assert!(!runs_along(&new, (2.0, 1.0)));
    }
}
