//! "value unit" strings to SI values, one quantity kind per field.
//!
//! Every quantity in a scenario may be a plain number, read in the SI unit of its kind, or a string
//! `"value unit"` (`"12 mm"`, `"90 km/h"`, `"61 %IACS"`). A field asks for exactly one kind; a unit
//! of another kind is an error that names both kinds. Temperatures are the one exception to plain
//! numbers: a bare number is ambiguous between kelvin and degrees Celsius, so a temperature must
//! carry its unit. Temperatures are returned in °C (the unit engineers read), everything else in SI.

use crate::constants::{IACS_100_S_M, KELVIN_OFFSET, STANDARD_GRAVITY_M_S2};
use std::fmt;

/// The kind of a physical quantity; each scenario field accepts exactly one.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// Metres.
    Length,
    /// Metres per second.
    Speed,
    /// Kilograms.
    Mass,
    /// Tesla.
    FluxDensity,
    /// Degrees Celsius (returned in °C, not kelvin).
    Temperature,
    /// Siemens per metre.
    Conductivity,
    /// Per kelvin.
    TempCoefficient,
    /// Kilograms per cubic metre.
    Density,
    /// Joules per kilogram and kelvin.
    SpecificHeat,
    /// Newtons.
    Force,
    /// Newtons per metre.
    ForcePerLength,
    /// Square metres.
    Area,
    /// Seconds.
    Time,
    /// Radians.
    Angle,
    /// A ratio: plain number, or percent.
    Ratio,
    /// Metres per second squared (accepts `g`).
    Acceleration,
    /// Metres per second cubed (accepts `g/s`).
    Jerk,
    /// Watts per square metre and kelvin.
    HeatTransfer,
}

impl Kind {
    /// A plain word for messages.
    pub fn describe(self) -> &'static str {
        match self {
            Kind::Length => "length",
            Kind::Speed => "speed",
            Kind::Mass => "mass",
            Kind::FluxDensity => "flux density",
            Kind::Temperature => "temperature",
            Kind::Conductivity => "conductivity",
            Kind::TempCoefficient => "temperature coefficient",
            Kind::Density => "density",
            Kind::SpecificHeat => "specific heat",
            Kind::Force => "force",
            Kind::ForcePerLength => "force per length",
            Kind::Area => "area",
            Kind::Time => "time",
            Kind::Angle => "angle",
            Kind::Ratio => "ratio",
            Kind::Acceleration => "acceleration",
            Kind::Jerk => "rate of change of acceleration",
            Kind::HeatTransfer => "heat transfer coefficient",
        }
    }

    /// The SI unit a plain number is read in.
    pub fn si_unit(self) -> &'static str {
        match self {
            Kind::Length => "m",
            Kind::Speed => "m/s",
            Kind::Mass => "kg",
            Kind::FluxDensity => "T",
            Kind::Temperature => "°C or K (a unit is required)",
            Kind::Conductivity => "S/m",
            Kind::TempCoefficient => "1/K",
            Kind::Density => "kg/m^3",
            Kind::SpecificHeat => "J/(kg*K)",
            Kind::Force => "N",
            Kind::ForcePerLength => "N/m",
            Kind::Area => "m^2",
            Kind::Time => "s",
            Kind::Angle => "rad",
            Kind::Ratio => "1",
            Kind::Acceleration => "m/s^2",
            Kind::Jerk => "m/s^3",
            Kind::HeatTransfer => "W/(m^2*K)",
        }
    }

    /// Every kind.
    pub const ALL: [Kind; 18] = [
        Kind::Length,
        Kind::Speed,
        Kind::Mass,
        Kind::FluxDensity,
        Kind::Temperature,
        Kind::Conductivity,
        Kind::TempCoefficient,
        Kind::Density,
        Kind::SpecificHeat,
        Kind::Force,
        Kind::ForcePerLength,
        Kind::Area,
        Kind::Time,
        Kind::Angle,
        Kind::Ratio,
        Kind::Acceleration,
        Kind::Jerk,
        Kind::HeatTransfer,
    ];

    /// The unit spellings this kind accepts, SI first.
    pub fn spellings(self) -> Vec<&'static str> {
        self.units().iter().map(|u| u.0).collect()
    }

    /// Whether a bare number (read in [`Kind::si_unit`]) is accepted: not for temperatures
    /// (°C or K?) nor accelerations and onsets (g or SI?).
    pub fn takes_bare_number(self) -> bool {
        !matches!(self, Kind::Temperature | Kind::Acceleration | Kind::Jerk)
    }

    /// Units of this kind: (spelling, scale to SI, offset added after scaling).
    fn units(self) -> &'static [(&'static str, f64, f64)] {
        const MPH: f64 = 0.44704; // exact: 1 mile = 1609.344 m (international yard and pound, 1959)
        match self {
            Kind::Length => &[
                ("m", 1.0, 0.0),
                ("cm", 1e-2, 0.0),
                ("mm", 1e-3, 0.0),
                ("km", 1e3, 0.0),
            ],
            Kind::Speed => &[
                ("m/s", 1.0, 0.0),
                ("km/h", 1.0 / 3.6, 0.0),
                ("kph", 1.0 / 3.6, 0.0),
                ("mph", MPH, 0.0),
            ],
            Kind::Mass => &[("kg", 1.0, 0.0), ("t", 1e3, 0.0), ("g", 1e-3, 0.0)],
            Kind::FluxDensity => &[("T", 1.0, 0.0), ("mT", 1e-3, 0.0), ("G", 1e-4, 0.0)],
            Kind::Temperature => &[
                ("°C", 1.0, 0.0),
                ("degC", 1.0, 0.0),
                ("C", 1.0, 0.0),
                ("K", 1.0, -KELVIN_OFFSET),
            ],
            Kind::Conductivity => &[
                ("S/m", 1.0, 0.0),
                ("MS/m", 1e6, 0.0),
                ("%IACS", IACS_100_S_M / 100.0, 0.0),
            ],
            Kind::TempCoefficient => &[
                ("1/K", 1.0, 0.0),
                ("/K", 1.0, 0.0),
                ("%/K", 1e-2, 0.0),
                ("ppm/K", 1e-6, 0.0),
                ("1/°C", 1.0, 0.0),
                ("%/°C", 1e-2, 0.0),
            ],
            Kind::Density => &[
                ("kg/m^3", 1.0, 0.0),
                ("kg/m3", 1.0, 0.0),
                ("g/cm^3", 1e3, 0.0),
                ("g/cm3", 1e3, 0.0),
            ],
            Kind::SpecificHeat => &[
                ("J/(kg*K)", 1.0, 0.0),
                ("J/(kg K)", 1.0, 0.0),
                ("J/kg/K", 1.0, 0.0),
                ("J/(kg·K)", 1.0, 0.0),
                ("kJ/(kg*K)", 1e3, 0.0),
            ],
            Kind::Force => &[("N", 1.0, 0.0), ("kN", 1e3, 0.0)],
            Kind::ForcePerLength => &[("N/m", 1.0, 0.0), ("kN/m", 1e3, 0.0)],
            Kind::Area => &[("m^2", 1.0, 0.0), ("m2", 1.0, 0.0), ("cm^2", 1e-4, 0.0)],
            Kind::Time => &[
                ("s", 1.0, 0.0),
                ("ms", 1e-3, 0.0),
                ("min", 60.0, 0.0),
                ("h", 3600.0, 0.0),
            ],
            Kind::Angle => &[
                ("rad", 1.0, 0.0),
                ("deg", std::f64::consts::PI / 180.0, 0.0),
                ("°", std::f64::consts::PI / 180.0, 0.0),
            ],
            Kind::Ratio => &[("%", 1e-2, 0.0), ("1", 1.0, 0.0)],
            Kind::Acceleration => &[
                ("m/s^2", 1.0, 0.0),
                ("m/s2", 1.0, 0.0),
                ("g", STANDARD_GRAVITY_M_S2, 0.0),
            ],
            Kind::Jerk => &[
                ("m/s^3", 1.0, 0.0),
                ("m/s3", 1.0, 0.0),
                ("g/s", STANDARD_GRAVITY_M_S2, 0.0),
            ],
            Kind::HeatTransfer => &[
                ("W/(m^2*K)", 1.0, 0.0),
                ("W/(m^2 K)", 1.0, 0.0),
                ("W/m^2/K", 1.0, 0.0),
                ("W/(m2*K)", 1.0, 0.0),
            ],
        }
    }
}

impl fmt::Display for Kind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.describe())
    }
}

/// Why a quantity could not be read.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum UnitError {
    /// The text has no number in front.
    #[error("'{text}' is not a number with a unit (expected e.g. '12 {example}')")]
    NotANumber {
        /// The text as written.
        text: String,
        /// An example unit of the expected kind.
        example: &'static str,
    },
    /// A decimal comma (`0,9 t`): only the decimal point is read.
    #[error("'{text}' has a decimal comma, which is not accepted: write '{suggestion}'")]
    DecimalComma {
        /// The text as written.
        text: String,
        /// The same text with a decimal point.
        suggestion: String,
    },
    /// The number is NaN or infinite.
    #[error("'{text}' is not a finite number")]
    NotFinite {
        /// The text as written.
        text: String,
    },
    /// The unit belongs to another kind of quantity.
    #[error("unit '{unit}' is a {found}, but this field is a {expected}")]
    WrongKind {
        /// The unit as written.
        unit: String,
        /// The kind the unit belongs to.
        found: Kind,
        /// The kind the field asks for.
        expected: Kind,
    },
    /// The unit is not known at all.
    #[error("unknown unit '{unit}' for a {expected} (accepted: {accepted})")]
    UnknownUnit {
        /// The unit as written.
        unit: String,
        /// The kind the field asks for.
        expected: Kind,
        /// The accepted spellings.
        accepted: String,
    },
    /// A temperature given as a bare number.
    #[error("a temperature needs a unit ('20 °C' or '293.15 K'): a plain number is ambiguous")]
    TemperatureWithoutUnit,
    /// An acceleration or onset given as a bare number (g or SI would both be plausible).
    #[error(
        "{what} needs its unit: write '{value} {g}' or '{value} {si}' (a plain number could be either)"
    )]
    AccelerationWithoutUnit {
        /// "an acceleration" or "an onset".
        what: &'static str,
        /// The number as given.
        value: f64,
        /// The unit in g.
        g: &'static str,
        /// The SI unit.
        si: &'static str,
    },
}

/// Normalises a unit spelling: spaces and a few look-alike characters removed.
fn normalise_unit(unit: &str) -> String {
    unit.trim()
        .replace('µ', "u")
        .replace("²", "^2")
        .replace("³", "^3")
        .replace("⁻¹", "^-1")
}

fn find_unit(kind: Kind, unit: &str) -> Option<(f64, f64)> {
    let squeezed: String = unit.chars().filter(|c| !c.is_whitespace()).collect();
    kind.units()
        .iter()
        .find(|(name, _, _)| *name == unit || name.replace(' ', "") == squeezed)
        .map(|&(_, scale, offset)| (scale, offset))
}

/// Splits "12.5 mm" or "12.5mm" into the number and the unit text.
fn split_value(text: &str) -> Option<(f64, String)> {
    let t = text.trim();
    let mut end = 0;
    for (i, c) in t.char_indices() {
        let ok = c.is_ascii_digit()
            || c == '.'
            || c == '+'
            || c == '-'
            || ((c == 'e' || c == 'E')
                && t[i + 1..]
                    .chars()
                    .next()
                    .is_some_and(|n| n.is_ascii_digit() || n == '-' || n == '+'));
        if !ok {
            break;
        }
        end = i + c.len_utf8();
    }
    let number: f64 = t[..end].parse().ok()?;
    Some((number, normalise_unit(&t[end..])))
}

/// The unit of a `"value unit"` text (normalised: `µ` as `u`, `²` as `^2`), or `None` for a
/// bare number or text that is not a number.
pub fn unit_of(text: &str) -> Option<String> {
    split_value(text).map(|(_, u)| u).filter(|u| !u.is_empty())
}

/// `si` (SI; °C for temperatures) in `unit`, one of `kind`'s spellings: the inverse of the
/// scaling [`from_text`] applies; `None` when `unit` is not a unit of `kind`.
pub fn in_unit(kind: Kind, si: f64, unit: &str) -> Option<f64> {
    find_unit(kind, unit).map(|(scale, offset)| (si - offset) / scale)
}

/// Reads a plain SI number of the given kind.
pub fn from_number(kind: Kind, value: f64) -> Result<f64, UnitError> {
    if kind == Kind::Temperature {
        return Err(UnitError::TemperatureWithoutUnit);
    }
    // Limits in the trade are written in g, the model works in SI: a bare number is refused
    // rather than guessed.
    let unit_required = match kind {
        Kind::Acceleration => Some(("an acceleration", "g", "m/s^2")),
        Kind::Jerk => Some(("an onset", "g/s", "m/s^3")),
        _ => None,
    };
    if let Some((what, g, si)) = unit_required {
        return Err(UnitError::AccelerationWithoutUnit { what, value, g, si });
    }
    if !value.is_finite() {
        return Err(UnitError::NotFinite {
            text: value.to_string(),
        });
    }
    Ok(value)
}

/// `text` with its decimal comma replaced by a point, when it starts with a number written with
/// one (`0,9 t`, `-1,25 T`).
fn decimal_comma(text: &str) -> Option<String> {
    let t = text.trim_start();
    let body = t.strip_prefix(['-', '+']).unwrap_or(t);
    let digits = |s: &str| s.chars().take_while(char::is_ascii_digit).count();
    let whole = digits(body);
    let rest = body[whole..].strip_prefix(',')?;
    if whole == 0 || digits(rest) == 0 {
        return None;
    }
    let at = t.len() - rest.len() - 1;
    Some(format!("{}.{}", &t[..at], &t[at + 1..]))
}

/// Reads "value unit" text of the given kind into SI (°C for temperatures).
pub fn from_text(kind: Kind, text: &str) -> Result<f64, UnitError> {
    let example = kind.units()[0].0;
    if let Some(suggestion) = decimal_comma(text) {
        return Err(UnitError::DecimalComma {
            text: text.to_string(),
            suggestion,
        });
    }
    let (number, unit) = split_value(text).ok_or_else(|| UnitError::NotANumber {
        text: text.to_string(),
        example,
    })?;
    if !number.is_finite() {
        return Err(UnitError::NotFinite {
            text: text.to_string(),
        });
    }
    if unit.is_empty() {
        return from_number(kind, number);
    }
    if let Some((scale, offset)) = find_unit(kind, &unit) {
        return Ok(number * scale + offset);
    }
    if let Some(found) = Kind::ALL
        .iter()
        .copied()
        .find(|k| *k != kind && find_unit(*k, &unit).is_some())
    {
        return Err(UnitError::WrongKind {
            unit,
            found,
            expected: kind,
        });
    }
    let accepted = kind
        .units()
        .iter()
        .map(|(n, _, _)| *n)
        .collect::<Vec<_>>()
        .join(", ");
    Err(UnitError::UnknownUnit {
        unit,
        expected: kind,
        accepted,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn lengths_and_speeds() {
        assert_relative_eq!(from_text(Kind::Length, "12 mm").unwrap(), 0.012);
        assert_relative_eq!(from_text(Kind::Length, "12mm").unwrap(), 0.012);
        assert_relative_eq!(from_text(Kind::Length, "1.5 m").unwrap(), 1.5);
        // 90 km/h = 25 m/s (definition of the kilometre per hour).
        assert_relative_eq!(
            from_text(Kind::Speed, "90 km/h").unwrap(),
            25.0,
            max_relative = 1e-12
        );
        // 1 mph = 0.44704 m/s exactly (international mile, 1959).
        assert_relative_eq!(
            from_text(Kind::Speed, "10 mph").unwrap(),
            4.4704,
            max_relative = 1e-12
        );
        assert_relative_eq!(from_text(Kind::Mass, "6.2 t").unwrap(), 6200.0);
        assert_relative_eq!(from_text(Kind::Length, "-2e-3 m").unwrap(), -0.002);
    }

    #[test]
    fn materials_units() {
        // 100 % IACS = 58.0 MS/m (IEC 60028).
        assert_relative_eq!(
            from_text(Kind::Conductivity, "61 %IACS").unwrap(),
            35.38e6,
            max_relative = 1e-12
        );
        assert_relative_eq!(from_text(Kind::Conductivity, "30 MS/m").unwrap(), 30e6);
        assert_relative_eq!(
            from_text(Kind::TempCoefficient, "-0.12 %/K").unwrap(),
            -0.0012
        );
        assert_relative_eq!(
            from_text(Kind::TempCoefficient, "0.0035 1/K").unwrap(),
            0.0035
        );
        assert_relative_eq!(from_text(Kind::Density, "2700 kg/m^3").unwrap(), 2700.0);
        assert_relative_eq!(
            from_text(Kind::Density, "8.9 g/cm^3").unwrap(),
            8900.0,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            from_text(Kind::SpecificHeat, "900 J/(kg*K)").unwrap(),
            900.0
        );
    }

    #[test]
    fn temperatures_need_units() {
        assert_relative_eq!(from_text(Kind::Temperature, "20 °C").unwrap(), 20.0);
        assert_relative_eq!(from_text(Kind::Temperature, "20 degC").unwrap(), 20.0);
        // 0 °C = 273.15 K (SI Brochure, 9th edition).
        assert_relative_eq!(
            from_text(Kind::Temperature, "293.15 K").unwrap(),
            20.0,
            epsilon = 1e-12
        );
        assert_eq!(
            from_number(Kind::Temperature, 20.0),
            Err(UnitError::TemperatureWithoutUnit)
        );
        assert_eq!(
            from_text(Kind::Temperature, "20"),
            Err(UnitError::TemperatureWithoutUnit)
        );
    }

    #[test]
    fn wrong_kind_names_both() {
        let e = from_text(Kind::Length, "5 km/h").unwrap_err();
        assert_eq!(
            e,
            UnitError::WrongKind {
                unit: "km/h".into(),
                found: Kind::Speed,
                expected: Kind::Length
            }
        );
        let msg = e.to_string();
        assert!(msg.contains("speed") && msg.contains("length"), "{msg}");
    }

    #[test]
    fn bad_text() {
        assert!(matches!(
            from_text(Kind::Length, "abc"),
            Err(UnitError::NotANumber { .. })
        ));
        assert!(matches!(
            from_text(Kind::Length, "5 furlongs"),
            Err(UnitError::UnknownUnit { .. })
        ));
        assert!(matches!(
            from_number(Kind::Length, f64::NAN),
            Err(UnitError::NotFinite { .. })
        ));
        assert!(from_text(Kind::Length, "").is_err());
        assert!(from_text(Kind::Length, "e5 m").is_err());
    }

    #[test]
    fn decimal_commas_are_named() {
        let e = from_text(Kind::Mass, "0,9 t").unwrap_err();
        assert_eq!(
            e,
            UnitError::DecimalComma {
                text: "0,9 t".into(),
                suggestion: "0.9 t".into()
            }
        );
        let msg = e.to_string();
        assert!(
            msg.contains("decimal comma") && msg.contains("'0.9 t'"),
            "{msg}"
        );
        assert!(matches!(
            from_text(Kind::FluxDensity, "-1,25 T"),
            Err(UnitError::DecimalComma { suggestion, .. }) if suggestion == "-1.25 T"
        ));
        // The corrected text reads.
        assert_relative_eq!(from_text(Kind::Mass, "0.9 t").unwrap(), 900.0);
        // A comma that is not a decimal comma is left to the other messages.
        assert!(matches!(
            from_text(Kind::Mass, ",9 t"),
            Err(UnitError::NotANumber { .. })
        ));
    }

    #[test]
    fn angles_and_ratios() {
        assert_relative_eq!(
            from_text(Kind::Angle, "-90 deg").unwrap(),
            -std::f64::consts::FRAC_PI_2
        );
        assert_relative_eq!(from_text(Kind::Ratio, "-100 %").unwrap(), -1.0);
        assert_relative_eq!(from_text(Kind::Acceleration, "1 g").unwrap(), 9.80665);
        assert_relative_eq!(from_text(Kind::Jerk, "2 g/s").unwrap(), 2.0 * 9.80665);
    }
}
