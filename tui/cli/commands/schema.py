"""``tripwise schema``: print the JSON Schema of the site file."""

from __future__ import annotations

import argparse
import json
import sys

from model.site.schema import site_schema


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser("schema", help="print the JSON Schema of the site file format")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    json.dump(site_schema(), sys.stdout, ensure_ascii=False, indent=2)
    sys.stdout.write("\n")
    return 0
