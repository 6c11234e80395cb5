//! Size limits shared by the parameters, the image mask and the importers.

/// Largest lattice accepted, in cells (keeps memory under about 2.5 GB at 100 bytes a cell).
pub const MAX_CELLS: u64 = 25_000_000;

/// Largest search radius, in cells.
pub const MAX_RADIUS: f64 = 12.0;
