//! One fluid: its equation of state, constants and validity range, and the
//! single-phase properties at a temperature and density.

use super::ancillary::MeltingLine;
use super::file::{AncillaryEquation, FluidFile, ReferenceStateName};
use super::helmholtz::{
    DeltaShapes, IdealDerivatives, IdealPart, ResidualDerivatives, ResidualPart, TauFactors,
};
use super::saturation_table::SaturationTable;
use crate::error::{Error, Result};

/// A point given by temperature, pressure and density.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Point {
    /// Temperature, K.
    pub temperature: f64,
    /// Pressure, Pa.
    pub pressure: f64,
    /// Density, kg/m³.
    pub density: f64,
}

/// Ancillary equations of a fluid, converted to mass units where needed.
#[derive(Debug, Clone)]
pub struct Ancillaries {
    /// Bubble-point pressure, Pa.
    pub bubble_pressure: AncillaryEquation,
    /// Dew-point pressure, Pa.
    pub dew_pressure: AncillaryEquation,
    /// Saturated-liquid density (mol/m³ as published).
    pub liquid_density: AncillaryEquation,
    /// Saturated-vapour density (mol/m³ as published).
    pub vapour_density: AncillaryEquation,
    /// The melting line.
    pub melting: MeltingLine,
}

/// A pure or pseudo-pure fluid with its reference equation of state.
#[derive(Debug, Clone)]
pub struct Fluid {
    /// Canonical name (`nitrogen`, `hydrogen`, …).
    pub name: String,
    /// Other accepted names.
    pub aliases: Vec<String>,
    /// Chemical formula or composition.
    pub formula: String,
    /// Full citation of the equation of state.
    pub source: String,
    /// Short literature key.
    pub source_key: String,
    /// A mixture treated as one fluid, with separate bubble and dew lines.
    pub pseudo_pure: bool,
    /// Molar mass, kg/mol.
    pub molar_mass: f64,
    /// The equation's own molar gas constant, J/(mol·K).
    pub molar_gas_constant: f64,
    /// Specific gas constant R/M, J/(kg·K).
    pub gas_constant: f64,
    /// Reducing temperature Tr, K.
    pub reducing_temperature: f64,
    /// Reducing density ρr, kg/m³.
    pub reducing_density: f64,
    /// Critical point.
    pub critical: Point,
    /// Triple-point temperature, K.
    pub triple_temperature: f64,
    /// Triple-point pressures of the liquid and the vapour, Pa (equal for a pure fluid).
    pub triple_pressures: (f64, f64),
    /// Lowest valid temperature, K.
    pub temperature_min: f64,
    /// Highest valid temperature, K.
    pub temperature_max: f64,
    /// Highest valid pressure, Pa.
    pub pressure_max: f64,
    /// The reference-state convention in force.
    pub reference_state: ReferenceStateName,
    /// A density no fluid state reaches (five times the saturated-liquid density at
    /// the triple point, kg/m³); density searches stop there.
    pub density_ceiling: f64,
    /// The range of pressures over which saturation is solved, Pa.
    pub(crate) saturation_pressures: (f64, f64),
    /// The saturation line tabulated from this equation when the fluid is built, for
    /// quick phase decisions and seeds (empty for a pseudo-pure fluid).
    pub saturation_table: SaturationTable,
    /// Ancillary equations and melting line.
    pub ancillaries: Ancillaries,
    pub(crate) ideal: IdealPart,
    pub(crate) residual: ResidualPart,
    /// The inversion curve, traced on first use.
    pub(crate) inversion_cache: std::sync::OnceLock<Result<super::inversion::InversionCurve>>,
    /// The maximum inversion temperature, found on first use.
    pub(crate) max_inversion_cache: std::sync::OnceLock<Result<f64>>,
    /// The (T, p) flash's density seeds, made on the first flash (see
    /// `seed_grid`).
    seed_grid: std::sync::OnceLock<super::seed_grid::SeedGrid>,
    /// A number of its own among the fluids built in this process, naming its
    /// equation as it stands in the evaluations kept by `Fluid::residual_at_delta`
    /// and `Fluid::ideal_at` (a new number whenever the equation is changed, as
    /// when its reference state is set).
    pub(crate) identity: u64,
}

/// The next fluid's `identity`.
static NEXT_IDENTITY: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(0);

/// Every single-phase property at one (T, ρ).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Properties {
    /// Temperature, K.
    pub temperature: f64,
    /// Density, kg/m³.
    pub density: f64,
    /// Pressure, Pa.
    pub pressure: f64,
    /// Specific internal energy, J/kg.
    pub internal_energy: f64,
    /// Specific enthalpy, J/kg.
    pub enthalpy: f64,
    /// Specific entropy, J/(kg·K).
    pub entropy: f64,
    /// Specific Gibbs energy, J/kg.
    pub gibbs: f64,
    /// Isochoric heat capacity, J/(kg·K).
    pub cv: f64,
    /// Isobaric heat capacity, J/(kg·K).
    pub cp: f64,
    /// Speed of sound, m/s.
    pub speed_of_sound: f64,
    /// Joule-Thomson coefficient (∂T/∂p)ₕ, K/Pa.
    pub joule_thomson: f64,
    /// Compressibility factor Z = p/(ρRT).
    pub compressibility: f64,
    /// (∂p/∂ρ)_T, Pa·m³/kg.
    pub dp_drho: f64,
    /// (∂p/∂T)_ρ, Pa/K.
    pub dp_dt: f64,
}

/// Key of an evaluation of the residual part: which fluid's (its identity), τ and
/// δ (their bits).
type ResidualKey = (u64, u64, u64);

thread_local! {
    /// The last residual evaluation on this thread (see `Fluid::residual_at_delta`).
    static LAST_RESIDUAL: std::cell::Cell<Option<(ResidualKey, ResidualDerivatives)>> =
        const { std::cell::Cell::new(None) };
    /// The last ideal-part evaluation on this thread (see `Fluid::ideal_at`): which
    /// fluid's and τ (its bits).
    static LAST_IDEAL: std::cell::Cell<Option<((u64, u64), IdealDerivatives)>> =
        const { std::cell::Cell::new(None) };
    /// The last δ factors of the residual part on this thread (see
    /// `Fluid::density_derivatives`): which fluid's and δ (its bits).
    static LAST_SHAPES: std::cell::RefCell<(Option<(u64, u64)>, DeltaShapes)> =
        const { std::cell::RefCell::new((None, DeltaShapes::EMPTY)) };
}

impl Fluid {
    /// The source as people cite it in a caption: "Leachman et al. 2009", "Span and
    /// Wagner 1996", "Smith 1990" — surnames from the authors of `source`, the year
    /// from `source_key`. Falls back to `source_key` where either is missing.
    pub fn citation(&self) -> String {
        let year = self
            .source_key
            .rsplit('-')
            .next()
            .filter(|y| y.len() == 4 && y.chars().all(|c| c.is_ascii_digit()));
        let authors = self.source.split(", \"").next().unwrap_or("");
        let surnames: Vec<&str> = authors
            .split(" and ")
            .filter_map(|name| name.split_whitespace().last())
            .collect();
        match (year, surnames.as_slice()) {
            (Some(year), [one]) => format!("{one} {year}"),
            (Some(year), [one, two]) => format!("{one} and {two} {year}"),
            (Some(year), [first, ..]) => format!("{first} et al. {year}"),
            _ => self.source_key.clone(),
        }
    }
    /// Builds a fluid from its parsed data file (`file` names it in errors).
    pub fn from_file(data: FluidFile, file: &str) -> Result<Fluid> {
        let bad = |message: String| Error::FluidData {
            file: file.to_string(),
            message,
        };
        let ideal = IdealPart::from_terms(&data.ideal_gas).map_err(&bad)?;
        let residual = ResidualPart::from_terms(&data.residual).map_err(&bad)?;
        if residual.is_empty() {
            return Err(bad("no residual terms".into()));
        }
        let m = data.molar_mass_kg_mol;
        if !(m > 0.0 && data.gas_constant_j_mol_k > 0.0) {
            return Err(bad("molar mass and gas constant must be positive".into()));
        }
        let fluid = Fluid {
            name: data.name,
            aliases: data.aliases,
            formula: data.formula,
            source: data.source,
            source_key: data.source_key,
            pseudo_pure: data.pseudo_pure,
            molar_mass: m,
            molar_gas_constant: data.gas_constant_j_mol_k,
            gas_constant: data.gas_constant_j_mol_k / m,
            reducing_temperature: data.reducing.temperature_k,
            reducing_density: data.reducing.density_mol_m3 * m,
            critical: Point {
                temperature: data.critical.temperature_k,
                pressure: data.critical.pressure_pa,
                density: data.critical.density_mol_m3 * m,
            },
            triple_temperature: data.triple.temperature_k,
            triple_pressures: (
                data.triple.liquid_pressure_pa,
                data.triple.vapour_pressure_pa,
            ),
            temperature_min: data.limits.temperature_min_k,
            temperature_max: data.limits.temperature_max_k,
            pressure_max: data.limits.pressure_max_pa,
            reference_state: data.reference_state,
            density_ceiling: 5.0
                * data
                    .ancillaries
                    .liquid_density
                    .value(data.triple.temperature_k)
                * m,
            saturation_pressures: (0.0, 0.0),
            saturation_table: SaturationTable::default(),
            ancillaries: Ancillaries {
                bubble_pressure: data.ancillaries.bubble_pressure,
                dew_pressure: data.ancillaries.dew_pressure,
                liquid_density: data.ancillaries.liquid_density,
                vapour_density: data.ancillaries.vapour_density,
                melting: MeltingLine::from_file(&data.melting_line),
            },
            ideal,
            residual,
            inversion_cache: std::sync::OnceLock::new(),
            max_inversion_cache: std::sync::OnceLock::new(),
            seed_grid: std::sync::OnceLock::new(),
            identity: NEXT_IDENTITY.fetch_add(1, std::sync::atomic::Ordering::Relaxed),
        };
        let mut fluid = fluid;
        fluid.saturation_pressures = fluid
            .compute_saturation_pressure_range()
            .map_err(|e| bad(format!("cannot solve the saturation range: {e}")))?;
        if fluid.reference_state == ReferenceStateName::NormalBoilingPoint {
            fluid.set_normal_boiling_point_reference().map_err(|e| {
                bad(format!(
                    "cannot set the normal-boiling-point reference: {e}"
                ))
            })?;
        }
        // Last: the table keeps enthalpies and entropies in the final reference state.
        fluid.saturation_table = fluid
            .build_saturation_table()
            .map_err(|e| bad(format!("cannot tabulate the saturation line: {e}")))?;
        Ok(fluid)
    }

    /// Shifts the ideal-gas constants so that the saturated liquid at 101.325 kPa has
    /// h = 0 and s = 0. A constant a₁ and a τ coefficient a₂ in α⁰ change h by R·Tr·Δa₂
    /// and s by −R·Δa₁, and nothing else.
    fn set_normal_boiling_point_reference(&mut self) -> Result<()> {
        let saturation = self.saturation_at_pressure(crate::quantity::STANDARD_ATMOSPHERE)?;
        let liquid = self.properties(saturation.liquid.temperature, saturation.liquid.density);
        self.ideal.lead_tau -= liquid.enthalpy / (self.gas_constant * self.reducing_temperature);
        self.ideal.lead_constant += liquid.entropy / self.gas_constant;
        // The equation has changed: evaluations kept under the old number are not
        // its own any more.
        self.identity = NEXT_IDENTITY.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        Ok(())
    }

    /// A seed for the density at (T, p) from the seed grid (see `seed_grid`);
    /// `None` where the grid has none.
    pub(crate) fn density_seed(&'static self, temperature: f64, pressure: f64) -> Option<f64> {
        self.seeds().seed(self, temperature, pressure)
    }

    /// [`Fluid::density_seed`], and the branch every state of the seed's cell lies
    /// on, where the cell lies wholly on one side of the saturation line.
    pub(crate) fn density_seed_and_side(
        &'static self,
        temperature: f64,
        pressure: f64,
    ) -> Option<(f64, Option<super::density::Branch>)> {
        self.seeds().seed_and_side(self, temperature, pressure)
    }

    /// Where the (p, h) or (p, s) flash should start, from the seed grid (see
    /// `seed_grid`); `None` where the grid has no start.
    pub(crate) fn isobar_start(
        &'static self,
        pressure: f64,
        target: f64,
        quantity: super::seed_grid::Quantity,
    ) -> Option<super::seed_grid::IsobarStart> {
        self.seeds().isobar_start(self, pressure, target, quantity)
    }

    /// The seed grid, made (empty) the first time.
    fn seeds(&self) -> &super::seed_grid::SeedGrid {
        self.seed_grid
            .get_or_init(|| super::seed_grid::SeedGrid::new(self))
    }

    /// τ = Tr/T.
    pub fn tau(&self, temperature: f64) -> f64 {
        self.reducing_temperature / temperature
    }

    /// δ = ρ/ρr.
    pub fn delta(&self, density: f64) -> f64 {
        density / self.reducing_density
    }

    /// The residual τ factors at a temperature, for repeated density evaluations.
    pub fn tau_factors(&self, temperature: f64) -> TauFactors {
        self.residual.at_tau(self.tau(temperature))
    }

    /// The residual derivatives at (T, ρ) from precomputed τ factors.
    pub fn residual_at(&self, factors: &TauFactors, density: f64) -> ResidualDerivatives {
        self.residual_at_delta(factors, self.delta(density))
    }

    /// The residual derivatives at (τ, δ). The last evaluation of each thread is
    /// kept: a density solve ends by evaluating its root, and the state's properties
    /// are then evaluated at exactly that root, so the second evaluation is the
    /// first's (the same bits in, the same bits out).
    fn residual_at_delta(&self, factors: &TauFactors, delta: f64) -> ResidualDerivatives {
        let key = (self.identity, factors.tau().to_bits(), delta.to_bits());
        LAST_RESIDUAL.with(|last| {
            if let Some((k, r)) = last.get() {
                if k == key {
                    return r;
                }
            }
            // The δ factors of the density iteration that ended here, if it did;
            // else all in one pass, without storing them.
            let r = LAST_SHAPES.with(|cell| {
                let last = cell.borrow();
                if last.0 == Some((self.identity, delta.to_bits())) {
                    self.residual.derivatives(factors, &last.1)
                } else {
                    self.residual.evaluate(factors, delta)
                }
            });
            last.set(Some((key, r)));
            r
        })
    }

    /// The density derivatives of αʳ at δ; the δ factors they were summed from are
    /// kept, the last of each thread: a density iteration ends at its root, where
    /// the state's properties are then evaluated from them (see
    /// `Fluid::residual_at_delta`), and they do not depend on τ.
    fn density_derivatives(&self, factors: &TauFactors, delta: f64) -> [f64; 3] {
        LAST_SHAPES.with(|cell| {
            let mut last = cell.borrow_mut();
            let (ref mut key, ref mut shapes) = *last;
            *key = Some((self.identity, delta.to_bits()));
            self.residual.density_derivatives(factors, delta, shapes)
        })
    }

    /// The ideal part at τ. The last evaluation of each thread is kept: the liquid
    /// and vapour of a saturation, or a species on both sides of the ortho–para
    /// solution's boiling, are evaluated at one τ one after the other (the same bits
    /// in, the same bits out).
    fn ideal_at(&self, factors: &TauFactors) -> IdealDerivatives {
        let tau = factors.tau();
        let key = (self.identity, tau.to_bits());
        LAST_IDEAL.with(|last| {
            if let Some((k, i)) = last.get() {
                if k == key {
                    return i;
                }
            }
            let i = self.ideal.evaluate_with_ln_tau(tau, factors.ln_tau());
            last.set(Some((key, i)));
            i
        })
    }

    /// Pressure and (∂p/∂ρ)_T at (T, ρ), from precomputed τ factors.
    pub fn pressure_and_slope(
        &self,
        factors: &TauFactors,
        temperature: f64,
        density: f64,
    ) -> (f64, f64) {
        let (p, slope, _) = self.pressure_slope_curvature(factors, temperature, density);
        (p, slope)
    }

    /// Pressure p (Pa), (∂p/∂ρ)_T and (∂²p/∂ρ²)_T at (T, ρ), from precomputed τ
    /// factors; only the δ derivatives of αʳ are summed.
    pub fn pressure_slope_curvature(
        &self,
        factors: &TauFactors,
        temperature: f64,
        density: f64,
    ) -> (f64, f64, f64) {
        let delta = self.delta(density);
        let [first, second, third] = self.density_derivatives(factors, delta);
        let rt = self.gas_constant * temperature;
        let p = density * rt * (1.0 + delta * first);
        let slope = rt * (1.0 + 2.0 * delta * first + delta * delta * second);
        // d/dρ = (1/ρr) d/dδ of the slope.
        let curvature = rt / self.reducing_density
            * (2.0 * first + 4.0 * delta * second + delta * delta * third);
        (p, slope, curvature)
    }

    /// Pressure at (T, ρ).
    pub fn pressure(&self, temperature: f64, density: f64) -> f64 {
        self.pressure_and_slope(&self.tau_factors(temperature), temperature, density)
            .0
    }

    /// Every single-phase property at (T, ρ), from precomputed τ factors.
    pub fn properties_with(
        &self,
        factors: &TauFactors,
        temperature: f64,
        density: f64,
    ) -> Properties {
        let tau = factors.tau();
        let delta = self.delta(density);
        let r = self.residual_at_delta(factors, delta);
        let i = self.ideal_at(factors);
        let rt = self.gas_constant * temperature;
        let big_r = self.gas_constant;
        let d_ar = delta * r.alpha_delta;
        let dd_ar = delta * delta * r.alpha_delta_delta;
        let dt_ar = delta * tau * r.alpha_delta_tau;
        let tau_sum = tau * (i.alpha_tau + r.alpha_tau);
        let tt_sum = tau * tau * (i.alpha_tau_tau + r.alpha_tau_tau);
        let pressure = density * rt * (1.0 + d_ar);
        let internal_energy = rt * tau_sum;
        let enthalpy = rt * (1.0 + tau_sum + d_ar);
        let helmholtz_reduced = i.alpha + delta.ln() + r.alpha;
        let entropy = big_r * (tau_sum - helmholtz_reduced);
        let gibbs = rt * (1.0 + d_ar + helmholtz_reduced);
        let cv = -big_r * tt_sum;
        let numerator = 1.0 + d_ar - dt_ar;
        let compress = 1.0 + 2.0 * d_ar + dd_ar;
        let cp = cv + big_r * numerator * numerator / compress;
        let w2 = rt * (compress - numerator * numerator / tt_sum);
        let joule_thomson = -(d_ar + dd_ar + dt_ar)
            / ((numerator * numerator - tt_sum * compress) * big_r * density);
        Properties {
            temperature,
            density,
            pressure,
            internal_energy,
            enthalpy,
            entropy,
            gibbs,
            cv,
            cp,
            speed_of_sound: w2.max(0.0).sqrt(),
            joule_thomson,
            compressibility: 1.0 + d_ar,
            dp_drho: rt * compress,
            dp_dt: density * big_r * numerator,
        }
    }

    /// Every single-phase property at (T, ρ).
    pub fn properties(&self, temperature: f64, density: f64) -> Properties {
        self.properties_with(&self.tau_factors(temperature), temperature, density)
    }

    /// The ideal-gas enthalpy at T, J/kg.
    pub fn ideal_gas_enthalpy(&self, temperature: f64) -> f64 {
        let tau = self.tau(temperature);
        let i = self.ideal.evaluate(tau);
        self.gas_constant * temperature * (1.0 + tau * i.alpha_tau)
    }

    /// The ideal-gas enthalpy (J/kg) and entropy (J/(kg·K)) at (T, p), from the
    /// ideal part of the equation alone.
    pub fn ideal_gas_enthalpy_entropy(&self, temperature: f64, pressure: f64) -> (f64, f64) {
        let tau = self.tau(temperature);
        let i = self.ideal.evaluate(tau);
        let delta = self.delta(self.ideal_gas_density(temperature, pressure));
        let tau_alpha = tau * i.alpha_tau;
        (
            self.gas_constant * temperature * (1.0 + tau_alpha),
            self.gas_constant * (tau_alpha - i.alpha - delta.ln()),
        )
    }

    /// The ideal-gas isobaric heat capacity at T, J/(kg·K).
    pub fn ideal_gas_cp(&self, temperature: f64) -> f64 {
        let tau = self.tau(temperature);
        let i = self.ideal.evaluate(tau);
        self.gas_constant * (1.0 - tau * tau * i.alpha_tau_tau)
    }

    /// The second virial coefficient B (m³/kg) and its temperature derivatives
    /// dB/dT and d²B/dT², from the zero-density limit of the residual part.
    pub fn second_virial(&self, temperature: f64) -> [f64; 3] {
        let tau = self.tau(temperature);
        let [b, b_tau, b_tau_tau] = self.residual.virial_b(tau);
        let rho_r = self.reducing_density;
        // τ = Tr/T: dτ/dT = −τ/T, d²τ/dT² = 2τ/T².
        let dtau = -tau / temperature;
        let d2tau = 2.0 * tau / (temperature * temperature);
        [
            b / rho_r,
            b_tau * dtau / rho_r,
            (b_tau_tau * dtau * dtau + b_tau * d2tau) / rho_r,
        ]
    }

    /// The critical temperature, K.
    pub fn critical_temperature(&self) -> f64 {
        self.critical.temperature
    }

    /// Checks that (T, p) lies inside the equation's validity range: between the
    /// lowest and highest temperature, below the highest pressure, and not in the
    /// solid (above the melting pressure).
    pub fn check_range(&self, temperature: f64, pressure: f64) -> Result<()> {
        let out = |what: String, detail: String| Error::OutOfRange {
            fluid: self.name.clone(),
            what,
            detail,
        };
        if !temperature.is_finite() || !pressure.is_finite() {
            return Err(out(
                format!("T = {temperature} K, p = {pressure} Pa"),
                "values must be finite numbers".into(),
            ));
        }
        let tolerance = 1e-9;
        if temperature < self.temperature_min * (1.0 - tolerance)
            || temperature > self.temperature_max * (1.0 + tolerance)
        {
            return Err(out(
                format!("T = {temperature:.6} K"),
                format!(
                    "valid from {} K to {} K",
                    self.temperature_min, self.temperature_max
                ),
            ));
        }
        if pressure <= 0.0 || pressure > self.pressure_max * (1.0 + tolerance) {
            return Err(out(
                format!("p = {:.6} MPa", pressure / 1e6),
                format!("valid above 0 and up to {} MPa", self.pressure_max / 1e6),
            ));
        }
        if self.ancillaries.melting.surely_below(
            temperature.max(self.ancillaries.melting.temperature_min()),
            pressure,
        ) {
            return Ok(());
        }
        if let Some(melting) = self.melting_pressure(temperature) {
            if pressure > melting * (1.0 + 1e-6) {
                return Err(out(
                    format!("p = {:.6} MPa at T = {temperature:.4} K", pressure / 1e6),
                    format!(
                        "this is in the solid: the melting pressure at that temperature is {:.6} MPa",
                        melting / 1e6
                    ),
                ));
            }
        }
        Ok(())
    }

    /// The melting pressure at T (Pa), where the melting line covers T. The line
    /// starts at the triple point; where its data start a hair above it, its first
    /// value holds down to the triple point.
    pub fn melting_pressure(&self, temperature: f64) -> Option<f64> {
        let line = &self.ancillaries.melting;
        line.pressure(temperature.max(line.temperature_min()))
    }

    /// The melting temperature at pressure p (K): the coldest fluid temperature at
    /// that pressure. `None` below the triple-point pressure's melting value; the top
    /// of the line's data where p lies above the line's highest pressure.
    pub fn melting_temperature(&self, pressure: f64) -> Option<f64> {
        let line = &self.ancillaries.melting;
        let low = self.triple_temperature.max(line.temperature_min());
        let high = line.temperature_max();
        let f = |t: f64| line.pressure(t).map(|pm| pm - pressure);
        // The line's end pressures are kept; evaluated only where the triple point
        // lies above the line's lowest temperature.
        let (at_low, at_high) = line.end_pressures();
        let fl = if low == line.temperature_min() && at_low.is_finite() {
            at_low - pressure
        } else {
            f(low)?
        };
        let fh = if at_high.is_finite() {
            at_high - pressure
        } else {
            f(high)?
        };
        if fl > 0.0 {
            return None;
        }
        if fh < 0.0 {
            return Some(high);
        }
        // Within one cell of the line's table where its ends enclose p, by Newton
        // steps on the line (three or four evaluations where the whole line's
        // bracket took ten or more); else by bracketing.
        let tolerance = 1e-12 * high;
        let cell = line
            .cell_bracket(pressure)
            .filter(|cell| cell.low.0 >= low && cell.high.0 <= high);
        if let Some(t) = cell.and_then(|cell| line.temperature_in_cell(pressure, &cell, tolerance))
        {
            return Some(t);
        }
        let (a, b) = cell.map_or((low, high), |cell| (cell.low.0, cell.high.0));
        // A gap between the line's parts gives a non-finite value, which ends the
        // search without a result.
        crate::numeric::bracketed_root(
            "melting temperature from pressure",
            |t| f(t).unwrap_or(f64::NAN),
            a,
            b,
            tolerance,
        )
        .ok()
    }
}
