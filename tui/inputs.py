"""Text fields that apply every key in the order it was typed."""

from __future__ import annotations

from textual import events
from textual.widgets import Input


class OrderedInput(Input):
    """An Input that runs its own key bindings (backspace, delete, home, end, arrows…) as each key arrives.

    Textual inserts a typed character as soon as the field receives the key, but runs a
    field's bindings only once the key has bubbled up to the app. In a burst (keys typed
    fast over SSH, or sent in one write) a backspace then lands after the characters typed
    after it: End, Backspace, Backspace, 7, 0 on "107" gave "" instead of "170". Running the
    field's own bindings here keeps the keys in order; everything else goes on as before.
    """

    async def _on_key(self, event: events.Key) -> None:
        for binding in self._bindings.key_to_bindings.get(event.key, ()):
            if binding.priority:
                continue  # the app ran it before the key reached this field
            # As the app would: an action that declines (scrolling a field that cannot scroll)
            # lets the key go on up, to the screen's bindings.
            if await self.app.run_action(binding.action, self):
                event.stop()  # handled here: the app must not run the binding again
                event.prevent_default()
                return
        await super()._on_key(event)
