"""Exceptions of pinchk: input errors carry where in which file the bad value was found."""

from __future__ import annotations

from dataclasses import dataclass


class PinchkError(Exception):
    """Base of every error pinchk raises on purpose."""


@dataclass(frozen=True)
class Problem:
    """One thing wrong with an input: where it is and what would be right."""

    file: str
    table: str
    field: str
    message: str
    line: int | None = None

    def __str__(self) -> str:
        where = self.file
        if self.line is not None:
            where += f", line {self.line}"
        if self.table:
            where += f", table [{self.table}]"
        if self.field:
            where += f", field '{self.field}'"
        return f"{where}: {self.message}"


class InputError(PinchkError, ValueError):
    """The input is wrong. Holds every problem found, so all are reported at once."""

    def __init__(self, problems: list[Problem] | Problem):
        self.problems = [problems] if isinstance(problems, Problem) else list(problems)
        super().__init__(self.text())

    def text(self) -> str:
        if len(self.problems) == 1:
            return f"input error: {self.problems[0]}"
        lines = [f"input error: {len(self.problems)} problems"]
        lines += [f"  - {p}" for p in self.problems]
        return "\n".join(lines)


class StructureError(InputError):
    """The structure as described cannot be solved by statics (mechanism, indeterminate, slack cable)."""


class Collector:
    """Gathers problems while a file is read, so one run reports them all."""

    def __init__(self, file: str):
        self.file = file
        self.problems: list[Problem] = []

    def add(self, table: str, field: str, message: str, line: int | None = None) -> None:
        self.problems.append(Problem(self.file, table, field, message, line))

    def raise_if_any(self, cls: type[InputError] = InputError) -> None:
        if self.problems:
            raise cls(self.problems)
