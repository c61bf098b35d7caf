"""The app is one class made of topic mixins (tui/app_*.py); Textual's handler rules hold across them.

Textual calls an ``on_<message>`` method once for every class in the app's MRO that defines it,
so a handler written in two of our classes would run twice per message; and it collects ``@on``
handlers only from the classes it builds itself, so those must stay in ``HalosiftApp``.
"""

from __future__ import annotations

from collections import Counter

from halosift.tui.app import HalosiftApp


def _our_classes() -> list[type]:
    return [cls for cls in HalosiftApp.__mro__ if cls.__module__.startswith("halosift.tui.")]


def test_every_message_handler_is_written_once() -> None:
    defined = Counter(name for cls in _our_classes() for name in vars(cls) if name.startswith("on_"))
    assert {name: n for name, n in defined.items() if n > 1} == {}
    assert len(defined) > 5  # the mixins do hold handlers: the check looks at something


def test_decorated_handlers_live_in_the_app_class_itself() -> None:
    assert any(hasattr(value, "_textual_on") for value in vars(HalosiftApp).values())  # the marker is Textual's
    for cls in _our_classes():
        if cls is HalosiftApp:
            continue
        decorated = [name for name, value in vars(cls).items() if hasattr(value, "_textual_on")]
        assert decorated == [], f"{cls.__name__} has @on handlers Textual would not collect: {decorated}"


def test_the_topics_are_mixed_in() -> None:
    names = {cls.__name__ for cls in _our_classes()}
    assert {"ScreeningMixin", "SessionsMixin", "ViewMixin", "MarksMixin", "ExportMixin", "AppBase"} <= names
