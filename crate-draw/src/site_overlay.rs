//! What the page lays over a site's layout: the natural flow on the bare ground as short lines
//! (`ground_flow_lines`), each cell's toward the neighbour its water runs to, in four classes of
//! the area draining through the cell so that the ground's own flow paths stand out.

use ramulus_core::site::{GroundFlow, NO_DOWNHILL};

/// Share of the way from a cell's centre to its downhill neighbour's that its line covers, so
/// that lines of a path read as dashes in the flow direction (common practice, no source).
const LINE_SHARE: f64 = 0.7;

/// Cells draining through a cell at which its line goes up a class: 4, 16 and 64 cells (each
/// class four times the last, so classes step evenly in the logarithm of the area).
const CLASS_CELLS: [f64; 3] = [4.0, 16.0, 64.0];

/// `x0, y0, x1, y1, class` for every cell whose water runs to another cell of the site, in the
/// network's frame (physical units, y down the page, cell centres at `(i + 0.5) cell_size`):
/// from the cell's centre toward its downhill neighbour's, `LINE_SHARE` of the way; `class` 0
/// to 3 by the area draining through the cell (`CLASS_CELLS`). Cells whose water stays (low
/// spots, outlets) or leaves over the site's edge have no line.
pub fn ground_flow_lines(flow: &GroundFlow, cell_size: f64) -> Vec<f32> {
    let cell_area = cell_size * cell_size;
    let mut lines = Vec::new();
    for (cell, &next) in flow.downhill.iter().enumerate() {
        if next == NO_DOWNHILL || flow.width == 0 {
            continue;
        }
        let centre = |index: usize| {
            [
                ((index % flow.width) as f64 + 0.5) * cell_size,
                ((index / flow.width) as f64 + 0.5) * cell_size,
            ]
        };
        let (from, to) = (centre(cell), centre(next as usize));
        let cells = flow.area.get(cell).copied().unwrap_or(0.0) / cell_area;
        let class = CLASS_CELLS.iter().filter(|&&limit| cells >= limit).count();
        lines.extend([
            from[0] as f32,
            from[1] as f32,
            (from[0] + LINE_SHARE * (to[0] - from[0])) as f32,
            (from[1] + LINE_SHARE * (to[1] - from[1])) as f32,
            class as f32,
        ]);
    }
    lines
}

#[cfg(test)]
mod tests {
    use super::*;

    // A 3 x 1 strip draining east into an outlet at its end, counted by hand: cell 0 drains
    // 1 cell, cell 1 drains 2; the outlet passes nothing on.
    #[test]
    fn a_strip_draws_a_line_per_cell_that_passes_water_on() {
        let flow = GroundFlow {
            width: 3,
            height: 1,
            downhill: vec![1, 2, NO_DOWNHILL],
            area: vec![4.0, 8.0, 12.0],
            outlet_areas: vec![12.0],
            off_site_area: 0.0,
            low_spots: Vec::new(),
            allowed_area: 12.0,
        };
        let lines = ground_flow_lines(&flow, 2.0);
        assert_eq!(lines.len(), 10);
        // From (1, 1) toward (3, 1), 0.7 of the 2 m: to (2.4, 1).
        assert_eq!(&lines[..5], &[1.0, 1.0, 2.4, 1.0, 0.0]);
        assert_eq!(lines[9], 0.0);
    }
}
