"""A generated corpus of broken site files: (name, bytes, what the message must say).

Reusable by any test that loads files (store, CLI, app): ``broken_cases()``
yields :class:`BrokenCase` items.  ``expect`` is a piece of text the one-line
error must contain, or None for random damage that may happen to leave a valid
file (then only "a clear error or a valid site, never a traceback" is asked).
"""

from __future__ import annotations

import json
import random
from collections.abc import Iterator
from dataclasses import dataclass
from typing import Any

from bench.gen_site import generate_site
from model.site.models import site_to_dict
from model.site.terms import FORMAT_VERSION

TOKEN = "__RAW_TOKEN__"


@dataclass(frozen=True)
class BrokenCase:
    name: str
    data: bytes
    expect: str | None


def _dump(doc: Any, raw: str | None = None) -> bytes:
    text = json.dumps(doc, indent=2, ensure_ascii=False) + "\n"
    if raw is not None:
        text = text.replace(json.dumps(TOKEN), raw, 1)
    return text.encode("utf-8")


def _bases() -> list[dict[str, Any]]:
    return [site_to_dict(generate_site(n, seed)) for n, seed in ((12, 1), (30, 2), (45, 3))]


def _numeric_fields(doc: dict[str, Any]) -> list[tuple[int, str]]:
    return [
        (i, k)
        for i, n in enumerate(doc["nodes"])
        for k, v in n.items()
        if isinstance(v, float | int) and not isinstance(v, bool)
    ]


# Wrong-typed values for a field holding a number / a string / a list.
_WRONG_FOR_NUMBER: list[Any] = ["30", True, "", [30], {"v": 30}]
_WRONG_FOR_STRING: list[Any] = [5, 2.5, True, ["x"], {"x": 1}]
_WRONG_FOR_LIST: list[Any] = ["sockets", 3, {"a": 1}, [1, 2]]


def broken_cases(seed: int = 0) -> Iterator[BrokenCase]:
    rng = random.Random(seed)
    bases = _bases()
    texts = [_dump(b) for b in bases]

    # 1. truncated anywhere (RFC 8259 §2: an object needs its closing brace)
    for k in range(240):
        t = texts[k % len(texts)]
        cut = rng.randrange(0, len(t) - 2)
        expect = "the file is empty" if not t[:cut].strip() else "not valid JSON at line"
        yield BrokenCase(f"truncated-{k}-at-{cut}", t[:cut], expect)

    # 2. wrong types (strict numbers: "30" is not 30 mA)
    for k in range(260):
        doc = json.loads(texts[k % len(texts)])
        i = rng.randrange(1, len(doc["nodes"]))
        node = doc["nodes"][i]
        fields = [f for f in node if f not in ("id", "parent")]
        f = rng.choice(fields)
        v = node[f]
        if isinstance(v, bool):
            choices: list[Any] = ["yes", 1, None]
        elif isinstance(v, float | int):
            choices = _WRONG_FOR_NUMBER
        elif isinstance(v, list):
            choices = _WRONG_FOR_LIST
        else:
            choices = _WRONG_FOR_STRING
        node[f] = rng.choice(choices)
        yield BrokenCase(
            f"wrong-type-{k}-{node['id']}-{f}", _dump(doc), f"nodes[{i}] ({node['id']})"
        )

    # 3. duplicate node ids
    for k in range(100):
        doc = json.loads(texts[k % len(texts)])
        a, b = rng.sample(range(1, len(doc["nodes"])), 2)
        doc["nodes"][b]["id"] = doc["nodes"][a]["id"]
        yield BrokenCase(f"duplicate-id-{k}", _dump(doc), "duplicate id")

    # 4. cycles: a node made a child of its own child
    free_kinds = {"board", "switch", "fuse", "mcb", "rccb", "rcbo", "cbr"}
    made = 0
    for k in range(400):
        if made >= 100:
            break
        doc = json.loads(texts[k % len(texts)])
        by_id = {n["id"]: n for n in doc["nodes"]}
        pairs = [
            (by_id[n["parent"]], n)
            for n in doc["nodes"]
            if n.get("parent") in by_id
            and n["kind"] in free_kinds
            and by_id[n["parent"]]["kind"] in free_kinds
        ]
        if not pairs:
            continue
        up, down = rng.choice(pairs)
        up["parent"] = down["id"]
        made += 1
        yield BrokenCase(f"cycle-{k}-{up['id']}-{down['id']}", _dump(doc), "cycle")

    # 5. huge numbers and 6. NaN / Infinity (RFC 8259 §6: not permitted in JSON)
    raws = [
        ("1e400", "too large"),
        ("-1e999", "too large"),
        ("1" + "0" * 60, "more than 40 digits"),
        ("NaN", "not allowed"),
        ("Infinity", "not allowed"),
        ("-Infinity", "not allowed"),
    ]
    for k in range(240):
        doc = json.loads(texts[k % len(texts)])
        i, f = rng.choice(_numeric_fields(doc))
        doc["nodes"][i][f] = TOKEN
        raw, expect = raws[k % len(raws)]
        yield BrokenCase(f"number-{k}-{raw[:8]}", _dump(doc, raw), expect)
    for k in range(30):  # finite but far outside every band
        doc = json.loads(texts[k % len(texts)])
        i, f = rng.choice(_numeric_fields(doc))
        doc["nodes"][i][f] = 1e300
        yield BrokenCase(f"number-1e300-{k}", _dump(doc), f"nodes[{i}]")

    # 7. deep nesting
    for k, depth in enumerate([50, 1_000, 10_000, 100_000, 1_000_000]):
        yield BrokenCase(f"deep-top-{depth}", b"[" * depth + b"]" * depth, None)
        doc = json.loads(texts[k % len(texts)])
        doc["nodes"][1]["label"] = TOKEN
        raw = "[" * depth + "]" * depth
        yield BrokenCase(f"deep-field-{depth}", _dump(doc, raw), None)
    for k in range(40):
        depth = rng.choice([200_000, 500_000])
        yield BrokenCase(f"deep-open-{k}", b'{"a":' * depth, None)

    # 8. not UTF-8 (RFC 8259 §8.1: JSON text exchanged between systems is UTF-8)
    for k in range(110):
        t = bytearray(texts[k % len(texts)])
        pos = rng.randrange(0, len(t))
        bad = rng.choice([b"\xff", b"\xc3\x28", b"\xa0\xa1", b"\xe2\x28\xa1", b"\xf0\x28\x8c\xbc"])
        t[pos:pos] = bad
        yield BrokenCase(f"not-utf8-{k}", bytes(t), "not UTF-8")
    latin = (
        json.dumps(bases[0], ensure_ascii=False)
        .replace("Supply intake", "Zähler")
        .encode("latin-1", "replace")
    )
    yield BrokenCase("latin-1-file", latin, "not UTF-8")
    yield BrokenCase("utf-16-file", texts[0].decode().encode("utf-16"), "not UTF-8")

    # 9. not a site file, or from a newer tripwise
    others: list[tuple[bytes, str]] = [
        (b"[]", "not a tripwise site file"),
        (b'"tripwise.site"', "not a tripwise site file"),
        (b"42", "not a tripwise site file"),
        (b"null", "not a tripwise site file"),
        (b"{}", "not a tripwise site file"),
        (b'{"format": "something.else", "version": 1}', "not a tripwise site file"),
        (b'{"name": "a package manifest", "version": "1.0.0"}', "not a tripwise site file"),
        (b"<html><body>not json</body></html>", "not valid JSON"),
        (b"", "the file is empty"),
        (b"   \n\n", "the file is empty"),
        (b"\x00" * 100, "not valid JSON"),
        (b"PK\x03\x04" + bytes(range(256)), "not UTF-8"),
    ]
    for k, (data, expect) in enumerate(others):
        yield BrokenCase(f"other-{k}", data, expect)
    for version in [FORMAT_VERSION + 1, FORMAT_VERSION + 2, 99, 10**6]:
        doc = json.loads(texts[0])
        doc["version"] = version
        yield BrokenCase(f"newer-{version}", _dump(doc), "newer than this tripwise")
    for k, version in enumerate(["1", 1.0, None, True, -1]):
        doc = json.loads(texts[0])
        doc["version"] = version
        expect = "not a known version" if version == -1 else "version"
        yield BrokenCase(f"bad-version-{k}", _dump(doc), expect)

    # 10. duplicate keys (RFC 8259 §4: names SHOULD be unique; we refuse them)
    for k in range(30):
        t = texts[k % len(texts)].decode()
        t = t.replace('"kind": ', '"label": "again",\n      "kind": ', 1 + k % 3).replace(
            '"label": "again",\n      "kind": ', '"id": "again",\n      "kind": ', 1
        )
        yield BrokenCase(f"duplicate-key-{k}", t.encode(), "appears twice")

    # 11. control characters in ids and keys must not break the one-line message
    for k, bad in enumerate(["a\nb", "x\r\ny", "\x1b[31mred", "tab\there", "nul\x00"]):
        doc = json.loads(texts[1])
        doc["nodes"][2]["id"] = bad
        yield BrokenCase(f"control-id-{k}", _dump(doc), "nodes[2]")
        doc = json.loads(texts[1])
        doc["nodes"][2][bad] = 1
        yield BrokenCase(f"control-key-{k}", _dump(doc), "is not allowed here")

    # 12. random damage: bytes flipped, deleted or swapped (may stay valid)
    for k in range(160):
        t = bytearray(texts[k % len(texts)])
        for _ in range(rng.randint(1, 4)):
            pos = rng.randrange(0, len(t))
            op = rng.random()
            if op < 0.4:
                t[pos] = rng.randrange(0, 256)
            elif op < 0.7:
                del t[pos]
            else:
                t[pos:pos] = bytes([rng.choice(b'{}[]",:0123456789-.eE ntfalsu\\')])
        yield BrokenCase(f"random-damage-{k}", bytes(t), None)

    # 13. readings that break the tree rules
    doc = json.loads(texts[2])
    doc["visits"][-1]["readings"]["no-such-device"] = {"x1_0": 20.0}
    yield BrokenCase("reading-unknown-device", _dump(doc), "no node with id 'no-such-device'")
    doc = json.loads(texts[2])
    mcb = next(n["id"] for n in doc["nodes"] if n["kind"] == "mcb")
    doc["visits"][-1]["readings"][mcb] = {"x1_0": 20.0}
    yield BrokenCase("reading-on-mcb", _dump(doc), "not a mcb")
    doc = json.loads(texts[2])
    doc["nodes"].append({"id": "o2", "kind": "origin"})
    yield BrokenCase("two-origins", _dump(doc), "exactly one origin")
    doc = json.loads(texts[2])
    doc["nodes"][3]["parent"] = "nowhere"
    yield BrokenCase("unknown-parent", _dump(doc), "unknown parent 'nowhere'")
    doc = json.loads(texts[2])
    doc["code"] = "__import__('os').system('touch /tmp/tripwise-pwned')"
    yield BrokenCase("code-is-only-text", _dump(doc), "field 'code' is not allowed here")
