"""A progress display on standard error while a long job runs — only when standard error is
a terminal (a pipe, a file or a notebook's captured stream stays quiet). Drawn by tqdm,
imported only when a display is shown, so a quiet run pays nothing for it."""

from __future__ import annotations

import sys
from types import TracebackType
from typing import Any


class Progress:
    """Count units of work (``advance``) against an optional total, shown as a bar.

    Parameters
    ----------
    total : int or None
        The work to do, or None when it is not known in advance (a streamed file): the
        display then shows the count and the rate.
    what : str
        What is being done, shown before the bar.
    unit : str
        What one unit of work is ("sample", "row").
    enabled : bool
        False keeps it quiet whatever standard error is.
    """

    def __init__(self, total: int | None, what: str, *, unit: str = "sample", enabled: bool = True) -> None:
        self._bar: Any = None
        if enabled and _is_terminal():
            from tqdm import tqdm

            self._bar = tqdm(total=total, desc=what, unit=unit, file=sys.stderr, leave=False, dynamic_ncols=True)

    @property
    def shown(self) -> bool:
        return self._bar is not None

    def advance(self, n: int) -> None:
        if self._bar is not None:
            self._bar.update(n)

    def close(self) -> None:
        if self._bar is not None:
            self._bar.close()
            self._bar = None

    def __enter__(self) -> Progress:
        return self

    def __exit__(self, exc_type: type[BaseException] | None, exc: BaseException | None,
                 tb: TracebackType | None) -> None:
        self.close()


def _is_terminal() -> bool:
    isatty = getattr(sys.stderr, "isatty", None)
    try:
        return bool(isatty()) if isatty is not None else False
    except ValueError:  # a closed stream
        return False
