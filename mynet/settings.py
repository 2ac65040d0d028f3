"""Every setting in one typed schema: its type, allowed values, meaning and default.

A setting is declared once, in one of two ways:

* a field of a model dataclass (``tie_model.*`` in :mod:`mynet.evidence.ties`,
  ``warmth_model.*`` in :mod:`mynet.evidence.warmth`, ``analysis.*`` in
  :mod:`mynet.analysis.snapshot`), written with :func:`setting` beside the field::

      half_life_days: float = setting(180.0, "days after which an interaction counts half", low=0, low_open=True)

  the class derives from :class:`SettingsGroup` with ``group="warmth_model"``, and
  its one ``from_settings`` reads and checks the stored values;
* a workspace-wide value (``webmail_domains``, ``org_aliases``), written with
  :func:`declare` in this module.

:func:`mynet.workspace.settings.schema` collects both into one table (name ->
:class:`Spec`). ``mynet settings`` lists it, :func:`mynet.workspace.settings.parse`
checks what a user types (a clear error naming the setting and what it accepts),
and :meth:`SettingsGroup.from_settings` checks what is stored, so a value that is out of range or of the wrong type
never reaches the
analysis. Adding a setting is one entry: a field with :func:`setting`, or one
:func:`declare` call.
"""

from __future__ import annotations

import math
import re
from dataclasses import MISSING, dataclass, field, fields, replace
from typing import Any, ClassVar, Mapping

from .errors import MynetError

__all__ = ["Spec", "SettingsGroup", "setting", "declare", "registered", "SettingError"]


class SettingError(MynetError):
    """A setting's value is not one it accepts (the message says which values it does)."""

    exit_code = 2


_DOMAIN = re.compile(r"^[\w-]+(\.[\w-]+)+$")
_TRUE = {"true", "yes", "on", "1"}
_FALSE = {"false", "no", "off", "0"}


@dataclass(frozen=True)
class Spec:
    """One setting: what it holds, which values it accepts, what it means, its default.

    ``kind`` is one of ``float``, ``int``, ``bool``, ``choice`` (one of ``choices``),
    ``domains`` (a list of mail domains), ``words`` (a list of texts) or ``aliases``
    (``ALIAS=NAME`` pairs). ``low``/``high`` bound numbers (exclusive when
    ``low_open``/``high_open``). ``affects`` names what a change re-derives
    (``"contacts"``: the merged contacts are rebuilt at once).
    """

    kind: str
    meaning: str
    default: Any = None
    low: float | None = None
    high: float | None = None
    low_open: bool = False
    high_open: bool = False
    choices: tuple[str, ...] = ()
    affects: str = ""
    name: str = ""

    def accepts(self) -> str:
        """The accepted values in plain words ("a number from 0 to 1", "one of auto, louvain")."""
        if self.kind == "choice":
            return "one of " + ", ".join(self.choices)
        if self.kind == "bool":
            return "yes or no"
        if self.kind == "domains":
            return "mail domains, comma-separated (a leading + adds to the list)"
        if self.kind == "words":
            return "texts, comma-separated (a leading + adds to the list)"
        if self.kind == "aliases":
            return "ALIAS=NAME pairs, comma-separated (a leading + adds to them)"
        what = "a whole number" if self.kind == "int" else "a number"
        lo, hi = _fmt(self.low), _fmt(self.high)
        if self.low is not None and self.high is not None:
            if not self.low_open and not self.high_open:
                return f"{what} from {lo} to {hi}"
            left = f"above {lo}" if self.low_open else f"at least {lo}"
            right = f"below {hi}" if self.high_open else f"at most {hi}"
            return f"{what} {left} and {right}"
        if self.low is not None:
            return f"{what} {'above' if self.low_open else 'at least'} {lo}"
        if self.high is not None:
            return f"{what} {'below' if self.high_open else 'at most'} {hi}"
        return what

    def _bad(self, value: Any) -> SettingError:
        return SettingError(f"{self.name} takes {self.accepts()}; got {value!r}")

    def _in_range(self, x: float, raw: Any) -> None:
        if not math.isfinite(x):
            raise self._bad(raw)
        if self.low is not None and (x < self.low or (self.low_open and x == self.low)):
            raise self._bad(raw)
        if self.high is not None and (x > self.high or (self.high_open and x == self.high)):
            raise self._bad(raw)

    def parse(self, text: str, current: Any = None) -> Any:
        """The value a user typed, checked (``current``: the stored value, for a leading ``+``)."""
        text = text.strip()
        if self.kind in ("float", "int"):
            try:
                x = float(text)
            except ValueError:
                raise self._bad(text) from None
            if self.kind == "int":
                if not x.is_integer():
                    raise self._bad(text)
                x = int(x)
            self._in_range(x, text)
            return x
        if self.kind == "bool":
            if text.lower() in _TRUE | _FALSE:
                return text.lower() in _TRUE
            raise self._bad(text)
        if self.kind == "choice":
            low = text.lower()
            if low in self.choices:
                return low
            raise self._bad(text)
        add = text.startswith("+")
        items = [v.strip() for v in text.lstrip("+").split(",") if v.strip()]
        if self.kind == "aliases":
            out = dict(current or {}) if add else {}
            for item in items:
                alias, eq, target = item.partition("=")
                if not eq or not alias.strip() or not target.strip():
                    raise SettingError(f"{self.name}: an alias is written ALIAS=NAME, got {item!r}")
                out[alias.strip()] = target.strip()
            return out
        if self.kind == "domains":
            items = [i.lower().lstrip("@") for i in items]
            bad = [i for i in items if not _DOMAIN.match(i)]
            if bad:
                raise SettingError(f"{self.name} takes mail domains such as mail.example; {bad[0]!r} is not one")
        return sorted({*(current or [] if add else []), *items})

    def check(self, value: Any) -> Any:
        """A stored value, checked and typed (raises :class:`SettingError` when it is not valid)."""
        if self.kind in ("float", "int"):
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                raise self._bad(value)
            if self.kind == "int":
                if not float(value).is_integer():
                    raise self._bad(value)
                value = int(value)
            else:
                value = float(value)
            self._in_range(value, value)
            return value
        if self.kind == "bool":
            if not isinstance(value, bool):
                raise self._bad(value)
            return value
        if self.kind == "choice":
            if value not in self.choices:
                raise self._bad(value)
            return value
        if self.kind == "aliases":
            if not isinstance(value,
                              dict) or not all(isinstance(k, str) and isinstance(v, str) for k, v in value.items()):
                raise self._bad(value)
            return dict(value)
        if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
            raise self._bad(value)
        return list(value)


def _fmt(x: float | None) -> str:
    return "" if x is None else (f"{x:g}" if isinstance(x, float) else str(x))


def setting(default: Any, meaning: str, *, low: float | None = None, high: float | None = None,
            low_open: bool = False, high_open: bool = False, choices: tuple[str, ...] = ()) -> Any:
    """A dataclass field that is also a setting (see the module notes).

    The kind follows the default: ``bool``, ``int``, ``float``, or ``choice`` for a text
    default with ``choices``.
    """
    if isinstance(default, bool):
        kind = "bool"
    elif isinstance(default, int):
        kind = "int"
    elif isinstance(default, float):
        kind = "float"
    elif isinstance(default, str) and choices:
        kind = "choice"
    else:
        raise TypeError(f"no setting kind for a default of {default!r}")
    spec = Spec(kind, meaning, default, low, high, low_open, high_open, tuple(choices))
    return field(default=default, metadata={"setting": spec})


_GROUPS: dict[str, type] = {}
_DECLARED: dict[str, Spec] = {}


class SettingsGroup:
    """Base of the model dataclasses whose fields are settings (``group.field``)."""

    group: ClassVar[str] = ""

    def __init_subclass__(cls, group: str = "", **kw):
        super().__init_subclass__(**kw)
        if group:
            cls.group = group
            _GROUPS[group] = cls

    @classmethod
    def specs(cls) -> dict[str, Spec]:
        """Field name -> its :class:`Spec` (with the full name and the default filled in)."""
        out = {}
        for f in fields(cls):  # type: ignore[arg-type]
            spec = f.metadata.get("setting")
            if spec is not None:
                default = f.default if f.default is not MISSING else spec.default
                out[f.name] = replace(spec, name=f"{cls.group}.{f.name}", default=default)
        return out

    @classmethod
    def from_settings(cls, raw: Mapping[str, Any] | None):
        """The model from the stored values of its group (absent ones take their default).

        Raises
        ------
        SettingError
            When a stored value is not one the setting accepts (the message says how to fix it).
        """
        values = {}
        for name, spec in cls.specs().items():
            if raw and name in raw:
                try:
                    values[name] = spec.check(raw[name])
                except SettingError as exc:
                    raise SettingError(f"the stored {exc}; change it with mynet settings {spec.name}=VALUE") from None
        return cls(**values)


def declare(name: str, kind: str, meaning: str, default: Any, *, affects: str = "") -> Spec:
    """Declare a workspace-wide setting (not part of a model group); returns its spec."""
    spec = Spec(kind, meaning, default, affects=affects, name=name)
    _DECLARED[name] = spec
    return spec


declare("webmail_domains", "domains", "mail domains that say nothing about an employer, besides the built-in list", [],
        affects="contacts")
declare("mail_relay_domains", "domains", "domains of list relays, archives and bounce services: never an employer, "
        "never a person (mynet finds archive domains itself too)", [], affects="contacts")
declare("org_aliases", "aliases", "other names of an organisation (ALIAS=NAME), merged before anything else", {},
        affects="contacts")


def registered() -> tuple[dict[str, type], dict[str, Spec]]:
    """The model groups and the workspace-wide settings declared so far (group name -> class, name -> spec).

    A model group registers itself when its module is imported; the full schema
    of a workspace, every group included, is :func:`mynet.workspace.settings.schema`.
    """
    return dict(_GROUPS), dict(_DECLARED)
