"""Views of the results table: terminal table, JSON, CSV, and the calculation report as Markdown or HTML.

Each is a function Results -> str, reached through ``render(results, fmt)``; ``write_report`` (in
``.output``) writes one to a file safely, with a Markdown report's pictures beside it.
"""

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
    "md": (".document", "render_md"),
    "html": (".document", "render_html"),
}


def write_report(results, fmt: str, path: str, protect=(), **options) -> list[str]:
    """Write the view ``fmt`` to ``path`` through temporary files (never over an input): the paths written."""
    from .output import write_report as _write

    return _write(results, fmt, path, protect, **options)
