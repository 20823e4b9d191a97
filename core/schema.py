"""Declarative field specifications and the generic JSON codec for study dataclasses.

Every field of a study dataclass is declared with one of the helpers here (:func:`num`,
:func:`integer`, :func:`text`, :func:`choice`, :func:`flag`, :func:`nested`, :func:`items`).
The helper records the unit, the allowed range and a note in the field's metadata, so one codec
can decode, validate and encode every part of a study, and the GUI can show units and notes
without a second table of them.

Decoding never stops at the first problem: it collects ``(path, reason)`` pairs, such as
``("bands[1].f_high_ghz", "must be greater than f_low_ghz (26.5)")``.
"""

from __future__ import annotations

import dataclasses
import functools
import math
from collections.abc import Callable
from dataclasses import dataclass, field
from enum import StrEnum
from typing import Any, Literal

__all__ = [
    "FieldSpec",
    "Problem",
    "choice",
    "decode",
    "encode",
    "field_spec",
    "flag",
    "integer",
    "items",
    "nested",
    "num",
    "text",
]

Kind = Literal["float", "int", "str", "bool", "enum", "nested", "items"]


@dataclass(frozen=True, slots=True)
class Problem:
    """One validation problem: where (a field path) and why (plain language)."""

    path: str
    reason: str
    severity: Literal["error", "warning", "note"] = "error"

    def __str__(self) -> str:
        return f"{self.path}: {self.reason}" if self.path else self.reason


@dataclass(frozen=True, slots=True)
class FieldSpec:
    """What a field holds, in which unit, and which values are allowed."""

    kind: Kind
    unit: str = ""
    label: str = ""
    note: str = ""
    lo: float | None = None
    hi: float | None = None
    lo_open: bool = False
    hi_open: bool = False
    optional: bool = False
    cls: type | None = None
    max_len: int = 200

    def range_problem(self, value: float) -> str | None:
        """A plain-language reason when ``value`` is outside the allowed range, else None."""
        u = f" {self.unit}" if self.unit and self.unit not in ("%", "1") else self.unit
        if u == "1":
            u = ""
        if self.lo is not None and (value <= self.lo if self.lo_open else value < self.lo):
            word = "greater than" if self.lo_open else "at least"
            return f"must be {word} {self.lo:g}{u} (got {value:g})"
        if self.hi is not None and (value >= self.hi if self.hi_open else value > self.hi):
            word = "less than" if self.hi_open else "at most"
            return f"must be {word} {self.hi:g}{u} (got {value:g})"
        return None


def _meta(spec: FieldSpec) -> dict[str, FieldSpec]:
    return {"spec": spec}


def num(
    default: float | None,
    unit: str = "",
    *,
    label: str = "",
    note: str = "",
    lo: float | None = None,
    hi: float | None = None,
    lo_open: bool = False,
    hi_open: bool = False,
    optional: bool = False,
) -> Any:
    """A finite real number in ``unit``; ``optional`` allows ``None`` (JSON null)."""
    spec = FieldSpec("float", unit, label, note, lo, hi, lo_open, hi_open, optional)
    return field(default=default, metadata=_meta(spec))


def integer(
    default: int | None,
    unit: str = "",
    *,
    label: str = "",
    note: str = "",
    lo: int | None = None,
    hi: int | None = None,
    optional: bool = False,
) -> Any:
    """A whole number; ``optional`` allows ``None`` (for example "auto" stage count)."""
    spec = FieldSpec("int", unit, label, note, lo, hi, optional=optional)
    return field(default=default, metadata=_meta(spec))


def text(default: str = "", *, label: str = "", note: str = "", max_len: int = 200) -> Any:
    """A string of at most ``max_len`` characters."""
    spec = FieldSpec("str", label=label, note=note, max_len=max_len)
    return field(default=default, metadata=_meta(spec))


def flag(default: bool, *, label: str = "", note: str = "") -> Any:
    """A boolean."""
    return field(default=default, metadata=_meta(FieldSpec("bool", label=label, note=note)))


def choice(cls: type[StrEnum], default: StrEnum, *, label: str = "", note: str = "") -> Any:
    """One member of the StrEnum ``cls``, stored as its value."""
    spec = FieldSpec("enum", label=label, note=note, cls=cls)
    return field(default=default, metadata=_meta(spec))


def nested(cls: type, *, label: str = "", note: str = "") -> Any:
    """A nested study dataclass with defaults for every field."""
    spec = FieldSpec("nested", label=label, note=note, cls=cls)
    return field(default_factory=cls, metadata=_meta(spec))


def items(cls: type, *, label: str = "", note: str = "", lo: int = 0) -> Any:
    """A tuple of study dataclasses (a JSON list); ``lo`` is the minimum count."""
    spec = FieldSpec("items", label=label, note=note, cls=cls, lo=lo)
    return field(default=(), metadata=_meta(spec))


@functools.cache
def field_spec(cls: type, name: str) -> FieldSpec:
    """The :class:`FieldSpec` of field ``name`` of study dataclass ``cls`` (cached: fixed)."""
    for f in dataclasses.fields(cls):
        if f.name == name:
            return f.metadata["spec"]
    raise KeyError(f"{cls.__name__} has no field {name!r}")


def _join(path: str, key: str) -> str:
    return f"{path}.{key}" if path else key


def _decode_value(spec: FieldSpec, raw: Any, path: str, problems: list[Problem]) -> Any:
    """Decode one JSON value; append problems and return a sentinel on failure."""
    if raw is None:
        if spec.optional:
            return None
        problems.append(Problem(path, "a value is required (got null)"))
        return _BAD
    match spec.kind:
        case "float":
            if isinstance(raw, bool) or not isinstance(raw, int | float):
                problems.append(Problem(path, f"must be a number (got {_describe(raw)})"))
                return _BAD
            value = float(raw)
            if not math.isfinite(value):
                problems.append(Problem(path, "must be a finite number"))
                return _BAD
            reason = spec.range_problem(value)
            if reason:
                problems.append(Problem(path, reason))
                return _BAD
            return value
        case "int":
            if isinstance(raw, bool) or not isinstance(raw, int):
                if isinstance(raw, float) and raw.is_integer() and math.isfinite(raw):
                    raw = int(raw)
                else:
                    problems.append(Problem(path, f"must be a whole number (got {_describe(raw)})"))
                    return _BAD
            reason = spec.range_problem(raw)
            if reason:
                problems.append(Problem(path, reason))
                return _BAD
            return raw
        case "str":
            if not isinstance(raw, str):
                problems.append(Problem(path, f"must be text (got {_describe(raw)})"))
                return _BAD
            if len(raw) > spec.max_len:
                problems.append(Problem(path, f"is longer than {spec.max_len} characters"))
                return _BAD
            return raw
        case "bool":
            if not isinstance(raw, bool):
                problems.append(Problem(path, f"must be true or false (got {_describe(raw)})"))
                return _BAD
            return raw
        case "enum":
            assert spec.cls is not None
            allowed = [m.value for m in spec.cls]  # type: ignore[attr-defined]
            if raw not in allowed:
                problems.append(
                    Problem(path, f"must be one of {', '.join(allowed)} (got {_describe(raw)})")
                )
                return _BAD
            return spec.cls(raw)
        case "nested":
            assert spec.cls is not None
            out = decode(spec.cls, raw, path, problems)
            return _BAD if out is None else out
        case "items":
            assert spec.cls is not None
            if not isinstance(raw, list):
                problems.append(Problem(path, f"must be a list (got {_describe(raw)})"))
                return _BAD
            if spec.lo is not None and len(raw) < spec.lo:
                n = int(spec.lo)
                problems.append(
                    Problem(
                        path,
                        "needs at least one entry" if n == 1 else f"needs at least {n} entries",
                    )
                )
            decoded = [decode(spec.cls, r, f"{path}[{i}]", problems) for i, r in enumerate(raw)]
            return tuple(d for d in decoded if d is not None)
    raise AssertionError(spec.kind)  # pragma: no cover - every kind is handled above


_BAD = object()


def _describe(raw: Any) -> str:
    if isinstance(raw, str):
        return repr(raw if len(raw) <= 30 else raw[:27] + "...")
    if isinstance(raw, bool):
        return "true" if raw else "false"
    if isinstance(raw, int | float):
        return f"{raw!r}"
    return {dict: "an object", list: "a list"}.get(type(raw), type(raw).__name__)


def decode(cls: type, raw: Any, path: str, problems: list[Problem]) -> Any:
    """Decode JSON data ``raw`` into study dataclass ``cls``.

    Parameters
    ----------
    cls : type
        A dataclass whose fields were declared with this module's helpers.
    raw : object
        Parsed JSON (dict expected).
    path : str
        Field path of ``raw`` in the document, used in problem messages.
    problems : list of Problem
        Collector; every problem found is appended.

    Returns
    -------
    instance of ``cls`` or None
        None when ``raw`` is not an object or a required field is missing. A field whose value
        is bad is reported in ``problems`` and takes its default, so that the caller can still
        run cross-field rules; the caller must treat any problem as making the result invalid.
    """
    if not isinstance(raw, dict):
        problems.append(Problem(path, f"must be an object (got {_describe(raw)})"))
        return None
    fields = {f.name: f for f in dataclasses.fields(cls) if "spec" in f.metadata}
    for key in raw:
        if key not in fields:
            problems.append(Problem(_join(path, str(key)), "is not a known field"))
    values: dict[str, Any] = {}
    ok = True
    for name, f in fields.items():
        spec: FieldSpec = f.metadata["spec"]
        if name not in raw:
            if f.default is dataclasses.MISSING and f.default_factory is dataclasses.MISSING:
                problems.append(Problem(_join(path, name), "is missing"))
                ok = False
            continue
        value = _decode_value(spec, raw[name], _join(path, name), problems)
        if value is not _BAD:
            values[name] = value
        # A bad value falls back to the field default so that decoding can go on and the
        # cross-field rules still run; the problem recorded above keeps the result invalid.
    return cls(**values) if ok else None


def encode(obj: Any) -> Any:
    """Encode a study dataclass (recursively) into JSON-ready data."""
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        out: dict[str, Any] = {}
        for f in dataclasses.fields(obj):
            if "spec" in f.metadata:
                out[f.name] = encode(getattr(obj, f.name))
        return out
    if isinstance(obj, tuple | list):
        return [encode(o) for o in obj]
    if isinstance(obj, StrEnum):
        return obj.value
    return obj


def walk_numbers(obj: Any, path: str = "") -> list[tuple[str, FieldSpec, Any]]:
    """Every declared field under ``obj`` as ``(path, spec, value)``, depth first."""
    out: list[tuple[str, FieldSpec, Any]] = []
    for f in dataclasses.fields(obj):
        spec = f.metadata.get("spec")
        if spec is None:
            continue
        value = getattr(obj, f.name)
        p = _join(path, f.name)
        if spec.kind == "nested":
            out.extend(walk_numbers(value, p))
        elif spec.kind == "items":
            for i, v in enumerate(value):
                out.extend(walk_numbers(v, f"{p}[{i}]"))
        else:
            out.append((p, spec, value))
    return out


Validator = Callable[[Any], list[Problem]]
