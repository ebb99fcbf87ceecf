"""Writing a report to files: every file through a temporary file and a rename, inputs never overwritten.

A report is one file (HTML, JSON, CSV, text) or a Markdown file with its pictures beside it. Either all
of its files are written, or none: a failure part way removes the temporary file and any file of this
report already renamed into place, so a failed run leaves no half report.
"""

from __future__ import annotations

import os
import tempfile


def _same(a: str, b: str) -> bool:
    return os.path.exists(a) and os.path.exists(b) and os.path.samefile(a, b)


def _mode(path: str) -> int:
    """The mode of the file being replaced, else the usual mode of a new file under the umask."""
    if os.path.exists(path):
        return os.stat(path).st_mode & 0o777
    mask = os.umask(0o022)
    os.umask(mask)
    return 0o666 & ~mask


def atomic_write(path: str, data: bytes | str) -> None:
    """Write ``data`` to ``path`` through a temporary file in the same folder and a rename."""
    real = os.path.realpath(path)
    fd, tmp = tempfile.mkstemp(prefix=".pinchk-", suffix=".part", dir=os.path.dirname(real) or ".")
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data.encode("utf-8") if isinstance(data, str) else data)
        os.chmod(tmp, _mode(real))  # mkstemp makes the file private; a report gets the usual mode
        os.replace(tmp, real)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def refuse_inputs(paths, protect=()) -> None:
    """OSError if any of ``paths`` is one of the files in ``protect`` (the job file, a forces file)."""
    for path in paths:
        real = os.path.realpath(path)
        for q in protect:
            if q and _same(real, q):
                raise OSError(f"refusing to overwrite the input file {q}")


def write_files(files: list[tuple[str, bytes | str]], protect=()) -> None:
    """Write every (path, data) or none: refuse any path that is one of ``protect`` (the job file, a
    forces file); on a failure remove the files of this call already written."""
    refuse_inputs([p for p, _ in files], protect)
    written: list[str] = []
    try:
        for path, data in files:
            atomic_write(path, data)
            written.append(path)
    except BaseException:
        for path in written:
            if os.path.exists(path):
                os.unlink(path)
        raise


def picture_names(path: str, keys) -> dict[str, str]:
    """File names of a Markdown report's pictures: NAME.md -> NAME.KEY.png, beside it."""
    stem = os.path.splitext(os.path.basename(path))[0]
    return {k: f"{stem}.{k}.png" for k in keys}


def write_report(results, fmt: str, path: str, protect=(), date: str | None = None, progress=None,
                 **options) -> list[str]:
    """Write the report in ``fmt`` to ``path`` (and, for Markdown, its pictures beside it): the paths written."""
    from . import render

    if fmt == "md":
        from .figures import all_figure_captions, all_figures

        folder = os.path.dirname(path)
        names = picture_names(path, all_figure_captions(results))
        refuse_inputs([path] + [os.path.join(folder, n) for n in names.values()], protect)  # before the work
        pics = all_figures(results, progress)
        names = picture_names(path, pics)
        text = render(results, "md", date=date, pictures=names, **options)
        files = [(os.path.join(folder, names[k]), png) for k, (_, png) in pics.items()] + [(path, text)]
    else:
        refuse_inputs([path], protect)
        opts = {"date": date, "progress": progress} if fmt == "html" else {}
        files = [(path, render(results, fmt, **opts, **options))]
    write_files(files, protect)
    return [p for p, _ in files]
