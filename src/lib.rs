//! eddyzone: concept-stage design of permanent-magnet eddy-current braking zones on linear tracks.
//!
//! Data flows one way: `units` → `scenario` → `physics` → `dynamics` → `checks` / `thermal` →
//! `plan` → `report` → `cli`. Each layer has its own error type; `error::Error` wraps them and
//! maps them to exit codes.

/// Physical constants with their sources.
pub mod constants;
/// "value unit" strings to SI, one quantity kind per field.
pub mod units;
/// Built-in conductor materials, each value with its source.
pub mod materials;
/// The scenario file: raw YAML shapes, validation, and the validated model in SI.
pub mod scenario;
/// Drag force of a conducting fin between magnet rows: field harmonics, layer theory, tables.
pub mod physics;
/// Limit checks: rider acceleration, filtering, sustained-acceleration envelopes, verdicts.
pub mod checks;
/// The top-level error type and the exit codes.
pub mod error;
