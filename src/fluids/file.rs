//! The layout of cryochain's fluid data files (`src/fluids/data/*.yaml`).
//!
//! One file per fluid holds the published coefficients of its equation of state,
//! its constants, validity range, ancillary equations and the literature source.
//! The layout is our own; docs/methods.md describes every field.

use serde::Deserialize;

/// A whole fluid file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FluidFile {
    /// Canonical name, lower case.
    pub name: String,
    /// Other accepted names.
    #[serde(default)]
    pub aliases: Vec<String>,
    /// Chemical formula or composition.
    pub formula: String,
    /// Full citation of the equation of state.
    pub source: String,
    /// Short literature key of the source.
    pub source_key: String,
    /// True for a mixture treated as one pure fluid (air).
    pub pseudo_pure: bool,
    /// Molar mass, kg/mol.
    pub molar_mass_kg_mol: f64,
    /// Molar gas constant used by this equation, J/(mol·K).
    #[serde(rename = "gas_constant_J_molK")]
    pub gas_constant_j_mol_k: f64,
    /// Reducing temperature and density of τ = Tr/T, δ = ρ/ρr.
    pub reducing: Reducing,
    /// Critical point (for a pseudo-pure fluid, the one its source states).
    pub critical: Critical,
    /// Triple point.
    pub triple: Triple,
    /// Validity range of the equation.
    pub limits: Limits,
    /// Which convention fixes the zero of enthalpy and entropy.
    pub reference_state: ReferenceStateName,
    /// Terms of the ideal-gas part α⁰.
    pub ideal_gas: Vec<IdealGasTerm>,
    /// Terms of the residual part αʳ.
    pub residual: Vec<ResidualTerm>,
    /// Ancillary equations used as seeds.
    pub ancillaries: AncillaryFile,
    /// The melting line, p as a function of T.
    pub melting_line: MeltingFile,
}

/// Reducing parameters.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Reducing {
    /// Tr, K.
    #[serde(rename = "temperature_K")]
    pub temperature_k: f64,
    /// ρr, mol/m³.
    pub density_mol_m3: f64,
}

/// Critical point.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Critical {
    /// Tc, K.
    #[serde(rename = "temperature_K")]
    pub temperature_k: f64,
    /// pc, Pa.
    #[serde(rename = "pressure_Pa")]
    pub pressure_pa: f64,
    /// ρc, mol/m³.
    pub density_mol_m3: f64,
}

/// Triple point.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Triple {
    /// Triple-point temperature, K.
    #[serde(rename = "temperature_K")]
    pub temperature_k: f64,
    /// Pressure of the saturated liquid there, Pa.
    #[serde(rename = "liquid_pressure_Pa")]
    pub liquid_pressure_pa: f64,
    /// Pressure of the saturated vapour there, Pa.
    #[serde(rename = "vapour_pressure_Pa")]
    pub vapour_pressure_pa: f64,
}

/// Validity range.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Limits {
    /// Lowest temperature, K.
    #[serde(rename = "temperature_min_K")]
    pub temperature_min_k: f64,
    /// Highest temperature, K.
    #[serde(rename = "temperature_max_K")]
    pub temperature_max_k: f64,
    /// Highest pressure, Pa.
    #[serde(rename = "pressure_max_Pa")]
    pub pressure_max_pa: f64,
}

/// The reference-state conventions a file may name.
#[derive(Debug, Deserialize, Clone, Copy, PartialEq, Eq)]
#[serde(rename_all = "snake_case")]
pub enum ReferenceStateName {
    /// Keep the constants of the published ideal-gas part (the paper's own zero).
    Published,
    /// h = 0 and s = 0 for the saturated liquid at 101.325 kPa.
    NormalBoilingPoint,
}

/// One family of ideal-gas terms.
#[derive(Debug, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case", deny_unknown_fields)]
pub enum IdealGasTerm {
    /// ln δ + constant + tau·τ.
    Lead {
        /// Constant term.
        constant: f64,
        /// Coefficient of τ.
        tau: f64,
    },
    /// coefficient · ln τ.
    LogTau {
        /// Coefficient.
        coefficient: f64,
    },
    /// Σ n τ^t.
    Power {
        /// Coefficients.
        n: Vec<f64>,
        /// Exponents.
        t: Vec<f64>,
    },
    /// Σ n ln(1 − exp(−θ τ)).
    PlanckEinstein {
        /// Coefficients.
        n: Vec<f64>,
        /// Reduced characteristic temperatures θ.
        theta: Vec<f64>,
    },
    /// Σ n ln(c + d exp(θ τ)).
    PlanckEinsteinGeneral {
        /// Coefficients.
        n: Vec<f64>,
        /// Constants c.
        c: Vec<f64>,
        /// Constants d.
        d: Vec<f64>,
        /// Exponent factors θ.
        theta: Vec<f64>,
    },
}

/// One family of residual terms.
#[derive(Debug, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case", deny_unknown_fields)]
pub enum ResidualTerm {
    /// Σ n δ^d τ^t exp(−δ^l), with l = 0 meaning no exponential.
    Power {
        /// Coefficients.
        n: Vec<f64>,
        /// Density exponents (whole numbers).
        d: Vec<f64>,
        /// Temperature exponents.
        t: Vec<f64>,
        /// Exponential density exponents (whole numbers, 0 for none).
        l: Vec<f64>,
    },
    /// Σ n δ^d τ^t exp(−η(δ−ε)² − β(τ−γ)²).
    Gaussian {
        /// Coefficients.
        n: Vec<f64>,
        /// Density exponents (whole numbers).
        d: Vec<f64>,
        /// Temperature exponents.
        t: Vec<f64>,
        /// η.
        eta: Vec<f64>,
        /// ε.
        epsilon: Vec<f64>,
        /// β.
        beta: Vec<f64>,
        /// γ.
        gamma: Vec<f64>,
    },
}

/// The four ancillary equations.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct AncillaryFile {
    /// Bubble-point (saturated-liquid) pressure.
    pub bubble_pressure: AncillaryEquation,
    /// Dew-point (saturated-vapour) pressure; the same as the bubble one for a pure fluid.
    pub dew_pressure: AncillaryEquation,
    /// Saturated-liquid density, mol/m³.
    pub liquid_density: AncillaryEquation,
    /// Saturated-vapour density, mol/m³.
    pub vapour_density: AncillaryEquation,
}

/// One ancillary equation: with θ = 1 − T/Tr and S = Σ n θ^t (times Tr/T when
/// `divide_by_reduced_temperature`), the value is `reducing_value · exp(S)`
/// (`exponential`) or `reducing_value · (1 + S)` (`linear`).
#[derive(Debug, Deserialize, Clone)]
#[serde(deny_unknown_fields)]
pub struct AncillaryEquation {
    /// `exponential` or `linear`.
    pub form: AncillaryForm,
    /// Value at θ = 0.
    pub reducing_value: f64,
    /// Tr, K.
    #[serde(rename = "reducing_temperature_K")]
    pub reducing_temperature_k: f64,
    /// Multiply the sum by Tr/T.
    pub divide_by_reduced_temperature: bool,
    /// Coefficients.
    pub n: Vec<f64>,
    /// Exponents.
    pub t: Vec<f64>,
    /// The largest error its source states, in percent.
    pub stated_max_error_percent: f64,
}

/// Form of an ancillary equation.
#[derive(Debug, Deserialize, Clone, Copy, PartialEq, Eq)]
#[serde(rename_all = "snake_case")]
pub enum AncillaryForm {
    /// value = reducing · exp(S).
    Exponential,
    /// value = reducing · (1 + S).
    Linear,
}

/// The melting line.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MeltingFile {
    /// Which form the parts use.
    pub form: MeltingForm,
    /// Pieces over temperature ranges.
    pub parts: Vec<MeltingPart>,
}

/// Forms of melting-pressure equations.
#[derive(Debug, Deserialize, Clone, Copy, PartialEq, Eq)]
#[serde(rename_all = "snake_case")]
pub enum MeltingForm {
    /// p = p0 + a((T/T0)^c − 1), with a = a[0], c = t[0].
    Simon,
    /// p = p0 (1 + Σ a ((T/T0)^t − 1)).
    PolynomialInTr,
    /// p = p0 (1 + Σ a (T/T0 − 1)^t).
    PolynomialInTheta,
}

/// One piece of the melting line.
#[derive(Debug, Deserialize, Clone)]
#[serde(deny_unknown_fields)]
pub struct MeltingPart {
    /// Lower end, K.
    #[serde(rename = "temperature_min_K")]
    pub temperature_min_k: f64,
    /// Upper end, K.
    #[serde(rename = "temperature_max_K")]
    pub temperature_max_k: f64,
    /// T0, K.
    #[serde(rename = "reference_temperature_K")]
    pub reference_temperature_k: f64,
    /// p0, Pa.
    #[serde(rename = "reference_pressure_Pa")]
    pub reference_pressure_pa: f64,
    /// Coefficients.
    pub a: Vec<f64>,
    /// Exponents.
    pub t: Vec<f64>,
}
