//! Compressors: isothermal with an isothermal efficiency, or adiabatic stages of
//! equal pressure ratio with intercooling after each stage.

use super::kind::{EquipmentKind, Ports, PressureConflict, Reader, Role};
use super::{Context, Details, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};
use crate::quantity::Dimension;

/// The compressor models.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CompressorModel {
    /// Isothermal at a temperature (default ambient), with an isothermal efficiency:
    /// the gas is brought to that temperature, compressed isothermally and delivered
    /// at it, as a machine with inter- and aftercoolers approaches.
    Isothermal {
        /// Ideal isothermal work over actual work.
        efficiency: f64,
        /// The compression temperature, K.
        temperature: f64,
    },
    /// Adiabatic stages of equal pressure ratio with intercooling after each stage.
    Staged {
        /// Number of stages.
        stages: usize,
        /// Isentropic efficiency of each stage.
        isentropic_efficiency: f64,
        /// Temperature after each intercooler and the aftercooler, K.
        intercooler_temperature: f64,
    },
}

/// A compressor's parameters.
#[derive(Debug, Clone)]
pub struct Compressor {
    /// Delivery pressure, Pa.
    pub outlet_pressure: f64,
    /// Model.
    pub model: CompressorModel,
}

impl EquipmentKind for Compressor {
    const NAME: &'static str = "compressor";
    const KEYS: &'static [&'static str] = &[
        "inlet",
        "outlet_pressure",
        "model",
        "isothermal_efficiency",
        "temperature",
        "stages",
        "isentropic_efficiency",
        "intercooler_temperature",
        "flow",
    ];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        use Dimension::Temperature;
        let outlet_pressure = r.pressure("outlet_pressure")?;
        let model = match r.choice("model", "model", &["isothermal", "staged"])? {
            0 => CompressorModel::Isothermal {
                efficiency: r.efficiency("isothermal_efficiency", Some(1.0))?,
                temperature: r
                    .quantity_opt("temperature", Temperature, 1.0, 2000.0)?
                    .unwrap_or(r.ambient),
            },
            _ => {
                let stages = r
                    .whole_opt("stages", 1, 20)?
                    .ok_or_else(|| r.error("stages", MISSING_STAGES))?;
                CompressorModel::Staged {
                    stages,
                    isentropic_efficiency: r.efficiency("isentropic_efficiency", None)?,
                    intercooler_temperature: r
                        .quantity_opt("intercooler_temperature", Temperature, 150.0, 500.0)?
                        .unwrap_or(r.ambient),
                }
            }
        };
        r.inlet("in", "inlet")?;
        r.flow_basis()?;
        Ok(Compressor {
            outlet_pressure,
            model,
        })
    }
}

const MISSING_STAGES: &str =
    "'stages' is required for a staged compressor: a whole number from 1 to 20";

impl Equipment for Compressor {
    fn ports(&self) -> Ports {
        Ports::through()
    }

    fn role(&self) -> Role {
        Role::Compression
    }

    fn outlet_pressures(&self, _inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![Some(self.outlet_pressure)]
    }

    fn pressure_conflict(&self, inlet: f64) -> Option<PressureConflict> {
        (self.outlet_pressure <= inlet).then(|| PressureConflict {
            key: "outlet_pressure",
            message: format!(
                "the outlet pressure {:.4} bar is not above the inlet pressure {:.4} bar",
                self.outlet_pressure / 1e5,
                inlet / 1e5
            ),
        })
    }

    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        compress(&inlets[0], self.outlet_pressure, &self.model, context)
    }
}

/// Compresses `inlet` to `outlet_pressure`.
pub fn compress(
    inlet: &Flow,
    outlet_pressure: f64,
    model: &CompressorModel,
    context: &Context,
) -> Result<(Vec<Flow>, Performance)> {
    let fluid = inlet.state.material();
    let m = inlet.flow;
    let s_in = &inlet.state;
    match *model {
        CompressorModel::Isothermal {
            efficiency,
            temperature,
        } => {
            // Ideal isothermal work at the compression temperature T: Δh − T Δs from
            // (T, p_in) to (T, p_out); the inlet is brought to T against ambient first.
            let start = fluid.state_tp(temperature, s_in.pressure)?;
            let out = fluid.state_tp(temperature, outlet_pressure)?;
            let ideal =
                (out.enthalpy - start.enthalpy) - temperature * (out.entropy - start.entropy);
            let work = m * ideal / efficiency;
            let rejected = work - m * (out.enthalpy - s_in.enthalpy);
            let performance = Performance {
                work_in: work,
                heat_in: vec![(-rejected, context.ambient)],
                duty: Some(rejected),
                details: Details::Compressor {
                    discharge_temperatures: vec![out.temperature],
                },
                ..Performance::default()
            };
            Ok((
                vec![Flow {
                    state: out,
                    flow: m,
                }],
                performance,
            ))
        }
        CompressorModel::Staged {
            stages,
            isentropic_efficiency,
            intercooler_temperature,
        } => {
            let ratio = (outlet_pressure / s_in.pressure).powf(1.0 / stages as f64);
            let mut state = s_in.clone();
            let mut work = 0.0;
            let mut rejected = 0.0;
            let mut discharge = Vec::with_capacity(stages);
            for stage in 1..=stages {
                let p = if stage == stages {
                    outlet_pressure
                } else {
                    s_in.pressure * ratio.powi(stage as i32)
                };
                let ideal = fluid.state_ps(p, state.entropy)?;
                let h = state.enthalpy + (ideal.enthalpy - state.enthalpy) / isentropic_efficiency;
                let hot = fluid.state_ph(p, h)?;
                discharge.push(hot.temperature);
                work += m * (hot.enthalpy - state.enthalpy);
                let cooled = fluid.state_tp(intercooler_temperature, p)?;
                rejected += m * (hot.enthalpy - cooled.enthalpy);
                state = cooled;
            }
            let performance = Performance {
                work_in: work,
                heat_in: vec![(-rejected, context.ambient)],
                duty: Some(rejected),
                details: Details::Compressor {
                    discharge_temperatures: discharge,
                },
                ..Performance::default()
            };
            Ok((vec![Flow { state, flow: m }], performance))
        }
    }
}
