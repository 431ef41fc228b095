"""tripwise core, in layers: site data <- rules and checks <- storage and visits <- reports.

Nothing in this package imports the terminal interface.
"""

from __future__ import annotations

from functools import cache


@cache
def _installed_version() -> str:
    # Read from the installed package's metadata, and only when asked: the
    # metadata reader and its look-up cost a command tens of milliseconds of
    # start-up that almost none of them needs.
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("tripwise")
    except PackageNotFoundError:  # running from a source tree that was never installed
        return "0+unknown"


def __getattr__(name: str) -> str:
    """``model.__version__``: the installed version, looked up on first use."""
    if name == "__version__":
        return _installed_version()
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
