"""What every method module shares: the Check record and the helpers that build one."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt


@dataclass(frozen=True)
class Check:
    """One check over many rows: demand against capacity, with its clause.

    ``kind`` is the kind of figure demand and capacity are ("force", "moment", "length", "stress" or
    "ratio"); ``mask`` marks the rows the check applies to; ``factors`` lists the factors used.
    """

    name: str
    clause: str  # the standard and clause, e.g. "EN 1993-1-8 Table 3.10"
    formula: str  # the equation checked, as the clause writes it
    kind: str
    demand: npt.NDArray[np.float64]
    capacity: npt.NDArray[np.float64]
    factors: str
    mask: npt.NDArray[np.bool_] | None = None
    note: str = ""
    uses_forces: bool = True  # False for a detailing rule the forces do not enter (no load factors apply)
    terms: tuple[tuple[str, str, object], ...] = ()  # (symbol, kind, SI values or a scalar)
    worked: tuple[str, str] = ("", "")  # demand and capacity as expressions in {symbol}s


def term(symbol: str, kind: str, values) -> tuple[str, str, object]:
    """One named input of a check's formula: (symbol as printed, kind of figure, SI values or a scalar)."""
    return (symbol, kind, values)


def make_check(name, clause_formula, kind, demand, capacity, factors, mask=None, note="",
               uses_forces=True, terms=(), worked=("", "")) -> Check:
    """A Check from "clause: formula" text and array-likes (the form the method modules write)."""
    clause, _, formula = clause_formula.partition(": ")
    return Check(name, clause, formula, kind, np.asarray(demand, float), np.asarray(capacity, float),
                 factors, mask, note, uses_forces, tuple(terms), tuple(worked))




def secured_check(clause_formula: str, P) -> Check:
    """The rule that a pin is secured against working loose, from the job's ``secured`` field.

    A yes/no rule in the table: demand 0 against capacity 1 where the job states the pin secured;
    where it does not, demand 1 against capacity 0 (utilization infinite), so the row fails until the
    engineer states how the pin is retained.
    """
    secured = np.asarray(P.get("secured", np.zeros(P["d"].shape[0], bool)), bool)
    s, c = np.where(secured, 0.0, 1.0), np.where(secured, 1.0, 0.0)
    return make_check("pin secured", clause_formula + " (1 = not stated secured)", "ratio", s, c, "", None,
                      "state secured = true for the pin once it is retained (cotter pin, keeper plate, nut)",
                      uses_forces=False, terms=(term("s", "ratio", s), term("c", "ratio", c)),
                      worked=("not stated secured (1) or secured (0) = {s}", "limit = {c}"))


def factors_for(module, overrides: dict[str, float]) -> dict[str, float]:
    """The method's default factors with the job's overrides applied."""
    f = {k: v[0] for k, v in module.FACTORS.items()}
    f.update(overrides)
    return f
