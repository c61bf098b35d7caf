"""The conditions panel applies only complete, valid values, keeps every key of a fast burst and keeps focus."""

from __future__ import annotations

import pytest
from halosift.tui.app import HalosiftApp
from halosift.tui.conditions import ConditionsScreen, read_fields
from halosift.tui.table import LibraryTable
from tui_helpers import async_test, burst, plain, settle, write_library

from halosift import engine

SIZE = (100, 30)




async def open_panel(pilot) -> ConditionsScreen:
    await settle(pilot)
    await pilot.press("t")
    await pilot.pause()
    screen = pilot.app.screen
    assert isinstance(screen, ConditionsScreen)
    return screen


async def focus_field(pilot, screen: ConditionsScreen, input_id: str) -> None:
    """Tab to a field, as the chemist would."""
    for _ in range(16):
        if pilot.app.focused is not None and pilot.app.focused.id == input_id:
            return
        await pilot.press("tab")
    raise AssertionError(f"Tab never reached {input_id}")


@async_test
async def test_fast_burst_loses_no_key_and_applies_on_enter(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_panel(pilot)
        await focus_field(pilot, screen, "cond-br2")
        assert screen.query_one("#cond-br2").value == "125"
        # One burst, as a terminal delivers keys typed fast: no key waits for the one before.
        await burst(pilot, "end", "backspace", "backspace", "backspace", "7", "0", "enter")
        await settle(pilot)
        assert screen.query_one("#cond-br2").value == "70"
        assert app.conditions.br2_temp_c == 70.0
        assert app.frame.attrs["conditions"] == app.conditions
        assert "Br2 70 °C" in plain(app.query_one("#settings"))
        # Again, ending with Tab instead of Enter: leaving the field applies it.
        await focus_field(pilot, screen, "cond-br2")
        await burst(pilot, "end", "backspace", "backspace", "6", "5", "tab")
        await settle(pilot)
        assert app.conditions.br2_temp_c == 65.0


@async_test
async def test_values_apply_only_when_complete_and_valid(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_panel(pilot)
        before = app.conditions
        threshold = screen.query_one("#cond-threshold")
        await focus_field(pilot, screen, "cond-threshold")
        # Typed but not submitted: pending, not applied.
        await pilot.press("end", "backspace", "backspace", "8", "0")
        await settle(pilot)
        assert app.conditions == before
        note = plain(screen.query_one("#cond-note"))
        assert "Pending: clean threshold 80 %" in note and f"threshold {before.threshold_pct:g} %" in note
        assert threshold.has_class("-pending")
        # Cleared and 101 typed: refused, the header and the table keep the applied threshold.
        await pilot.press("end", "backspace", "backspace", "1", "0", "1", "enter")
        await settle(pilot)
        assert app.conditions == before
        note = plain(screen.query_one("#cond-note"))
        assert "✗ Not applied" in note and "not a percentage" in note
        assert threshold.has_class("-refused")
        assert f"threshold {before.threshold_pct:g} %" in plain(app.query_one("#settings"))
        assert app.frame.attrs["conditions"] == before
        # An impossible Cl2 temperature is refused too, even when leaving the field, and nothing of it applies.
        await focus_field(pilot, screen, "cond-cl2")
        await pilot.press("end", "backspace", "backspace", "minus", "3", "0", "0", "tab")
        await settle(pilot)
        assert app.conditions == before
        assert "absolute zero" in plain(screen.query_one("#cond-note"))
        # Esc closes; the refused values are dropped and reopening shows the applied ones.
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, ConditionsScreen)
        screen = await open_panel(pilot)
        assert screen.query_one("#cond-cl2").value == f"{before.cl2_temp_c:g}"
        assert screen.query_one("#cond-threshold").value == f"{before.threshold_pct:g}"


@async_test
async def test_focus_stays_in_the_panel_until_it_closes(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_panel(pilot)
        seen = []
        for _ in range(10):
            await pilot.press("tab")
            focused = app.focused
            assert focused is not None and focused.screen is screen, "Tab left the panel"
            seen.append(focused.id)
        assert {"cond-cl2", "cond-phase", "cond-solvent", "cond-br2", "cond-so2cl2", "cond-nbs", "cond-threshold"} <= set(seen)
        # Shift+Tab from the first field wraps to the last.
        await focus_field(pilot, screen, "cond-cl2")
        await pilot.press("shift+tab")
        assert app.focused.id == "cond-threshold"
        # A letter typed while the panel is open never reaches the table (no sort).
        await pilot.press("s")
        await settle(pilot)
        assert app.sort.column is None
        await pilot.press("escape")
        await pilot.pause()
        assert isinstance(app.focused, LibraryTable)


@async_test
async def test_cl2_solvent_and_concentration(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_panel(pilot)
        molar = screen.query_one("#cond-molar")
        assert molar.disabled  # no solvent: no concentration to give
        await focus_field(pilot, screen, "cond-solvent")
        await pilot.press("right", "enter")  # benzene
        await settle(pilot)
        assert app.conditions.cl2_solvent == "benzene" and app.conditions.cl2_solvent_molar == 0.0
        assert not molar.disabled
        await focus_field(pilot, screen, "cond-molar")
        await pilot.press("end", "backspace", "4", "enter")
        await settle(pilot)
        assert app.conditions.cl2_solvent_molar == 4.0
        expected = engine.Conditions(cl2_solvent="benzene", cl2_solvent_molar=4.0)
        assert app.conditions == expected
        # Beyond the pure solvent: refused with the engine's reason.
        await pilot.press("end", "backspace", "9", "9", "enter")
        await settle(pilot)
        assert app.conditions.cl2_solvent_molar == 4.0
        assert "outside" in plain(screen.query_one("#cond-note"))


@pytest.mark.parametrize(
    ("texts", "field", "reason"),
    [
        ({"threshold_pct": ""}, "threshold_pct", "is empty"),
        ({"threshold_pct": "1o"}, "threshold_pct", "is not a number"),
        ({"threshold_pct": "nan"}, "threshold_pct", "not a percentage"),
        ({"br2_temp_c": "inf"}, "br2_temp_c", "beyond any model"),
        ({"nbs_temp_c": "-273.15"}, "nbs_temp_c", "absolute zero"),
    ],
)
def test_read_fields_names_the_field_at_fault(texts, field, reason):
    applied = engine.Conditions()
    base = {"cl2_temp_c": "25", "cl2_solvent_molar": "0", "br2_temp_c": "125", "nbs_temp_c": "77", "threshold_pct": "90"}
    proposal = read_fields({**base, **texts}, "none", applied)
    assert proposal.conditions is None
    assert list(proposal.errors) == [field] and reason in proposal.errors[field]


def test_read_fields_gives_the_engine_conditions():
    applied = engine.Conditions()
    texts = {"cl2_temp_c": "40", "cl2_solvent_molar": "8", "br2_temp_c": "125", "nbs_temp_c": "77", "threshold_pct": "90"}
    proposal = read_fields(texts, "cs2", applied)
    assert proposal.conditions == engine.Conditions(cl2_temp_c=40.0, cl2_solvent="cs2", cl2_solvent_molar=8.0)
    assert set(proposal.pending) == {"cl2_temp_c", "cl2_solvent", "cl2_solvent_molar"}


@async_test
async def test_so2cl2_temperature_and_cl2_phase_in_one_fast_burst(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_panel(pilot)
        before = app.conditions
        await focus_field(pilot, screen, "cond-cl2")
        width = len(screen.query_one("#cond-cl2").value)
        # One burst with no pause: Cl2 to 140 °C, Tab to the phase, choose gas, Tab on through the solvent
        # and the concentration to Br2 and SO2Cl2, set SO2Cl2 to 60 °C and press Enter.
        so2cl2_width = len(screen.query_one("#cond-so2cl2").value)
        keys = ["end", *["backspace"] * width, "1", "4", "0", "tab", "left", "enter", "tab", "tab", "tab",
                "end", *["backspace"] * so2cl2_width, "6", "0", "enter"]
        await pilot.press(*keys)
        await settle(pilot)
        assert app.focused.id == "cond-so2cl2" and app.focused.screen is screen
        assert screen.query_one("#cond-so2cl2").value == "60"
        assert app.conditions == engine.Conditions(cl2_temp_c=140.0, cl2_phase="gas", so2cl2_temp_c=60.0,
                                                   br2_temp_c=before.br2_temp_c)
        assert app.frame.attrs["conditions"] == app.conditions
        settings = plain(app.query_one("#settings"))
        assert "Cl2 140 °C gas" in settings
        note = plain(screen.query_one("#cond-note"))
        assert "Applied: Cl2 140 °C gas · Br2" in note and "SO2Cl2 60 °C" in note


@async_test
async def test_a_phase_that_contradicts_the_solvent_is_refused_with_the_reason(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_panel(pilot)
        await focus_field(pilot, screen, "cond-phase")
        await pilot.press("right", "enter")  # solution, but no solvent chosen yet
        await settle(pilot)
        assert app.conditions == engine.Conditions()
        assert "needs a solvent" in plain(screen.query_one("#cond-note"))
        assert screen.query_one("#cond-phase").has_class("-refused")
        await focus_field(pilot, screen, "cond-solvent")
        await pilot.press("right", "enter")  # benzene: now the set is whole
        await focus_field(pilot, screen, "cond-molar")
        await pilot.press("end", "backspace", "4", "enter")
        await settle(pilot)
        assert app.conditions == engine.Conditions(cl2_phase="solution", cl2_solvent="benzene", cl2_solvent_molar=4.0)
        assert not screen.query_one("#cond-phase").has_class("-refused")
        assert "Cl2 25 °C solution in 4 M benzene" in plain(app.query_one("#settings"))
        # Gas with a solvent is refused; the applied set stays.
        await focus_field(pilot, screen, "cond-phase")
        await pilot.press("left", "left", "enter")
        await settle(pilot)
        assert app.conditions.cl2_phase == "solution"
        assert "not gas" in plain(screen.query_one("#cond-note"))
        await pilot.press("escape")
        await pilot.pause()
        assert isinstance(app.focused, LibraryTable) and app.conditions.cl2_phase == "solution"


def test_read_fields_takes_the_phase():
    applied = engine.Conditions()
    texts = {"cl2_temp_c": "25", "cl2_solvent_molar": "0", "br2_temp_c": "125", "so2cl2_temp_c": "80",
             "nbs_temp_c": "77", "threshold_pct": "90"}
    proposal = read_fields(texts, "none", applied, "gas")
    assert proposal.conditions == engine.Conditions(cl2_phase="gas", so2cl2_temp_c=80.0)
    assert "cl2_phase" in proposal.pending
    refused = read_fields(texts, "benzene", applied, "gas")
    assert refused.conditions is None and "not gas" in refused.errors["cl2_phase"]


def test_read_fields_refuses_a_hot_liquid_and_an_empty_solution_with_the_engine_reason():
    # Conditions.validate's bounds (engine.conditions): a neat liquid above 200 °C, a solution at 0 M.
    applied = engine.Conditions()
    texts = {"cl2_temp_c": "1000", "cl2_solvent_molar": "0", "br2_temp_c": "125", "so2cl2_temp_c": "70",
             "nbs_temp_c": "77", "threshold_pct": "90"}
    hot = read_fields(texts, "none", applied)
    assert hot.conditions is None and "neat liquid" in hot.errors["cl2_temp_c"]
    assert read_fields(texts, "none", applied, "gas").conditions == engine.Conditions(cl2_temp_c=1000.0, cl2_phase="gas")
    empty = read_fields({**texts, "cl2_temp_c": "25"}, "benzene", applied, "solution")
    assert empty.conditions is None and any("above 0 M" in e for e in empty.errors.values())
    nbs = read_fields({**texts, "cl2_temp_c": "25", "nbs_temp_c": "400"}, "none", applied)
    assert nbs.conditions is None and "NBS" in nbs.errors["nbs_temp_c"]
