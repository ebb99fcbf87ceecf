"""Readers of data/*.csv: materials by name and size, every row with its source."""

from __future__ import annotations

import csv
from dataclasses import dataclass
from functools import cache
from pathlib import Path

from .model import Material
from .units import to_si

DATA = Path(__file__).resolve().parent / "data"


@dataclass(frozen=True)
class MaterialRow:
    name: str
    size_min: float  # m
    size_max: float  # m
    fy: float  # Pa
    fu: float
    E: float
    source: str


def read_rows(filename: str) -> list[dict[str, str]]:
    """Rows of a data CSV, skipping '#' comment lines."""
    with open(DATA / filename, newline="", encoding="utf-8") as fh:
        lines = [ln for ln in fh if not ln.lstrip().startswith("#")]
    return list(csv.DictReader(lines))


@cache
def library() -> dict[str, tuple[MaterialRow, ...]]:
    """The bundled material library: name -> rows by size."""
    out: dict[str, list[MaterialRow]] = {}
    for r in read_rows("materials.csv"):
        su, fu_ = r["size_unit"], r["stress_unit"]
        out.setdefault(r["name"], []).append(
            MaterialRow(
                name=r["name"],
                size_min=to_si(float(r["size_min"]), "length", su),
                size_max=to_si(float(r["size_max"]), "length", su),
                fy=to_si(float(r["fy"]), "stress", fu_),
                fu=to_si(float(r["fu"]), "stress", fu_),
                E=to_si(float(r["E"]), "stress", fu_),
                source=r["source"],
            )
        )
    return {k: tuple(sorted(v, key=lambda m: m.size_min)) for k, v in out.items()}


def at_size(name: str, size: float) -> Material:
    """The library material ``name`` at a plate thickness or bar diameter ``size`` [m].

    Raises:
        KeyError: no such material.
        ValueError: no row covers the size (the message gives the range there is).
    """
    rows = library()[name]
    eps = 1e-9
    for i, row in enumerate(rows):
        low_ok = size >= row.size_min - eps if i == 0 else size > row.size_min + eps
        if low_ok and size <= row.size_max + eps:
            return Material(name, row.fy, row.fu, row.E, row.source)
    lo, hi = rows[0].size_min * 1e3, rows[-1].size_max * 1e3
    raise ValueError(f"material {name} is listed for sizes {lo:g} mm to {hi:g} mm, not {size * 1e3:g} mm")
