"""A small vocabulary for describing the scene format once.

The same :class:`Field` objects validate a parsed scene (with located,
friendly errors) and generate its JSON Schema (draft 2020-12), so the two
cannot drift apart.  Every field carries a description and an example.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass, field as dc_field
from datetime import date, datetime
from typing import Any

from domegen.errors import SceneError
from domegen.scene.yamlload import Map, Mark, Seq

_MISSING = object()


def _type_name(v) -> str:
    if v is None:
        return "nothing"
    if isinstance(v, bool):
        return "true/false"
    if isinstance(v, (int, float)):
        return "a number"
    if isinstance(v, str):
        return "text"
    if isinstance(v, (Map, dict)):
        return "a mapping"
    if isinstance(v, (Seq, list)):
        return "a list"
    if isinstance(v, (date, datetime)):
        return "a date"
    return type(v).__name__


class Ctx:
    """Where a value sits: its field path and file position."""

    def __init__(self, path: str, mark: Mark | None):
        self.path = path
        self.mark = mark

    def error(self, message: str, value=None, hint: str | None = None) -> SceneError:
        m = self.mark
        return SceneError(message, field=self.path or None, value=value, hint=hint,
                          file=m.file if m else None, line=m.line if m else None,
                          column=m.column if m else None)


@dataclass
class Field:
    """Base: a description and an example, plus a default when optional."""

    description: str
    example: Any = None
    default: Any = _MISSING

    @property
    def required(self) -> bool:
        return self.default is _MISSING

    def check(self, value, ctx: Ctx, marks: dict):
        raise NotImplementedError

    def json_core(self) -> dict:
        raise NotImplementedError

    def json(self) -> dict:
        out = {"description": self.description}
        out.update(self.json_core())
        if self.example is not None:
            out["examples"] = [self.example]
        if not self.required and self.default is not None and not isinstance(self.default, (dict, list)):
            out["default"] = self.default
        return out


@dataclass
class Number(Field):
    minimum: float | None = None
    maximum: float | None = None
    integer: bool = False
    unit: str = ""

    def check(self, value, ctx, marks):
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise ctx.error(f"expected {'a whole number' if self.integer else 'a number'}"
                            f"{' in ' + self.unit if self.unit else ''}, got {_type_name(value)} {value!r}",
                            value=value)
        if not math.isfinite(value):
            raise ctx.error(f"expected a finite number, got {value!r}", value=value)
        if self.integer and value != int(value):
            raise ctx.error(f"expected a whole number, got {value!r}", value=value)
        u = f" {self.unit}" if self.unit else ""
        if self.minimum is not None and value < self.minimum:
            raise ctx.error(f"{value}{u} is below the minimum {self.minimum}{u}", value=value,
                            hint=self._range())
        if self.maximum is not None and value > self.maximum:
            raise ctx.error(f"{value}{u} is above the maximum {self.maximum}{u}", value=value,
                            hint=self._range())
        return int(value) if self.integer else float(value)

    def _range(self) -> str:
        return f"allowed: {self.minimum if self.minimum is not None else '-inf'} to " \
               f"{self.maximum if self.maximum is not None else 'inf'}"

    def json_core(self):
        out = {"type": "integer" if self.integer else "number"}
        if self.minimum is not None:
            out["minimum"] = self.minimum
        if self.maximum is not None:
            out["maximum"] = self.maximum
        return out


@dataclass
class Text(Field):
    pattern: str | None = None       # a regular expression the whole text must match
    pattern_help: str = ""
    accept_dates: bool = False       # YAML reads 2026-08-12 as a date: take it back as text
    max_length: int = 500

    def check(self, value, ctx, marks):
        if self.accept_dates and isinstance(value, (date, datetime)):
            value = value.isoformat()
        if not isinstance(value, str):
            raise ctx.error(f"expected text, got {_type_name(value)} {value!r}", value=value,
                            hint=self.pattern_help or None)
        if len(value) > self.max_length:
            raise ctx.error(f"text longer than {self.max_length} characters", value=value[:40])
        if self.pattern and not re.fullmatch(self.pattern, value, flags=re.IGNORECASE):
            raise ctx.error(f"cannot read {value!r}", value=value, hint=self.pattern_help or None)
        return value

    def json_core(self):
        out = {"type": "string", "maxLength": self.max_length}
        if self.pattern:
            # JSON Schema patterns are case-sensitive: fold case by hand
            out["pattern"] = "^(?:" + _case_fold(self.pattern) + ")$"
        return out


def _case_fold(pattern: str) -> str:
    """Rewrite letters outside classes/escapes as ``[aA]`` so a case-sensitive engine matches any case."""
    out, i, in_class = [], 0, False
    while i < len(pattern):
        c = pattern[i]
        if c == "\\":
            out.append(pattern[i:i + 2])
            i += 2
            continue
        if c == "[" and not in_class:
            in_class = True
        elif c == "]" and in_class:
            in_class = False
        elif c == "{" and not in_class:
            j = pattern.index("}", i)
            out.append(pattern[i:j + 1])
            i = j + 1
            continue
        elif c == "?" and i + 1 < len(pattern) and pattern[i + 1] == ":" :
            out.append("?:")
            i += 2
            continue
        if c.isalpha() and not in_class:
            out.append(f"[{c.lower()}{c.upper()}]")
        else:
            out.append(c)
        i += 1
    return "".join(out)


@dataclass
class Choice(Field):
    choices: tuple = ()

    def check(self, value, ctx, marks):
        if value not in self.choices or isinstance(value, bool) != any(isinstance(c, bool) for c in self.choices):
            listed = ", ".join(repr(c) for c in self.choices)
            near = difflib.get_close_matches(str(value), [str(c) for c in self.choices], n=1, cutoff=0.6)
            hint = f"did you mean {near[0]!r}? allowed: {listed}" if near else f"allowed: {listed}"
            raise ctx.error(f"{value!r} is not one of the allowed values", value=value, hint=hint)
        return value

    def json_core(self):
        return {"enum": list(self.choices)}


@dataclass
class Either(Field):
    """One of several shapes, tried in order (e.g. a number or a text such as "20 s")."""

    options: tuple = ()

    def check(self, value, ctx, marks):
        errors = []
        for opt in self.options:
            if _shape_fits(opt, value):
                return opt.check(value, ctx, marks)
            errors.append(opt)
        kinds = " or ".join(o.description for o in self.options)
        raise ctx.error(f"expected {kinds}, got {_type_name(value)} {value!r}", value=value,
                        hint=next((o.pattern_help for o in self.options if getattr(o, "pattern_help", "")),
                                  None))

    def json_core(self):
        return {"oneOf": [o.json() for o in self.options]}


def _shape_fits(opt: Field, value) -> bool:
    if isinstance(opt, Number):
        return isinstance(value, (int, float)) and not isinstance(value, bool)
    if isinstance(opt, Text):
        return isinstance(value, str) or (opt.accept_dates and isinstance(value, (date, datetime)))
    if isinstance(opt, Choice):
        return value in opt.choices
    if isinstance(opt, Section):
        return isinstance(value, dict)
    if isinstance(opt, ListOf):
        return isinstance(value, list)
    return True


@dataclass
class ListOf(Field):
    item: Field = None
    min_items: int = 0
    max_items: int = 10_000

    def check(self, value, ctx, marks):
        if isinstance(value, str) and isinstance(self.item, Text):
            value = Seq([value])  # one text where a list of texts is allowed
            value.item_marks = [ctx.mark]
        if not isinstance(value, list):
            raise ctx.error(f"expected a list, got {_type_name(value)} {value!r}", value=value,
                            hint="start each item on its own line with '- '")
        if len(value) < self.min_items:
            raise ctx.error(f"expected at least {self.min_items} item(s), got {len(value)}")
        if len(value) > self.max_items:
            raise ctx.error(f"expected at most {self.max_items} items, got {len(value)}")
        out = []
        for i, v in enumerate(value):
            m = value.mark_of(i) if isinstance(value, Seq) else ctx.mark
            sub = Ctx(f"{ctx.path}[{i}]", m)
            marks[sub.path] = m
            out.append(self.item.check(v, sub, marks))
        return out

    def json_core(self):
        out = {"type": "array", "items": self.item.json()}
        if self.min_items:
            out["minItems"] = self.min_items
        out["maxItems"] = self.max_items
        if isinstance(self.item, Text):  # one text stands for a list of one
            return {"anyOf": [self.item.json(), out]}
        return out


@dataclass
class Section(Field):
    fields: dict = dc_field(default_factory=dict)
    #: groups of keys of which at most one may be given (e.g. "end" and "rate")
    exclusive: tuple = ()

    def check(self, value, ctx, marks):
        if value is None and not self.required:
            value = Map()
        if not isinstance(value, dict):
            raise ctx.error(f"expected a mapping of keys to values, got {_type_name(value)} {value!r}",
                            value=value, hint="write 'key: value' lines indented under this one")
        out = {}
        for key in value:
            if key not in self.fields:
                km = value.key_marks.get(key) if isinstance(value, Map) else ctx.mark
                near = difflib.get_close_matches(str(key), list(self.fields), n=1, cutoff=0.6)
                hint = f"did you mean {near[0]!r}?" if near else \
                    "allowed keys: " + ", ".join(self.fields)
                raise Ctx(_join(ctx.path, key), km).error(f"unknown key {key!r}", value=key, hint=hint)
        for group in self.exclusive:
            given = [k for k in group if k in value]
            if len(given) > 1:
                km = value.key_marks.get(given[1]) if isinstance(value, Map) else ctx.mark
                raise Ctx(_join(ctx.path, given[1]), km).error(
                    f"give only one of {', '.join(repr(g) for g in group)}, not both {given[0]!r} and "
                    f"{given[1]!r}")
        for key, f in self.fields.items():
            path = _join(ctx.path, key)
            if key in value:
                m = value.mark_of(key) if isinstance(value, Map) else ctx.mark
                marks[path] = m
                out[key] = f.check(value[key], Ctx(path, m), marks)
            elif f.required:
                raise ctx.error(f"missing required key {key!r} ({f.description})",
                                hint=f"for example  {key}: {f.example!r}" if f.example is not None else None)
            elif isinstance(f.default, dict):
                out[key] = f.check(Map(), Ctx(path, ctx.mark), marks)  # fill nested defaults
            elif isinstance(f.default, list):
                out[key] = list(f.default)
            else:
                out[key] = f.default
        return out

    def json_core(self):
        out = {"type": "object",
               "properties": {k: f.json() for k, f in self.fields.items()},
               "additionalProperties": False}
        req = [k for k, f in self.fields.items() if f.required]
        if req:
            out["required"] = req
        if self.exclusive:
            out["not"] = {"anyOf": [{"required": [a, b]} for g in self.exclusive
                                    for i, a in enumerate(g) for b in g[i + 1:]]}
        return out


def _join(path: str, key: str) -> str:
    return f"{path}.{key}" if path else str(key)
