"""Pop-up screens: keys and equations, cautions, file name prompt, unsaved-edits question, load errors."""

from __future__ import annotations

from pathlib import Path
from typing import ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, Static

from ..cautions import CAUTIONS, DOSE_CAUTIONS, INCREASE_CAUTION
from ..sources import cited_keys, full_citation, load_sources, resolve
from .text_box import TextBox

__all__ = ["AskPath", "CautionsScreen", "ConfirmDiscard", "HelpScreen", "LoadProblems", "equations_text"]

EQUATIONS = """\
Where each number comes from (concentrations in uM; sources as named in the core modules
and reference tables; 'from memory' = recalled, not verified against the primary text)

Perpetrator concentrations (interact/exposure.py)
  Imax,u    = fu,p x Cmax (fu,p raised to the rule set's floor unless measured)   [@dmd2019inlet]
  Igut      = dose / 250 mL                                                   [@dmd2019inlet] (all agencies)
  Iin,max,u = fu,p x (Cmax + Fa*Fg x ka x Dose / (Qh x Rb))                     [@dmd2019inlet], [@jpetverinurad]
  I,ent     = fu,gut x Fa x ka x Dose / Qent (gut wall, mechanistic model)      from memory
  Metabolites: their systemic Imax,u at every site                            [@jpetverinurad] (practice)

Unbound constants (interact/constants.py, interact/kinetics/conversion.py)
  Ki,u = Ki x fu,inc (fu,inc empty: 1, Ki taken as unbound)
  Ki from IC50, [@chengprusoff1973]:
    competitive Ki = IC50 / (1 + [S]/Km); uncompetitive Ki = IC50 / (1 + Km/[S]);
    noncompetitive Ki = IC50; mixed IC50 = (Km + [S]) / (Km/Ki + [S]/(alpha Ki))
  Transporters: IC50 taken as Ki, as guidance does

Basic static models (interact/screening.py; cutoffs from the chosen rule set)
  R1      = 1 + sum(Imax,u / Ki,u), study indicated if R1 >= 1.02             [@lee2024] (FDA 2020)
  R1,gut  = 1 + Igut / Ki,u, study indicated if >= 11 (Igut/Ki >= 10)          [@jpetverinurad]
  R(OATP) = 1 + Iin,max,u / IC50, study indicated if >= 1.1                    [@jpetverinurad]; M12 value inferred
  Each test's source and status is shown in the rule-set table (interact tables)

Mechanistic static model (interact/prediction.py; net-effect form of [@fahmi2008],
structure seen in [@guengerich2022], equations from memory with the algebra checked)
  activity left = 1 / (1 + sum [I]/Ki,u)  (reversible; x inactivation x induction when given)
  liver: AUCR_h = 1 / (sum fm x activity_h + (1 - sum fm)), [I] = Iin,max,u
  gut:   AUCR_g = 1 / (activity_g x (1 - Fg) + Fg), [I] = I,ent, victim's Fg
  total: AUCR = AUCR_g x AUCR_h; class bands of [@fda2020clinical] (see interact tables)
  complete-inhibition ceiling: 1/(1 - sum fm inhibited) in the liver, 1/Fg in the gut
  study indicated if AUCR >= 1.25 ([@vieira2014]; inferred for the guidance)

Dose (interact/dosing.py; linear pharmacokinetics, common practice)
  exposure of a regimen = AUCR x dose / usual dose x usual tau / tau; only regimens inside the boundary are offered
  act only outside the object drug's no-effect boundary (ICH M12 5.3.1 as quoted in [@bebac-m12], default 0.8-1.25)
  perpetrator dose ceiling: highest dose keeping AUCR <= upper boundary, concentrations
  taken as dose-proportional

Plots
  AUC ratio against fm: the liver and gut terms above with the inhibitor's effect held at its
  current value; AUC ratio against perpetrator dose: the same model with every perpetrator
  concentration scaled with the dose.
"""


def equations_text() -> str:
    """The equations with their citations resolved, then the full references they cite."""
    keys = cited_keys((EQUATIONS,))
    refs = "\n".join(f"  {load_sources()[k].short}: {full_citation(k)}" for k in keys)
    return resolve(EQUATIONS) + ("\nReferences\n" + refs + "\n" if refs else "")


class _Popup(ModalScreen[object]):
    BINDINGS: ClassVar[list[BindingType]] = [Binding("escape", "close", "Close")]

    def action_close(self) -> None:
        self.dismiss(None)


class HelpScreen(_Popup):
    """Every key binding, then the equations behind each result with their sources."""

    def __init__(self, bindings: list[tuple[str, str]]) -> None:
        super().__init__()
        self._key_help = bindings

    def compose(self) -> ComposeResult:
        keys = "\n".join(f"  {k:<14} {d}" for k, d in self._key_help)
        with Vertical(classes="popup wide"):
            yield Label("Keys and equations (Escape closes)", classes="popup-title")
            with VerticalScroll():
                yield Static(
                    "Keys\n" + keys + "\n  Tab / Shift+Tab move between fields and buttons; Enter presses a button.\n"
                    "  In a field, type a value with its unit (812 ng/mL, 0.35 uM, 24 h); leave it empty for the default.\n"
                    "  Suggestions (targets, mechanisms, yes/no) are accepted with the Right arrow.\n",
                    markup=False,
                )
                yield Static(equations_text(), markup=False, id="equations")


class CautionsScreen(_Popup):
    """The full cautions and the dose cautions."""

    def compose(self) -> ComposeResult:
        text = (
            "Cautions\n"
            + "\n".join(f"- {c}" for c in CAUTIONS)
            + "\n\nWith every dose suggestion\n"
            + "\n".join(f"- {c}" for c in DOSE_CAUTIONS)
            + f"\n- {INCREASE_CAUTION}"
        )
        with Vertical(classes="popup wide"):
            yield Label("Cautions (Escape closes)", classes="popup-title")
            with VerticalScroll():
                yield Static(text, markup=False, id="caution-text")


class AskPath(_Popup):
    """Ask for a file name (open or save as)."""

    def __init__(self, title: str, start: str = "", *, confirm_existing: Path | bool | None = False) -> None:
        """``confirm_existing``: ask before replacing an existing file other than this one (False: never ask)."""
        super().__init__()
        self._title = title
        self._start = start
        self._current = confirm_existing
        self._warned = ""

    def compose(self) -> ComposeResult:
        with Vertical(classes="popup"):
            yield Label(f"{self._title} (Enter confirms, Escape cancels)", classes="popup-title")
            yield TextBox(value=self._start, placeholder="path/to/scenario.toml", id="path")
            yield Static("", id="path-note", markup=False)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        text = event.value.strip()
        if not text:
            self.query_one("#path-note", Static).update("error: give a file name, e.g. my-scenario.toml")
            return
        path = Path(text).expanduser()
        if path.is_dir():
            self.query_one("#path-note", Static).update(f"error: {path} is a folder; give a file name inside it")
            return
        if self._current is not False and path.exists() and path != self._current and self._warned != text:
            self._warned = text
            self.query_one("#path-note", Static).update(f"{path} exists: press Enter again to replace it, or change the name")
            return
        self.dismiss(str(path))


class ConfirmDiscard(ModalScreen[str]):
    """Unsaved edits: save first, discard them, or go back."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "choose('back')", "Go back"),
        Binding("s", "choose('save')", "Save first"),
        Binding("d", "choose('discard')", "Discard"),
    ]

    def __init__(self, doing: str, can_save: bool, why_not: str = "") -> None:
        super().__init__()
        self._doing = doing
        self._can_save = can_save
        self._why_not = why_not

    def compose(self) -> ComposeResult:
        with Vertical(classes="popup"):
            yield Label("Unsaved edits", classes="popup-title")
            msg = f"The scenario has edits that are not saved. Before you {self._doing}:"
            if not self._can_save:
                msg += f"\n(It cannot be saved now: {self._why_not})"
            yield Static(msg, markup=False)
            with Horizontal(classes="buttons"):
                if self._can_save:
                    yield Button("Save first (s)", id="save", variant="primary")
                yield Button("Discard the edits (d)", id="discard", variant="error")
                yield Button("Go back (Escape)", id="back")

    def on_button_pressed(self, event: Button.Pressed) -> None:
        self.dismiss(event.button.id or "back")

    def action_choose(self, what: str) -> None:
        if what == "save" and not self._can_save:
            return
        self.dismiss(what)


class LoadProblems(_Popup):
    """A file that could not be opened: its problems; nothing else changed."""

    def __init__(self, path: str, message: str) -> None:
        super().__init__()
        self._path = path
        self._message = message

    def compose(self) -> ComposeResult:
        with Vertical(classes="popup wide"):
            yield Label("Could not open the file (Escape closes); the current scenario is unchanged", classes="popup-title")
            with VerticalScroll():
                yield Static(f"{self._path}\n\n{self._message}", markup=False, id="problems")
