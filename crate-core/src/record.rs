//! Run record (stub).
