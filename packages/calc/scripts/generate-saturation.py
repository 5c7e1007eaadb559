#!/usr/bin/env python3
"""Generate packages/calc/src/saturation-data.ts for Coilpath.

Library: CoolProp 8.0.0 (`python3 -m pip install coolprop==8.0.0`), HEOS backend.
Fluid definitions (the same as the `coolprop_fluid` / `composition_mass` fields of
shared/reference/refrigerant-saturation.json):

  pure fluids (bubble = dew):       HEOS::R32, HEOS::R134a, HEOS::R22, HEOS::R1234yf
  predefined pseudo-pure blends:    HEOS::R410A  (R-32/125 50/50 mass %)
    (separate bubble and dew        HEOS::R404A  (R-125/143a/134a 44/52/4)
     pressure equations)            HEOS::R407C  (R-32/125/134a 23/25/52)
                                    HEOS::R507A  (R-125/143a 50/50)
  predefined HEOS mixtures:         HEOS::R454B.mix (R-32/1234yf 68.9/31.1)
                                    HEOS::R448A.mix (R-32/125/1234yf/134a/1234ze(E) 26/26/20/21/7)
                                    HEOS::R513A.mix (R-1234yf/134a 56/44)

For every whole degree Fahrenheit from T_MIN_F to the refrigerant's table top, the script
computes the bubble pressure (Q = 0) and the dew pressure (Q = 1) in psia. Pure and pseudo-pure fluids use
PropsSI('P', 'T', T, 'Q', q, fluid) directly. The mixture
models' flash solver does not converge everywhere from a cold start, so each saturation curve
is traced upwards with AbstractState.update_with_guesses, seeding every step with the previous
state's pressure, phase densities and phase compositions; wherever PropsSI converges too the two
are checked to agree within 1e-6 relative. The table top is kept well below the critical point
(or the first temperature where tracing fails) so interpolation never runs into the critical
region.

Usage: python3 packages/calc/scripts/generate-saturation.py  (from the repository root)
"""
import json
import math
import os
import sys

import CoolProp
import CoolProp.CoolProp as CP

EXPECTED_VERSION = "8.0.0"
if CoolProp.__version__ != EXPECTED_VERSION:
    sys.exit(f"CoolProp {EXPECTED_VERSION} expected, found {CoolProp.__version__}")

PA_PER_PSI = 6894.757293168361
T_MIN_F = -60
STEP_F = 1
MARGIN_F = 8.0  # stay at least this far below the critical / non-convergence temperature

# id, CoolProp fluid, composition (mass fractions) for documentation, pseudo-pure/mixture kind
FLUIDS = [
    ("R-410A", "HEOS::R410A", {"R32": 0.5, "R125": 0.5}),
    ("R-32", "HEOS::R32", None),
    ("R-454B", "HEOS::R454B.mix", {"R32": 0.689, "R1234yf": 0.311}),
    ("R-134a", "HEOS::R134a", None),
    ("R-22", "HEOS::R22", None),
    ("R-404A", "HEOS::R404A", {"R125": 0.44, "R143a": 0.52, "R134a": 0.04}),
    ("R-407C", "HEOS::R407C", {"R32": 0.23, "R125": 0.25, "R134a": 0.52}),
    ("R-448A", "HEOS::R448A.mix", {"R32": 0.26, "R125": 0.26, "R1234yf": 0.2, "R134a": 0.21, "R1234ze(E)": 0.07}),
    ("R-513A", "HEOS::R513A.mix", {"R1234yf": 0.56, "R134a": 0.44}),
    ("R-507A", "HEOS::R507A", {"R125": 0.5, "R143a": 0.5}),
    ("R-1234yf", "HEOS::R1234yf", None),
]


def f_to_k(f):
    return (f - 32.0) * 5.0 / 9.0 + 273.15


def k_to_f(k):
    return (k - 273.15) * 9.0 / 5.0 + 32.0


def props_curve(fluid, q, t_from_f, t_to_f):
    """Pure and pseudo-pure fluids: PropsSI directly (it converges over the whole range)."""
    out = []
    f = t_from_f
    while f <= t_to_f:
        try:
            p = CP.PropsSI("P", "T", f_to_k(f), "Q", q, fluid)
        except ValueError:
            break
        out.append(p / PA_PER_PSI)
        f += STEP_F
    return out


def trace(fluid, q, t_from_f, t_to_f):
    """Mixtures: saturation pressure (psia) at q for every STEP_F from t_from_f, traced with
    guesses from the previous step; stops at the first failure."""
    if not fluid.endswith(".mix"):
        return props_curve(fluid, q, t_from_f, t_to_f)
    state = CP.AbstractState("HEOS", fluid.split("::", 1)[1])
    out = []
    prev = None
    f = t_from_f
    while f <= t_to_f:
        t = f_to_k(f)
        try:
            if prev is None:
                state.update(CP.QT_INPUTS, q, t)
            else:
                g = CP.PyGuessesStructure()
                g.T = t
                g.p, g.rhomolar_liq, g.rhomolar_vap, g.x, g.y = prev
                state.update_with_guesses(CP.QT_INPUTS, q, t, g)
            p = state.p()
            if not math.isfinite(p) or p <= 0:
                raise ValueError("bad pressure")
            if prev is not None and p <= prev[0]:
                raise ValueError("pressure not rising")
            prev = (
                p,
                state.saturated_liquid_keyed_output(CP.iDmolar),
                state.saturated_vapor_keyed_output(CP.iDmolar),
                list(state.mole_fractions_liquid()),
                list(state.mole_fractions_vapor()),
            )
        except ValueError:
            break
        try:
            p_check = CP.PropsSI("P", "T", t, "Q", q, fluid)
            if abs(p_check - p) / p > 1e-6:
                sys.exit(f"{fluid} q={q} T={f} F: traced {p} Pa vs PropsSI {p_check} Pa")
        except ValueError:
            pass  # PropsSI alone does not converge here; the traced value stands
        out.append(p / PA_PER_PSI)
        f += STEP_F
    return out


def critical_f(fluid):
    try:
        return k_to_f(CP.PropsSI("Tcrit", fluid))
    except ValueError:
        return None


def check_smooth(name, values):
    """Third differences of ln(P) on a 1 F grid are tiny for a smooth curve; a jump means a bad root."""
    ln = [math.log(v) for v in values]
    d3 = [ln[i + 3] - 3 * ln[i + 2] + 3 * ln[i + 1] - ln[i] for i in range(len(ln) - 3)]
    worst = max(abs(x) for x in d3)
    if worst > 1e-4:
        sys.exit(f"{name}: ln(P) not smooth (max third difference {worst:g})")
    return worst


def main():
    tables = {}
    for rid, fluid, composition in FLUIDS:
        tc = critical_f(fluid)
        limit = (tc - MARGIN_F) if tc is not None else 250.0
        bubble = trace(fluid, 0, T_MIN_F, limit)
        dew = trace(fluid, 1, T_MIN_F, limit)
        n_ok = min(len(bubble), len(dew))
        top_f = T_MIN_F + (n_ok - 1) * STEP_F
        if tc is None:
            top_f = top_f - MARGIN_F  # mixtures: stay clear of where tracing stopped
        top_f = int(math.floor(top_f / 5.0) * 5)
        n = (top_f - T_MIN_F) // STEP_F + 1
        bubble, dew = bubble[:n], dew[:n]
        pure = composition is None
        if pure:
            worst = max(abs(a - b) / a for a, b in zip(bubble, dew))
            if worst > 1e-9:
                sys.exit(f"{rid}: pure fluid with bubble != dew ({worst})")
        s1 = check_smooth(rid + " bubble", bubble)
        s2 = check_smooth(rid + " dew", dew)
        tables[rid] = dict(fluid=fluid, composition=composition, top_f=top_f, bubble=bubble,
                           dew=None if pure else dew, tc=tc)
        print(f"{rid:9s} {fluid:18s} {T_MIN_F}..{top_f} F  n={n}  Tc={tc}  smooth={max(s1, s2):.1e}",
              file=sys.stderr)

    def fmt(values):
        return "[" + ",".join(f"{v:.6g}" if v < 10 else f"{v:.7g}" for v in values) + "]"

    lines = [
        "// GENERATED by packages/calc/scripts/generate-saturation.py — do not edit by hand.",
        f"// Source: CoolProp {CoolProp.__version__} (HEOS backend), QT inputs traced with guesses; see the script.",
        "// Saturation pressures in psia for every whole degree Fahrenheit from tMinF to tMaxF.",
        "// dewPsia null means a pure fluid (bubble = dew).",
        "",
        "/** One refrigerant's saturation table (psia at each whole °F from tMinF to tMaxF). */",
        "export interface SaturationTable {",
        "  /** CoolProp fluid string the table was computed with. */",
        "  readonly coolpropFluid: string;",
        "  /** Nominal mass composition the CoolProp model represents; null for a pure fluid. */",
        "  readonly compositionMass: Readonly<Record<string, number>> | null;",
        "  readonly tMinF: number;",
        "  readonly tMaxF: number;",
        "  readonly stepF: number;",
        "  /** Bubble-point (Q = 0) pressure, psia. */",
        "  readonly bubblePsia: readonly number[];",
        "  /** Dew-point (Q = 1) pressure, psia; null when equal to the bubble pressure. */",
        "  readonly dewPsia: readonly number[] | null;",
        "}",
        "",
        f"export const SATURATION_SOURCE = 'CoolProp {CoolProp.__version__} (HEOS backend)';",
        "",
        "export const saturationTables = {",
    ]
    for rid, t in tables.items():
        lines.append(f"  '{rid}': {{")
        lines.append(f"    coolpropFluid: '{t['fluid']}',")
        lines.append(f"    compositionMass: {json.dumps(t['composition']) if t['composition'] else 'null'},")
        lines.append(f"    tMinF: {T_MIN_F},")
        lines.append(f"    tMaxF: {t['top_f']},")
        lines.append(f"    stepF: {STEP_F},")
        lines.append(f"    bubblePsia: {fmt(t['bubble'])},")
        lines.append(f"    dewPsia: {fmt(t['dew']) if t['dew'] is not None else 'null'},")
        lines.append("  },")
    lines.append("} as const satisfies Record<string, SaturationTable>;")
    lines.append("")
    here = os.path.dirname(os.path.abspath(__file__))
    target = os.path.join(here, "..", "src", "saturation-data.ts")
    with open(target, "w", encoding="utf-8") as fh:
        fh.write("\n".join(lines))
    print(f"wrote {os.path.normpath(target)} ({os.path.getsize(target)} bytes)", file=sys.stderr)


if __name__ == "__main__":
    main()
