//! Drag force of a conducting fin between magnet rows (owned by the physics work; see DEVELOPERS.md).
