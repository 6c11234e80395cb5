//! Size limits shared by the parameters, the image mask and the importers.

/// Largest lattice accepted, in cells (keeps memory under about 2.5 GB at 100 bytes a cell).
pub const MAX_CELLS: u64 = 25_000_000;

/// Largest search radius, in cells.
pub const MAX_RADIUS: f64 = 12.0;

/// Most spot levels a run takes: the uphill term interpolates the ground from every level at
/// each cell it prices once, so the count bounds that work (4,096 levels: a 64 x 64 sampling
/// of an elevation raster).
pub const MAX_LEVELS: usize = 4096;

/// Most runoff zones a run takes: each cell keeps its zone's number in 16 bits.
pub const MAX_ZONES: usize = 4096;
