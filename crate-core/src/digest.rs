//! `digest`: a stable 64-bit FNV-1a hash of a network's exact geometry and topology.

use crate::network::Network;

const FNV_OFFSET: u64 = 0xcbf2_9ce4_8422_2325;
const FNV_PRIME: u64 = 0x0000_0100_0000_01b3;

/// FNV-1a 64 (Fowler, Noll, Vo) over bytes, continuing from `state`.
fn fnv1a(mut state: u64, bytes: &[u8]) -> u64 {
    for &byte in bytes {
        state ^= byte as u64;
        state = state.wrapping_mul(FNV_PRIME);
    }
    state
}

/// Marks, in the hashed bytes, a network hashed by its segment list (not a forest).
const SEGMENT_LIST_MARK: &[u8] = b"segments";

/// Hashes node count, then each node's x and y bits and downstream index (`NO_PARENT` for a
/// root), little-endian, in node order, when every node has at most one downstream segment (as
/// in a forest: the hash of version-1 run links and records is unchanged). Otherwise each node's
/// x and y bits, a mark, the segment count and every segment's ends. Equal digests mean
/// bit-identical coordinates and identical segments.
pub fn digest(network: &Network) -> u64 {
    let node_count = network.nodes.len();
    let mut state = fnv1a(FNV_OFFSET, &(node_count as u64).to_le_bytes());
    match network.parents() {
        Ok(parents) => {
            for (node, parent) in network.nodes.iter().zip(parents) {
                state = fnv1a(state, &node.x.to_bits().to_le_bytes());
                state = fnv1a(state, &node.y.to_bits().to_le_bytes());
                state = fnv1a(state, &parent.to_le_bytes());
            }
        }
        _ => {
            for node in &network.nodes {
                state = fnv1a(state, &node.x.to_bits().to_le_bytes());
                state = fnv1a(state, &node.y.to_bits().to_le_bytes());
            }
            state = fnv1a(state, SEGMENT_LIST_MARK);
            state = fnv1a(state, &(network.segments.len() as u64).to_le_bytes());
            for segment in &network.segments {
                state = fnv1a(state, &segment.from.to_le_bytes());
                state = fnv1a(state, &segment.to.to_le_bytes());
            }
        }
    }
    state
}

/// The digest as 16 lowercase hex digits.
pub fn digest_hex(network: &Network) -> String {
    format!("{:016x}", digest(network))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Published FNV-1a 64 test vectors (Fowler, Noll, Vo; IETF draft-eastlake-fnv, appendix):
    /// "" -> cbf29ce484222325, "a" -> af63dc4c8601ec8c, "foobar" -> 85944171f73967e8.
    #[test]
    fn fnv1a_matches_published_vectors() {
        assert_eq!(fnv1a(FNV_OFFSET, b""), 0xcbf29ce484222325);
        assert_eq!(fnv1a(FNV_OFFSET, b"a"), 0xaf63dc4c8601ec8c);
        assert_eq!(fnv1a(FNV_OFFSET, b"foobar"), 0x85944171f73967e8);
    }
}
