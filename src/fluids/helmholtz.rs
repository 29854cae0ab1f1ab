//! The multiparameter Helmholtz-energy equation of state, α(τ, δ) = α⁰ + αʳ, and its
//! analytic derivatives.
//!
//! τ = Tr/T and δ = ρ/ρr are the reduced inverse temperature and density. Terms are
//! data, read from the fluid file. The residual part can be evaluated in two steps:
//! [`ResidualPart::at_tau`] does the work that depends on τ alone, and
//! [`ResidualPart::evaluate`] finishes at a density; solvers that hold T fixed while
//! they iterate on density reuse the first step.

use super::file::{IdealGasTerm, ResidualTerm};

/// α⁰ and its τ derivatives (the δ dependence is ln δ alone).
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct IdealDerivatives {
    /// α⁰ without the ln δ term.
    pub alpha: f64,
    /// ∂α⁰/∂τ.
    pub alpha_tau: f64,
    /// ∂²α⁰/∂τ².
    pub alpha_tau_tau: f64,
}

/// Defines method `$entry` and its copy `$wide` compiled for AVX2 and FMA, both
/// running `$body` (which must be `#[inline(always)]`); the entry takes the copy
/// where the CPU has the features (see [`wide_arithmetic`]), else the body as
/// compiled for the baseline.
macro_rules! wide_or_baseline {
    (
        $(#[$meta:meta])*
        $vis:vis fn $entry:ident / $wide:ident => $body:ident(
            $($argument:ident: $kind:ty),* $(,)?
        ) -> $output:ty
    ) => {
        $(#[$meta])*
        $vis fn $entry(&self, $($argument: $kind),*) -> $output {
            #[cfg(target_arch = "x86_64")]
            if wide_arithmetic() {
                // SAFETY: the CPU has the features, checked at run time.
                return unsafe { self.$wide($($argument),*) };
            }
            self.$body($($argument),*)
        }

        #[cfg(target_arch = "x86_64")]
        #[target_feature(enable = "avx2,fma")]
        fn $wide(&self, $($argument: $kind),*) -> $output {
            self.$body($($argument),*)
        }
    };
}

/// αʳ and its partial derivatives up to second order.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct ResidualDerivatives {
    /// αʳ.
    pub alpha: f64,
    /// ∂αʳ/∂δ.
    pub alpha_delta: f64,
    /// ∂²αʳ/∂δ².
    pub alpha_delta_delta: f64,
    /// ∂αʳ/∂τ.
    pub alpha_tau: f64,
    /// ∂²αʳ/∂τ².
    pub alpha_tau_tau: f64,
    /// ∂²αʳ/∂δ∂τ.
    pub alpha_delta_tau: f64,
}

/// The ideal-gas part α⁰ = ln δ + a₁ + a₂τ + c ln τ + Σ n τ^t + Σ n ln(1 − e^(−θτ))
/// + Σ n ln(c + d e^(θτ)).
#[derive(Debug, Clone, Default)]
pub struct IdealPart {
    /// Constant a₁ (sum over lead terms).
    pub lead_constant: f64,
    /// Coefficient a₂ of τ.
    pub lead_tau: f64,
    log_tau: f64,
    power: Vec<(f64, f64)>,
    planck: Vec<(f64, f64)>,
    general: Vec<(f64, f64, f64, f64)>,
}

/// How τ^t is computed for one exponent: t = k/8 with 0 ≤ k < 8·[`WHOLE_TABLE`]
/// from the tables of [`TauPowers`], exp(t ln τ) otherwise.
#[derive(Debug, Clone, Copy)]
enum Exponent {
    Eighths(usize),
    Real(f64),
}

/// Whole powers τ^0 … τ^(WHOLE_TABLE − 1) are tabulated.
const WHOLE_TABLE: usize = 33;

impl Exponent {
    fn of(t: f64) -> Exponent {
        let eighths = 8.0 * t;
        if eighths.fract() == 0.0 && (0.0..8.0 * WHOLE_TABLE as f64).contains(&eighths) {
            Exponent::Eighths(eighths as usize)
        } else {
            Exponent::Real(t)
        }
    }

    /// τ^t by the general route: repeated multiplication for whole t, exp(t ln τ)
    /// otherwise.
    fn value(t: f64, tau: f64, ln_tau: f64) -> f64 {
        if t.fract() == 0.0 && t.abs() <= 32.0 {
            tau.powi(t as i32)
        } else {
            super::fast_exp::exp(t * ln_tau)
        }
    }
}

/// The powers of τ one equation needs at one τ: whole powers by repeated
/// multiplication, τ^(j/8) for j < 8 from three square roots, and ln τ. Each
/// tabulated τ^(k/8) is then one product, within a few ulps.
struct TauPowers {
    whole: [f64; WHOLE_TABLE],
    eighths: [f64; 8],
    ln_tau: f64,
}

impl TauPowers {
    /// Tables up to τ^(largest_whole) and, when `eighths` is set, the eighth roots.
    fn new(tau: f64, largest_whole: usize, eighths: bool) -> TauPowers {
        let mut out = TauPowers {
            whole: [1.0; WHOLE_TABLE],
            eighths: [1.0; 8],
            ln_tau: tau.ln(),
        };
        for k in 1..=largest_whole.min(WHOLE_TABLE - 1) {
            out.whole[k] = out.whole[k - 1] * tau;
        }
        if eighths {
            let half = tau.sqrt();
            let quarter = half.sqrt();
            let eighth = quarter.sqrt();
            out.eighths = [
                1.0,
                eighth,
                quarter,
                quarter * eighth,
                half,
                half * eighth,
                half * quarter,
                half * quarter * eighth,
            ];
        }
        out
    }

    #[inline]
    fn power(&self, exponent: Exponent) -> f64 {
        match exponent {
            Exponent::Eighths(k) => self.whole[k / 8] * self.eighths[k % 8],
            Exponent::Real(t) => super::fast_exp::exp(t * self.ln_tau),
        }
    }
}

/// Number of terms of each kind must agree.
fn same_lengths(lengths: &[usize]) -> Result<(), String> {
    if lengths.windows(2).all(|w| w[0] == w[1]) {
        Ok(())
    } else {
        Err(format!("coefficient lists of unequal length {lengths:?}"))
    }
}

impl IdealPart {
    /// Builds the ideal part from the file's terms.
    pub fn from_terms(terms: &[IdealGasTerm]) -> Result<Self, String> {
        let mut part = IdealPart::default();
        for term in terms {
            match term {
                IdealGasTerm::Lead { constant, tau } => {
                    part.lead_constant += constant;
                    part.lead_tau += tau;
                }
                IdealGasTerm::LogTau { coefficient } => part.log_tau += coefficient,
                IdealGasTerm::Power { n, t } => {
                    same_lengths(&[n.len(), t.len()])?;
                    part.power.extend(n.iter().copied().zip(t.iter().copied()));
                }
                IdealGasTerm::PlanckEinstein { n, theta } => {
                    same_lengths(&[n.len(), theta.len()])?;
                    part.planck
                        .extend(n.iter().copied().zip(theta.iter().copied()));
                }
                IdealGasTerm::PlanckEinsteinGeneral { n, c, d, theta } => {
                    same_lengths(&[n.len(), c.len(), d.len(), theta.len()])?;
                    for i in 0..n.len() {
                        part.general.push((n[i], c[i], d[i], theta[i]));
                    }
                }
            }
        }
        Ok(part)
    }

    /// α⁰ (less ln δ) and its τ derivatives at τ.
    pub fn evaluate(&self, tau: f64) -> IdealDerivatives {
        self.evaluate_parts(tau, true)
    }

    /// α⁰_τ and α⁰_ττ at τ, without α⁰ itself (NaN) and so without its logarithms:
    /// what an enthalpy or a heat capacity of the ideal gas needs.
    pub fn evaluate_tau_derivatives(&self, tau: f64) -> IdealDerivatives {
        self.evaluate_parts(tau, false)
    }

    /// [`IdealPart::evaluate`], α⁰ itself only `with_alpha` (else NaN); the
    /// derivatives are the same bits either way.
    fn evaluate_parts(&self, tau: f64, with_alpha: bool) -> IdealDerivatives {
        self.evaluate_parts_given(tau, with_alpha, None)
    }

    /// [`IdealPart::evaluate`] with ln τ already at hand (it is
    /// [`TauFactors::ln_tau`], the same bits as `tau.ln()`).
    pub fn evaluate_with_ln_tau(&self, tau: f64, ln_tau: f64) -> IdealDerivatives {
        self.evaluate_parts_given(tau, true, Some(ln_tau))
    }

    wide_or_baseline! {
        /// [`IdealPart::evaluate_parts`] with ln τ given, or computed when needed.
        fn evaluate_parts_given / evaluate_parts_wide => evaluate_parts_body(
            tau: f64,
            with_alpha: bool,
            ln_tau: Option<f64>,
        ) -> IdealDerivatives
    }

    #[inline(always)]
    fn evaluate_parts_body(
        &self,
        tau: f64,
        with_alpha: bool,
        ln_tau: Option<f64>,
    ) -> IdealDerivatives {
        let ln_tau = match ln_tau {
            Some(value) => value,
            None if with_alpha || !self.power.is_empty() => tau.ln(),
            None => f64::NAN,
        };
        let mut out = IdealDerivatives {
            alpha: self.lead_constant + self.lead_tau * tau + self.log_tau * ln_tau,
            alpha_tau: self.lead_tau + self.log_tau / tau,
            alpha_tau_tau: -self.log_tau / (tau * tau),
        };
        for &(n, t) in &self.power {
            let value = n * Exponent::value(t, tau, ln_tau);
            out.alpha += value;
            out.alpha_tau += value * t / tau;
            out.alpha_tau_tau += value * t * (t - 1.0) / (tau * tau);
        }
        for &(n, theta) in &self.planck {
            let e = super::fast_exp::exp(-theta * tau);
            Self::add_planck(&mut out, n, theta, tau, e, with_alpha);
        }
        for &(n, c, d, theta) in &self.general {
            let e = super::fast_exp::exp(theta * tau);
            let denominator = c + d * e;
            if with_alpha {
                out.alpha += n * denominator.ln();
            }
            out.alpha_tau += n * theta * d * e / denominator;
            out.alpha_tau_tau += n * theta * theta * c * d * e / (denominator * denominator);
        }
        if !with_alpha {
            out.alpha = f64::NAN;
        }
        out
    }

    /// Adds Planck–Einstein term n ln(1 − e^(−θτ)) and its τ derivatives, with
    /// e = e^(−θτ) computed by the caller.
    #[inline(always)]
    fn add_planck(
        out: &mut IdealDerivatives,
        n: f64,
        theta: f64,
        tau: f64,
        e: f64,
        with_alpha: bool,
    ) {
        let x = theta * tau;
        // 1 − e^(−x) without cancellation: directly where e^(−x) ≤ 1/2 (the
        // subtraction then loses nothing), else from expm1.
        let one_minus = if x >= std::f64::consts::LN_2 {
            1.0 - e
        } else {
            -(-x).exp_m1()
        };
        if with_alpha {
            // ln(1 − e): below 1e-4 by its series to e⁴ (the rest is under 3e-17
            // of it), which spares the logarithm at the low temperatures where
            // every term lies there.
            let log_one_minus = if e < 1e-4 {
                -e * (1.0 + e * (0.5 + e * (1.0 / 3.0 + e * 0.25)))
            } else {
                one_minus.ln()
            };
            out.alpha += n * log_one_minus;
        }
        // e/(1 − e), one division for both derivatives.
        let ratio = e / one_minus;
        out.alpha_tau += n * theta * ratio;
        out.alpha_tau_tau -= n * theta * theta * ratio / one_minus;
    }
}

/// One power term n δ^d τ^t exp(−δ^l).
#[derive(Debug, Clone, Copy)]
struct PowerTerm {
    n: f64,
    t: f64,
    /// t(t − 1), computed once.
    t_t1: f64,
}

/// The power terms that share the density exponents (d, l): their density factor
/// δ^d exp(−δ^l) is common, so their τ parts are summed once per temperature.
#[derive(Debug, Clone, Copy)]
struct PowerGroup {
    d: i32,
    l: i32,
    /// d, l and l² as floating-point numbers, computed once.
    d_f: f64,
    l_f: f64,
    l2_f: f64,
}

/// One Gaussian bell-shaped term n δ^d τ^t exp(−η(δ−ε)² − β(τ−γ)²).
#[derive(Debug, Clone, Copy)]
struct GaussianTerm {
    n: f64,
    d: i32,
    /// d as a floating-point number.
    d_f: f64,
    t: f64,
    eta: f64,
    epsilon: f64,
    beta: f64,
    gamma: f64,
}

/// The residual part αʳ.
#[derive(Debug, Clone, Default)]
pub struct ResidualPart {
    power: Vec<PowerTerm>,
    /// The (d, l) groups of the power terms, and for each power term its group.
    groups: Vec<PowerGroup>,
    group_of: Vec<usize>,
    gaussian: Vec<GaussianTerm>,
    largest_l: usize,
    largest_d: usize,
    /// The distinct temperature exponents of the power terms, and for each power term
    /// the index of its exponent, so that each τ^t is computed once.
    exponents: Vec<Exponent>,
    exponent_values: Vec<f64>,
    /// The largest whole power of τ and whether eighth roots are needed.
    largest_whole: usize,
    needs_eighths: bool,
    exponent_of: Vec<usize>,
    gaussian_exponents: Vec<Exponent>,
}

/// The most power terms a fluid may have.
pub const MAX_TERMS: usize = 64;
/// The most distinct (d, l) pairs among a fluid's power terms.
pub const MAX_GROUPS: usize = 32;
/// The most Gaussian terms a fluid may have.
pub const MAX_GAUSSIAN: usize = 24;

/// The τ-dependent factors of every residual term at one τ, kept inline (no heap).
#[derive(Debug, Clone)]
pub struct TauFactors {
    tau: f64,
    inv_tau: f64,
    ln_tau: f64,
    /// Per (d, l) group of power terms: Σ n τ^t, Σ n t τ^t and Σ n t(t − 1) τ^t, so
    /// that τ ∂/∂τ and τ² ∂²/∂τ² of the group's τ part are the second and third.
    group: [[f64; 3]; MAX_GROUPS],
    /// Per Gaussian term: n τ^t exp(−β(τ−γ)²).
    gaussian: [f64; MAX_GAUSSIAN],
    /// Per Gaussian term: its logarithmic τ derivative B = t/τ − 2β(τ−γ).
    gaussian_b: [f64; MAX_GAUSSIAN],
}

/// The δ factors of every residual term at one δ, kept inline (no heap). They hold
/// every exponential of δ the equation has and do not depend on τ, so that a
/// density iteration at fixed T computes them once a step and the properties at its
/// root reuse the last step's.
#[derive(Debug, Clone)]
pub struct DeltaShapes {
    inv_delta: f64,
    /// Per (d, l) group of power terms: δ^d exp(−δ^l), then δ ∂/∂δ, δ² ∂²/∂δ² and
    /// δ³ ∂³/∂δ³ of it, each over it.
    group: [[f64; 4]; MAX_GROUPS],
    /// Per Gaussian term: δ^d exp(−η(δ−ε)²), then its first three δ derivatives,
    /// each over it.
    gaussian: [[f64; 4]; MAX_GAUSSIAN],
}

impl DeltaShapes {
    /// All factors zero, to be filled by [`ResidualPart::density_derivatives`].
    pub const EMPTY: DeltaShapes = DeltaShapes {
        inv_delta: 0.0,
        group: [[0.0; 4]; MAX_GROUPS],
        gaussian: [[0.0; 4]; MAX_GAUSSIAN],
    };
}

/// Where [`ResidualPart::for_each_shape`] puts each term's δ factors.
trait ShapeSink {
    /// The δ factors of power-term group `index`.
    fn group(&mut self, index: usize, shape: [f64; 4]);
    /// The δ factors of Gaussian term `index`.
    fn gaussian(&mut self, index: usize, shape: [f64; 4]);
}

/// Sums the δ factors straight into the derivatives, with the τ factors.
struct SumsSink<'a> {
    sums: AllSums,
    factors: &'a TauFactors,
    terms: &'a [GaussianTerm],
}

impl ShapeSink for SumsSink<'_> {
    #[inline(always)]
    fn group(&mut self, index: usize, shape: [f64; 4]) {
        self.sums.add_group(&self.factors.group[index], shape);
    }

    #[inline(always)]
    fn gaussian(&mut self, index: usize, shape: [f64; 4]) {
        self.sums
            .add_gaussian(&self.terms[index], self.factors, index, shape);
    }
}

/// Stores the δ factors and sums the δ derivatives with the τ factors.
struct DensitySink<'a> {
    /// Power terms: δα_δ, δ²α_δδ, δ³α_δδδ, without the 1/δ factors.
    power: [f64; 3],
    /// Gaussian terms: α_δ, α_δδ, α_δδδ.
    gaussian: [f64; 3],
    factors: &'a TauFactors,
    shapes: &'a mut DeltaShapes,
}

impl ShapeSink for DensitySink<'_> {
    #[inline(always)]
    fn group(&mut self, index: usize, shape: [f64; 4]) {
        let base = self.factors.group[index][0] * shape[0];
        for (sum, factor) in self.power.iter_mut().zip(&shape[1..]) {
            *sum += base * factor;
        }
        self.shapes.group[index] = shape;
    }

    #[inline(always)]
    fn gaussian(&mut self, index: usize, shape: [f64; 4]) {
        let base = self.factors.gaussian[index] * shape[0];
        for (sum, factor) in self.gaussian.iter_mut().zip(&shape[1..]) {
            *sum += base * factor;
        }
        self.shapes.gaussian[index] = shape;
    }
}

/// Running sums of every residual derivative over the terms. The power terms' sums
/// are taken without their 1/δ and 1/τ factors, which [`AllSums::finish`] applies
/// once.
#[derive(Default)]
struct AllSums {
    /// Power terms: α, δα_δ, δ²α_δδ, τα_τ, τ²α_ττ, δτα_δτ.
    power: [f64; 6],
    /// Gaussian terms: α, α_δ, α_δδ, α_τ, α_ττ, α_δτ.
    gaussian: [f64; 6],
}

impl AllSums {
    /// Adds a group of power terms: its τ sums and its δ factors.
    #[inline(always)]
    fn add_group(&mut self, sums: &[f64; 3], shape: [f64; 4]) {
        let base = sums[0] * shape[0];
        let base_tau = sums[1] * shape[0];
        let s = &mut self.power;
        s[0] += base;
        s[1] += base * shape[1];
        s[2] += base * shape[2];
        s[3] += base_tau;
        s[4] += sums[2] * shape[0];
        s[5] += base_tau * shape[1];
    }

    /// Adds Gaussian term `index`: its τ factors and its δ factors.
    #[inline(always)]
    fn add_gaussian(
        &mut self,
        term: &GaussianTerm,
        factors: &TauFactors,
        index: usize,
        shape: [f64; 4],
    ) {
        let (value, b) = (factors.gaussian[index], factors.gaussian_b[index]);
        let inv_tau = factors.inv_tau;
        let tau_second = b * b - term.t * inv_tau * inv_tau - 2.0 * term.beta;
        let base = value * shape[0];
        let s = &mut self.gaussian;
        s[0] += base;
        s[1] += base * shape[1];
        s[2] += base * shape[2];
        s[3] += base * b;
        s[4] += base * tau_second;
        s[5] += base * shape[1] * b;
    }

    /// The derivatives: the power terms' sums scaled by 1/δ and 1/τ, plus the
    /// Gaussian terms'.
    #[inline(always)]
    fn finish(self, inv_delta: f64, inv_tau: f64) -> ResidualDerivatives {
        let (p, g) = (self.power, self.gaussian);
        ResidualDerivatives {
            alpha: p[0] + g[0],
            alpha_delta: p[1] * inv_delta + g[1],
            alpha_delta_delta: p[2] * inv_delta * inv_delta + g[2],
            alpha_tau: p[3] * inv_tau + g[3],
            alpha_tau_tau: p[4] * inv_tau * inv_tau + g[4],
            alpha_delta_tau: p[5] * inv_delta * inv_tau + g[5],
        }
    }
}

impl TauFactors {
    /// ln τ, as `tau().ln()` gives it (the same bits).
    pub fn ln_tau(&self) -> f64 {
        self.ln_tau
    }

    /// The τ these factors were computed at.
    pub fn tau(&self) -> f64 {
        self.tau
    }
}

/// Powers δ^l and δ^d below these bounds come from tables; larger ones are computed
/// directly.
const L_TABLE: usize = 8;
const D_TABLE: usize = 16;

fn whole(x: f64, what: &str) -> Result<i32, String> {
    if x.fract() == 0.0 && (0.0..=64.0).contains(&x) {
        Ok(x as i32)
    } else {
        Err(format!(
            "{what} exponent {x} must be a whole number from 0 to 64"
        ))
    }
}

impl ResidualPart {
    /// Builds the residual part from the file's terms.
    pub fn from_terms(terms: &[ResidualTerm]) -> Result<Self, String> {
        let mut part = ResidualPart::default();
        for term in terms {
            match term {
                ResidualTerm::Power { n, d, t, l } => {
                    same_lengths(&[n.len(), d.len(), t.len(), l.len()])?;
                    for i in 0..n.len() {
                        let l_whole = whole(l[i], "exponential density")?;
                        part.largest_l = part.largest_l.max(l_whole as usize);
                        let d_whole = whole(d[i], "density")?;
                        part.largest_d = part.largest_d.max(d_whole as usize);
                        if d_whole as usize >= D_TABLE || l_whole as usize >= L_TABLE {
                            return Err(format!(
                                "exponents d = {d_whole}, l = {l_whole} exceed this engine's tables (d < {D_TABLE}, l < {L_TABLE})"
                            ));
                        }
                        part.power.push(PowerTerm {
                            n: n[i],
                            t: t[i],
                            t_t1: t[i] * (t[i] - 1.0),
                        });
                        let group = match part
                            .groups
                            .iter()
                            .position(|g| g.d == d_whole && g.l == l_whole)
                        {
                            Some(index) => index,
                            None => {
                                part.groups.push(PowerGroup {
                                    d: d_whole,
                                    l: l_whole,
                                    d_f: d_whole as f64,
                                    l_f: l_whole as f64,
                                    l2_f: (l_whole * l_whole) as f64,
                                });
                                part.groups.len() - 1
                            }
                        };
                        part.group_of.push(group);
                    }
                }
                ResidualTerm::Gaussian {
                    n,
                    d,
                    t,
                    eta,
                    epsilon,
                    beta,
                    gamma,
                } => {
                    same_lengths(&[
                        n.len(),
                        d.len(),
                        t.len(),
                        eta.len(),
                        epsilon.len(),
                        beta.len(),
                        gamma.len(),
                    ])?;
                    for i in 0..n.len() {
                        let d_whole = whole(d[i], "density")?;
                        part.largest_d = part.largest_d.max(d_whole as usize);
                        part.gaussian.push(GaussianTerm {
                            n: n[i],
                            d: d_whole,
                            d_f: d_whole as f64,
                            t: t[i],
                            eta: eta[i],
                            epsilon: epsilon[i],
                            beta: beta[i],
                            gamma: gamma[i],
                        });
                    }
                }
            }
        }
        if part.power.len() > MAX_TERMS
            || part.groups.len() > MAX_GROUPS
            || part.gaussian.len() > MAX_GAUSSIAN
        {
            return Err(format!(
                "more than {MAX_TERMS} power terms, {MAX_GROUPS} distinct (d, l) pairs or {MAX_GAUSSIAN} Gaussian terms"
            ));
        }
        for term in &part.power {
            let index = match part.exponent_values.iter().position(|t| *t == term.t) {
                Some(i) => i,
                None => {
                    part.exponent_values.push(term.t);
                    part.exponents.push(Exponent::of(term.t));
                    part.exponents.len() - 1
                }
            };
            part.exponent_of.push(index);
        }
        part.gaussian_exponents = part.gaussian.iter().map(|g| Exponent::of(g.t)).collect();
        for exponent in part.exponents.iter().chain(&part.gaussian_exponents) {
            if let Exponent::Eighths(k) = *exponent {
                part.largest_whole = part.largest_whole.max(k / 8);
                part.needs_eighths |= k % 8 != 0;
            }
        }
        Ok(part)
    }

    /// Number of terms.
    pub fn len(&self) -> usize {
        self.power.len() + self.gaussian.len()
    }

    /// True when there are no terms.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    wide_or_baseline! {
        /// The τ-dependent factors at τ.
        pub fn at_tau / at_tau_wide => at_tau_body(tau: f64) -> TauFactors
    }

    #[inline(always)]
    fn at_tau_body(&self, tau: f64) -> TauFactors {
        let table = TauPowers::new(tau, self.largest_whole, self.needs_eighths);
        // τ^t of every distinct exponent, each once.
        let mut powers = [0.0f64; MAX_TERMS];
        for (slot, e) in powers.iter_mut().zip(&self.exponents) {
            *slot = table.power(*e);
        }
        let mut out = TauFactors {
            tau,
            inv_tau: 1.0 / tau,
            ln_tau: table.ln_tau,
            group: [[0.0; 3]; MAX_GROUPS],
            gaussian: [0.0; MAX_GAUSSIAN],
            gaussian_b: [0.0; MAX_GAUSSIAN],
        };
        for ((term, index), group) in self.power.iter().zip(&self.exponent_of).zip(&self.group_of) {
            let value = term.n * powers[*index];
            let sums = &mut out.group[*group];
            sums[0] += value;
            sums[1] += value * term.t;
            sums[2] += value * term.t_t1;
        }
        for (i, (term, e)) in self
            .gaussian
            .iter()
            .zip(&self.gaussian_exponents)
            .enumerate()
        {
            let offset = tau - term.gamma;
            out.gaussian[i] = match *e {
                Exponent::Real(t) => {
                    term.n * super::fast_exp::exp(t * table.ln_tau - term.beta * offset * offset)
                }
                Exponent::Eighths(_) => {
                    term.n * table.power(*e) * super::fast_exp::exp(-term.beta * offset * offset)
                }
            };
            out.gaussian_b[i] = term.t * out.inv_tau - 2.0 * term.beta * offset;
        }
        out
    }

    wide_or_baseline! {
        /// αʳ and its derivatives at δ, with the τ factors from [`ResidualPart::at_tau`].
        pub fn evaluate / evaluate_wide => evaluate_body(
            factors: &TauFactors,
            delta: f64,
        ) -> ResidualDerivatives
    }

    /// The δ factors go straight into the sums, without being stored.
    #[inline(always)]
    fn evaluate_body(&self, factors: &TauFactors, delta: f64) -> ResidualDerivatives {
        let mut sink = SumsSink {
            sums: AllSums::default(),
            factors,
            terms: &self.gaussian,
        };
        let inv_delta = self.for_each_shape(delta, &mut sink);
        sink.sums.finish(inv_delta, factors.inv_tau)
    }

    /// Computes the δ factors of every term at δ and hands each to `sink`; returns
    /// 1/δ.
    #[inline(always)]
    fn for_each_shape(&self, delta: f64, sink: &mut impl ShapeSink) -> f64 {
        // δ^l and exp(−δ^l) for every l in the table, computed once. Index 0 stands
        // for "no exponential": δ^0 → 0, e → 1.
        let mut delta_l = [0.0f64; L_TABLE];
        let mut exp_l = [1.0f64; L_TABLE];
        let mut value = 1.0;
        for l in 1..=self.largest_l.min(L_TABLE - 1) {
            value *= delta;
            delta_l[l] = value;
            exp_l[l] = super::fast_exp::exp(-value);
        }
        // δ^d for every d that occurs.
        let mut delta_d = [1.0f64; D_TABLE];
        for d in 1..=self.largest_d.min(D_TABLE - 1) {
            delta_d[d] = delta_d[d - 1] * delta;
        }
        let power_of = |d: i32| {
            if (d as usize) < D_TABLE {
                delta_d[d as usize]
            } else {
                delta.powi(d)
            }
        };
        let inv_delta = 1.0 / delta;
        // Per group, with k = d − l δ^l and m = l² δ^l: δ ∂/∂δ of δ^d exp(−δ^l) is k
        // times it, δ² ∂²/∂δ² is k(k − 1) − m times it and δ³ ∂³/∂δ³ is
        // k(k − 1)(k − 2) − m(3k + l − 3) times it.
        for (i, g) in self.groups.iter().enumerate().take(MAX_GROUPS) {
            let li = g.l as usize;
            let (dl, el) = (delta_l[li], exp_l[li]);
            let k = g.d_f - g.l_f * dl;
            let m = g.l2_f * dl;
            sink.group(
                i,
                [
                    delta_d[g.d as usize] * el,
                    k,
                    k * (k - 1.0) - m,
                    k * (k - 1.0) * (k - 2.0) - m * (3.0 * k + g.l_f - 3.0),
                ],
            );
        }
        // Per Gaussian term, with a = d/δ − 2η(δ − ε) its logarithmic δ derivative
        // and a′ = −d/δ² − 2η: its first three δ derivatives over it are a, a² + a′
        // and a³ + 3aa′ + 2d/δ³. The bells exp(−η(δ − ε)²) are computed first, all
        // at once.
        let count = self.gaussian.len().min(MAX_GAUSSIAN);
        let mut bells = [0.0f64; MAX_GAUSSIAN];
        for (bell, term) in bells.iter_mut().zip(&self.gaussian) {
            let offset = delta - term.epsilon;
            *bell = -term.eta * offset * offset;
        }
        super::fast_exp::exp_in_place(&mut bells[..count]);
        for (i, (term, bell)) in self.gaussian.iter().zip(&bells).enumerate() {
            let offset = delta - term.epsilon;
            let a = term.d_f * inv_delta - 2.0 * term.eta * offset;
            let a_slope = -term.d_f * inv_delta * inv_delta - 2.0 * term.eta;
            sink.gaussian(
                i,
                [
                    power_of(term.d) * bell,
                    a,
                    a * a + a_slope,
                    a * a * a
                        + 3.0 * a * a_slope
                        + 2.0 * term.d_f * inv_delta * inv_delta * inv_delta,
                ],
            );
        }
        inv_delta
    }

    wide_or_baseline! {
        /// ∂αʳ/∂δ, ∂²αʳ/∂δ² and ∂³αʳ/∂δ³ at δ from the τ factors: what a density
        /// iteration at fixed T needs, without the τ derivatives. The δ factors are
        /// written into `shapes` on the way, for [`ResidualPart::derivatives`] at the
        /// iteration's root.
        pub fn density_derivatives / density_derivatives_wide => density_derivatives_body(
            factors: &TauFactors,
            delta: f64,
            shapes: &mut DeltaShapes,
        ) -> [f64; 3]
    }

    #[inline(always)]
    fn density_derivatives_body(
        &self,
        factors: &TauFactors,
        delta: f64,
        shapes: &mut DeltaShapes,
    ) -> [f64; 3] {
        let mut sink = DensitySink {
            power: [0.0; 3],
            gaussian: [0.0; 3],
            factors,
            shapes,
        };
        let inv_delta = self.for_each_shape(delta, &mut sink);
        sink.shapes.inv_delta = inv_delta;
        let (p, g) = (sink.power, sink.gaussian);
        // Summed as in [`AllSums::finish`], so the first two are its bits.
        [
            p[0] * inv_delta + g[0],
            p[1] * inv_delta * inv_delta + g[1],
            p[2] * inv_delta * inv_delta * inv_delta + g[2],
        ]
    }

    /// αʳ and all its derivatives from the τ factors and stored δ factors.
    pub fn derivatives(&self, factors: &TauFactors, shapes: &DeltaShapes) -> ResidualDerivatives {
        let mut sums = AllSums::default();
        for (i, shape) in shapes.group[..self.groups.len()].iter().enumerate() {
            sums.add_group(&factors.group[i], *shape);
        }
        for (i, (term, shape)) in self.gaussian.iter().zip(&shapes.gaussian).enumerate() {
            sums.add_gaussian(term, factors, i, *shape);
        }
        sums.finish(shapes.inv_delta, factors.inv_tau)
    }

    /// αʳ and its derivatives at (τ, δ).
    pub fn evaluate_at(&self, tau: f64, delta: f64) -> ResidualDerivatives {
        self.evaluate(&self.at_tau(tau), delta)
    }

    /// The zero-density limit of ∂αʳ/∂δ and its first two τ derivatives. This limit
    /// is B·ρr, the reduced second virial coefficient.
    pub fn virial_b(&self, tau: f64) -> [f64; 3] {
        let factors = self.at_tau(tau);
        let inv_tau = 1.0 / tau;
        let mut out = [0.0; 3];
        // lim δ→0 ∂(δ^d g(δ))/∂δ is g(0) for d = 1, g′(0) for d = 0 and 0 for d ≥ 2.
        for (group, sums) in self.groups.iter().zip(&factors.group) {
            let f = [sums[0], sums[1] * inv_tau, sums[2] * inv_tau * inv_tau];
            let weight = match (group.d, group.l) {
                (1, _) => 1.0,
                (0, 1) => -1.0,
                _ => 0.0,
            };
            for k in 0..3 {
                out[k] += weight * f[k];
            }
        }
        for ((term, value), b) in self
            .gaussian
            .iter()
            .zip(&factors.gaussian)
            .zip(&factors.gaussian_b)
        {
            let f = [
                *value,
                *b,
                b * b - term.t * inv_tau * inv_tau - 2.0 * term.beta,
            ];
            let at_zero = (-term.eta * term.epsilon * term.epsilon).exp();
            let weight = match term.d {
                1 => at_zero,
                0 => 2.0 * term.eta * term.epsilon * at_zero,
                _ => 0.0,
            };
            // d/dτ of the τ factor is factor·B; the second derivative is factor·(B² − t/τ² − 2β).
            out[0] += weight * f[0];
            out[1] += weight * f[0] * f[1];
            out[2] += weight * f[0] * f[2];
        }
        out
    }
}

/// True when the CPU has AVX2 and FMA (checked once, then cached by the standard
/// library). The hot evaluations are compiled twice, for these features and for the
/// baseline, and chosen at run time; Rust forms no fused multiply-adds by itself,
/// so both give the same bits (unit test `wide_code_gives_the_same_bits`) and the
/// wider code is only faster (about 5–8 % of a (T, p) flash here,
/// docs/performance.md).
#[cfg(target_arch = "x86_64")]
#[inline(always)]
fn wide_arithmetic() -> bool {
    std::arch::is_x86_feature_detected!("avx2") && std::arch::is_x86_feature_detected!("fma")
}

#[cfg(test)]
mod tests {
    /// States over every fluid's range: 40 temperatures by 40 densities up to 3.5
    /// times the critical density, as (τ, δ).
    fn grid(fluid: &crate::fluids::Fluid) -> Vec<(f64, f64)> {
        let (low, high) = (fluid.temperature_min, fluid.temperature_max);
        let mut out = Vec::new();
        for i in 0..40 {
            let t = low * (high / low).powf(i as f64 / 39.0);
            for j in 0..40 {
                let density = 1e-4 * fluid.critical.density * (3.5e4f64).powf(j as f64 / 39.0);
                out.push((fluid.tau(t), fluid.delta(density)));
            }
        }
        out
    }

    /// The derivatives summed from the δ factors a density step stored (how a
    /// state's properties reuse its density iteration's last step) are the same bits
    /// as those summed in one pass, and so are the density step's δ derivatives.
    #[test]
    fn stored_factors_give_the_same_bits_as_one_pass() {
        let mut shapes = super::DeltaShapes::EMPTY;
        for fluid in crate::fluids::all().unwrap() {
            let residual = &fluid.residual;
            for (tau, delta) in grid(fluid) {
                let factors = residual.at_tau(tau);
                let [first, second, _] = residual.density_derivatives(&factors, delta, &mut shapes);
                let (one_pass, stored) = (
                    residual.evaluate(&factors, delta),
                    residual.derivatives(&factors, &shapes),
                );
                assert_eq!(one_pass, stored, "{} at τ={tau} δ={delta}", fluid.name);
                // The power terms' 1/δ factors are applied in the same place, so the
                // same sums give the same bits.
                assert_eq!(
                    first.to_bits(),
                    one_pass.alpha_delta.to_bits(),
                    "{}",
                    fluid.name
                );
                assert_eq!(
                    second.to_bits(),
                    one_pass.alpha_delta_delta.to_bits(),
                    "{}",
                    fluid.name
                );
            }
        }
    }

    /// Where the CPU has AVX2 and FMA, the code compiled for them (no fused
    /// multiply-adds are formed: Rust does not contract) gives the same bits as the
    /// baseline code, so results do not depend on the machine.
    #[cfg(target_arch = "x86_64")]
    #[test]
    fn wide_code_gives_the_same_bits() {
        if !super::wide_arithmetic() {
            return;
        }
        let (mut wide, mut plain) = (super::DeltaShapes::EMPTY, super::DeltaShapes::EMPTY);
        let mut compared = 0;
        for fluid in crate::fluids::all().unwrap() {
            let residual = &fluid.residual;
            for (tau, delta) in grid(fluid) {
                // SAFETY: the features were detected above.
                let (factors, plain_factors) = (
                    unsafe { residual.at_tau_wide(tau) },
                    residual.at_tau_body(tau),
                );
                assert_eq!(format!("{factors:?}"), format!("{plain_factors:?}"));
                let sums = (
                    unsafe { residual.density_derivatives_wide(&factors, delta, &mut wide) },
                    residual.density_derivatives_body(&factors, delta, &mut plain),
                );
                assert_eq!(format!("{sums:?}"), format!("{:?}", (sums.1, sums.0)));
                assert_eq!(format!("{wide:?}"), format!("{plain:?}"), "{}", fluid.name);
                assert_eq!(
                    unsafe { residual.evaluate_wide(&factors, delta) },
                    residual.evaluate_body(&factors, delta)
                );
                let ideal = (
                    unsafe { fluid.ideal.evaluate_parts_wide(tau, true, None) },
                    fluid.ideal.evaluate_parts_body(tau, true, None),
                );
                assert_eq!(format!("{:?}", ideal.0), format!("{:?}", ideal.1));
                compared += 1;
            }
        }
        assert!(compared > 1000);
    }

    /// The derivatives without α⁰ are the same bits as with it, for every fluid
    /// at 200 temperatures; α⁰ is then NaN.
    #[test]
    fn derivatives_without_alpha_are_the_same() {
        for fluid in crate::fluids::all().unwrap() {
            let (low, high) = (fluid.temperature_min, fluid.temperature_max);
            for k in 0..200 {
                let t = low * (high / low).powf(k as f64 / 199.0);
                let tau = fluid.reducing_temperature / t;
                let (full, light) = (
                    fluid.ideal.evaluate(tau),
                    fluid.ideal.evaluate_tau_derivatives(tau),
                );
                assert_eq!(full.alpha_tau.to_bits(), light.alpha_tau.to_bits());
                assert_eq!(full.alpha_tau_tau.to_bits(), light.alpha_tau_tau.to_bits());
                assert!(
                    full.alpha.is_finite() && light.alpha.is_nan(),
                    "{}",
                    fluid.name
                );
            }
        }
    }

    /// The Planck–Einstein terms' ln(1 − e^(−x)), taken by its series where
    /// e^(−x) < 1e-4 and from the quantities computed anyway elsewhere, give the
    /// ideal part that the plain formula n·ln(−expm1(−x)) gives, for every fluid
    /// at 2 001 temperatures from its lowest to its highest: within 1e-14 of the
    /// largest term summed (rounding of the two sums; a wrong series coefficient
    /// would be off by about e^(−2x), above 1e-9 where the series starts).
    #[test]
    fn planck_einstein_terms_match_the_plain_formula() {
        for fluid in crate::fluids::all().unwrap() {
            let ideal = &fluid.ideal;
            if ideal.planck.is_empty() {
                continue;
            }
            let (low, high) = (fluid.temperature_min, fluid.temperature_max);
            for k in 0..=2_000 {
                let t = low * (high / low).powf(k as f64 / 2_000.0);
                let tau = fluid.reducing_temperature / t;
                let ours = ideal.evaluate(tau);
                let mut plain =
                    ideal.lead_constant + ideal.lead_tau * tau + ideal.log_tau * tau.ln();
                let mut scale = plain.abs();
                for &(n, t_power) in &ideal.power {
                    let value = n * tau.powf(t_power);
                    plain += value;
                    scale = scale.max(value.abs());
                }
                for &(n, theta) in &ideal.planck {
                    let value = n * (-(-theta * tau).exp_m1()).ln();
                    plain += value;
                    scale = scale.max(value.abs());
                }
                for &(n, c, d, theta) in &ideal.general {
                    let value = n * (c + d * (theta * tau).exp()).ln();
                    plain += value;
                    scale = scale.max(value.abs());
                }
                assert!(
                    (ours.alpha - plain).abs() <= 1e-14 * scale.max(1.0),
                    "{} at {t} K: {} against {plain}",
                    fluid.name,
                    ours.alpha
                );
            }
        }
    }
}
