"""Check boxes and radio buttons whose state reads without colour: [x] / [ ] and (•) / ( )."""

from __future__ import annotations

from textual.content import Content
from textual.widgets import Checkbox, RadioButton


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
