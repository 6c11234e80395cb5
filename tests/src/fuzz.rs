//! The fuzzing harness of the reader tests (`tests/tests/fuzz_*.rs`): proptest at scale over
//! a corpus of seed files kept in `tests/fuzz-corpus/<reader>/`.
//!
//! Each case is either random bytes or a corpus entry mutated by a few edits (bit flips, byte
//! sets, insertions of random bytes or of the reader's tokens, removals, truncation, splicing
//! with another entry, duplication of a range). Every case must not panic (proptest reports a
//! panic as a failure, shrunk to a small input) and must finish within `HANG_LIMIT`; the
//! reader's own check asserts a property of what it accepts.
//!
//! `RAMULUS_FUZZ_CASES` sets the number of cases (default `DEFAULT_CASES`, a short pass for
//! CI); `RAMULUS_FUZZ_SEED` the generator's seed (default 0, so CI runs the same cases every
//! time). Each run prints its figures: cases, accepted inputs, wall time, the slowest case.

use std::path::PathBuf;
use std::time::{Duration, Instant};

use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestCaseError, TestRng, TestRunner};

/// Cases a fuzz test runs when `RAMULUS_FUZZ_CASES` is not set: a short pass for CI.
pub const DEFAULT_CASES: u32 = 10_000;

/// A single input taking longer than this is a hang (the limit), not slowness.
pub const HANG_LIMIT: Duration = Duration::from_secs(1);

/// One fuzz input: the bytes, and a free choice the reader's check may use (for example to
/// repair PNG checksums so edits reach the decoder).
#[derive(Clone)]
pub struct FuzzInput {
    /// The bytes handed to the reader.
    pub bytes: Vec<u8>,
    /// A random byte for the check's own choices.
    pub choice: u8,
}

/// Shown as a byte string (`b"P4\n8 2\n\xff"`), ready to paste into a regression test.
impl std::fmt::Debug for FuzzInput {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "FuzzInput {{ bytes: b\"{}\", choice: {} }}",
            self.bytes.escape_ascii(),
            self.choice
        )
    }
}

/// What a reader's check says about one input: accepted (the property held) or refused.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Verdict {
    /// The reader accepted the input and the property held.
    Accepted,
    /// The reader refused the input with an error.
    Refused,
}

/// The corpus of one reader: every file in `tests/fuzz-corpus/<reader>/`, sorted by name.
pub fn corpus(reader: &str) -> Vec<Vec<u8>> {
    let folder = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("fuzz-corpus")
        .join(reader);
    let mut paths: Vec<PathBuf> = std::fs::read_dir(&folder)
        .unwrap_or_else(|error| panic!("{}: {error}", folder.display()))
        .map(|entry| entry.expect("a corpus entry").path())
        .filter(|path| path.is_file())
        .collect();
    paths.sort();
    let files: Vec<Vec<u8>> = paths
        .iter()
        .map(|path| std::fs::read(path).expect("a readable corpus file"))
        .collect();
    assert!(
        !files.is_empty(),
        "{} holds no seed files",
        folder.display()
    );
    files
}

/// One edit of a corpus entry.
#[derive(Clone, Debug)]
enum Edit {
    FlipBit(usize, u8),
    Set(usize, u8),
    Insert(usize, Vec<u8>),
    InsertToken(usize, usize),
    Remove(usize, usize),
    Truncate(usize),
    Splice(usize, usize, usize),
    Duplicate(usize, usize),
}

fn edit_strategy() -> impl Strategy<Value = Edit> {
    let at = any::<usize>();
    prop_oneof![
        3 => (at, 0u8..8).prop_map(|(at, bit)| Edit::FlipBit(at, bit)),
        3 => (at, any::<u8>()).prop_map(|(at, byte)| Edit::Set(at, byte)),
        2 => (at, proptest::collection::vec(any::<u8>(), 1..8))
            .prop_map(|(at, bytes)| Edit::Insert(at, bytes)),
        3 => (at, any::<usize>()).prop_map(|(at, token)| Edit::InsertToken(at, token)),
        2 => (at, 1usize..16).prop_map(|(at, count)| Edit::Remove(at, count)),
        1 => at.prop_map(Edit::Truncate),
        1 => (any::<usize>(), at, any::<usize>())
            .prop_map(|(entry, at, from)| Edit::Splice(entry, at, from)),
        1 => (at, 1usize..64).prop_map(|(at, count)| Edit::Duplicate(at, count)),
    ]
}

fn apply(mut bytes: Vec<u8>, edit: &Edit, corpus: &[Vec<u8>], tokens: &[&[u8]]) -> Vec<u8> {
    let length = bytes.len();
    match edit {
        Edit::FlipBit(at, bit) if length > 0 => bytes[at % length] ^= 1 << bit,
        Edit::Set(at, byte) if length > 0 => bytes[at % length] = *byte,
        Edit::Insert(at, inserted) => {
            let at = at % (length + 1);
            bytes.splice(at..at, inserted.iter().copied());
        }
        Edit::InsertToken(at, token) if !tokens.is_empty() => {
            let at = at % (length + 1);
            bytes.splice(at..at, tokens[token % tokens.len()].iter().copied());
        }
        Edit::Remove(at, count) if length > 0 => {
            let at = at % length;
            bytes.drain(at..(at + count).min(length));
        }
        Edit::Truncate(at) => bytes.truncate(at % (length + 1)),
        Edit::Splice(entry, at, from) => {
            // This entry up to `at`, then another entry from `from` on.
            let other = &corpus[entry % corpus.len()];
            let at = at % (length + 1);
            let from = from % (other.len() + 1);
            bytes.truncate(at);
            bytes.extend_from_slice(&other[from..]);
        }
        Edit::Duplicate(at, count) if length > 0 => {
            let at = at % length;
            let copy = bytes[at..(at + count).min(length)].to_vec();
            bytes.splice(at..at, copy);
        }
        _ => {}
    }
    bytes
}

/// Random bytes (1 case in 8) or a corpus entry with 1 to 6 edits.
fn input_strategy(
    corpus: Vec<Vec<u8>>,
    tokens: &'static [&'static [u8]],
) -> impl Strategy<Value = FuzzInput> {
    let entries = corpus.len();
    // Mostly one or two edits, so that many inputs stay close enough to valid to be read.
    let edits = prop_oneof![3 => 1usize..3, 1 => 3usize..8]
        .prop_flat_map(|count| proptest::collection::vec(edit_strategy(), count));
    let mutated = (0..entries, edits).prop_map(move |(entry, edits)| {
        let mut bytes = corpus[entry].clone();
        for edit in &edits {
            bytes = apply(bytes, edit, &corpus, tokens);
        }
        bytes
    });
    let bytes = prop_oneof![
        1 => proptest::collection::vec(any::<u8>(), 0..400),
        7 => mutated,
    ];
    (bytes, any::<u8>()).prop_map(|(bytes, choice)| FuzzInput { bytes, choice })
}

/// `RAMULUS_FUZZ_CASES`, or `DEFAULT_CASES`.
pub fn case_count() -> u32 {
    match std::env::var("RAMULUS_FUZZ_CASES") {
        Ok(text) => text
            .trim()
            .replace('_', "")
            .parse()
            .unwrap_or_else(|_| panic!("RAMULUS_FUZZ_CASES={text:?} is not a whole number")),
        Err(_) => DEFAULT_CASES,
    }
}

/// `RAMULUS_FUZZ_SEED`, or 0.
fn seed() -> u64 {
    match std::env::var("RAMULUS_FUZZ_SEED") {
        Ok(text) => text
            .trim()
            .parse()
            .unwrap_or_else(|_| panic!("RAMULUS_FUZZ_SEED={text:?} is not a whole number")),
        Err(_) => 0,
    }
}

/// Runs `case_count()` cases of `check` on inputs grown from the corpus of `reader`; panics
/// (failing the test) on a panic, a hang over `HANG_LIMIT` or a failed property, naming the
/// input. Returns the number of accepted inputs.
pub fn fuzz(
    reader: &str,
    tokens: &'static [&'static [u8]],
    check: impl Fn(&FuzzInput) -> Result<Verdict, TestCaseError>,
) -> u64 {
    let cases = case_count();
    let mut seed_bytes = [0u8; 32];
    seed_bytes[..8].copy_from_slice(&seed().to_le_bytes());
    let config = Config {
        cases,
        failure_persistence: None,
        // Shrinking a failure to a small input; bounded so a hang is not re-run for minutes.
        max_shrink_iters: 2000,
        max_shrink_time: 60_000,
        ..Config::default()
    };
    let mut runner = TestRunner::new_with_rng(
        config,
        TestRng::from_seed(RngAlgorithm::ChaCha, &seed_bytes),
    );
    // The seeds themselves first: each must pass the checks, and at least one be accepted,
    // so that the property is exercised.
    let seeds = corpus(reader);
    let mut seeds_accepted = 0;
    for (index, bytes) in seeds.iter().enumerate() {
        for choice in [0, 1] {
            let input = FuzzInput {
                bytes: bytes.clone(),
                choice,
            };
            match check(&input) {
                Ok(Verdict::Accepted) => seeds_accepted += 1,
                Ok(Verdict::Refused) => {}
                Err(error) => panic!("fuzz {reader}: seed file {index} (by name): {error}"),
            }
        }
    }
    assert!(
        seeds_accepted > 0,
        "fuzz {reader}: no seed file is accepted"
    );
    let accepted = std::cell::Cell::new(0u64);
    let slowest = std::cell::Cell::new((Duration::ZERO, 0usize));
    let started = Instant::now();
    let outcome = runner.run(&input_strategy(seeds, tokens), |input| {
        let case_started = Instant::now();
        let verdict = check(&input)?;
        let took = case_started.elapsed();
        if took > slowest.get().0 {
            slowest.set((took, input.bytes.len()));
        }
        if took > HANG_LIMIT {
            return Err(TestCaseError::fail(format!(
                "one input took {took:?}, over the {HANG_LIMIT:?} hang limit"
            )));
        }
        if verdict == Verdict::Accepted {
            accepted.set(accepted.get() + 1);
        }
        Ok(())
    });
    if let Err(error) = outcome {
        panic!("fuzz {reader}: {error}");
    }
    let (slowest_time, slowest_length) = slowest.get();
    println!(
        "fuzz {reader}: {cases} cases (seed {}), {} accepted, 0 panics, 0 hangs, wall {:.1} s, \
         slowest case {:.3} ms ({slowest_length} bytes)",
        seed(),
        accepted.get(),
        started.elapsed().as_secs_f64(),
        slowest_time.as_secs_f64() * 1000.0,
    );
    accepted.get()
}
