"""One exception family with a human title; the CLI prints it, the TUI shows it."""

from __future__ import annotations


class WallscreenError(Exception):
    """Base of every error wallscreen reports to a person (never shown as a traceback)."""

    title = "wallscreen error"


class InputError(WallscreenError):
    """Bad input: a file, a line/column or a segment and field, and what would be valid.

    ``str(err)`` is the one-line message the CLI prints and the invalid-file corpus expects:
    ``"<file>:<line>:<column>: <message>"`` for syntax errors,
    ``"<file>: segment <id>, <field>: <message>"`` for a bad value of a segment,
    ``"<file>: [<table>] <field>: <message>"`` for the other tables; when the line of a
    bad value is known it follows the file: ``"<file>:<line>:<column>: segment <id>, ..."``.
    """

    title = "Bad input"

    def __init__(
        self,
        message: str,
        *,
        file: str | None = None,
        line: int | None = None,
        column: int | None = None,
        segment: str | None = None,
        field: str | None = None,
        table: str | None = None,
    ) -> None:
        self.message = message
        self.file = file
        self.line = line
        self.column = column
        self.segment = segment
        self.field = field
        self.table = table
        super().__init__(self.__str__())

    def __str__(self) -> str:
        where = self.file or "<input>"
        if self.line is not None:
            where += f":{self.line}"
            if self.column is not None:
                where += f":{self.column}"
        if self.segment is not None:
            loc = f"segment {self.segment}" + (f", {self.field}" if self.field else "")
        elif self.table is not None:
            loc = f"[{self.table}]" + (f" {self.field}" if self.field else "")
        else:
            loc = self.field or ""
        if self.file is None and self.line is None:
            # Typed in the terminal interface, not read from a file: no place to name.
            return f"{loc}: {self.message}" if loc else self.message
        return f"{where}: {loc}: {self.message}" if loc else f"{where}: {self.message}"


class EngineError(WallscreenError):
    """A computation that could not finish (e.g. an iteration that did not converge)."""

    title = "Screening failed"


class InputErrors(InputError):
    """Several problems found at once (overlaps along a wall): one line each.

    ``str()`` is one located line per problem, the first ``limit`` of them, then a line with
    how many more; the attributes of the first problem are the error's own.
    """

    def __init__(self, errors: list[InputError], *, limit: int = 5) -> None:
        if not errors:
            raise ValueError("InputErrors needs at least one error")
        self.errors = list(errors)
        self.limit = limit
        first = self.errors[0]
        super().__init__(
            first.message,
            file=first.file,
            line=first.line,
            column=first.column,
            segment=first.segment,
            field=first.field,
            table=first.table,
        )

    def __str__(self) -> str:
        lines = [InputError.__str__(e) for e in self.errors[: self.limit]]
        more = len(self.errors) - self.limit
        if more > 0:
            lines.append(f"... and {more} more ({len(self.errors)} in all)")
        return "\n".join(lines)
