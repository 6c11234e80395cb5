//! Growth engine (stub, being written).

/// Incremental grower (stub).
pub struct Growth;
/// What one `step` did (stub).
pub struct StepReport;
/// Why growth stopped (stub).
pub enum StopReason {}
