//! How the process keeps freed memory: blocks under 32 MiB come from and go back to the
//! process's own heap, so the many mid-sized arrays a run allocates and frees (a 100,000-cell
//! run's per-node arrays, the pipeline's passes) reuse pages it already has instead of mapping
//! fresh ones from the system, each page of which costs a page fault to clear again.
//!
//! glibc maps every block above a threshold (128 KiB at start, raised to the largest block
//! freed so far) with its own `mmap` and unmaps it when freed; `keep_freed_blocks` fixes the
//! threshold at 32 MiB, the largest glibc accepts (`mallopt`, `M_MMAP_THRESHOLD`; glibc manual,
//! "Malloc Tunable Parameters"). Blocks at least that large (the lattice and node arrays of runs
//! of millions of cells) are still mapped and returned whole. Other C libraries and systems
//! keep their own rules.

/// Fixes glibc's mapping threshold at 32 MiB (see the module comment); nothing elsewhere.
pub fn keep_freed_blocks() {
    #[cfg(all(target_os = "linux", target_env = "gnu"))]
    {
        /// `M_MMAP_THRESHOLD` of glibc's `<malloc.h>`.
        const M_MMAP_THRESHOLD: std::ffi::c_int = -3;
        extern "C" {
            fn mallopt(param: std::ffi::c_int, value: std::ffi::c_int) -> std::ffi::c_int;
        }
        // SAFETY: `mallopt` only sets a parameter of glibc's allocator, which the process's
        // global allocator (`System`) calls into; it is called once, before any thread starts.
        // A value glibc refuses leaves its default in place (it returns 0), which is harmless.
        unsafe {
            mallopt(M_MMAP_THRESHOLD, 32 << 20);
        }
    }
}
