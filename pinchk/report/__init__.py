"""Views of the results table: terminal table, JSON and CSV. Each is a function Results -> str."""

from __future__ import annotations

CAUTION = ("pinchk is an aid to a qualified engineer, not a substitute: check its inputs and results; "
           "local codes, the project's specification and licensed practice govern.")


def render(results, fmt: str, **options) -> str:
    """The results in format ``fmt`` (a key of ``FORMATS``)."""
    from importlib import import_module

    module_name, func = FORMATS[fmt]
    return getattr(import_module(module_name, __name__), func)(results, **options)


FORMATS = {
    "table": (".text", "render_table"),
    "json": (".data", "render_json"),
    "csv": (".data", "render_csv"),
}
