//! What a caller can ask of a run: sampling, thermal feedback, fin temperatures, solver settings.

use super::solver::SolverSettings;

/// Which samples a run keeps.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Sampling {
    /// Only what the summary needs: samples inside the zone.
    ZoneOnly,
    /// Every dt from t = 0, for profiles and plots.
    Full,
}

/// Options of a run; defaults in `Default`.
#[derive(Debug, Clone)]
pub struct RunOptions {
    /// Sample interval, s (default 1 ms).
    pub sample_dt_s: f64,
    /// Which samples to keep (default `ZoneOnly`).
    pub sampling: Sampling,
    /// Vehicle fins heat up during the pass and their conductivity follows (default true).
    pub thermal_feedback: bool,
    /// Per-fin temperatures before the pass, °C (default: the case's fin temperature).
    pub fin_start_temps_c: Option<Vec<f64>>,
    /// Per-fin temperature fields along the track for track fins (cell start, cell length, temps).
    pub track_fin_fields: Option<Vec<Option<TempField>>>,
    /// Solver settings (default: [`SolverSettings::from_block`] of the scenario's solver block).
    pub solver: Option<SolverSettings>,
    /// Keep the integrator's dense output of position and speed in
    /// [`RunResult::trajectory`](crate::dynamics::RunResult::trajectory) (default false).
    pub trajectory: bool,
    /// Integrate each section's peak force, impulse and energy into
    /// [`RunResult::sections`](crate::dynamics::RunResult::sections) (default false: the
    /// planner and the sweep do not need them).
    pub section_loads: bool,
}

impl Default for RunOptions {
    fn default() -> Self {
        Self {
            sample_dt_s: 1e-3,
            sampling: Sampling::ZoneOnly,
            thermal_feedback: true,
            fin_start_temps_c: None,
            track_fin_fields: None,
            solver: None,
            trajectory: false,
            section_loads: false,
        }
    }
}

/// A temperature field along a track fin, in equal cells.
#[derive(Debug, Clone, PartialEq)]
pub struct TempField {
    /// Track position of the first cell's upstream end, m.
    pub start_m: f64,
    /// Cell length, m.
    pub cell_m: f64,
    /// Temperature of each cell, °C.
    pub temps_c: Vec<f64>,
}

impl TempField {
    /// The cells that reach into the stretch of track from `lo` to `hi`, in order from the cell
    /// holding `lo`: (index, upstream end, downstream end), m.
    pub fn cells_touching(&self, lo: f64, hi: f64) -> impl Iterator<Item = (usize, f64, f64)> + '_ {
        let first = ((lo - self.start_m) / self.cell_m).floor().max(0.0) as usize;
        (first..self.temps_c.len())
            .map(move |k| {
                let c0 = self.start_m + k as f64 * self.cell_m;
                (k, c0, c0 + self.cell_m)
            })
            .take_while(move |&(_, c0, _)| c0 < hi)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cells_touching_a_stretch() {
        let f = TempField {
            start_m: 10.0,
            cell_m: 0.5,
            temps_c: vec![20.0; 6],
        };
        let cells: Vec<usize> = f.cells_touching(10.7, 11.5).map(|c| c.0).collect();
        assert_eq!(cells, vec![1, 2]);
        // Before the field: from the first cell; past its end: none.
        assert_eq!(f.cells_touching(8.0, 10.2).count(), 1);
        assert_eq!(f.cells_touching(14.0, 15.0).count(), 0);
        let (k, c0, c1) = f.cells_touching(12.6, 20.0).next().expect("a cell");
        assert_eq!((k, c0, c1), (5, 12.5, 13.0));
    }
}
