"""Sessions: marks, sort, filters, view and conditions come back when a library is opened again."""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from halosift.tui import session as sessions
from halosift.tui.app import HalosiftApp
from halosift.tui.filters import FilterSpec, SortSpec
from tui_helpers import QX_ROWS, async_test, settle, write_library

from halosift import engine

SIZE = (120, 40)


@pytest.fixture()
def session_dir(tmp_path, monkeypatch) -> Path:
    folder = tmp_path / "sessions"
    monkeypatch.setenv(sessions.SESSION_ENV, str(folder))
    return folder



async def change_everything(pilot) -> None:
    """Mark two rows, sort by Br2 % (largest first), filter to selective, warm the bromination, show more columns."""
    app = pilot.app
    await settle(pilot)
    await pilot.press("space", "space")
    app.sort = SortSpec("br2_major_pct", True)
    app.filters = FilterSpec(verdicts=frozenset({"selective"}))
    app.conditions = engine.Conditions(br2_temp_c=60.0, cl2_solvent="benzene", cl2_solvent_molar=4.0)
    await pilot.press("o")
    await settle(pilot)


@async_test
async def test_state_is_restored_on_reopening(tmp_path, session_dir):
    path = write_library(tmp_path)
    app = HalosiftApp(str(path))
    async with app.run_test(size=SIZE) as pilot:
        await change_everything(pilot)
        marked = app.marked.copy()
        await pilot.press("q")
    files = list(session_dir.glob("*.json"))
    assert len(files) == 1 and not list(session_dir.glob("*.tmp"))

    again = HalosiftApp(str(path))
    async with again.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert (again.marked == marked).all() and again.marked.sum() == 2
        assert again.sort == SortSpec("br2_major_pct", True)
        assert again.filters == FilterSpec(verdicts=frozenset({"selective"}))
        assert again.conditions == engine.Conditions(br2_temp_c=60.0, cl2_solvent="benzene", cl2_solvent_molar=4.0)
        assert again.frame.attrs["conditions"] == again.conditions
        assert again.show_more_columns
        assert set(again.frame.iloc[again.query_one("#table").rows]["verdict"]) == {"selective"}
        # N starts fresh (marks can be brought back with z).
        await pilot.press("N")
        await settle(pilot)
        assert not again.marked.any() and again.sort == SortSpec() and again.filters == FilterSpec()
        assert again.conditions == engine.Conditions() and not again.show_more_columns
        await pilot.press("z")
        assert (again.marked == marked).all()


@async_test
async def test_fresh_flag_ignores_and_replaces_the_saved_session(tmp_path, session_dir):
    path = write_library(tmp_path)
    app = HalosiftApp(str(path))
    async with app.run_test(size=SIZE) as pilot:
        await change_everything(pilot)
        await pilot.press("q")
    fresh = HalosiftApp(str(path), fresh=True)
    async with fresh.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert not fresh.marked.any() and fresh.sort == SortSpec() and fresh.conditions == engine.Conditions()
        await pilot.press("q")
    later = HalosiftApp(str(path))
    async with later.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert not later.marked.any() and later.filters == FilterSpec()


@async_test
async def test_a_damaged_session_is_ignored_with_a_note(tmp_path, session_dir):
    path = write_library(tmp_path)
    session_dir.mkdir(parents=True)
    sessions.path_for(sessions.library_key(path)).write_text('{"version": 1, "n_rows": 14, "marked": "!!"', encoding="utf-8")
    app = HalosiftApp(str(path))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert app.phase == "ready" and not app.marked.any()
        notes = [n.message for n in app._notifications]
        assert any("saved session is damaged" in n and "ignored" in n for n in notes), notes
        assert all("\n" not in n for n in notes)


@async_test
async def test_an_edited_library_does_not_get_the_old_marks(tmp_path, session_dir):
    path = write_library(tmp_path)
    app = HalosiftApp(str(path))
    async with app.run_test(size=SIZE) as pilot:
        await change_everything(pilot)
        await pilot.press("q")
    rows = list(reversed(QX_ROWS))  # same rows, new order: marks by position would now be wrong
    pd.DataFrame(rows, columns=["id", "smiles"]).to_csv(path, index=False)
    os.utime(path, ns=(1, 1))
    again = HalosiftApp(str(path))
    async with again.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert not again.marked.any() and again.sort == SortSpec()


def test_encode_decode_round_trip_and_damage():
    marked = np.zeros(21, dtype=bool)
    marked[[0, 7, 20]] = True
    saved = sessions.Session(21, marked, SortSpec("\x00row", True),
                             FilterSpec(verdicts=frozenset({"by-symmetry"}), min_br2_pct=50.0, max_products=3, text="QX"),
                             "shortlist", {"br2_temp_c": 60.0}, True, False)
    back = sessions.decode(sessions.encode(saved))
    assert (back.marked == marked).all() and back.sort == saved.sort and back.filters == saved.filters
    assert back.view == "shortlist" and back.conditions == {"br2_temp_c": 60.0} and back.show_input_columns
    for text in ("", "[]", '{"version": 99}', sessions.encode(saved).replace('"n_rows": 21', '"n_rows": 40')):
        with pytest.raises(ValueError):
            sessions.decode(text)
    with pytest.raises(ValueError, match="absolute zero"):
        sessions.restore_conditions({"br2_temp_c": -400.0})
    with pytest.raises(ValueError, match="unknown condition"):
        sessions.restore_conditions({"oven": 1})


def test_save_is_atomic_and_leaves_no_temp_file(tmp_path):
    saved = sessions.Session(3, np.array([True, False, True]))
    path = sessions.save("abc", saved, tmp_path)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["abc.json"]
    assert (sessions.load("abc", tmp_path).session.marked == saved.marked).all()
    assert path == sessions.path_for("abc", tmp_path)


def test_new_filters_round_trip_and_old_files_still_load():
    marked = np.zeros(3, dtype=bool)
    spec = FilterSpec(flags_has=frozenset({"alkene"}), flags_lacks=frozenset({"cage", "cyclopropane"}),
                      outcomes=frozenset({("br2", "clean"), ("nbs", "mixture")}),
                      confidence=frozenset({"measured", "textbook"}), duplicates="hide")
    back = sessions.decode(sessions.encode(sessions.Session(3, marked, filters=spec)))
    assert back.filters == spec
    # A file written before these filters existed: exactly the old "filters" record.
    old = (
        '{"version": 1, "n_rows": 3, "marked": "AA==", "sort": {"column": null, "descending": false},'
        ' "filters": {"verdicts": ["selective"], "min_br2_pct": null, "max_products": 2, "site_types": [],'
        ' "site_match": "any", "no_new_stereo": false, "text": ""}, "view": "library",'
        ' "conditions": {"br2_temp_c": 60.0}, "show_input_columns": false, "show_more_columns": false}'
    )
    loaded = sessions.decode(old)
    assert loaded.filters == FilterSpec(verdicts=frozenset({"selective"}), max_products=2)
    assert loaded.filters.duplicates == "all" and not loaded.filters.outcomes
    # The conditions record of an old file has no Cl2 phase: it restores with the default phase.
    assert sessions.restore_conditions(loaded.conditions) == engine.Conditions(br2_temp_c=60.0)
    # An unknown duplicate mode is read as "all" rather than failing the whole session.
    odd = sessions.encode(sessions.Session(3, marked, filters=spec)).replace('"hide"', '"sometimes"')
    assert sessions.decode(odd).filters.duplicates == "all"


def test_initial_conditions_explicit_options_win_field_by_field():
    saved = sessions.conditions_record(engine.Conditions(br2_temp_c=100.0, cl2_solvent="benzene",
                                                         cl2_solvent_molar=4.0))
    opening = sessions.initial_conditions(saved, {"br2_temp_c": 60.0})
    cond, note = opening.conditions, opening.note
    assert cond == engine.Conditions(br2_temp_c=60.0, cl2_solvent="benzene", cl2_solvent_molar=4.0) and not note
    assert sessions.initial_conditions(saved, {}).conditions.br2_temp_c == 100.0
    assert sessions.initial_conditions(None, {"threshold_pct": 80.0}) == sessions.OpeningConditions(
        engine.Conditions(threshold_pct=80.0), "")
    # Gas phase does not combine with the saved solvent: the options over the defaults, with a note.
    opening = sessions.initial_conditions(saved, {"cl2_phase": "gas"})
    cond, note = opening.conditions, opening.note
    assert cond == engine.Conditions(cl2_phase="gas") and "do not combine" in note
    opening = sessions.initial_conditions({"br2_temp_c": -500.0}, {"cl2_temp_c": 30.0})
    cond, note = opening.conditions, opening.note
    assert cond == engine.Conditions(cl2_temp_c=30.0) and "not usable" in note


@async_test
async def test_command_line_conditions_win_over_the_saved_session(tmp_path, session_dir):
    path = write_library(tmp_path)
    app = HalosiftApp(str(path))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.conditions = engine.Conditions(br2_temp_c=100.0, cl2_solvent="benzene", cl2_solvent_molar=4.0)
        await settle(pilot)
        await pilot.press("q")
    again = HalosiftApp(str(path), conditions={"br2_temp_c": 60.0, "so2cl2_temp_c": 50.0})
    async with again.run_test(size=SIZE) as pilot:
        await settle(pilot)
        expected = engine.Conditions(br2_temp_c=60.0, so2cl2_temp_c=50.0, cl2_solvent="benzene", cl2_solvent_molar=4.0)
        assert again.conditions == expected and again.frame.attrs["conditions"] == expected
