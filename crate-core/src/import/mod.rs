//! Importers (stub, being written).
