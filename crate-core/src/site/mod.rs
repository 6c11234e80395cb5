//! Drainage sites (placeholder).
