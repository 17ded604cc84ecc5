//! eddyzone: concept-stage design of permanent-magnet eddy-current braking zones on linear tracks.
//!
//! Data flows one way: `units` → `scenario` → `physics` → `curve` / `dynamics` → `checks` /
//! `thermal` → `plan` → `report` → `cli`. Each layer has its own error type; `error::Error` wraps them and
//! maps them to exit codes.

/// Limit checks: rider acceleration, filtering, sustained-acceleration envelopes, verdicts.
pub mod checks;
/// Command implementations: options → library calls → output.
pub mod cli;
/// Physical constants with their sources.
pub mod constants;
/// Force–speed curves of each section × fin pair.
pub mod curve;
/// The vehicle's motion through the zone: gravity, resistance, brake pairs, events.
pub mod dynamics;
/// The top-level error type and the exit codes.
pub mod error;
/// Built-in conductor materials, each value with its source.
pub mod materials;
/// Drag force of a conducting fin between magnet rows: field harmonics, layer theory, tables.
pub mod physics;
/// The layout planner: the shortest module layout that passes every case.
pub mod plan;
/// Output: tables, CSV, JSON, plots and the HTML report.
pub mod report;
/// The scenario file: raw YAML shapes, validation, and the validated model in SI.
pub mod scenario;
/// Fin heating over a pass and over a duty cycle of dispatches.
pub mod thermal;
/// "value unit" strings to SI, one quantity kind per field.
pub mod units;

/// The tool version stamped into every output.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");
