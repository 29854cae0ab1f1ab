#!/usr/bin/env python3
"""Convert published equation-of-state coefficients into cryochain's own fluid files.

The general-purpose CoolProp property library (PyPI) exposes, for each fluid, the
coefficients of the published equation of state it implements, with the literature
key of the paper. This script reads those coefficients and writes one file per fluid
into src/fluids/data/ in cryochain's own layout (see docs/methods.md). Only numbers
and literature keys are taken; the layout, names and conventions are our own.

Usage:  pip install CoolProp==8.0.0 && python3 tests/reference/import_coefficients.py
"""
import json
import os
import sys

import CoolProp
import CoolProp.CoolProp as CP

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "..", "..", "src", "fluids", "data")

# (our canonical name, library name, aliases, formula, reference-state convention)
FLUIDS = [
    ("nitrogen", "Nitrogen", ["n2"], "N2", "published"),
    ("hydrogen", "Hydrogen", ["h2", "normal-hydrogen", "normalhydrogen", "n-h2"], "H2", "published"),
    ("parahydrogen", "ParaHydrogen", ["para-hydrogen", "p-h2"], "H2 (para)", "published"),
    ("orthohydrogen", "OrthoHydrogen", ["ortho-hydrogen", "o-h2"], "H2 (ortho)", "normal_boiling_point"),
    ("helium", "Helium", ["he", "helium-4", "he4"], "He", "normal_boiling_point"),
    ("neon", "Neon", ["ne"], "Ne", "normal_boiling_point"),
    ("argon", "Argon", ["ar"], "Ar", "normal_boiling_point"),
    ("methane", "Methane", ["ch4"], "CH4", "normal_boiling_point"),
    ("oxygen", "Oxygen", ["o2"], "O2", "normal_boiling_point"),
    ("air", "Air", ["dry-air"], "N2+O2+Ar (pseudo-pure)", "normal_boiling_point"),
]

# Where the library's copy of a constant differs from the paper, the paper's value.
# Orthohydrogen: Leachman et al. (2009) give rho_c = 15.445 mol/dm3 and p_c = 1.31065 MPa;
# CoolProp 8.0.0 carries rho_r = 15444.54 mol/m3, which moves the paper's Table 15
# saturation values at 20 K by about 3e-5 (p 90.4147 instead of the printed 90.417 kPa).
# With the paper's value the printed table is reproduced.
# Argon: Tegeler et al. (1999) give the triple point as 83.8058 K (library: 83.806 K).
OVERRIDES = {
    "orthohydrogen": {"reducing_density": 15445.0, "critical_density": 15445.0,
                      "critical_pressure": 1310650.0},
    "argon": {"triple_temperature": 83.8058},
}

# Full citations of the papers, from the library's BibTeX file.
CITATIONS = {}


def load_citations():
    path = os.path.join(os.path.dirname(CoolProp.__file__), "CoolPropBibTeXLibrary.bib")
    text = open(path, encoding="utf-8", errors="replace").read()
    for entry in text.split("@")[1:]:
        head, _, body = entry.partition(",")
        key = head.partition("{")[2].strip()
        fields = {}
        for line in body.splitlines():
            name, eq, value = line.partition("=")
            if eq:
                fields[name.strip().lower()] = value.strip().rstrip(",").strip("{}").replace("{", "").replace("}", "")
        CITATIONS[key] = fields


def clean(text):
    """BibTeX accents to plain Unicode."""
    return text.replace('\\"u', "ü").replace('\\"o', "ö").replace('\\"a', "ä")


def citation(key):
    parts = []
    for k in key.split(","):
        f = dict(CITATIONS.get(k.strip(), {}))
        if "note" in f:
            # Notes say where the library got unpublished coefficients; the
            # citation needs only that the work is unpublished.
            f["note"] = "unpublished manuscript"
        pieces = [f.get("author", ""), f'"{f.get("title", "")}"', f.get("journal", f.get("note", "")),
                  f.get("volume", ""), f.get("pages", ""), f"({f.get('year', '')})"]
        doi = f.get("doi")
        text = ", ".join(p for p in pieces if p)
        if doi:
            text += f", doi:{doi}"
        parts.append(clean(text))
    return " ; ".join(parts)


def fmt(x):
    return repr(float(x))


def flist(xs):
    return "[" + ", ".join(fmt(x) for x in xs) + "]"


def ideal_terms(eos, critical_temperature):
    lines = []
    for term in eos["alpha0"]:
        kind = term["type"]
        if kind == "IdealGasHelmholtzLead":
            lines.append(f"  - {{kind: lead, constant: {fmt(term['a1'])}, tau: {fmt(term['a2'])}}}")
        elif kind == "IdealGasHelmholtzEnthalpyEntropyOffset":
            # The library's own choice of reference state; ours is set by reference_state.
            continue
        elif kind == "IdealGasHelmholtzLogTau":
            lines.append(f"  - {{kind: log_tau, coefficient: {fmt(term['a'])}}}")
        elif kind == "IdealGasHelmholtzPower":
            lines.append(f"  - {{kind: power, n: {flist(term['n'])}, t: {flist(term['t'])}}}")
        elif kind == "IdealGasHelmholtzPlanckEinstein":
            lines.append(f"  - {{kind: planck_einstein, n: {flist(term['n'])}, theta: {flist(term['t'])}}}")
        elif kind == "IdealGasHelmholtzPlanckEinsteinFunctionT":
            # n ln(1 - exp(-v/T)) with v in kelvin: theta in tau is v / Tc.
            tc = term["Tcrit"]
            assert abs(tc - critical_temperature) < 1e-9, (tc, critical_temperature)
            lines.append(f"  - {{kind: planck_einstein, n: {flist(term['n'])}, theta: {flist([v / tc for v in term['v']])}}}")
        elif kind == "IdealGasHelmholtzPlanckEinsteinGeneralized":
            lines.append(f"  - {{kind: planck_einstein_general, n: {flist(term['n'])}, c: {flist(term['c'])}, "
                         f"d: {flist(term['d'])}, theta: {flist(term['t'])}}}")
        else:
            raise SystemExit(f"unhandled ideal-gas term {kind}")
    return lines


def residual_terms(eos):
    lines = []
    for term in eos["alphar"]:
        kind = term["type"]
        if kind == "ResidualHelmholtzPower":
            lines.append(f"  - kind: power\n    n: {flist(term['n'])}\n    d: {flist(term['d'])}\n"
                         f"    t: {flist(term['t'])}\n    l: {flist(term['l'])}")
        elif kind == "ResidualHelmholtzGaussian":
            lines.append(f"  - kind: gaussian\n    n: {flist(term['n'])}\n    d: {flist(term['d'])}\n"
                         f"    t: {flist(term['t'])}\n    eta: {flist(term['eta'])}\n"
                         f"    epsilon: {flist(term['epsilon'])}\n    beta: {flist(term['beta'])}\n"
                         f"    gamma: {flist(term['gamma'])}")
        else:
            raise SystemExit(f"unhandled residual term {kind}")
    return lines


def ancillary(name, a):
    kind = a["type"]
    form = {"pL": "exponential", "pV": "exponential", "rhoV": "exponential",
            "rhoLnoexp": "linear", "rhoL": "exponential"}[kind]
    return (f"  {name}: {{form: {form}, reducing_value: {fmt(a['reducing_value'])}, "
            f"reducing_temperature_K: {fmt(a['T_r'])}, divide_by_reduced_temperature: "
            f"{'true' if a.get('using_tau_r') else 'false'}, n: {flist(a['n'])}, t: {flist(a['t'])}, "
            f"stated_max_error_percent: {fmt(a.get('max_abserror_percentage', 1.0))}}}")


def melting(m):
    kind = m["type"]
    lines = [f"melting_line:\n  form: {kind.lower()}\n  parts:"]
    for p in m["parts"]:
        a = p["a"] if isinstance(p["a"], list) else [p["a"]]
        t = p.get("t", [p.get("c", 0.0)])
        lines.append(f"    - {{temperature_min_K: {fmt(p['T_min'])}, temperature_max_K: {fmt(p['T_max'])}, "
                     f"reference_temperature_K: {fmt(p['T_0'])}, reference_pressure_Pa: {fmt(p['p_0'])}, "
                     f"a: {flist(a)}, t: {flist(t if isinstance(t, list) else [t])}}}")
    return "\n".join(lines)


def write(canonical, library, aliases, formula, reference):
    j = json.loads(CP.get_fluid_param_string(library, "JSON"))
    if isinstance(j, list):
        j = j[0]
    eos = j["EOS"][0]
    red = eos["STATES"]["reducing"]
    crit = j["STATES"]["critical"]
    trip_l = j["STATES"]["triple_liquid"]
    trip_v = j["STATES"]["triple_vapor"]
    anc = j["ANCILLARIES"]
    key = eos["BibTeX_EOS"]
    fix = OVERRIDES.get(canonical, {})
    red = dict(red, rhomolar=fix.get("reducing_density", red["rhomolar"]))
    crit = dict(crit, rhomolar=fix.get("critical_density", crit["rhomolar"]),
                p=fix.get("critical_pressure", crit["p"]))
    ttriple = fix.get("triple_temperature", eos["Ttriple"])
    out = []
    out.append(f"# {canonical}: multiparameter Helmholtz-energy equation of state.")
    out.append(f"# Source: {citation(key)}")
    out.append(f"# Coefficients as published, read through CoolProp {CoolProp.__version__} (PyPI), key {key},")
    out.append("# by tests/reference/import_coefficients.py. Do not edit by hand; re-run the importer.")
    out.append(f"name: {canonical}")
    out.append(f"aliases: [{', '.join(aliases)}]")
    out.append(f"formula: {formula}")
    out.append(f"source: {json.dumps(citation(key))}")
    out.append(f"source_key: {key}")
    out.append(f"pseudo_pure: {'true' if eos['pseudo_pure'] else 'false'}")
    out.append(f"molar_mass_kg_mol: {fmt(eos['molar_mass'])}")
    out.append(f"gas_constant_J_molK: {fmt(eos['gas_constant'])}")
    out.append(f"reducing: {{temperature_K: {fmt(red['T'])}, density_mol_m3: {fmt(red['rhomolar'])}}}")
    out.append(f"critical: {{temperature_K: {fmt(crit['T'])}, pressure_Pa: {fmt(crit['p'])}, density_mol_m3: {fmt(crit['rhomolar'])}}}")
    if fix:
        out.append("# Constants corrected to the paper (see OVERRIDES in the importer): " + ", ".join(sorted(fix)))
    out.append(f"triple: {{temperature_K: {fmt(ttriple)}, liquid_pressure_Pa: {fmt(trip_l['p'])}, vapour_pressure_Pa: {fmt(trip_v['p'])}}}")
    out.append(f"limits: {{temperature_min_K: {fmt(ttriple)}, temperature_max_K: {fmt(eos['T_max'])}, pressure_max_Pa: {fmt(eos['p_max'])}}}")
    out.append(f"reference_state: {reference}")
    out.append("ideal_gas:")
    out.extend(ideal_terms(eos, red["T"]))
    out.append("residual:")
    out.extend(residual_terms(eos))
    out.append("ancillaries:")
    if "pS" in anc:
        out.append(ancillary("bubble_pressure", anc["pS"]))
        out.append(ancillary("dew_pressure", anc["pS"]))
    else:
        out.append(ancillary("bubble_pressure", anc["pL"]))
        out.append(ancillary("dew_pressure", anc["pV"]))
    out.append(ancillary("liquid_density", anc["rhoL"]))
    out.append(ancillary("vapour_density", anc["rhoV"]))
    out.append(melting(anc["melting_line"]))
    path = os.path.join(OUT, f"{canonical}.yaml")
    with open(path, "w", encoding="utf-8") as fh:
        fh.write("\n".join(out) + "\n")
    print("wrote", os.path.relpath(path), file=sys.stderr)


def main():
    load_citations()
    for row in FLUIDS:
        write(*row)


if __name__ == "__main__":
    main()
