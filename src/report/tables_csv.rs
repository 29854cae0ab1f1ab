//! The stream and equipment tables as CSV files for spreadsheets, units in the
//! headers.

use crate::equipment::Details;
use crate::error::{Error, Result};
use crate::solve::Solution;
use std::path::{Path, PathBuf};

fn write(path: &Path, rows: Vec<Vec<String>>) -> Result<()> {
    let mut writer = csv::Writer::from_path(path).map_err(|e| Error::file("write", path, e))?;
    for row in rows {
        writer
            .write_record(&row)
            .map_err(|e| Error::file("write", path, e))?;
    }
    writer.flush().map_err(|e| Error::file("write", path, e))
}

/// Writes `streams.csv` and `equipment.csv` into `dir`; returns their paths.
pub fn write_all(solution: &Solution, dir: &Path) -> Result<Vec<PathBuf>> {
    crate::report::output_folder(dir)?;
    let header = |names: &[&str]| names.iter().map(|s| s.to_string()).collect::<Vec<_>>();
    let mut streams = vec![header(&[
        "stream",
        "fluid",
        "temperature [K]",
        "pressure [Pa]",
        "enthalpy [J/kg]",
        "entropy [J/(kg K)]",
        "density [kg/m3]",
        "mass flow [kg/s]",
        "vapour fraction [-]",
        "phase",
        "para fraction [-]",
    ])];
    for (name, f) in solution.stream_names.iter().zip(&solution.streams) {
        streams.push(vec![
            name.clone(),
            f.state.fluid().name.clone(),
            format!("{:.6}", f.state.temperature),
            format!("{:.3}", f.state.pressure),
            format!("{:.6}", f.state.enthalpy),
            format!("{:.6}", f.state.entropy),
            format!("{:.6}", f.state.density),
            format!("{:.9e}", f.flow),
            format!("{:.9}", f.state.vapour_fraction()),
            f.state.phase.name().to_string(),
            f.state
                .shown_para_fraction()
                .map_or(String::new(), |x| format!("{x:.6}")),
        ]);
    }
    let mut equipment = vec![header(&[
        "id",
        "kind",
        "power [W]",
        "duty [W]",
        "precooling work [W]",
        "exergy destroyed [W]",
        "min approach [K]",
        "UA [W/K]",
        "effectiveness [-]",
    ])];
    for u in &solution.units {
        let p = &u.performance;
        let (approach, ua, effectiveness) = match &p.details {
            Details::Exchanger(x) => (
                format!("{:.6}", x.min_approach),
                // Unbounded at a zero pinch: an empty cell, not a number.
                if x.ua.is_finite() {
                    format!("{:.6}", x.ua)
                } else {
                    String::new()
                },
                // A multistream exchanger set by outlet temperatures has none.
                if x.effectiveness.is_finite() {
                    format!("{:.6}", x.effectiveness)
                } else {
                    String::new()
                },
            ),
            _ => (String::new(), String::new(), String::new()),
        };
        equipment.push(vec![
            u.id.clone(),
            u.kind.to_string(),
            format!("{:.6}", p.work_in),
            p.duty.map_or(String::new(), |d| format!("{d:.6}")),
            format!("{:.6}", p.precooling_work),
            format!("{:.6}", u.exergy_destroyed),
            approach,
            ua,
            effectiveness,
        ]);
    }
    let (a, b) = (dir.join("streams.csv"), dir.join("equipment.csv"));
    write(&a, streams)?;
    write(&b, equipment)?;
    Ok(vec![a, b])
}
