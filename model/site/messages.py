"""Validation messages in the user's words: the one place that unwraps pydantic's text.

:func:`error_text` is the text of one pydantic error; :func:`describe_validation_error`
turns a whole ``ValidationError`` into one line naming where each problem is
(``nodes[3] (rcd1).idn_ma: ...``); :func:`one_line` makes any message print as
one line.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from pydantic import ValidationError

from model.site.safe_text import cut, echoed, shown_line
from model.site.terms import ID_RULE

#: pydantic puts this before the text of a ValueError raised in a validator.
_VALUE_ERROR_PREFIX = "Value error, "

#: The longest one clause of a validation message may be (a pydantic message
#: can quote a value; the value itself is cut to 60 characters first).
_CLAUSE_LIMIT = 200
#: Length of the problems listed in one message; the rest are counted.
_PROBLEMS_LIMIT = 160


def error_text(err: Mapping[str, Any], default: str = "invalid") -> str:
    """The message of one pydantic error detail, without pydantic's own prefix."""
    return str(err.get("msg", default)).removeprefix(_VALUE_ERROR_PREFIX)


def one_line(text: str) -> str:
    """``text`` with line breaks and terminal controls escaped, so it prints as one line.

    See :func:`model.site.safe_text.shown_line`: every control character, C1
    character, bidi override and line separator is shown as a visible escape.
    """
    return shown_line(text)


def _shown_key(key: str) -> str:
    return key if key.isprintable() and len(key) <= 40 else repr(key[:40])


def _tag_message(err: Mapping[str, Any]) -> str:
    ctx = err.get("ctx") or {}
    tag = ctx.get("tag")
    expected = str(ctx.get("expected_tags", "")).replace("'", "")
    shown_tag = f" '{echoed(tag)}'" if tag is not None else ""
    return f"unknown kind{shown_tag}" + (f" (one of: {expected})" if expected else "")


def _walk(loc: tuple[Any, ...], raw: Any) -> str:
    """A JSON path like ``nodes[3] (rcd1).idn_ma`` for a pydantic error location.

    Elements of ``loc`` that name no real place in the data (pydantic's labels
    of union members, which users never typed) are left out.
    """
    parts: list[str] = []
    cur = raw
    i = 0
    while i < len(loc):
        key = loc[i]
        if isinstance(key, int) and isinstance(cur, list):
            parts.append(f"[{key}]")
            nxt = cur[key] if 0 <= key < len(cur) else None
            if isinstance(nxt, dict) and isinstance(nxt.get("id"), str):
                parts.append(f" ({_shown_key(nxt['id'])})")
                # pydantic adds the union tag after a list index of a discriminated union
                if i + 1 < len(loc) and loc[i + 1] == nxt.get("kind"):
                    i += 1
            cur = nxt
        elif isinstance(cur, dict) and isinstance(key, str) and key in cur:
            parts.append(f".{_shown_key(key)}" if parts else _shown_key(key))
            cur = cur[key]
        elif isinstance(cur, dict) and isinstance(key, str) and i == len(loc) - 1:
            # a missing or extra field
            parts.append(f".{_shown_key(key)}" if parts else _shown_key(key))
            cur = None
        elif (
            isinstance(cur, dict)
            and i + 1 < len(loc)
            and isinstance(loc[i + 1], str)
            and loc[i + 1] in cur
        ):
            i += 1  # a tagged-union label in the middle of the path
            continue
        else:
            break
        i += 1
    return "".join(parts)


def describe_validation_error(exc: ValidationError, raw: Any) -> str:
    """One clause per problem, each with its JSON path in ``raw``; joined by '; '.

    Errors from the members of one union (a time or 'did not trip') are merged
    into one clause.
    """
    merged: dict[str, list[str]] = {}
    for err in exc.errors():
        loc = tuple(err.get("loc", ()))
        msg = error_text(err)
        if err.get("type") == "extra_forbidden":
            field = loc[-1] if loc else "?"
            msg = f"field '{echoed(field)}' is not allowed here"
            loc = loc[:-1]
        elif err.get("type") == "union_tag_invalid":
            msg = _tag_message(err)
        elif err.get("type") == "string_pattern_mismatch" and loc and loc[-1] in ("id", "parent"):
            msg = f"an id is {ID_RULE}"
        elif err.get("type") == "missing":
            msg = "required field is missing"
        msg = cut(shown_line(msg[: _CLAUSE_LIMIT + 1]), _CLAUSE_LIMIT)
        msgs = merged.setdefault(_walk(loc, raw), [])
        if msg not in msgs:
            msgs.append(msg)
    out: list[str] = []
    for where, msgs in merged.items():
        text = " or ".join(msgs)
        out.append(f"{where}: {text}" if where else text)
    # the first problems whole, as many as fit in a line a terminal shows; then a count
    shown: list[str] = []
    for clause in out:
        if shown and sum(len(c) + 2 for c in shown) + len(clause) > _PROBLEMS_LIMIT:
            break
        shown.append(clause)
    if len(shown) < len(out):
        shown.append(f"and {len(out) - len(shown)} more problem(s)")
    return "; ".join(shown)


def plain_message(err: Mapping[str, Any], label: str, unit: str, given: Any) -> str:
    """A pydantic error on one field, in plain words."""
    kind = err.get("type", "")
    ctx = err.get("ctx") or {}
    u = f" {unit}" if unit else ""
    # all the digits typed, never rounded or put as a power of ten (99999999, not 1e+08)
    you = f" (you entered {given:.15g})" if isinstance(given, float) else ""
    if kind == "greater_than_equal":
        return f"{label} must be at least {ctx['ge']:g}{u}{you}"
    if kind == "greater_than":
        return f"{label} must be more than {ctx['gt']:g}{u}{you}"
    if kind == "less_than_equal":
        return f"{label} must be at most {ctx['le']:g}{u}{you}"
    if kind == "less_than":
        return f"{label} must be less than {ctx['lt']:g}{u}{you}"
    if kind == "string_too_short":
        return f"{label} must not be empty"
    if kind == "string_too_long":
        return f"{label} is too long (at most {ctx['max_length']} characters)"
    msg = error_text(err, "is not valid")
    return f"{label}: {msg}"
