"""Small modal screens: a one-line prompt, a yes/no question, the key list."""

from __future__ import annotations

from typing import Callable

from textual.app import App, ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, Static

from rigplan.errors import InputError


def _unfocusable(button: Button) -> Button:
    """Buttons answer to the mouse; the keys are the dialog's own."""
    button.can_focus = False
    return button


class PromptScreen(ModalScreen):
    """Ask for one value.  Enter accepts, Escape cancels.

    ``parse`` turns the text into the result (and may commit it); when it
    raises InputError, or OSError (a write that failed: disk full, file
    locked), the message is shown under the field and the text stays as
    typed, ready to retry.
    """

    BINDINGS = [Binding("escape", "cancel", "Cancel", id="prompt.cancel")]

    def __init__(self, title: str, value: str = "", hint: str = "",
                 parse: Callable[[str], object] | None = None, prompt_id: str = "prompt"):
        super().__init__(id=prompt_id)
        self._title = title
        self._value = value
        self._hint = hint
        self._parse = parse

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(self._title, classes="dialog-title", markup=False)
            yield Input(value=self._value, id="prompt-input", select_on_focus=True)
            if self._hint:
                yield Static(self._hint, classes="dialog-hint", markup=False)
            yield Static("", id="prompt-error", classes="dialog-error", markup=False)
            yield Static("Enter: accept   Esc: cancel", classes="dialog-keys", markup=False)

    def on_mount(self) -> None:
        self.query_one(Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        text = event.value
        if self._parse is None:
            self.dismiss(text)
            return
        try:
            result = self._parse(text)
        except (InputError, OSError) as exc:
            self.query_one("#prompt-error", Static).update(
                str(exc) + ("  (not saved: Enter retries, Esc gives up)"
                            if isinstance(exc, OSError) else ""))
            return
        self.dismiss(result)

    def action_cancel(self) -> None:
        self.dismiss(None)


class ConfirmScreen(ModalScreen):
    """A yes/no question: y or Enter for yes, n or Escape for no."""

    BINDINGS = [
        Binding("y,enter", "answer(True)", "Yes", id="confirm.yes"),
        Binding("n,escape", "answer(False)", "No", id="confirm.no"),
    ]

    def __init__(self, question: str, yes: str = "Yes", no: str = "No"):
        super().__init__(id="confirm")
        self._question = question
        self._yes, self._no = yes, no

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(self._question, classes="dialog-title", markup=False)
            with Horizontal(classes="dialog-buttons"):
                yield _unfocusable(Button(f"{self._yes} (y)", id="yes", variant="primary"))
                yield _unfocusable(Button(f"{self._no} (n)", id="no"))

    def on_button_pressed(self, event: Button.Pressed) -> None:
        self.dismiss(event.button.id == "yes")

    def action_answer(self, value: bool) -> None:
        self.dismiss(value)


class QuitScreen(ModalScreen):
    """Unsaved plan edits on quitting: save, discard or stay."""

    BINDINGS = [
        Binding("s", "answer('save')", "Save and quit", id="quit.save"),
        Binding("d", "answer('discard')", "Quit without saving", id="quit.discard"),
        Binding("escape,c", "answer(None)", "Stay", id="quit.stay"),
    ]

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label("The plan has edits not saved to its file.", classes="dialog-title", markup=False)
            with Horizontal(classes="dialog-buttons"):
                yield _unfocusable(Button("Save and quit (s)", id="save", variant="primary"))
                yield _unfocusable(Button("Quit without saving (d)", id="discard", variant="error"))
                yield _unfocusable(Button("Stay (Esc)", id="stay"))

    def on_button_pressed(self, event: Button.Pressed) -> None:
        self.dismiss(None if event.button.id == "stay" else event.button.id)

    def action_answer(self, value) -> None:
        self.dismiss(value)


class HelpScreen(ModalScreen):
    """Every key of the app, by area."""

    BINDINGS = [Binding("escape,q,question_mark,f1", "close", "Close", id="help.close")]

    def __init__(self, sections):
        super().__init__(id="help")
        self._sections = sections

    def compose(self) -> ComposeResult:
        with VerticalScroll(classes="dialog help"):
            yield Label("Keys", classes="dialog-title", markup=False)
            for title, rows in self._sections:
                yield Label(title, classes="help-section", markup=False)
                text = "\n".join(f"  {keys:<16} {what}" for keys, what in rows)
                yield Static(text, classes="help-keys", markup=False)
            yield Static("Esc, q or ? closes this list.", classes="dialog-keys", markup=False)

    def action_close(self) -> None:
        self.dismiss(None)


class ChoiceScreen(ModalScreen):
    """Pick one of a list: arrows and Enter, or Escape to cancel."""

    BINDINGS = [Binding("escape", "cancel", "Cancel", id="choice.cancel")]

    def __init__(self, title: str, choices, choice_id: str = "choice"):
        """``choices``: ``[(key, text)]``; dismisses with the key (None: cancelled)."""
        super().__init__(id=choice_id)
        self._title = title
        self._choices = list(choices)

    def compose(self) -> ComposeResult:
        from textual.widgets import OptionList
        from textual.widgets.option_list import Option
        with Vertical(classes="dialog"):
            yield Label(self._title, classes="dialog-title", markup=False)
            yield OptionList(*[Option(text, id=key) for key, text in self._choices],
                             id="choice-list")
            yield Static("Enter: change   Esc: close", classes="dialog-keys", markup=False)

    def on_mount(self) -> None:
        self.query_one("#choice-list").focus()

    def on_option_list_option_selected(self, event) -> None:
        event.stop()
        self.dismiss(event.option.id)

    def action_cancel(self) -> None:
        self.dismiss(None)


class DamagedLogApp(App):
    """Asked before the app opens on a job whose run log is damaged: set the
    file aside (renamed, every byte kept) and start a new log, or stop.

    ``run()`` returns the path the damaged log was moved to, or None when
    the user said no (the file is then left as it is).
    """

    CSS = """
    Screen { align: center middle; }
    .dialog { width: 90%; max-width: 110; height: auto; border: thick $warning; padding: 1 2; }
    .dialog-buttons { height: auto; }
    """

    def __init__(self, error):
        super().__init__()
        self._error = error

    def on_mount(self) -> None:
        from rigplan.files.runlog import set_aside_damaged
        path = self._error.path
        question = (f"The run log {path} is damaged ({self._error.detail}). Set it aside "
                    f"(renamed to {path.stem}.damaged-<time>.sqlite, nothing deleted) and start "
                    "a new log? The entries it holds are not in the new log; they may be "
                    "recovered later with the sqlite3 tool's .recover command.")

        def answered(yes) -> None:
            if not yes:
                self.exit(None)
                return
            try:
                moved = set_aside_damaged(path)
            except InputError as exc:
                self.exit(None)
                self._failed = exc
                return
            self.exit(moved)

        self.push_screen(ConfirmScreen(question, yes="Set aside, new log", no="Stop"), answered)
