"""Errors that end a run with exit status 2: the input could not be read, or usage is wrong.

Every message is one line naming the file and, where known, the line and column, so that
editors and CI logs can jump to it.
"""
from __future__ import annotations


class InputError(Exception):
    """Bad input: a file that cannot be read, parsed or accepted."""

    def __init__(self, message: str, file: str | None = None, line: int | None = None,
                 column: int | None = None):
        super().__init__(message)
        self.message = message
        self.file = file
        self.line = line
        self.column = column

    def __str__(self) -> str:
        where = [str(self.file)] if self.file else []
        if self.file and self.line is not None:
            where.append(str(self.line))
            if self.column is not None:
                where.append(str(self.column))
        text = " ".join(self.message.split())  # always one line
        return f"{':'.join(where)}: {text}" if where else text


class UsageError(InputError):
    """The command line or configuration asks for something that cannot be done."""
