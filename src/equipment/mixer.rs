//! An adiabatic mixer: the outlet at the lowest inlet pressure with the
//! flow-weighted enthalpy.

use super::kind::{EquipmentKind, Ports, Reader};
use super::{Context, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};

/// The mixer's inlet ports, as many as it has inlets.
const INLET_PORTS: [&str; 8] = [
    "in-1", "in-2", "in-3", "in-4", "in-5", "in-6", "in-7", "in-8",
];

/// A mixer's parameters.
#[derive(Debug, Clone)]
pub struct Mixer {
    /// How many inlets it has (2 to 8).
    pub inlet_count: usize,
}

impl EquipmentKind for Mixer {
    const NAME: &'static str = "mixer";
    const KEYS: &'static [&'static str] = &["inlets"];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        let list = r
            .text_list("inlets")?
            .ok_or_else(|| r.error("inlets", MISSING_INLETS))?;
        if !(2..=INLET_PORTS.len()).contains(&list.len()) {
            return Err(r.error(
                "inlets",
                format!("a mixer takes 2 to 8 inlets, not {}", list.len()),
            ));
        }
        let inlet_count = list.len();
        for (port, reference) in INLET_PORTS.iter().zip(list) {
            r.add_inlet(port, "inlets", reference);
        }
        Ok(Mixer { inlet_count })
    }
}

const MISSING_INLETS: &str =
    "'inlets' is required for a mixer: a list such as [makeup, hx.cold-out]";

impl Equipment for Mixer {
    fn ports(&self) -> Ports {
        Ports {
            inlets: INLET_PORTS[..self.inlet_count].to_vec(),
            outlets: vec!["out"],
        }
    }

    /// The lowest inlet pressure, once every inlet's is known.
    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        let all: Option<Vec<f64>> = inlets.iter().copied().collect();
        vec![all.and_then(|v| v.into_iter().reduce(f64::min))]
    }

    /// Mixes the inlets.
    fn run(&self, inlets: &[Flow], _context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let flow: f64 = inlets.iter().map(|f| f.flow).sum();
        let pressure = inlets
            .iter()
            .map(|f| f.state.pressure)
            .fold(f64::INFINITY, f64::min);
        let first = &inlets[0];
        if !(flow > 0.0) {
            return Ok((
                vec![Flow {
                    state: first.state.clone(),
                    flow: 0.0,
                }],
                Performance::default(),
            ));
        }
        let enthalpy = inlets
            .iter()
            .map(|f| f.flow * f.state.enthalpy)
            .sum::<f64>()
            / flow;
        let material = mixed_material(inlets)?;
        // A hydrogen solution's search starts at the inlets' flow-weighted temperature.
        let guess = inlets
            .iter()
            .map(|f| f.flow * f.state.temperature)
            .sum::<f64>()
            / flow;
        let state = material.state_ph_from(pressure, enthalpy, guess)?;
        Ok((vec![Flow { state, flow }], Performance::default()))
    }
}

/// The material of mixed inlets: their fluid, and for the ortho–para solution the
/// mole-weighted para fraction. Solution and frozen normal hydrogen do not mix.
fn mixed_material(inlets: &[Flow]) -> Result<crate::fluids::Material> {
    let first = inlets[0].state.material();
    let solutions = inlets.iter().filter(|f| f.state.para_fraction.is_some()).count();
    if solutions == 0 {
        return Ok(first);
    }
    if solutions < inlets.len() {
        return Err(crate::error::Error::Input(
            "a mixer joins hydrogen that carries its para fraction with frozen normal hydrogen; give every hydrogen feed a `para_fraction`".into(),
        ));
    }
    let blend = crate::fluids::blend::Blend::get()?;
    let (mut moles, mut para) = (0.0, 0.0);
    for inlet in inlets {
        let x = inlet.state.para_fraction.unwrap_or_default();
        let n = inlet.flow.max(0.0) / blend.molar_mass(x);
        moles += n;
        para += n * x;
    }
    Ok(first.with_para_fraction(if moles > 0.0 { para / moles } else { first.para_fraction.unwrap_or_default() }))
}
