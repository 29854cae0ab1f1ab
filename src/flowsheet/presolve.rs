//! Checks made before solving: one flow basis per flow network, and static
//! pressures that no valve, expander or compressor contradicts.

use super::plant::{flow_networks, static_pressures, Plant};
use super::resolve::Resolver;
use crate::equipment::{self, FeedFlow, Role};
use crate::error::FlowsheetError;
use crate::reading::Params;
use std::collections::{BTreeMap, BTreeSet};

impl Resolver<'_> {
    /// Each flow network (streams joined through units, the two sides of an exchanger
    /// or coolant precooler kept apart) needs exactly one flow basis.
    pub(super) fn check_flow_bases(&self, plant: &Plant) -> Result<(), FlowsheetError> {
        let n = plant.streams.len();
        let network = flow_networks(&plant.units, n);
        // Bases per network.
        let mut bases: BTreeMap<usize, Vec<usize>> = BTreeMap::new();
        for (ui, unit) in plant.units.iter().enumerate() {
            if unit.flow_basis.is_some() {
                let stream = unit.outlets.first().or(unit.inlets.first()).copied();
                if let Some(s) = stream {
                    bases.entry(network[s]).or_default().push(ui);
                }
            }
        }
        // A unit whose further outlets start networks of their own (a bath's routed
        // boil-off) sets their flow.
        for (ui, unit) in plant.units.iter().enumerate() {
            if unit.spec.coupling() == crate::equipment::Coupling::WithSource {
                for &s in unit.outlets.iter().skip(1) {
                    bases.entry(network[s]).or_default().push(ui);
                }
            }
        }
        // Two make-up feeds in one network would split the make-up by an arbitrary
        // rule: refuse.
        let mut balance_feeds: BTreeMap<usize, Vec<usize>> = BTreeMap::new();
        for (ui, unit) in plant.units.iter().enumerate() {
            if unit.spec.role() == Role::Feed(FeedFlow::Balance) {
                if let Some(&s) = unit.outlets.first() {
                    balance_feeds.entry(network[s]).or_default().push(ui);
                }
            }
        }
        if let Some(many) = balance_feeds.values().find(|feeds| feeds.len() > 1) {
            let names: Vec<&str> = many.iter().map(|&u| plant.units[u].id.as_str()).collect();
            let message = format!(
                "{} are all 'flow: balance' feeds of one flow network; the make-up would be split between them by no stated rule: keep one, and give the others a fixed flow",
                names.join(" and ")
            );
            return Err(self.item_error(many[1], message));
        }
        let mut reported = BTreeSet::new();
        for (s, &root) in network.iter().enumerate() {
            if !reported.insert(root) {
                continue;
            }
            let unit = plant.streams[s].from.unit;
            match bases.get(&root).map(Vec::as_slice) {
                None | Some([]) => {
                    let carriers: Vec<&str> = equipment::KINDS
                        .iter()
                        .filter(|k| k.keys.contains(&"flow"))
                        .map(|k| k.name)
                        .collect();
                    let kinds = match carriers.split_last() {
                        Some((last, rest)) if !rest.is_empty() => {
                            format!("{} or {last}", rest.join(", "))
                        }
                        _ => carriers.join(""),
                    };
                    let message = format!(
                        "the flow network through {} has no flow basis: put a fixed 'flow' on one {kinds} (make-up feeds take 'flow: balance')",
                        plant.streams[s].name,
                    );
                    return Err(self.item_error(unit, message));
                }
                Some([_]) => {}
                Some(many) => {
                    let names: Vec<&str> =
                        many.iter().map(|&u| plant.units[u].id.as_str()).collect();
                    let message = format!(
                        "the flow is over-specified: {} all fix the flow of the same network; keep one and make feeds 'flow: balance'",
                        names.join(", ")
                    );
                    return Err(self.item_error(many[1], message));
                }
            }
        }
        Ok(())
    }

    /// Static pressures from the pressure-setting units, to catch a valve or expander
    /// that would raise the pressure, or a compressor that would lower it.
    pub(super) fn check_pressures(&self, plant: &Plant) -> Result<(), FlowsheetError> {
        let pressure = static_pressures(&plant.units, plant.streams.len());
        for (ui, unit) in plant.units.iter().enumerate() {
            let Some(p_in) = unit.inlets.first().and_then(|&i| pressure[i]) else {
                continue;
            };
            if let Some(conflict) = unit.spec.pressure_conflict(p_in) {
                let params = Params::new(&self.raw.equipment[ui], ui, self.place);
                return Err(params.error(conflict.key, conflict.message));
            }
            if let Some(&bad) = unit
                .outlets
                .iter()
                .find(|&&o| pressure[o].is_some_and(|p| p <= 0.0))
            {
                return Err(self.item_error(
                    ui,
                    format!(
                        "pressure drops take the stream {} to zero or below",
                        plant.streams[bad].name
                    ),
                ));
            }
        }
        Ok(())
    }
}
