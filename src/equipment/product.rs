//! A product: a stream leaving the plant, as liquid drawn off (counted in the
//! yield) or as a vent (its exergy counted as lost).

use super::kind::{EquipmentKind, Ports, ProductRole, Reader, Role};
use super::{Context, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};

/// A product's parameters.
#[derive(Debug, Clone)]
pub struct Product {
    /// Liquid or vent.
    pub role: ProductRole,
}

impl EquipmentKind for Product {
    const NAME: &'static str = "product";
    const KEYS: &'static [&'static str] = &["inlet", "role"];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        let role = match r.choice("role", "role", &["liquid", "vent"])? {
            0 => ProductRole::Liquid,
            _ => ProductRole::Vent,
        };
        r.inlet("in", "inlet")?;
        Ok(Product { role })
    }
}

impl Equipment for Product {
    fn ports(&self) -> Ports {
        Ports {
            inlets: vec!["in"],
            outlets: vec![],
        }
    }

    fn role(&self) -> Role {
        Role::Product(self.role)
    }

    fn outlet_pressures(&self, _inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![]
    }

    fn run(&self, _inlets: &[Flow], _context: &Context) -> Result<(Vec<Flow>, Performance)> {
        Ok((vec![], Performance::default()))
    }
}
