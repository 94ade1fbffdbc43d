"""Errors a user can act on.

Anything the user can fix (a file, a column, a unit, a profile key) is raised
as :class:`InputError`; the CLI prints its message and exits with code 2,
never a traceback.
"""

from __future__ import annotations


class InputError(Exception):
    """Input or command line that cannot be used.

    Parameters
    ----------
    problem : str
        What is wrong, in one sentence.
    file : str, optional
        The file concerned.
    row : int, optional
        1-based data row (the first row under the header is 1).
    column : str, optional
        The column as printed in the header.
    hint : str, optional
        What the user can do about it.
    """

    def __init__(self, problem: str, *, file: str | None = None, row: int | None = None,
                 column: str | None = None, hint: str | None = None):
        self.problem = problem
        self.file = file
        self.row = row
        self.column = column
        self.hint = hint
        super().__init__(self.message)

    @property
    def message(self) -> str:
        where = []
        if self.file:
            where.append(str(self.file))
        if self.row is not None:
            where.append(f"row {self.row}")
        if self.column is not None:
            where.append(f"column {self.column!r}")
        text = (": ".join([", ".join(where), self.problem]) if where else self.problem)
        if self.hint:
            text += f" — {self.hint}"
        return text
