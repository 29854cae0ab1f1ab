//! What a solved flowsheet reports: every stream, every unit's work, heat and
//! exergy destroyed, the headline figures and the mass, energy and exergy balances.
//!
//! Definitions (docs/output.md): liquid yield is the liquid product's mass flow over
//! the mass flow through the compressor of its flow network (the largest, where
//! there are several). Exergy of a stream is (h − h₀) − T₀(s − s₀) with the dead
//! state at the ambient temperature and 1 atm (`fluids::exergy`).
//!
//! The minimum work of liquefaction is the liquid's exergy less the exergy of the
//! feed it is made from (the textbook ideal work W_i = ṁ[(h_f − h_1) − T₀(s_f − s_1)],
//! feed state 1 to liquid f; Barron, Cryogenic Systems): each flow network's
//! liquid is charged the flow-weighted mean exergy of that network's feeds of raw
//! gas. The work the plant takes is the shaft power plus the precooling work (the
//! work equivalent of bought cryogen, baths and cryogen feeds alike, and the power
//! of refrigerators); the figure of merit is the one over the other. That work
//! equals minimum work + exergy destroyed in the units + exergy lost in vents (net
//! of their share of the feeds' exergy) + the precooling work beyond the cold
//! exergy the plant draws from it (spent outside the plant, where the cryogen is
//! made), which the exergy balance checks.

use super::order::Sequence;
use super::WarmStart;
use crate::equipment::{Details, Flow, Performance, ProductRole, Role};
use crate::error::Result;
use crate::flowsheet::plant::flow_networks;
use crate::flowsheet::Plant;
use crate::fluids::storage::StorageOutlook;
use crate::fluids::{DeadState, Fluid};
use std::collections::HashMap;

/// One unit's results.
#[derive(Debug, Clone)]
pub struct UnitResult {
    /// Id.
    pub id: String,
    /// Kind.
    pub kind: &'static str,
    /// Its part in the balances (feeds and products stand at the plant's boundary).
    pub role: Role,
    /// Work, heat, duty, details.
    pub performance: Performance,
    /// Exergy destroyed, W.
    pub exergy_destroyed: f64,
}

/// The headline figures.
#[derive(Debug, Clone, Default)]
pub struct Summary {
    /// Liquid product, kg/s.
    pub liquid_flow: f64,
    /// Liquid product, litres per hour at its own state.
    pub liquid_volume_flow_l_h: f64,
    /// Mass flow through the compressors of the liquid's networks, kg/s.
    pub compressed_flow: f64,
    /// Liquid over compressed flow (None without liquid product or compressor).
    pub liquid_yield: Option<f64>,
    /// Compressor power less recovered expander power, W.
    pub shaft_power: f64,
    /// Work equivalent of precooling (cryogen and refrigerators), W.
    pub precooling_work: f64,
    /// Heat removed by precoolers, W.
    pub precooling_duty: f64,
    /// Cryogen evaporated in baths, kg/s.
    pub cryogen_boil_off: f64,
    /// Shaft power per liquid, kWh/kg.
    pub specific_energy_shaft: Option<f64>,
    /// Shaft power plus precooling work per liquid, kWh/kg.
    pub specific_energy: Option<f64>,
    /// The minimum work: the liquid's exergy less its feed's, W.
    pub minimum_work: f64,
    /// Exergy the feeds of raw gas bring in, W (credited in the minimum work).
    pub feed_exergy: f64,
    /// Minimum work over shaft plus precooling work.
    pub figure_of_merit: Option<f64>,
    /// The work the plant takes: shaft power plus precooling work, W.
    pub exergy_supplied: f64,
    /// Exergy destroyed in the units, W.
    pub exergy_destroyed: f64,
    /// Exergy leaving in vents, net of their share of the feeds' exergy, W.
    pub exergy_lost: f64,
    /// Precooling work beyond the cold exergy the plant draws from it: bought
    /// cryogen's work equivalent less the exergy it delivers, W (spent where the
    /// cryogen is made).
    pub precooling_exergy_outside: f64,
    /// Work equivalent of the cryogen that enters as feed streams, W (part of the
    /// precooling work).
    pub cryogen_feed_work: f64,
    /// For a liquid hydrogen product: its para fraction and what residual
    /// conversion boils off in storage.
    pub hydrogen_storage: Option<StorageOutlook>,
    /// (feeds − products)/feeds.
    pub mass_closure: f64,
    /// Energy in − out over the energy flows.
    pub energy_closure: f64,
    /// Work taken − (minimum work + lost + destroyed + precooling outside) over the
    /// work taken.
    pub exergy_closure: f64,
}

impl Summary {
    /// Cryogen bought (boiled in baths) per kg of liquid product, where there is
    /// both.
    pub fn cryogen_per_kg_liquid(&self) -> Option<f64> {
        (self.liquid_flow > 0.0 && self.cryogen_boil_off > 0.0)
            .then(|| self.cryogen_boil_off / self.liquid_flow)
    }
}

/// A solved flowsheet.
#[derive(Debug, Clone)]
pub struct Solution {
    /// Title.
    pub title: String,
    /// Source file.
    pub source: String,
    /// Ambient temperature, K.
    pub ambient: f64,
    /// Stream names, in stream order.
    pub stream_names: Vec<String>,
    /// Stream values, in stream order.
    pub streams: Vec<Flow>,
    /// Unit results, in file order.
    pub units: Vec<UnitResult>,
    /// Headline figures and balances.
    pub summary: Summary,
    /// Passes to convergence.
    pub iterations: usize,
    /// Largest scaled residual after each pass.
    pub residual_log: Vec<f64>,
    /// Names of the tear streams.
    pub tears: Vec<String>,
    /// The recycles, as lists of unit ids.
    pub recycles: Vec<Vec<String>>,
    /// The converged recycle, to warm-start a neighbouring case.
    pub warm_start: WarmStart,
    /// Canonical names of the fluids the plant uses: its streams' and its baths'.
    pub fluids: Vec<String>,
}

/// The dead state of each fluid met, found once.
struct DeadStates {
    ambient: f64,
    cache: HashMap<String, DeadState>,
}

impl DeadStates {
    fn exergy(&mut self, flow: &Flow) -> Result<f64> {
        let fluid: &'static Fluid = flow.state.fluid();
        let dead = match self.cache.get(&fluid.name) {
            Some(dead) => *dead,
            None => {
                let dead = DeadState::of(fluid, self.ambient)?;
                self.cache.insert(fluid.name.clone(), dead);
                dead
            }
        };
        Ok(dead.exergy(&flow.state))
    }
}

/// Each fluid's entropy reference inside one unit: the entropy of the unit's first
/// stream of that fluid. A unit's entropy generation Σṁs(out) − Σṁs(in) is taken on
/// entropies relative to it. Each fluid's mass balances across the unit (to the
/// recycle's tolerance), so the reference cancels; with absolute entropies the
/// figure would carry T₀·s·(mass imbalance), s being the fluid's absolute entropy
/// (whose zero is a convention of the equation of state) and the imbalance what the
/// recycle left: 2.9e-9 W of the nitrogen Linde-Hampson demo's mixer, whose whole
/// figure is 0.0228 W (tests/exergy.rs checks it against CoolProp).
#[derive(Default)]
struct EntropyReference(Vec<(&'static Fluid, f64)>);

impl EntropyReference {
    /// The entropy of `flow` less its fluid's reference, J/(kg K).
    fn relative(&mut self, flow: &Flow) -> f64 {
        let fluid = flow.state.fluid();
        let reference = match self.0.iter().find(|(f, _)| std::ptr::eq(*f, fluid)) {
            Some((_, entropy)) => *entropy,
            None => {
                self.0.push((fluid, flow.state.entropy));
                flow.state.entropy
            }
        };
        flow.state.entropy - reference
    }
}

/// Builds the solution from the converged pass.
pub fn assemble(
    plant: &Plant,
    sequence: &Sequence,
    streams: Vec<Flow>,
    performances: Vec<Performance>,
    iterations: usize,
    log: Vec<f64>,
) -> Result<Solution> {
    let t0 = plant.ambient;
    let mut dead = DeadStates {
        ambient: t0,
        cache: HashMap::new(),
    };
    let networks = flow_networks(&plant.units, plant.streams.len());
    let mut units = Vec::new();
    let mut s = Summary::default();
    let mut feed_mass = 0.0;
    let mut product_mass = 0.0;
    let mut energy_in = 0.0;
    let mut energy_out = 0.0;
    let mut energy_scale = 0.0;
    // Enthalpy carried across the boundary: the scale when no work or heat enters.
    let mut boundary_enthalpy = 0.0;
    // Per flow network: raw-gas feeds (mass, exergy) and products (mass, exergy).
    let mut raw_feeds: HashMap<usize, (f64, f64)> = HashMap::new();
    let mut liquids: HashMap<usize, (f64, f64)> = HashMap::new();
    let mut vents: HashMap<usize, (f64, f64)> = HashMap::new();
    for (unit, performance) in plant.units.iter().zip(performances) {
        let inflow: Vec<(usize, &Flow)> = unit.inlets.iter().map(|&i| (i, &streams[i])).collect();
        let outflow: Vec<(usize, &Flow)> = unit.outlets.iter().map(|&i| (i, &streams[i])).collect();
        let mut destroyed = 0.0;
        let reservoir_exergy: f64 = performance
            .heat_in
            .iter()
            .map(|(q, t)| q * (1.0 - t0 / t))
            .sum();
        match unit.spec.role() {
            Role::Feed(_) => {
                for &(i, f) in &outflow {
                    feed_mass += f.flow;
                    energy_in += f.flow * f.state.enthalpy;
                    boundary_enthalpy += (f.flow * f.state.enthalpy).abs();
                    let exergy = f.flow * dead.exergy(f)?;
                    if performance.precooling_work > 0.0 {
                        // Bought cryogen: charged at its work equivalent.
                        s.cryogen_feed_work += performance.precooling_work;
                        s.precooling_exergy_outside += performance.precooling_work - exergy;
                    } else {
                        let entry = raw_feeds.entry(networks[i]).or_default();
                        entry.0 += f.flow;
                        entry.1 += exergy;
                        s.feed_exergy += exergy;
                    }
                }
            }
            Role::Product(role) => {
                for &(i, f) in &inflow {
                    product_mass += f.flow;
                    energy_out += f.flow * f.state.enthalpy;
                    boundary_enthalpy += (f.flow * f.state.enthalpy).abs();
                    let exergy = f.flow * dead.exergy(f)?;
                    let sink = match role {
                        ProductRole::Liquid => {
                            s.liquid_flow += f.flow;
                            s.liquid_volume_flow_l_h += f.flow * 3600.0 / f.state.density * 1000.0;
                            &mut liquids
                        }
                        ProductRole::Vent => &mut vents,
                    };
                    let entry = sink.entry(networks[i]).or_default();
                    entry.0 += f.flow;
                    entry.1 += exergy;
                }
            }
            _ => {
                let mut reference = EntropyReference::default();
                let mut entropy_in: f64 = inflow
                    .iter()
                    .map(|(_, f)| f.flow * reference.relative(f))
                    .sum();
                // Bought cryogen entering through the unit (a bath whose boil-off is
                // routed on): it crosses the boundary like a feed.
                let mut utility_exergy = 0.0;
                if let Some(f) = &performance.utility_in {
                    feed_mass += f.flow;
                    energy_in += f.flow * f.state.enthalpy;
                    boundary_enthalpy += (f.flow * f.state.enthalpy).abs();
                    entropy_in += f.flow * reference.relative(f);
                    utility_exergy = f.flow * dead.exergy(f)?;
                }
                let entropy_out: f64 = outflow
                    .iter()
                    .map(|(_, f)| f.flow * reference.relative(f))
                    .sum();
                let reservoirs: f64 = performance.heat_in.iter().map(|(q, t)| q / t).sum();
                destroyed =
                    t0 * (entropy_out - entropy_in - reservoirs) + performance.extra_destroyed;
                s.precooling_exergy_outside += performance.precooling_work
                    - reservoir_exergy
                    - performance.extra_destroyed
                    - utility_exergy;
            }
        }
        energy_in += performance.work_in + performance.heat_in.iter().map(|(q, _)| q).sum::<f64>();
        energy_scale += performance.work_in.abs()
            + performance
                .heat_in
                .iter()
                .map(|(q, _)| q.abs())
                .sum::<f64>();
        s.shaft_power += performance.work_in;
        s.precooling_work += performance.precooling_work;
        if unit.spec.role() == Role::Precooling {
            s.precooling_duty += performance.duty.unwrap_or(0.0);
        }
        if let Details::Precooler {
            boil_off: Some(b), ..
        } = performance.details
        {
            s.cryogen_boil_off += b;
        }
        s.exergy_destroyed += destroyed;
        units.push(UnitResult {
            id: unit.id.clone(),
            kind: unit.spec.kind(),
            role: unit.spec.role(),
            performance,
            exergy_destroyed: destroyed,
        });
    }
    // Each product carries its share of its network's raw-feed exergy.
    let feed_exergy_per_kg = |network: &usize| {
        raw_feeds
            .get(network)
            .filter(|(mass, _)| *mass > 0.0)
            .map_or(0.0, |(mass, exergy)| exergy / mass)
    };
    for (network, (mass, exergy)) in &liquids {
        s.minimum_work += exergy - mass * feed_exergy_per_kg(network);
    }
    for (network, (mass, exergy)) in &vents {
        s.exergy_lost += exergy - mass * feed_exergy_per_kg(network);
    }
    s.exergy_supplied = s.shaft_power + s.precooling_work;
    // Compressed flow of the networks that make liquid.
    let liquid_networks: Vec<usize> = plant
        .liquid_products()
        .map(|u| networks[u.inlets[0]])
        .collect();
    for network in dedup(liquid_networks) {
        let compressed = plant
            .units
            .iter()
            .filter(|u| u.spec.role() == Role::Compression && networks[u.inlets[0]] == network)
            .map(|u| streams[u.inlets[0]].flow)
            .fold(0.0f64, f64::max);
        s.compressed_flow += compressed;
    }
    if s.compressed_flow > 0.0 && s.liquid_flow >= 0.0 {
        s.liquid_yield = Some(s.liquid_flow / s.compressed_flow);
    }
    let total_work = s.shaft_power + s.precooling_work;
    if s.liquid_flow > 0.0 {
        s.specific_energy_shaft = Some(s.shaft_power / s.liquid_flow / 3.6e6);
        s.specific_energy = Some(total_work / s.liquid_flow / 3.6e6);
    }
    if total_work > 0.0 && s.liquid_flow > 0.0 {
        s.figure_of_merit = Some(s.minimum_work / total_work);
    }
    s.hydrogen_storage = hydrogen_storage(plant, &streams)?;
    s.mass_closure = if feed_mass > 0.0 {
        (feed_mass - product_mass) / feed_mass
    } else {
        0.0
    };
    // Relative to the work and heat that cross the boundary; a plant with none
    // (an adiabatic cold box) is measured against the enthalpy its streams carry.
    if energy_scale == 0.0 {
        energy_scale = boundary_enthalpy;
    }
    s.energy_closure = (energy_in - energy_out) / energy_scale.max(1e-300);
    let accounted =
        s.minimum_work + s.exergy_lost + s.exergy_destroyed + s.precooling_exergy_outside;
    s.exergy_closure = (s.exergy_supplied - accounted) / s.exergy_supplied.abs().max(1e-300);
    Ok(Solution {
        title: plant.title.clone(),
        source: plant.source.clone(),
        ambient: t0,
        stream_names: plant.streams.iter().map(|st| st.name.clone()).collect(),
        streams,
        units,
        summary: s,
        iterations,
        residual_log: log,
        tears: sequence
            .tears
            .iter()
            .map(|&t| plant.streams[t].name.clone())
            .collect(),
        warm_start: WarmStart::default(),
        fluids: fluids_used(plant),
        recycles: sequence
            .recycles
            .iter()
            .map(|r| r.iter().map(|&u| plant.units[u].id.clone()).collect())
            .collect(),
    })
}

/// The storage outlook of the plant's liquid hydrogen product (the liquid products
/// of hydrogen together, flow-weighted; at the first one's temperature and pressure).
fn hydrogen_storage(plant: &Plant, streams: &[Flow]) -> Result<Option<StorageOutlook>> {
    let products: Vec<&Flow> = plant
        .liquid_products()
        .map(|u| &streams[u.inlets[0]])
        .filter(|f| f.state.fluid().name == "hydrogen" && f.flow > 0.0)
        .collect();
    let Some(first) = products.first() else {
        return Ok(None);
    };
    let mass: f64 = products.iter().map(|f| f.flow).sum();
    let para = products
        .iter()
        .map(|f| f.flow * f.state.shown_para_fraction().unwrap_or_default())
        .sum::<f64>()
        / mass;
    let blend = crate::fluids::blend::Blend::get()?;
    let (t, p) = (first.state.temperature, first.state.pressure);
    // Where the product's pressure has no saturation (a compressed liquid above the
    // solution's two-phase range), there is no latent heat and no outlook.
    let pair = match first.state.para_fraction {
        Some(x) => blend.saturated_pair(p, x),
        None => first.state.fluid().saturated_pair_at_pressure(p),
    };
    let (Ok(pair), Ok(conversion)) = (pair, blend.liquid_conversion_enthalpy(t, p)) else {
        return Ok(None);
    };
    Ok(Some(StorageOutlook::of(
        para,
        crate::fluids::spin::equilibrium_para_fraction(t),
        conversion,
        pair.vapour.enthalpy - pair.liquid.enthalpy,
    )))
}

/// The fluids of the streams, then those the units use besides (baths), each once.
pub fn fluids_used(plant: &Plant) -> Vec<String> {
    let mut names: Vec<String> = Vec::new();
    let streams = plant.streams.iter().map(|s| s.fluid);
    let utilities = plant.units.iter().flat_map(|u| u.spec.utility_fluids());
    for fluid in streams.chain(utilities) {
        if !names.contains(&fluid.name) {
            names.push(fluid.name.clone());
        }
    }
    names
}

fn dedup(mut v: Vec<usize>) -> Vec<usize> {
    v.sort_unstable();
    v.dedup();
    v
}
