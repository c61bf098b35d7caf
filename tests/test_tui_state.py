"""The app's state object on its own: transitions, marks and undo, sessions, starting fresh (no app running)."""

from __future__ import annotations

import subprocess
import sys

import numpy as np
import pytest
from halosift.engine import Conditions
from halosift.tui import session as sessions
from halosift.tui.filters import FilterSpec, SortSpec
from halosift.tui.state import UNDO_DEPTH, AppState, RowCounts


class FakeFrame:
    """Stands in for an evaluated frame: the state only asks for its length."""

    def __init__(self, n: int) -> None:
        self.n = n

    def __len__(self) -> int:
        return self.n


def loaded(n: int = 10, conditions: Conditions | None = None) -> AppState:
    state = AppState()
    state.take_library(object(), FakeFrame(n), conditions or Conditions(), RowCounts.of(n, n - 1, 0), first=True)
    return state


def test_importing_the_state_pulls_in_no_ui_library(tmp_path) -> None:
    code = (
        "import sys, halosift.tui.state; "
        "bad = [m for m in ('textual', 'rich') if m in sys.modules]; "
        "print(bad); sys.exit(1 if bad else 0)"
    )
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120, cwd=tmp_path)
    assert proc.returncode == 0, proc.stdout + proc.stderr


def test_sort_and_filters_say_when_they_change() -> None:
    state = loaded()
    assert state.sort == SortSpec()
    assert state.sort_by("br2_major_pct", True)
    assert state.sort == SortSpec("br2_major_pct", True)
    assert not state.sort_by("br2_major_pct", True)  # the same order again: nothing to redo
    spec = FilterSpec(verdicts=frozenset({"selective"}))
    assert state.set_filters(spec) and not state.set_filters(spec)
    assert state.set_search_text("QX-00")
    assert state.filters == FilterSpec(verdicts=frozenset({"selective"}), text="QX-00")
    assert not state.set_search_text("QX-00")


def test_views_cycle_and_unknown_ones_are_refused() -> None:
    state = loaded()
    assert [state.next_view() for _ in range(3)] == ["shortlist", "rejected", "library"]
    assert state.set_view("rejected") and not state.set_view("rejected")
    with pytest.raises(ValueError):
        state.set_view("favourites")
    with pytest.raises(ValueError):
        state.set_phase("paused")


def test_rows_are_shown_once_a_library_is_in() -> None:
    state = AppState()
    assert not state.rows_shown
    state.set_phase("streaming")
    assert not state.rows_shown  # no partial library yet
    state.take_library(object(), FakeFrame(3), Conditions(), RowCounts.of(3, 1, 2), first=True)
    assert state.rows_shown and state.counts == RowCounts(1, 0, 2)


def test_marks_count_and_undo_of_bulk_steps() -> None:
    state = loaded(10)
    assert state.toggle_mark(2) and state.toggle_mark(5)
    assert state.n_marked == 2
    two = state.marked.copy()
    assert state.set_marks(np.arange(10), True, "mark all 10 shown") == 8
    assert state.n_marked == 10
    assert state.set_marks(np.arange(10), True, "again") == 0  # nothing changed: no undo step
    assert state.set_marks(np.array([1, 1, 3]), False, "unmark two") == 2  # a row listed twice changes once
    assert state.n_marked == 8
    step = state.undo_marks()
    assert step is not None and step.what == "unmark two" and state.n_marked == 10
    step = state.undo_marks()
    assert step is not None and step.what == "mark all 10 shown"
    assert (state.marked == two).all() and state.n_marked == 2
    assert state.undo_marks() is None and (state.marked == two).all()


def test_undo_keeps_only_the_last_steps() -> None:
    state = loaded(UNDO_DEPTH + 5)
    for row in range(UNDO_DEPTH + 5):
        state.set_marks(np.array([row]), True, f"mark row {row}")
    assert len(state.undo) == UNDO_DEPTH
    assert state.undo[0].what == "mark row 5"


def test_marks_stay_over_a_resumed_screen_and_reset_for_another_size() -> None:
    state = loaded(6)
    state.toggle_mark(4)
    state.take_library(object(), FakeFrame(6), Conditions(), RowCounts.of(6, 6, 0), first=True)  # resumed
    assert state.marked[4] and state.n_marked == 1
    state.take_library(object(), FakeFrame(8), Conditions(), RowCounts.of(8, 8, 0), first=True)
    assert len(state.marked) == 8 and state.n_marked == 0 and not state.undo


def test_later_partials_keep_the_chosen_conditions() -> None:
    chosen = Conditions(br2_temp_c=60.0)
    state = loaded(4)
    state.set_conditions(chosen)
    state.take_library(object(), FakeFrame(4), Conditions(), RowCounts.of(4, 4, 0), first=False)
    assert state.conditions == chosen and not state.frame_is_current


def test_session_round_trip(tmp_path) -> None:
    state = loaded(12, Conditions(br2_temp_c=60.0, cl2_solvent="benzene", cl2_solvent_molar=4.0))
    state.set_marks(np.array([0, 7, 11]), True, "mark three")
    state.sort_by("br2_major_pct", True)
    state.set_filters(FilterSpec(verdicts=frozenset({"selective"}), min_br2_pct=50.0, duplicates="hide"))
    state.set_view("shortlist")
    state.set_show_more_columns(True)
    sessions.save("k", state.to_session(), tmp_path)
    read = sessions.load("k", tmp_path)
    saved, note = read.session, read.note
    assert saved is not None and note == ""

    again = loaded(12)
    again.restore(saved)
    assert (again.marked == state.marked).all() and again.n_marked == 3
    assert again.marked is not saved.marked  # marks changed later do not reach the saved record
    assert (again.sort, again.filters, again.view) == (state.sort, state.filters, state.view)
    assert again.show_more_columns and not again.show_input_columns
    assert sessions.restore_conditions(saved.conditions) == state.conditions


def test_start_fresh_drops_every_choice_and_undo_brings_the_marks_back() -> None:
    state = loaded(5, Conditions(br2_temp_c=60.0))
    state.set_marks(np.array([1, 2]), True, "mark two")
    state.sort_by("n_products", False)
    state.set_filters(FilterSpec(text="QX"))
    state.set_view("rejected")
    state.set_show_input_columns(True)
    assert state.start_fresh(Conditions(), "start fresh (cleared 2 marks)") == 2
    assert (state.sort, state.filters, state.view) == (SortSpec(), FilterSpec(), "library")
    assert not state.show_input_columns and not state.show_more_columns
    assert state.conditions == Conditions() and state.n_marked == 0
    step = state.undo_marks()
    assert step is not None and step.what == "start fresh (cleared 2 marks)"
    assert state.marked.tolist() == [False, True, True, False, False]


def test_starting_fresh_with_no_marks_leaves_no_undo_step() -> None:
    state = loaded(3)
    assert state.start_fresh(Conditions(), "start fresh") == 0
    assert state.undo_marks() is None
