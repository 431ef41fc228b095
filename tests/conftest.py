"""Test-wide settings.

Property tests explore new examples on every local run; under CI (``CI`` set)
they run derandomized, so a landing never depends on the luck of the draw.
"""

from __future__ import annotations

import os

from hypothesis import settings

settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("CI"):
    settings.load_profile("ci")
