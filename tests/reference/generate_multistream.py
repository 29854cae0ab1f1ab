#!/usr/bin/env python3
"""Independent composite-curve figures for the three-stream test flowsheets, from the
CoolProp library (PyPI), for tests/multistream.rs.

The flowsheets (tests/flowsheets/three-stream-exchanger*.yaml) send 4 g/s of
hydrogen at 300 K and 20 bar (hot, 0.3 bar pressure drop) against 40 g/s of nitrogen
at 80 K and 1.2 bar (cold, outlet 280 K, 20 W heat leak) and 5 g/s of helium at
70 K and 1.3 bar (cold, 0.05 bar pressure drop), once through. CoolProp's
'Hydrogen' is the Leachman et al. (2009) normal-hydrogen equation, 'Nitrogen' Span
et al. (2000), 'Helium' Ortiz-Vega et al.: the equations cryochain uses.

The method here is written independently of cryochain's: each composite curve is
tabulated as heat against temperature on a fine temperature grid (a stream's
pressure falls in proportion to the heat it has exchanged, found by substitution;
its heat leak is spread in proportion too), inverted by interpolation onto a fine
grid of heat, and the smallest difference between the two composites is then
polished with exact CoolProp solves for the temperature at the heat where it lies.

* case `outlets`: the hydrogen leaves at 90 K, the helium's outlet follows from
  the energy balance.
* case `approach`: the smallest temperature difference is 2 K; the hydrogen's and
  the helium's duties follow from it and the energy balance (bisection on the
  exchanged heat).

Output: tests/reference/coolprop_multistream.csv (case, quantity, value).
Usage:  pip install CoolProp==8.0.0 numpy && python3 tests/reference/generate_multistream.py
"""
import os

import CoolProp
import numpy as np
from CoolProp.CoolProp import PropsSI

BAR = 1e5
STREAMS = [
    # name, fluid, side, flow kg/s, T in K, p in Pa, pressure drop Pa, heat leak W
    ("hp", "Hydrogen", "hot", 0.004, 300.0, 20 * BAR, 0.3 * BAR, 0.0),
    ("n2", "Nitrogen", "cold", 0.040, 80.0, 1.2 * BAR, 0.0, 20.0),
    ("he", "Helium", "cold", 0.005, 70.0, 1.3 * BAR, 0.05 * BAR, 0.0),
]
N2_OUTLET = 280.0
HP_OUTLET = 85.0
APPROACH = 2.0


def h_tp(fluid, t, p):
    return PropsSI("H", "T", t, "P", p, fluid)


def t_ph(fluid, p, h):
    return PropsSI("T", "P", p, "H", h, fluid)


class Stream:
    def __init__(self, spec, duty):
        self.name, self.fluid, self.side, self.m, self.t_in, self.p_in, self.dp, self.leak = spec
        self.duty = duty  # heat exchanged with the other streams, W
        self.h_in = h_tp(self.fluid, self.t_in, self.p_in)
        sign = -1.0 if self.side == "hot" else 1.0
        # Enthalpy change per unit of heat exchanged (the leak spread in proportion).
        self.per_heat = (duty + sign * self.leak) / duty if duty > 0 else 0.0
        h_out = self.h_in + sign * (duty * self.per_heat) / self.m if duty > 0 else self.h_in
        self.t_out = t_ph(self.fluid, self.p_in - self.dp, h_out) if duty > 0 else self.t_in

    def exchanged_at(self, t):
        """Heat exchanged from the inlet to temperature t (clamped to the stream)."""
        lo, hi = min(self.t_in, self.t_out), max(self.t_in, self.t_out)
        if self.duty <= 0:
            return 0.0
        if (self.side == "hot" and t >= hi) or (self.side == "cold" and t <= lo):
            return 0.0
        if (self.side == "hot" and t <= lo) or (self.side == "cold" and t >= hi):
            return self.duty
        e = 0.5 * self.duty
        for _ in range(50):
            p = self.p_in - self.dp * e / self.duty
            h = h_tp(self.fluid, t, p)
            new = abs(h - self.h_in) * self.m / self.per_heat
            if abs(new - e) < 1e-13 * self.duty:
                e = new
                break
            e = new
        return min(e, self.duty)

    def share_from_warm_end(self, t):
        """Heat this stream accounts for on its composite, from the warm end."""
        e = self.exchanged_at(t)
        return e if self.side == "hot" else self.duty - e


def composite_heat(streams, t):
    return sum(s.share_from_warm_end(t) for s in streams)


def temperature_at(streams, q, t_low, t_high):
    """Exact composite temperature at heat q from the warm end, by bisection."""
    a, b = t_low, t_high  # heat(a) >= q >= heat(b)
    for _ in range(200):
        mid = 0.5 * (a + b)
        if composite_heat(streams, mid) > q:
            a = mid
        else:
            b = mid
        if b - a < 1e-11:
            break
    return 0.5 * (a + b)


def pinch(duties, grid=3000, fine=20001):
    streams = [Stream(spec, d) for spec, d in zip(STREAMS, duties)]
    hot = [s for s in streams if s.side == "hot"]
    cold = [s for s in streams if s.side == "cold"]
    total = sum(s.duty for s in hot)
    def table(side):
        lo = min(min(s.t_in, s.t_out) for s in side)
        hi = max(max(s.t_in, s.t_out) for s in side)
        ts = np.linspace(lo, hi, grid)
        # Every stream end as a node, so the kinks are exact.
        ts = np.unique(np.concatenate([ts, [s.t_in for s in side], [s.t_out for s in side]]))
        qs = np.array([composite_heat(side, t) for t in ts])
        return ts, qs, lo, hi
    th, qh, hlo, hhi = table(hot)
    tc, qc, clo, chi = table(cold)
    q = np.linspace(0.0, total, fine)
    # Heat falls as temperature rises: interpolate on the reversed arrays.
    hot_t = np.interp(q, qh[::-1], th[::-1])
    cold_t = np.interp(q, qc[::-1], tc[::-1])
    d = hot_t - cold_t
    k = int(np.argmin(d))
    # Polish with exact temperatures around the grid minimum (golden section).
    def exact(x):
        return temperature_at(hot, x, hlo, hhi) - temperature_at(cold, x, clo, chi)
    a = q[max(k - 1, 0)]
    b = q[min(k + 1, fine - 1)]
    ratio = 0.5 * (5 ** 0.5 - 1)
    c, e = b - ratio * (b - a), a + ratio * (b - a)
    fc, fe = exact(c), exact(e)
    for _ in range(60):
        if fc < fe:
            b, e, fe = e, c, fc
            c = b - ratio * (b - a)
            fc = exact(c)
        else:
            a, c, fc = c, e, fe
            e = a + ratio * (b - a)
            fe = exact(e)
    ends = [(exact(0.0), 0.0), (exact(total), total), (min(fc, fe), 0.5 * (a + b))]
    value, where = min(ends)
    return value, where / total, total, streams


def duty_for(stream_index, t_out):
    name, fluid, side, m, t_in, p_in, dp, leak = STREAMS[stream_index]
    dh = h_tp(fluid, t_out, p_in - dp) - h_tp(fluid, t_in, p_in)
    return -m * dh + leak if side == "hot" else m * dh - leak


def main():
    rows = []
    q_n2 = duty_for(1, N2_OUTLET)
    # Case `outlets`.
    q_hp = duty_for(0, HP_OUTLET)
    duties = [q_hp, q_n2, q_hp - q_n2]
    value, position, total, streams = pinch(duties)
    rows += [
        ("outlets", "duty_W", total),
        ("outlets", "he_outlet_K", streams[2].t_out),
        ("outlets", "pinch_K", value),
        ("outlets", "pinch_position", position),
    ]
    # Case `approach`: bisection on the exchanged heat.
    low, high = q_n2 * 1.0001, q_n2 + 0.0051 * 5193 * 209.0
    for _ in range(45):
        mid = 0.5 * (low + high)
        try:
            value, *_ = pinch([mid, q_n2, mid - q_n2], grid=1500, fine=8001)
        except ValueError:
            value = -1.0
        if value > APPROACH:
            low = mid
        else:
            high = mid
    total = 0.5 * (low + high)
    value, position, total, streams = pinch([total, q_n2, total - q_n2])
    rows += [
        ("approach", "duty_W", total),
        ("approach", "hp_outlet_K", streams[0].t_out),
        ("approach", "he_outlet_K", streams[2].t_out),
        ("approach", "pinch_K", value),
        ("approach", "pinch_position", position),
    ]
    here = os.path.dirname(os.path.abspath(__file__))
    with open(os.path.join(here, "coolprop_multistream.csv"), "w") as out:
        out.write(f"# CoolProp {CoolProp.__version__}; generated by generate_multistream.py\n")
        out.write("case,quantity,value\n")
        for case, quantity, v in rows:
            out.write(f"{case},{quantity},{v:.12g}\n")


if __name__ == "__main__":
    main()
