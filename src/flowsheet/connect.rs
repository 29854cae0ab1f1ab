//! Connecting the streams: every inlet to the outlet it names (each outlet feeds
//! exactly one inlet), and each feed's fluid carried along the streams.

use super::plant::{PortRef, Stream, Unit};
use super::resolve::{PendingInlet, Resolver};
use crate::equipment::{Coupling, Role};
use crate::error::FlowsheetError;
use crate::fluids::Fluid;
use crate::reading::Params;
use std::collections::BTreeMap;

/// The unit's optional outlets that are connected.
fn optional(unit: &Unit) -> Vec<&'static str> {
    let ports = unit.spec.ports().outlets;
    unit.spec
        .optional_outlets()
        .into_iter()
        .filter(|o| ports.contains(o))
        .collect()
}

/// Whether the unit is a feed: a feed's `fluid` is its own, not an assertion.
fn is_feed(unit: &Unit) -> bool {
    matches!(unit.spec.role(), Role::Feed(_))
}

impl Resolver<'_> {
    /// Connects every inlet to the outlet it names; each outlet feeds exactly one inlet.
    pub(super) fn connect(
        &self,
        units: &mut [Unit],
        pending: &[PendingInlet],
    ) -> Result<Vec<(PortRef, PortRef)>, FlowsheetError> {
        // Optional outlets (a bath's boil-off) that some inlet names become ports.
        for PendingInlet { inlet, .. } in pending {
            if let Some((id, port)) = inlet.reference.split_once('.') {
                let (id, port) = (id.trim(), port.trim());
                if let Some(source) = units.iter().position(|u| u.id == id) {
                    if units[source].spec.optional_outlets().contains(&port) {
                        units[source].spec.equipment_mut().route(port);
                    }
                }
            }
        }
        let ids: BTreeMap<&str, usize> = units
            .iter()
            .enumerate()
            .map(|(i, u)| (u.id.as_str(), i))
            .collect();
        let mut used: BTreeMap<(usize, &'static str), usize> = BTreeMap::new();
        let mut streams = Vec::new();
        for PendingInlet { unit, inlet } in pending {
            let unit = *unit;
            let entry = &self.raw.equipment[unit];
            let params = Params::new(entry, unit, self.place);
            let (id, port) = match inlet.reference.split_once('.') {
                Some((id, port)) => (id.trim(), Some(port.trim())),
                None => (inlet.reference.trim(), None),
            };
            let source = *ids.get(id).ok_or_else(|| {
                params.error(
                    inlet.key,
                    format!(
                        "'{id}' names no equipment; the ids are: {}",
                        units
                            .iter()
                            .map(|u| u.id.as_str())
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                )
            })?;
            if source == unit {
                return Err(params.error(inlet.key, "a unit cannot feed itself"));
            }
            let outlets = units[source].spec.ports().outlets;
            if outlets.is_empty() {
                return Err(params.error(
                    inlet.key,
                    format!(
                        "'{id}' is a {} and has no outlet",
                        units[source].spec.kind()
                    ),
                ));
            }
            let port: &'static str = match port {
                Some(name) => outlets
                    .iter()
                    .copied()
                    .find(|o| *o == name || (name == "vapour" && *o == "vapor"))
                    .ok_or_else(|| {
                        params.error(
                            inlet.key,
                            format!(
                                "'{id}' has no outlet '{name}'; its outlets are: {}",
                                outlets.join(", ")
                            ),
                        )
                    })?,
                None if outlets.len() == 1 => outlets[0],
                // A routed optional outlet (a bath's boil-off) is named when meant.
                None if outlets.len() - optional(&units[source]).len() == 1 => outlets
                    .iter()
                    .copied()
                    .find(|o| !optional(&units[source]).contains(o))
                    .unwrap_or(outlets[0]),
                None => {
                    return Err(params.error(
                        inlet.key,
                        format!(
                            "'{id}' has several outlets; name one: {}",
                            outlets
                                .iter()
                                .map(|o| format!("{id}.{o}"))
                                .collect::<Vec<_>>()
                                .join(" or ")
                        ),
                    ))
                }
            };
            if let Some(first) = used.insert((source, port), unit) {
                let message = format!(
                    "the outlet {id}.{port} already feeds '{}'; use a splitter to send a stream to two places",
                    units[first].id
                );
                return Err(params.error(inlet.key, message));
            }
            streams.push((
                PortRef { unit: source, port },
                PortRef {
                    unit,
                    port: inlet.port,
                },
            ));
        }
        for (index, unit) in units.iter().enumerate() {
            let outlets = unit.spec.ports().outlets;
            for port in outlets {
                if !used.contains_key(&(index, port)) {
                    return Err(self.item_error(index, format!(
                        "the outlet {}.{port} goes nowhere; route it to a product (role: vent for a vent), a mixer or another unit",
                        unit.id
                    )));
                }
            }
        }
        // Order each unit's inlets and outlets by port.
        for (index, unit) in units.iter_mut().enumerate() {
            let ports = unit.spec.ports();
            unit.inlets = ports
                .inlets
                .iter()
                .filter_map(|port| {
                    streams
                        .iter()
                        .position(|(_, to)| to.unit == index && to.port == *port)
                })
                .collect();
            unit.outlets = ports
                .outlets
                .iter()
                .filter_map(|port| {
                    streams
                        .iter()
                        .position(|(from, _)| from.unit == index && from.port == *port)
                })
                .collect();
        }
        Ok(streams)
    }

    /// Carries each feed's fluid along the streams; two fluids meeting, or a stream
    /// no fluid reaches, is an error.
    pub(super) fn carry_fluids(
        &self,
        units: &[Unit],
        links: Vec<(PortRef, PortRef)>,
        declared: &[Option<(&'static Fluid, &'static str)>],
    ) -> Result<Vec<Stream>, FlowsheetError> {
        let mut fluid: Vec<Option<&'static Fluid>> = vec![None; links.len()];
        // The inlet stream whose fluid an outlet carries.
        let source_inlet = |unit: &Unit, outlet_position: usize| -> Vec<usize> {
            match unit.spec.coupling() {
                Coupling::Sides => unit
                    .inlets
                    .get(outlet_position)
                    .copied()
                    .into_iter()
                    .collect(),
                Coupling::Joined => unit.inlets.clone(),
                Coupling::WithSource if outlet_position > 0 => Vec::new(),
                Coupling::WithSource => unit.inlets.clone(),
            }
        };
        for _ in 0..=links.len() {
            let mut changed = false;
            for (ui, unit) in units.iter().enumerate() {
                for (position, &out) in unit.outlets.iter().enumerate() {
                    let from_inlets: Vec<&'static Fluid> = source_inlet(unit, position)
                        .iter()
                        .filter_map(|&i| fluid[i])
                        .collect();
                    let own = if is_feed(unit) {
                        declared[ui].map(|d| d.0)
                    } else {
                        unit.spec.source_fluid(position)
                    };
                    let asserted = match unit.spec.coupling() {
                        Coupling::Sides | Coupling::WithSource if position > 0 => None,
                        _ => declared[ui].map(|d| d.0),
                    };
                    let candidate = own.or_else(|| from_inlets.first().copied()).or(asserted);
                    if let Some(f) = candidate {
                        for other in &from_inlets {
                            if !std::ptr::eq(*other, f) {
                                let message = format!(
                                    "{} and {} meet here; a stream carries one fluid (use an exchanger or a coolant precooler to couple two fluids)",
                                    other.name, f.name
                                );
                                return Err(self.item_error(ui, message));
                            }
                        }
                        if fluid[out].is_none() {
                            fluid[out] = Some(f);
                            changed = true;
                        }
                    }
                }
            }
            if !changed {
                break;
            }
        }
        // Declared fluids must match what arrives.
        for (ui, unit) in units.iter().enumerate() {
            if let (Some((want, key)), false) = (declared[ui], is_feed(unit)) {
                for &i in &unit.inlets {
                    if let Some(have) = fluid[i] {
                        // On a unit with sides, `fluid:` names its first side's fluid
                        // (the process side of a precooler, the hot side of an exchanger).
                        let other_side = unit.spec.coupling() == Coupling::Sides
                            && unit.inlets.first() != Some(&i);
                        if !std::ptr::eq(have, want) && !other_side {
                            let params = Params::new(&self.raw.equipment[ui], ui, self.place);
                            let message = format!(
                                "the stream arriving here carries {}, not {}: a fluid cannot change across a stream",
                                have.name, want.name
                            );
                            return Err(params.error(key, message));
                        }
                    }
                }
            }
        }
        let mut streams = Vec::new();
        for (i, (from, to)) in links.into_iter().enumerate() {
            let f = fluid[i].ok_or_else(|| self.item_error(from.unit, format!(
                "no feed's fluid reaches the stream {}.{}; a closed loop needs 'fluid: <name>' on one of its units",
                units[from.unit].id, from.port
            )))?;
            streams.push(Stream {
                from,
                to,
                fluid: f,
                name: format!("{}.{}", units[from.unit].id, from.port),
            });
        }
        Ok(streams)
    }
}
