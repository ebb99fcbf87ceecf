"""ASME BTH-1-2017 Design of Below-the-Hook Lifting Devices: pinned connections (§3-3.3) and pins.

Allowable strength design with the design factor Nd of the Design Category (§3-1.3): A 2.00, B 3.00.
The plate strengths in the region of the pin hole are divided by 1.20 Nd (the 1.20 raises the factor
against fracture: 2.40 for Category A, 3.60 for B). The job picks the category with
``[method] design = "A"`` or ``"B"``; ``Nd_A`` and ``Nd_B`` may be changed in ``[method.factors]``.

Symbols: Dp pin diameter, Dh hole diameter, t plate thickness, be the plate width beside the hole
across the force (the hole is taken centred in the width), R the distance from the hole centre to the
plate edge along the force, a = R − Dh/2.

Checks and their clauses. Paragraph numbers are those of the 2017 edition as recalled (from memory,
not read here). Editions: the 2008 edition (whose equation numbers the project's reference notes use)
and the 2014 edition carry the same pinned-connection rules under §3-3.3, as far as recalled, but the
equation numbers differ between editions, so this module cites equations by their form, never by
number. Confirm paragraph numbers and the values marked "from memory" against the edition in use.

- §3-3.3.1 tensile strength through the pin hole: Pt = Cr Fu 2 t beff / (1.20 Nd),
  Cr = 1 − 0.275 √(1 − Dp²/Dh²) (1 where Dp/Dh > 0.90), beff = be · 0.6 (Fu/Fy) √(Dh/be) ≤ be.
- §3-3.3.1 the width limit against dishing, beff ≤ 4t, reported as its own check ("dishing width
  limit"): the capacity with beff = 4t. Taking the smaller of the two tension checks is exactly the
  clause's beff = min(4t, be, 0.6 (Fu/Fy) √(Dh/be) be). Waived for a plate marked stiffened.
- §3-3.3.1 single-plane fracture beyond the hole: Pb = Cr Fu [1.13 (R − Dh/2) + 0.92 be/(1 + be/Dh)] t
  / (1.20 Nd) [form from memory].
- §3-3.3.1 double-plane shear beyond the hole: Pv = 0.70 Fu Av / (1.20 Nd),
  Av = 2 [a + (Dp/2)(1 − cos φ)] t, φ = 55 Dp/Dh degrees [φ from memory].
- §3-3.3.3 bearing: Fp = 1.25 Fy / Nd on Dp t; 0.63 Fy / Nd where the pin rotates under load for many
  cycles (the job marks the pin ``rotates``) [memory]. Fy the lower of plate and pin.
- §3-3.3.4 pin-to-hole clearance: Dh ≤ 1.10 Dp [from memory, low confidence: the factor
  ``clearance_max`` makes it adjustable; confirm it against the edition in use].
- Pins (§3-2.2 shear, §3-2.3 bending): Fv = Fy / (Nd √3) on each shear plane, Fb = 1.25 Fy / Nd for a
  solid round on S = π d³/32 [memory, LOW confidence: flagged in the clause text].
- Pin secured against working loose: §3-3.3 requires the pin to be retained [from memory]; reported as
  a check from the job's ``secured`` field.

There is no separate edge-distance or width rule here: the strength checks above cover them.
Not implemented: the combined-stress rule for a plate loaded off its axis, the fatigue (Service Class)
checks of Chapter 4 and the combined shear and bending of the pin.

References:
    ASME BTH-1-2017, Design of Below-the-Hook Lifting Devices, §3-1.3, §3-2.2, §3-2.3, §3-3.3.
    ASME BTH-1-2008 and -2014 (same paragraphs, other equation numbers).
"""

from __future__ import annotations

import numpy as np

from .base import make_check as _check
from .base import secured_check, term

NAME = "ASME BTH-1"
EDITION = "ASME BTH-1-2017 §3-3.3 (paragraph numbers from memory; 2008 and 2014 editions renumber the equations)"
VARIANTS = ("A", "B")  # Design Category
FACTORS = {
    "Nd_A": (2.00, "Nd, design factor of Design Category A, §3-1.3"),
    "Nd_B": (3.00, "Nd, design factor of Design Category B, §3-1.3 (from memory)"),
    "fracture": (1.20, "extra factor on plate strengths at the pin hole, §3-3.3.1 (2.40/2.00)"),
    "clearance_max": (1.10, "largest Dh/Dp, §3-3.3.4 (from memory, low confidence)"),
}
TAG_LOW = " [from memory, LOW confidence]"




def design_factor(f, variant):
    """Nd of the Design Category ``variant`` ("A" or "B"; A when not given)."""
    return f["Nd_" + (variant or "A")]


def cr(Dp, Dh):
    """Cr = 1 − 0.275 √(1 − Dp²/Dh²), taken as 1 where Dp/Dh > 0.90 (BTH-1 §3-3.3.1)."""
    Dp, Dh = np.asarray(Dp, float), np.asarray(Dh, float)
    c = 1 - 0.275 * np.sqrt(np.clip(1 - Dp**2 / Dh**2, 0.0, None))
    return np.where(Dp / Dh > 0.90, 1.0, c)


def b_eff_strength(be, Dh, fy, fu):
    """beff from the strength limit, be · 0.6 (Fu/Fy) √(Dh/be), not more than be (BTH-1 §3-3.3.1)."""
    return np.minimum(be, be * 0.6 * (fu / fy) * np.sqrt(Dh / be))


def tension_pt(fu, t, b_eff, Cr, Nd, fracture=1.20):
    """Pt = Cr Fu 2 t beff / (1.20 Nd) [N] (BTH-1 §3-3.3.1)."""
    return Cr * fu * 2 * t * b_eff / (fracture * Nd)


def fracture_pb(fu, t, R, Dh, be, Cr, Nd, fracture=1.20):
    """Pb = Cr Fu [1.13 (R − Dh/2) + 0.92 be/(1 + be/Dh)] t / (1.20 Nd) [N] (BTH-1 §3-3.3.1)."""
    return Cr * fu * (1.13 * (R - Dh / 2) + 0.92 * be / (1 + be / Dh)) * t / (fracture * Nd)


def shear_av(a, Dp, Dh, t):
    """Av = 2 [a + (Dp/2)(1 − cos φ)] t, φ = 55 Dp/Dh degrees [m²] (BTH-1 §3-3.3.1)."""
    phi = np.radians(55.0 * Dp / Dh)
    return 2 * (a + Dp / 2 * (1 - np.cos(phi))) * t


def shear_pv(fu, Av, Nd, fracture=1.20):
    """Pv = 0.70 Fu Av / (1.20 Nd) [N] (BTH-1 §3-3.3.1)."""
    return 0.70 * fu * Av / (fracture * Nd)


def bearing_fp(fy, Nd, rotating):
    """Fp = 1.25 Fy / Nd, or 0.63 Fy / Nd for a pin rotating under load [Pa] (BTH-1 §3-3.3.3)."""
    return np.where(rotating, 0.63, 1.25) * fy / Nd


def pin_shear_fv(fy, Nd):
    """Fv = Fy / (Nd √3) [Pa] (BTH-1 §3-2.2)."""
    return fy / (Nd * np.sqrt(3.0))


def pin_bending_fb(fy, Nd):
    """Fb = 1.25 Fy / Nd for a solid round bar [Pa] (BTH-1 §3-2.3, from memory, low confidence)."""
    return 1.25 * fy / Nd


def pin_checks(P, f, variant="A"):
    Nd = design_factor(f, variant)
    cat = f"Design Category {variant or 'A'}, Nd = {Nd:g}"
    d = P["d"]
    A = np.pi * d**2 / 4
    S = np.pi * d**3 / 32
    Fv = pin_shear_fv(P["fyp"], Nd)
    Fb = pin_bending_fb(P["fyp"], Nd)
    n = d.shape[0]
    bolt = P.get("bolt", np.zeros(n, bool))
    As = P.get("As", A)
    V_sh, V_th = P.get("V_shank", P["V"]), P.get("V_thread", np.zeros(n))
    shank, thread = P.get("shank_planes", np.ones(n, bool)), P.get("thread_planes", np.zeros(n, bool))
    t_fy, t_nd, t_d = term("Fy", "stress", P["fyp"]), term("Nd", "ratio", Nd), term("d", "length", d)
    fv_txt = "{Fy} / ({Nd} × √(3))"
    return [
        _check("pin shear", "ASME BTH-1-2017 §3-2.2: Fv = Fy/(Nd √3) on A per shear plane" + TAG_LOW, "force",
               P["V"], Fv * A, cat, ~bolt, terms=(term("V", "force", P["V"]), t_fy, t_nd, t_d),
               worked=("V = {V}", f"Fv A = {fv_txt} × π × ({{d}})² / 4")),
        _check("bolt shear (shank)", "ASME BTH-1-2017 §3-2.2: Fv = Fy/(Nd √3) on the shank area A" + TAG_LOW,
               "force", V_sh, Fv * A, cat, bolt & shank, terms=(term("V", "force", V_sh), t_fy, t_nd, t_d),
               worked=("V = {V}", f"Fv A = {fv_txt} × π × ({{d}})² / 4")),
        _check("bolt shear (thread)", "ASME BTH-1-2017 §3-2.2: Fv = Fy/(Nd √3) on the stress area As"
               + TAG_LOW, "force", V_th, Fv * As, cat, bolt & thread,
               "a thread lies in this shear plane: rigging practice warns against it",
               terms=(term("V", "force", V_th), t_fy, t_nd, term("As", "area", As)),
               worked=("V = {V}", f"Fv As = {fv_txt} × {{As}}")),
        _check("pin bending", "ASME BTH-1-2017 §3-2.3: Fb = 1.25 Fy/Nd on S = π d³/32 (solid round)" + TAG_LOW,
               "moment", P["M"], Fb * S, cat, terms=(term("M", "moment", P["M"]), t_fy, t_nd, t_d),
               worked=("M = {M}", "Fb S = 1.25 × {Fy} / {Nd} × π × ({d})³ / 32")),
        secured_check("ASME BTH-1-2017 §3-3.3 (from memory): the pin is retained against working loose", P),
    ]


def plate_checks(Q, f, variant="A"):
    Nd = design_factor(f, variant)
    k = f["fracture"]
    cat = f"Design Category {variant or 'A'}, Nd = {Nd:g}"
    catk = f"{cat}, fracture factor {k:g} (1.20 Nd = {k * Nd:g})"
    F, t, Dp, Dh = Q["F"], Q["t"], Q["d"], Q["d0"]
    fy, fu = Q["fy"], Q["fu"]
    be = Q["width"] / 2 - Dh / 2  # hole centred in the width
    R = Q["a_end"]
    a = R - Dh / 2
    n = F.shape[0]
    stiff = Q.get("stiffened", np.zeros(n, bool))
    rot = Q.get("rot", np.zeros(n, bool))
    Cr = cr(Dp, Dh)
    beff = b_eff_strength(be, Dh, fy, fu)
    Pt = tension_pt(fu, t, beff, Cr, Nd, k)
    Pt_dish = tension_pt(fu, t, np.minimum(4 * t, be), Cr, Nd, k)
    Pb = fracture_pb(fu, t, R, Dh, be, Cr, Nd, k)
    Pv = shear_pv(fu, shear_av(a, Dp, Dh, t), Nd, k)
    fy_low = np.minimum(fy, Q["fyp"])
    Fp = bearing_fp(fy_low, Nd, rot)
    phi = np.radians(55.0 * Dp / Dh)
    t_F, t_t, t_fu = term("P", "force", F), term("t", "length", t), term("Fu", "stress", fu)
    t_cr, t_nd, t_k = term("Cr", "ratio", Cr), term("Nd", "ratio", Nd), term("k", "ratio", k)
    t_dh, t_dp, t_be = term("Dh", "length", Dh), term("Dp", "length", Dp), term("be", "length", be)
    per = " / ({k} × {Nd})"
    return [
        _check("tension at pin hole", "ASME BTH-1-2017 §3-3.3.1: Pt = Cr Fu 2 t beff/(1.20 Nd), "
               "beff = 0.6 be (Fu/Fy) √(Dh/be) ≤ be, Cr = 1 − 0.275 √(1 − Dp²/Dh²)", "force", F, Pt, catk,
               note="k: the fracture factor 1.20; Cr and beff as the formula gives them (Cr = 1 where Dp/Dh > 0.90)",
               terms=(t_F, t_cr, t_fu, t_t, term("beff", "length", beff), t_k, t_nd),
               worked=("P = {P}", "Pt = {Cr} × {Fu} × 2 × {t} × {beff}" + per)),
        _check("dishing width limit", "ASME BTH-1-2017 §3-3.3.1: beff ≤ 4t (Pt with beff = 4t), the limit "
               "that prevents dishing", "force", F, Pt_dish, catk, ~stiff,
               "waived for a plate marked stiffened against dishing",
               terms=(t_F, t_cr, t_fu, t_t, t_be, t_k, t_nd),
               worked=("P = {P}", "Pt = {Cr} × {Fu} × 2 × {t} × min(4 × {t}, {be})" + per)),
        _check("single-plane fracture", "ASME BTH-1-2017 §3-3.3.1: Pb = Cr Fu [1.13 (R − Dh/2) + "
               "0.92 be/(1 + be/Dh)] t/(1.20 Nd) (form from memory)", "force", F, Pb, catk,
               terms=(t_F, t_cr, t_fu, term("R", "length", R), t_dh, t_be, t_t, t_k, t_nd),
               worked=("P = {P}", "Pb = {Cr} × {Fu} × (1.13 × ({R} − {Dh} / 2) + 0.92 × {be} / (1 + {be} / {Dh}))"
                       " × {t}" + per)),
        _check("double-plane shear", "ASME BTH-1-2017 §3-3.3.1: Pv = 0.70 Fu Av/(1.20 Nd), Av = 2 [a + "
               "(Dp/2)(1 − cos φ)] t, φ = 55 Dp/Dh deg (φ from memory)", "force", F, Pv, catk,
               note="kφ = 1 − cos φ",
               terms=(t_F, t_fu, term("a", "length", a), t_dp, term("kφ", "ratio", 1 - np.cos(phi)), t_t, t_k, t_nd),
               worked=("P = {P}", "Pv = 0.70 × {Fu} × 2 × ({a} + {Dp} / 2 × {kφ}) × {t}" + per)),
        _check("bearing", "ASME BTH-1-2017 §3-3.3.3: Fp = 1.25 Fy/Nd on Dp t (from memory; Fy the lower of "
               "plate and pin)", "force", F, Fp * Dp * t, cat, ~rot,
               terms=(t_F, term("Fy", "stress", fy_low), t_nd, t_dp, t_t),
               worked=("P = {P}", "Fp Dp t = 1.25 × {Fy} / {Nd} × {Dp} × {t}")),
        _check("bearing (rotating)", "ASME BTH-1-2017 §3-3.3.3: Fp = 0.63 Fy/Nd on Dp t, pin rotating under "
               "load (from memory)", "force", F, Fp * Dp * t, cat, rot,
               terms=(t_F, term("Fy", "stress", fy_low), t_nd, t_dp, t_t),
               worked=("P = {P}", "Fp Dp t = 0.63 × {Fy} / {Nd} × {Dp} × {t}")),
        _check("pin-to-hole clearance", "ASME BTH-1-2017 §3-3.3.4: Dh − Dp ≤ 0.10 Dp, i.e. Dh ≤ 1.10 Dp "
               "(from memory, LOW confidence)", "length", Dh - Dp, (f["clearance_max"] - 1) * Dp,
               f"clearance_max = {f['clearance_max']:g}", uses_forces=False,
               terms=(t_dh, t_dp, term("cmax", "ratio", f["clearance_max"])),
               worked=("Dh − Dp = {Dh} − {Dp}", "({cmax} − 1) × {Dp}")),
    ]
