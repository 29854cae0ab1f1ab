#!/usr/bin/env python3
"""Energy balances for the hydrogen Claude demo (flowsheets/hydrogen-claude.yaml),
from the CoolProp library (PyPI), for tests/hydrogen_claude_demo.rs.

The hydrogen is the ortho-para ideal solution of generate_ortho_para.py (CoolProp's
Leachman et al. 2009 parahydrogen and orthohydrogen equations, aligned by a
rotational partition function written out there); nitrogen is CoolProp's
'Nitrogen' (Span et al. 2000). Every figure below is a specification of the
flowsheet, except one taken from cryochain's solution: the temperature at which the
expander exhaust leaves the cold exchanger hx2 (set there by the pinch; the test
pins it). The warm exchanger's return leaves 3 K below the compressed gas (297 K),
where its minimum approach falls (the test checks the position).

Cold box below the bath (expander, hx2, valve, converter, separator, return mixer):
    m h_bath = W_expander + L h_liquid + V h_flash + f m h_exhaust,  V = (1 - f) m - L
gives the liquid L. The liquid and the flash vapour are at the equilibrium para
fraction of the receiver (saturated at 1.3 bar); the exhaust keeps the bath's.
Warm exchanger and bath together (the bath's boil-off warmed to 295 K):
    m (h_hp - h_bath) = (m - L)(h_return_warm - h_return_cold) + n (h_N2,295 - h_N2,liquid)
gives the nitrogen boiled n. The compressor (isothermal at 300 K, efficiency 0.6,
docs/methods.md) takes m [(h2 - h1) - T (s2 - s1)] / 0.6 at the suction's para
fraction; the expander's work is recovered; the nitrogen is charged its exergy
(saturated liquid at 1.2 bar, dead state 300 K and 1 atm) over 0.25
(docs/flowsheet-format.md). Specific energy = (compressor - expander + nitrogen
work) / L.

With the boil-off vented instead, the warm exchanger's balance alone gives the
hydrogen's state into the bath, and the bath's duty over the nitrogen's latent heat
the nitrogen boiled (the cold box, and so the yield, is unchanged).

Output: tests/reference/coolprop_hydrogen_claude.csv (quantity, value).
Usage:  pip install CoolProp==8.0.0 && python3 tests/reference/generate_hydrogen_claude.py
"""
import os
import sys

import CoolProp
from CoolProp.CoolProp import PropsSI

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
from generate_ortho_para import blend, bisect, saturated, x_eq  # noqa: E402

BAR = 1e5
T0, P0 = 300.0, 101325.0
M = 0.020            # kg/s compressed
SHARE = 0.65         # to the expander
EFFICIENCY = 0.8     # expander, isentropic
EXHAUST_OUT = 70.54376907981927  # K, hx2's exhaust outlet: cryochain's (pinned by the test)


def gas(t, p, x):
    return blend(t, p, x, False)


def temperature_ps(p, s, x, lo=22.0, hi=120.0):
    return bisect(lambda t: gas(t, p, x)[1] - s, lo, hi, 1e-14)


def main():
    x_bath = x_eq(80.5)
    h_bath, s_bath, _ = gas(80.5, 29.8 * BAR, x_bath)
    # Expander, frozen para fraction.
    t_s = temperature_ps(1.35 * BAR, s_bath, x_bath)
    h_s = gas(t_s, 1.35 * BAR, x_bath)[0]
    work = SHARE * M * EFFICIENCY * (h_bath - h_s)
    # Receiver: saturated at 1.3 bar, at the equilibrium para fraction of its own
    # temperature.
    x_liquid = 0.99
    for _ in range(100):
        t_sat = saturated(1.3 * BAR, x_liquid)[0]
        x_next = x_eq(t_sat)
        if abs(x_next - x_liquid) < 1e-15:
            break
        x_liquid = x_next
    t_sat, (h_liquid, _, _), _ = saturated(1.3 * BAR, x_liquid)
    h_flash = gas(77.0, 1.28 * BAR, x_liquid)[0]
    h_exhaust = gas(EXHAUST_OUT, 1.33 * BAR, x_bath)[0]
    liquid = (M * h_bath - work - (1 - SHARE) * M * h_flash - SHARE * M * h_exhaust) / (
        h_liquid - h_flash
    )
    flash = (1 - SHARE) * M - liquid
    # Return and suction para fractions (the make-up is normal hydrogen).
    x_return = (flash * x_liquid + SHARE * M * x_bath) / (M - liquid)
    x_suction = (liquid * 0.25 + (M - liquid) * x_return) / M
    h_return_cold = (flash * h_flash + SHARE * M * h_exhaust) / (M - liquid)
    h_return_warm = gas(297.0, 1.25 * BAR, x_return)[0]
    h_hp, s_hp, _ = gas(300.0, 30 * BAR, x_suction)
    h_in, s_in, _ = gas(300.0, 1.25 * BAR, x_suction)
    compressor = M * ((h_hp - h_in) - 300.0 * (s_hp - s_in)) / 0.6
    n2_liquid = PropsSI("H", "P", 1.2 * BAR, "Q", 0, "Nitrogen")
    n2_liquid_s = PropsSI("S", "P", 1.2 * BAR, "Q", 0, "Nitrogen")
    n2_warm = PropsSI("H", "T", 295.0, "P", 1.2 * BAR, "Nitrogen")
    nitrogen = (M * (h_hp - h_bath) - (M - liquid) * (h_return_warm - h_return_cold)) / (
        n2_warm - n2_liquid
    )
    # The same plant with the boil-off vented (tests/flowsheets/
    # hydrogen-claude-boil-off-vented.yaml): the warm exchanger's balance gives the
    # hydrogen into the bath; the bath's duty over the latent heat is the nitrogen.
    n2_vapour = PropsSI("H", "P", 1.2 * BAR, "Q", 1, "Nitrogen")
    h_into_bath = h_hp - (M - liquid) * (h_return_warm - h_return_cold) / M
    vented = M * (h_into_bath - h_bath) / (n2_vapour - n2_liquid)
    h0 = PropsSI("H", "T", T0, "P", P0, "Nitrogen")
    s0 = PropsSI("S", "T", T0, "P", P0, "Nitrogen")
    n2_work_per_kg = ((n2_liquid - h0) - T0 * (n2_liquid_s - s0)) / 0.25
    specific = (compressor - work + nitrogen * n2_work_per_kg) / liquid / 3.6e6
    rows = [
        ("liquid_yield", liquid / M),
        ("expander_work_W", work),
        ("compressor_power_W", compressor),
        ("nitrogen_boiled_kg_s", nitrogen),
        ("nitrogen_boiled_vented_kg_s", vented),
        ("specific_energy_kWh_kg", specific),
        ("product_para_fraction", x_liquid),
        ("suction_para_fraction", x_suction),
    ]
    with open(os.path.join(HERE, "coolprop_hydrogen_claude.csv"), "w") as out:
        out.write(
            f"# CoolProp {CoolProp.__version__}; generated by generate_hydrogen_claude.py\n"
        )
        out.write("quantity,value\n")
        for quantity, v in rows:
            out.write(f"{quantity},{v:.12g}\n")


if __name__ == "__main__":
    main()
