"""Where a long run says what it is doing. The library reports phases and rows through a
`Reporter`; the default one says nothing, the command line shows a progress display."""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager


class Reporter:
    """Receives the phase in progress and, where the work is counted, how much is done."""

    def begin(self, phase: str, total: int | None = None) -> None:
        """A phase starts; `total` is its count of cases or rows when known."""

    def advance(self, done: int) -> None:
        """`done` more cases or rows of the current phase are finished."""

    def end(self) -> None:
        """The current phase is finished."""

    @contextmanager
    def without_threads(self) -> Iterator[None]:
        """A block in which the reporter runs no thread of its own: worker processes are forked
        in it (`parallel.run`; a fork beside another thread can deadlock)."""
        yield


SILENT = Reporter()
