"""Every text field keeps the keys of a burst in order (Textual runs a field's bindings late; OrderedInput does not)."""

from __future__ import annotations

import ast
from pathlib import Path

import pytest
from halosift.tui.inputs import OrderedInput
from textual.app import App, ComposeResult
from textual.widgets import Input
from tui_helpers import async_test, burst

TUI = Path(__file__).resolve().parents[1] / "tui"


class _OneField(App[None]):
    def __init__(self, field: type[Input]) -> None:
        super().__init__()
        self.field = field

    def compose(self) -> ComposeResult:
        yield self.field(value="107", select_on_focus=False)


@pytest.mark.parametrize(("keys", "expected"), [
    (("end", "backspace", "backspace", "7", "0"), "170"),
    (("home", "delete", "9", "end", "backspace", "5"), "905"),
    (("end", "left", "backspace", "4"), "147"),
])
@async_test
async def test_a_burst_of_keys_edits_in_the_order_typed(keys, expected):
    app = _OneField(OrderedInput)
    async with app.run_test() as pilot:
        await pilot.pause()
        await burst(pilot, *keys)
        await pilot.pause(0.2)
        assert app.query_one(Input).value == expected


@async_test
async def test_a_plain_textual_field_reorders_the_same_burst():
    """Why OrderedInput exists: without it the backspaces land after the digits typed after them."""
    app = _OneField(Input)
    async with app.run_test() as pilot:
        await pilot.pause()
        await burst(pilot, "end", "backspace", "backspace", "7", "0")
        await pilot.pause(0.2)
        assert app.query_one(Input).value != "170"


def test_the_app_makes_its_text_fields_from_ordered_input_only():
    """The class of error: any field made from Textual's Input directly would lose keys in a burst again."""
    offenders = []
    for path in sorted(TUI.glob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.Call) and isinstance(node.func, ast.Name) and node.func.id == "Input":
                offenders.append(f"{path.name}:{node.lineno}")
            if isinstance(node, ast.ClassDef) and any(isinstance(b, ast.Name) and b.id == "Input" for b in node.bases):
                if path.name != "inputs.py":
                    offenders.append(f"{path.name}:{node.lineno} class {node.name}")
    assert offenders == []
