//! eddyzone: concept-stage design of permanent-magnet eddy-current braking zones on linear tracks.
//!
//! Data flows one way: `units` → `scenario` → `physics` → `curve` / `dynamics` → `checks` /
//! `thermal` → `study` → `plan` → `report`; the `eddyzone` command line sits on top. Each layer
//! has its own error type; the command line maps them to exit codes in one place.

/// Limit checks: rider acceleration, filtering, sustained-acceleration envelopes, verdicts.
pub mod checks;
/// Physical constants with their sources.
pub mod constants;
/// Force–speed curves of each section × fin pair.
pub mod curve;
/// The vehicle's motion through the zone: gravity, resistance, brake pairs, events.
pub mod dynamics;
/// Built-in conductor materials, each value with its source.
pub mod materials;
/// Small numerical helpers shared by the layers (cubic Hermite interpolation); depends on nothing.
pub mod numeric;
/// Drag force of a conducting fin between magnet rows: field harmonics, layer theory, tables.
pub mod physics;
/// The layout planner: the shortest module layout that passes every case.
pub mod plan;
/// Output: tables, CSV, JSON, plots and the HTML report.
pub mod report;
/// The scenario file: raw YAML shapes, validation, and the validated model in SI.
pub mod scenario;
/// One scenario's force tables, runs, judged temperatures and verdict: the pipeline every command uses.
pub mod study;
/// Tolerance and uncertainty studies: samples of a scenario's `sweep:` block and their statistics.
pub mod sweep;
/// Fin heating over a pass and over a duty cycle of dispatches.
pub mod thermal;
/// "value unit" strings to SI, one quantity kind per field.
pub mod units;

/// The tool version stamped into every output.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");
