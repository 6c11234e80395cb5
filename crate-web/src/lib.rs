//! Browser layer (stub).
