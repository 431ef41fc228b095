"""Validation messages in the user's words: the one place that unwraps pydantic's text."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

#: pydantic puts this before the text of a ValueError raised in a validator.
_VALUE_ERROR_PREFIX = "Value error, "


def error_text(err: Mapping[str, Any], default: str = "invalid") -> str:
    """The message of one pydantic error detail, without pydantic's own prefix."""
    return str(err.get("msg", default)).removeprefix(_VALUE_ERROR_PREFIX)
