"""tripwise core: site data, published limits, checks, storage and reports.

Nothing in this package imports the terminal interface.
"""

__version__ = "0.1.0"
