"""Text shown on a terminal: every control is a visible escape; values quoted back are cut."""

from __future__ import annotations

import json

from model.site.safe_text import echoed, shown, shown_line


def test_controls_become_visible_escapes_and_text_is_kept() -> None:
    # ECMA-48: ESC (C0), CSI as C1 0x9b, DEL; Unicode UAX #9: RLO, LRI, PDI; LS and PS
    text = "a\x1b]0;t\x07b\x9bc\x7fd\u202ee\u2066f\u2069g\u2028h\u2029i\x00\r\n\tj"
    assert shown(text) == (
        "a\\x1b]0;t\\x07b\\u009bc\\u007fd\\u202ee\\u2066f\\u2069g\\u2028h\\u2029i\\x00\\r\n\tj"
    )
    assert shown_line("a\nb\tc") == "a\\nb\\tc"
    # letters of every script, emoji, markup and ordinary marks pass unchanged
    plain = "Ωμ ü 中文 العربية ✔ 😀 [b]x[/b] ‘q’ —"
    assert shown(plain) == plain


def test_json_through_shown_is_the_same_json() -> None:
    value = {"label": "x\x1b[2J\x9b\x7f\u202e\u2028y"}
    out = shown(json.dumps(value, ensure_ascii=False))
    assert json.loads(out) == value
    assert all(ord(c) >= 0x20 and not 0x7F <= ord(c) < 0xA0 for c in out)


def test_a_long_value_is_cut_before_it_is_escaped() -> None:
    assert echoed("k" * 5_000_000) == "k" * 59 + "…"
    assert echoed("\x1b" * 100).startswith("\\x1b\\x1b") and echoed("\x1b" * 100).endswith("…")
    assert echoed(3.5) == "3.5"
