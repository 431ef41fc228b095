"""The form for one node: exactly the fields its kind has, checked by the model as you type."""

from __future__ import annotations

from typing import Any

from pydantic import BaseModel
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.message import Message
from textual.screen import ModalScreen
from textual.widget import Widget
from textual.widgets import Button, Checkbox, Input, Label, Select, SelectionList, Static

from model.site.fields import FieldSpec, check_form, field_specs, typed_value
from model.site.nodes import NODE_CLASSES
from model.site.numbers import number_text
from tui.format import KIND_TITLES


class NodeEditorScreen(ModalScreen[str | None]):
    """Edit (or create) one node; dismisses with its id once the app has accepted it."""

    BINDINGS = [
        Binding("ctrl+s", "apply", "Apply", priority=True),
        Binding("escape", "cancel", "Cancel"),
    ]

    class Apply(Message):
        """Add (``new``) or change this validated node; the app answers with
        :meth:`NodeEditorScreen.answer`."""

        def __init__(self, editor: NodeEditorScreen, node: BaseModel, *, new: bool) -> None:
            super().__init__()
            self.editor = editor
            self.node = node
            self.new = new

    def __init__(self, values: dict[str, Any], *, new: bool, facts: str = "") -> None:
        super().__init__()
        #: What the analysis says of this device (Zs maximum and required time), shown above.
        self._facts = facts
        self._kind = str(values["kind"])
        self._cls = NODE_CLASSES[self._kind]
        self._values = values
        self._new = new
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
                yield Button("Apply (ctrl+s)", id="apply", variant="primary")
                yield Button("Cancel (esc)", id="cancel")

    def _widget_for(self, spec: FieldSpec) -> Widget:
        wid = f"f-{spec.name}"
        value = self._values.get(spec.name, spec.default)
        if spec.kind == "choice":
            return Select(
                [(c, c) for c in spec.choices],
                value=value if value in spec.choices else Select.NULL,
                allow_blank=spec.optional or value not in spec.choices,
                prompt="(none)" if spec.optional else "choose…",
                compact=True,
                id=wid,
            )
        if spec.kind == "flag":
            return Checkbox(spec.help[:60], value=bool(value), compact=True, id=wid)
        if spec.kind == "flags":
            chosen = set(value or [])
            return SelectionList[str](
                *[(c, c, c in chosen) for c in spec.choices], id=wid, compact=True
            )
        if spec.kind == "number":
            # all of the stored value, and whatever is typed kept as typed: the
            # number is read (or refused with the reason) only when the form is checked
            text = "" if value is None else number_text(value)
            return Input(text, placeholder=spec.unit or "number", compact=True, id=wid)
        disabled = spec.name == "id" and not self._new
        return Input(
            "" if value is None else str(value),
            placeholder=spec.help[:50],
            compact=True,
            disabled=disabled,
            id=wid,
        )

    def on_mount(self) -> None:
        for spec in self._specs:
            w = self.query_one(f"#f-{spec.name}")
            if w.focusable and not w.disabled:
                self.set_focus(w)
                break
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
            if isinstance(w, Select):
                v = w.value
                if v is not Select.NULL:
                    data[spec.name] = v
                elif spec.optional:
                    data[spec.name] = None
            elif isinstance(w, Checkbox):
                data[spec.name] = w.value
            elif isinstance(w, SelectionList):
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
        for spec in self._specs:
            label = self.query_one(f"#err-{spec.name}", Static)
            message = errors.get(spec.name, "")
            label.update(message)
            label.display = bool(message)
        whole = [v for k, v in errors.items() if k not in names]
        top = self.query_one("#form-error", Static)
        top.update("; ".join(whole))
        top.display = bool(whole)
        return node

    @on(Input.Changed)
    @on(Select.Changed)
    @on(Checkbox.Changed)
    @on(SelectionList.SelectedChanged)
    def _changed(self) -> None:
        self._check()

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        focusables = [
            self.query_one(f"#f-{s.name}")
            for s in self._specs
            if not self.query_one(f"#f-{s.name}").disabled
        ]
        if event.input is focusables[-1]:
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
        self.app.post_message(self.Apply(self, node, new=self._new))

    def answer(self, node_id: str, problem: str | None) -> None:
        """The app's answer to :class:`Apply`: close on the node, or show why it was refused."""
        self._asked = False
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
