"""``tripwise schema``: print the JSON Schema of the site file."""

from __future__ import annotations

import argparse
import sys

from model.site.schema import schema_text


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser("schema", help="print the JSON Schema of the site file format")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    sys.stdout.write(schema_text())
    return 0
