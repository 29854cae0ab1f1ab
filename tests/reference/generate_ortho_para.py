#!/usr/bin/env python3
"""Independent reference values for ortho-para hydrogen, from the CoolProp library
(PyPI), for tests/ortho_para.rs.

Everything here is computed from CoolProp's own implementation of the Leachman et
al. (2009) parahydrogen, orthohydrogen and normal-hydrogen equations and from a
rotational partition function written out below with its own inputs (the Dunham
series of the H2 ground state, B0 = 59.322, D0 = 0.0471, H0 = 4.9e-5 cm^-1, from
memory), not from cryochain's tabulated term values:

* coolprop_para_equilibrium.csv: the equilibrium para fraction, 20-300 K.
* coolprop_blend_states.csv: states of the ortho-para ideal solution at fixed para
  fraction on the aligned datum (the ortho equation shifted by A, B so that the
  ideal-gas h_o - h_p equals the rotational energy difference and
  mu_o - mu_p = -RT ln(3 Z_odd/Z_even), least squares over 20-300 K; then a common
  shift putting the 25 % solution on normal hydrogen at 300 K, 1 atm); and the
  normal-hydrogen equation at the same (T, p) for the solution-versus-normal figures.
* coolprop_para_minimum_work.csv: minimum work of liquefaction from normal
  hydrogen gas at 300 K, 1 atm (T0 = 300 K).
* coolprop_catalytic_coldbox.csv: a once-through cold box (exchanger, valve,
  separator) with and without a catalyst on the exchanger's hot side: yield, para
  fraction, duty and the hot-side temperature at each tenth of the duty.

Usage:  pip install CoolProp==8.0.0 && python3 tests/reference/generate_ortho_para.py
"""
import math
import os

import CoolProp
import CoolProp.CoolProp as CP

HERE = os.path.dirname(os.path.abspath(__file__))
C2 = 1.438776877  # cm K, CODATA 2018
R = 8.314472
ATM = 101325.0

PARA = CP.AbstractState("HEOS", "ParaHydrogen")
ORTHO = CP.AbstractState("HEOS", "OrthoHydrogen")
NORMAL = CP.AbstractState("HEOS", "Hydrogen")
MP, MO = PARA.molar_mass(), ORTHO.molar_mass()


# --- rotational partition functions (Dunham series) -------------------------------
def level(j):
    n = j * (j + 1)
    return 59.322 * n - 0.0471 * n * n + 4.9e-5 * n ** 3


def sums(t):
    beta = C2 / t
    even = sum((2 * j + 1) * math.exp(-level(j) * beta) for j in range(0, 30, 2))
    odd1 = sum((2 * j + 1) * math.exp(-(level(j) - level(1)) * beta) for j in range(1, 30, 2))
    e_even = sum((2 * j + 1) * level(j) * math.exp(-level(j) * beta) for j in range(0, 30, 2)) / even
    e_odd = sum(
        (2 * j + 1) * level(j) * math.exp(-(level(j) - level(1)) * beta) for j in range(1, 30, 2)
    ) / odd1
    return even, odd1, e_even, e_odd, beta


def x_eq(t):
    even, odd1, _, _, beta = sums(t)
    return 1.0 / (1.0 + 3.0 * odd1 * math.exp(-level(1) * beta) / even)


def delta_e(t):  # J/mol
    _, _, e_even, e_odd, _ = sums(t)
    return (e_odd - e_even) * C2 * R


def delta_mu(t):  # J/mol
    even, odd1, _, _, beta = sums(t)
    log_odd = math.log(odd1) - level(1) * beta
    return -R * t * (math.log(3.0) + log_odd - math.log(even))


# --- alignment -----------------------------------------------------------------------
def ideal(state, t, p):
    state.update(CP.PT_INPUTS, p, t)
    return state.hmolar_idealgas(), state.smolar_idealgas()


def alignment():
    rows = []
    for t in range(20, 301):
        hp, sp = ideal(PARA, float(t), 1.0)
        ho, so = ideal(ORTHO, float(t), 1.0)
        rows.append((float(t), ho - hp, so - sp))
    a = sum(delta_e(t) - dh for t, dh, _ in rows) / len(rows)
    num = sum(t * (dh + a - t * ds - delta_mu(t)) for t, dh, ds in rows)
    den = sum(t * t for t, _, _ in rows)
    return a, num / den


A, B = alignment()


# --- species on a chosen branch (metastable where needed) --------------------------
def density(state, t, p, seed):
    rho = seed
    for _ in range(100):
        state.update(CP.DmolarT_INPUTS, rho, t)
        f = state.p() - p
        slope = state.first_partial_deriv(CP.iP, CP.iDmolar, CP.iT)
        step = f / slope
        rho_next = min(max(rho - step, 0.5 * rho), 1.5 * rho)
        if abs(f) <= 1e-12 * p or abs(rho_next - rho) <= 1e-13 * rho:
            return rho_next
        rho = rho_next
    raise RuntimeError(f"density at {t} K, {p} Pa")


def species(state, t, p, liquid):
    """(h, s, g, v) per mole of one species at (T, p) on a branch."""
    tc = state.T_critical()
    if t >= tc * (1 - 1e-4) or p >= state.p_critical():
        state.update(CP.PT_INPUTS, p, t)
        seed = state.rhomolar()
    else:
        state.update(CP.QT_INPUTS, 0.0 if liquid else 1.0, t)
        sat = state.rhomolar()
        seed = sat if liquid else min(p / (R * t), sat)
    # Evaluate the equation itself at (rho, T), not CoolProp's phase-equilibrium
    # flash, so that metastable states on the chosen branch are reachable.
    state.specify_phase(CP.iphase_liquid if liquid else CP.iphase_gas)
    try:
        rho = density(state, t, p, seed)
        state.update(CP.DmolarT_INPUTS, rho, t)
        return state.hmolar(), state.smolar(), state.gibbsmolar(), 1.0 / rho
    finally:
        state.unspecify_phase()


def mixing_entropy(x):  # J/(mol K)
    return -R * sum(v * math.log(v) for v in (x, 1 - x) if v > 0)


def raw_blend(t, p, x, liquid):
    """Unshifted-common (h J/kg, s J/kgK, rho kg/m3) of the solution."""
    hp, sp, _, vp = species(PARA, t, p, liquid)
    ho, so, _, vo = species(ORTHO, t, p, liquid)
    ho, so = ho + A, so + B
    m = x * MP + (1 - x) * MO
    h = (x * hp + (1 - x) * ho) / m
    s = (x * sp + (1 - x) * so + mixing_entropy(x)) / m
    v = (x * vp + (1 - x) * vo) / m
    return h, s, 1.0 / v


NORMAL.update(CP.PT_INPUTS, ATM, 300.0)
_h0, _s0, _ = raw_blend(300.0, ATM, 0.25, False)
COMMON_H = NORMAL.hmass() - _h0
COMMON_S = NORMAL.smass() - _s0


def blend(t, p, x, liquid):
    h, s, rho = raw_blend(t, p, x, liquid)
    return h + COMMON_H, s + COMMON_S, rho


def saturation_temperature(p, x):
    PARA.update(CP.PQ_INPUTS, p, 0.0)
    tp = PARA.T()
    ORTHO.update(CP.PQ_INPUTS, p, 0.0)
    to = ORTHO.T()

    def gap(t):
        _, _, gpl, _ = species(PARA, t, p, True)
        _, _, gpv, _ = species(PARA, t, p, False)
        _, _, gol, _ = species(ORTHO, t, p, True)
        _, _, gov, _ = species(ORTHO, t, p, False)
        return x * (gpl - gpv) + (1 - x) * (gol - gov)

    lo, hi = min(tp, to), max(tp, to)
    if x >= 1.0:
        return tp
    if x <= 0.0:
        return to
    return bisect(gap, lo, hi, 1e-12 / hi)


def saturated(p, x):
    t = saturation_temperature(p, x)
    return t, blend(t, p, x, True), blend(t, p, x, False)


def bisect(f, lo, hi, tol=1e-12):
    flo = f(lo)
    for _ in range(300):
        mid = 0.5 * (lo + hi)
        fm = f(mid)
        if (fm > 0) == (flo > 0):
            lo, flo = mid, fm
        else:
            hi = mid
        if hi - lo < tol * hi:
            break
    return 0.5 * (lo + hi)


def write(name, header, rows):
    path = os.path.join(HERE, name)
    with open(path, "w") as out:
        out.write(
            f"# CoolProp {CoolProp.__version__} (PyPI), HEOS backend; SI units; "
            "generated by tests/reference/generate_ortho_para.py\n"
        )
        out.write(header + "\n")
        for row in rows:
            out.write(",".join(repr(v) if isinstance(v, float) else str(v) for v in row) + "\n")
    print(f"wrote {path}")


def main():
    write(
        "coolprop_para_equilibrium.csv",
        "temperature_K,equilibrium_para_fraction,energy_difference_J_mol",
        [(float(t), x_eq(float(t)), delta_e(float(t))) for t in range(20, 301, 5)],
    )
    # Single-phase states where both species share a phase (no metastable roots).
    grid = [
        (t, p, liquid)
        for t, p, liquid in [
            (300.0, 1e5, False), (300.0, 1e7, False), (300.0, 3e7, False),
            (200.0, 1e5, False), (200.0, 1e7, False), (100.0, 1e5, False),
            (100.0, 1e7, False), (77.0, 1e5, False), (77.0, 1.2e7, False),
            (50.0, 1e5, False), (50.0, 2e7, False), (40.0, 1e5, False),
            (35.0, 5e6, False), (25.0, 1e5, False), (20.0, 1e5, True),
            (18.0, 1e6, True), (20.0, 5e6, True), (25.0, 1e7, True),
        ]
    ]
    rows = []
    for t, p, liquid in grid:
        NORMAL.update(CP.PT_INPUTS, p, t)
        for x in (0.25, 0.5, 1.0):
            h, s, rho = blend(t, p, x, liquid)
            rows.append((t, p, x, rho, h, s, NORMAL.rhomass(), NORMAL.hmass(), NORMAL.smass()))
    write(
        "coolprop_blend_states.csv",
        "temperature_K,pressure_Pa,para_fraction,density_kg_m3,enthalpy_J_kg,entropy_J_kgK,"
        "normal_density_kg_m3,normal_enthalpy_J_kg,normal_entropy_J_kgK",
        rows,
    )
    # Minimum work from normal gas at 300 K, 1 atm, T0 = 300 K.
    t0 = 300.0
    hf, sf, _ = blend(t0, ATM, 0.25, False)
    rows = []
    for label, x in (("para-liquid", 1.0), ("equilibrium-liquid", None), ("normal-liquid-solution", 0.25)):
        if x is None:
            x = 0.998
            for _ in range(50):
                t, _, _ = saturated(ATM, x)
                x = x_eq(t)
        t, (hl, sl, _), _ = saturated(ATM, x)
        rows.append((label, x, t, (hl - hf) - t0 * (sl - sf)))
    # The demo's product (flowsheets/hydrogen-ln2-precooled.yaml): equilibrium
    # saturated liquid at 1.3 bar, from normal hydrogen fed at 300 K, 1.2 bar.
    hf12, sf12, _ = blend(t0, 1.2e5, 0.25, False)
    x = 0.998
    for _ in range(50):
        t, _, _ = saturated(1.3e5, x)
        x = x_eq(t)
    t, (hl, sl, _), _ = saturated(1.3e5, x)
    rows.append(("equilibrium-liquid-1.3bar-from-1.2bar", x, t, (hl - hf12) - t0 * (sl - sf12)))
    NORMAL.update(CP.PT_INPUTS, ATM, t0)
    hn, sn = NORMAL.hmass(), NORMAL.smass()
    NORMAL.update(CP.PQ_INPUTS, ATM, 0.0)
    rows.append(("normal-equation-liquid", 0.25, NORMAL.T(), (NORMAL.hmass() - hn) - t0 * (NORMAL.smass() - sn)))
    # The conversion enthalpy of the liquid at the normal boiling point of para.
    PARA.update(CP.PQ_INPUTS, ATM, 0.0)
    t_nbp = PARA.T()
    hp, _, _, _ = species(PARA, t_nbp, ATM, True)
    ho, _, _, _ = species(ORTHO, t_nbp, ATM, True)
    rows.append(("liquid-ortho-minus-para-J_kg", 0.0, t_nbp, (ho + A) / MO - hp / MP))
    write(
        "coolprop_para_minimum_work.csv",
        "label,para_fraction,temperature_K,value",
        rows,
    )
    coldbox_rows()


# --- the once-through cold box of tests/flowsheets/hydrogen-catalytic-coldbox.yaml ---
FEED_T, FEED_P = 40.0, 120e5
HOT_DROP, COLD_DROP = 0.2e5, 0.02e5
LOW_P = 1.3e5
APPROACH = 2.0


def equilibrium_state_ph(p, h, lo=24.0, hi=120.0):
    t = bisect(lambda t: blend(t, p, x_eq(t), False)[0] - h, lo, hi)
    return t, x_eq(t)


def coldbox(catalyst):
    x_in = x_eq(FEED_T)
    h_in, _, _ = blend(FEED_T, FEED_P, x_in, False)
    p_hot_out = FEED_P - HOT_DROP

    def outcome(t_hot_out):
        x = x_eq(t_hot_out) if catalyst else x_in
        h_hot_out, _, _ = blend(t_hot_out, p_hot_out, x, False)
        t_sat, (hl, _, _), (hv, _, _) = saturated(LOW_P, x)
        quality = (h_hot_out - hl) / (hv - hl)
        y = 1.0 - quality
        h_cold_out, _, _ = blend(FEED_T - APPROACH, LOW_P - COLD_DROP, x, False)
        residual = (h_in - h_hot_out) - quality * (h_cold_out - hv)
        return residual, y, x, h_hot_out, hv, quality

    t_out = bisect(lambda t: outcome(t)[0], 25.0, FEED_T - 0.5)
    _, y, x, h_hot_out, hv, quality = outcome(t_out)
    duty = h_in - h_hot_out  # per kg of feed
    profile = []
    for k in range(0, 11):
        h = h_in - duty * k / 10.0
        p = FEED_P - HOT_DROP * k / 10.0
        if catalyst:
            t, _ = equilibrium_state_ph(p, h)
        else:
            t = bisect(lambda t: blend(t, p, x_in, False)[0] - h, 24.0, 120.0)
        profile.append(t)
    return y, x, t_out, duty, profile


def coldbox_rows():
    rows = []
    for label, catalyst in (("frozen", False), ("catalytic", True)):
        y, x, t_out, duty, profile = coldbox(catalyst)
        rows.append((label, y, x, t_out, duty) + tuple(profile))
    header = "case,liquid_yield,product_para_fraction,hot_outlet_temperature_K,duty_J_per_kg_feed," + ",".join(
        f"hot_temperature_at_{k}0pct_K" for k in range(0, 11)
    )
    write("coolprop_catalytic_coldbox.csv", header, rows)


if __name__ == "__main__":
    main()
