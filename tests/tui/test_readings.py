"""Reading entry by digits, Enter and the did-not-trip key; flags as values are typed."""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import pytest

from model.rules.entry import ENTRY_ORDER
from model.site.terms import DID_NOT_TRIP
from model.storage.sites import load_site
from tui.app.shell import TripwiseApp, make_app
from tui.screens.readings import ReadingScreen
from tui.screens.start_visit import StartVisitScreen
from tui.widgets.reading_pad import DID_NOT_TRIP_KEY

N = DID_NOT_TRIP_KEY


def keys_for(values: list[str]) -> list[str]:
    """The key presses that enter one value per field (digits then Enter; 'n' alone)."""
    out: list[str] = []
    for v in values:
        if v == N:
            out.append(N)
        elif v in ("w", "f"):
            out.append(v)
        else:
            out.extend([*v, "enter"])
    return out


async def _open_readings(app: TripwiseApp, pilot, device: str) -> ReadingScreen:  # type: ignore[no-untyped-def]
    app.main.select(device)
    await pilot.press("r")
    if isinstance(app.screen, StartVisitScreen):
        await pilot.press("enter", *"A. Tester", "enter", *"MFT-1", "enter")
    assert isinstance(app.screen, ReadingScreen)
    return app.screen


async def test_three_devices_by_digits_enter_and_n(oak_lane_no_visits: Path) -> None:
    app = make_app(oak_lane_no_visits)
    async with app.run_test(size=(120, 40)) as pilot:
        screen = await _open_readings(app, pilot, "rc1")
        assert screen.device_id == "rc1"
        visit = app.site.latest_visit()
        assert visit is not None and visit.date == dt.date.today().isoformat()

        # rc1: 30 mA Type A general.  ½× must not trip; 1× at most 300 ms; 5× at most 40 ms.
        await pilot.press(N, N, "3", "2", "0")
        # IEC 61008-1 Table 1: general type, 1 × IΔn, maximum break time 300 ms
        assert screen.bands["x1_0"].startswith("≤ 300 ms")
        assert screen.need["x1_0"] == "required"  # BS 7671 643.7.1: the 1× test is required
        assert screen.need["x5_0"] == "optional"
        assert screen.flags["x1_0"] == "reading.too-slow"
        await pilot.press("enter")
        await pilot.press(*keys_for(["25", "12"]))
        await pilot.press(N)
        # IEC 61008-1 Table 1: a device that does not trip at 5 × IΔn fails
        assert screen.flags["x5_180"] == "reading.no-trip"
        await pilot.press(*keys_for(["24"]), "w", "enter", "enter")
        # next untested RCD in tree order
        assert screen.device_id == "rc2"

        # rc2: 30 mA Type AC general, all within band
        # ramp 22 mA lies in (15, 30] mA: IΔno = 0.5 IΔn to IΔn (IEC 61008-1, sinusoidal)
        await pilot.press(*keys_for([N, N, "28", "31", "11", "12", "22", "w"]), "enter", "enter")
        assert all(flag is None for flag in screen.flags.values())
        assert screen.device_id == "rc3"

        # rc3: 100 mA Type A, type S.  IEC 61008-1 Table 1: S type at 1 × IΔn 130–500 ms
        assert screen.bands["x1_0"].startswith("130–500 ms")
        await pilot.press(*keys_for([N, N, "100"]))
        # 100 ms is under the 130 ms minimum non-actuating time (IEC 61008-1 Table 1)
        assert screen.flags["x1_0"] == "reading.too-fast"
        await pilot.press(*keys_for(["140", "60", "70", "80", "f"]))
        # common practice: a test button that does not trip the device is a failure
        assert screen.flags["button"] == "reading.button-failed"
        await pilot.press("enter", "enter")
        # IEC 61008-1 Table 1: S type at 5 × IΔn 50–150 ms, so 60 and 70 are in band
        assert screen.flags["x5_0"] is None and screen.flags["x5_180"] is None
        assert screen.device_id == "rb1"
        await pilot.press("ctrl+s")
    saved = load_site(oak_lane_no_visits)
    visit = saved.latest_visit()
    assert visit is not None
    r1, r2, r3 = visit.readings["rc1"], visit.readings["rc2"], visit.readings["rc3"]
    assert (r1.half_0, r1.half_180, r1.x1_0, r1.x1_180) == (DID_NOT_TRIP, DID_NOT_TRIP, 320.0, 25.0)
    assert (r1.x5_0, r1.x5_180, r1.ramp_ma, r1.button) == (12.0, DID_NOT_TRIP, 24.0, "worked")
    assert (r2.x1_0, r2.x1_180, r2.x5_0, r2.x5_180, r2.ramp_ma) == (28.0, 31.0, 11.0, 12.0, 22.0)
    assert (r3.x1_0, r3.x1_180, r3.x5_0, r3.x5_180, r3.ramp_ma, r3.button) == (
        100.0,
        140.0,
        60.0,
        70.0,
        80.0,
        "failed",
    )
    assert visit.inspector == "A. Tester" and visit.instrument == "MFT-1"


async def test_keystrokes_per_reading_set(oak_lane_no_visits: Path) -> None:
    app = make_app(oak_lane_no_visits)
    async with app.run_test(size=(120, 40)) as pilot:
        screen = await _open_readings(app, pilot, "rc1")
        values = [N, N, "22", "25", "12", "13", "24", "w"]
        keys = [*keys_for(values), "enter", "enter"]  # keep AC test current, empty note
        await pilot.press(*keys)
        assert screen.device_id == "rc2"
        digits = sum(len(v) for v in values if v.isdigit())
        assert len(keys) <= len(ENTRY_ORDER) + digits
        reading = app.site.latest_visit().readings["rc1"]  # type: ignore[union-attr]
        assert (reading.x1_0, reading.x5_180, reading.button) == (22.0, 13.0, "worked")


async def test_not_tested_with_a_reason(oak_lane_no_visits: Path) -> None:
    app = make_app(oak_lane_no_visits)
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await _open_readings(app, pilot, "rc3")
        await pilot.press("ctrl+t", *"no access", "enter")
        assert screen.device_id == "rb1"
        await pilot.press("ctrl+s")
    reading = load_site(oak_lane_no_visits).latest_visit().readings["rc3"]  # type: ignore[union-attr]
    assert reading.not_tested == "no access" and not reading.has_values()


async def test_header_count_and_units_follow_the_entry(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        await pilot.press("r")  # the one untested device of the sample, RCBO W2
        screen = app.screen
        assert isinstance(screen, ReadingScreen)
        header = screen.query_one("#rd-device").render().plain  # type: ignore[attr-defined]
        assert "1 untested" in header
        await pilot.press("n", "n", "2", "4", "enter")
        header = screen.query_one("#rd-device").render().plain  # type: ignore[attr-defined]
        assert "0 untested" in header
        assert "24 ms" in screen.pad.render().plain  # the unit beside a value once entered


async def test_a_reading_the_session_refuses_is_shown_at_its_field(
    oak_lane: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        screen = await _open_readings(app, pilot, "rb2")  # untested in the sample
        assert app.session is not None

        def full_disk(*_args: object) -> None:
            raise OSError(28, "No space left on device")

        monkeypatch.setattr(app.session, "set_reading", full_disk)
        await pilot.press("n")
        # the form is back on the field it was typed in, with the reason
        assert screen.device_id == "rb2" and screen.pad.current == "half_0"
        assert "No space left" in screen.verdicts["half_0"]
        assert "not recorded" in screen.pad.render().plain
        assert screen.pad.values["half_0"] == DID_NOT_TRIP
        await pilot.press("ctrl+t", *"no access", "enter")
        # refused on the last untested device: the form stays open on it, never
        # closing first as if every device had a reading
        assert app.screen is screen and screen.device_id == "rb2"
        assert not any("Every residual-current device" in n.message for n in app._notifications)
        assert app.screen.pad.current == "not_tested"
        assert "No space left" in app.screen.verdicts["not_tested"]
        assert app.screen.pad.values["not_tested"] == "no access"
        assert app.site.latest_visit().readings.get("rb2") is None  # type: ignore[union-attr]


@pytest.mark.parametrize(
    ("keys", "shown", "says"),
    [
        ("1e3", "1e3", "'1e3' is not a number"),  # not quietly read as 13
        ("-5", "-5", "a trip time must be more than 0 ms (you entered -5)"),  # not 5
        ("99999999", "99999999", "at most 10000 ms (you entered 99999999)"),
        # the ceiling and why: a 'did not trip' is recorded as such, never as a long time
        ("99999", "99999", "at most 10000 ms (you entered 99999); a trip test never runs"),
    ],
)
async def test_a_wrong_value_is_shown_as_typed_and_refused_with_the_reason(
    oak_lane: Path, keys: str, shown: str, says: str
) -> None:
    before = oak_lane.read_bytes()
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await app.settle()
        screen = await _open_readings(app, pilot, "rb2")  # untested in the sample
        screen.pad.go("x1_0")
        await pilot.press(*keys)
        assert screen.pad.values["x1_0"] == shown
        assert says in screen.verdicts["x1_0"]
        assert screen.flags["x1_0"] is None  # refused, never judged against the band
        status = screen.query_one("#rd-status").render().plain  # type: ignore[attr-defined]
        assert " ".join(status.split()).endswith(screen.verdicts["x1_0"])  # whole, not cut
        assert "too slow" not in status
        await pilot.press("enter")
        # the cursor stays on the field, the reason is there, and nothing is recorded
        assert screen.pad.current == "x1_0"
        assert "not recorded" in screen.pad.render().plain
        assert says in screen.verdicts["x1_0"]
        assert app.site.latest_visit().readings.get("rb2") is None  # type: ignore[union-attr]
        await app.settle()
    assert oak_lane.read_bytes() == before


async def test_previous_visit_value_beside_each_field_and_a_second_waveform(
    oak_lane: Path,
) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        app.main.select("rc1")
        await pilot.press("r")
        screen = app.screen
        assert isinstance(screen, ReadingScreen) and screen.device_id == "rc1"
        # the sample's latest visit is 2026-11-14; its earlier one, 2023-05-09, had 21 ms at 1× 0°
        assert screen.previous is not None and screen.previous[0].date == "2023-05-09"
        pad = screen.pad.render().plain
        x1_row = next(line for line in pad.splitlines() if "1× IΔn   0°" in line)
        assert "was 21 ms" in x1_row
        header = screen.query_one("#rd-device").render().plain  # type: ignore[attr-defined]
        assert "AC test current" in header and "2023-05-09" in header
        # a second waveform on the same visit: ^W to half-wave, then 1× at 0°
        await pilot.press("ctrl+w")
        assert screen.page == "half-wave" and screen.pad.values["x1_0"] == ""
        await pilot.press("down", "down", "2", "7", "enter")
        # IEC 61008-1 Type A: a half-wave "1×" test at IΔn need not trip: recorded, not judged
        assert screen.flags["x1_0"] is None
        await app.settle()
        reading = app.site.latest_visit().readings["rc1"]  # type: ignore[union-attr]
        assert reading.x1_0 == 22.0  # the AC result kept
        hw = reading.results_for("half-wave")
        assert hw is not None and hw.x1_0 == 27.0
        # back to AC (^W twice: smooth DC, then AC): the AC values are shown again
        await pilot.press("ctrl+w", "ctrl+w")
        assert screen.page == "AC" and screen.pad.values["x1_0"] == "22"
        await pilot.press("ctrl+s")
    saved = load_site(oak_lane).latest_visit()
    assert saved is not None and saved.readings["rc1"].further[0].x1_0 == 27.0


async def test_a_small_value_is_recorded_exactly_as_typed(oak_lane: Path) -> None:
    """0.001 ms is a number the file accepts: recorded as 0.001, never as 1 or 0001."""
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await app.settle()
        screen = await _open_readings(app, pilot, "rb2")
        screen.pad.go("x1_0")
        await pilot.press(*"0.001")
        assert screen.pad.values["x1_0"] == "0.001"
        await pilot.press("enter")
        await app.settle()
        reading = app.site.latest_visit().readings["rb2"]  # type: ignore[union-attr]
        assert reading.x1_0 == 0.001


async def test_enter_on_a_good_value_goes_to_the_field_that_blocks_the_reading(
    oak_lane: Path,
) -> None:
    before = oak_lane.read_bytes()
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await app.settle()
        screen = await _open_readings(app, pilot, "rb2")  # untested in the sample
        screen.pad.go("x1_180")
        await pilot.press(*"99999")  # refused: a trip test never runs 100 s
        screen.pad.go("x1_0")
        await pilot.press("2", "8", "enter")
        # nothing is recorded while any field is refused; the cursor goes to that field and
        # the good one says why it was not recorded (not a silent "within band")
        assert screen.pad.current == "x1_180"
        assert screen.verdicts["x1_0"].startswith("1 × IΔn, 180° first: ")
        assert "at most 10000 ms" in screen.verdicts["x1_180"]
        status = screen.query_one("#rd-status").render().plain  # type: ignore[attr-defined]
        assert "at most 10000 ms" in " ".join(status.split())
        assert app.site.latest_visit().readings.get("rb2") is None  # type: ignore[union-attr]
        await app.settle()
    assert oak_lane.read_bytes() == before
