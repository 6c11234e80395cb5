//! SVG export (stub, being written).
