"""Dialogs over any screen: one question with a text answer."""

from __future__ import annotations

from typing import Callable

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.suggester import SuggestFromList
from textual.widgets import Input

from ..safetext import shown
from .look import Label
from .page import AppAccess

__all__ = ["AskScreen"]


class AskScreen(AppAccess, ModalScreen):
    """One question with a text answer; Enter answers, Escape cancels."""

    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, question: str, *, value: str = "", placeholder: str = "", suggestions: list[str] | None = None,
                 on_answer: Callable[[str], None] | None = None) -> None:
        super().__init__()
        self.question = question
        self.value, self.placeholder = shown(value, one_line=True), shown(placeholder, one_line=True)
        self.suggestions = [shown(x, one_line=True) for x in suggestions] if suggestions else suggestions
        self.on_answer = on_answer

    def compose(self) -> ComposeResult:
        with Vertical(id="ask-box"):
            yield Label(self.question, id="ask-question")
            suggester = SuggestFromList(self.suggestions, case_sensitive=False) if self.suggestions else None
            yield Input(value=self.value, placeholder=self.placeholder, suggester=suggester, id="ask-input")
            yield Label("Enter answers · → accepts the grey completion · Escape cancels", classes="hint")

    def on_mount(self) -> None:
        self.query_one(Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.dismiss(event.value)
        if self.on_answer:
            self.on_answer(event.value)

    def action_cancel(self) -> None:
        self.mynet_app.status_text = "Cancelled; nothing changed."
        self.dismiss(None)
