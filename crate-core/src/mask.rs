//! `MaskGrid`: a boolean image of allowed cells stored as run lengths, and `MaskError`, why a
//! mask does not fit its lattice. Which cells a run may use (outline, mask and obstacles
//! together) is decided in `region`.

use serde::{Deserialize, Serialize};

use crate::limits::MAX_CELLS;

/// A boolean image of allowed cells, row-major from the top-left, stored as run lengths.
///
/// `runs` alternates blocked and allowed runs and starts with a blocked run (which may be 0),
/// so `[0, 5, 3]` means five allowed cells then three blocked ones.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MaskGrid {
    /// Width in cells.
    pub width: u32,
    /// Height in cells.
    pub height: u32,
    /// Alternating run lengths, blocked first.
    pub runs: Vec<u32>,
}

impl MaskGrid {
    /// Codes a row-major boolean image (`true` = allowed).
    pub fn from_bits(width: u32, height: u32, bits: &[bool]) -> MaskGrid {
        let mut runs = Vec::new();
        let mut current = false;
        let mut length = 0u32;
        for &bit in bits {
            if bit == current {
                length += 1;
            } else {
                runs.push(length);
                current = bit;
                length = 1;
            }
        }
        runs.push(length);
        MaskGrid {
            width,
            height,
            runs,
        }
    }

    /// Decodes to a row-major boolean image; `None` when the runs do not add up to the size.
    pub fn to_bits(&self) -> Option<Vec<bool>> {
        let total = self.width as u64 * self.height as u64;
        let sum: u64 = self.runs.iter().map(|&run| run as u64).sum();
        if sum != total || total > MAX_CELLS {
            return None;
        }
        let mut bits = Vec::with_capacity(total as usize);
        for (index, &run) in self.runs.iter().enumerate() {
            let allowed = index % 2 == 1;
            bits.extend(std::iter::repeat_n(allowed, run as usize));
        }
        Some(bits)
    }

    /// Checks that the mask matches the lattice and decodes.
    pub fn validate(&self, width: u32, height: u32) -> Result<(), MaskError> {
        if self.width != width || self.height != height {
            return Err(MaskError::Size {
                mask: [self.width, self.height],
                lattice: [width, height],
            });
        }
        let sum: u64 = self.runs.iter().map(|&run| run as u64).sum();
        let total = width as u64 * height as u64;
        if sum != total {
            return Err(MaskError::Runs { sum, total });
        }
        Ok(())
    }
}

/// Why a mask does not fit its lattice.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum MaskError {
    /// The mask's size differs from the lattice's (both `[width, height]` in cells).
    Size {
        /// The mask's size.
        mask: [u32; 2],
        /// The lattice's size.
        lattice: [u32; 2],
    },
    /// The runs do not add up to `width * height`.
    Runs {
        /// What the runs add up to.
        sum: u64,
        /// `width * height`.
        total: u64,
    },
}

impl MaskError {
    /// The parameter key the problem belongs to: `mask` or `mask.runs`.
    pub fn key(&self) -> &'static str {
        match self {
            MaskError::Size { .. } => "mask",
            MaskError::Runs { .. } => "mask.runs",
        }
    }

    /// The offending value as text.
    pub fn value(&self) -> String {
        match self {
            MaskError::Size { mask, .. } => format!("{} x {} cells", mask[0], mask[1]),
            MaskError::Runs { sum, .. } => format!("runs adding up to {sum}"),
        }
    }

    /// What would be accepted.
    pub fn allowed(&self) -> String {
        match self {
            MaskError::Size { lattice, .. } => {
                format!("the lattice size {} x {}", lattice[0], lattice[1])
            }
            MaskError::Runs { total, .. } => {
                format!("runs adding up to width * height = {total}")
            }
        }
    }
}

impl std::fmt::Display for MaskError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "`{}` = {}: {}", self.key(), self.value(), self.allowed())
    }
}

impl std::error::Error for MaskError {}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn runs_round_trip() {
        let bits = [true, true, false, true, false, false];
        let grid = MaskGrid::from_bits(3, 2, &bits);
        assert_eq!(grid.runs, vec![0, 2, 1, 1, 2]);
        assert_eq!(grid.to_bits().unwrap(), bits);
    }
}
