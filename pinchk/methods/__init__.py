"""Published design methods, one module each, registered by the name a job file uses.

A method module defines NAME, EDITION, VARIANTS (e.g. ("ASD", "LRFD") or ()), FACTORS (name ->
(default, what it is and where it comes from)) and two functions, ``pin_checks(P, f, variant)`` and
``plate_checks(Q, f, variant)``, that take columns of SI arrays and return a list of ``Check``.
Nothing in a method module knows about files, units or output.

Optional pin columns a module may use (checks.py always provides them): bolt (the pin is a bolt),
grade (its grade name, "" for a pin), As (thread stress area), V_shank and V_thread (the largest shear on
a plane through the shank / through the thread; 0 where there is none), shank_planes and thread_planes
(some plane cuts the shank / the thread), secured, rot. Plate columns
add fup (pin ultimate strength) and stiffened (against dishing).

So that a report can show each row worked out ("Fb,Rd = 1.5 × 20 mm × 60 mm × 355 MPa / 1 = 639 kN"), a
check may also carry ``terms``, the named input columns of its formula, and ``worked``, the demand and
capacity as expressions in those names::

    make_check("bearing", "EN 1993-1-8 Table 3.10: Fb,Rd = 1.5 t d fy / γM0", "force", F, Fb_Rd, "γM0 = 1",
               terms=(term("FEd", "force", F), term("t", "length", t), term("d", "length", d),
                      term("fy", "stress", fy), term("γM0", "ratio", g0)),
               worked=("FEd = {FEd}", "Fb,Rd = 1.5 × {t} × {d} × {fy} / {γM0}"))

A term is (symbol, kind, values): the symbol as printed, the kind of figure (as ``Check.kind``) and the
SI values, one per row or a scalar. ``{symbol}`` in an expression is replaced by that row's value in the
output units, and the report appends "= result". Write the arithmetic out (×, /, +, −, √(…), π, min(…),
(…)², (…)³): tests/test_calc_report.py evaluates every expression and requires the check's own demand and
capacity from it. Both are optional: a check without them is reported with its formula, demand and
capacity only. A new method only has to follow this pattern (docs/report.md).
"""

from __future__ import annotations

from . import aisc360_16, allowable, bth1, en1993_1_8
from .base import Check, factors_for, make_check, secured_check, term

__all__ = ["METHODS", "Check", "factors_for", "make_check", "secured_check", "term"]

METHODS = {
    en1993_1_8.NAME: en1993_1_8,
    aisc360_16.NAME: aisc360_16,
    bth1.NAME: bth1,
    allowable.NAME: allowable,
}
