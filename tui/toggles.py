"""Check boxes and radio buttons whose state reads without colour: [x] / [ ] and (•) / ( )."""

from __future__ import annotations

from textual import events
from textual.content import Content
from textual.widgets import Checkbox, RadioButton, RadioSet


class TickBox(Checkbox):
    """A check box drawn as [x] when on and [ ] when off."""

    @property
    def _button(self) -> Content:
        return Content.assemble(("[x]" if self.value else "[ ]", self.get_visual_style("toggle--button")))


class ChoiceButton(RadioButton):
    """A radio button drawn as (•) when chosen and ( ) when not."""

    @property
    def _button(self) -> Content:
        return Content.assemble(("(•)" if self.value else "( )", self.get_visual_style("toggle--button")))


class ChoiceSet(RadioSet):
    """A radio set whose keyboard highlight starts on the chosen button each time it gets focus.

    Textual's RadioSet highlights its first button at mount and moves the
    highlight only on a press, so with a later button chosen beforehand an
    arrow key would step from the wrong place.
    """

    def _on_focus(self, event: events.Focus) -> None:
        if self.pressed_index >= 0:
            self._selected = self.pressed_index
