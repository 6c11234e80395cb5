//! How the process keeps freed memory: blocks under 32 MiB come from and go back to the
//! process's own heap, and the heap keeps up to 64 MiB of free memory at its top, so the many
//! mid-sized arrays a run allocates and frees (a 100,000-cell run's per-node arrays, the
//! network built from them, the pipeline's passes) reuse pages it already has instead of
//! mapping fresh ones from the system, each page of which costs a page fault to clear again.
//!
//! glibc maps every block above a threshold (128 KiB at start, raised to the largest block
//! freed so far) with its own `mmap` and unmaps it when freed, and gives the free top of its
//! heap back to the system once it passes 128 KiB. `keep_freed_blocks` fixes the mapping
//! threshold at 32 MiB, the largest glibc accepts (`M_MMAP_THRESHOLD`), and the trimming
//! threshold at 64 MiB (`M_TRIM_THRESHOLD`; glibc manual, "Malloc Tunable Parameters"). Blocks
//! at least 32 MiB large (the lattice and node arrays of runs of millions of cells) are still
//! mapped and returned whole. Other C libraries and systems keep their own rules.

/// Fixes glibc's mapping and trimming thresholds (see the module comment); nothing elsewhere.
pub fn keep_freed_blocks() {
    #[cfg(all(target_os = "linux", target_env = "gnu"))]
    {
        /// `M_TRIM_THRESHOLD` and `M_MMAP_THRESHOLD` of glibc's `<malloc.h>`.
        const M_TRIM_THRESHOLD: std::ffi::c_int = -1;
        const M_MMAP_THRESHOLD: std::ffi::c_int = -3;
        extern "C" {
            fn mallopt(param: std::ffi::c_int, value: std::ffi::c_int) -> std::ffi::c_int;
        }
        // SAFETY: `mallopt` only sets a parameter of glibc's allocator, which the process's
        // global allocator (`System`) calls into; it is called once, before any thread starts.
        // A value glibc refuses leaves its default in place (it returns 0), which is harmless.
        unsafe {
            mallopt(M_MMAP_THRESHOLD, 32 << 20);
            mallopt(M_TRIM_THRESHOLD, 64 << 20);
        }
    }
}
