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
        let mut out = IdealDerivatives {
            alpha: self.lead_constant + self.lead_tau * tau + self.log_tau * tau.ln(),
            alpha_tau: self.lead_tau + self.log_tau / tau,
            alpha_tau_tau: -self.log_tau / (tau * tau),
        };
        for &(n, t) in &self.power {
            let value = n * tau.powf(t);
            out.alpha += value;
            out.alpha_tau += value * t / tau;
            out.alpha_tau_tau += value * t * (t - 1.0) / (tau * tau);
        }
        for &(n, theta) in &self.planck {
            let x = theta * tau;
            let e = (-x).exp();
            // 1 − e^(−x), computed without cancellation.
            let one_minus = -(-x).exp_m1();
            out.alpha += n * one_minus.ln();
            out.alpha_tau += n * theta * e / one_minus;
            out.alpha_tau_tau -= n * theta * theta * e / (one_minus * one_minus);
        }
        for &(n, c, d, theta) in &self.general {
            let e = (theta * tau).exp();
            let denominator = c + d * e;
            out.alpha += n * denominator.ln();
            out.alpha_tau += n * theta * d * e / denominator;
            out.alpha_tau_tau += n * theta * theta * c * d * e / (denominator * denominator);
        }
        out
    }
}

/// One power term n δ^d τ^t exp(−δ^l).
#[derive(Debug, Clone, Copy)]
struct PowerTerm {
    n: f64,
    d: i32,
    t: f64,
    l: i32,
}

/// One Gaussian bell-shaped term n δ^d τ^t exp(−η(δ−ε)² − β(τ−γ)²).
#[derive(Debug, Clone, Copy)]
struct GaussianTerm {
    n: f64,
    d: i32,
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
    gaussian: Vec<GaussianTerm>,
    largest_l: usize,
    largest_d: usize,
}

/// The τ-dependent factors of every residual term at one τ.
#[derive(Debug, Clone)]
pub struct TauFactors {
    tau: f64,
    /// Per power term: n τ^t, and its first and second τ derivatives.
    power: Vec<[f64; 3]>,
    /// Per Gaussian term: n τ^t exp(−β(τ−γ)²), the logarithmic τ derivative B and
    /// B² − t/τ² − 2β.
    gaussian: Vec<[f64; 3]>,
}

impl TauFactors {
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
                        part.power.push(PowerTerm {
                            n: n[i],
                            d: d_whole,
                            t: t[i],
                            l: l_whole,
                        });
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

    /// The τ-dependent factors at τ.
    pub fn at_tau(&self, tau: f64) -> TauFactors {
        let ln_tau = tau.ln();
        let inv_tau = 1.0 / tau;
        let power = self
            .power
            .iter()
            .map(|term| {
                let value = term.n * (term.t * ln_tau).exp();
                [
                    value,
                    value * term.t * inv_tau,
                    value * term.t * (term.t - 1.0) * inv_tau * inv_tau,
                ]
            })
            .collect();
        let gaussian = self
            .gaussian
            .iter()
            .map(|term| {
                let offset = tau - term.gamma;
                let value = term.n * (term.t * ln_tau - term.beta * offset * offset).exp();
                let b = term.t * inv_tau - 2.0 * term.beta * offset;
                [
                    value,
                    b,
                    b * b - term.t * inv_tau * inv_tau - 2.0 * term.beta,
                ]
            })
            .collect();
        TauFactors {
            tau,
            power,
            gaussian,
        }
    }

    /// αʳ and its derivatives at δ, with the τ factors from [`ResidualPart::at_tau`].
    pub fn evaluate(&self, factors: &TauFactors, delta: f64) -> ResidualDerivatives {
        // δ^l and exp(−δ^l) for every l in the table, computed once.
        let mut delta_l = [1.0f64; L_TABLE];
        let mut exp_l = [1.0f64; L_TABLE];
        let mut value = 1.0;
        for l in 1..=self.largest_l.min(L_TABLE - 1) {
            value *= delta;
            delta_l[l] = value;
            exp_l[l] = (-value).exp();
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
        let mut out = ResidualDerivatives::default();
        for (term, f) in self.power.iter().zip(&factors.power) {
            let (dl, el) = if term.l == 0 {
                (0.0, 1.0)
            } else if (term.l as usize) < L_TABLE {
                (delta_l[term.l as usize], exp_l[term.l as usize])
            } else {
                let dl = delta.powi(term.l);
                (dl, (-dl).exp())
            };
            let shape = power_of(term.d) * el;
            let d = term.d as f64;
            let l = term.l as f64;
            let k = d - l * dl;
            let second = k * (k - 1.0) - l * l * dl;
            let base = f[0] * shape;
            out.alpha += base;
            out.alpha_delta += base * k * inv_delta;
            out.alpha_delta_delta += base * second * inv_delta * inv_delta;
            out.alpha_tau += f[1] * shape;
            out.alpha_tau_tau += f[2] * shape;
            out.alpha_delta_tau += f[1] * shape * k * inv_delta;
        }
        for (term, f) in self.gaussian.iter().zip(&factors.gaussian) {
            let offset = delta - term.epsilon;
            let d = term.d as f64;
            let base = f[0] * power_of(term.d) * (-term.eta * offset * offset).exp();
            let a = d * inv_delta - 2.0 * term.eta * offset;
            out.alpha += base;
            out.alpha_delta += base * a;
            out.alpha_delta_delta += base * (a * a - d * inv_delta * inv_delta - 2.0 * term.eta);
            out.alpha_tau += base * f[1];
            out.alpha_tau_tau += base * f[2];
            out.alpha_delta_tau += base * a * f[1];
        }
        out
    }

    /// αʳ and its derivatives at (τ, δ).
    pub fn evaluate_at(&self, tau: f64, delta: f64) -> ResidualDerivatives {
        self.evaluate(&self.at_tau(tau), delta)
    }

    /// The zero-density limit of ∂αʳ/∂δ and its first two τ derivatives. This limit
    /// is B·ρr, the reduced second virial coefficient.
    pub fn virial_b(&self, tau: f64) -> [f64; 3] {
        let factors = self.at_tau(tau);
        let mut out = [0.0; 3];
        // lim δ→0 ∂(δ^d g(δ))/∂δ is g(0) for d = 1, g′(0) for d = 0 and 0 for d ≥ 2.
        for (term, f) in self.power.iter().zip(&factors.power) {
            let weight = match (term.d, term.l) {
                (1, _) => 1.0,
                (0, 1) => -1.0,
                _ => 0.0,
            };
            for k in 0..3 {
                out[k] += weight * f[k];
            }
        }
        for (term, f) in self.gaussian.iter().zip(&factors.gaussian) {
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
