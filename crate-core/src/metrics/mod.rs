//! Metrics of a `Network` (stub, being written).
