//! Presets (stub).
