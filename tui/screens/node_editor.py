"""The form for one node: exactly the fields its kind has, checked by the model as you type."""

from __future__ import annotations

from typing import Any

from pydantic import BaseModel
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.message import Message
from textual.widget import Widget
from textual.widgets import Button, Input, Label, Static

from model.rules.ratings import rating_note
from model.site.fields import FieldSpec, check_form, field_specs, typed_value
from model.site.nodes import NODE_CLASSES
from model.site.numbers import number_text
from tui.format import KIND_TITLES
from tui.screens.closing import Dialog
from tui.widgets.choice_row import ChoiceRow
from tui.widgets.flag_list import FlagList
from tui.widgets.tick_box import TickBox

#: The field a node form starts on, new or edited (the id is generated for a new node).
FIRST_FIELD = "label"


class NodeEditorScreen(Dialog[str | None]):
    """Edit (or create) one node; dismisses with its id once the app has accepted it.

    Enter moves to the next field; on the last field it applies the form.  The id of
    an existing node may be changed: the app renames it (children and readings follow).
    """

    BINDINGS = [
        Binding("ctrl+s", "apply", "Apply", priority=True),
        Binding("escape", "cancel", "Cancel"),
    ]

    class Apply(Message):
        """Add (``new``) or change this validated node; the app answers with
        :meth:`NodeEditorScreen.answer`."""

        def __init__(
            self, editor: NodeEditorScreen, node: BaseModel, *, new: bool, old_id: str | None
        ) -> None:
            super().__init__()
            self.editor = editor
            self.node = node
            self.new = new
            #: The node's id before this form (None for a new node).
            self.old_id = old_id

    def __init__(self, values: dict[str, Any], *, new: bool, facts: str = "") -> None:
        super().__init__()
        #: What the analysis says of this device (Zs maximum and required time), shown above.
        self._facts = facts
        self._kind = str(values["kind"])
        self._cls = NODE_CLASSES[self._kind]
        self._values = values
        self._new = new
        #: The id the node had when the form opened (None for a new node).
        self.old_id: str | None = None if new else str(values["id"])
        self._specs = field_specs(self._cls)
        #: The message shown at each field now (empty when the form is valid).
        self.errors: dict[str, str] = {}
        #: True while the app has a node of this form to answer for.
        self._asked = False

    @property
    def specs(self) -> list[FieldSpec]:
        return list(self._specs)

    def compose(self) -> ComposeResult:
        verb = "New" if self._new else "Edit"
        with Vertical(classes="dialog wide", id="node-form"):
            yield Label(
                f"{verb} {KIND_TITLES.get(self._kind, self._kind)}",
                classes="dialog-title",
                markup=False,
            )
            if self._facts:
                yield Static(self._facts, id="form-facts", markup=False)
            yield Static("", id="form-error", classes="field-error", markup=False)
            with VerticalScroll(id="form-fields"):
                for spec in self._specs:
                    with Horizontal(classes="form-row"):
                        unit = f" [{spec.unit}]" if spec.unit else ""
                        need = " *" if spec.required else ""
                        yield Label(f"{spec.title}{unit}{need}", classes="form-label", markup=False)
                        with Vertical(classes="form-cell"):
                            yield self._widget_for(spec)
                            yield Static(
                                "", id=f"err-{spec.name}", classes="field-error", markup=False
                            )
            with Horizontal(classes="dialog-buttons"):
                yield Static(
                    "Enter next field (last: apply) · a letter picks a choice · Space ticks",
                    classes="dialog-hint",
                    markup=False,
                )
                yield Button("Apply (Ctrl+S)", id="apply", variant="primary", compact=True)
                yield Button("Cancel (Esc)", id="cancel", compact=True)

    def _widget_for(self, spec: FieldSpec) -> Widget:
        wid = f"f-{spec.name}"
        value = self._values.get(spec.name, spec.default)
        if spec.kind == "choice":
            return ChoiceRow(
                [(c, c) for c in spec.choices],
                value if value in spec.choices else None,
                optional=spec.optional,
                id=wid,
            )
        if spec.kind == "flag":
            return TickBox(spec.help[:60], value=bool(value), compact=True, id=wid)
        if spec.kind == "flags":
            chosen = set(value or [])
            return FlagList(*[(c, c, c in chosen) for c in spec.choices], id=wid, compact=True)
        if spec.kind == "number":
            # all of the stored value, and whatever is typed kept as typed: the
            # number is read (or refused with the reason) only when the form is checked
            text = "" if value is None else number_text(value)
            return Input(text, placeholder=spec.unit or "number", compact=True, id=wid)
        return Input(
            "" if value is None else str(value),
            placeholder=spec.help[:50],
            compact=True,
            id=wid,
        )

    def on_mount(self) -> None:
        names = [s.name for s in self._specs]
        first = FIRST_FIELD if FIRST_FIELD in names else names[0]
        self.set_focus(self.query_one(f"#f-{first}"))
        self._check()

    def collect(self) -> tuple[dict[str, Any], dict[str, str]]:
        """The form's values as model data, and the fields that could not be read."""
        data: dict[str, Any] = {"kind": self._kind}
        if "parent" in self._values:
            data["parent"] = self._values["parent"]
        bad: dict[str, str] = {}
        # fields the form does not show (a maker's table of rows) are kept as they are
        shown = {spec.name for spec in self._specs} | {"kind", "parent"}
        data.update({k: v for k, v in self._values.items() if k not in shown})
        for spec in self._specs:
            w = self.query_one(f"#f-{spec.name}")
            if isinstance(w, ChoiceRow):
                if w.value is not None:
                    data[spec.name] = w.value
                elif spec.optional:
                    data[spec.name] = None
            elif isinstance(w, TickBox):
                data[spec.name] = w.value
            elif isinstance(w, FlagList):
                data[spec.name] = [c for c in spec.choices if c in w.selected]
            elif isinstance(w, Input):
                try:
                    data[spec.name] = typed_value(spec, w.value)
                except ValueError as exc:
                    bad[spec.name] = str(exc)
        return data, bad

    def _check(self) -> BaseModel | None:
        """Validate the form with the model; show each message at its field."""
        data, bad = self.collect()
        node, errors = check_form(self._cls, data, bad)
        self.errors = errors
        names = {s.name for s in self._specs}
        notes = self._notes(node)
        for spec in self._specs:
            label = self.query_one(f"#err-{spec.name}", Static)
            message = errors.get(spec.name, "")
            note = "" if message else notes.get(spec.name, "")
            label.update(message or note)
            label.set_class(bool(note), "field-note")
            label.display = bool(message or note)
        whole = [v for k, v in errors.items() if k not in names]
        top = self.query_one("#form-error", Static)
        top.update("; ".join(whole))
        top.display = bool(whole)
        return node

    @staticmethod
    def _notes(node: BaseModel | None) -> dict[str, str]:
        """Notes on accepted values (not refusals): a rating that is not a standard one."""
        idn = getattr(node, "idn_ma", None)
        if node is None or idn is None:
            return {}
        note = rating_note(str(getattr(node, "kind", "")), float(idn))
        return {"idn_ma": note} if note else {}

    @on(Input.Changed)
    @on(ChoiceRow.Changed)
    @on(TickBox.Changed)
    @on(FlagList.SelectedChanged)
    def _changed(self) -> None:
        self._check()

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        """Enter moves to the next field; on the last field it applies the form."""
        event.stop()
        if event.input is self.query_one(f"#f-{self._specs[-1].name}"):
            self.action_apply()
        else:
            self.focus_next()

    @on(Button.Pressed, "#apply")
    def action_apply(self) -> None:
        if self._asked:
            return  # the app has not answered the last one yet
        node = self._check()
        if node is None:
            self.app.bell()
            return
        self._asked = True
        self.app.post_message(self.Apply(self, node, new=self._new, old_id=self.old_id))

    def answer(self, node_id: str | None, problem: str | None) -> None:
        """The app's answer to :class:`Apply`: close on the node, or show why it was refused.

        ``node_id`` None and no problem: not applied (the user declined); the form stays.
        """
        self._asked = False
        if node_id is None and not problem:
            return
        if problem:
            top = self.query_one("#form-error", Static)
            top.update(problem)
            top.display = True
            self.app.bell()
            return
        self.dismiss(node_id)

    @on(Button.Pressed, "#cancel")
    def action_cancel(self) -> None:
        self.dismiss(None)
