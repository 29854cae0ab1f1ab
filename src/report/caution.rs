//! The caution printed after results: the hazards of the fluids the flowsheet
//! actually uses (its streams and its baths' cryogens), then the deferral to local
//! codes and licensed practice. The fuller text is docs/safety.md.

/// The hazards of one fluid, in a few words (common knowledge of the trade).
fn hazards(fluid: &str) -> &'static str {
    match fluid {
        "hydrogen" | "parahydrogen" | "orthohydrogen" => {
            "hydrogen is flammable over a wide range, easily ignited, and embrittles many steels"
        }
        "helium" => "helium boiling off displaces oxygen (asphyxiation in closed spaces)",
        "nitrogen" => "nitrogen boiling off displaces oxygen (asphyxiation in closed spaces)",
        "argon" => "argon boiling off displaces oxygen and collects low (asphyxiation)",
        "neon" => "neon boiling off displaces oxygen (asphyxiation in closed spaces)",
        "methane" => "methane is flammable and displaces oxygen",
        "oxygen" => {
            "oxygen feeds fire: use oxygen-compatible, oil-free materials and cleaning"
        }
        "air" => {
            "liquid air is enriched in oxygen: a fire hazard with oil, grease or insulation; use oxygen-compatible materials"
        }
        _ => "",
    }
}

/// Whether a fluid's cold surfaces condense oxygen-enriched air (those colder than
/// about 80 K: the cryogens boiling below air's dew point).
fn condenses_air(fluid: &str) -> bool {
    matches!(
        fluid,
        "nitrogen" | "hydrogen" | "parahydrogen" | "orthohydrogen" | "helium" | "neon"
    )
}

/// The caution for a flowsheet using `fluids` (canonical names), wrapped for a
/// terminal; the JSON carries it on one line.
pub fn caution(fluids: &[String]) -> String {
    let mut parts: Vec<String> = vec![
        "high-pressure gas and cryogenic liquids (cold burns; trapped liquid bursts what holds it)"
            .to_string(),
    ];
    for fluid in fluids {
        let words = hazards(fluid);
        if !words.is_empty() && !parts.iter().any(|p| p == words) {
            parts.push(words.to_string());
        }
    }
    if fluids.iter().any(|f| condenses_air(f)) {
        parts.push("air condensing on surfaces below about 80 K enriches oxygen".to_string());
    }
    let text = format!(
        "Caution: {}. These figures are for planning: follow local codes and licensed engineering practice. See docs/safety.md.",
        parts.join("; ")
    );
    super::solution::wrap(&text, 90, "").trim_end().to_string()
}
