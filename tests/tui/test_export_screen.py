"""The export dialog in a tiny host app: choose, see the name, confirm overwrite, write."""

from __future__ import annotations

import shutil
from pathlib import Path

import pypdf
from textual.app import App, ComposeResult
from textual.widgets import Input, Static

from model.reports.heading import STATEMENT
from tui.screens.export import ExportScreen
from tui.widgets.choice_row import ChoiceRow

ROOT = Path(__file__).resolve().parents[2]
SAMPLE = ROOT / "sample_sites" / "oak-lane-house.json"
DATE = "2026-11-14"  # the latest visit of the invented Oak Lane sample
NAME = "oak-lane-house-invented-demo"  # its site name, made safe for a file name

_UNSET = object()


class Host(App[None]):
    def __init__(self, site_path: Path) -> None:
        super().__init__()
        self.site_path = site_path
        self.result: object = _UNSET

    def compose(self) -> ComposeResult:
        yield Static("host")

    def on_mount(self) -> None:
        self.push_screen(ExportScreen(self.site_path), self._done)

    def _done(self, result: Path | None) -> None:
        self.result = result


def _site(tmp: Path) -> Path:
    dest = tmp / "oak lane.json"
    shutil.copyfile(SAMPLE, dest)
    return dest


async def _settle(pilot) -> None:  # type: ignore[no-untyped-def]
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


async def test_writes_the_default_pdf_and_dismisses_with_its_path(tmp_path: Path) -> None:
    app = Host(_site(tmp_path))
    async with app.run_test(size=(110, 40)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, ExportScreen)
        expected = tmp_path / f"{NAME}-remedial-{DATE}.pdf"
        assert screen.query_one("#export-target", Input).value == str(expected)
        await pilot.click("#export-write")
        await _settle(pilot)
        assert app.result == expected
    text = pypdf.PdfReader(expected).pages[0].extract_text()
    assert "".join(STATEMENT.split()) in "".join(text.split())


async def test_choosing_sheet_and_csv_changes_the_name(tmp_path: Path) -> None:
    app = Host(_site(tmp_path))
    async with app.run_test(size=(110, 40)) as pilot:
        await pilot.pause()
        # the form starts on the document; a letter picks, Enter moves to the format
        assert app.screen.focused is app.screen.query_one("#export-kind")
        await pilot.press("t", "enter", "c")
        await pilot.pause()
        expected = tmp_path / f"{NAME}-sheet-{DATE}.csv"
        assert app.screen.query_one("#export-target", Input).value == str(expected)
        await pilot.click("#export-write")
        await _settle(pilot)
        assert app.result == expected
    assert expected.read_bytes().startswith(b"\xef\xbb\xbfdevice,")


async def test_asks_before_overwriting(tmp_path: Path) -> None:
    site = _site(tmp_path)
    existing = tmp_path / f"{NAME}-remedial-{DATE}.pdf"
    existing.write_bytes(b"earlier report")
    app = Host(site)
    async with app.run_test(size=(110, 40)) as pilot:
        await pilot.pause()
        await pilot.click("#export-write")
        await _settle(pilot)
        assert app.result is _UNSET  # still open, asking
        status = app.screen.query_one("#export-status", Static)
        assert "already exists" in str(status.render())
        assert existing.read_bytes() == b"earlier report"
        assert str(app.screen.query_one("#export-write").label) == "Replace (Ctrl+S)"
        # the second press replaces it (by key: the button ignores a click within its
        # 0.2 s press animation, which a test's two clicks fall inside)
        await pilot.press("ctrl+s")
        await _settle(pilot)
        assert app.result == existing
    assert existing.read_bytes().startswith(b"%PDF-")


async def test_own_file_name_and_cancel(tmp_path: Path) -> None:
    site = _site(tmp_path)
    app = Host(site)
    async with app.run_test(size=(110, 40)) as pilot:
        await pilot.pause()
        field = app.screen.query_one("#export-target", Input)
        field.value = "for client.md"
        app.screen.query_one("#export-format").focus()
        await pilot.press("m")  # Markdown; the user's own name is kept
        await pilot.pause()
        assert field.value == "for client.md"
        await pilot.click("#export-write")
        await _settle(pilot)
        assert app.result == tmp_path / "for client.md"
    assert (tmp_path / "for client.md").read_text(encoding="utf-8").startswith("> **This document")

    app = Host(site)
    async with app.run_test(size=(110, 40)) as pilot:
        await pilot.pause()
        await pilot.press("escape")
        await pilot.pause()
        assert app.result is None
    assert sorted(p.name for p in tmp_path.iterdir()) == ["for client.md", "oak lane.json"]


async def test_failure_is_shown_and_nothing_written(tmp_path: Path) -> None:
    app = Host(_site(tmp_path))
    async with app.run_test(size=(110, 40)) as pilot:
        await pilot.pause()
        app.screen.query_one("#export-target", Input).value = str(tmp_path / "no" / "x.pdf")
        await pilot.click("#export-write")
        await _settle(pilot)
        assert app.result is _UNSET
        status = str(app.screen.query_one("#export-status", Static).render())
        assert "Not written" in status and "no such folder" in status
    assert not (tmp_path / "no").exists()


async def test_an_earlier_visit_is_chosen_named_and_said_so(tmp_path: Path) -> None:

    app = Host(_site(tmp_path))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        row = screen.query_one("#export-visit", ChoiceRow)
        assert row.value == DATE  # the latest visit is chosen to begin with
        row.focus()
        await pilot.press("right")  # the next (earlier) visit
        await pilot.pause()
        assert row.value == "2023-05-09"
        expected = tmp_path / f"{NAME}-remedial-2023-05-09.txt"
        screen.query_one("#export-format", ChoiceRow).value = "txt"
        await pilot.pause()
        assert screen.query_one("#export-target", Input).value == str(expected)
        screen.action_write()
        await _settle(pilot)
        assert app.result == expected
    text = expected.read_text(encoding="utf-8")
    assert "Visit date  2023-05-09" in text
    assert "a later visit (2026-11-14) exists" in " ".join(text.split())


async def test_fits_and_works_at_80x24(tmp_path: Path) -> None:
    """At 80×24 the buttons are on screen, the keys are shown, and Space on the
    file name (reached by Shift+Tab from the buttons) types a space, never wipes it."""
    app = Host(_site(tmp_path))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        whole = screen.region
        for bid in ("#export-write", "#export-cancel"):
            region = screen.query_one(bid).region
            assert region.area > 0 and whole.contains_region(region), bid
        keys = str(screen.query_one("#export-keys").render())
        assert "Ctrl+S write" in keys and "Esc cancel" in keys
        assert "Ctrl+S" in str(screen.query_one("#export-write").label)
        field = screen.query_one("#export-target", Input)
        before = field.value
        screen.query_one("#export-write").focus()
        await pilot.press("shift+tab")
        assert screen.focused is field
        await pilot.press("space")
        assert field.value == before + " "  # typed at the end, the path kept
