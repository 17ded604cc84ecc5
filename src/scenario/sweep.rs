//! The `sweep:` block as a model: which inputs of one case are uncertain, their distributions
//! and scopes, and how they are sampled. Values in SI (°C for temperatures); the sampling itself
//! lives in `crate::sweep`.

use crate::units::Kind;
use serde::Serialize;

/// A tolerance and uncertainty study of one case.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Sweep {
    /// The case the samples vary (a case of the scenario, or `nominal`).
    pub case: String,
    /// How the unit hypercube is sampled.
    pub method: SamplingMethod,
    /// Number of samples (for a factorial: the number of grid points).
    pub samples: usize,
    /// Seed of the random and scrambled designs.
    pub seed: u64,
    /// The uncertain inputs, in the order of [`SweepInput::ALL`].
    pub inputs: Vec<Uncertain>,
}

impl Sweep {
    /// Whether it draws `input`.
    pub fn draws(&self, input: SweepInput) -> bool {
        self.inputs.iter().any(|u| u.input == input)
    }
}

/// How samples are drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SamplingMethod {
    /// Independent pseudo-random draws from the seed.
    MonteCarlo,
    /// One draw in each of `samples` equal-probability strata per input, strata paired at random.
    LatinHypercube,
    /// An Owen-scrambled Sobol low-discrepancy sequence (scrambled by the seed).
    Sobol,
    /// Every combination of the discrete values (a tolerance stack).
    Factorial,
}

impl SamplingMethod {
    /// The key as written.
    pub fn key(self) -> &'static str {
        match self {
            SamplingMethod::MonteCarlo => "monte_carlo",
            SamplingMethod::LatinHypercube => "latin_hypercube",
            SamplingMethod::Sobol => "sobol",
            SamplingMethod::Factorial => "factorial",
        }
    }

    /// Every method.
    pub const ALL: [SamplingMethod; 4] = [
        SamplingMethod::MonteCarlo,
        SamplingMethod::LatinHypercube,
        SamplingMethod::Sobol,
        SamplingMethod::Factorial,
    ];
}

/// A quantity a sweep can vary.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SweepInput {
    /// Vehicle mass of the case, kg.
    Mass,
    /// Start speed, m/s.
    Speed,
    /// Start position of the vehicle front, m.
    Position,
    /// Clearance of each magnet section (model sections), m.
    Clearance,
    /// Fin offset from the centre plane in each magnet section (model sections), m.
    FinOffset,
    /// Remanence at 20 °C of each magnet section (model sections), T.
    Remanence,
    /// Conductivity at 20 °C of each fin's material, S/m.
    FinConductivity,
    /// Fin temperature before the pass, °C.
    FinTemp,
    /// Magnet temperature, °C.
    MagnetTemp,
    /// The case's model force factor (multiplies every section force).
    ForceFactor,
}

impl SweepInput {
    /// Every input, in the order of the block and of the sample columns.
    pub const ALL: [SweepInput; 10] = [
        SweepInput::Mass,
        SweepInput::Speed,
        SweepInput::Position,
        SweepInput::Clearance,
        SweepInput::FinOffset,
        SweepInput::Remanence,
        SweepInput::FinConductivity,
        SweepInput::FinTemp,
        SweepInput::MagnetTemp,
        SweepInput::ForceFactor,
    ];

    /// The key under `sweep.inputs`.
    pub fn key(self) -> &'static str {
        match self {
            SweepInput::Mass => "mass",
            SweepInput::Speed => "speed",
            SweepInput::Position => "position",
            SweepInput::Clearance => "clearance",
            SweepInput::FinOffset => "fin_offset",
            SweepInput::Remanence => "remanence",
            SweepInput::FinConductivity => "fin_conductivity",
            SweepInput::FinTemp => "fin_temp",
            SweepInput::MagnetTemp => "magnet_temp",
            SweepInput::ForceFactor => "force_factor",
        }
    }

    /// The column name of its value, with the SI unit (`mass_kg`, `clearance_m`, ...).
    pub fn column(self) -> &'static str {
        match self {
            SweepInput::Mass => "mass_kg",
            SweepInput::Speed => "start_speed_m_s",
            SweepInput::Position => "start_position_m",
            SweepInput::Clearance => "clearance_m",
            SweepInput::FinOffset => "fin_offset_m",
            SweepInput::Remanence => "remanence_t",
            SweepInput::FinConductivity => "fin_conductivity_s_m",
            SweepInput::FinTemp => "fin_temp_c",
            SweepInput::MagnetTemp => "magnet_temp_c",
            SweepInput::ForceFactor => "force_factor",
        }
    }

    /// The kind of its values.
    pub fn kind(self) -> Kind {
        match self {
            SweepInput::Mass => Kind::Mass,
            SweepInput::Speed => Kind::Speed,
            SweepInput::Position | SweepInput::Clearance | SweepInput::FinOffset => Kind::Length,
            SweepInput::Remanence => Kind::FluxDensity,
            SweepInput::FinConductivity => Kind::Conductivity,
            SweepInput::FinTemp | SweepInput::MagnetTemp => Kind::Temperature,
            SweepInput::ForceFactor => Kind::Ratio,
        }
    }

    /// Whether it belongs to a section or a fin (and so has a scope), not to the case.
    pub fn per_element(self) -> bool {
        matches!(
            self,
            SweepInput::Clearance
                | SweepInput::FinOffset
                | SweepInput::Remanence
                | SweepInput::FinConductivity
        )
    }

    /// Whether it is a value of each model section's magnet design (clearance, fin offset,
    /// remanence).
    pub fn of_sections(self) -> bool {
        matches!(
            self,
            SweepInput::Clearance | SweepInput::FinOffset | SweepInput::Remanence
        )
    }
}

/// Whether the sections (or fins) share one draw or each gets its own.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum Scope {
    /// One value for every section (fin) alike: a batch or a setting.
    #[default]
    All,
    /// An independent value for each section (fin): a tolerance of each part.
    Each,
}

/// A distribution of an uncertain input (SI; °C for temperatures).
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Distribution {
    /// Normal, optionally truncated to [min, max].
    Normal {
        /// Mean.
        mean: f64,
        /// Standard deviation (> 0).
        std: f64,
        /// Lower truncation bound.
        min: Option<f64>,
        /// Upper truncation bound.
        max: Option<f64>,
    },
    /// Uniform on [min, max].
    Uniform {
        /// Lower end.
        min: f64,
        /// Upper end.
        max: f64,
    },
    /// Triangular on [min, max] with its peak at mode.
    Triangular {
        /// Lower end.
        min: f64,
        /// Most likely value.
        mode: f64,
        /// Upper end.
        max: f64,
    },
    /// Equally likely discrete values.
    Discrete {
        /// The values, in the order written.
        values: Vec<f64>,
    },
}

impl Distribution {
    /// The name as written under `distribution:`.
    pub fn key(&self) -> &'static str {
        match self {
            Distribution::Normal { .. } => "normal",
            Distribution::Uniform { .. } => "uniform",
            Distribution::Triangular { .. } => "triangular",
            Distribution::Discrete { .. } => "discrete",
        }
    }

    /// The smallest and largest value a draw can take. A normal without a bound is truncated at
    /// [`NORMAL_TAIL_SIGMAS`] standard deviations (the probability beyond is about 1e-15).
    pub fn support(&self) -> (f64, f64) {
        match self {
            Distribution::Normal {
                mean,
                std,
                min,
                max,
            } => (
                min.unwrap_or(mean - NORMAL_TAIL_SIGMAS * std),
                max.unwrap_or(mean + NORMAL_TAIL_SIGMAS * std),
            ),
            Distribution::Uniform { min, max } | Distribution::Triangular { min, max, .. } => {
                (*min, *max)
            }
            Distribution::Discrete { values } => (
                values.iter().copied().fold(f64::INFINITY, f64::min),
                values.iter().copied().fold(f64::NEG_INFINITY, f64::max),
            ),
        }
    }
}

/// Where an unbounded normal is cut, standard deviations from the mean (project convention:
/// P(|Z| > 8) ≈ 1.2e-15, below anything a sweep of at most a million samples can resolve).
pub const NORMAL_TAIL_SIGMAS: f64 = 8.0;

/// One uncertain input.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Uncertain {
    /// Which quantity.
    pub input: SweepInput,
    /// Its distribution.
    pub distribution: Distribution,
    /// All sections (fins) alike or each independently; [`Scope::All`] for the case's inputs.
    pub scope: Scope,
}
