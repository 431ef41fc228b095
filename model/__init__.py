"""tripwise core, in layers: site data <- rules and checks <- storage and visits <- reports.

Nothing in this package imports the terminal interface.
"""

from importlib.metadata import PackageNotFoundError, version

try:
    __version__ = version("tripwise")
except PackageNotFoundError:  # running from a source tree that was never installed
    __version__ = "0+unknown"
