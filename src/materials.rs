//! Built-in conductor materials for fins, each value with its source.
//!
//! Conductivities are at 20 °C. For the aluminium alloys the temperature coefficient of
//! resistance scales with conductivity from the 61 % IACS value of EC-grade aluminium: by
//! Matthiessen's rule the temperature-dependent part of resistivity, dρ/dT, is nearly the same
//! for dilute alloys of one base metal, so α = (dρ/dT)·σ20 is proportional to σ20 (handbook rule,
//! e.g. ASM Handbook Vol. 2, "Electrical properties of aluminium").

use crate::constants::{IACS_100_S_M, REFERENCE_TEMPERATURE_C};
use serde::Serialize;

/// A fin conductor: electrical and thermal properties.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Material {
    /// The name the scenario uses.
    pub name: String,
    /// Conductivity at 20 °C, S/m.
    pub conductivity_s_m: f64,
    /// Temperature coefficient of resistance at 20 °C, 1/K.
    pub temp_coeff_per_k: f64,
    /// Density, kg/m³.
    pub density_kg_m3: f64,
    /// Specific heat capacity, J/(kg·K).
    pub specific_heat_j_kg_k: f64,
    /// Where the values come from.
    pub source: String,
    /// Temperature above which the material loses its temper (strength) with exposure, °C
    /// (None: no temper to lose, or not known).
    pub softening_c: Option<f64>,
    /// Solidus: the material starts to melt, °C.
    pub solidus_c: Option<f64>,
}

impl Material {
    /// A warning when `temperature_c` is above the material's softening point or solidus.
    pub fn temperature_warning(&self, what: &str, temperature_c: f64) -> Option<String> {
        match (self.solidus_c, self.softening_c) {
            (Some(m), _) if temperature_c >= m => Some(format!(
                "{what} reaches {temperature_c:.0} °C, at or above the solidus of {} ({m:.0} °C): \
                 the fin would melt; the results past that point are meaningless",
                self.name
            )),
            (_, Some(s)) if temperature_c > s => Some(format!(
                "{what} reaches {temperature_c:.0} °C, above the softening point of {} \
                 ({s:.0} °C): the fin loses its temper and strength",
                self.name
            )),
            _ => None,
        }
    }
}

impl Material {
    /// Conductivity at `temperature_c`: σ(T) = σ20 / (1 + α·(T − 20 °C)) (linear resistivity model,
    /// IEC 60028). Clamped to stay positive for temperatures far below the model's range.
    pub fn conductivity_at_s_m(&self, temperature_c: f64) -> f64 {
        self.conductivity_s_m / self.resistivity_ratio(temperature_c)
    }

    /// ρ(T)/ρ20 = 1 + α·(T − 20 °C), kept above 0.05 (the linear model is not meant for cryogenic use).
    pub fn resistivity_ratio(&self, temperature_c: f64) -> f64 {
        (1.0 + self.temp_coeff_per_k * (temperature_c - REFERENCE_TEMPERATURE_C)).max(0.05)
    }
}

/// Temperature coefficient of 100 % IACS annealed copper at 20 °C, 1/K (IEC 60028:1925).
pub const COPPER_TEMP_COEFF_PER_K: f64 = 0.00393;
/// Temperature coefficient of EC aluminium (61 % IACS) at 20 °C, 1/K (IEC 60889 / ASTM B233 practice).
pub const ALUMINIUM_61_TEMP_COEFF_PER_K: f64 = 0.00403;

fn iacs(percent: f64) -> f64 {
    IACS_100_S_M * percent / 100.0
}

fn alloy(
    name: &str,
    percent_iacs: f64,
    density_kg_m3: f64,
    specific_heat: f64,
    source: &str,
    (softening_c, solidus_c): (Option<f64>, f64),
) -> Material {
    Material {
        softening_c,
        solidus_c: Some(solidus_c),
        name: name.to_string(),
        conductivity_s_m: iacs(percent_iacs),
        temp_coeff_per_k: ALUMINIUM_61_TEMP_COEFF_PER_K * percent_iacs / 61.0,
        density_kg_m3,
        specific_heat_j_kg_k: specific_heat,
        source: source.to_string(),
    }
}

/// The built-in table.
pub fn builtin() -> Vec<Material> {
    vec![
        Material {
            name: "copper-c11000".into(),
            conductivity_s_m: iacs(100.0),
            temp_coeff_per_k: COPPER_TEMP_COEFF_PER_K,
            density_kg_m3: 8890.0,
            specific_heat_j_kg_k: 385.0,
            source: "100 % IACS = 58.0 MS/m and α = 0.00393 /K (IEC 60028); density 8.89 g/cm³ and \
                     c_p 385 J/(kg·K) (ASM Handbook Vol. 2, C11000); softening ~200 °C (cold-worked \
                     tempers anneal) and solidus 1065 °C, from memory"
                .into(),
            softening_c: Some(200.0),
            solidus_c: Some(1065.0),
        },
        alloy(
            "aluminium-1350",
            61.8,
            2705.0,
            900.0,
            "61.8 % IACS typical, ≥ 61.0 % (ASTM B233); α = 0.00403 /K; density 2.705 g/cm³, c_p 900 J/(kg·K) \
             (ASM Handbook Vol. 2); solidus 646 °C (from memory)",
            (None, 646.0),
        ),
        alloy(
            "aluminium-6061-t6",
            43.0,
            2700.0,
            896.0,
            "43 % IACS, density 2.70 g/cm³, c_p 896 J/(kg·K) (ASM Handbook Vol. 2, 6061-T6); α scaled from 61 % IACS; T6 softens above ~175 °C, solidus 582 °C (from memory)",
            (Some(175.0), 582.0),
        ),
        alloy(
            "aluminium-6063-t6",
            53.0,
            2690.0,
            900.0,
            "53 % IACS, density 2.69 g/cm³, c_p 900 J/(kg·K) (ASM Handbook Vol. 2, 6063-T6); α scaled from 61 % IACS; T6 softens above ~175 °C, solidus 616 °C (from memory)",
            (Some(175.0), 616.0),
        ),
        alloy(
            "aluminium-5083-o",
            29.0,
            2660.0,
            900.0,
            "29 % IACS, density 2.66 g/cm³, c_p 900 J/(kg·K) (ASM Handbook Vol. 2, 5083-O); α scaled from 61 % IACS; annealed (no temper to lose), solidus 574 °C (from memory)",
            (None, 574.0),
        ),
    ]
}

/// Looks up a built-in material by name.
pub fn find_builtin(name: &str) -> Option<Material> {
    builtin().into_iter().find(|m| m.name == name)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn copper_is_the_iacs_standard() {
        // International Annealed Copper Standard: 58.0 MS/m at 20 °C (IEC 60028).
        let cu = find_builtin("copper-c11000").unwrap();
        assert_relative_eq!(cu.conductivity_s_m, 58.0e6);
        // Resistivity 1/58 Ω·mm²/m = 17.241 nΩ·m (IEC 60028).
        assert_relative_eq!(1.0 / cu.conductivity_s_m, 17.241e-9, max_relative = 1e-4);
    }

    #[test]
    fn copper_at_100_c() {
        // ρ(100 °C)/ρ(20 °C) = 1 + 0.00393·80 = 1.3144 (IEC 60028 linear model).
        let cu = find_builtin("copper-c11000").unwrap();
        assert_relative_eq!(
            cu.conductivity_at_s_m(100.0),
            58.0e6 / 1.3144,
            max_relative = 1e-12
        );
    }

    #[test]
    fn alloy_coefficients_scale_with_conductivity() {
        let a6061 = find_builtin("aluminium-6061-t6").unwrap();
        assert_relative_eq!(
            a6061.temp_coeff_per_k,
            0.00403 * 43.0 / 61.0,
            max_relative = 1e-12
        );
        // 43 % IACS ≈ 24.9 MS/m (ASM Handbook Vol. 2 lists 25 MS/m-class for 6061-T6).
        assert_relative_eq!(a6061.conductivity_s_m, 24.94e6, max_relative = 1e-3);
    }

    #[test]
    fn names_unique() {
        let all = builtin();
        for (i, a) in all.iter().enumerate() {
            assert!(all[i + 1..].iter().all(|b| b.name != a.name));
        }
    }
}
