//! `RunMemory`: how much wasm memory a run on the page needs at most, from its lattice size and
//! cell budget, against the ceiling of a 32-bit WebAssembly instance (4 GiB), and the largest
//! cell budget that fits. The page asks before it starts a run and refuses one that cannot fit
//! (a run past the ceiling traps and kills the instance).
//!
//! The figures are measured on the wasm build, not derived: `tests/wasm/memory-wasm.mjs` grows
//! runs under node, refilling the page's geometry as the page does, and prints the instance's
//! memory per lattice cell and per grown cell. Wasm memory never shrinks, and the growth
//! engine's arrays double their capacity as they fill, so the peak per grown cell swings
//! between about 280 bytes (just after a doubling has been used up) and about 440 bytes (just
//! after a doubling); a 5000 x 5000 run of pure length cheapest first trapped at 9,156,720
//! cells, 432 bytes a cell on top of its lattice. The constants below lie above every figure
//! measured, by about a tenth.

use ramulus_core::params::Params;
use ramulus_draw::format::grouped;

/// Bytes a 32-bit WebAssembly instance can address: 65,536 pages of 64 KiB. Browsers allow
/// wasm32 memory up to this size on 64-bit systems (a smaller machine may refuse earlier).
pub const WASM_MEMORY_CEILING_BYTES: u64 = 65_536 * 65_536;

/// Bytes kept for what does not grow with the run: the module's own memory (about 1.2 MB
/// measured), the pixel buffer of the canvas (4 bytes a pixel: 24 MB for a 3000 x 2000
/// canvas) and the exports' texts.
pub const FIXED_BYTES: u64 = 64 * 1024 * 1024;

/// Bytes per lattice cell, allowed or not (cell states, positions and the region; 13.0 to
/// 13.3 measured).
pub const LATTICE_BYTES_PER_CELL: u64 = 15;

/// Extra bytes per lattice cell when runs may attach to segments (the junction lists; 17.3
/// measured in all).
pub const JUNCTION_LATTICE_BYTES_PER_CELL: u64 = 5;

/// Bytes per grown cell: the growth engine's arrays and frontier, and the page's geometry
/// (network, forest view, segment table, screen buffers), at the worst point of their
/// doubling (280 to 440 measured).
pub const BYTES_PER_GROWN_CELL: u64 = 480;

/// Bytes per grown cell when runs may attach to segments: up to one junction node per cell
/// (443 measured at 1,000,000 cells where the plain run takes 284, so 1.56 times as much).
pub const JUNCTION_BYTES_PER_GROWN_CELL: u64 = 760;

/// What a run needs at most, and what fits.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct RunMemory {
    /// The cell budget asked for.
    pub budget: u64,
    /// Cells the run can grow at most: the budget or the lattice, whichever is smaller (in
    /// refined cells when refined).
    pub grown_cells: u64,
    /// Lattice cells (width x height, times refine^2 when refined).
    pub lattice_cells: u64,
    /// Estimated peak bytes of the run on the page.
    pub bytes: u64,
    /// The largest cell budget whose run fits under the ceiling on this lattice (0 when not
    /// even the lattice fits).
    pub largest_budget: u64,
}

impl RunMemory {
    /// The estimate for a run with these parameters.
    pub fn of(params: &Params) -> RunMemory {
        // A refined run grows on refine x refine cells per given cell (`refine`).
        let factor = u64::from(params.domain.refine.max(1)).pow(2);
        let lattice_cells =
            u64::from(params.domain.width) * u64::from(params.domain.height) * factor;
        let junctions = params.run.attach_to_segments;
        let (per_lattice_cell, per_grown_cell) = if junctions {
            (
                LATTICE_BYTES_PER_CELL + JUNCTION_LATTICE_BYTES_PER_CELL,
                JUNCTION_BYTES_PER_GROWN_CELL,
            )
        } else {
            (LATTICE_BYTES_PER_CELL, BYTES_PER_GROWN_CELL)
        };
        let budget = params.run.cells;
        let grown_cells = budget.saturating_mul(factor).min(lattice_cells);
        let base = FIXED_BYTES.saturating_add(lattice_cells.saturating_mul(per_lattice_cell));
        let bytes = base.saturating_add(grown_cells.saturating_mul(per_grown_cell));
        // In the given cells, as the budget is typed.
        let largest_budget =
            WASM_MEMORY_CEILING_BYTES.saturating_sub(base) / per_grown_cell / factor;
        RunMemory {
            budget,
            grown_cells,
            lattice_cells,
            bytes,
            largest_budget,
        }
    }

    /// Whether the run fits under the ceiling.
    pub fn fits(&self) -> bool {
        self.bytes <= WASM_MEMORY_CEILING_BYTES
    }

    /// Why a run that does not fit is refused, naming the budget asked for and the largest
    /// that fits; empty when it fits.
    pub fn refusal(&self) -> String {
        if self.fits() {
            return String::new();
        }
        let gib = |bytes: u64| bytes as f64 / (1024.0 * 1024.0 * 1024.0);
        let room = if self.largest_budget == 0 {
            format!(
                "not even the {} cell lattice fits: make the lattice smaller",
                grouped(self.lattice_cells)
            )
        } else {
            format!(
                "on this {} cell lattice at most {} cells fit: lower the cell budget to {} or \
                 less, or grow the run with the command line",
                grouped(self.lattice_cells),
                grouped(self.largest_budget),
                grouped(self.largest_budget)
            )
        };
        format!(
            "This run was not started: a cell budget of {} cells needs about {:.1} GiB, more \
             than the {:.0} GiB of memory a page can use; {room}.",
            grouped(self.budget),
            gib(self.bytes),
            gib(WASM_MEMORY_CEILING_BYTES)
        )
    }

    /// What the page says after a run has trapped its instance (most likely memory ran out
    /// although the estimate let it start): what happened, that settings are kept, and what
    /// to do. `progress` is the last progress line shown (may be empty), `error` the trap.
    pub fn trap_message(&self, progress: &str, error: &str) -> String {
        let at = if progress.is_empty() {
            String::new()
        } else {
            format!(" at {progress}")
        };
        format!(
            "The run stopped{at}: the page's WebAssembly instance failed ({error}), most likely \
             out of memory, as a page can use at most {:.0} GiB however much the computer \
             has. The page has started afresh and kept your settings and link. Lower the cell \
             budget (on this lattice at most about {} cells should fit) and grow again, or grow \
             this run with the command line.",
            WASM_MEMORY_CEILING_BYTES as f64 / (1024.0 * 1024.0 * 1024.0),
            grouped(self.largest_budget)
        )
    }

    /// The estimate as JSON: `{fits, budget, grown_cells, lattice_cells, bytes,
    /// ceiling_bytes, largest_budget, message}` (`message` empty when the run fits).
    pub fn to_json(&self) -> String {
        serde_json::json!({
            "fits": self.fits(),
            "budget": self.budget,
            "grown_cells": self.grown_cells,
            "lattice_cells": self.lattice_cells,
            "bytes": self.bytes,
            "ceiling_bytes": WASM_MEMORY_CEILING_BYTES,
            "largest_budget": self.largest_budget,
            "message": self.refusal(),
        })
        .to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use ramulus_core::link::decode_link;

    fn estimate(link: &str) -> RunMemory {
        RunMemory::of(&decode_link(link).params)
    }

    /// The run that trapped (5000 x 5000, 25,000,000 cells, pure length cheapest first)
    /// is refused, and the largest budget offered lies below the 9,156,720 cells at which it
    /// trapped (measured on the page before this check existed).
    #[test]
    fn the_run_that_trapped_is_refused_with_a_budget_below_the_trap() {
        let memory = estimate(
            "v=1&width=5000&height=5000&roots=2500,4990,0,1&cells=25000000&joining=cheapest\
             &w_turn=0&w_flow=0&w_path=0",
        );
        assert!(!memory.fits());
        assert!(memory.largest_budget < 9_156_720, "{memory:?}");
        assert!(memory.largest_budget > 7_000_000, "{memory:?}");
        let message = memory.refusal();
        assert!(message.contains("25,000,000 cells"), "{message}");
        assert!(
            message.contains(&grouped(memory.largest_budget)),
            "{message}"
        );
    }

    /// A refined run needs what the same run on the refined lattice needs (`refine` 2: a
    /// lattice twice as wide and tall, four times the budget), and its largest budget is
    /// offered in the given cells.
    #[test]
    fn a_refined_run_is_estimated_on_its_refined_lattice() {
        let refined = estimate("v=1&width=1000&height=800&roots=10,10,0,1&cells=300000&refine=2");
        let fine = estimate("v=1&width=2000&height=1600&roots=20,20,0,1&cells=1200000");
        assert_eq!(refined.bytes, fine.bytes);
        assert_eq!(refined.lattice_cells, fine.lattice_cells);
        assert_eq!(refined.budget, 300_000);
        assert_eq!(refined.largest_budget, fine.largest_budget / 4);
    }

    /// The largest budget fits and one cell more does not, on several lattices.
    #[test]
    fn the_largest_budget_is_the_boundary() {
        for (width, height, junctions) in [(5000, 5000, false), (4000, 3000, true)] {
            let link = format!(
                "v=1&width={width}&height={height}&roots=10,10,0,1&cells=100\
                 &attach_to_segments={junctions}"
            );
            let mut params = decode_link(&link).params;
            let largest = RunMemory::of(&params).largest_budget;
            params.run.cells = largest;
            assert!(RunMemory::of(&params).fits(), "{width} x {height}");
            params.run.cells = largest + 1;
            assert!(!RunMemory::of(&params).fits(), "{width} x {height}");
            assert!(!RunMemory::of(&params).refusal().is_empty());
        }
    }

    /// A budget larger than the lattice grows at most the lattice: a full 2000 x 2000 run
    /// fits whatever budget it names.
    #[test]
    fn a_budget_beyond_the_lattice_counts_as_the_lattice() {
        let memory =
            estimate("v=1&width=2000&height=2000&roots=10,10,0,1&cells=25000000&joining=cheapest");
        assert_eq!(memory.grown_cells, 4_000_000);
        assert!(memory.fits());
        assert_eq!(memory.refusal(), "");
    }
}
